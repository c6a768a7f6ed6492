import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitLinearLines, LINEAR_TERM_CONVENTION, type LinearLineInput } from '../../src/linear/fit.js';
import { parseLinearSpecies } from '../../src/linear/species.js';
import { thrown } from '../helpers/thrown.js';
import { ownNormal } from './own-linear-lines.js';

/**
 * Fast checks of the stages of fitLinearLines (reading, level identities and references, term selection, the
 * constrained next term, the report), each on a small list built here (milliseconds per fit), so that a mutation
 * run can afford them. Lines come from term values written out below (not src/linear/terms.ts), or from HITRAN
 * positions in ../shared/fixtures/linear-reference.json.
 *
 * Level energy used to build the lists (the form the fit documents, written out independently):
 *   E(J, e/f) = G + B y − D y² + H y³ ∓ ½ (q x + qJ x²),  x = J(J+1),  y = x − l²,  e: −, f: +
 */
interface Consts {
  G: number;
  B: number;
  D: number;
  H?: number;
  q?: number;
  qJ?: number;
}
function energy(c: Consts, l: number, J: number, parity: 'e' | 'f'): number {
  const x = J * (J + 1);
  const y = x - l * l;
  const doubling = l >= 1 ? (parity === 'e' ? -0.5 : 0.5) * ((c.q ?? 0) * x + (c.qJ ?? 0) * x * x) : 0;
  return c.G + c.B * y - c.D * y * y + (c.H ?? 0) * y * y * y + doubling;
}

const HCN = parseLinearSpecies('HCN');
const G0 = { v: [0, 0, 0], l: 0 };
const V2 = { v: [0, 1, 0], l: 1 };
const V3 = { v: [0, 0, 1], l: 0 };
// HCN constants, rounded, after the reference note (../shared/fixtures/linear-reference.json, "derived" from HITRAN
// energies): B0 1.4782218, D0 2.909e-6, H0 2.9e-12; 01¹0 B the mean of e and f 1.481779, q 0.0074876 (Q(1) at
// 0.014975 cm⁻¹). The 00⁰1 level: G ≈ 2096.8 (CDMS), B and D invented near B0 (no source: generator input only).
const C0: Consts = { G: 0, B: 1.4782218, D: 2.909e-6, H: 2.9e-12 };
const C2: Consts = { G: 711.98, B: 1.481779, D: 2.976e-6, q: 0.0074876, qJ: -8.8e-8 };
const C3: Consts = { G: 2096.8, B: 1.4675, D: 2.88e-6 };

type Branch = 'P' | 'Q' | 'R';
/** One line; J bookkeeping by hand: R J′ = J″ + 1, P J′ = J″ − 1, Q J′ = J″ with the other parity. */
function line(
  upper: { v: number[]; l: number },
  cu: Consts,
  lower: { v: number[]; l: number },
  cl: Consts,
  branch: Branch,
  j: number,
  lowerParity: 'e' | 'f',
  sigma: number | undefined,
  noise = 0,
): LinearLineInput {
  const ju = branch === 'R' ? j + 1 : branch === 'P' ? j - 1 : j;
  const pu = branch === 'Q' ? (lowerParity === 'e' ? 'f' : 'e') : lowerParity;
  const position = energy(cu, upper.l, ju, pu) - energy(cl, lower.l, j, lowerParity) + noise;
  return {
    position,
    ...(sigma !== undefined ? { uncertainty: sigma } : {}),
    assignment: {
      upper,
      lower,
      branch,
      j,
      ...(upper.l >= 1 && lower.l >= 1 ? { parity: lowerParity } : {}),
    },
  };
}

/** ν3 00⁰1–00⁰0 of HCN, P(1..n) and R(0..n−1), σ given, seeded noise of that σ. */
function nu3(n: number, sigma: number, seed: number, cu: Consts = C3, cl: Consts = C0): LinearLineInput[] {
  const z = ownNormal(seed);
  const out: LinearLineInput[] = [];
  for (let j = 1; j <= n; j++) out.push(line(V3, cu, G0, cl, 'P', j, 'e', sigma, sigma * z()));
  for (let j = 0; j < n; j++) out.push(line(V3, cu, G0, cl, 'R', j, 'e', sigma, sigma * z()));
  return out;
}

/** ν2 01¹0–00⁰0 of HCN: P and R reach the e component, Q the f component. */
function nu2(n: number, sigma: number, seed: number, withQ: boolean): LinearLineInput[] {
  const z = ownNormal(seed);
  const out: LinearLineInput[] = [];
  for (let j = 2; j <= n; j++) out.push(line(V2, C2, G0, C0, 'P', j, 'e', sigma, sigma * z()));
  for (let j = 0; j < n; j++) out.push(line(V2, C2, G0, C0, 'R', j, 'e', sigma, sigma * z()));
  if (withQ) for (let j = 1; j <= n; j++) out.push(line(V2, C2, G0, C0, 'Q', j, 'e', sigma, sigma * z()));
  return out;
}

const level = (r: ReturnType<typeof fitLinearLines>, key: string) => {
  const l = r.levels.find((x) => x.key === key);
  if (!l) throw new Error(`no level ${key}`);
  return l;
};
/** |value − truth| within k σ (k stated at each use). */
const within = (q: { value: number; uncertainty: number } | undefined, truth: number, k: number) => {
  expect(q).toBeDefined();
  expect(Math.abs((q?.value ?? Number.NaN) - truth)).toBeLessThan(k * (q?.uncertainty ?? 0));
};

describe('reading the lines', () => {
  it('refuses a non-positive or non-finite position and a non-positive uncertainty, naming the line', () => {
    const ok = nu3(6, 1e-4, 1);
    for (const bad of [0, -3, Number.NaN, Number.POSITIVE_INFINITY]) {
      const e = thrown(() => fitLinearLines(HCN, [...ok, { ...(ok[0] as LinearLineInput), position: bad }]));
      expect(e.code).toBe('INPUT_INVALID');
      expect(e.details).toEqual({ line: 12 });
      expect(e.message).toBe(`line 12: position ${bad} must be positive and finite`);
    }
    for (const bad of [0, -1e-4, Number.NaN, Number.POSITIVE_INFINITY]) {
      const e = thrown(() => fitLinearLines(HCN, [{ ...(ok[0] as LinearLineInput), uncertainty: bad }, ...ok]));
      expect(e.code).toBe('INPUT_INVALID');
      expect(e.details).toEqual({ line: 0 });
      expect(e.message).toBe(`line 0: uncertainty ${bad} must be positive`);
    }
  });

  it('an assignment the rules refuse is reported with the line index prepended', () => {
    const ok = nu3(6, 1e-4, 2);
    const e = thrown(() =>
      fitLinearLines(HCN, [
        ...ok,
        { position: 2000, assignment: { upper: V3, lower: G0, branch: 'P', j: 0 } }, // P(0) has J′ = −1
      ]),
    );
    expect(e.code).toBe('ASSIGNMENT_INVALID');
    expect(e.message.startsWith('line 12: P(0) of band 00⁰1–00⁰0: ')).toBe(true);
    expect(e.details.line).toBe(12);
    expect(e.details.branch).toBe('P');
  });

  it('absolute mode needs σ on every assigned line; no assigned line at all is its own refusal', () => {
    const ok = nu3(6, 1e-4, 3);
    const { uncertainty: _u, ...noSigma } = ok[4] as LinearLineInput;
    const e = thrown(() => fitLinearLines(HCN, [...ok.slice(0, 4), noSigma], { uncertaintyMode: 'absolute' }));
    expect(e.code).toBe('INPUT_INVALID');
    expect(e.details).toEqual({ line: 4 });
    expect(e.message).toBe('line 4 has no uncertainty: uncertaintyMode "absolute" needs one on every assigned line');
    // An unassigned line without σ is fine in absolute mode.
    const r = fitLinearLines(HCN, [...ok, { position: 2050.5 }], { uncertaintyMode: 'absolute' });
    expect(r.statistics.unassigned).toBe(1);
    const none = thrown(() => fitLinearLines(HCN, [{ position: 2000 }, { position: 2001, uncertainty: 1e-3 }]));
    expect(none.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(none.details).toEqual({ lines: 2 });
    expect(none.message).toBe('no line carries an assignment, so there is nothing to fit');
  });

  it('too few lines for the base model, and lines that cannot tell parameters apart', () => {
    // Base model of one band: G(00⁰1)−G(00⁰0), B(00⁰1), B(00⁰0): 3 parameters.
    const two = nu3(6, 1e-4, 4).slice(0, 2);
    const e = thrown(() => fitLinearLines(HCN, two));
    expect(e.code).toBe('FIT_TOO_FEW_LINES');
    expect(e.details).toEqual({ lines: 2, parameters: 3 });
    expect(e.message).toBe(
      // The reference level first (never an upper level), then the others.
      '2 assigned line(s) cannot determine the 3 parameters the bands need at the least (B(00⁰0), G(00⁰1)-G(00⁰0), B(00⁰1))',
    );
    // R(0) three times: J″ = 0 gives B(00⁰0) the coefficient 0 (y = 0), so it is not determined.
    const r0 = [0, 1, 2].map((i) => ({
      position: 2099.7 + i * 1e-4,
      uncertainty: 1e-4,
      assignment: { upper: V3, lower: G0, branch: 'R' as const, j: 0 },
    }));
    const d = thrown(() => fitLinearLines(HCN, r0));
    expect(d.code).toBe('FIT_RANK_DEFICIENT');
    expect(d.message).toMatch(/^the level model cannot be determined from these lines: /);
    expect(d.details.parameters).toContain('B(00⁰0)');
  });
});

describe('term selection, values and names', () => {
  it('ν3 of HCN from written-out term values: G, B, D of both levels within 4σ, names and keys, D then an H prior', () => {
    // 2 × 25 lines, σ 2e-5 cm⁻¹ with noise of that σ. H0 = 2.9e-12 gives at most 2.9e-12·650³ ≈ 8e-4 cm⁻¹ per
    // level but cancels nearly between the two levels' H (the fit then prefers H from the priors); tolerance 4σ
    // of the fitted uncertainty plus the size of the neglected H where stated.
    const lines = nu3(25, 2e-5, 11, { ...C3, H: 2.9e-12 });
    const r = fitLinearLines(HCN, lines);
    expect(r.convention).toBe(LINEAR_TERM_CONVENTION);
    expect(r.statistics.lines).toBe(50);
    expect(r.statistics.assigned).toBe(50);
    expect(r.statistics.fitted).toBe(50);
    expect(r.statistics.rejected).toBe(0);
    expect(r.statistics.unassigned).toBe(0);
    expect(r.statistics.uncertaintyMode).toBe('a-posteriori');
    const up = level(r, '0,0,1|0');
    const lo = level(r, '0,0,0|0');
    within(up.term, C3.G - C0.G, 4);
    expect(up.term?.relativeTo).toBe('0,0,0|0');
    expect(lo.term).toBeUndefined();
    within(up.B, C3.B, 4);
    within(lo.B, C0.B, 4);
    within(up.D, C3.D, 4);
    within(lo.D, C0.D, 4);
    expect(up.label).toBe('00⁰1');
    expect(lo.v).toEqual([0, 0, 0]);
    expect(up.l).toBe(0);
    // Names and keys of the parameters (API: lab software reads them).
    const names = r.parameters.map((p) => p.name);
    expect(names).toContain('G(00⁰1)-G(00⁰0)');
    expect(names).toContain('B(00⁰1)');
    expect(names).toContain('D(00⁰0)');
    expect(r.parameters.map((p) => p.key)).toContain('1H-12C-14N|B|0,0,1|0');
    expect(r.parameters.every((p) => p.unit === 'cm-1')).toBe(true);
    // Band: parallel, origin = G′ − G″ of this form, 25 P + 25 R lines, J″ 0..25.
    expect(r.bands).toHaveLength(1);
    const b = r.bands[0];
    expect(b?.label).toBe('00⁰1–00⁰0');
    expect(b?.kind).toBe('parallel');
    expect(b?.lines).toBe(50);
    expect(b?.jRange).toEqual([0, 25]);
    within(b?.origin, 2096.8, 4);
    // The origin's σ is that of the one term value (the lower level is the reference).
    expect(b?.origin?.uncertainty).toBeCloseTo(up.term?.uncertainty ?? 0, 15);
    // Covariance and correlation: square over the parameters, diagonal = σ², correlation diagonal 1.
    const p = r.parameters.length;
    expect(r.covariance.parameters).toEqual(names);
    expect(r.covariance.matrix).toHaveLength(p);
    r.parameters.forEach((x, i) => {
      expect(Math.sqrt(r.covariance.matrix[i]?.[i] ?? 0)).toBeCloseTo(x.uncertainty, 15);
      expect(r.correlation.matrix[i]?.[i]).toBeCloseTo(1, 12);
    });
    expect(r.statistics.parameters).toBe(p);
    expect(r.statistics.degreesOfFreedom).toBe(50 - (p - r.model.constraints.length));
    // rms of the residuals (σ 2e-5 noise): 0.5σ to 1.5σ.
    expect(r.statistics.rms).toBeGreaterThan(1e-5);
    expect(r.statistics.rms).toBeLessThan(3e-5);
    expect(r.lines.every((x) => x.status === 'fitted')).toBe(true);
    // The residual and calculated value add up to the position.
    for (const x of r.lines) expect((x.calculated ?? 0) + (x.residual ?? 0)).toBeCloseTo(x.position, 9);
    expect(r.model.selection).toBe(
      'per level B, then D, then H while the nested F test keeps p < 0.01; q for l ≥ 1 levels seen in both parity components',
    );
    expect(r.model.levelTerms.map((x) => x.level).sort()).toEqual(['0,0,0|0', '0,0,1|0']);
    expect(r.warnings.map((w) => w.code)).not.toContain('FEW_DEGREES_OF_FREEDOM');
  });

  it('D is fitted when the data carry it and held at B alone with maxCentrifugalOrder 1 or termSignificance 0', () => {
    const lines = nu3(20, 2e-5, 12);
    const full = fitLinearLines(HCN, lines);
    const terms = (r: ReturnType<typeof fitLinearLines>, key: string) =>
      r.model.levelTerms.find((x) => x.level === key)?.terms ?? [];
    expect(terms(full, '0,0,0|0')).toContain('D(00⁰0)');
    for (const opts of [{ maxCentrifugalOrder: 1 }, { maxCentrifugalOrder: 0 }, { termSignificance: 0 }]) {
      const r = fitLinearLines(HCN, lines, opts);
      expect(terms(r, '0,0,0|0')).toEqual(['B(00⁰0)']);
      expect(terms(r, '0,0,1|0')).toEqual(['G(00⁰1)-G(00⁰0)', 'B(00⁰1)']);
      expect(r.model.constraints).toEqual([]);
      expect(level(r, '0,0,0|0').D).toBeUndefined();
      // Without D the effective B″ falls by about 2 D·x̄ (x̄ ~ 150 here): far more than 4σ of the full fit.
      expect(Math.abs(level(r, '0,0,0|0').B.value - C0.B)).toBeGreaterThan(1e-4);
    }
    // Absolute mode names the χ² test.
    const abs = fitLinearLines(HCN, lines, { uncertaintyMode: 'absolute' });
    expect(abs.model.selection).toMatch(/^per level B, then D, then H while the χ² difference test keeps p < 0.01/);
    expect(abs.statistics.uncertaintyMode).toBe('absolute');
    // maxCentrifugalOrder above 3 is held at 3: the same fit as the default.
    expect(fitLinearLines(HCN, lines, { maxCentrifugalOrder: 9 }).parameters).toEqual(full.parameters);
  });

  it('H is selected for every level once one level carries a large H, and flagged when far beyond D²/B', () => {
    // Upper level with H 1e-9 (far above D²/B = 5.6e-12; 1e-9·420³ ≈ 0.07 cm⁻¹ at J = 20): the term test raises
    // the order of every eligible level at once, so both levels get H. 00⁰1 is flagged (ratio ≈ 180, printed to
    // whole numbers); 00⁰0 (no H in the data) is not.
    const cu = { ...C3, H: 1e-9 };
    const r = fitLinearLines(HCN, nu3(20, 2e-5, 13, cu, { ...C0, H: 0 }));
    const up = level(r, '0,0,1|0');
    const lo = level(r, '0,0,0|0');
    within(up.H, 1e-9, 4);
    within(up.D, C3.D, 4);
    within(lo.D, C0.D, 4);
    expect(Math.abs(lo.H?.value ?? Number.NaN)).toBeLessThan(4 * (lo.H?.uncertainty ?? 0));
    expect(r.model.constraints).toEqual([]);
    const ratio = (Math.abs(up.H?.value ?? 0) / ((up.D?.value ?? 0) ** 2 / up.B.value)).toFixed(0);
    expect(Number(ratio)).toBeGreaterThan(150);
    expect(Number(ratio)).toBeLessThan(210);
    const w = r.warnings.filter((x) => x.code === 'CENTRIFUGAL_TERM_IMPLAUSIBLE');
    expect(w).toHaveLength(1);
    expect(w[0]?.message.startsWith(`H of 00⁰1 is ${ratio} × D²/B, far beyond centrifugal distortion`)).toBe(true);
  });

  it('with D fitted and H not in the data, H comes in with the prior 0 ± D²/B and is not reported as fitted', () => {
    const r = fitLinearLines(HCN, nu3(20, 2e-5, 15, C3, { ...C0, H: 0 }));
    expect(r.model.constraints.map((x) => x.parameter).sort()).toEqual(['H(00⁰0)', 'H(00⁰1)']);
    const c = r.model.constraints.find((x) => x.key === '1H-12C-14N|H|0,0,0|0');
    expect(c?.basis).toBe('0 ± D_v²/B_v (order of magnitude of H)');
    expect(c?.prior.value).toBe(0);
    // The prior's width is D²/B of the selected fit: within 1 % of C0.D²/C0.B = 5.72e-12.
    expect(c?.prior.uncertainty).toBeGreaterThan(0.99 * ((C0.D * C0.D) / C0.B));
    expect(c?.prior.uncertainty).toBeLessThan(1.01 * ((C0.D * C0.D) / C0.B));
    expect(c?.prior.unit).toBe('cm-1');
    const lo = level(r, '0,0,0|0');
    expect(lo.H).toBeUndefined();
    expect(r.parameters.map((x) => x.name)).toEqual(expect.arrayContaining(['H(00⁰0)', 'H(00⁰1)']));
    // H with its prior: within 3 prior widths of 0 (the data hold no H).
    const h = r.parameters.find((x) => x.name === 'H(00⁰0)');
    expect(Math.abs(h?.value ?? Number.NaN)).toBeLessThan(3 * (c?.prior.uncertainty ?? 0));
    within(lo.D, C0.D, 4);
    // The degrees of freedom count the priors as data: 40 lines + 2 priors − 7 parameters (B, D, H of each level
    // and one term value).
    expect(r.statistics.degreesOfFreedom).toBe(40 + 2 - 7);
  });

  it('a level whose lines span too few J for D takes D from the other levels as mean ± 50 %', () => {
    // 00⁰1–00⁰0 with 2 × 12 lines (D fitted on both) and a hot band 01¹1–01¹0... kept simple: a second band
    // 10⁰0–00⁰0 with R(0), R(1), P(1) only (three distinct J″ on the ground level, J′ 0, 1, 2 on 10⁰0: D needs
    // four distinct J), so 10⁰0 has B alone and D from the others.
    const V1 = { v: [1, 0, 0], l: 0 };
    const C1: Consts = { G: 3311.5, B: 1.469, D: 2.9e-6 }; // ν1 3311.5 cm⁻¹ (CDMS, note), B, D invented
    const lines = [
      ...nu3(12, 2e-5, 14),
      line(V1, C1, G0, C0, 'R', 0, 'e', 2e-5),
      line(V1, C1, G0, C0, 'R', 1, 'e', 2e-5),
      line(V1, C1, G0, C0, 'P', 1, 'e', 2e-5),
    ];
    const r = fitLinearLines(HCN, lines);
    const c = r.model.constraints.find((x) => x.key === '1H-12C-14N|D|1,0,0|0');
    expect(c?.parameter).toBe('D(10⁰0)');
    expect(c?.basis).toBe('mean D_v of the other levels ± 50 %');
    const d0 = level(r, '0,0,0|0').D?.value ?? Number.NaN;
    const d3 = level(r, '0,0,1|0').D?.value ?? Number.NaN;
    // The mean of the two fitted D (this fit's values, before the prior is added), within 2 % (the constrained fit
    // moves them by their σ, < 1 %).
    expect(Math.abs((c?.prior.value ?? 0) / ((d0 + d3) / 2) - 1)).toBeLessThan(0.02);
    expect(c?.prior.uncertainty).toBeCloseTo(0.5 * Math.abs(c?.prior.value ?? 0), 20);
    expect(level(r, '1,0,0|0').D).toBeUndefined();
    within(level(r, '1,0,0|0').term, 3311.5, 4);
    expect(r.bands.map((b) => b.label).sort()).toEqual(['00⁰1–00⁰0', '10⁰0–00⁰0']);
    expect(r.bands.find((b) => b.label === '10⁰0–00⁰0')?.jRange).toEqual([0, 1]);
  });
});

describe('levels, references and l-type doubling', () => {
  it('ν2 01¹0–00⁰0 with Q lines: q and q_J of the f − e splitting; without Q: the e component only, with a warning', () => {
    const both = fitLinearLines(HCN, nu2(20, 2e-5, 21, true));
    const v2 = level(both, '0,1,0|1');
    // q positive: f above e (HCN 01¹0: B_f − B_e = 0.0074876 cm⁻¹, note). 4σ.
    within(v2.q, C2.q ?? 0, 4);
    within(v2.qJ, C2.qJ ?? 0, 4);
    within(v2.B, C2.B, 4);
    within(v2.term, C2.G, 4);
    expect(v2.parity).toBeUndefined();
    expect(v2.label).toBe('01¹0');
    expect(both.warnings.map((w) => w.code)).not.toContain('L_DOUBLING_UNDETERMINED');
    expect(both.bands[0]?.kind).toBe('perpendicular');
    expect(both.parameters.map((p) => p.name)).toEqual(expect.arrayContaining(['q(01¹0)', 'qJ(01¹0)']));

    const eOnly = fitLinearLines(HCN, nu2(20, 2e-5, 22, false));
    const e = level(eOnly, '0,1,0|1');
    expect(e.q).toBeUndefined();
    expect(e.qJ).toBeUndefined();
    expect(e.parity).toBe('e');
    // The e component's effective B: B − q/2 in this form (E_e = … − ½ q x), within 4σ plus q_J's share
    // (qJ x² / 2 absorbed partly by D: allowance 1e-6).
    expect(Math.abs(e.B.value - (C2.B - (C2.q ?? 0) / 2))).toBeLessThan(4 * e.B.uncertainty + 1e-6);
    const w = eOnly.warnings.filter((x) => x.code === 'L_DOUBLING_UNDETERMINED');
    expect(w).toHaveLength(1);
    expect(w[0]?.message).toBe(
      "level 01¹0 is seen only in its e component: q is not determined and B is that component's effective B",
    );
  });

  it('a hot band joins its levels to the ground level; a band of its own makes its own reference', () => {
    const V22 = { v: [0, 2, 0], l: 2 };
    // 02²0: G 1412 (2ν2 ≈ 1412 cm⁻¹ for HCN, from memory), B and q invented near 01¹0's.
    const C22: Consts = { G: 1412, B: 1.48536, D: 3.0e-6, q: 1e-5 };
    const hot: LinearLineInput[] = [];
    const z = ownNormal(23);
    for (let j = 2; j <= 14; j++) {
      for (const p of ['e', 'f'] as const) {
        hot.push(line(V22, C22, V2, C2, 'R', j, p, 2e-5, 2e-5 * z()));
        if (j >= 3) hot.push(line(V22, C22, V2, C2, 'P', j, p, 2e-5, 2e-5 * z()));
      }
    }
    const joined = fitLinearLines(HCN, [...nu2(14, 2e-5, 24, true), ...hot]);
    const up = level(joined, '0,2,0|2');
    expect(up.term?.relativeTo).toBe('0,0,0|0');
    within(up.term, C22.G, 4);
    const hb = joined.bands.find((b) => b.label === '02²0–01¹0');
    // Hot-band origin G(02²0) − G(01¹0); its σ from both term values and their covariance.
    within(hb?.origin, C22.G - C2.G, 4);
    const names = joined.covariance.parameters;
    const iu = names.indexOf('G(02²0)-G(00⁰0)');
    const il = names.indexOf('G(01¹0)-G(00⁰0)');
    const cov = joined.covariance.matrix;
    const variance = (cov[iu]?.[iu] ?? 0) + (cov[il]?.[il] ?? 0) - 2 * (cov[iu]?.[il] ?? 0);
    expect(hb?.origin?.uncertainty).toBeCloseTo(Math.sqrt(variance), 14);
    expect(hb?.kind).toBe('perpendicular');
    // Levels in order: the reference first (never an upper level), then fewer quanta first.
    expect(joined.levels.map((l) => l.key)).toEqual(['0,0,0|0', '0,1,0|1', '0,2,0|2']);

    // The hot band alone: 01¹0 is never an upper level, so it is the reference and 02²0 is relative to it.
    const alone = fitLinearLines(HCN, hot);
    expect(level(alone, '0,1,0|1').term).toBeUndefined();
    expect(level(alone, '0,2,0|2').term?.relativeTo).toBe('0,1,0|1');
    expect(alone.parameters.map((p) => p.name)).toContain('G(02²0)-G(01¹0)');
    within(alone.bands[0]?.origin, C22.G - C2.G, 4);
    expect(alone.levels.map((l) => l.key)).toEqual(['0,1,0|1', '0,2,0|2']);

    // Two sets not joined by any line: each keeps its own reference.
    const two = fitLinearLines(HCN, [...nu3(10, 2e-5, 25), ...hot]);
    expect(level(two, '0,0,1|0').term?.relativeTo).toBe('0,0,0|0');
    expect(level(two, '0,2,0|2').term?.relativeTo).toBe('0,1,0|1');
    expect(two.levels.map((l) => l.key)).toEqual(['0,0,0|0', '0,1,0|1', '0,0,1|0', '0,2,0|2']);
  });

  it('HITRAN l-type Q(J) e→f lines within 01¹0 alone give q and q_J (no rotational constants)', () => {
    const DATA = JSON.parse(
      readFileSync(new URL('../fixtures/linear-reference/linear-reference.json', import.meta.url), 'utf8'),
    ) as { line_tables: Record<string, { transition: string; 'wavenumber_cm-1': number }[]> };
    const table = DATA.line_tables['H12C14N l-type transitions in 01^1 0 (HITRAN)'] ?? [];
    const lines = table.map((x) => ({
      position: x['wavenumber_cm-1'],
      // HITRAN uncertainty code 6: 1e-6..1e-5 cm⁻¹ (note); its lower bound as σ.
      uncertainty: 1e-6,
      assignment: {
        upper: V2,
        lower: V2,
        branch: 'Q' as const,
        j: Number(/Q\((\d+)\)/.exec(x.transition)?.[1]),
        parity: 'e' as const,
      },
    }));
    expect(lines).toHaveLength(6);
    const r = fitLinearLines(HCN, lines);
    expect(r.levels).toEqual([]);
    expect(r.lTypeLevels).toHaveLength(1);
    const lt = r.lTypeLevels[0];
    expect(lt?.label).toBe('01¹0');
    expect(lt?.key).toBe('0,1,0|1');
    expect(lt?.l).toBe(1);
    // q = 0.0074875 cm⁻¹ (note: from Q(1) = 2q directly); q_J ≈ −8.8e-8 (note §1.6, D_e − D_f). Hand check from two
    // lines: Q(1) = 2q + 4qJ, Q(10) = 110q + 12100qJ → qJ = (Q(10) − 55 Q(1)) / (12100 − 220) = −8.69e-8 cm⁻¹.
    const qJhand = (0.822579 - 55 * 0.014975) / (12100 - 220);
    const qHand = (0.014975 - 4 * qJhand) / 2;
    // The note's q neglects q_J (4 q_J / 2 = 1.7e-7): 3e-7 from it. From the two-line hand value: 2.5e-7 (Q(1) is
    // rounded to 1e-6, ±2.5e-7 in q at worst).
    expect(Math.abs((lt?.q?.value ?? 0) - 0.0074875)).toBeLessThan(3e-7);
    expect(Math.abs((lt?.q?.value ?? 0) - qHand)).toBeLessThan(2.5e-7);
    expect(Math.abs((lt?.qJ?.value ?? 0) - -8.8e-8)).toBeLessThan(0.05 * 8.8e-8);
    expect(Math.abs((lt?.qJ?.value ?? 0) - qJhand)).toBeLessThan(0.05 * Math.abs(qJhand));
    expect(r.bands[0]?.origin).toBeUndefined();
    expect(r.bands[0]?.label).toBe('01¹0–01¹0');
    expect(r.bands[0]?.jRange).toEqual([1, 10]);
    // 6 lines, 2 parameters: 4 degrees of freedom.
    const few = r.warnings.find((w) => w.code === 'FEW_DEGREES_OF_FREEDOM');
    expect(few?.message).toBe('only 4 degrees of freedom');
    expect(r.model.levelTerms).toEqual([{ level: '0,1,0|1', terms: ['q(01¹0)', 'qJ(01¹0)'] }]);
  });

  it('a pure-rotation list of one level: no term value, no origin, B and D of the level (N2O, HITRAN)', () => {
    const DATA = JSON.parse(
      readFileSync(new URL('../fixtures/linear-reference/linear-reference.json', import.meta.url), 'utf8'),
    ) as { line_tables: Record<string, { transition: string; 'wavenumber_cm-1': number }[]> };
    const table = DATA.line_tables['N2O 14N2 16O pure rotation (HITRAN)'] ?? [];
    const lines = table.map((x) => ({
      position: x['wavenumber_cm-1'],
      assignment: { upper: G0, lower: G0, branch: 'R' as const, j: Number(/R\((\d+)\)/.exec(x.transition)?.[1]) },
    }));
    const r = fitLinearLines(parseLinearSpecies('N2O'), lines);
    const g = level(r, '0,0,0|0');
    expect(g.term).toBeUndefined();
    expect(r.bands[0]?.origin).toBeUndefined();
    // B0 of N2O: 12561.6 MHz = 0.419011 cm⁻¹ (NIST triatomic tables, from memory); R(0) = 2B0 − 4D0 = 0.838022 read
    // from HITRAN gives B0 = 0.419011 + 2D0. 1e-5 cm⁻¹ (the positions' 6 decimals, no σ given).
    expect(Math.abs(g.B.value - 0.419011)).toBeLessThan(1e-5);
    // D0 ≈ 1.76e-7 cm⁻¹ (5.28 kHz·… from memory): sign and order of magnitude.
    expect(g.D?.value).toBeGreaterThan(1e-7);
    expect(g.D?.value).toBeLessThan(3e-7);
    // No σ sent: σ from the scatter, one group.
    expect(r.scatter?.length).toBeGreaterThan(0);
  });
});

describe('outcomes of each line and warnings', () => {
  it('an outlier is rejected with its residual against the final fit; an unassigned line stays unassigned', () => {
    const lines = nu3(15, 2e-5, 31);
    const shifted = lines.map((x, i) => (i === 7 ? { ...x, position: x.position + 0.01 } : x));
    const r = fitLinearLines(HCN, [...shifted, { position: 2100.123 }]);
    const out = r.lines[7];
    expect(out?.status).toBe('rejected');
    expect(out?.reason).toBeTypeOf('string');
    // Residual against the final fit: the 0.01 shift within 1e-4 (the model is otherwise right).
    expect(Math.abs((out?.residual ?? 0) - 0.01)).toBeLessThan(1e-4);
    expect((out?.calculated ?? 0) + (out?.residual ?? 0)).toBeCloseTo(out?.position ?? 0, 9);
    // Studentised residual of a line left out: 0.01 / 2e-5 ≈ 500 (rms ~ 2e-5): far above the threshold 4.
    expect(out?.studentisedResidual).toBeGreaterThan(100);
    expect(out?.assignment?.band).toBe('00⁰1–00⁰0');
    const w = r.warnings.find((x) => x.code === 'LINES_REJECTED');
    expect(w?.lines).toEqual([7]);
    expect(w?.message).toBe('1 line(s) rejected as outliers (studentised residual)');
    const last = r.lines[30];
    expect(last).toEqual({ index: 30, position: 2100.123, status: 'unassigned' });
    expect(r.statistics.rejected).toBe(1);
    expect(r.statistics.fitted).toBe(29);
    expect(r.statistics.unassigned).toBe(1);
    expect(r.statistics.lines).toBe(31);
    // rejectionThreshold 0 turns rejection off: the shifted line stays, and the fit's rms carries it.
    const kept = fitLinearLines(HCN, shifted, { rejectionThreshold: 0 });
    expect(kept.lines[7]?.status).toBe('fitted');
    expect(kept.warnings.map((x) => x.code)).not.toContain('LINES_REJECTED');
  });

  it('few degrees of freedom are flagged below 5, not at 5', () => {
    // 3 parameters (G, B′, B″) with maxCentrifugalOrder 1: 7 lines → 4, 8 lines → 5 degrees of freedom.
    const l8 = nu3(4, 2e-5, 41);
    const r7 = fitLinearLines(HCN, l8.slice(0, 7), { maxCentrifugalOrder: 1 });
    expect(r7.statistics.degreesOfFreedom).toBe(4);
    expect(r7.warnings.find((w) => w.code === 'FEW_DEGREES_OF_FREEDOM')?.message).toBe('only 4 degrees of freedom');
    const r8 = fitLinearLines(HCN, l8, { maxCentrifugalOrder: 1 });
    expect(r8.statistics.degreesOfFreedom).toBe(5);
    expect(r8.warnings.map((w) => w.code)).not.toContain('FEW_DEGREES_OF_FREEDOM');
  });

  it('species and mass are echoed (AME2020 masses: 1H 1.00782503, 12C 12, 14N 14.00307401 u)', () => {
    const r = fitLinearLines(HCN, nu3(6, 1e-4, 51));
    expect(r.species.formula).toBe('1H-12C-14N');
    // 1.00782503223 + 12 + 14.00307400443 = 27.01089903666 u (AME2020, from memory to 1e-8).
    expect(Math.abs(r.species.mass.value - 27.01089904)).toBeLessThan(1e-7);
    expect(r.species.mass.unit).toBe('u');
    expect(r.scatter).toBeUndefined();
  });
});

describe('reference levels, eligibility and priors in corner cases', () => {
  const V20 = { v: [0, 2, 0], l: 0 };
  // 02⁰0 of HCN: G ≈ 1411.4 cm⁻¹ (2ν2 l = 0, from memory), B, D invented near 01¹0's: generator input only.
  const C20: Consts = { G: 1411.4, B: 1.4855, D: 3.0e-6 };
  /** 00⁰1–02⁰0 (positions about 685 cm⁻¹: the upper level has fewer quanta but more energy). */
  function diff(n: number, seed: number): LinearLineInput[] {
    const z = ownNormal(seed);
    const out: LinearLineInput[] = [];
    for (let j = 1; j <= n; j++) out.push(line(V3, C3, V20, C20, 'P', j, 'e', 2e-5, 2e-5 * z()));
    for (let j = 0; j < n; j++) out.push(line(V3, C3, V20, C20, 'R', j, 'e', 2e-5, 2e-5 * z()));
    return out;
  }

  it('the reference is the level never seen as an upper level, even with more quanta; pure rotation does not make a level upper', () => {
    // 00⁰1–02⁰0 alone, plus pure-rotation R lines within 02⁰0: 02⁰0 is never an upper level of a band, so it is
    // the reference although 00⁰1 has fewer quanta. G(00⁰1) − G(02⁰0) = 2096.8 − 1411.4 = 685.4.
    const z = ownNormal(61);
    const rot = [0, 1, 2, 3, 4].map((j) => line(V20, C20, V20, C20, 'R', j, 'e', 2e-5, 2e-5 * z()));
    const r = fitLinearLines(HCN, [...diff(12, 62), ...rot]);
    expect(level(r, '0,2,0|0').term).toBeUndefined();
    expect(level(r, '0,0,1|0').term?.relativeTo).toBe('0,2,0|0');
    within(level(r, '0,0,1|0').term, C3.G - C20.G, 4);
    expect(r.parameters.map((p) => p.name)).toContain('G(00⁰1)-G(02⁰0)');
  });

  it('two levels never upper in one set: the one with fewer quanta is the reference, whatever the line order', () => {
    // ν3 00⁰1–00⁰0 first, then 00⁰1–02⁰0: both 00⁰0 and 02⁰0 are never upper; 00⁰0 has fewer quanta.
    for (const lines of [
      [...nu3(10, 2e-5, 63), ...diff(10, 64)],
      [...diff(10, 64), ...nu3(10, 2e-5, 63)],
    ]) {
      const r = fitLinearLines(HCN, lines);
      expect(level(r, '0,0,0|0').term).toBeUndefined();
      expect(level(r, '0,2,0|0').term?.relativeTo).toBe('0,0,0|0');
      within(level(r, '0,2,0|0').term, C20.G, 4);
      within(r.bands.find((b) => b.label === '00⁰1–02⁰0')?.origin, C3.G - C20.G, 4);
    }
  });

  it('a level with exactly four distinct J gets D; with H fitted elsewhere it alone gets the H prior', () => {
    // 10⁰0 reached by R(0), R(1), R(2), P(1): J′ = 1, 2, 3, 0 (four distinct J: enough for D, not for H).
    // 00⁰1 carries H = 1e-9 (far above D²/B) so that 00⁰0 and 00⁰1 reach H; 10⁰0 then has D and an H prior only.
    const V1 = { v: [1, 0, 0], l: 0 };
    const C1: Consts = { G: 3311.5, B: 1.469, D: 2.9e-6 };
    const z = ownNormal(65);
    const lines = [
      ...nu3(20, 2e-5, 66, { ...C3, H: 1e-9 }, { ...C0, H: 0 }),
      ...(
        [
          ['R', 0],
          ['R', 1],
          ['R', 2],
          ['P', 1],
        ] as const
      ).map(([b, j]) => line(V1, C1, G0, { ...C0, H: 0 }, b, j, 'e', 2e-5, 2e-5 * z())),
    ];
    const r = fitLinearLines(HCN, lines);
    const terms = r.model.levelTerms.find((x) => x.level === '1,0,0|0')?.terms ?? [];
    expect(terms).toContain('D(10⁰0)');
    expect(r.model.constraints.map((c) => c.parameter)).toEqual(['H(10⁰0)']);
    expect(level(r, '0,0,1|0').H).toBeDefined();
  });

  it('an l-type-only level gets no prior; q_J enters only with D (maxCentrifugalOrder 1: q alone)', () => {
    // ν3 (D fitted on both levels) and three l-type Q(J) e→f lines of 01¹0 (three J: order 1).
    const qLines = [1, 2, 3].map((j) => line(V2, C2, V2, C2, 'Q', j, 'e', 2e-6));
    const r = fitLinearLines(HCN, [...nu3(15, 2e-5, 67), ...qLines]);
    expect(r.model.constraints.map((c) => c.parameter).sort()).toEqual(['H(00⁰0)', 'H(00⁰1)']);
    expect(r.lTypeLevels.map((x) => x.key)).toEqual(['0,1,0|1']);
    // q from Q(J) = q x − … (q_J not fitted at order 1): within 4σ plus q_J x² ≈ 1e-6 relative share.
    const lt = r.lTypeLevels[0];
    expect(Math.abs((lt?.q?.value ?? 0) - (C2.q ?? 0))).toBeLessThan(4 * (lt?.q?.uncertainty ?? 0) + 2e-6);
    expect(lt?.qJ).toBeUndefined();
    const one = fitLinearLines(HCN, nu2(15, 2e-5, 68, true), { maxCentrifugalOrder: 1 });
    const names = one.parameters.map((p) => p.name);
    expect(names).toContain('q(01¹0)');
    expect(names).not.toContain('qJ(01¹0)');
  });

  it('a Q branch alone cannot tell B′ from B″ (one combination of them): refused as rank deficient', () => {
    const z = ownNormal(69);
    const q: LinearLineInput[] = [];
    for (let j = 1; j <= 12; j++) q.push(line(V2, C2, G0, C0, 'Q', j, 'e', 2e-5, 2e-5 * z()));
    const e = thrown(() => fitLinearLines(HCN, q));
    expect(e.code).toBe('FIT_RANK_DEFICIENT');
  });

  it('the priors keep their width when the stated σ are 10× too small (a-posteriori scaling)', () => {
    // Lines to J = 8: D·y² ≈ 0.015 cm⁻¹ (D selected), H·y³ ≈ 2e-6 cm⁻¹ (below the 2e-5 noise: H rests on its
    // prior 0 ± D²/B). σ stated 2e-6 while the noise is 2e-5: χ²_ν ≈ 100. The posterior σ of H must stay at
    // most the prior width (within 5 %): the prior is not scaled with the lines' σ.
    const z = ownNormal(70);
    const lines: LinearLineInput[] = [];
    for (let j = 1; j <= 8; j++) lines.push(line(V3, C3, G0, C0, 'P', j, 'e', 2e-6, 2e-5 * z()));
    for (let j = 0; j < 8; j++) lines.push(line(V3, C3, G0, C0, 'R', j, 'e', 2e-6, 2e-5 * z()));
    const r = fitLinearLines(HCN, lines);
    expect(r.statistics.reducedChiSquare).toBeGreaterThan(30);
    const c = r.model.constraints.find((x) => x.parameter === 'H(00⁰0)');
    expect(c).toBeDefined();
    const h = r.parameters.find((p) => p.name === 'H(00⁰0)');
    expect(h?.uncertainty).toBeLessThan(1.05 * (c?.prior.uncertainty ?? 0));
    expect(h?.uncertainty).toBeGreaterThan(0.2 * (c?.prior.uncertainty ?? 0));
  });
});

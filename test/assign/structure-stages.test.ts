import { describe, expect, it } from 'vitest';
import {
  assignByStructure,
  boltzmannResiduals,
  byCommonStep,
  describeShift,
  differenceIntercept,
  extendBothSides,
  extendByFit,
  extendInwards,
  fillHoles,
  fittedRms,
  fortrat,
  grow,
  growWithSlots,
  judge,
  judgeProgressions,
  judgeRivals,
  kratzerTest,
  lineAtOriginOf,
  localPoints,
  localSpacing,
  longestProgressions,
  type Numbering,
  nearestFree,
  numbered,
  numberedLines,
  numberingKey,
  numberingsOf,
  onePerOrigin,
  originOf,
  type Point,
  polynomialResiduals,
  positionScale,
  progressions,
  type ScoredTrial,
  type StructureContext,
  score,
  sideScatter,
  smoothSides,
  statedChiSquare,
  strayFree,
  type Trial,
  verdict,
  withoutStraySeedSide,
  withoutStrays,
} from '../../src/assign/structure.js';
import type { FitResult } from '../../src/fit/fit-lines.js';
import type { Branch } from '../../src/models/transitions.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * The stages of the numbering from structure alone (src/assign/structure.ts), each called directly with small
 * inputs whose right answer is worked out here: real 12C16O positions (HITRAN2020 via test/fixtures/co-database-lines,
 * Gordon et al., JQSRT 277, 107949 (2022)) with the published level constants of Gendriesch et al., A&A 497, 927
 * (2009) (same fixture), and CS lines made here from Huber & Herzberg's X ¹Σ⁺ constants (Constants of Diatomic
 * Molecules, 1979, FROM MEMORY) with this file's own term values and J bookkeeping (not src/models). Every value is
 * computed inside `it` (mutation runs switch a mutant on per test). Fast: milliseconds per test, the few fits
 * included.
 */

// ---------------------------------------------------------------------------------------------------------------
// Outside data and this file's own term values

/** MHz per cm⁻¹: c = 299 792 458 m/s (exact, SI). */
const MHZ_PER_CM = 29979.2458;

/** Published v = 0–3 level constants of 12C16O (Gendriesch et al. 2009, Table 2, in the fixture), in cm⁻¹. */
function coLevel(v: number): { B: number; D: number; H: number } {
  const p = CO_DATABASE.published;
  return {
    B: (p.B_v_MHz.value[v] as number) / MHZ_PER_CM,
    D: (p.D_v_kHz.value[v] as number) / 1e3 / MHZ_PER_CM,
    H: (p.H_v_mHz.value[v] as number) / 1e9 / MHZ_PER_CM,
  };
}

/** Rotational term value B x − D x² + H x³, x = J(J+1) (the fixture's convention). */
function term(l: { B: number; D: number; H?: number }, j: number): number {
  const x = j * (j + 1);
  return l.B * x - l.D * x * x + (l.H ?? 0) * x * x * x;
}

/** The real 12C16O lines of one band up to J″ = jMax, P branch first (falling J) then R (rising J). */
function coBand(band: string, jMax: number) {
  const lines = CO_DATABASE.lines.filter((l) => l.band === band && l.j <= jMax);
  const p = lines.filter((l) => l.branch === 'P').sort((a, b) => b.j - a.j);
  const r = lines.filter((l) => l.branch === 'R').sort((a, b) => a.j - b.j);
  return [...p, ...r];
}

/**
 * CS X ¹Σ⁺, Huber & Herzberg (1979), from memory: ω_e 1285.08, ω_e x_e 6.46, B_e 0.8200436, α_e 0.0059182 cm⁻¹; D_e
 * 1.331e-6 cm⁻¹ from the CS J = 1–0, 2–1, 3–2 rest frequencies (from memory; within 0.3 % of Kratzer's 4B_e³/ω_e²).
 */
const CS = { we: 1285.08, wexe: 6.46, Be: 0.8200436, ae: 0.0059182, De: 1.331e-6 };
const csLevel = (v: number) => ({ B: CS.Be - CS.ae * (v + 0.5), D: CS.De });
/** CS 1-0 origin: G(1) − G(0) = ω_e − 2ω_e x_e. */
const CS_ORIGIN = CS.we - 2 * CS.wexe;

/** Deterministic normal deviates (LCG of Numerical Recipes, Box–Muller), so every run sees the same list. */
function normals(seed: number): () => number {
  let s = seed >>> 0;
  const u = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s + 0.5) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}

/** k/hc in cm⁻¹ per K (CODATA 2018: 0.695 034 800). */
const K_OVER_HC = 0.6950348;

interface Made {
  position: number;
  uncertainty?: number;
  intensity?: number;
  branch: Branch;
  j: number;
}

/**
 * CS 1-0 lines P(1)…P(pMax), R(0)…R(rMax): ν = ν₀ + F′(J′) − F″(J″), J′ = J″ + 1 for R and J″ − 1 for P, with
 * Gaussian noise σ; intensities S·ν·exp(−F″/kT) with S = J″ + 1 (R), J″ (P) when a temperature is given.
 */
function csLines(o: { pMax: number; rMax: number; sigma: number; seed: number; withSigma?: boolean; T?: number }) {
  const g = normals(o.seed);
  const lo = csLevel(0);
  const up = csLevel(1);
  const out: Made[] = [];
  const add = (branch: Branch, j: number) => {
    const jUp = branch === 'R' ? j + 1 : j - 1;
    const position = CS_ORIGIN + term(up, jUp) - term(lo, j) + o.sigma * g();
    const S = branch === 'R' ? j + 1 : j;
    out.push({
      position,
      branch,
      j,
      ...(o.withSigma !== false ? { uncertainty: o.sigma } : {}),
      ...(o.T !== undefined ? { intensity: S * position * Math.exp(-term(lo, j) / (K_OVER_HC * o.T)) } : {}),
    });
  };
  for (let j = o.pMax; j >= 1; j--) add('P', j);
  for (let j = 0; j <= o.rMax; j++) add('R', j);
  return out;
}

const cs = parseSpecies('12C32S');
const co = parseSpecies('12C16O');
const BAND10 = { upper: 1, lower: 0 } as const;

function contextOf(peaks: readonly Made[] | readonly { position: number; uncertainty?: number }[], formula: string) {
  const species = formula === cs.formula ? cs : co;
  const ctx: StructureContext = {
    peaks: peaks.map((p) => ({
      position: p.position,
      ...(p.uncertainty !== undefined ? { uncertainty: p.uncertainty } : {}),
      ...('intensity' in p && p.intensity !== undefined ? { intensity: p.intensity } : {}),
    })),
    species: formula,
    band: BAND10,
    anchors: [],
    masses: new Map([[formula, reducedMass(species)]]),
    pos: Float64Array.from(peaks.map((p) => p.position)).sort(),
  };
  return ctx;
}

/** The true numbering of a made or real list (index → branch, J). */
function truth(lines: readonly { branch: Branch; j: number }[]): Numbering {
  return new Map(lines.map((l, i) => [i, { branch: l.branch, j: l.j }]));
}

/** Running number m: J″ + 1 for R(J″), −J″ for P(J″). */
const mOf = (t: { branch: Branch; j: number }) => (t.branch === 'R' ? t.j + 1 : -t.j);

/** The order/pos pair the growth stages take, for positions sorted ascending. */
function orderOf(positions: readonly number[]) {
  const order = positions.map((position, index) => ({ index, position })).sort((a, b) => a.position - b.position);
  return { order, pos: Float64Array.from(order, (o) => o.position) };
}

// ---------------------------------------------------------------------------------------------------------------
// A small weighted least squares of this file's own (modified Gram–Schmidt QR), for expected values.

function ownLeastSquares(columns: number[][], y: number[], w?: number[]) {
  const n = y.length;
  const p = columns.length;
  const sw = (w ?? y.map(() => 1)).map(Math.sqrt);
  const Q = columns.map((c) => c.map((v, i) => v * (sw[i] as number)));
  const R = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let k = 0; k < p; k++) {
    for (let i = 0; i < k; i++) {
      const qi = Q[i] as number[];
      const qk = Q[k] as number[];
      const dot = qk.reduce((s, v, t) => s + v * (qi[t] as number), 0);
      (R[i] as number[])[k] = dot;
      for (let t = 0; t < n; t++) qk[t] = (qk[t] as number) - dot * (qi[t] as number);
    }
    const qk = Q[k] as number[];
    const norm = Math.sqrt(qk.reduce((s, v) => s + v * v, 0));
    (R[k] as number[])[k] = norm;
    for (let t = 0; t < n; t++) qk[t] = (qk[t] as number) / norm;
  }
  const yw = y.map((v, i) => v * (sw[i] as number));
  const qty = Q.map((q) => q.reduce((s, v, t) => s + v * (yw[t] as number), 0));
  const coef = new Array<number>(p).fill(0);
  for (let k = p - 1; k >= 0; k--) {
    let s = qty[k] as number;
    for (let i = k + 1; i < p; i++) s -= ((R[k] as number[])[i] as number) * (coef[i] as number);
    coef[k] = s / ((R[k] as number[])[k] as number);
  }
  // Covariance (RᵀR)⁻¹ = R⁻¹R⁻ᵀ: R⁻¹ by back substitution.
  const Ri = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let c = 0; c < p; c++)
    for (let k = p - 1; k >= 0; k--) {
      let s = k === c ? 1 : 0;
      for (let i = k + 1; i < p; i++) s -= ((R[k] as number[])[i] as number) * ((Ri[i] as number[])[c] as number);
      (Ri[k] as number[])[c] = s / ((R[k] as number[])[k] as number);
    }
  const cov00 = (Ri[0] as number[]).reduce((s, v) => s + v * v, 0);
  const residuals = y.map((v, i) => v - columns.reduce((s, c, k) => s + (coef[k] as number) * (c[i] as number), 0));
  const chi = residuals.reduce((s, r, i) => s + r * r * (w ? (w[i] as number) : 1), 0);
  return { coef, cov00, residuals, chi };
}

/** MAD × 1.4826 (Rousseeuw & Croux 1993), written out. */
function madSigma(x: readonly number[]): number {
  const med = (a: readonly number[]) => {
    const s = [...a].sort((p, q) => p - q);
    const h = s.length >> 1;
    return s.length % 2 ? (s[h] as number) : ((s[h - 1] as number) + (s[h] as number)) / 2;
  };
  const m = med(x);
  return 1.482602218505602 * med(x.map((v) => Math.abs(v - m)));
}

// ---------------------------------------------------------------------------------------------------------------
// Kratzer's relation

/** A fit result holding only what kratzerTest reads: two levels and the band origin. */
function levelsFit(o: {
  levels: { v: number; B: number; D?: number; sigmaD?: number }[];
  band?: string;
  origin?: number;
}): FitResult {
  return {
    levels: o.levels.map((l) => ({
      species: 'X',
      v: l.v,
      B: { value: l.B, uncertainty: 0 },
      ...(l.D !== undefined
        ? { D: { value: l.D, uncertainty: l.sigmaD as number } as { value: number; uncertainty: number } }
        : {}),
    })),
    bands:
      o.band === undefined
        ? []
        : [
            {
              species: 'X',
              band: o.band,
              lines: 0,
              jRange: [0, 0],
              ...(o.origin !== undefined ? { origin: { value: o.origin, uncertainty: 0 } } : {}),
            },
          ],
  } as unknown as FitResult;
}

/**
 * The Kratzer ratio worked out independently of the iteration in src: ω_e x_e from Pekeris's relation divided by
 * its bias 1.09, ω_e from ν₀ = ω_e Δv − ω_e x_e Δv(v′+v″+1), solved here by bisection; D_e from D″ through Dunham's
 * β_e/D_e = 8ω_e x_e/ω_e − 5α_e/B_e − α_e²ω_e/(24B_e³); σ from 0.003, D″'s own, half the β correction and the
 * Pekeris doubt 0.08 in quadrature (the constants stated in structure.ts's documentation).
 */
function ownKratzer(B0: number, B1: number, D: number, sigmaD: number, origin: number, lower: number, upper: number) {
  const dv = upper - lower;
  const alpha = (B0 - B1) / dv;
  const Be = B0 + alpha * (lower + 0.5);
  const levels = upper + lower + 1;
  const wexeOf = (we: number) => (alpha * we + 6 * Be * Be) ** 2 / (36 * Be ** 3) / 1.09;
  let a = origin / dv;
  let b = 2 * a;
  for (let k = 0; k < 200; k++) {
    const mid = (a + b) / 2;
    if (mid * dv - wexeOf(mid) * dv * levels - origin > 0) b = mid;
    else a = mid;
  }
  const we = (a + b) / 2;
  const wexe = wexeOf(we);
  const corr = ((8 * wexe) / we - (5 * alpha) / Be - (alpha * alpha * we) / (24 * Be ** 3)) * (lower + 0.5);
  const ratio = D / (1 + corr) / ((4 * Be ** 3) / we ** 2);
  const uncertainty = Math.hypot(0.003, sigmaD / D, 0.5 * corr, (2 * 0.08 * wexe * levels) / we);
  return { ratio, uncertainty, we, Be };
}

describe('Kratzer test', () => {
  it('CO 1-0 from the published v = 0, 1 constants and the real R(0): ratio 1 within 1 %, as worked out here', () => {
    const l0 = coLevel(0);
    const l1 = coLevel(1);
    const r0 = CO_DATABASE.lines.find((l) => l.band === '1-0' && l.branch === 'R' && l.j === 0)?.position as number;
    // ν₀ = R(0) − F′(1) + F″(0), F″(0) = 0.
    const origin = r0 - term(l1, 1);
    const sigmaD = (CO_DATABASE.published.D_v_kHz.uncertainty[0] as number) / 1e3 / MHZ_PER_CM;
    const k = kratzerTest(
      levelsFit({
        levels: [
          { v: 0, B: l0.B, D: l0.D, sigmaD },
          { v: 1, B: l1.B },
        ],
        band: '1-0',
        origin,
      }),
      BAND10,
    );
    const own = ownKratzer(l0.B, l1.B, l0.D, sigmaD, origin, 0, 1);
    expect(k?.ratio).toBeCloseTo(own.ratio, 9);
    expect(k?.uncertainty).toBeCloseTo(own.uncertainty, 9);
    // Outside: Kratzer's relation holds for CO X ¹Σ⁺ within 0.1 % (Huber & Herzberg D_e 6.1215e-6 against
    // 4B_e³/ω_e² = 6.120e-6, from memory); the estimated ω_e (Pekeris) and β_e add well under 1 % here.
    expect(Math.abs((k?.ratio as number) - 1)).toBeLessThan(0.01);
    // ω_e of the hand solution against Huber & Herzberg's 2169.81 cm⁻¹ (from memory), within 0.5 %.
    expect(own.we / 2169.81358).toBeCloseTo(1, 2);
  });

  it('the hot band 2-1 and the overtone 2-0 of CO take v″ + ½ and Δv into B_e, ω_e and β_e', () => {
    for (const [upper, lower] of [
      [2, 1],
      [2, 0],
      [3, 0],
    ] as const) {
      const lo = coLevel(lower);
      const up = coLevel(upper);
      const first = CO_DATABASE.lines.find(
        (l) => l.band === `${upper}-${lower}` && l.branch === 'R' && l.j === (lower === 1 ? 1 : 0),
      );
      const jLow = lower === 1 ? 1 : 0;
      const origin = (first?.position as number) - term(up, jLow + 1) + term(lo, jLow);
      const k = kratzerTest(
        levelsFit({
          levels: [
            { v: lower, B: lo.B, D: lo.D, sigmaD: 1e-10 },
            { v: upper, B: up.B },
          ],
          band: `${upper}-${lower}`,
          origin,
        }),
        { upper, lower },
      );
      const own = ownKratzer(lo.B, up.B, lo.D, 1e-10, origin, lower, upper);
      expect(k?.ratio).toBeCloseTo(own.ratio, 9);
      expect(k?.uncertainty).toBeCloseTo(own.uncertainty, 9);
      // Outside: every band of CO gives the equilibrium relation within 2 % (D_e, B_e of Huber & Herzberg).
      expect(Math.abs((k?.ratio as number) - 1)).toBeLessThan(0.02);
    }
  });

  it('the ratio is linear in D″ and D″ without σ adds nothing to the uncertainty', () => {
    const base = { B0: 0.8170845, B1: 0.8111663, origin: CS_ORIGIN };
    const kFor = (D: number, sigmaD?: number) =>
      kratzerTest(
        levelsFit({
          levels: [
            { v: 0, B: base.B0, D, ...(sigmaD !== undefined ? { sigmaD } : {}) },
            { v: 1, B: base.B1 },
          ],
          band: '1-0',
          origin: base.origin,
        }),
        BAND10,
      );
    const a = kFor(1.331e-6, 1e-9);
    // The levels found by v, whatever their order in the result.
    const swapped = kratzerTest(
      levelsFit({
        levels: [
          { v: 1, B: base.B1 },
          { v: 0, B: base.B0, D: 1.331e-6, sigmaD: 1e-9 },
        ],
        band: '1-0',
        origin: base.origin,
      }),
      BAND10,
    );
    expect(swapped).toEqual(a);
    const b = kFor(2 * 1.331e-6, 1e-9);
    expect((b?.ratio as number) / (a?.ratio as number)).toBeCloseTo(2, 12);
    const own = ownKratzer(base.B0, base.B1, 1.331e-6, 0, base.origin, 0, 1);
    const c = kratzerTest(
      {
        ...levelsFit({ levels: [{ v: 1, B: base.B1 }], band: '1-0', origin: base.origin }),
        levels: [
          { species: 'X', v: 0, B: { value: base.B0, uncertainty: 0 }, D: { value: 1.331e-6 } },
          { species: 'X', v: 1, B: { value: base.B1, uncertainty: 0 } },
        ],
      } as unknown as FitResult,
      BAND10,
    );
    expect(c?.uncertainty).toBeCloseTo(own.uncertainty, 12);
    // CS against its own Kratzer relation: the microwave D_e is within 0.3 % of 4B_e³/ω_e² (from memory), the
    // estimates of ω_e and β_e within 1.5 % more.
    expect(Math.abs((c?.ratio as number) - 1)).toBeLessThan(0.02);
  });

  it('constants no bound ¹Σ state has give ratio 0 with uncertainty 1', () => {
    const implausible = { ratio: 0, uncertainty: 1 };
    const t = (B0: number, B1: number, D: number, origin: number, sigmaD = 1e-9) =>
      kratzerTest(
        levelsFit({
          levels: [
            { v: 0, B: B0, D, sigmaD },
            { v: 1, B: B1 },
          ],
          band: '1-0',
          origin,
        }),
        BAND10,
      );
    expect(t(0.817, 0.811, -1e-6, 1272)).toEqual(implausible); // D″ < 0
    expect(t(0.817, 0.811, 0, 1272)).toEqual(implausible); // D″ = 0
    expect(t(0.811, 0.817, 1e-6, 1272)).toEqual(implausible); // B′ > B″
    expect(t(0.817, 0.817, 1e-6, 1272)).toEqual(implausible); // α_e = 0
    expect(t(-1, -2, 1e-6, 1272)).toEqual(implausible); // B_e = −0.5
    expect(t(-0.5, -1.5, 1e-6, 1272)).toEqual(implausible); // B_e = 0
    expect(t(0.817, 0.811, 1e-6, -5)).toEqual(implausible); // origin below zero
    expect(t(0.817, 0.811, 1e-6, 0)).toEqual(implausible); // origin zero
    expect(t(0.817, 0.811, Number.POSITIVE_INFINITY, 1272)).toEqual(implausible); // ratio not finite
    expect(t(0.817, 0.811, 1e-6, 1272, Number.POSITIVE_INFINITY)).toEqual(implausible); // σ not finite
    expect(t(0.817, 0.811, 1e-6, 1272, Number.NaN)).toEqual(implausible);
    expect(t(0.817, 0.811, 1e-6, 1272)?.ratio).toBeGreaterThan(0);
    // α_e large beside B_e: Dunham's β_e/D_e (−α_e²ω_e/(24B_e³) ≈ −53 here) would make D_e negative.
    expect(t(0.1, 0.05, 1e-6, 1000)).toEqual(implausible);
  });

  it('is undefined for pure rotation, a downward band, or a missing level, origin or D″', () => {
    const full = {
      levels: [
        { v: 0, B: 0.817, D: 1e-6, sigmaD: 1e-9 },
        { v: 1, B: 0.811 },
      ],
      band: '1-0',
      origin: 1272,
    };
    expect(kratzerTest(levelsFit(full), BAND10)).toBeDefined();
    expect(kratzerTest(levelsFit({ ...full, band: '0-0' }), { upper: 0, lower: 0 })).toBeUndefined();
    expect(kratzerTest(levelsFit({ ...full, band: '0-1' }), { upper: 0, lower: 1 })).toBeUndefined();
    expect(kratzerTest(levelsFit({ ...full, levels: [{ v: 1, B: 0.811 }] }), BAND10)).toBeUndefined();
    expect(
      kratzerTest(levelsFit({ ...full, levels: [{ v: 0, B: 0.817, D: 1e-6, sigmaD: 1e-9 }] }), BAND10),
    ).toBeUndefined();
    expect(kratzerTest(levelsFit({ ...full, band: '2-0' }), BAND10)).toBeUndefined();
    expect(kratzerTest(levelsFit({ levels: full.levels, band: '1-0' }), BAND10)).toBeUndefined();
    expect(
      kratzerTest(
        levelsFit({
          ...full,
          levels: [
            { v: 0, B: 0.817 },
            { v: 1, B: 0.811 },
          ],
        }),
        BAND10,
      ),
    ).toBeUndefined();
    expect(originOf(levelsFit(full), BAND10)).toBe(1272);
    expect(originOf(levelsFit({ ...full, band: '2-1' }), BAND10)).toBeUndefined();
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Shapes of a progression

const pt = (m: number, position: number, index = m + 100): Point => ({ m, index, position });

describe('smooth sides', () => {
  it('needs four lines a side and spacings that change by at most a quarter of the median', () => {
    const P = [-4, -3, -2, -1].map((m) => pt(m, 100 + 2 * m));
    const R = [0, 1, 2, 3].map((m) => pt(m, 102 + 2 * m));
    expect(smoothSides([...P, ...R])).toBe(true);
    expect(smoothSides([...P.slice(1), ...R])).toBe(false);
    expect(smoothSides([...P, ...R.slice(1)])).toBe(false);
    // Spacings 2, 2, 2.5: the jump 0.5 is exactly a quarter of the median 2 and passes; 2.6 does not.
    const R5 = (last: number) => [pt(0, 0), pt(1, 2), pt(2, 4), pt(3, 6 + last)];
    expect(smoothSides([...P, ...R5(0.5)].reverse())).toBe(true);
    expect(smoothSides([...P, ...R5(0.625)])).toBe(false);
    // A lost line: the spacing is taken per index step (6 − 2 over two steps is 2).
    expect(smoothSides([...P, pt(0, 0), pt(1, 2), pt(3, 6), pt(4, 8), pt(5, 10)])).toBe(true);
    // A side whose positions fall with m (a spacing of −2 per line) is as smooth as one that rises.
    expect(smoothSides([...P, ...[0, 1, 2, 3].map((m) => pt(m, 50 - 2 * m))])).toBe(true);
    // Sorted by m before the spacings are taken: spacings 2, 3, 2 jump (false), though taken in the order given
    // (m = 0, 2, 1, 3) the slopes 2.5, 3, 2.5 would not.
    expect(smoothSides([...P, pt(0, 0), pt(2, 5), pt(1, 2), pt(3, 7)])).toBe(false);
    // A jump on the P side counts as well.
    expect(smoothSides([pt(-5, 89), pt(-4, 92), pt(-3, 94), pt(-2, 96), pt(-1, 98), ...R])).toBe(false);
  });
});

describe('the Fortrat polynomial and its residuals', () => {
  it('reproduces a cubic from four points and more, a line through the offsets below three', () => {
    const cubic = (m: number) => 2143 + 3.8 * m - 0.017 * m * m + 2e-4 * m ** 3;
    const pts = [-3, -2, -1, 1, 2, 3, 4].map((m) => pt(m, cubic(m)));
    expect(fortrat(pts, 9, 3.8)).toBeCloseTo(cubic(9), 8);
    expect(fortrat(pts.slice(0, 4), 9, 3.8)).toBeCloseTo(cubic(9), 7);
    // Limited to degree 2 it cannot follow the cubic: the least-squares parabola through the same points.
    const ms = pts.map((p) => p.m);
    const quad = ownLeastSquares(
      [ms.map(() => 1), ms, ms.map((m) => m * m)],
      pts.map((p) => p.position),
    ).coef;
    const q9 = (quad[0] as number) + 9 * (quad[1] as number) + 81 * (quad[2] as number);
    expect(fortrat(pts, 9, 3.8, 2)).toBeCloseTo(q9, 8);
    expect(Math.abs(q9 - cubic(9))).toBeGreaterThan(0.01);
    // Three points: a parabola through them.
    const par = (m: number) => 100 + 2 * m + 0.5 * m * m;
    expect(fortrat([pt(-1, par(-1)), pt(1, par(1)), pt(2, par(2))], 5, 2)).toBeCloseTo(par(5), 9);
    // Two points: the mean offset from the slope given, (10 + 2.5 + 14 − 2.5)/2 = 12, then 12 + 3·2.5.
    expect(fortrat([pt(-1, 10), pt(1, 14)], 3, 2.5)).toBeCloseTo(19.5, 12);
    expect(fortrat([pt(2, 7)], -1, 1.5)).toBeCloseTo(7 - 3 * 1.5, 12);
    // Points at one m only: no polynomial; the first point's position.
    expect(fortrat([pt(1, 5, 1), pt(1, 6, 2), pt(1, 7, 3)], 4, 1)).toBe(5);
  });

  it('residuals about a polynomial of degree up to 4 (n − 3 coefficients below eight points)', () => {
    const quartic = (m: number) => 50 + m - 0.3 * m * m + 0.01 * m ** 3 - 0.002 * m ** 4;
    const nine = [1, 2, 3, 4, 5, 6, 7, 8, 9].map((m) => pt(m, quartic(m)));
    const r = polynomialResiduals(nine) as Float64Array;
    expect(r).toHaveLength(9);
    for (const x of r) expect(Math.abs(x)).toBeLessThan(1e-9);
    // A quintic term is left in the residuals: as this file's own fit of degree 4 leaves it.
    const quintic = nine.map((p) => ({ ...p, position: p.position + 1e-3 * p.m ** 5 }));
    const own = ownLeastSquares(
      [0, 1, 2, 3, 4].map((k) => quintic.map((p) => ((p.m - 5) / 4) ** k)),
      quintic.map((p) => p.position),
    ).residuals;
    const rq = polynomialResiduals(quintic) as Float64Array;
    for (const [i, x] of own.entries()) expect(rq[i]).toBeCloseTo(x, 7);
    expect(Math.max(...own.map(Math.abs))).toBeGreaterThan(0.01);
    // Six points: a parabola (three coefficients), so a cubic leaves residuals, a parabola none.
    const six = [0, 1, 2, 3, 4, 5];
    const onParabola = six.map((m) => pt(m, 3 + m * m));
    for (const x of polynomialResiduals(onParabola) as Float64Array) expect(Math.abs(x)).toBeLessThan(1e-10);
    const onCubic = six.map((m) => pt(m, 3 + m ** 3));
    expect(Math.max(...Array.from(polynomialResiduals(onCubic) as Float64Array, Math.abs))).toBeGreaterThan(0.1);
    // Five points: a straight line; four: too few.
    const five = [0, 1, 2, 3, 4].map((m) => pt(m, m * m));
    const line = ownLeastSquares(
      [five.map(() => 1), five.map((p) => p.m)],
      five.map((p) => p.position),
    ).residuals;
    const r5 = polynomialResiduals(five) as Float64Array;
    for (const [i, x] of line.entries()) expect(r5[i]).toBeCloseTo(x, 10);
    expect(polynomialResiduals(five.slice(0, 4))).toBeUndefined();
    // All points at one m: rank deficient.
    expect(polynomialResiduals([1, 2, 3, 4, 5, 6].map((k) => pt(2, k, k)))).toBeUndefined();
  });

  it('side scatter: the larger of 1.4826·MAD·√(n/dof) and the rms over dof, infinite below eight points', () => {
    const g = normals(7);
    const side = [-12, -11, -10, -9, -8, -7, -6, -5, -4, -3, -2].map((m) => pt(m, 2100 + 3.7 * m + 0.01 * g()));
    const other = [1, 2, 3].map((m) => pt(m, 2150 + m));
    const res = ownLeastSquares(
      [0, 1, 2, 3, 4].map((k) => side.map((p) => ((p.m + 7) / 5) ** k)),
      side.map((p) => p.position),
    ).residuals;
    const dof = side.length - 5;
    const expected = Math.max(
      madSigma(res) * Math.sqrt(side.length / dof),
      Math.sqrt(res.reduce((s, x) => s + x * x, 0) / dof),
    );
    expect(sideScatter([...side, ...other], true)).toBeCloseTo(expected, 9);
    expect(sideScatter([...side, ...other], false)).toBe(Number.POSITIVE_INFINITY);
    // Eight points with seven coefficients' worth … no: eight points take five coefficients, three left.
    const eight = side.slice(0, 8);
    const r8 = ownLeastSquares(
      [0, 1, 2, 3, 4].map((k) => eight.map((p) => ((p.m + 8.5) / 3.5) ** k)),
      eight.map((p) => p.position),
    ).residuals;
    const e8 = Math.max(madSigma(r8) * Math.sqrt(8 / 3), Math.sqrt(r8.reduce((s, x) => s + x * x, 0) / 3));
    expect(sideScatter(eight, true)).toBeCloseTo(e8, 9);
    expect(sideScatter(eight.slice(1), true)).toBe(Number.POSITIVE_INFINITY);
    // Exactly on a line: a scatter of rounding only.
    expect(
      sideScatter(
        [-9, -8, -7, -6, -5, -4, -3, -2].map((m) => pt(m, 10 + 2 * m)),
        true,
      ),
    ).toBeLessThan(1e-12);
  });

  it('strays beyond five robust σ of the polynomial go, refitted twice; too few left is no side', () => {
    const g = normals(11);
    const clean = Array.from({ length: 20 }, (_, k) => k + 1).map((m) =>
      pt(m, 2000 + 3.8 * m - 0.02 * m * m + 1e-3 * g()),
    );
    const rest = [13, 14, 15, 16, 17, 18, 19, 20];
    expect(strayFree(clean)).toEqual(clean);
    const withStray = clean.map((p) => (p.m === 6 ? { ...p, position: p.position + 0.5 } : p));
    expect(strayFree(withStray)?.map((p) => p.m)).toEqual([1, 2, 3, 4, 5, 7, 8, 9, 10, 11, 12, ...rest]);
    // Two strays of different size: the first pass may keep the smaller; the second takes it.
    const two = withStray.map((p) => (p.m === 9 ? { ...p, position: p.position + 0.02 } : p));
    expect(strayFree(two)?.map((p) => p.m)).toEqual([1, 2, 3, 4, 5, 7, 8, 10, 11, 12, ...rest]);
    // withoutStrays: each side on its own; a side below eight points is kept whole.
    const pSide = clean.map((p) => pt(-p.m, 3900 - p.position + (p.m === 4 ? 0.4 : 0), p.index + 50));
    const rSmall = [0, 1, 2].map((m) => pt(m, 1950 + m * 3.8, 200 + m));
    const out = withoutStrays([...pSide, ...rSmall]) as Point[];
    expect(out.map((p) => p.m)).toEqual([...pSide.filter((p) => p.m !== -4).map((p) => p.m), 0, 1, 2]);
  });
});

describe('renumbering by a common step', () => {
  const place = (ms: number[]) => ms.map((m, k) => pt(m, 1000 + m, k));
  it('every other index (a spurious line halved the spacing): kept and renumbered, strays dropped', () => {
    // Residues of m + 1 modulo 3: 0:4, 1:3, 2:3, no; modulo 2: eight of ten share residue 0 (exactly four fifths).
    const pts = place([-7, -5, -3, -1, 1, 3, 5, 7, 0, 2]);
    expect(byCommonStep(pts).map((p) => [p.m, p.position])).toEqual([
      [-4, 993],
      [-3, 995],
      [-2, 997],
      [-1, 999],
      [0, 1001],
      [1, 1003],
      [2, 1005],
      [3, 1007],
    ]);
  });
  it('the R side lifted back to m ≥ 0 when the renumbering put its innermost line below', () => {
    const pts = place([-6, -4, -2, 0, 2, 4, 6, 8]);
    expect(byCommonStep(pts).map((p) => p.m)).toEqual([-3, -2, -1, 0, 1, 2, 3, 4]);
    expect(byCommonStep(pts)[0]).not.toHaveProperty('side');
  });
  it('every third index', () => {
    const pts = place([-7, -4, -1, 2, 5, 8, 11, 14]);
    expect(byCommonStep(pts).map((p) => p.m)).toEqual([-3, -2, -1, 0, 1, 2, 3, 4]);
  });
  it('consecutive indices, or fewer than six sharing a residue: unchanged (a copy)', () => {
    const pts = place([-4, -3, -2, -1, 0, 1, 2, 3]);
    const out = byCommonStep(pts);
    expect(out).toEqual(pts);
    expect(out).not.toBe(pts);
    const five = place([-1, 1, 3, 5, 7]);
    expect(byCommonStep(five)).toEqual(five);
    // Seven of ten (below four fifths) sharing a residue modulo 2.
    const seven = place([-5, -3, -1, 1, 3, 5, 7, 0, 2, 4]);
    expect(byCommonStep(seven)).toEqual(seven);
  });
});

describe('local points and the nearest free line', () => {
  it('the side of m once it has four points, the twelve nearest in m', () => {
    const pts = Array.from({ length: 30 }, (_, k) => pt(k - 15, k));
    expect(
      localPoints(pts, 3)
        .map((p) => p.m)
        .sort((a, b) => a - b),
    ).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11]);
    expect(
      localPoints(pts, -1)
        .map((p) => p.m)
        .sort((a, b) => a - b),
    ).toEqual([-12, -11, -10, -9, -8, -7, -6, -5, -4, -3, -2, -1]);
    const few = [pt(-3, 1), pt(-2, 2), pt(-1, 3), pt(0, 4), pt(1, 5), pt(2, 6)];
    expect(localPoints(few, 1)).toEqual(few); // three on the R side: all points
    const tenR = Array.from({ length: 10 }, (_, k) => pt(k, k));
    expect(localPoints([...few.slice(0, 3), ...tenR], 0)).toEqual(tenR);
    expect(localPoints([...few.slice(0, 3), ...tenR], -2)).toHaveLength(12);
  });

  it('the nearest unused line within the tolerance, the ends included', () => {
    const { order, pos } = orderOf([10, 10.4, 10.52, 11, 9.5]);
    expect(nearestFree(10.45, 0.1, new Set(), pos, order)).toEqual({ index: 1, position: 10.4 });
    expect(nearestFree(10.45, 0.1, new Set([1]), pos, order)).toEqual({ index: 2, position: 10.52 });
    expect(nearestFree(10.49, 0.1, new Set(), pos, order)).toEqual({ index: 2, position: 10.52 });
    expect(nearestFree(10.45, 0.01, new Set(), pos, order)).toBeUndefined();
    // Two at the ends of the window, equally near: the lower (first met) is kept.
    expect(nearestFree(10.5, 0.5, new Set([1, 2]), pos, order)).toEqual({ index: 0, position: 10 });
    expect(nearestFree(10.5, 0.5, new Set([0, 1, 2]), pos, order)).toEqual({ index: 3, position: 11 });
    expect(nearestFree(10, 0.5, new Set([0, 1]), pos, order)).toEqual({ index: 4, position: 9.5 });
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Growing a progression on real lines

describe('growth on the real CO fundamental', () => {
  it('from P(1) and R(0): both branches, P(J) at m = −J and R(J) at m = J + 1, to the end of the list', () => {
    const lines = coBand('1-0', 20);
    const { order, pos } = orderOf(lines.map((l) => l.position));
    const p1 = lines.findIndex((l) => l.branch === 'P' && l.j === 1);
    const r0 = lines.findIndex((l) => l.branch === 'R' && l.j === 0);
    const got = grow(
      { index: p1, position: lines[p1]?.position as number },
      { index: r0, position: lines[r0]?.position as number },
      pos,
      order,
    );
    expect(got).toHaveLength(lines.length);
    for (const p of got) expect(p.m).toBe(mOf(lines[p.index] as { branch: Branch; j: number }));
    // The same with the gap counted as two slots directly.
    const direct = growWithSlots(
      { index: p1, position: lines[p1]?.position as number },
      { index: r0, position: lines[r0]?.position as number },
      2,
      pos,
      order,
    );
    expect(new Set(direct.map((p) => `${p.index}@${p.m}`))).toEqual(new Set(got.map((p) => `${p.index}@${p.m}`)));
    // Seeds in the wrong order: no spacing, the two seeds alone.
    expect(
      growWithSlots(
        { index: r0, position: lines[r0]?.position as number },
        { index: p1, position: lines[p1]?.position as number },
        2,
        pos,
        order,
      ),
    ).toHaveLength(2);
  });

  it('a lost line is left out, spurious lines between are not taken, a hole from the polynomial is filled', () => {
    const lines = coBand('1-0', 25).filter((l) => !(l.branch === 'P' && l.j === 7));
    const spurious = [2100.3, 2160.1, 2190.07];
    const positions = [...lines.map((l) => l.position), ...spurious];
    const { order, pos } = orderOf(positions);
    const p1 = lines.findIndex((l) => l.branch === 'P' && l.j === 1);
    const r0 = lines.findIndex((l) => l.branch === 'R' && l.j === 0);
    const got = grow(
      { index: p1, position: positions[p1] as number },
      { index: r0, position: positions[r0] as number },
      pos,
      order,
    );
    expect(got).toHaveLength(lines.length);
    for (const p of got) expect(p.m).toBe(mOf(lines[p.index] as { branch: Branch; j: number }));
  });

  it('two seeds alone: the gap counted as two slots; spurious lines halving the spacing on one side are left out', () => {
    const lines = coBand('1-0', 20);
    const p1 = lines.find((l) => l.branch === 'P' && l.j === 1) as (typeof lines)[number];
    const r0 = lines.find((l) => l.branch === 'R' && l.j === 0) as (typeof lines)[number];
    const two = orderOf([p1.position, r0.position]);
    expect(
      grow({ index: 0, position: p1.position }, { index: 1, position: r0.position }, two.pos, two.order).map(
        (p) => p.m,
      ),
    ).toEqual([-1, 1]);
    // Lines 0.05 above the middle of P(2)…P(7): the P side's spacings near the seed are halved (beyond the factor
    // 1.4 between the sides), so the gap is counted both ways and the longer progression, the true band, kept.
    const mids = [2, 3, 4, 5, 6].map((j) => {
      const a = lines.find((l) => l.branch === 'P' && l.j === j) as (typeof lines)[number];
      const b = lines.find((l) => l.branch === 'P' && l.j === j + 1) as (typeof lines)[number];
      return (a.position + b.position) / 2 + 0.05;
    });
    const o = orderOf([...lines.map((l) => l.position), ...mids]);
    const got = grow(
      { index: lines.indexOf(p1), position: p1.position },
      { index: lines.indexOf(r0), position: r0.position },
      o.pos,
      o.order,
    );
    expect(got).toHaveLength(lines.length);
    for (const p of got) expect(p.m).toBe(mOf(lines[p.index] as { branch: Branch; j: number }));
  });

  it('a spurious line inside the gap: the whole band is still the longest progression, without it', () => {
    const lines = coBand('1-0', 20);
    const r0 = lines.find((l) => l.branch === 'R' && l.j === 0) as (typeof lines)[number];
    const o = orderOf([...lines.map((l) => l.position), r0.position - 1.3]);
    const chains = progressions(o.order, o.pos);
    const first = chains[0] as Point[];
    expect(first).toHaveLength(lines.length);
    expect(first.every((p) => p.index < lines.length)).toBe(true);
    const base = Math.min(...first.map((p) => p.m));
    for (const p of first) expect(p.m - base).toBe(mOf(lines[p.index] as { branch: Branch; j: number }) + 20);
  });

  it('fillHoles takes a lost line back from the polynomial, not across the origin gap', () => {
    const lines = coBand('1-0', 20);
    const pts = lines.map((l, i) => pt(mOf(l), l.position, i));
    const { order, pos } = orderOf(lines.map((l) => l.position));
    const hole = (m: number) => pts.find((p) => p.m === m) as Point;
    const without = pts.filter((p) => p.m !== -6 && p.m !== 9);
    const used = new Set(without.map((p) => p.index));
    fillHoles(without, used, pos, order);
    expect(without).toContainEqual(hole(-6));
    expect(without).toContainEqual(hole(9));
    expect(used.has(hole(-6).index)).toBe(true);
    expect(without).toHaveLength(pts.length);
    // Holes of two in a row are filled too; the gap at the origin (m = 0) never.
    const two = pts.filter((p) => p.m !== 5 && p.m !== 6);
    fillHoles(two, new Set(two.map((p) => p.index)), pos, order);
    expect(two.map((p) => p.m).sort((a, b) => a - b)).toEqual(pts.map((p) => p.m).sort((a, b) => a - b));
    // A stretch of three empty: the middle one is filled (lines on both sides within two), the others not.
    const three = pts.filter((p) => p.m !== 4 && p.m !== 5 && p.m !== 6);
    fillHoles(three, new Set(three.map((p) => p.index)), pos, order);
    expect(three.some((p) => p.m === 5)).toBe(true);
    expect(three.some((p) => p.m === 4 || p.m === 6)).toBe(false);
    // A line at the predicted place already used elsewhere is not taken.
    const other = pts.filter((p) => p.m !== -6);
    fillHoles(other, new Set([...other.map((p) => p.index), hole(-6).index]), pos, order);
    expect(other.some((p) => p.m === -6)).toBe(false);
  });

  it('extendInwards grows each side towards the origin until the two meet (CS made here, σ 0.001)', () => {
    const lines = csLines({ pMax: 20, rMax: 20, sigma: 0.001, seed: 41 });
    const pts = lines.map((l, i) => pt(mOf(l), l.position, i));
    const { order, pos } = orderOf(lines.map((l) => l.position));
    const sorted = (ps: Point[]) => ps.map((p) => p.m).sort((x, y) => x - y);
    // The innermost P(1), P(2) and R(0) missing: the P side grows up to m = −1, the R side down to m = 1.
    const outer = pts.filter((p) => p.m < -2 || p.m > 1);
    const used = new Set(outer.map((p) => p.index));
    extendInwards(outer, used, pos, order);
    expect(sorted(outer)).toEqual(sorted(pts));
    for (const p of outer) expect(p.m).toBe(mOf(lines[p.index] as Made));
    expect(used.size).toBe(pts.length);
    // A side of three: nothing is grown.
    const short = pts.filter((p) => (p.m < 0 && p.m >= -3) || p.m > 3);
    const n = short.length;
    extendInwards(short, new Set(short.map((p) => p.index)), pos, order);
    expect(short).toHaveLength(n);
    // P(2) lost: one miss is passed over, P(1) is still reached (m = −1 after −2 empty); P(1) and P(2) lost with
    // P(3): two misses in a row end the P side.
    const grownFrom = (lost: number[]) => {
      const keep = lines.filter((l) => !(l.branch === 'P' && lost.includes(l.j)));
      const o = orderOf(keep.map((l) => l.position));
      const start = keep.map((l, i) => pt(mOf(l), l.position, i)).filter((p) => p.m < -3 || p.m > 1);
      extendInwards(start, new Set(start.map((p) => p.index)), o.pos, o.order);
      return sorted(start.filter((p) => p.m < 0 && p.m >= -3));
    };
    expect(grownFrom([2])).toEqual([-3, -1]);
    expect(grownFrom([2, 3])).toEqual([]);
    expect(grownFrom([1, 2])).toEqual([-3]);
  });

  it('extendBothSides grows outwards until three lines in a row are missing', () => {
    const lines = coBand('1-0', 30);
    const pts = lines.map((l, i) => pt(mOf(l), l.position, i));
    const { order, pos } = orderOf(lines.map((l) => l.position));
    const inner = pts.filter((p) => p.m >= -4 && p.m <= 5);
    extendBothSides(inner, new Set(inner.map((p) => p.index)), pos, order, 3.8);
    expect(inner).toHaveLength(pts.length);
    for (const p of inner) expect(p.m).toBe(mOf(lines[p.index] as { branch: Branch; j: number }));
    // Three lines lost on the R side beyond R(10): growth stops there; two lost: it goes on past them.
    const cut = (lost: number[]) => {
      const keep = lines.filter((l) => !(l.branch === 'R' && lost.includes(l.j)));
      const o = orderOf(keep.map((l) => l.position));
      const start = keep.map((l, i) => pt(mOf(l), l.position, i)).filter((p) => p.m >= -4 && p.m <= 5);
      extendBothSides(start, new Set(start.map((p) => p.index)), o.pos, o.order, 3.8);
      return Math.max(...start.map((p) => p.m));
    };
    expect(cut([11, 12, 13])).toBe(11);
    expect(cut([11, 12])).toBe(31);
  });

  it('a short side far from where the long side puts it is dropped; a true one is kept', () => {
    const lines = coBand('1-0', 20);
    const P = lines.filter((l) => l.branch === 'P').map((l, i) => pt(mOf(l), l.position, i));
    const trueR = lines.filter((l) => l.branch === 'R' && l.j <= 1).map((l, i) => pt(mOf(l), l.position, 100 + i));
    expect(withoutStraySeedSide([...P, ...trueR], 3.8)).toHaveLength(P.length + 2);
    const strayR = [pt(1, (trueR[0] as Point).position + 1.2, 200), pt(2, (trueR[1] as Point).position, 201)];
    const kept = withoutStraySeedSide([...P, ...strayR], 3.8);
    expect(kept.map((p) => p.index).sort((a, b) => a - b)).toEqual([...P.map((p) => p.index), 201]);
    // Fewer than twelve on the long side, or four on the short one: kept as they are.
    expect(withoutStraySeedSide([...P.slice(0, 11), ...strayR], 3.8)).toHaveLength(13);
    const four = [...strayR, pt(3, 2160, 202), pt(4, 2170, 203)];
    expect(withoutStraySeedSide([...P, ...four], 3.8)).toHaveLength(P.length + 4);
    // The same with the sides swapped (the short side below the gap).
    const R = lines.filter((l) => l.branch === 'R').map((l, i) => pt(mOf(l), l.position, i));
    const strayP = [pt(-1, 2137.9, 300)];
    expect(withoutStraySeedSide([...strayP, ...R], 3.8)).toHaveLength(R.length);
    expect(withoutStraySeedSide([...R], 3.8)).toHaveLength(R.length);
  });

  it('progressions from every gap pair: the whole band first; distinct ones only', () => {
    const lines = coBand('1-0', 15);
    const { order, pos } = orderOf(lines.map((l) => l.position));
    const chains = progressions(order, pos);
    expect(chains.length).toBeGreaterThan(0);
    const first = chains[0] as Point[];
    expect(first).toHaveLength(lines.length);
    const base = Math.min(...first.map((p) => p.m));
    const baseTrue = -15;
    for (const p of first) expect(p.m - base).toBe(mOf(lines[p.index] as { branch: Branch; j: number }) - baseTrue);
    for (let k = 1; k < chains.length; k++)
      expect((chains[k] as Point[]).length).toBeLessThanOrEqual((chains[k - 1] as Point[]).length);
    const contenders = longestProgressions([first, first.map((p) => ({ ...p, m: p.m + 3 })), first.slice(0, 20)]);
    expect(contenders).toHaveLength(1);
    // Within 90 %: 28 of 31 is in, 27 is out; at most four.
    const variant = (k: number, n: number) => first.slice(0, n).map((p) => ({ ...p, index: p.index + 1000 * k }));
    expect(longestProgressions([first, variant(1, 28), variant(2, 27)])).toHaveLength(2);
    expect(longestProgressions([first, variant(1, 30), variant(2, 30), variant(3, 29), variant(4, 29)])).toHaveLength(
      4,
    );
    // Too few lines for a progression of six.
    const few = orderOf(lines.slice(13, 18).map((l) => l.position));
    expect(progressions(few.order, few.pos)).toEqual([]);
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Numberings

describe('numberings of a progression', () => {
  const chain = [-3, -2, -1, 1, 2, 3].map((m) => pt(m, 100 + m, m + 3));
  it('every empty slot nearest the seed gap first, each with the R side moved by 0, −1, +1', () => {
    expect(numberingsOf(chain)).toEqual([0, -4, 4].flatMap((q) => [0, -1, 1].map((delta) => ({ q, delta }))));
    // At most sixteen slots, nearest first.
    const wide = [-2, -1, 30, 31].map((m) => pt(m, m, m + 2));
    const got = numberingsOf(wide);
    expect(got).toHaveLength(48);
    expect(got.slice(0, 3).map((x) => x.q)).toEqual([0, 0, 0]);
    expect(new Set(got.map((x) => x.q))).toEqual(new Set([0, 1, 2, -3, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14]));
    // The slot below the lowest line (−31) is not among the sixteen nearest, and no inside slot brings it in.
    const far = [-30, -29, -28, 1, 2, 3].map((m) => pt(m, m, m + 30));
    const farSlots = new Set(numberingsOf(far).map((x) => x.q));
    expect(farSlots.size).toBe(16);
    expect(farSlots.has(-31)).toBe(false);
    expect(farSlots.has(4)).toBe(true);
    expect(farSlots.has(-14)).toBe(true);
    expect(farSlots.has(-15)).toBe(false);
  });
  it('the lines numbered from the slot: R(J) at index J + 1, P(J) at −J; a line at the origin refuses', () => {
    const at0 = numbered(chain, 0, 0) as Numbering;
    expect([...at0].map(([i, t]) => `${i}:${t.branch}${t.j}`)).toEqual([
      '0:P3',
      '1:P2',
      '2:P1',
      '4:R0',
      '5:R1',
      '6:R2',
    ]);
    const moved = numbered(chain, 0, 1) as Numbering;
    expect([...moved].map(([i, t]) => `${i}:${t.branch}${t.j}`)).toEqual([
      '0:P3',
      '1:P2',
      '2:P1',
      '4:R1',
      '5:R2',
      '6:R3',
    ]);
    const back = numbered(chain, -4, -1) as Numbering;
    expect([...back].map(([, t]) => `${t.branch}${t.j}`)).toEqual(['R0', 'R1', 'R2', 'R3', 'R4', 'R5']);
    expect(numbered(chain, 1, 0)).toBeUndefined();
    // A line at m = 0 belongs to the R side of the seed gap and moves with it.
    const withZero = [-3, -2, -1, 0, 1, 2].map((m) => pt(m, 100 + m, m + 3));
    const up = numbered(withZero, -4, 1) as Numbering;
    expect([...up].map(([, t]) => `${t.branch}${t.j}`)).toEqual(['R0', 'R1', 'R2', 'R4', 'R5', 'R6']);
    expect(numbered(chain, 0, -1)).toBeUndefined();
  });
  it('keys: the same numbering in any order is one key, another numbering another', () => {
    const a = new Map<number, { branch: Branch; j: number }>([
      [0, { branch: 'P', j: 1 }],
      [1, { branch: 'R', j: 0 }],
    ]);
    const b = new Map([...a].reverse());
    expect(numberingKey(a)).toBe(numberingKey(b));
    expect(numberingKey(a)).not.toBe(
      numberingKey(
        new Map([
          [0, { branch: 'P', j: 2 }],
          [1, { branch: 'R', j: 0 }],
        ]),
      ),
    );
    expect(numberingKey(a)).not.toBe(
      numberingKey(
        new Map([
          [0, { branch: 'R', j: 1 }],
          [1, { branch: 'R', j: 0 }],
        ]),
      ),
    );
    expect(numberingKey(a)).not.toBe(
      numberingKey(
        new Map([
          [2, { branch: 'P', j: 1 }],
          [1, { branch: 'R', j: 0 }],
        ]),
      ),
    );
  });
  it('labels say where the origin is and how the sides moved', () => {
    expect(describeShift(2, 0)).toBe('origin at slot 2 of the progression');
    expect(describeShift(-1, 1)).toBe('origin at slot -1 of the progression, R side moved +1 against the P side');
    expect(describeShift(0, -1)).toBe('origin at slot 0 of the progression, R side moved -1 against the P side');
  });
  it('the local spacing: the median of the spacings between consecutive running numbers', () => {
    const peaks = [{ position: 10 }, { position: 12 }, { position: 14.5 }, { position: 20 }, { position: 23.5 }];
    const map = new Map<number, { branch: Branch; j: number }>([
      [0, { branch: 'P', j: 2 }],
      [1, { branch: 'P', j: 1 }],
      [2, { branch: 'R', j: 0 }],
      [3, { branch: 'R', j: 2 }],
      [4, { branch: 'R', j: 3 }],
    ]);
    // m: −2, −1, 1, 3, 4; consecutive pairs (−2,−1): 2, (3,4): 3.5; median 2.75.
    expect(localSpacing(map, peaks)).toBeCloseTo(2.75, 12);
    expect(localSpacing(new Map(), peaks)).toBe(1);
    expect(localSpacing(new Map([...map].reverse()), peaks)).toBeCloseTo(2.75, 12);
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Combination differences, Boltzmann plot, χ²

/**
 * Δ₂F″ as structure.ts documents it, worked out here with this file's own least squares: pairs R(J−1), P(J+1) at
 * u = J + ½, weights 1/(σ_R² + σ_P²) (σ = 1 when none is given), columns 1, u, u³, … (2 to 6 by the number of pairs),
 * one more while its F exceeds 16 and two degrees of freedom stay; the intercept's a-priori σ and the fit's own scale.
 */
function ownIntercept(map: Numbering, peaks: readonly { position: number; uncertainty?: number }[]) {
  const R = new Map<number, { position: number; uncertainty?: number }>();
  const P = new Map<number, { position: number; uncertainty?: number }>();
  for (const [i, t] of map) (t.branch === 'R' ? R : P).set(t.j, peaks[i] as { position: number });
  const u: number[] = [];
  const y: number[] = [];
  const w: number[] = [];
  for (const [j, r] of [...R].sort((a, b) => a[0] - b[0])) {
    const p = P.get(j + 2);
    if (!p) continue;
    u.push(j + 1.5);
    y.push(r.position - p.position);
    w.push(1 / ((r.uncertainty ?? 1) ** 2 + (p.uncertainty ?? 1) ** 2));
  }
  const n = u.length;
  const fitCols = (cols: number) =>
    ownLeastSquares(
      Array.from({ length: cols }, (_, c) => u.map((x) => (c === 0 ? 1 : x ** (2 * c - 1)))),
      y,
      w,
    );
  let cols = n >= 30 ? 6 : n >= 20 ? 5 : n >= 12 ? 4 : n >= 7 ? 3 : 2;
  if (n < cols + 2) return undefined;
  let f = fitCols(cols);
  while (cols < 7 && n >= cols + 3) {
    const g = fitCols(cols + 1);
    if (!((f.chi - g.chi) / (g.chi / (n - cols - 1)) > 16)) break;
    f = g;
    cols++;
  }
  return { value: f.coef[0] as number, uncertainty: Math.sqrt(f.cov00), ownScale: Math.sqrt(f.chi / (n - cols)), cols };
}

describe('combination differences at J = −½', () => {
  it('the true numbering of CS (σ given): intercept within 3σ of zero, as this file works it out', () => {
    for (const [pMax, rMax, seed] of [
      [8, 8, 1],
      [12, 14, 2],
      [22, 22, 3],
      [34, 33, 4],
      [40, 40, 5],
    ] as const) {
      const lines = csLines({ pMax, rMax, sigma: 0.002, seed });
      const d = differenceIntercept(truth(lines), lines);
      const own = ownIntercept(truth(lines), lines);
      expect(d?.value).toBeCloseTo(own?.value as number, 7);
      expect(d?.uncertainty).toBeCloseTo(own?.uncertainty as number, 8);
      expect(d?.ownScale).toBeCloseTo(own?.ownScale as number, 6);
      // Theory: Δ₂F″(J) = F″(J+1) − F″(J−1) is odd in J + ½, so zero at −½ (within 3.5σ of the noise).
      expect(Math.abs(d?.value as number)).toBeLessThan(3.5 * (d?.uncertainty as number));
      // The fit's own scale estimates the noise √2·σ in units of the weights' σ, about 1.
      expect(d?.ownScale).toBeGreaterThan(0.5);
      expect(d?.ownScale).toBeLessThan(1.6);
    }
  });

  it('a light molecule needs its higher odd powers (CO to J = 40 at 1e-6 cm⁻¹: published H″ enters)', () => {
    const lines = coBand('1-0', 40);
    const peaks = lines.map((l) => ({ position: l.position, uncertainty: 1e-5 }));
    const d = differenceIntercept(truth(lines), peaks);
    const own = ownIntercept(truth(lines), peaks);
    expect(own?.cols).toBeGreaterThanOrEqual(6);
    expect(d?.value).toBeCloseTo(own?.value as number, 6);
    expect((d?.uncertainty as number) / (own?.uncertainty as number)).toBeCloseTo(1, 6);
    // Outside: the slope 4B″ − 6D″ of Δ₂F″ is not returned, but the intercept is zero to the positions' rounding.
    expect(Math.abs(d?.value as number)).toBeLessThan(1e-4);
  });

  it('the R side moved by one line: the intercept is 3B″ − B′ off zero (about −2B)', () => {
    const lines = csLines({ pMax: 20, rMax: 20, sigma: 1e-4, seed: 1, withSigma: false });
    const moved = new Map(
      [...truth(lines)].map(([i, t]) => [i, t.branch === 'R' ? { branch: 'R' as Branch, j: t.j + 1 } : t]),
    );
    const d = differenceIntercept(moved, lines) as { value: number; uncertainty: number };
    // Pairs R(J−1) labelled, holding the true R(J−2): Δ = F″(J+1) − F″(J−2) − [F′(J) − F′(J−1)] ≈ (6B″ − 2B′)(J + ½) −
    // (3B″ − B′), the D terms even in u are small beside it.
    const own = ownIntercept(moved, lines);
    expect(d.value).toBeCloseTo(own?.value as number, 6);
    expect(d.value / -(3 * csLevel(0).B - csLevel(1).B)).toBeCloseTo(1, 2);
  });

  it('lines without σ count as σ = 1; too few pairs or a rank-deficient fit give nothing', () => {
    const lines = csLines({ pMax: 10, rMax: 10, sigma: 0.001, seed: 3, withSigma: false });
    const d = differenceIntercept(truth(lines), lines);
    const own = ownIntercept(truth(lines), lines);
    expect(d?.uncertainty).toBeCloseTo(own?.uncertainty as number, 9);
    expect(d?.ownScale).toBeCloseTo(own?.ownScale as number, 9);
    // Three pairs: two columns need four.
    const three = csLines({ pMax: 4, rMax: 2, sigma: 0.001, seed: 3 });
    expect(differenceIntercept(truth(three), three)).toBeUndefined();
    const four = csLines({ pMax: 5, rMax: 3, sigma: 0.001, seed: 3 });
    expect(differenceIntercept(truth(four), four)?.uncertainty).toBeGreaterThan(0);
    // All pairs at one J (the same R and P lines numbered twice over): rank deficient.
    const same = [csLines({ pMax: 3, rMax: 1, sigma: 0, seed: 1 })].flatMap((l) => [...l, ...l, ...l, ...l]);
    const map: Numbering = new Map();
    same.forEach((l, i) => {
      if ((l.branch === 'R' && l.j === 0) || (l.branch === 'P' && l.j === 2)) map.set(i, { branch: l.branch, j: l.j });
    });
    expect(differenceIntercept(map, same)).toBeUndefined();
  });
});

/** A fit result with the lower level's B, D and chosen line outcomes. */
function fakeFit(o: {
  B?: number;
  D?: number;
  lines?: { index: number; residual?: number; status?: string }[];
  v?: number;
}) {
  return {
    levels:
      o.B === undefined
        ? []
        : [{ species: 'X', v: o.v ?? 0, B: { value: o.B }, ...(o.D !== undefined ? { D: { value: o.D } } : {}) }],
    lines: (o.lines ?? []).map((l) => ({
      index: l.index,
      position: 0,
      status: l.status ?? 'fitted',
      ...(l.residual !== undefined ? { residual: l.residual } : {}),
    })),
    bands: [],
  } as unknown as FitResult;
}

describe('Boltzmann plot', () => {
  it('intensities from a Boltzmann population lie on one line: residual sum at its floor', () => {
    const lines = csLines({ pMax: 12, rMax: 12, sigma: 0, seed: 1, T: 296 });
    const lo = csLevel(0);
    const r = boltzmannResiduals(truth(lines), lines, fakeFit({ B: lo.B, D: lo.D }), BAND10);
    expect(r).toEqual({ rss: 1e-12, n: 25 });
    // Without D″ in the fit the abscissa is B·x alone: the D x² left out bends the plot by D x²/kT, tiny here.
    const noD = boltzmannResiduals(truth(lines), lines, fakeFit({ B: lo.B }), BAND10);
    expect(noD?.n).toBe(25);
  });

  it('the residual sum worked out here for a plot that is not a line, and the Hönl–London factors', () => {
    const lines = csLines({ pMax: 10, rMax: 10, sigma: 0, seed: 1, T: 296 });
    const g = normals(5);
    const noisy = lines.map((l) => ({ ...l, intensity: (l.intensity as number) * Math.exp(0.1 * g()) }));
    const lo = csLevel(0);
    const r = boltzmannResiduals(truth(noisy), noisy, fakeFit({ B: lo.B, D: lo.D }), BAND10);
    const x = noisy.map((l) => l.j * (l.j + 1));
    const own = ownLeastSquares(
      [x.map(() => 1), x.map((v) => lo.B * v - lo.D * v * v)],
      noisy.map((l) => Math.log((l.intensity as number) / ((l.branch === 'R' ? l.j + 1 : l.j) * l.position))),
    );
    expect(r?.n).toBe(21);
    expect((r?.rss as number) / own.chi).toBeCloseTo(1, 8);
    // Numbered one line off (every J one higher), the factors and energies no longer fit: a larger sum.
    const shifted = new Map([...truth(lines)].map(([i, t]) => [i, { branch: t.branch, j: t.j + 1 }]));
    const off = boltzmannResiduals(shifted, lines, fakeFit({ B: lo.B, D: lo.D }), BAND10);
    expect(off?.rss).toBeGreaterThan(1e-6);
  });

  it('six lines with intensity at least; P(0) and zero intensities left out; no lower level, no plot', () => {
    const lines = csLines({ pMax: 3, rMax: 2, sigma: 0, seed: 1, T: 296 });
    const lo = csLevel(0);
    const map = truth(lines);
    expect(boltzmannResiduals(map, lines, fakeFit({ B: lo.B, D: lo.D }), BAND10)?.n).toBe(6);
    const zero = lines.map((l, i) => (i === 0 ? { ...l, intensity: 0 } : l));
    expect(boltzmannResiduals(map, zero, fakeFit({ B: lo.B, D: lo.D }), BAND10)).toBeUndefined();
    const none = lines.map((l, i) => (i === 0 ? { position: l.position, branch: l.branch, j: l.j } : l));
    expect(boltzmannResiduals(map, none, fakeFit({ B: lo.B, D: lo.D }), BAND10)).toBeUndefined();
    const p0 = new Map(map).set(0, { branch: 'P', j: 0 });
    expect(boltzmannResiduals(p0, lines, fakeFit({ B: lo.B, D: lo.D }), BAND10)).toBeUndefined();
    expect(boltzmannResiduals(map, lines, fakeFit({ B: lo.B, D: lo.D, v: 1 }), BAND10)).toBeUndefined();
    // All six at one J″ (x the same): the plot cannot have a slope.
    const flat = [0, 1, 2, 3, 4, 5].map(() => ({ position: 1280, intensity: 2 }));
    const flatMap: Numbering = new Map(flat.map((_, i) => [i, { branch: 'R' as Branch, j: 3 }]));
    expect(boltzmannResiduals(flatMap, flat, fakeFit({ B: lo.B }), BAND10)).toBeUndefined();
  });
});

describe('χ² against stated σ, rms of the numbered lines', () => {
  const r = fakeFit({
    lines: [
      { index: 0, residual: 0.002 },
      { index: 1, residual: -0.003 },
      { index: 2, residual: 0.5, status: 'rejected' },
      { index: 3 },
      { index: 4, residual: 0.004 },
    ],
  });
  it('Σ(r/σ)² when every fitted line has σ, Σr² when none has, undefined for a mix', () => {
    const all = [0.001, 0.002, 0.1, 0.1, 0.004].map((s) => ({ position: 0, uncertainty: s }));
    expect(statedChiSquare(r, all)).toBeCloseTo(4 + 2.25 + 1, 12);
    expect(
      statedChiSquare(
        r,
        all.map(() => ({ position: 0 })),
      ),
    ).toBeCloseTo(4e-6 + 9e-6 + 16e-6, 15);
    expect(
      statedChiSquare(
        r,
        all.map((l, i) => (i === 1 ? { position: 0 } : l)),
      ),
    ).toBeUndefined();
    // σ = 0 counts as none.
    expect(
      statedChiSquare(
        r,
        all.map((l, i) => (i === 4 ? { position: 0, uncertainty: 0 } : l)),
      ),
    ).toBeUndefined();
  });
  it('rms of the fitted lines below the count; none: infinite', () => {
    expect(fittedRms(r, 5)).toBeCloseTo(Math.sqrt((4e-6 + 9e-6 + 16e-6) / 3), 12);
    expect(fittedRms(r, 4)).toBeCloseTo(Math.sqrt((4e-6 + 9e-6) / 2), 12);
    expect(fittedRms(r, 0)).toBe(Number.POSITIVE_INFINITY);
  });
});

// ---------------------------------------------------------------------------------------------------------------
// A line at the origin

describe('a line at the band origin', () => {
  it('within the smaller of 4·max(rms, median σ) and a tenth of the spacing', () => {
    // Spacing 2 (median of consecutive running numbers), lines with σ 0.01 (median): tolerance 0.04.
    const positions = [90, 92, 94, 96, 100, 102, 104, 106];
    const peaks = positions.map((position) => ({ position, uncertainty: 0.01 }));
    const map: Numbering = new Map(
      positions.map((_, i) => [i, i < 4 ? { branch: 'P' as Branch, j: 4 - i } : { branch: 'R' as Branch, j: i - 4 }]),
    );
    const ctx = (ps: { position: number; uncertainty?: number }[]) =>
      ({ peaks: ps, pos: Float64Array.from(ps.map((p) => p.position)).sort() }) as unknown as StructureContext;
    const withLine = [...peaks, { position: 98.035, uncertainty: 0.01 }];
    expect(lineAtOriginOf(98, 0.001, map, ctx(withLine))).toBe(true);
    expect(lineAtOriginOf(98.07, 0.001, map, ctx(withLine))).toBe(true);
    expect(lineAtOriginOf(97.999, 0.001, map, ctx(withLine))).toBe(true);
    expect(lineAtOriginOf(97.99, 0.001, map, ctx(withLine))).toBe(false);
    expect(lineAtOriginOf(97.999, 0.001, map, ctx(peaks))).toBe(false);
    expect(lineAtOriginOf(98.08, 0.001, map, ctx(withLine))).toBe(false);
    expect(lineAtOriginOf(97.999, 0.001, map, ctx(withLine.map((p) => ({ ...p, uncertainty: 0.001 }))))).toBe(false);
    // The fit's rms when larger: 4 × 0.02 reaches.
    expect(lineAtOriginOf(98.1, 0.02, map, ctx(withLine))).toBe(true);
    // Never beyond a tenth of the spacing (0.2).
    expect(lineAtOriginOf(98.25, 1, map, ctx(withLine))).toBe(false);
    expect(lineAtOriginOf(98.2, 1, map, ctx(withLine))).toBe(true);
    // Without σ: the rms alone.
    const bare = withLine.map((p) => ({ position: p.position }));
    expect(lineAtOriginOf(98.08, 0.01, map, ctx(bare))).toBe(false);
    expect(lineAtOriginOf(98.03, 0.01, map, ctx(bare))).toBe(true);
    expect(lineAtOriginOf(undefined, 0.01, map, ctx(bare))).toBe(false);
    // Above every line.
    expect(lineAtOriginOf(200, 1, map, ctx(bare))).toBe(false);
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Scores and the verdict, on trials made here

function trial(o: Partial<Trial> & { map?: Numbering }): Trial {
  return {
    map: o.map ?? new Map(),
    q: o.q ?? 0,
    delta: o.delta ?? 0,
    band: BAND10,
    result: o.result ?? fakeFit({ B: 0.8 }),
    chiSquare: o.chiSquare ?? 10,
    dof: o.dof ?? 10,
    reducedChiSquare: o.reducedChiSquare ?? 1,
    ...(o.origin !== undefined ? { origin: o.origin } : {}),
    lineAtOrigin: o.lineAtOrigin ?? false,
    intercept: o.intercept,
    unitSigma: o.unitSigma ?? 1,
    boltzmann: o.boltzmann,
    kratzer: o.kratzer,
  };
}

describe('scores', () => {
  it('the lines’ scale comes from the best fit among numberings that pass their own tests', () => {
    // A: intercept 0.001/(0.001·0.5) → 4, Kratzer (ln 1.003/0.01)² = 0.0896: 4.09.
    const A = trial({
      reducedChiSquare: 1.3,
      intercept: { value: 0.001, uncertainty: 0.001, ownScale: 0.5 },
      kratzer: { ratio: 1.003, uncertainty: 0.01 },
    });
    // B fits better (χ²/ν 0.5) but fails: 625 + 27.8 + 25.
    const B = trial({
      reducedChiSquare: 0.5,
      intercept: { value: 0.05, uncertainty: 0.001, ownScale: 2 },
      kratzer: { ratio: 0.9, uncertainty: 0.02 },
      lineAtOrigin: true,
    });
    expect(positionScale([A, B])).toBe(1.3);
    // C passes within 9 of A (own 4.09 + 8.5 = 12.6) and fits better: its χ²/ν.
    const C = trial({ reducedChiSquare: 0.8, kratzer: { ratio: Math.exp(0.01 * Math.sqrt(12.5)), uncertainty: 0.01 } });
    expect(positionScale([A, B, C])).toBe(0.8);
    const C2 = trial({
      reducedChiSquare: 0.8,
      kratzer: { ratio: Math.exp(0.01 * Math.sqrt(13.2)), uncertainty: 0.01 },
    });
    expect(positionScale([A, B, C2])).toBe(1.3);
    // An implausible Kratzer costs 25; an origin line 25; a zero σ·scale counts as 1; capped at 1e6.
    const D = trial({ reducedChiSquare: 0.7, kratzer: { ratio: 0, uncertainty: 1 } });
    expect(positionScale([trial({ reducedChiSquare: 2 }), D])).toBe(2);
    expect(positionScale([trial({ reducedChiSquare: 2 }), trial({ reducedChiSquare: 0.7, lineAtOrigin: true })])).toBe(
      2,
    );
    expect(positionScale([trial({ reducedChiSquare: 2, lineAtOrigin: true }), trial({ reducedChiSquare: 3 })])).toBe(3);
    const E = trial({ reducedChiSquare: 0.6, intercept: { value: 2.9, uncertainty: 0, ownScale: 1 } });
    expect(positionScale([trial({ reducedChiSquare: 2 }), E])).toBe(0.6);
    const F = trial({ reducedChiSquare: 0.6, intercept: { value: 3.1, uncertainty: 0, ownScale: 1 } });
    expect(positionScale([trial({ reducedChiSquare: 2 }), F])).toBe(2);
    expect(positionScale([trial({ reducedChiSquare: 0 })])).toBe(1e-300);
    // Exactly 9 above the best still passes: an intercept 3 (σ·scale 0 counts as 1) costs 3² = 9.
    const G = trial({ reducedChiSquare: 0.6, intercept: { value: 3, uncertainty: 0, ownScale: 1 } });
    expect(positionScale([trial({ reducedChiSquare: 2 }), G])).toBe(0.6);
    // An implausible Kratzer costs 25, not an infinite z²: beside a best of 25 (a line at its origin) it passes.
    expect(positionScale([trial({ reducedChiSquare: 2, lineAtOrigin: true }), D])).toBe(0.7);
  });

  it('each part of the total as documented, worked out by hand', () => {
    const map: Numbering = new Map([
      [0, { branch: 'P', j: 1 }],
      [1, { branch: 'R', j: 0 }],
    ]);
    const result = fakeFit({ B: 0.81 });
    const A = trial({
      map,
      result,
      q: 0,
      origin: 1272.1,
      dof: 20,
      reducedChiSquare: 1.2,
      intercept: { value: 0.002, uncertainty: 0.001, ownScale: 0.5 },
      unitSigma: 1,
      boltzmann: { rss: 0.02, n: 20 },
      kratzer: { ratio: 1.01, uncertainty: 0.01 },
    });
    const B = trial({
      map,
      result: fakeFit({ B: 0.81, v: 3 }),
      q: 1,
      delta: -1,
      dof: 20,
      reducedChiSquare: 2.4,
      intercept: { value: 0.01, uncertainty: 0.001, ownScale: 3 },
      unitSigma: 2,
      boltzmann: { rss: 0.2, n: 20 },
      kratzer: { ratio: 0.97, uncertainty: 0.02 },
      lineAtOrigin: true,
    });
    const C = trial({ map, result, q: 2, dof: 20, reducedChiSquare: 1.2 });
    const D = trial({ map, result, q: 3, dof: 20, reducedChiSquare: 1.2, kratzer: { ratio: 0, uncertainty: 1 } });
    const out = score([B, A, C, D]);
    // own tests: A (2/0.5)² + 1 = 17 (ln 1.01/0.01 = 0.995); B (10/3)² + 2.3 + 25; C 0; D 25. Best own: C (0);
    // passing within 9: C only → minRed 1.2. unit = min(unitSigma)·√max(1, 1.2) = √1.2.
    const unit = Math.sqrt(1.2);
    const a = out.find((t) => t.q === 0)?.evidence;
    const b = out.find((t) => t.q === 1)?.evidence;
    const c = out.find((t) => t.q === 2)?.evidence;
    const d = out.find((t) => t.q === 3)?.evidence;
    const sharpest = 0.01;
    expect(a?.parts.positions).toBeCloseTo(0, 12);
    expect(a?.differenceIntercept?.uncertainty).toBeCloseTo(0.001 * unit, 12);
    expect(a?.parts.differences).toBeCloseTo((0.002 / (0.001 * unit)) ** 2, 9);
    expect(a?.parts.origin).toBe(0);
    // rssMin = min(0.02/20, 0.2/20) = 0.001: A 0, B 20·ln 10.
    expect(a?.parts.intensities).toBeCloseTo(0, 12);
    expect(a?.parts.kratzer).toBeCloseTo((Math.log(1.01) / 0.01) ** 2, 9);
    expect(a?.score).toBeCloseTo((0.002 / (0.001 * unit)) ** 2 + (Math.log(1.01) / 0.01) ** 2, 9);
    expect(b?.parts.positions).toBeCloseTo(20 * (2.4 / 1.2 - 1), 9);
    expect(b?.differenceIntercept?.uncertainty).toBeCloseTo(0.003, 12);
    expect(b?.parts.differences).toBeCloseTo((0.01 / 0.003) ** 2, 9);
    expect(b?.parts.origin).toBe(25);
    expect(b?.parts.intensities).toBeCloseTo(20 * Math.log(10), 9);
    expect(b?.parts.kratzer).toBeCloseTo((Math.log(0.97) / 0.02) ** 2 + 2 * Math.log(0.02 / sharpest), 9);
    expect(b?.score).toBeCloseTo(
      20 + (0.01 / 0.003) ** 2 + 25 + 20 * Math.log(10) + (Math.log(0.97) / 0.02) ** 2 + 2 * Math.log(2),
      9,
    );
    // C: no Kratzer test where others have one (25), no Boltzmann plot (0); D: implausible (25).
    expect(c?.parts).toEqual({ positions: 0, differences: 0, origin: 0, intensities: 0, kratzer: 25 });
    expect(d?.parts.kratzer).toBe(25);
    // Sorted best first, evidence fields.
    expect(out.map((t) => t.evidence.score)).toEqual([...out.map((t) => t.evidence.score)].sort((x, y) => x - y));
    expect(a).toMatchObject({
      label: 'origin at slot 0 of the progression',
      originSlot: 0,
      alignment: 0,
      lines: 2,
      origin: 1272.1,
      lowerB: 0.81,
      reducedChiSquare: 1.2,
      lineAtOrigin: false,
      boltzmannScatter: Math.sqrt(0.02 / 20),
      kratzerRatio: 1.01,
      kratzerUncertainty: 0.01,
    });
    expect(b).toMatchObject({ alignment: -1, lineAtOrigin: true });
    expect(b).not.toHaveProperty('lowerB');
    expect(b).not.toHaveProperty('origin');
    expect(c).not.toHaveProperty('kratzerRatio');
    expect(c).not.toHaveProperty('differenceIntercept');
    expect(c).not.toHaveProperty('boltzmannScatter');
  });

  it('without any Kratzer test or Boltzmann plot those parts are zero; caps at 1e6; a worse fit never below 0', () => {
    const out = score([
      trial({ q: 0, reducedChiSquare: 2, dof: 5 }),
      trial({ q: 1, reducedChiSquare: 1, dof: 5, intercept: { value: 10, uncertainty: 1e-9, ownScale: 1 } }),
      trial({ q: 2, reducedChiSquare: 4, dof: 5, boltzmann: { rss: 1, n: 10 } }),
    ]);
    const byQ = (q: number) => out.find((t) => t.q === q)?.evidence.parts;
    // own tests: q0 0, q1 1e6 (capped), q2 0 → minRed = min(2, 4) = 2.
    expect(byQ(0)).toEqual({ positions: 0, differences: 0, origin: 0, intensities: 0, kratzer: 0 });
    expect(byQ(1)?.positions).toBe(0); // 5·(1/2 − 1) < 0 → 0
    // unit = √2 (min unitSigma 1 × √2): (1/(1e-9·√2))² = 5e17 → capped.
    expect(byQ(1)?.differences).toBe(1e6);
    expect(byQ(2)?.positions).toBeCloseTo(5, 12);
    expect(byQ(2)?.intensities).toBe(0); // the only plot is the best one
    // Kratzer z² capped at 1e6 too; implausible where others have a test.
    const k = score([
      trial({ q: 0, kratzer: { ratio: 2, uncertainty: 1e-6 } }),
      trial({ q: 1, kratzer: { ratio: 1, uncertainty: 0.01 } }),
    ]);
    expect(k.find((t) => t.q === 0)?.evidence.parts.kratzer).toBeCloseTo(1e6 + 2 * Math.log(1e-6 / 1e-6), 6);
    expect(k.find((t) => t.q === 1)?.evidence.parts.kratzer).toBeCloseTo(2 * Math.log(0.01 / 1e-6), 9);
    // The sharpest σ is taken over plausible numberings only (an implausible one's σ of 1 is no test).
    const loose = score([
      trial({ q: 0, kratzer: { ratio: 1, uncertainty: 2 } }),
      trial({ q: 1, kratzer: { ratio: 0, uncertainty: 1 } }),
    ]);
    expect(loose.find((t) => t.q === 0)?.evidence.parts.kratzer).toBe(0);
    expect(loose.find((t) => t.q === 1)?.evidence.parts.kratzer).toBe(25);
    // Only implausible ones: no numbering has a test, so one without any costs nothing.
    const none = score([trial({ q: 0 }), trial({ q: 1, kratzer: { ratio: 0, uncertainty: 1 } })]);
    expect(none.find((t) => t.q === 0)?.evidence.parts.kratzer).toBe(0);
    // A Boltzmann plot with a zero sum (no floor): no intensity evidence rather than an infinite one.
    const flat = score([trial({ q: 0, boltzmann: { rss: 0, n: 6 } }), trial({ q: 1, boltzmann: { rss: 0.6, n: 6 } })]);
    expect(flat.map((t) => t.evidence.parts.intensities)).toEqual([0, 0]);
  });

  it('one numbering per band origin (a quarter of the line spacing), the best scored first', () => {
    const peaks = [{ position: 10 }, { position: 12 }, { position: 16 }];
    const map: Numbering = new Map([
      [0, { branch: 'P', j: 2 }],
      [1, { branch: 'P', j: 1 }],
    ]);
    const scored = score([
      trial({ map, q: 0, origin: 11, reducedChiSquare: 1 }),
      trial({ map, q: 1, origin: 11.49, reducedChiSquare: 2 }),
      trial({ map, q: 2, origin: 11.5, reducedChiSquare: 3 }),
      trial({ map, q: 3, reducedChiSquare: 4 }),
      trial({ map, q: 4, origin: 10.51, reducedChiSquare: 5 }),
    ]);
    // Spacing 2 (P(1) − P(2)): within 0.5 of 11 dropped, 0.5 away kept.
    expect(onePerOrigin(scored, peaks).map((t) => t.q)).toEqual([0, 2, 3]);
    expect(onePerOrigin([], peaks)).toEqual([]);
  });

  it('the verdict: margin, its own tests, a fit its σ allow', () => {
    const peaks = Array.from({ length: 10 }, (_, k) => ({
      position: 100 + 2 * k + (k >= 5 ? 2 : 0),
      uncertainty: 0.001,
    }));
    const map: Numbering = new Map(
      peaks.map((_, k) => [k, k < 5 ? { branch: 'P' as Branch, j: 5 - k } : { branch: 'R' as Branch, j: k - 5 }]),
    );
    const ev = (q: number, s: number, parts: Partial<ScoredTrial['evidence']['parts']> = {}) => ({
      label: '',
      originSlot: q,
      alignment: 0,
      lines: 10,
      reducedChiSquare: 1,
      lineAtOrigin: false,
      score: s,
      parts: { positions: 0, differences: 0, origin: 0, intensities: 0, kratzer: 0, ...parts },
    });
    const st = (q: number, s: number, o: Partial<Trial> = {}, parts = {}): ScoredTrial => ({
      ...trial({ map, q, ...o }),
      evidence: ev(q, s, parts),
    });
    const v = verdict([st(0, 1), st(1, 10)], peaks);
    expect(v.margin).toBe(9);
    expect(v).toMatchObject({ fitsUncertainties: true, ownEvidence: true, decisive: true });
    expect(v.assigned).toBe(map);
    expect(verdict([st(0, 1), st(1, 9.99)], peaks).decisive).toBe(false);
    expect(verdict([st(0, 1)], peaks).margin).toBe(Number.POSITIVE_INFINITY);
    expect(verdict([st(0, 1, {}, { differences: 9, kratzer: 9 }), st(1, 30)], peaks).ownEvidence).toBe(true);
    expect(verdict([st(0, 1, {}, { differences: 9.01 }), st(1, 30)], peaks)).toMatchObject({
      ownEvidence: false,
      decisive: false,
    });
    expect(verdict([st(0, 1, {}, { kratzer: 9.01 }), st(1, 30)], peaks).ownEvidence).toBe(false);
    expect(verdict([st(0, 1, {}, { origin: 25 }), st(1, 30)], peaks).ownEvidence).toBe(false);
    // χ² 60 on 10 degrees of freedom: tail 1.6e-9 (χ² table: P(χ²₁₀ > 60) ≈ 1.6e-9) with rms well above 1e-4 of
    // the spacing: not believed; χ² 40: 1.7e-5, believed.
    const rough = fakeFit({ lines: peaks.map((_, k) => ({ index: k, residual: 0.002 })) });
    const bad = verdict([st(0, 1, { chiSquare: 60, dof: 10, result: rough }), st(1, 30)], peaks);
    expect(bad).toMatchObject({ fitsUncertainties: false, decisive: false, ownEvidence: true });
    expect(verdict([st(0, 1, { chiSquare: 40, dof: 10, result: rough }), st(1, 30)], peaks).fitsUncertainties).toBe(
      true,
    );
    // Lines within 1e-4 of the spacing (2): rms 1.9e-4 passes, 2.1e-4 does not.
    const fine = (r: number) => fakeFit({ lines: peaks.map((_, k) => ({ index: k, residual: r })) });
    expect(
      verdict([st(0, 1, { chiSquare: 600, dof: 10, result: fine(1.9e-4) }), st(1, 30)], peaks).fitsUncertainties,
    ).toBe(true);
    expect(
      verdict([st(0, 1, { chiSquare: 600, dof: 10, result: fine(2.1e-4) }), st(1, 30)], peaks).fitsUncertainties,
    ).toBe(false);
    // A line without σ: the fit is not judged against σ.
    const mixed = peaks.map((p, k) => (k === 3 ? { position: p.position } : p));
    expect(verdict([st(0, 1, { chiSquare: 600, dof: 10, result: rough }), st(1, 30)], mixed).fitsUncertainties).toBe(
      true,
    );
    // At most six entries of evidence, the chosen first.
    const many = verdict(
      [0, 1, 2, 3, 4, 5, 6, 7].map((q) => st(q, 10 * q)),
      peaks,
    );
    expect(many.evidence.map((e) => e.originSlot)).toEqual([0, 1, 2, 3, 4, 5]);
    expect(many.reducedChiSquare).toBe(1);
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Judging numberings with the fit (a few fits of small lists)

describe('judging numberings of CS 1-0 made from Huber & Herzberg constants', () => {
  it('the true numbering: origin, Kratzer ratio within 3σ of 1, Δ₂F″ intercept within 3.5σ, no origin line', () => {
    const lines = csLines({ pMax: 14, rMax: 14, sigma: 0.001, seed: 21, T: 296 });
    const ctx = contextOf(lines, cs.formula);
    const map = truth(lines);
    const t = judge(map, 0, 0, ctx) as Trial;
    // ν₀ = ω_e − 2ω_e x_e = 1272.16 cm⁻¹; its σ from 28 lines at 0.001 is about 3e-4: within 2e-3.
    expect(Math.abs((t.origin as number) - CS_ORIGIN)).toBeLessThan(2e-3);
    expect(t.lineAtOrigin).toBe(false);
    // Kratzer: the made D_e is the microwave one, within 0.3 % of 4B_e³/ω_e²; the test's own σ covers the rest.
    expect(Math.abs(Math.log(t.kratzer?.ratio as number))).toBeLessThan(3 * (t.kratzer?.uncertainty as number));
    expect(t.intercept && Math.abs(t.intercept.value) / t.intercept.uncertainty).toBeLessThan(3.5);
    // Every line with σ: χ² against them, a reduced χ² about 1 (28 lines, ≥ 22 degrees of freedom: within 0.4–1.8).
    expect(t.chiSquare / t.dof).toBeCloseTo(t.reducedChiSquare, 12);
    expect(t.reducedChiSquare).toBeGreaterThan(0.4);
    expect(t.reducedChiSquare).toBeLessThan(1.8);
    expect(t.unitSigma).toBe(1);
    expect(t.boltzmann?.n).toBe(29);
    expect(t.boltzmann?.rss).toBeLessThan(1e-6);
    expect(t).toMatchObject({ q: 0, delta: 0, band: BAND10 });
    expect(t.map).toBe(map);
    // numberedLines: the peaks as a line list, the numbered ones assigned, σ kept.
    const nl = numberedLines(new Map([[0, { branch: 'P', j: 14 }]]), ctx);
    expect(nl[0]).toEqual({
      position: lines[0]?.position,
      uncertainty: 0.001,
      assignment: { species: cs.formula, band: BAND10, branch: 'P', j: 14, source: 'auto' },
    });
    expect(nl[1]).toEqual({ position: lines[1]?.position, uncertainty: 0.001 });
    expect(numberedLines(new Map(), contextOf([{ position: 5 }], cs.formula))).toEqual([{ position: 5 }]);
  });

  it('moved by one line as a whole, the Kratzer ratio moves by about 3α_e/B_e (2 %); a line at the origin is seen', () => {
    const lines = csLines({ pMax: 30, rMax: 30, sigma: 0.0005, seed: 22 });
    const ctx = contextOf(lines, cs.formula);
    const right = judge(truth(lines), 0, 0, ctx) as Trial;
    const shifted: Numbering = new Map();
    for (const [i, t] of truth(lines)) {
      const m = mOf(t) + 1;
      if (m !== 0) shifted.set(i, m > 0 ? { branch: 'R', j: m - 1 } : { branch: 'P', j: -m });
    }
    const wrong = judge(shifted, -1, 0, ctx) as Trial;
    const lnRight = Math.log(right.kratzer?.ratio as number);
    const lnWrong = Math.log(wrong.kratzer?.ratio as number);
    // 3α_e/B_e = 3·0.0059182/0.8200 = 0.0217 (Huber & Herzberg, from memory); D″ from J ≤ 30 within ~0.5 %.
    expect(Math.abs(lnWrong - lnRight)).toBeGreaterThan(0.7 * 0.0217);
    expect(Math.abs(lnWrong - lnRight)).toBeLessThan(1.3 * 0.0217);
    expect(Math.abs(lnRight)).toBeLessThan(3 * (right.kratzer?.uncertainty as number));
    const withOrigin = contextOf(
      [...lines, { position: CS_ORIGIN + 0.0004, uncertainty: 0.001, branch: 'R', j: 99 }],
      cs.formula,
    );
    expect((judge(truth(lines), 0, 0, withOrigin) as Trial).lineAtOrigin).toBe(true);
  });

  it('lines without σ: the sum of squares stands for χ², the scatter for the unit σ', () => {
    const lines = csLines({ pMax: 10, rMax: 10, sigma: 0.002, seed: 23, withSigma: false });
    const ctx = contextOf(lines, cs.formula);
    const t = judge(truth(lines), 0, 0, ctx) as Trial;
    const rss = t.result.lines.reduce((s, l) => s + (l.status === 'fitted' ? (l.residual as number) ** 2 : 0), 0);
    expect(t.chiSquare).toBeCloseTo(rss, 12);
    expect(t.reducedChiSquare).toBeCloseTo(rss / t.dof, 12);
    // The unit σ: the fit's scatter estimate of lines without σ, about the 0.002 of the noise (within 40 %).
    expect(t.unitSigma).toBeGreaterThan(0.0012);
    expect(t.unitSigma).toBeLessThan(0.0028);
    // A mix of lines with and without σ: the fit's own reduced χ².
    const mix = lines.map((l, i) => (i % 2 ? { ...l, uncertainty: 0.002 } : l));
    const tm = judge(truth(mix), 0, 0, contextOf(mix, cs.formula)) as Trial;
    expect(tm.reducedChiSquare).toBe(tm.result.statistics.reducedChiSquare);
    expect(tm.chiSquare).toBeCloseTo((tm.result.statistics.reducedChiSquare as number) * tm.dof, 9);
  });

  it('a numbering the fit refuses is no trial', () => {
    const lines = csLines({ pMax: 3, rMax: 2, sigma: 0.001, seed: 24 });
    const ctx = contextOf(lines, cs.formula);
    expect(judge(new Map([[0, { branch: 'P', j: 3 }]]), 0, 0, ctx)).toBeUndefined();
  });

  it('the nearest rivals: the whole numbering moved by up to three lines and the R side by one', () => {
    const lines = csLines({ pMax: 6, rMax: 6, sigma: 0.001, seed: 25 });
    const ctx = contextOf(lines, cs.formula);
    const first = judge(truth(lines), 0, 0, ctx) as Trial;
    const tried = new Set<string>([numberingKey(first.map)]);
    const rivals = judgeRivals(first, ctx, tried);
    expect(rivals).toHaveLength(20);
    expect(tried.size).toBe(21);
    const pairs = new Set(rivals.map((t) => `${t.q}/${t.delta}`));
    for (let shift = -3; shift <= 3; shift++)
      for (const delta of [-1, 0, 1])
        if (shift !== 0 || delta !== 0) expect(pairs.has(`${-shift}/${delta}`)).toBe(true);
    // Moved by +1: P(1) falls on the origin and is left out, every other line one running number up.
    const up = rivals.find((t) => t.q === -1 && t.delta === 0) as Trial;
    expect(up.map.size).toBe(lines.length - 1);
    for (const [i, t] of up.map) expect(mOf(t)).toBe(mOf(lines[i] as Made) + 1);
    // R side moved by −1 alone: R(0) falls on the origin.
    const rside = rivals.find((t) => t.q === 0 && t.delta === -1) as Trial;
    for (const [i, t] of rside.map) {
      const m0 = mOf(lines[i] as Made);
      expect(mOf(t)).toBe(m0 > 0 ? m0 - 1 : m0);
    }
    // Judged again with every key tried: nothing new.
    expect(judgeRivals(first, ctx, tried)).toEqual([]);
  });

  it('every numbering of a progression judged once', () => {
    const lines = csLines({ pMax: 6, rMax: 6, sigma: 0.001, seed: 26 });
    const ctx = contextOf(lines, cs.formula);
    const chain = lines.map((l, i) => pt(mOf(l) - (l.branch === 'R' ? 0 : 0), l.position, i));
    const tried = new Set<string>();
    const trials = judgeProgressions([chain], ctx, tried);
    // Empty slots: 0, −7, 8 (lo − 1, hi + 1), three alignments each; a line lands on the origin for none of
    // q = 0 δ = 0, …: the numberings that put a line at the origin are skipped.
    const expected = numberingsOf(chain).filter(({ q, delta }) => numbered(chain, q, delta) !== undefined);
    expect(trials.map((t) => `${t.q}/${t.delta}`)).toEqual(expected.map((x) => `${x.q}/${x.delta}`));
    expect(tried.size).toBe(expected.length);
    const right = trials.find((t) => t.q === 0 && t.delta === 0) as Trial;
    for (const [i, t] of right.map) expect(t).toEqual({ branch: (lines[i] as Made).branch, j: (lines[i] as Made).j });
    // The same chain twice: judged once.
    expect(judgeProgressions([chain, chain], ctx, new Set())).toHaveLength(expected.length);
  });
});

describe('growth along the fit', () => {
  it('extendByFit takes the rest of the band from the fit of the first lines, not the spurious ones', () => {
    const lines = csLines({ pMax: 24, rMax: 24, sigma: 0.001, seed: 33 });
    const spurious = [CS_ORIGIN + 10.3, CS_ORIGIN - 15.1, CS_ORIGIN + 33.7].map((position) => ({
      position,
      uncertainty: 0.001,
    }));
    const peaks = [...lines.map((l) => ({ position: l.position, uncertainty: 0.001 })), ...spurious];
    const start: Numbering = new Map();
    lines.forEach((l, i) => {
      if (l.j <= 6) start.set(i, { branch: l.branch, j: l.j });
    });
    const out = extendByFit(peaks, start, cs.formula, reducedMass(cs), BAND10);
    expect(out.size).toBe(lines.length);
    for (const [i, t] of out) expect(t).toEqual({ branch: (lines[i] as Made).branch, j: (lines[i] as Made).j });
    // Without σ (the scatter of the lines stands for it): the same.
    const bare = peaks.map((p) => ({ position: p.position }));
    const out2 = extendByFit(bare, start, cs.formula, reducedMass(cs), BAND10);
    expect(out2.size).toBe(lines.length);
    // A numbering the fit refuses is returned as it was.
    const tiny = new Map([[0, { branch: 'P' as Branch, j: 24 }]]);
    expect(extendByFit(peaks, tiny, cs.formula, reducedMass(cs), BAND10)).toEqual(tiny);
  });

  it('a wrong line in the start is dropped by the fit and the right one taken; anchors are never numbered', () => {
    const lines = csLines({ pMax: 16, rMax: 16, sigma: 0.001, seed: 34 });
    const stray = { position: CS_ORIGIN + 20.1, uncertainty: 0.001 };
    const peaks = [...lines.map((l) => ({ position: l.position, uncertainty: 0.001 })), stray];
    const start: Numbering = new Map();
    lines.forEach((l, i) => {
      if (l.j <= 8 && !(l.branch === 'R' && l.j === 5)) start.set(i, { branch: l.branch, j: l.j });
    });
    start.set(peaks.length - 1, { branch: 'R', j: 5 });
    const out = extendByFit(peaks, start, cs.formula, reducedMass(cs), BAND10);
    expect(out.has(peaks.length - 1)).toBe(false);
    expect(out.size).toBe(lines.length);
    for (const [i, t] of out) expect(t).toEqual({ branch: (lines[i] as Made).branch, j: (lines[i] as Made).j });
    // Anchors: the CS 2-1 hot band's lines, numbered, made here (G(2) − G(1) = ω_e − 4ω_e x_e).
    const l1 = csLevel(1);
    const l2 = csLevel(2);
    const hot = [2, 3, 4, 5, 6, 7, 8, 9].flatMap((j) => [
      {
        position: CS.we - 4 * CS.wexe + term(l2, j + 1) - term(l1, j),
        uncertainty: 0.001,
        assignment: {
          species: cs.formula,
          band: { upper: 2, lower: 1 },
          branch: 'R' as Branch,
          j,
          source: 'given' as const,
        },
      },
      {
        position: CS.we - 4 * CS.wexe + term(l2, j - 1) - term(l1, j),
        uncertainty: 0.001,
        assignment: {
          species: cs.formula,
          band: { upper: 2, lower: 1 },
          branch: 'P' as Branch,
          j,
          source: 'given' as const,
        },
      },
    ]);
    const small: Numbering = new Map();
    lines.forEach((l, i) => {
      if (l.j <= 8) small.set(i, { branch: l.branch, j: l.j });
    });
    const withAnchors = extendByFit(peaks, small, cs.formula, reducedMass(cs), BAND10, hot);
    expect(Math.max(...withAnchors.keys())).toBeLessThan(peaks.length);
    expect(withAnchors.size).toBe(lines.length);
    for (const [i, t] of withAnchors) expect(t).toEqual({ branch: (lines[i] as Made).branch, j: (lines[i] as Made).j });
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Edges of the stages: seeds at the ends of a list, exact thresholds, the order of the input, refusals

/** A fixed shuffle (stride 7 through the list, coprime with its length) so that no order of the input is assumed. */
function shuffled<T>(xs: readonly T[]): { item: T; from: number }[] {
  const n = xs.length;
  let stride = 7;
  while (n % stride === 0) stride++;
  return Array.from({ length: n }, (_, k) => ({ item: xs[(k * stride) % n] as T, from: (k * stride) % n }));
}

/** The running numbers of a chain relative to its first point's, as the true labels give them. */
function relativeMs(chain: readonly Point[], labels: readonly { branch: Branch; j: number }[]) {
  const base = chain[0] as Point;
  const m0 = mOf(labels[base.index] as { branch: Branch; j: number });
  return chain.map((p) => ({ got: p.m - base.m, want: mOf(labels[p.index] as { branch: Branch; j: number }) - m0 }));
}

describe('edges of the numbering stages', () => {
  it('the real CO fundamental numbered the same whatever the order of its lines', () => {
    const lines = coBand('1-0', 9);
    const mixed = shuffled(lines);
    const s = assignByStructure(
      mixed.map((x) => ({ position: x.item.position, uncertainty: x.item.uncertainty })),
      co.formula,
      reducedMass(co),
      BAND10,
    );
    expect(s?.decisive).toBe(true);
    expect(s?.assigned.size).toBe(lines.length);
    for (const [i, t] of s?.assigned ?? []) {
      const l = mixed[i]?.item as { branch: Branch; j: number };
      expect(t).toEqual({ branch: l.branch, j: l.j });
    }
  });

  it('a band whose every numbering the fit refuses (upper level 0 below lower level 1): no numbering, no throw', () => {
    const lines = coBand('1-0', 9).map((l) => ({ position: l.position, uncertainty: l.uncertainty }));
    expect(assignByStructure(lines, co.formula, reducedMass(co), { upper: 0, lower: 1 })).toBeUndefined();
  });

  it('the seed pair may be the first or the last line of the list; six lines make a progression', () => {
    const band = coBand('1-0', 12);
    const cases = [
      // P(1) the lowest line, the R branch to R(8).
      band.filter((l) => (l.branch === 'P' && l.j === 1) || (l.branch === 'R' && l.j <= 8)),
      // R(0) the highest line, the P branch to P(9).
      band.filter((l) => (l.branch === 'P' && l.j <= 9) || (l.branch === 'R' && l.j === 0)),
      // Six lines, P(3)…P(1), R(0)…R(2): the fewest a progression holds.
      band.filter((l) => l.j <= 3 && !(l.branch === 'R' && l.j === 3)),
    ];
    for (const lines of cases) {
      const { order, pos } = orderOf(lines.map((l) => l.position));
      const chains = progressions(order, pos);
      const first = chains[0] as Point[];
      expect(first).toHaveLength(lines.length);
      for (const { got, want } of relativeMs(first, lines)) expect(got).toBe(want);
    }
  });

  it('two bands in one list: the longer progression first, wherever it lies', () => {
    // Real 12C16O: the fundamental to J = 6 (13 lines near 2143 cm⁻¹) and the overtone 2-0 to J = 15 (31 lines near
    // 4260 cm⁻¹, above it): the 2-0 progression, grown second, must come first.
    const lines = [...coBand('1-0', 6), ...coBand('2-0', 15)];
    const { order, pos } = orderOf(lines.map((l) => l.position));
    const chains = progressions(order, pos);
    const first = chains[0] as Point[];
    expect(first).toHaveLength(31);
    for (const p of first) expect(p.index).toBeGreaterThanOrEqual(13);
    expect(chains.some((c) => c.length === 13 && c.every((p) => p.index < 13))).toBe(true);
    for (let k = 1; k < chains.length; k++)
      expect((chains[k] as Point[]).length).toBeLessThanOrEqual((chains[k - 1] as Point[]).length);
  });

  it('distinct progressions: the same lines numbered otherwise are two, the same in another order one', () => {
    const base = Array.from({ length: 30 }, (_, k) => pt(k < 15 ? k - 15 : k - 14, 100 + k, k));
    // 27 of 30 is 0.9 of the longest exactly: kept.
    const cut = base.slice(0, 27).map((p) => ({ ...p, index: p.index + 1000 }));
    expect(longestProgressions([base, cut])).toHaveLength(2);
    // The R side moved by one against the P side: the same lines, another numbering.
    const moved = base.map((p) => (p.m > 0 ? { ...p, m: p.m + 1 } : p));
    expect(longestProgressions([base, moved])).toHaveLength(2);
    // The same numbering listed backwards: one.
    expect(longestProgressions([base, [...base].reverse()])).toHaveLength(1);
    // Index/running-number pairs whose texts run together alike ("1@2" + "34@5" and "1@23" + "4@5") stay apart.
    const a = [pt(0, 1, 5), pt(2, 2, 1), pt(5, 3, 34)];
    const b = [pt(0, 1, 5), pt(23, 2, 1), pt(5, 3, 4)];
    expect(longestProgressions([a, b])).toHaveLength(2);
    // Numbering keys alike: {1: R(2), 34: P(5)} and {1: R(23), 4: P(5)}.
    expect(
      numberingKey(
        new Map([
          [1, { branch: 'R', j: 2 }],
          [34, { branch: 'P', j: 5 }],
        ]),
      ),
    ).not.toBe(
      numberingKey(
        new Map([
          [1, { branch: 'R', j: 23 }],
          [4, { branch: 'P', j: 5 }],
        ]),
      ),
    );
  });

  it('the rivals never include the numbering itself, and label m > 0 as R(m − 1), m < 0 as P(−m)', () => {
    const lines = csLines({ pMax: 6, rMax: 6, sigma: 0.001, seed: 25 });
    const ctx = contextOf(lines, cs.formula);
    const first = judge(truth(lines), 0, 0, ctx) as Trial;
    const rivals = judgeRivals(first, ctx, new Set());
    // 7 shifts × 3 alignments, less the numbering itself.
    expect(rivals).toHaveLength(20);
    const own = numberingKey(first.map);
    for (const t of rivals) {
      expect(numberingKey(t.map)).not.toBe(own);
      const shift = -t.q;
      for (const [i, lab] of t.map) {
        const m0 = mOf(lines[i] as Made);
        const m = m0 + shift + (m0 > 0 ? t.delta : 0);
        expect(lab).toEqual(m > 0 ? { branch: 'R', j: m - 1 } : { branch: 'P', j: -m });
      }
    }
  });

  it('numberings the fit refuses are left out of the trials, not listed as empty ones', () => {
    const lines = csLines({ pMax: 6, rMax: 6, sigma: 0.001, seed: 26 });
    const down = { ...contextOf(lines, cs.formula), band: { upper: 0, lower: 1 } };
    const chain = lines.map((l, i) => pt(mOf(l), l.position, i));
    expect(judgeProgressions([chain], down, new Set())).toEqual([]);
    const first = judge(truth(lines), 0, 0, contextOf(lines, cs.formula)) as Trial;
    expect(judgeRivals(first, down, new Set())).toEqual([]);
  });

  it('a numbered line list carries no uncertainty key for a line sent without one', () => {
    const ctx = contextOf([{ position: 5 }, { position: 7, uncertainty: 0.01 }], cs.formula);
    const nl = numberedLines(new Map([[0, { branch: 'R', j: 0 }]]), ctx);
    expect('uncertainty' in (nl[0] as object)).toBe(false);
    expect(nl[1]).toStrictEqual({ position: 7, uncertainty: 0.01 });
  });

  it('judging fits every numbered line, an outlier included (no rejection), and takes a mix’s scale from the fit', () => {
    const lines = csLines({ pMax: 10, rMax: 10, sigma: 0.001, seed: 27 });
    // One line 0.05 cm⁻¹ off (50σ): kept, its residual alone is worth χ² of order (0.05/0.001)² × (1 − leverage).
    const bad = lines.map((l, i) => (i === 4 ? { ...l, position: l.position + 0.05 } : l));
    const t = judge(truth(bad), 0, 0, contextOf(bad, cs.formula)) as Trial;
    expect(t.result.lines.every((l) => l.status === 'fitted')).toBe(true);
    expect(t.chiSquare).toBeGreaterThan(0.5 * 2500);
    // Lines with and without σ: the unit σ is the fit's scatter of the lines without (not 1, not the rms).
    const mix = lines.map((l, i) => (i % 2 ? { ...l, uncertainty: undefined } : l));
    const tm = judge(truth(mix), 0, 0, contextOf(mix, cs.formula)) as Trial;
    expect(tm.unitSigma).toBe(tm.result.scatter?.[0]?.sigma);
    expect(tm.unitSigma).not.toBe(1);
    expect(tm.unitSigma).not.toBe(tm.result.statistics.rms);
  });

  it('Δ₂F″ starts with 4, 5, 6 columns from exactly 12, 20, 30 pairs (as documented, worked out here)', () => {
    for (const [pairs, cols] of [
      [12, 4],
      [20, 5],
      [30, 6],
    ] as const) {
      // R(0)…R(pairs − 1) with P(2)…P(pairs + 1): `pairs` pairs R(J−1), P(J+1).
      const lines = csLines({ pMax: pairs + 1, rMax: pairs - 1, sigma: 0.002, seed: 40 + pairs });
      const d = differenceIntercept(truth(lines), lines);
      const own = ownIntercept(truth(lines), lines);
      expect(own?.cols).toBe(cols);
      expect(d?.uncertainty).toBeCloseTo(own?.uncertainty as number, 9);
      expect(d?.value).toBeCloseTo(own?.value as number, 8);
    }
  });

  it('Δ₂F″ of a light molecule over few pairs takes the (J+½)⁵ term it needs: intercept zero within 3σ', () => {
    // Term values B x − D x² + H x³ (x = J(J+1)) with LiH-like magnitudes (B 7.5, D 8.6e-4, H 8e-8 cm⁻¹; invented,
    // not a published set): Δ₂F″ is an odd polynomial of degree 5 in J + ½, zero at J = −½ exactly. Ten pairs start
    // with the columns 1, u, u³; H makes 12H(J+½)⁵ ≈ 0.01 cm⁻¹ at J = 10, far beyond σ = 1e-4, so the F-test
    // must add u⁵ or the intercept is biased far beyond its σ.
    const lo = { B: 7.5, D: 8.6e-4, H: 8e-8 };
    const up = { B: 7.3, D: 8.5e-4, H: 7.8e-8 };
    const g = normals(77);
    const made: Made[] = [];
    for (let j = 11; j >= 1; j--)
      made.push({ position: 1360 + term(up, j - 1) - term(lo, j) + 1e-4 * g(), uncertainty: 1e-4, branch: 'P', j });
    for (let j = 0; j <= 9; j++)
      made.push({ position: 1360 + term(up, j + 1) - term(lo, j) + 1e-4 * g(), uncertainty: 1e-4, branch: 'R', j });
    const d = differenceIntercept(truth(made), made) as { value: number; uncertainty: number };
    const own = ownIntercept(truth(made), made);
    expect(own?.cols).toBeGreaterThanOrEqual(4);
    expect(Math.abs(d.value)).toBeLessThan(3 * d.uncertainty);
    expect(d.uncertainty).toBeCloseTo(own?.uncertainty as number, 9);
  });
});

describe('a line near where a lost line belongs', () => {
  it('fillHoles: a line 0.05 cm⁻¹ from a lost P(6) of real CO (beyond 6 side scatters) is not taken; the nearer of two is', () => {
    const lines = coBand('1-0', 20);
    const pts = lines.map((l, i) => pt(mOf(l), l.position, i));
    const p6 = pts.find((p) => p.m === -6) as Point;
    // The lines' scatter about the local polynomial is far below 0.05 / 6 (HITRAN positions, 1e-5 and better).
    expect(6 * sideScatter(pts, true)).toBeLessThan(0.05);
    const spurious = p6.position + 0.05;
    const lost = pts.filter((p) => p.m !== -6);
    const o1 = orderOf([...lines.map((l) => l.position), spurious]);
    // The lost line's own index is marked used, so only the spurious line (index lines.length) is free.
    fillHoles(lost, new Set([...lost.map((p) => p.index), p6.index]), o1.pos, o1.order);
    expect(lost.some((p) => p.m === -6)).toBe(false);
    // The true line back with a second candidate three side scatters off (within the tolerance of six): the true
    // one, nearer to where the polynomial puts it, is taken.
    const tenth = p6.position - 3 * sideScatter(pts, true);
    const both = pts.filter((p) => p.m !== -6);
    const o2 = orderOf([...lines.map((l) => l.position), tenth]);
    fillHoles(both, new Set(both.map((p) => p.index)), o2.pos, o2.order);
    expect(both.find((p) => p.m === -6)?.index).toBe(p6.index);
  });

  it('extendInwards: a line 0.05 from a lost P(1) of CS (σ 0.001) is not taken; the true P(1) beside it is', () => {
    const lines = csLines({ pMax: 20, rMax: 20, sigma: 0.001, seed: 41 });
    const p1 = lines.findIndex((l) => l.branch === 'P' && l.j === 1);
    const spurious = (lines[p1] as Made).position + 0.05;
    const positions = [...lines.map((l) => l.position), spurious];
    const { order, pos } = orderOf(positions);
    const start = lines.map((l, i) => pt(mOf(l), l.position, i)).filter((p) => p.m < -1 || p.m > 1);
    extendInwards(start, new Set([...start.map((p) => p.index), p1]), pos, order);
    expect(start.some((p) => p.m === -1)).toBe(false);
    expect(start.some((p) => p.index === lines.length)).toBe(false);
    // With P(1) free as well, P(1) (0.001 from where the side puts it) is taken, not the line 0.05 off.
    const again = lines.map((l, i) => pt(mOf(l), l.position, i)).filter((p) => p.m < -1 || p.m > 1);
    extendInwards(again, new Set(again.map((p) => p.index)), pos, order);
    expect(again.find((p) => p.m === -1)?.index).toBe(p1);
  });

  it('extendBothSides: a line 0.1 from a lost R(15) of real CO is not taken, growth goes on past it', () => {
    const lines = coBand('1-0', 25);
    const r15 = lines.findIndex((l) => l.branch === 'R' && l.j === 15);
    const spurious = (lines[r15] as (typeof lines)[number]).position + 0.1;
    const { order, pos } = orderOf([...lines.map((l) => l.position), spurious]);
    const inner = lines.map((l, i) => pt(mOf(l), l.position, i)).filter((p) => p.m >= -4 && p.m <= 5);
    extendBothSides(inner, new Set([...inner.map((p) => p.index), r15]), pos, order, 3.8);
    expect(inner.some((p) => p.index === lines.length)).toBe(false);
    expect(inner.some((p) => p.m === 16)).toBe(false);
    expect(Math.max(...inner.map((p) => p.m))).toBe(26);
    for (const p of inner) expect(p.m).toBe(mOf(lines[p.index] as { branch: Branch; j: number }));
    // R(15) free too, with the line 0.1 off beside it: R(15) is taken.
    const all = lines.map((l, i) => pt(mOf(l), l.position, i)).filter((p) => p.m >= -4 && p.m <= 5);
    extendBothSides(all, new Set(all.map((p) => p.index)), pos, order, 3.8);
    expect(all.find((p) => p.m === 16)?.index).toBe(r15);
    expect(all).toHaveLength(lines.length);
  });
});

describe('growth along the fit, its noise and its reach', () => {
  it('σ stated ten times too small: the factor of the normalised residuals widens the reach, the band is still taken', () => {
    // Noise 0.001 cm⁻¹, stated σ 0.0001: the residuals in units of σ scatter about 10, so predictions are searched
    // within 5 × 10 stated σ; without that factor every line beyond the start would lie 10 "σ" off and be missed.
    const lines = csLines({ pMax: 24, rMax: 24, sigma: 0.001, seed: 35 });
    const peaks = lines.map((l) => ({ position: l.position, uncertainty: 1e-4 }));
    const start: Numbering = new Map();
    lines.forEach((l, i) => {
      if (l.j <= 6) start.set(i, { branch: l.branch, j: l.j });
    });
    const out = extendByFit(peaks, start, cs.formula, reducedMass(cs), BAND10);
    expect(out.size).toBe(lines.length);
    for (const [i, t] of out) expect(t).toEqual({ branch: (lines[i] as Made).branch, j: (lines[i] as Made).j });
  });

  it('from J ≤ 4 to J = 45 in steps of half again the highest J (several rounds; three J a round would not reach)', () => {
    // Reach per round: jTop + max(3, ⌊jTop/2⌋): 4 → 7 → 10 → 15 → 22 → 33 → 49, six rounds of the twelve allowed;
    // three J a round would stop at 4 + 12·3 = 40.
    const lines = csLines({ pMax: 45, rMax: 45, sigma: 0.001, seed: 36 });
    const peaks = lines.map((l) => ({ position: l.position, uncertainty: 0.001 }));
    const start: Numbering = new Map();
    lines.forEach((l, i) => {
      if (l.j <= 4) start.set(i, { branch: l.branch, j: l.j });
    });
    const out = extendByFit(peaks, start, cs.formula, reducedMass(cs), BAND10);
    expect(out.size).toBe(lines.length);
    for (const [i, t] of out) expect(t).toEqual({ branch: (lines[i] as Made).branch, j: (lines[i] as Made).j });
    // Without σ, the lines' own scatter stands for the noise: the same.
    const bare = lines.map((l) => ({ position: l.position }));
    const out2 = extendByFit(bare, start, cs.formula, reducedMass(cs), BAND10);
    expect(out2.size).toBe(lines.length);
  });
});

describe('growth along the fit stops where the data run out', () => {
  it('lines beyond three J past the reach are taken only where the fit predicts them within twice the noise', () => {
    // CS 1-0 to J = 10 only, σ 0.001; two extra lines where R(14) and P(14) would lie (by this file's term values)
    // plus 0.004 cm⁻¹: four J past the highest found, the fit of J ≤ 10 extrapolated there is far less sharp than
    // twice the noise, so they are not taken, though within five of the prediction's σ.
    const lines = csLines({ pMax: 10, rMax: 10, sigma: 0.001, seed: 37 });
    const lo = csLevel(0);
    const up = csLevel(1);
    const far = [CS_ORIGIN + term(up, 15) - term(lo, 14) + 0.004, CS_ORIGIN + term(up, 13) - term(lo, 14) + 0.004];
    const peaks = [
      ...lines.map((l) => ({ position: l.position, uncertainty: 0.001 })),
      ...far.map((position) => ({ position, uncertainty: 0.001 })),
    ];
    const start: Numbering = new Map();
    lines.forEach((l, i) => {
      if (l.j <= 6) start.set(i, { branch: l.branch, j: l.j });
    });
    const out = extendByFit(peaks, start, cs.formula, reducedMass(cs), BAND10);
    expect(out.has(lines.length)).toBe(false);
    expect(out.has(lines.length + 1)).toBe(false);
    expect(out.size).toBe(lines.length);
  });
});

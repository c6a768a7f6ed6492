import { describe, expect, it } from 'vitest';
import type { Analysis } from '../../src/assign/analyse.js';
import type { PeakInput } from '../../src/assign/assign-lines.js';
import type { IdentificationCandidate } from '../../src/assign/identify.js';
import type { Branch } from '../../src/models/transitions.js';
import { type Check, checksWithoutFit, runChecks, type Tolerances, verdictOf } from '../../src/qa/checks.js';
import { parseSpecies } from '../../src/species/parse.js';

// Fast tests of the verdict logic of each QA check, on analyses built by hand (no assignment, no fit): the lines,
// bands, levels and statistics a fit would report, made from term values written out below. Every case is
// computed inside `it` (a mutation run switches mutants on per test).
//
// ¹²C¹⁶O X¹Σ⁺, Huber & Herzberg (1979): ω_e = 2169.81358, ω_e x_e = 13.28831, ω_e y_e = 0.010511 (from memory),
// B_e = 1.93128087, α_e = 0.01750441, D_e = 6.12147e-6 cm⁻¹. G(1) − G(0) = ω_e − 2ω_e x_e + 3.25 ω_e y_e
// = 2143.27112 cm⁻¹ (the measured band origin is 2143.2711 cm⁻¹, HITRAN, from memory), B₀ = B_e − α_e/2.
const CO = { we: 2169.81358, wexe: 13.28831, weye: 0.010511, Be: 1.93128087, ae: 0.01750441, De: 6.12147e-6 };
const ORIGIN_10 = 2169.81358 - 2 * 13.28831 + 3.25 * 0.010511;
const B0 = 1.93128087 - 0.01750441 / 2;
// ¹³C¹⁶O by Born–Oppenheimer scaling, ρ = √(μ(¹²C¹⁶O)/μ(¹³C¹⁶O)) with AME2020 masses (¹²C 12, ¹³C 13.00335483521,
// ¹⁶O 15.99491461926 u): ω ∝ ρ, ω_e x_e, B ∝ ρ², ω_e y_e, α ∝ ρ³, D ∝ ρ⁴.
const M12 = 12;
const M13 = 13.00335483521;
const M16 = 15.99491461926;
const RHO = Math.sqrt(((M12 * M16) / (M12 + M16)) * ((M13 + M16) / (M13 * M16)));
const C2 = 1.438776877; // second radiation constant hc/k, cm K (CODATA 2018)

type Constants = typeof CO;
const scaled = (c: Constants, rho: number): Constants => ({
  we: c.we * rho,
  wexe: c.wexe * rho ** 2,
  weye: c.weye * rho ** 3,
  Be: c.Be * rho ** 2,
  ae: c.ae * rho ** 3,
  De: c.De * rho ** 4,
});
const termOf = (c: Constants) => (v: number, J: number) => {
  const x = v + 0.5;
  const jj = J * (J + 1);
  return c.we * x - c.wexe * x * x + c.weye * x ** 3 + (c.Be - c.ae * x) * jj - c.De * jj * jj;
};
const upperJ = (branch: Branch, j: number) => (branch === 'R' ? j + 1 : branch === 'P' ? j - 1 : j);
// Absorption intensity of a ¹Σ–¹Σ line: ν S_J exp(−c₂E″/T)(1 − exp(−c₂ν/T)), S = J″ + 1 (R), J″ (P) (Bernath,
// Spectra of Atoms and Molecules, §6.5).
const lineIntensity = (nu: number, branch: Branch, j: number, lowerEnergy: number, T: number) =>
  nu * (branch === 'R' ? j + 1 : j) * Math.exp((-C2 * lowerEnergy) / T) * (1 - Math.exp((-C2 * nu) / T));

interface LineSpec {
  readonly species?: string;
  readonly band?: string;
  readonly branch: Branch;
  readonly j: number;
  readonly status?: 'fitted' | 'rejected' | 'unassigned';
  readonly position?: number;
  readonly intensity?: number;
  readonly uncertainty?: number;
}

const MAIN = '12C-16O';
const MINOR = '13C-16O';
const term12 = termOf(CO);
const term13 = termOf(scaled(CO, RHO));
const termFor = (species: string) => (species === MINOR ? term13 : term12);
const positionOf = (species: string, band: string, branch: Branch, j: number) => {
  const [u, l] = band.split('-').map(Number) as [number, number];
  return termFor(species)(u, upperJ(branch, j)) - termFor(species)(l, j);
};

/** The P(1…n) and R(0…n−1) lines of a band. */
const branches = (n: number, extra: Partial<LineSpec> = {}): LineSpec[] => [
  ...Array.from({ length: n }, (_, i) => ({ branch: 'P' as const, j: i + 1, ...extra })),
  ...Array.from({ length: n }, (_, i) => ({ branch: 'R' as const, j: i, ...extra })),
];

interface Built {
  readonly peaks: PeakInput[];
  readonly analysis: Analysis;
}

interface BuildOptions {
  readonly lines: readonly LineSpec[];
  readonly offset?: number;
  /** Relative scale error of the positions. */
  readonly scale?: number;
  readonly species?: readonly string[];
  readonly fittedSpecies?: readonly string[];
  readonly bands?: readonly { species: string; band: string; origin?: number; lines: number }[];
  readonly levels?: readonly { species: string; v: number; B: number; D?: number; H?: number }[];
  readonly statistics?: Partial<Analysis['result']['statistics']>;
  readonly scatter?: readonly { group: string; by: string; sigma: number }[];
  readonly identification?: readonly IdentificationCandidate[];
  readonly assignmentBands?: readonly {
    species: string;
    band: string;
    matched: number;
    bestOffset?: { offset: number; matches: number };
  }[];
  readonly method?: 'given' | 'reference' | 'structure';
  readonly warnings?: readonly { code: string; message: string }[];
}

/** A hand-built analysis: the lines as a fit would report them, and the peaks that were sent. */
function build(o: BuildOptions): Built {
  const peaks: PeakInput[] = [];
  const lines = o.lines.map((s, index) => {
    const species = s.species ?? MAIN;
    const band = s.band ?? '1-0';
    const exact = s.position ?? positionOf(species, band, s.branch, s.j);
    const position = exact * (1 + (o.scale ?? 0)) + (o.offset ?? 0);
    peaks.push({
      position,
      ...(s.uncertainty !== undefined ? { uncertainty: s.uncertainty } : {}),
      ...(s.intensity !== undefined ? { intensity: s.intensity } : {}),
    });
    const status = s.status ?? 'fitted';
    return {
      index,
      position,
      status,
      ...(status === 'unassigned' ? {} : { assignment: { band, branch: s.branch, j: s.j, species, source: 'auto' } }),
    };
  });
  const statistics = {
    lines: lines.length,
    assigned: lines.filter((l) => l.status !== 'unassigned').length,
    fitted: lines.filter((l) => l.status === 'fitted').length,
    rejected: lines.filter((l) => l.status === 'rejected').length,
    unassigned: lines.filter((l) => l.status === 'unassigned').length,
    parameters: 4,
    degreesOfFreedom: lines.length - 4,
    rms: 1e-3,
    reducedChiSquare: 1,
    conditionNumber: null,
    uncertaintyMode: 'absolute',
    ...o.statistics,
  };
  const species = o.species ?? [MAIN];
  const result = {
    species: (o.fittedSpecies ?? species).map((formula) => ({ formula, reducedMass: { value: 6.86, uncertainty: 0 } })),
    lines,
    bands: (o.bands ?? [{ species: MAIN, band: '1-0', origin: ORIGIN_10, lines: lines.length }]).map((b) => ({
      species: b.species,
      band: b.band,
      ...(b.origin !== undefined ? { origin: { value: b.origin, uncertainty: 1e-4, unit: 'cm-1' } } : {}),
      lines: b.lines,
      jRange: [0, 20],
    })),
    levels: (o.levels ?? [{ species: MAIN, v: 0, B: B0, D: CO.De }]).map((l) => ({
      species: l.species,
      v: l.v,
      B: { value: l.B, uncertainty: 1e-6, unit: 'cm-1' },
      ...(l.D !== undefined ? { D: { value: l.D, uncertainty: 1e-9, unit: 'cm-1' } } : {}),
      ...(l.H !== undefined ? { H: { value: l.H, uncertainty: 1e-12, unit: 'cm-1' } } : {}),
    })),
    statistics,
    warnings: o.warnings ?? [],
    ...(o.scatter ? { scatter: o.scatter } : {}),
  };
  const assignment = {
    method: o.method ?? 'given',
    species,
    identification: o.identification ?? [{ ...candidate(MAIN, 'carbon monoxide', 1) }],
    bands: o.assignmentBands ?? [],
    unexplained: [],
  };
  return { peaks, analysis: { result, assignment, notes: new Map() } as unknown as Analysis };
}

function candidate(species: string, name: string, score: number): IdentificationCandidate {
  return { species, name, score, matched: 10, predicted: 10, offset: 0 };
}

const byId = (checks: readonly Check[], id: string): Check => {
  const c = checks.find((x) => x.id === id);
  if (!c) throw new Error(`no check ${id}`);
  return c;
};
const run = (b: Built, tol: Partial<Tolerances> = {}, declared = parseSpecies(MAIN)) =>
  runChecks(b.peaks, declared, b.analysis, tol);
const check = (b: Built, id: string, tol: Partial<Tolerances> = {}) => byId(run(b, tol).checks, id);

describe('verdict of a report', () => {
  it('the worst status wins; checks not evaluated count as a pass', () => {
    const c = (status: Check['status']): Check => ({ id: 'identity', status, measured: {}, limit: {}, message: '' });
    expect(verdictOf([])).toBe('pass');
    expect(verdictOf([c('not-evaluated'), c('not-evaluated')])).toBe('pass');
    expect(verdictOf([c('not-evaluated'), c('pass')])).toBe('pass');
    expect(verdictOf([c('pass'), c('warn'), c('not-evaluated')])).toBe('warn');
    expect(verdictOf([c('warn'), c('fail'), c('pass')])).toBe('fail');
    expect(verdictOf([c('fail'), c('warn')])).toBe('fail');
  });
});

describe('identity', () => {
  it('the library origin and B₀ pass; the runner-up is another molecule, not an isotopologue of the fitted one', () => {
    const b = build({
      lines: branches(6, { uncertainty: 1e-3 }),
      identification: [
        candidate(MAIN, 'carbon monoxide', 0.9),
        candidate(MINOR, 'carbon monoxide (13C-16O)', 0.6),
        candidate('2H-35Cl', 'deuterium chloride', 0.2),
        candidate('1H-35Cl', 'hydrogen chloride', 0.1),
      ],
    });
    const c = check(b, 'identity');
    expect(c.status).toBe('pass');
    expect(c.limit).toEqual({ origin: 0.5, relativeB: 1e-3 });
    expect(c.measured.declared).toBe('12C-16O');
    expect(c.measured.fitted).toBe(MAIN);
    expect(c.measured.bestMatch).toBe(MAIN);
    expect(c.measured.bestScore).toBe(0.9);
    expect(c.measured.runnerUp).toBe('2H-35Cl');
    expect(c.measured.runnerUpScore).toBe(0.2);
    expect(c.measured.band).toBe('1-0');
    // The library holds the published constants: its origin and B₀ are those worked out above (1e-6, 1e-9).
    expect(Math.abs(c.measured.originDeviation as number)).toBeLessThan(1e-6);
    expect(Math.abs(c.measured.relativeBDeviation as number)).toBeLessThan(1e-9);
    expect(c.message).toBe('12C-16O agrees with the reference library; runner-up 2H-35Cl (score 0.20)');
  });

  it('a fit whose declared species matched no better than chance (ASSIGNMENT_NOT_BEYOND_CHANCE) fails, however well its origin agrees', () => {
    const message =
      '1 of the 25 strongest predicted lines of 12C-16O (J″ ≤ 12) find a line, no more than lines at random would';
    const b = build({
      lines: branches(6, { uncertainty: 1e-3 }),
      warnings: [{ code: 'ASSIGNMENT_NOT_BEYOND_CHANCE', message }],
    });
    const c = check(b, 'identity');
    expect(c.status).toBe('fail');
    expect(c.message).toBe(message);
    // Another warning leaves the identity to the origin and B″.
    expect(
      check(build({ lines: branches(6), warnings: [{ code: 'LINES_REJECTED', message: 'x' }] }), 'identity').status,
    ).toBe('pass');
  });

  it('no runner-up: the message ends with the agreement; no declared species gives null', () => {
    const b = build({ lines: branches(3), identification: [candidate(MAIN, 'carbon monoxide', 1)] });
    const report = runChecks(b.peaks, undefined, b.analysis);
    const c = byId(report.checks, 'identity');
    expect(c.message).toBe('12C-16O agrees with the reference library');
    expect(c.measured.declared).toBeNull();
    expect(c.measured.runnerUp).toBeNull();
    expect(c.measured.runnerUpScore).toBe(0);
  });

  it('origin off by 0.49 passes, 0.51 and 1.49 warn, 1.51 fails (limit 0.5, fail beyond 3×), with the message', () => {
    const at = (d: number) =>
      check(
        build({ lines: branches(3), bands: [{ species: MAIN, band: '1-0', origin: ORIGIN_10 + d, lines: 6 }] }),
        'identity',
      );
    expect(at(0.49).status).toBe('pass');
    expect(at(-0.49).status).toBe('pass');
    const warn = at(0.51);
    expect(warn.status).toBe('warn');
    expect(warn.message).toBe('band origin off by 0.510 cm-1 and B″ by 0 ppm from the reference');
    expect(Math.abs((warn.measured.originDeviation as number) - 0.51)).toBeLessThan(1e-6);
    expect(at(-1.49).status).toBe('warn');
    const fail = at(-1.51);
    expect(fail.status).toBe('fail');
    expect(fail.message).toBe('band origin off by -1.510 cm-1 and B″ by 0 ppm from the reference');
    // A tolerance of the caller's moves the limits: 0.51 passes at 0.6, fails at 0.15 (3 × 0.15 = 0.45).
    const bb = build({
      lines: branches(3),
      bands: [{ species: MAIN, band: '1-0', origin: ORIGIN_10 + 0.51, lines: 6 }],
    });
    expect(check(bb, 'identity', { identityOrigin: 0.6 }).status).toBe('pass');
    expect(check(bb, 'identity', { identityOrigin: 0.15 }).status).toBe('fail');
  });

  it('B″ off by 0.9e-3 passes, 1.1e-3 and 2.9e-3 warn, 3.1e-3 fails (limit 1e-3 relative), in ppm in the message', () => {
    const at = (rel: number) =>
      check(build({ lines: branches(3), levels: [{ species: MAIN, v: 0, B: B0 * (1 + rel) }] }), 'identity');
    expect(at(0.9e-3).status).toBe('pass');
    const warn = at(-1.1e-3);
    expect(warn.status).toBe('warn');
    expect(warn.message).toBe('band origin off by 0.000 cm-1 and B″ by -1100 ppm from the reference');
    expect(Math.abs((warn.measured.relativeBDeviation as number) + 1.1e-3)).toBeLessThan(1e-9);
    expect(at(2.9e-3).status).toBe('warn');
    expect(at(3.1e-3).status).toBe('fail');
    const fail = at(-3.1e-3);
    expect(fail.status).toBe('fail');
    expect(fail.message).toBe('band origin off by 0.000 cm-1 and B″ by -3100 ppm from the reference');
  });

  it('the main band is the one with most lines and an origin; its lower level gives B″ (a hot band 2-1 here)', () => {
    // 2-1 has more lines than 1-0; its origin G(2) − G(1) and B₁ = B_e − 1.5 α_e are the reference.
    const origin21 = CO.we - 4 * CO.wexe + (2.5 ** 3 - 1.5 ** 3) * CO.weye;
    const B1 = CO.Be - 1.5 * CO.ae;
    const lines = [...branches(3), ...branches(5, { band: '2-1' })];
    const b = build({
      lines,
      bands: [
        { species: MAIN, band: '1-0', origin: ORIGIN_10 + 2, lines: 6 },
        { species: MAIN, band: '2-1', origin: origin21, lines: 10 },
        { species: MAIN, band: '3-2', lines: 12 }, // no origin: not a candidate
        { species: MINOR, band: '1-0', origin: 2000, lines: 40 }, // another isotopologue
      ],
      levels: [
        { species: MAIN, v: 0, B: B0 * 1.01 },
        { species: MINOR, v: 1, B: 3 },
        { species: MAIN, v: 1, B: B1 },
      ],
    });
    const c = check(b, 'identity');
    expect(c.measured.band).toBe('2-1');
    expect(Math.abs(c.measured.originDeviation as number)).toBeLessThan(1e-6);
    expect(Math.abs(c.measured.relativeBDeviation as number)).toBeLessThan(1e-9);
    expect(c.status).toBe('pass');
  });

  it('no level for the main band: the deviations are not measured and the check passes on the ranking alone', () => {
    const b = build({ lines: branches(3), levels: [{ species: MAIN, v: 1, B: 1 }] });
    const c = check(b, 'identity');
    expect(c.status).toBe('pass');
    expect(c.measured.band).toBeUndefined();
    expect(c.measured.originDeviation).toBeUndefined();
  });

  it('another molecule ranked first with score ≥ 0.5 fails; below 0.5 the ranking is called inconclusive', () => {
    const with_ = (score: number) =>
      build({
        lines: branches(3),
        identification: [candidate('1H-35Cl', 'hydrogen chloride', score), candidate(MAIN, 'carbon monoxide', 0.3)],
      });
    const fail = check(with_(0.5), 'identity');
    expect(fail.status).toBe('fail');
    expect(fail.message).toBe('the lines match hydrogen chloride (score 0.50) better than the declared 12C-16O');
    expect(fail.measured.runnerUp).toBe('1H-35Cl');
    const weak = check(with_(0.49), 'identity');
    expect(weak.status).toBe('pass');
    expect(weak.message).toBe(
      '12C-16O agrees with the reference library (the ranking of the lines alone put 1H-35Cl first with score 0.49, below the 0.5 that names a species: not conclusive, and the fit to 12C-16O is what is judged)',
    );
    // An isotopologue of the fitted molecule ranked first is no rival: pass, no note.
    const iso = check(
      build({ lines: branches(3), identification: [candidate(MINOR, 'carbon monoxide (13C-16O)', 0.9)] }),
      'identity',
    );
    expect(iso.status).toBe('pass');
    expect(iso.message).toBe('12C-16O agrees with the reference library');
  });

  it('a wrong molecule and a deviating origin: fail with both problems in the message', () => {
    const b = build({
      lines: branches(3),
      bands: [{ species: MAIN, band: '1-0', origin: ORIGIN_10 + 0.7, lines: 6 }],
      identification: [candidate('1H-35Cl', 'hydrogen chloride', 0.8)],
    });
    const c = check(b, 'identity');
    expect(c.status).toBe('fail');
    expect(c.message).toBe(
      'the lines match hydrogen chloride (score 0.80) better than the declared 12C-16O; band origin off by 0.700 cm-1 and B″ by 0 ppm from the reference',
    );
  });

  it('a species without reference constants warns; no species at all is not evaluated', () => {
    // Carbon monosulfide is not in the library.
    const cs = build({
      lines: branches(3),
      species: ['12C-32S'],
      bands: [{ species: '12C-32S', band: '1-0', origin: 1272, lines: 6 }],
      levels: [{ species: '12C-32S', v: 0, B: 0.82 }],
      identification: [candidate('12C-32S', 'x', 0.1)],
    });
    const c = check(cs, 'identity');
    expect(c.status).toBe('warn');
    expect(c.message).toBe('12C-32S has no reference constants: identity rests on the band structure only');
    expect(check(cs, 'calibration').status).toBe('not-evaluated');
    expect(check(cs, 'calibration').message).toBe('12C-32S has no reference positions to calibrate against');
    const none = build({ lines: branches(3), species: [], fittedSpecies: [] });
    const n = check(none, 'identity');
    expect([n.status, n.message]).toEqual(['not-evaluated', 'no species was fitted']);
    expect(n.measured).toEqual({});
    expect(check(none, 'calibration').message).toBe('no species was fitted');
    // The fitted species stands in when the assignment names none.
    const fittedOnly = build({ lines: branches(3), species: [], fittedSpecies: [MAIN] });
    expect(check(fittedOnly, 'identity').measured.fitted).toBe(MAIN);
  });

  it('limits are exclusive: a deviation exactly at the limit passes, exactly at three times it warns', () => {
    // The deviations as the check computes them, then tolerances that put them exactly on the boundaries.
    const b = build({ lines: branches(3), bands: [{ species: MAIN, band: '1-0', origin: ORIGIN_10 + 0.6, lines: 6 }] });
    const d = Math.abs(check(b, 'identity').measured.originDeviation as number);
    expect(check(b, 'identity', { identityOrigin: d }).status).toBe('pass');
    const third = d / 3;
    expect(3 * third).toBe(d); // the boundary is hit exactly in floating point
    expect(check(b, 'identity', { identityOrigin: third }).status).toBe('warn');
    const bB = build({ lines: branches(3), levels: [{ species: MAIN, v: 0, B: B0 * (1 + 1.5e-3) }] });
    const dB = Math.abs(check(bB, 'identity').measured.relativeBDeviation as number);
    expect(check(bB, 'identity', { identityB: dB }).status).toBe('pass');
    const thirdB = dB / 3;
    expect(3 * thirdB).toBe(dB);
    expect(check(bB, 'identity', { identityB: thirdB }).status).toBe('warn');
  });

  it('an empty ranking: no best match, score 0; hydrogen isotopes make different molecules (DCl is not HCl)', () => {
    const empty = check(build({ lines: branches(3), identification: [] }), 'identity');
    expect([empty.measured.bestMatch, empty.measured.bestScore, empty.measured.runnerUp]).toEqual([null, 0, null]);
    expect(empty.status).toBe('pass');
    const hcl = (best: IdentificationCandidate) =>
      check(
        build({
          lines: branches(3),
          species: ['1H-35Cl'],
          bands: [{ species: '1H-35Cl', band: '1-0', lines: 6 }],
          identification: [best],
        }),
        'identity',
      );
    const dcl = hcl(candidate('2H-35Cl', 'deuterium chloride', 0.8));
    expect(dcl.status).toBe('fail');
    expect(dcl.message).toBe('the lines match deuterium chloride (score 0.80) better than the declared 1H-35Cl');
    expect(dcl.measured.runnerUp).toBe('2H-35Cl');
    // H³⁷Cl is the same molecule as H³⁵Cl: no rival.
    const h37 = hcl(candidate('1H-37Cl', 'hydrogen chloride (1H-37Cl)', 0.8));
    expect(h37.status).toBe('pass');
    expect(h37.measured.runnerUp).toBeNull();
  });

  it('without an identification from the assignment, the lines are ranked here (CO lines: carbon monoxide first)', () => {
    const b = build({ lines: branches(12) });
    const analysis = {
      ...b.analysis,
      assignment: { ...b.analysis.assignment, identification: undefined },
    } as unknown as Analysis;
    const c = byId(runChecks(b.peaks, undefined, analysis).checks, 'identity');
    expect(c.measured.bestMatch).toBe(MAIN);
    expect(c.measured.bestScore as number).toBeGreaterThan(0.5);
    expect(c.status).toBe('pass');
  });
});

describe('calibration', () => {
  const lines = branches(12, { uncertainty: 1e-3 });

  it('exact positions pass within limits; the lines counted are the fitted ones of the main species with J″ ≤ 20', () => {
    const b = build({
      lines: [
        ...lines,
        { branch: 'R', j: 20, uncertainty: 1e-3 }, // J″ = 20: counted
        { branch: 'R', j: 21, uncertainty: 1e-3 }, // J″ = 21: left out
        { branch: 'P', j: 3, status: 'rejected', uncertainty: 1e-3, position: 2000 },
        { branch: 'P', j: 3, status: 'unassigned', uncertainty: 1e-3, position: 2001 },
        { branch: 'P', j: 3, species: MINOR, uncertainty: 1e-3, position: 2002 },
      ],
    });
    const c = check(b, 'calibration');
    expect(c.status).toBe('pass');
    expect(c.measured.lines).toBe(25);
    const off = c.measured.offset as { value: number; uncertainty: number };
    expect(Math.abs(off.value)).toBeLessThan(1e-6);
    expect(c.limit).toEqual({ offset: 0.05, scalePpm: 20, guardBand: '2u (k = 2)' });
    expect(c.message).toMatch(/^offset .* cm-1 at 21\d\d\.\d cm-1 \(the weighted centre of 25 lines with J″ ≤ 20, /);
    expect(c.message).toMatch(/, which leaves them out\): within limits \(library prediction uncertainty included: /);
    expect(c.message).toMatch(
      /; the scale is not determined by these lines \(σ would be \d+ ppm, more than a third of the 20 ppm limit\) and is not judged$/,
    );
    expect(c.measured.scaleUncertaintyIfFitted as number).toBeGreaterThan(20 / 3);
    expect(c.measured.scale).toBeUndefined();
    expect(c.measured.reference).toBe('reference-library positions of 12C-16O');
  });

  it('a Q line is read with J′ = J″ (a line with J′ = J″ ± 1 would be 2B J off): its offset is 0', () => {
    const b = build({
      lines: [...lines, { branch: 'Q', j: 5, uncertainty: 1e-3 }, { branch: 'Q', j: 9, uncertainty: 1e-3 }],
    });
    const c = check(b, 'calibration');
    expect(c.measured.lines).toBe(26);
    expect(Math.abs((c.measured.offset as { value: number }).value)).toBeLessThan(1e-6);
  });

  it('an offset of 0.2 cm⁻¹ fails, 0.06 with a tolerance of 0.059 + u warns, 0.03 passes', () => {
    const fail = check(build({ lines, offset: 0.2 }), 'calibration');
    expect(fail.status).toBe('fail');
    const o = fail.measured.offset as { value: number; uncertainty: number };
    expect(Math.abs(o.value - 0.2)).toBeLessThan(1e-5);
    expect(fail.message).toMatch(
      / against limits 0\.05 cm-1 and 20 ppm \(beyond the limit by more than the 2σ guard band\)/,
    );
    // u of the offset: σ/√n for 24 lines of σ 1e-3 if the offset alone were fitted; more with the library's missing
    // terms carried (priors): between 2e-4 and 2e-3.
    expect(o.uncertainty).toBeGreaterThan(1e-3 / Math.sqrt(24));
    expect(o.uncertainty).toBeLessThan(2e-3);
    // Beyond the limit by less than 2u: warn.
    const warn = check(build({ lines, offset: 0.2 }), 'calibration', { calibrationOffset: 0.2 - o.uncertainty });
    expect(warn.status).toBe('warn');
    expect(warn.message).toMatch(/\(beyond the limit, but by less than the 2σ guard band: not significant\)/);
    expect(
      check(build({ lines, offset: 0.2 }), 'calibration', { calibrationOffset: 0.2 - 3 * o.uncertainty }).status,
    ).toBe('fail');
    expect(check(build({ lines, offset: 0.03 }), 'calibration').status).toBe('pass');
  });

  it('beyond the limit but within 2.576u of zero with u ≤ L: pass; with u > L: inconclusive, a warning', () => {
    // σ = 0.05 per line; u read from a run without offset, then L = 1.1u and an offset of 2u: beyond L, within 2.576u.
    const lines05 = branches(12, { uncertainty: 0.05 });
    const u = (check(build({ lines: lines05 }), 'calibration').measured.offset as { uncertainty: number }).uncertainty;
    const b = build({ lines: lines05, offset: 2 * u });
    const c = check(b, 'calibration', { calibrationOffset: 1.1 * u });
    expect(c.status).toBe('pass');
    expect(c.message).toMatch(
      /: beyond the limits \(\S+ cm-1, 20 ppm\) but not different from zero at the 1 % false-alarm level \(\|x\| ≤ 2\.576u\): the lines cannot tell it from a calibrated scan/,
    );
    // The same offset against a limit below u: the lines cannot judge it, a warning that says so.
    const w = check(b, 'calibration', { calibrationOffset: 0.9 * u });
    expect(w.status).toBe('warn');
    expect(w.message).toMatch(
      /\(inconclusive: the lines determine the offset only to ±\S+ cm-1, more than the limit itself; check the stated uncertainties\)/,
    );
  });

  it('the σ of a line: given (× √(χ²/ν) in a-posteriori mode when above 1), else its band scatter, pooled scatter, rms', () => {
    const u = (b: Built) => (check(b, 'calibration').measured.offset as { uncertainty: number }).uncertainty;
    const given = u(build({ lines }));
    // Inflation by √4 = 2 when χ²/ν = 4 a posteriori; below 1 a shrink by √(χ²/ν) only on ≥ 10 degrees of
    // freedom (as the fit does), none in absolute mode, none with a scatter.
    const inflated = u(build({ lines, statistics: { uncertaintyMode: 'a-posteriori', reducedChiSquare: 4 } }));
    // (Not 2: the priors of the library's missing terms and the library's own σ do not scale with the lines' σ;
    // measured 1.70 with the missing terms alone, 1.22 since the library's constants carry 30 units of their last
    // digit, src/qa/library-uncertainty.ts.)
    expect(inflated / given).toBeGreaterThan(1.15);
    const shrunk = u(build({ lines, statistics: { uncertaintyMode: 'a-posteriori', reducedChiSquare: 0.25 } }));
    // ν = 20: σ halved (measured ratio 0.72 with the missing terms alone, 0.94 with the library's own σ as well)
    expect(shrunk / given).toBeLessThan(0.95);
    expect(
      u(
        build({ lines, statistics: { uncertaintyMode: 'a-posteriori', reducedChiSquare: 0.25, degreesOfFreedom: 9 } }),
      ) / given,
    ).toBeCloseTo(1, 6);
    expect(u(build({ lines, statistics: { uncertaintyMode: 'absolute', reducedChiSquare: 4 } })) / given).toBeCloseTo(
      1,
      6,
    );
    expect(
      u(
        build({
          lines,
          statistics: { uncertaintyMode: 'a-posteriori', reducedChiSquare: 4 },
          scatter: [{ group: 'other', by: 'band', sigma: 1 }],
        }),
      ) / given,
    ).toBeCloseTo(1, 6);
    expect(
      u(build({ lines, statistics: { uncertaintyMode: 'a-posteriori', reducedChiSquare: null } })) / given,
    ).toBeCloseTo(1, 6);
    // Without given σ: the band's scatter, else the pooled one, else the rms (floored at 1e-9).
    const bare = branches(12);
    const σ1e3 = u(build({ lines: bare, statistics: { rms: 1e-3 } }));
    expect(σ1e3 / given).toBeCloseTo(1, 6);
    const band = u(
      build({
        lines: bare,
        scatter: [
          { group: '12C-16O 2-0', by: 'band', sigma: 1 },
          { group: '12C-16O 1-0', by: 'band', sigma: 1e-3 },
          { group: 'all', by: 'pooled', sigma: 1 },
        ],
        statistics: { rms: 1 },
      }),
    );
    expect(band / given).toBeCloseTo(1, 6);
    const pooled = u(
      build({ lines: bare, scatter: [{ group: 'all', by: 'pooled', sigma: 1e-3 }], statistics: { rms: 1 } }),
    );
    expect(pooled / given).toBeCloseTo(1, 6);
    const floor = u(build({ lines: bare, statistics: { rms: 0 } }));
    expect(floor).toBeGreaterThan(0);
    // (The library's missing terms and its own σ keep u finite: 7.2e-4 against 7.9e-4 with σ = 1e-3, measured; 2.3e-4
    // against 4.0e-4 with the missing terms alone.)
    expect(floor).toBeLessThan(0.95 * given);
  });

  it('an offset exactly at the limit is within it (not "beyond"); a scatter of another band falls back to the rms', () => {
    const b = build({ lines, offset: 0.03 });
    const x = Math.abs((check(b, 'calibration').measured.offset as { value: number }).value);
    const at = check(b, 'calibration', { calibrationOffset: x });
    expect(at.status).toBe('pass');
    expect(at.message).toMatch(/: within limits/);
    // No σ given, a scatter only for another band and no pooled one: the rms (1e-3) is the σ.
    const u = (bb: Built) => (check(bb, 'calibration').measured.offset as { uncertainty: number }).uncertainty;
    const bare = branches(12);
    const viaRms = u(
      build({ lines: bare, scatter: [{ group: '12C-16O 2-0', by: 'band', sigma: 1 }], statistics: { rms: 1e-3 } }),
    );
    expect(viaRms / u(build({ lines }))).toBeCloseTo(1, 6);
  });

  it('fewer than three usable lines: not evaluated, with the reason', () => {
    const c = check(
      build({
        lines: [
          { branch: 'R', j: 0 },
          { branch: 'R', j: 1 },
          { branch: 'R', j: 25 },
        ],
      }),
      'calibration',
    );
    expect(c.status).toBe('not-evaluated');
    expect(c.message).toBe('fewer than three fitted lines of the main species with J″ ≤ 20');
  });

  it('a fundamental with its overtone determines the scale: 100 ppm fails on the scale, 0 passes; the library terms are named', () => {
    const two = [...branches(12, { uncertainty: 1e-4 }), ...branches(12, { uncertainty: 1e-4, band: '2-0' })];
    const ok = check(build({ lines: two }), 'calibration');
    expect(ok.status).toBe('pass');
    const s = ok.measured.scale as { value: number; uncertainty: number };
    expect(Math.abs(s.value)).toBeLessThan(1);
    expect(s.uncertainty).toBeLessThan(20 / 3);
    expect('scaleUncertaintyIfFitted' in ok.measured).toBe(false);
    expect(ok.message).toMatch(
      /, scale .* ppm: within limits \(library prediction uncertainty included: .* missing from the library, carried with priors\)$/,
    );
    // CO's library lacks ω_e z_e (next to ω_e y_e), γ_e, β_e and H_e (from D_e): four terms, named with commas.
    const carried = ok.measured.libraryTermsCarried as string[];
    expect(carried).toEqual(['ω_e z_e', 'γ_e', 'β_e', 'H_e']);
    expect(ok.message).toContain(
      `(library prediction uncertainty included: ${carried.join(', ')} missing from the library`,
    );
    const bad = check(build({ lines: two, scale: 100e-6 }), 'calibration');
    expect(bad.status).toBe('fail');
    expect(Math.abs((bad.measured.scale as { value: number }).value - 100)).toBeLessThan(2);
    // A pure scale error s shifts the weighted centre c by s·c: the offset there is 1e-4 c (±0.01 cm⁻¹).
    const centre = bad.measured.centre as number;
    expect(Math.abs((bad.measured.offset as { value: number }).value - 1e-4 * centre)).toBeLessThan(0.01);
    // A warned scale with a passing offset: warn (the worse of the two).
    const sw = bad.measured.scale as { value: number; uncertainty: number };
    const warn = check(build({ lines: two, scale: 100e-6 }), 'calibration', {
      calibrationScalePpm: Math.abs(sw.value) - sw.uncertainty,
      calibrationOffset: 1,
    });
    expect(warn.status).toBe('warn');
  });
});

// H³⁵Cl X¹Σ⁺, Huber & Herzberg (1979): ω_e = 2990.9463, ω_e x_e = 52.8186, ω_e y_e = 0.2243, ω_e z_e = −0.0122
// (from memory), B_e = 10.593416, α_e = 0.307181, D_e = 5.3194e-4 cm⁻¹: G(1) − G(0) = 2885.977 cm⁻¹.
const HCL = { we: 2990.9463, wexe: 52.8186, weye: 0.2243, Be: 10.593416, ae: 0.307181, De: 5.3194e-4 };
const hclLine = (branch: Branch, j: number) =>
  termOf(HCL)(1, upperJ(branch, j)) - termOf(HCL)(0, j) - 0.0122 * (1.5 ** 4 - 0.5 ** 4);

describe('unexplained lines', () => {
  // 20 assigned lines with intensities of a 296 K gas scaled to sum to 95, and unassigned lines sharing the rest
  // (intensities all alike would be ignored as uninformative, and the share taken by line count).
  const assigned = () => {
    const ls = branches(10).map((l) => ({
      ...l,
      intensity: lineIntensity(
        positionOf(MAIN, '1-0', l.branch, l.j),
        l.branch,
        l.j,
        term12(0, l.j) - term12(0, 0),
        296,
      ),
    }));
    const sum = ls.reduce((a, l) => a + l.intensity, 0);
    return ls.map((l) => ({ ...l, intensity: (95 * l.intensity) / sum }));
  };
  const withShare = (unassigned: readonly number[], extra: Partial<BuildOptions> = {}) =>
    build({
      lines: [
        ...assigned(),
        ...unassigned.map((intensity, i) => ({
          branch: 'R' as const,
          j: 0,
          status: 'unassigned' as const,
          position: 2300 + 7.3 * i,
          intensity,
        })),
      ],
      ...extra,
    });

  it('by intensity: 2 % passes, 2.5 % passes, 3 % warns, 5 % warns, 6 % fails (limit 5 %, warn above half)', () => {
    const at = (part: number) => {
      // 95 assigned + part unassigned of a total 95 + part: a share part/(95 + part).
      const c = check(withShare([part]), 'unexplained-lines');
      return c;
    };
    const share = (s: number) => (95 * s) / (1 - s);
    const pass = at(share(0.02));
    expect(pass.status).toBe('pass');
    expect(pass.measured.basis).toBe('intensity');
    expect(pass.measured.count).toBe(1);
    expect(Math.abs((pass.measured.fraction as number) - 0.02)).toBeLessThan(1e-12);
    expect(pass.measured.positions).toEqual([2300]);
    expect(pass.message).toBe('1 line(s), 2.0 % of the intensity, are explained by no band');
    expect(pass.limit).toEqual({ fraction: 0.05, linesMatchingAMissedBand: 4 });
    expect(at(share(0.024)).status).toBe('pass');
    expect(at(share(0.026)).status).toBe('warn');
    expect(at(share(0.049)).status).toBe('warn');
    const fail = at(share(0.06));
    expect(fail.status).toBe('fail');
    expect(fail.message).toBe('1 line(s), 6.0 % of the intensity, are explained by no band');
  });

  it('limits are exclusive: 1 line of 20 (5 %) warns, 1 of 40 (2.5 %) passes; a line of intensity 0 keeps the intensity basis', () => {
    const count = (assigned: number) =>
      check(
        build({
          lines: [
            ...Array.from({ length: assigned }, (_, i) => ({ branch: 'R' as const, j: i })),
            { branch: 'R', j: 0, status: 'unassigned', position: 2300 },
          ],
        }),
        'unexplained-lines',
      );
    expect(count(19).status).toBe('warn');
    expect(count(19).measured.fraction).toBe(0.05);
    expect(count(39).status).toBe('pass');
    const zero = check(withShare([0]), 'unexplained-lines');
    expect(zero.measured.basis).toBe('intensity');
    expect([zero.status, zero.measured.fraction]).toEqual(['pass', 0]);
    // No lines at all: a share of 0, not NaN.
    const empty = check(build({ lines: [] }), 'unexplained-lines');
    expect([empty.measured.count, empty.measured.fraction, empty.status]).toEqual([0, 0, 'pass']);
  });

  it('five or more unexplained lines another molecule explains are named as a possible impurity; four are not', () => {
    const hcl = (n: number) =>
      build({
        lines: [
          ...branches(10),
          ...branches(6)
            .slice(0, n)
            .map((l) => ({ ...l, status: 'unassigned' as const, position: hclLine(l.branch, l.j) })),
        ],
      });
    const c = check(hcl(12), 'unexplained-lines');
    const by = c.measured.explainedBy as { species: string; name: string; score: number }[];
    expect(by.map((x) => [x.species, x.name])).toEqual([['1H-35Cl', 'hydrogen chloride']]);
    expect(by[0]?.score as number).toBeGreaterThanOrEqual(0.3);
    expect(Object.keys(by[0] as object).sort()).toEqual(['name', 'score', 'species']);
    expect(c.message).toBe(
      '12 line(s), 37.5 % of the lines, are explained by no band; they would fit hydrogen chloride (a possible impurity)',
    );
    const five = check(hcl(5), 'unexplained-lines');
    expect((five.measured.explainedBy as unknown[]).length).toBeGreaterThan(0);
    const four = check(hcl(4), 'unexplained-lines');
    expect(four.measured.explainedBy).toEqual([]);
    expect(four.message).toBe('4 line(s), 16.7 % of the lines, are explained by no band');
  });

  it('by line count when an intensity is missing or negative, or all are 0', () => {
    // 1 unassigned of 21 lines: 4.8 %, a warning.
    const missing = build({
      lines: [...branches(10), { branch: 'R', j: 0, status: 'unassigned', position: 2300, intensity: 5 }],
    });
    const c = check(missing, 'unexplained-lines');
    expect(c.measured.basis).toBe('line count');
    expect(c.measured.fraction).toBeCloseTo(1 / 21, 12);
    expect(c.status).toBe('warn');
    expect(c.message).toBe('1 line(s), 4.8 % of the lines, are explained by no band');
    const zeros = withShare([0]);
    const z = {
      ...zeros,
      peaks: zeros.peaks.map((p) => ({ ...p, intensity: 0 })),
    };
    expect(check(z, 'unexplained-lines').measured.basis).toBe('line count');
    const negative = withShare([-1]);
    expect(check(negative, 'unexplained-lines').measured.basis).toBe('line count');
    // All lines explained: 0 %, pass.
    const clean = check(build({ lines: branches(10) }), 'unexplained-lines');
    expect([clean.status, clean.measured.count, clean.measured.fraction]).toEqual(['pass', 0, 0]);
  });

  it('a band the library predicts but the assignment missed, matching ≥ 4 unexplained lines at its best offset, warns', () => {
    const band = { species: MAIN, band: '2-0', matched: 0, bestOffset: { offset: 0.3, matches: 4 } };
    const four = withShare([0.1, 0.1, 0.1, 0.1], { assignmentBands: [band] });
    const c = check(four, 'unexplained-lines');
    expect(c.status).toBe('warn');
    expect(c.measured.bandsNotMatched).toEqual([{ species: MAIN, band: '2-0', offset: 0.3, matches: 4 }]);
    expect(c.message).toBe(
      '4 line(s), 0.4 % of the intensity, are explained by no band; 4 of them would match 12C-16O band 2-0 at its best offset +0.300 cm-1, a band the library predicts in the window that was not found (see BAND_NOT_FOUND): a weak share of the intensity is no proof the lines are noise',
    );
    // A negative offset is printed with its sign.
    const neg = check(
      withShare([0.1, 0.1, 0.1, 0.1], { assignmentBands: [{ ...band, bestOffset: { offset: -0.25, matches: 6 } }] }),
      'unexplained-lines',
    );
    expect(neg.message).toMatch(/; 6 of them would match 12C-16O band 2-0 at its best offset -0\.250 cm-1,/);
    // Three unexplained lines, or three matches, or as many matched as at the best offset: no warning.
    expect(check(withShare([0.1, 0.1, 0.1], { assignmentBands: [band] }), 'unexplained-lines').status).toBe('pass');
    const three = { ...band, bestOffset: { offset: 0.3, matches: 3 } };
    expect(check(withShare([0.1, 0.1, 0.1, 0.1], { assignmentBands: [three] }), 'unexplained-lines').status).toBe(
      'pass',
    );
    const found = { ...band, matched: 4 };
    expect(check(withShare([0.1, 0.1, 0.1, 0.1], { assignmentBands: [found] }), 'unexplained-lines').status).toBe(
      'pass',
    );
    const noOffset = { species: MAIN, band: '2-0', matched: 0 };
    expect(check(withShare([0.1, 0.1, 0.1, 0.1], { assignmentBands: [noOffset] }), 'unexplained-lines').status).toBe(
      'pass',
    );
    // An offset of exactly 0 is printed as +0.000; two missed bands are both named, one after the other.
    const two = check(
      withShare([0.1, 0.1, 0.1, 0.1], {
        assignmentBands: [
          { ...band, bestOffset: { offset: 0, matches: 4 } },
          { species: MAIN, band: '3-0', matched: 1, bestOffset: { offset: 0.125, matches: 5 } },
        ],
      }),
      'unexplained-lines',
    );
    const tail =
      ', a band the library predicts in the window that was not found (see BAND_NOT_FOUND): a weak share of the intensity is no proof the lines are noise';
    expect(two.message).toBe(
      `4 line(s), 0.4 % of the intensity, are explained by no band; 4 of them would match 12C-16O band 2-0 at its best offset +0.000 cm-1${tail}; 5 of them would match 12C-16O band 3-0 at its best offset +0.125 cm-1${tail}`,
    );
    // A share that fails already stays a failure.
    expect(check(withShare([3, 3, 0.1, 0.1], { assignmentBands: [band] }), 'unexplained-lines').status).toBe('fail');
  });

  it('unexplained ¹³C¹⁶O lines in a list assigned as ¹²C¹⁶O alone name the isotopologue and the molecule to declare', () => {
    const minor = branches(6).map((l) => ({
      ...l,
      status: 'unassigned' as const,
      position: positionOf(MINOR, '1-0', l.branch, l.j),
    }));
    const b = build({ lines: [...branches(10), ...minor] });
    const c = check(b, 'unexplained-lines');
    expect(c.measured.count).toBe(12);
    const by = c.measured.explainedBy as { species: string; score: number }[];
    expect(by.map((x) => x.species)).toContain(MINOR);
    for (const x of by) expect(x.score).toBeGreaterThanOrEqual(0.3);
    expect(c.message).toMatch(
      /; they would fit .*\(another isotopologue than the one assigned against: declare the molecule, "CO", to assign every isotopologue\)/,
    );
    expect(c.status).toBe('fail'); // 12 of 32 lines
    // Assigned against both: the minor isotopologue is not offered again.
    const both = check(build({ lines: [...branches(10), ...minor], species: [MAIN, MINOR] }), 'unexplained-lines');
    expect((both.measured.explainedBy as { species: string }[]).map((x) => x.species)).not.toContain(MINOR);
  });
});

describe('isotope ratio', () => {
  const T = 296;
  const natural = 0.988922 / 0.011078; // ¹²C/¹³C, CIAAW 2013 best measurement (0.988922, 0.011078), from memory
  const energy12 = (j: number) => term12(0, j) - term12(0, 0);
  const energy13 = (j: number) => term13(0, j) - term13(0, 0);
  /** Pairs of lines: the minor's intensity `factor × factors[i]` times the natural share, relative to the main's. */
  const pairs = (factor: number, jitter: readonly number[]) => {
    const out: LineSpec[] = [];
    jitter.forEach((x, i) => {
      const branch: Branch = i % 2 === 0 ? 'R' : 'P';
      const j = 2 + i;
      const nu12 = positionOf(MAIN, '1-0', branch, j);
      const nu13 = positionOf(MINOR, '1-0', branch, j);
      const i12 = 100 * lineIntensity(nu12, branch, j, energy12(j), T);
      const i13 = ((100 * factor * x) / natural) * lineIntensity(nu13, branch, j, energy13(j), T);
      out.push({ branch, j, intensity: i12 }, { branch, j, species: MINOR, intensity: i13 });
    });
    return out;
  };
  const built = (factor: number, jitter: readonly number[], extra: Partial<BuildOptions> = {}) =>
    build({ lines: pairs(factor, jitter), species: [MAIN, MINOR], ...extra });

  it('natural composition: factor 1, abundance ratio 89.27 (CIAAW), pass; the message carries both (1e-3)', () => {
    // Ratios jittered by ×1.02 and ÷1.02: ln = ±ln 1.02, mean 0, sd = ln 1.02 · √(4/3), σ = sd/√4.
    const c = check(built(1, [1.02, 1 / 1.02, 1.02, 1 / 1.02]), 'isotope-ratio');
    const sigma = (Math.log(1.02) * Math.sqrt(4 / 3)) / 2;
    expect(c.status).toBe('pass');
    const r = (c.measured.ratios as Record<string, unknown>[])[0] as {
      species: string;
      relativeToNatural: { value: number; uncertainty: number; unit: string };
      naturalAbundance: number;
      pairs: number;
      abundanceRatio: { ratio: string; value: number; uncertainty: number; natural: number; unit: string };
    };
    expect(r.species).toBe(MINOR);
    expect(Math.abs(r.relativeToNatural.value - 1)).toBeLessThan(1e-3);
    expect(Math.abs(r.relativeToNatural.uncertainty - sigma)).toBeLessThan(1e-4);
    expect(r.relativeToNatural.unit).toBe('1');
    expect(r.abundanceRatio.unit).toBe('1');
    expect(Math.abs(r.abundanceRatio.uncertainty / r.abundanceRatio.value - sigma)).toBeLessThan(1e-4);
    expect(r.pairs).toBe(4);
    expect(Math.abs(r.naturalAbundance - 0.011078 * 0.99757) / r.naturalAbundance).toBeLessThan(1e-4); // ¹⁶O 0.99757
    expect(r.abundanceRatio.ratio).toBe('12C-16O/13C-16O');
    expect(Math.abs(r.abundanceRatio.natural / natural - 1)).toBeLessThan(1e-4);
    expect(Math.abs(r.abundanceRatio.value / natural - 1)).toBeLessThan(1e-3);
    expect(c.limit).toEqual({ relative: 0.15 });
    expect(c.message).toMatch(
      /^13C-16O: 12C-16O\/13C-16O = 89\.2\d\d ± 1\.0[12]\d \(natural 89\.269\), 1\.000 ± 0\.011 of the natural abundance ratio \(4 line pairs\)$/,
    );
  });

  it('a sample 20 % richer in ¹³C warns, 10 % passes; σ = factor·sd(ln)/√n of the pairs worked out by hand', () => {
    const rich = check(built(1.2, [1, 1, 1]), 'isotope-ratio');
    expect(rich.status).toBe('warn');
    expect(rich.message).toMatch(/ — isotopic composition differs from natural \(enriched or depleted sample\?\)$/);
    expect(check(built(0.9, [1, 1, 1]), 'isotope-ratio').status).toBe('pass');
    expect(check(built(0.84, [1, 1, 1]), 'isotope-ratio').status).toBe('warn');
    // ln factors ln 1.1, 0, ln(1/1.1) around 0: mean 0, sd = ln 1.1 · √(2/2) = ln 1.1, σ = sd/√3.
    const c = check(built(1, [1.1, 1, 1 / 1.1]), 'isotope-ratio');
    const r = (c.measured.ratios as { relativeToNatural: { value: number; uncertainty: number } }[])[0];
    expect(Math.abs((r?.relativeToNatural.value ?? 0) - 1)).toBeLessThan(1e-3);
    expect(Math.abs((r?.relativeToNatural.uncertainty ?? 0) - Math.log(1.1) / Math.sqrt(3))).toBeLessThan(1e-4);
  });

  it('a factor 1.2 with jitter ×1.05, ×1, ×1.1: mean and sd of the ln-ratios by hand; abundance ratio natural/1.2', () => {
    // ln f_i = ln 1.2 + (ln 1.05, 0, ln 1.1): mean m = ln 1.2 + (ln 1.05 + ln 1.1)/3, factor e^m,
    // sd = √(Σ(x − x̄)²/2), σ(factor) = e^m sd/√3; abundance ratio = natural/e^m with the same relative σ.
    const c = check(built(1.2, [1.05, 1, 1.1]), 'isotope-ratio');
    const xs = [Math.log(1.05), 0, Math.log(1.1)];
    const mean = xs.reduce((t, x) => t + x, 0) / 3;
    const sd = Math.sqrt(xs.reduce((t, x) => t + (x - mean) ** 2, 0) / 2);
    const factor = 1.2 * Math.exp(mean);
    const r = (c.measured.ratios as Record<string, unknown>[])[0] as {
      relativeToNatural: { value: number; uncertainty: number };
      abundanceRatio: { value: number; uncertainty: number };
    };
    expect(Math.abs(r.relativeToNatural.value / factor - 1)).toBeLessThan(1e-3);
    expect(Math.abs(r.relativeToNatural.uncertainty / ((factor * sd) / Math.sqrt(3)) - 1)).toBeLessThan(1e-3);
    expect(Math.abs(r.abundanceRatio.value / (natural / factor) - 1)).toBeLessThan(1e-3);
    expect(Math.abs(r.abundanceRatio.uncertainty / ((natural / factor) * (sd / Math.sqrt(3))) - 1)).toBeLessThan(1e-3);
    expect(c.status).toBe('warn');
  });

  it('not evaluated: one isotopologue, no intensities, flat intensities, fewer than three pairs', () => {
    const one = check(build({ lines: branches(3, { intensity: 1 }) }), 'isotope-ratio');
    expect([one.status, one.message]).toEqual(['not-evaluated', 'only one isotopologue was assigned against']);
    const bare = build({ lines: pairs(1, [1, 1, 1]).map(({ intensity: _, ...l }) => l), species: [MAIN, MINOR] });
    expect(check(bare, 'isotope-ratio').message).toBe('the lines carry no intensities');
    expect(check(bare, 'temperature').message).toBe('the lines carry no intensities');
    const flat = build({ lines: pairs(1, [1, 1, 1]).map((l) => ({ ...l, intensity: 7 })), species: [MAIN, MINOR] });
    expect(check(flat, 'isotope-ratio').message).toMatch(
      /^intensities ignored: every line carries the same intensity \(7\)$/,
    );
    const two = check(built(1, [1, 1]), 'isotope-ratio');
    expect(two.message).toBe('fewer than three transitions were assigned in both isotopologues');
    // A pair with a zero intensity does not count.
    const lines = pairs(1, [1, 1, 1]);
    const zeroed = lines.map((l, i) => (i === 1 ? { ...l, intensity: 0 } : l));
    expect(check(build({ lines: zeroed, species: [MAIN, MINOR] }), 'isotope-ratio').status).toBe('not-evaluated');
    // Rejected lines do not pair.
    const rejected = lines.map((l, i) => (i === 3 ? { ...l, status: 'rejected' as const } : l));
    expect(check(build({ lines: rejected, species: [MAIN, MINOR] }), 'isotope-ratio').status).toBe('not-evaluated');
  });
});

describe('temperature', () => {
  const energy = (j: number) => term12(0, j) - term12(0, 0);
  /** The 1-0 lines with intensities of a gas at T (arbitrary overall scale). */
  const atT = (T: number, extra: Partial<BuildOptions> = {}) =>
    build({
      lines: branches(12).map((l) => {
        const nu = positionOf(MAIN, '1-0', l.branch, l.j);
        return { ...l, intensity: 1e3 * lineIntensity(nu, l.branch, l.j, energy(l.j), T) };
      }),
      ...extra,
    });

  it('250 K is recovered from intensities made with E″ of the term values (1e-3 K); reported only by default', () => {
    const c = check(atT(250), 'temperature');
    expect(c.status).toBe('pass');
    const t = c.measured.temperature as { value: number; uncertainty: number };
    expect(Math.abs(t.value - 250)).toBeLessThan(1e-3);
    expect(c.measured.band).toBe('1-0');
    expect(c.measured.lines).toBe(24);
    expect(c.limit).toEqual({});
    // Noise-free: u ≈ 0, so the value is printed with the 12 decimals of the smallest uncertainty.
    expect(c.message).toMatch(
      /^rotational temperature 250\.0+\d* ± 0\.0+ K from 24 lines of band 1-0 \(Boltzmann plot; Herman–Wallis effects neglected\)$/,
    );
  });

  it('E″ includes D and H of the lower level: without D the temperature moves (a 1 % larger D moves 250 K)', () => {
    const hot = 1500;
    const exact = check(atT(hot), 'temperature').measured.temperature as { value: number };
    expect(Math.abs(exact.value - hot)).toBeLessThan(0.01);
    const noD = check(atT(hot, { levels: [{ species: MAIN, v: 0, B: B0 }] }), 'temperature').measured.temperature as {
      value: number;
    };
    expect(Math.abs(noD.value - hot)).toBeGreaterThan(0.05);
    // +H: E″ = B x − D x² + H x³; H = 1e-9 at x up to 132 adds 2.3e-3 cm⁻¹ to the top level.
    const withH = check(atT(hot, { levels: [{ species: MAIN, v: 0, B: B0, D: CO.De, H: 1e-8 }] }), 'temperature')
      .measured.temperature as { value: number };
    expect(Math.abs(withH.value - hot)).toBeGreaterThan(0.01);
  });

  it('an expected temperature: within the tolerance passes, beyond by more than 2u fails, by less warns', () => {
    const b = atT(250);
    const u = (check(b, 'temperature').measured.temperature as { uncertainty: number }).uncertainty;
    const pass = check(b, 'temperature', { temperature: { expected: 255, tolerance: 10 } });
    expect(pass.status).toBe('pass');
    expect(pass.limit).toEqual({ expected: 255, tolerance: 10 });
    expect(pass.message).toMatch(/, expected 255 ± 10 K$/);
    expect(check(b, 'temperature', { temperature: { expected: 280, tolerance: 10 } }).status).toBe('fail');
    // Noise-free intensities leave u ≈ 0, so a guard band needs noise: jitter the intensities by ±2 %.
    const jittered = atT(250);
    const noisy = {
      ...jittered,
      peaks: jittered.peaks.map((p, i) => ({
        ...p,
        intensity: (p.intensity as number) * (1 + (i % 2 ? 0.02 : -0.02)),
      })),
    };
    const t = check(noisy, 'temperature').measured.temperature as { value: number; uncertainty: number };
    expect(t.uncertainty).toBeGreaterThan(0.1);
    expect(u).toBeLessThan(t.uncertainty);
    const d = 10 + t.uncertainty; // beyond the tolerance 10 by u < 2u, and |d| > 2.576u needs d > 2.576u
    const warn = check(noisy, 'temperature', { temperature: { expected: t.value + d, tolerance: 10 } });
    expect(warn.status).toBe(d > 2.576 * t.uncertainty ? 'warn' : 'pass');
    expect(
      check(noisy, 'temperature', { temperature: { expected: t.value - 10 - 3 * t.uncertainty, tolerance: 10 } })
        .status,
    ).toBe('fail');
  });

  it('not evaluated: no band of the main species, no lower level, no plot', () => {
    const noBand = atT(250, { bands: [{ species: MINOR, band: '1-0', origin: 2096, lines: 24 }] });
    expect(check(noBand, 'temperature').message).toBe('no vibrational band of the main species was fitted');
    const noLevel = atT(250, { levels: [{ species: MAIN, v: 1, B: 1.9 }] });
    expect(check(noLevel, 'temperature').message).toBe('the lower level was not fitted');
    const two = build({
      lines: [
        { branch: 'R', j: 0, intensity: 1 },
        { branch: 'R', j: 1, intensity: 2 },
        { branch: 'R', j: 2, intensity: 1.5 },
      ],
    });
    const c = check(two, 'temperature');
    expect(c.status).toBe('not-evaluated');
    expect(c.message).toBe(
      'the Boltzmann plot could not be made (too few lines, or intensities that do not fall with E″)',
    );
    expect(c.measured).toEqual({});
  });

  it('lines of another band or rejected lines are not in the plot', () => {
    const b = atT(250);
    const extra = build({
      lines: [
        ...b.analysis.result.lines.map((l) => ({
          branch: l.assignment?.branch as Branch,
          j: l.assignment?.j as number,
          intensity: b.peaks[l.index]?.intensity as number,
        })),
        { branch: 'R', j: 3, band: '2-1', intensity: 1e6 },
        { branch: 'R', j: 4, status: 'rejected', intensity: 1e6 },
        { branch: 'R', j: 5, species: MINOR, intensity: 1e6 },
      ],
    });
    const c = check(extra, 'temperature');
    expect(c.measured.lines).toBe(24);
    expect(Math.abs((c.measured.temperature as { value: number }).value - 250)).toBeLessThan(1e-3);
  });
});

describe('fit quality', () => {
  it('reduced χ² above 3 with given σ fails (3 passes); without given σ it is not judged', () => {
    const given = branches(5, { uncertainty: 1e-3 });
    const at = (chi2: number, lines = given) =>
      check(build({ lines, statistics: { reducedChiSquare: chi2 } }), 'fit-quality');
    expect(at(3).status).toBe('pass');
    const fail = at(3.5);
    expect(fail.status).toBe('fail');
    expect(fail.message).toBe('reduced χ² 3.50 exceeds 3');
    expect(at(3.5, branches(5)).status).toBe('pass');
    expect(check(build({ lines: given, statistics: { reducedChiSquare: null } }), 'fit-quality').status).toBe('pass');
    expect(fail.limit).toEqual({ maxReducedChiSquare: 3, maxRejectedFraction: 0.05, minCompleteness: 0.9 });
    expect(
      check(build({ lines: given, statistics: { reducedChiSquare: 3.5 } }), 'fit-quality', { maxReducedChiSquare: 4 })
        .status,
    ).toBe('pass');
  });

  it('rejected share: 1 of 20 (5 %) passes, 2 of 20 fails; the message counts them; both problems are joined', () => {
    const lines = (rejected: number) =>
      branches(10).map((l, i) => (i < rejected ? { ...l, status: 'rejected' as const } : l));
    const one = check(build({ lines: lines(1) }), 'fit-quality');
    expect(one.status).toBe('pass');
    expect(one.measured.rejectedFraction).toBe(0.05);
    expect(one.message).toBe('rms 1.00e-3 cm-1, reduced χ² 1.00, 1 outlier(s)');
    const two = check(build({ lines: lines(2) }), 'fit-quality');
    expect(two.status).toBe('fail');
    expect(two.message).toBe('2 of 20 lines rejected as outliers');
    const both = check(
      build({ lines: lines(2).map((l) => ({ ...l, uncertainty: 1e-3 })), statistics: { reducedChiSquare: 5 } }),
      'fit-quality',
    );
    expect(both.message).toBe('reduced χ² 5.00 exceeds 3; 2 of 20 lines rejected as outliers');
    // Nothing assigned: the share is 0, not NaN.
    const none = check(
      build({ lines: branches(2).map((l) => ({ ...l, status: 'unassigned' as const })) }),
      'fit-quality',
    );
    expect(none.measured.rejectedFraction).toBe(0);
    expect(none.message).toBe('rms 1.00e-3 cm-1, reduced χ² 1.00, 0 outlier(s)');
    const noChi = check(
      build({ lines: branches(3), statistics: { reducedChiSquare: null, rms: 2.5e-4 } }),
      'fit-quality',
    );
    expect(noChi.message).toBe('rms 2.50e-4 cm-1, 0 outlier(s)');
    expect(noChi.measured.completeness).toBeNull();
  });

  it('completeness against the library (reference assignments): every strong line found passes; missing ones warn', () => {
    // P(1…25) and R(0…24) of CO 1-0 cover the strong lines (≥ 10 % of the strongest) at 296 K, whose R/P maxima lie
    // near J = 7 (√(kT/2hcB) − ½ ≈ 7.3 for B = 1.92 cm⁻¹, T = 296 K).
    const all = branches(25);
    const full = check(build({ lines: all, method: 'reference' }), 'fit-quality');
    expect(full.status).toBe('pass');
    expect(full.measured.completeness).toBe(1);
    expect(full.measured.missingStrongLines).toEqual([]);
    expect(full.message).toBe('rms 1.00e-3 cm-1, reduced χ² 1.00, 0 outlier(s), 100 % of the strong lines found');
    // Leave R(5)…R(9) unassigned: the five strongest R lines are missing, a warning naming them.
    const holes = all.map((l) =>
      l.branch === 'R' && l.j >= 5 && l.j <= 9 ? { ...l, status: 'unassigned' as const } : l,
    );
    const c = check(build({ lines: holes, method: 'reference' }), 'fit-quality');
    expect(c.status).toBe('warn');
    const missing = c.measured.missingStrongLines as { species: string; band: string; branch: string; j: number }[];
    expect(missing.map((m) => `${m.branch}${m.j}`).sort()).toEqual(['R5', 'R6', 'R7', 'R8', 'R9']);
    expect(missing.every((m) => m.species === MAIN && m.band === '1-0')).toBe(true);
    const strong = Math.round(5 / (1 - (c.measured.completeness as number)));
    expect(c.message).toBe(`5 of ${strong} predicted strong lines are missing`);
    expect(strong).toBeGreaterThan(20);
    expect(strong).toBeLessThan(45);
    // A lower bar passes the same list; a fail stays a fail.
    expect(check(build({ lines: holes, method: 'reference' }), 'fit-quality', { minCompleteness: 0.5 }).status).toBe(
      'pass',
    );
    // Given assignments: completeness is not measured.
    expect(check(build({ lines: holes, method: 'given' }), 'fit-quality').measured.completeness).toBeNull();
  });
});

describe('the whole report', () => {
  it('runChecks gives the six checks in order and the worst status as the verdict', () => {
    const b = build({ lines: branches(6, { uncertainty: 1e-3 }), offset: 0.3 });
    const r = run(b);
    expect(r.checks.map((c) => c.id)).toEqual([
      'identity',
      'calibration',
      'unexplained-lines',
      'isotope-ratio',
      'temperature',
      'fit-quality',
    ]);
    expect(byId(r.checks, 'calibration').status).toBe('fail');
    expect(r.verdict).toBe('fail');
  });

  it('without a fit: identity fails with the reason and what the lines match; the rest are not evaluated', () => {
    const peaks = build({ lines: branches(12) }).peaks;
    const r = checksWithoutFit(peaks, parseSpecies('1H-35Cl'), 'nothing matches');
    expect(r.verdict).toBe('fail');
    const id = byId(r.checks, 'identity');
    expect(id.status).toBe('fail');
    expect(id.message).toMatch(
      /^no fit could be made \(nothing matches\); the lines match carbon monoxide \(score \d\.\d\d\)$/,
    );
    expect(id.measured.declared).toBe('1H-35Cl');
    expect(id.measured.bestMatch).toBe(MAIN);
    expect(id.measured.bestScore as number).toBeGreaterThanOrEqual(0.5);
    // A runner-up is named only with a score above 0 (one at 0 matches no better than chance).
    if ((id.measured.runnerUpScore as number) > 0) expect(id.measured.runnerUp).not.toBeNull();
    else expect(id.measured.runnerUp).toBeNull();
    expect(id.measured.runnerUp).not.toBe(MAIN);
    expect(id.measured.runnerUpScore as number).toBeGreaterThanOrEqual(0);
    expect(id.measured.runnerUpScore as number).toBeLessThan(id.measured.bestScore as number);
    expect(r.checks.slice(1).map((c) => [c.id, c.status, c.message])).toEqual(
      ['calibration', 'unexplained-lines', 'isotope-ratio', 'temperature', 'fit-quality'].map((x) => [
        x,
        'not-evaluated',
        'not evaluated: there is no fit',
      ]),
    );
    // Lines that match nothing: no "match" clause, score 0, no runner-up.
    const none = checksWithoutFit([{ position: 5000.1 }, { position: 5003.7 }], undefined, 'too few lines');
    const n = byId(none.checks, 'identity');
    expect(n.message).toBe('no fit could be made (too few lines)');
    expect(n.measured.declared).toBeNull();
    expect(n.measured.runnerUpScore).toBe(0);
  });
});

describe('temperature and fit quality: the edges', () => {
  const energy = (j: number) => term12(0, j) - term12(0, 0);
  /** P(1…n), R(0…n−1) of 1-0 with the intensities of a gas at T, E″ from the term values above. */
  const bandAt = (T: number, n: number, e: (j: number) => number = energy): LineSpec[] =>
    branches(n).map((l) => {
      const nu = positionOf(MAIN, '1-0', l.branch, l.j);
      return { ...l, intensity: 1e3 * lineIntensity(nu, l.branch, l.j, e(l.j), T) };
    });

  it('one line without an intensity: the temperature is not evaluated (every line must carry one)', () => {
    const lines = bandAt(250, 12).map((l, i) => (i === 3 ? { branch: l.branch, j: l.j } : l));
    const c = check(build({ lines }), 'temperature');
    expect(c.status).toBe('not-evaluated');
    expect(c.message).toBe('the lines carry no intensities');
  });

  it('the lower level is found by species and v, whatever the order of the levels (v = 1 and ¹³C¹⁶O v = 0 listed first)', () => {
    const b = build({
      lines: bandAt(250, 12),
      levels: [
        { species: MAIN, v: 1, B: CO.Be - 1.5 * CO.ae, D: CO.De },
        { species: MINOR, v: 0, B: B0 * RHO ** 2, D: CO.De * RHO ** 4 },
        { species: MAIN, v: 0, B: B0, D: CO.De },
      ],
    });
    const t = check(b, 'temperature').measured.temperature as { value: number };
    expect(Math.abs(t.value - 250)).toBeLessThan(1e-3);
  });

  it('E″ = B x − D x² + H x³ with H > 0: intensities made with that E″ give 1500 K back (0.01 K)', () => {
    // x = J(J+1); H = 1e-8 cm⁻¹ adds 1e-8·552³ = 1.7 cm⁻¹ at J = 23 (invented, to make H count).
    const H = 1e-8;
    const withH = (j: number) => energy(j) + H * (j * (j + 1)) ** 3;
    const b = build({ lines: bandAt(1500, 24, withH), levels: [{ species: MAIN, v: 0, B: B0, D: CO.De, H }] });
    const t = check(b, 'temperature').measured.temperature as { value: number };
    expect(Math.abs(t.value - 1500)).toBeLessThan(0.01);
  });

  it('χ² is judged when some lines carry σ (not only when all do)', () => {
    const lines = branches(5).map((l, i) => (i % 2 ? { ...l, uncertainty: 1e-3 } : l));
    const c = check(build({ lines, statistics: { reducedChiSquare: 3.5 } }), 'fit-quality');
    expect(c.status).toBe('fail');
    expect(c.message).toBe('reduced χ² 3.50 exceeds 3');
  });

  it('a χ² failure stays a failure when strong lines are also missing; both problems are named', () => {
    const holes = branches(25, { uncertainty: 1e-3 }).map((l) =>
      l.branch === 'R' && l.j >= 5 && l.j <= 9 ? { ...l, status: 'unassigned' as const } : l,
    );
    const c = check(build({ lines: holes, method: 'reference', statistics: { reducedChiSquare: 5 } }), 'fit-quality');
    expect(c.status).toBe('fail');
    expect(c.message).toMatch(/^reduced χ² 5\.00 exceeds 3; 5 of \d+ predicted strong lines are missing$/);
  });

  it('completeness exactly at the bar passes (the limit is exclusive): 100 % against a bar of 1', () => {
    const c = check(build({ lines: branches(25), method: 'reference' }), 'fit-quality', { minCompleteness: 1 });
    expect(c.measured.completeness).toBe(1);
    expect(c.status).toBe('pass');
  });

  it('the strong lines are those inside the window of the sent lines: an R branch alone is complete', () => {
    // R(0…24) of CO 1-0 span 2147–2230 cm⁻¹; the P branch lies below 2140 cm⁻¹, outside the window.
    const rOnly = branches(25).filter((l) => l.branch === 'R');
    const c = check(build({ lines: rOnly, method: 'reference' }), 'fit-quality');
    expect(c.measured.completeness).toBe(1);
    expect(c.status).toBe('pass');
  });

  it('¹³C¹⁶O declared beside ¹²C¹⁶O: its lines (1.1 % natural abundance, CIAAW) are not strong, so none is missing', () => {
    const c = check(build({ lines: branches(25), method: 'reference', species: [MAIN, MINOR] }), 'fit-quality');
    expect(c.measured.completeness).toBe(1);
    expect(c.measured.missingStrongLines).toEqual([]);
  });

  it('a window where the library predicts no strong line: completeness is not measured (null), no warning', () => {
    // Nine lines near 3000 cm⁻¹, far from the CO fundamental (2143) and overtone (4260).
    const lines = Array.from({ length: 9 }, (_, i) => ({ branch: 'R' as const, j: i, position: 3000 + 0.7 * i }));
    const c = check(build({ lines, method: 'reference' }), 'fit-quality');
    expect(c.measured.completeness).toBeNull();
    expect(c.status).toBe('pass');
    expect(c.message).toBe('rms 1.00e-3 cm-1, reduced χ² 1.00, 0 outlier(s)');
  });

  it('reference assignments without a declared species: completeness is not measured', () => {
    const c = check(
      build({ lines: branches(10), method: 'reference', species: [], fittedSpecies: [MAIN] }),
      'fit-quality',
    );
    expect(c.measured.completeness).toBeNull();
  });

  it('the strong lines are predicted at the measured temperature: at 1000 K the lines above J = 24 are missed', () => {
    // At 1000 K (kT/hc = 695 cm⁻¹, CODATA c₂ above) the population (2J+1)exp(−B J(J+1)hc/kT) at J = 30 is 0.29 of
    // that at its maximum near J = 13 (√(kT/2hcB) − ½): strong. At 296 K it is 1.2e-3 of the maximum (hand values).
    const band = bandAt(1000, 25);
    const lines = [
      ...band,
      { branch: 'R' as const, j: 0, status: 'unassigned' as const, position: 1990, intensity: 1 },
      { branch: 'R' as const, j: 0, status: 'unassigned' as const, position: 2300, intensity: 1 },
    ];
    const checks = run(build({ lines, method: 'reference' })).checks;
    const t = byId(checks, 'temperature').measured.temperature as { value: number };
    expect(Math.abs(t.value - 1000)).toBeLessThan(0.01);
    const c = byId(checks, 'fit-quality');
    expect(c.status).toBe('warn');
    const missing = c.measured.missingStrongLines as { branch: string; j: number }[];
    expect(missing.length).toBeGreaterThan(10);
    // P(1…25) and R(0…24) were sent: only P(≥ 26) and R(≥ 25) can be missing.
    expect(missing.every((m) => (m.branch === 'P' ? m.j >= 26 : m.j >= 25))).toBe(true);
  });
});

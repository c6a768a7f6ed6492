import { type Quantity, quantity } from '../derive/quantity.js';
import { hFromRelation, SCALE_PRIOR_FACTOR } from '../fit/truncation.js';
import { solveLeastSquares } from '../linalg/least-squares.js';

/**
 * Wavenumber calibration against reference positions predicted from the library's constants, with the library's
 * own prediction uncertainty included. The library holds ω_e … D_e but not the higher terms real molecules have
 * (ω_e y_e or ω_e z_e, γ_e, β_e, H_e); predicted positions miss them (γ_e alone moves HCl 1-0 R(11) by about
 * 0.5 cm⁻¹). So the regression of observed − reference carries each missing Dunham term as a nuisance parameter
 * with a prior (the same priors as the fit's constrained terms, src/fit/truncation.ts: 0 ± 5κ|Y_{k−1,l}|, H_e from
 * the Dunham relation ± 50 %), and the offset and scale come out with everything they correlate with.
 */
export interface CalibrationPoint {
  readonly observed: number;
  /** Standard uncertainty of the observed position (given, or the fit's scatter estimate), cm⁻¹. */
  readonly sigma: number;
  readonly upperV: number;
  readonly upperJ: number;
  readonly lowerV: number;
  readonly lowerJ: number;
}

export interface ReferenceCalibration {
  readonly offset: Quantity;
  /** Present only when the data determine it (σ ≤ limit/3). */
  readonly scale?: Quantity;
  /** Standard uncertainty the scale would have, ppm, when it is not reported. */
  readonly scaleUndetermined?: number;
  readonly centre: number;
  readonly lines: number;
  readonly nuisance: readonly string[];
  /** The library's own constants carried with their uncertainties ("ω_e ± 3e-4"), when those were given. */
  readonly libraryConstants: readonly string[];
  readonly reference: string;
}

const basis = (k: number, l: number, v: number, j: number) => (v + 0.5) ** k * (j * (j + 1)) ** l;

/** A Dunham term the library lacks, carried as a parameter with a prior (mean ± sigma). */
interface NuisanceTerm {
  readonly k: number;
  readonly l: number;
  readonly mean: number;
  readonly sigma: number;
  readonly name: string;
}

/**
 * Stages: nuisanceTerms (what the library lacks) → referencePositions (the library's predictions) → calibrationSystem
 * (offset, scale about the centre, nuisance terms with their prior rows) → the solve → the reported calibration.
 */
export function calibrateAgainstLibrary(
  pts: readonly CalibrationPoint[],
  y: ReadonlyMap<string, number>,
  reference: string,
  scaleLimitPpm: number,
  librarySigma?: ReadonlyMap<string, number>,
): ReferenceCalibration | undefined {
  if (pts.length < 3) return undefined;
  const nuisance = nuisanceTerms(y);
  const own = libraryCorrections(y, librarySigma);
  const refs = referencePositions(pts, y);
  const system = calibrationSystem(pts, refs, [...nuisance, ...own]);
  const { cols } = system;
  const r = solveLeastSquares({ ...system, conditionNumber: false });
  if (r.rankDeficient) return undefined;
  // The line σ are the fit's (given or estimated from the scatter): absolute here, not rescaled again.
  const sd = (j: number) => Math.sqrt(Math.max(r.covariance[j * cols + j] as number, 0));
  const scaleSigma = sd(1) * 1e6;
  const determined = scaleSigma <= scaleLimitPpm / 3;
  return {
    offset: quantity(r.coefficients[0] as number, sd(0), 'cm-1'),
    ...(determined
      ? { scale: quantity((r.coefficients[1] as number) * 1e6, scaleSigma, 'ppm') }
      : { scaleUndetermined: scaleSigma }),
    centre: system.centre,
    lines: pts.length,
    nuisance: nuisance.map((t) => t.name),
    libraryConstants: own.map((t) => `${t.name} ± ${t.sigma.toPrecision(2)}`),
    reference,
  };
}

/** Nuisance terms: those the library lacks, next to one it has (0 ± 5κ|Y_{k−1,l}|; H_e from the relation ± 50 %). */
function nuisanceTerms(y: ReadonlyMap<string, number>): NuisanceTerm[] {
  const Y = (k: number, l: number) => y.get(`${k},${l}`);
  const omega = Y(1, 0);
  const B = Y(0, 1);
  const kappa = omega && B ? B / omega : undefined;
  const nuisance: NuisanceTerm[] = [];
  const scalePrior = (k: number, l: number, name: string) => {
    const lower = Y(k - 1, l);
    if (Y(k, l) !== undefined || lower === undefined || kappa === undefined) return;
    nuisance.push({ k, l, mean: 0, sigma: SCALE_PRIOR_FACTOR * kappa * Math.abs(lower), name });
  };
  scalePrior(3, 0, 'ω_e y_e');
  if (Y(3, 0) !== undefined) scalePrior(4, 0, 'ω_e z_e');
  scalePrior(2, 1, 'γ_e');
  scalePrior(1, 2, 'β_e');
  const D = Y(0, 2);
  const alpha = Y(1, 1);
  if (Y(0, 3) === undefined && D !== undefined && B !== undefined && omega !== undefined) {
    const H = hFromRelation(-D, B, -(alpha ?? 0), omega);
    if (Number.isFinite(H) && H !== 0) nuisance.push({ k: 0, l: 3, mean: H, sigma: 0.5 * Math.abs(H), name: 'H_e' });
  }
  return nuisance;
}

const CUSTOMARY: Record<string, string> = {
  '1,0': 'ω_e',
  '2,0': 'ω_e x_e',
  '3,0': 'ω_e y_e',
  '4,0': 'ω_e z_e',
  '0,1': 'B_e',
  '1,1': 'α_e',
  '0,2': 'D_e',
};

/**
 * The library's own constants as corrections 0 ± σ to the values the positions were predicted with: the constants
 * are not exact (finite digits, older data, recalled values, mass scaling), and the offset of a single band is
 * exactly as uncertain as the library's band origin. Without σ (or σ = 0) a constant is taken as exact.
 */
function libraryCorrections(y: ReadonlyMap<string, number>, sigma?: ReadonlyMap<string, number>): NuisanceTerm[] {
  if (!sigma) return [];
  return [...y.keys()].flatMap((key) => {
    const s = sigma.get(key);
    if (s === undefined || !(s > 0)) return [];
    const [k, l] = key.split(',').map(Number) as [number, number];
    return [{ k, l, mean: 0, sigma: s, name: CUSTOMARY[key] ?? `Y${k}${l}` }];
  });
}

/** Each point's position predicted from the library's Dunham coefficients. */
function referencePositions(pts: readonly CalibrationPoint[], y: ReadonlyMap<string, number>): number[] {
  const energy = (v: number, j: number) => {
    let e = 0;
    for (const [key, val] of y) {
      const [k, l] = key.split(',').map(Number) as [number, number];
      e += val * basis(k, l, v, j);
    }
    return e;
  };
  return pts.map((p) => energy(p.upperV, p.upperJ) - energy(p.lowerV, p.lowerJ));
}

/**
 * observed − reference = offset + scale · (reference − centre) + Σ nuisance terms, weighted by 1/σ², with one prior
 * row per nuisance term; the centre is the weighted mean of the reference positions.
 */
function calibrationSystem(
  pts: readonly CalibrationPoint[],
  refs: readonly number[],
  nuisance: readonly NuisanceTerm[],
) {
  const n = pts.length;
  const m = nuisance.length;
  let sw = 0;
  let swx = 0;
  pts.forEach((p, i) => {
    const w = 1 / p.sigma ** 2;
    sw += w;
    swx += w * (refs[i] as number);
  });
  const centre = swx / sw;
  const cols = 2 + m;
  const rows = n + m;
  const design = new Float64Array(rows * cols);
  const observations = new Float64Array(rows);
  const weights = new Float64Array(rows);
  pts.forEach((p, i) => {
    design[i] = 1;
    design[rows + i] = (refs[i] as number) - centre;
    nuisance.forEach((t, a) => {
      design[(2 + a) * rows + i] = basis(t.k, t.l, p.upperV, p.upperJ) - basis(t.k, t.l, p.lowerV, p.lowerJ);
    });
    observations[i] = p.observed - (refs[i] as number);
    weights[i] = 1 / p.sigma ** 2;
  });
  nuisance.forEach((t, a) => {
    design[(2 + a) * rows + n + a] = 1;
    observations[n + a] = t.mean;
    weights[n + a] = 1 / t.sigma ** 2;
  });
  return { rows, cols, design, observations, weights, centre };
}

/** Stated false-alarm rate of one guard-banded judgement on a clean scan (true deviation 0): 1 %, two-sided. */
export const FALSE_ALARM_RATE = 0.01;
/** Two-sided normal quantile of FALSE_ALARM_RATE: P(|Z| > 2.5758) = 0.01. */
export const FALSE_ALARM_Z = 2.5758293035489;

/**
 * Guard-banded decision (after JCGM 106:2012, §8, with a guard band w = 2u): pass when |x| ≤ L; warn when the limit
 * is exceeded but not by more than 2u (not significant); fail when |x| > L + 2u (beyond the limit at about 98 %
 * one-sided confidence). A deviation beyond the limit that does not differ from zero at the FALSE_ALARM_RATE level
 * (|x| ≤ 2.576u) also passes while u ≤ L: the data cannot tell it from a clean scan, and calling it would make a
 * clean scan whose u is comparable to the limit warn far more often than 1 % (u = L/2: 4.6 %; u = L: 32 %). When
 * u > L the lines cannot judge the limit at all, and a result beyond it is inconclusive: it warns (otherwise an
 * inflated uncertainty column turns an offset six times the limit into a pass). So a clean scan with u ≤ L warns or
 * fails on one judged quantity with probability at most 1 %; with u > L it warns with probability P(|x| > L) > 32 %.
 */
export function guardBandedStatus(x: number, u: number, limit: number): 'pass' | 'warn' | 'fail' {
  const a = Math.abs(x);
  if (a <= limit || (a <= FALSE_ALARM_Z * u && u <= limit)) return 'pass';
  return a > limit + 2 * u ? 'fail' : 'warn';
}

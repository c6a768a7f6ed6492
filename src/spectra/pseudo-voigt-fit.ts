import { factorDamped, inverseDiagonal, smallSpdWork, solveFactored } from '../linalg/normal-equations.js';

/**
 * Levenberg–Marquardt fit of m pseudo-Voigt profiles (P. Thompson, D. E. Cox and J. B. Hastings, J. Appl. Cryst.
 * 20, 79 (1987)) plus a linear baseline to r[lo..hi]. Parameters: per profile centre, height, FWHM; one shared
 * Lorentzian share η (fixed for Gaussian or Lorentzian shapes, kept in [0, 1] by projection); baseline a, b.
 *
 * The problem is tiny (q = 3m + 3 ≲ 30 parameters over a few hundred points), so each parameter point is one pass
 * over the window that sums the residuals and the normal equations JᵀJ, Jᵀres together (J is never stored), and
 * each damped step (JᵀJ + λ·diag(JᵀJ)) δ = Jᵀres, Marquardt's scaling, is a q × q Cholesky solve
 * (linalg/normal-equations.ts). A refused step costs one pass, a taken one nothing more.
 *
 * Convergence: the fit stops once a step (taken or refused) moves every free parameter by less than SETTLED of its
 * standard deviation (from the damped covariance and the window's residual variance), or once a taken step is
 * shorter than STEP_SETTLED in the metric of the covariance (no parameter then moved by more than that fraction
 * of its σ): further steps would change nothing a caller can see. Otherwise it stops on a relative χ²
 * improvement below 1e-8, on λ > 10⁸ or after 60 iterations.
 */

export type LineShape = 'gaussian' | 'lorentzian' | 'voigt';

export interface FittedProfile {
  /** False when the profile left its window, or its height or width is not positive. */
  readonly valid: boolean;
  readonly position: number;
  /** Variance of the position per unit noise variance, (JᵀJ)⁻¹ at the centre. */
  readonly varianceUnit: number;
  /** Area of the profile. */
  readonly intensity: number;
  readonly height: number;
  readonly width: number;
  readonly lorentzianFraction: number;
}

export interface ProfileFit {
  readonly profiles: FittedProfile[];
  /** Residual sum of squares over the window. */
  readonly rss: number;
  /** Points in the window less free parameters. */
  readonly dof: number;
  /** The fitted profiles and baseline at x. */
  readonly model: (x: number) => number;
}

export interface FitWindow {
  readonly lo: number;
  readonly hi: number;
}

/** A step smaller than this fraction of every parameter's σ counts as settled. */
export const SETTLED = 0.01;
/**
 * A taken step whose length in the metric of the fit's covariance, √(δᵀJᵀJδ/s²), is below this has moved no
 * parameter by more than this fraction of its σ (Cauchy–Schwarz): the fit has settled even where a poorly
 * determined member (a noise bump on a line's wing, dropped afterwards) still crawls along a flat valley.
 */
export const STEP_SETTLED = 0.05;
const MAX_ITERATIONS = 60;
const LN2x4 = 4 * Math.LN2;

function pv(x: number, c: number, h: number, w: number, eta: number): number {
  const u = (x - c) / w;
  return h * ((1 - eta) * Math.exp(-LN2x4 * u * u) + eta / (1 + 4 * u * u));
}

/** Area of a pseudo-Voigt of height h and FWHM w. */
function pvArea(h: number, w: number, eta: number): number {
  return h * w * ((1 - eta) * Math.sqrt(Math.PI / LN2x4) + (eta * Math.PI) / 2);
}

const clampEta = (eta: number) => Math.min(1, Math.max(0, eta));

/** The data of one fit: its window, parameter layout and which parameters are free. */
interface Problem {
  readonly x: Float64Array;
  readonly r: Float64Array;
  readonly lo: number;
  readonly hi: number;
  readonly m: number;
  readonly etaIndex: number;
  readonly baseIndex: number;
  /** Column of each parameter in the Jacobian, −1 when fixed. */
  readonly col: Int32Array;
  /** Free parameter indices in column order. */
  readonly freeIdx: number[];
  readonly step: number;
}

function initialParameters(
  x: Float64Array,
  r: Float64Array,
  members: readonly number[],
  halfWidths: readonly number[],
  step: number,
  shape: LineShape,
): number[] {
  const p: number[] = [];
  members.forEach((i, k) => {
    p.push(x[i] as number, r[i] as number, Math.max(2 * (halfWidths[k] as number) * step, step));
  });
  p.push(shape === 'lorentzian' ? 1 : shape === 'gaussian' ? 0 : 0.5);
  p.push(0, 0);
  return p;
}

function modelAt(pb: Problem, p: readonly number[], xi: number): number {
  let v = (p[pb.baseIndex] as number) + (p[pb.baseIndex + 1] as number) * (xi - (pb.x[pb.lo] as number));
  const eta = clampEta(p[pb.etaIndex] as number);
  for (let k = 0; k < pb.m; k++)
    v += pv(xi, p[3 * k] as number, p[3 * k + 1] as number, Math.abs(p[3 * k + 2] as number), eta);
  return v;
}

/** The normal equations of one parameter point: JᵀJ (upper triangle, row-major q × q) and Jᵀres. */
interface NormalEquations {
  readonly jtj: Float64Array;
  readonly jtr: Float64Array;
}

const normalEquations = (q: number): NormalEquations => ({
  jtj: new Float64Array(q * q),
  jtr: new Float64Array(q),
});

/**
 * The residual sum of squares at p and, in one pass over the window, the normal equations there: each point's row
 * of the analytic Jacobian (columns of the free parameters) is added to JᵀJ and Jᵀres at once, so J is never
 * stored and a window of any length costs q(q + 1)/2 products a point.
 */
function evaluate(pb: Problem, p: readonly number[], ne: NormalEquations, row: Float64Array): number {
  const { x, r, lo, hi, m, col } = pb;
  const q = row.length;
  const { jtj, jtr } = ne;
  jtj.fill(0);
  jtr.fill(0);
  const x0 = x[lo] as number;
  const eta = clampEta(p[pb.etaIndex] as number);
  const etaCol = col[pb.etaIndex] as number;
  const baseCol = col[pb.baseIndex] as number;
  const slopeCol = col[pb.baseIndex + 1] as number;
  const a = p[pb.baseIndex] as number;
  const b = p[pb.baseIndex + 1] as number;
  let rss = 0;
  for (let i = lo; i <= hi; i++) {
    const xi = x[i] as number;
    let v = a + b * (xi - x0);
    let dEta = 0;
    for (let k = 0; k < m; k++) {
      const h = p[3 * k + 1] as number;
      const w = Math.abs(p[3 * k + 2] as number);
      const u = (xi - (p[3 * k] as number)) / w;
      const G = Math.exp(-LN2x4 * u * u);
      const L = 1 / (1 + 4 * u * u);
      const shapeValue = (1 - eta) * G + eta * L;
      v += h * shapeValue;
      const dShapeDu = -(1 - eta) * 2 * LN2x4 * u * G - eta * 8 * u * L * L;
      row[col[3 * k] as number] = (-h * dShapeDu) / w;
      row[col[3 * k + 1] as number] = shapeValue;
      row[col[3 * k + 2] as number] = (-h * dShapeDu * u) / w;
      dEta += h * (L - G);
    }
    if (etaCol >= 0) row[etaCol] = dEta;
    row[baseCol] = 1;
    row[slopeCol] = xi - x0;
    const res = (r[i] as number) - v;
    rss += res * res;
    for (let c = 0; c < q; c++) {
      const rc = row[c] as number;
      jtr[c] = (jtr[c] as number) + rc * res;
      const off = c * q;
      for (let c2 = c; c2 < q; c2++) jtj[off + c2] = (jtj[off + c2] as number) + rc * (row[c2] as number);
    }
  }
  return rss;
}

/** A step that throws a profile out of its window, below a third of a sample wide or wider than the window is refused. */
function staysInside(pb: Problem, p: readonly number[]): boolean {
  const xLo = pb.x[pb.lo] as number;
  const xHi = pb.x[pb.hi] as number;
  for (let k = 0; k < pb.m; k++) {
    const c = p[3 * k] as number;
    const w = Math.abs(p[3 * k + 2] as number);
    if (c < xLo || c > xHi || w < 0.3 * pb.step || w > xHi - xLo) return false;
  }
  return true;
}

/** δᵀAδ for A symmetric, its upper triangle stored (row-major q × q). */
function quadraticForm(a: Float64Array, delta: Float64Array): number {
  const q = delta.length;
  let s = 0;
  for (let i = 0; i < q; i++) {
    const di = delta[i] as number;
    s += (a[i * q + i] as number) * di * di;
    for (let j = i + 1; j < q; j++) s += 2 * (a[i * q + j] as number) * di * (delta[j] as number);
  }
  return s;
}

/** True when every component of the step is below SETTLED of its σ (σ² = variance · damped covariance diagonal). */
function hasSettled(delta: Float64Array, covarianceDiagonal: Float64Array, variance: number): boolean {
  for (let c = 0; c < delta.length; c++) {
    const d = delta[c] as number;
    if (!(d * d <= SETTLED * SETTLED * variance * (covarianceDiagonal[c] as number))) return false;
  }
  return true;
}

function profilesOf(pb: Problem, p: readonly number[], varianceUnit: (column: number) => number): FittedProfile[] {
  const eta = clampEta(p[pb.etaIndex] as number);
  const xLo = pb.x[pb.lo] as number;
  const xHi = pb.x[pb.hi] as number;
  const profiles: FittedProfile[] = [];
  for (let k = 0; k < pb.m; k++) {
    const c = p[3 * k] as number;
    const h = p[3 * k + 1] as number;
    const w = Math.abs(p[3 * k + 2] as number);
    profiles.push({
      valid: h > 0 && c >= xLo && c <= xHi && w >= 0.3 * pb.step,
      position: c,
      varianceUnit: varianceUnit(pb.col[3 * k] as number),
      intensity: pvArea(h, w, eta),
      height: h,
      width: w,
      lorentzianFraction: eta,
    });
  }
  return profiles;
}

export function fitProfiles(
  x: Float64Array,
  r: Float64Array,
  window: FitWindow,
  members: readonly number[],
  halfWidths: readonly number[],
  step: number,
  shape: LineShape,
): ProfileFit {
  const { lo, hi } = window;
  const m = members.length;
  const npts = hi - lo + 1;
  const p0 = initialParameters(x, r, members, halfWidths, step, shape);
  const etaIndex = 3 * m;
  const freeIdx = p0.flatMap((_, j) => (j !== etaIndex || shape === 'voigt' ? [j] : []));
  const q = freeIdx.length;
  // Too few points in the window to fit these profiles: nothing comes of it.
  if (npts <= q) return { profiles: [], rss: 0, dof: 0, model: () => 0 };
  const col = new Int32Array(p0.length).fill(-1);
  freeIdx.forEach((j, c) => {
    col[j] = c;
  });
  const pb: Problem = { x, r, lo, hi, m, etaIndex, baseIndex: etaIndex + 1, col, freeIdx, step };
  const { p, rss, normal } = levenbergMarquardt(pb, p0, q);
  // (JᵀJ)⁻¹ per unit noise variance at the final point; scaled by the pooled noise by the caller.
  const work = smallSpdWork(q);
  const covariance = new Float64Array(q).fill(Number.NaN);
  if (factorDamped(normal.jtj, 0, work)) inverseDiagonal(work, covariance);
  return {
    profiles: profilesOf(pb, p, (c) => covariance[c] as number),
    rss,
    dof: Math.max(0, npts - q),
    model: (xi: number) => modelAt(pb, p, xi),
  };
}

/**
 * Marquardt's damped Gauss–Newton iteration from p0: the step solves (JᵀJ + λ·diag(JᵀJ)) δ = Jᵀres; λ falls
 * tenfold after a step that lowers the residual sum of squares and rises tenfold after one that does not. Returns
 * the last accepted point with its residual sum of squares and normal equations.
 */
function levenbergMarquardt(pb: Problem, p0: readonly number[], q: number) {
  const npts = pb.hi - pb.lo + 1;
  const row = new Float64Array(q);
  const work = smallSpdWork(q);
  const delta = new Float64Array(q);
  const dampedDiagonal = new Float64Array(q);
  let normal = normalEquations(q);
  let spare = normalEquations(q);
  let p = p0;
  let current = evaluate(pb, p, normal, row);
  let lambda = 1e-3;
  for (let iter = 0; iter < MAX_ITERATIONS; iter++) {
    if (!factorDamped(normal.jtj, lambda, work)) break;
    solveFactored(normal.jtr, work, delta);
    inverseDiagonal(work, dampedDiagonal);
    const variance = current / (npts - q);
    const settled = hasSettled(delta, dampedDiagonal, variance);
    const trial = [...p];
    pb.freeIdx.forEach((j, c) => {
      trial[j] = (p[j] as number) + (delta[c] as number);
    });
    // η is kept in [0, 1] by projection: beyond it the profile would not change and the fit would chase η.
    trial[pb.etaIndex] = clampEta(trial[pb.etaIndex] as number);
    const next = staysInside(pb, trial) ? evaluate(pb, trial, spare, row) : Number.POSITIVE_INFINITY;
    if (next < current) {
      const improvement = (current - next) / Math.max(current, 1e-300);
      const smallStep = quadraticForm(normal.jtj, delta) < STEP_SETTLED * STEP_SETTLED * variance;
      p = trial;
      [normal, spare] = [spare, normal];
      current = next;
      lambda = Math.max(lambda / 10, 1e-12);
      if (improvement < 1e-8 || settled || smallStep) break;
    } else {
      lambda *= 10;
      if (lambda > 1e8 || settled) break;
    }
  }
  return { p, rss: current, normal };
}

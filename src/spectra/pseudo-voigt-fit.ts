import { reduceToTriangle, solveLeastSquares } from '../linalg/least-squares.js';

/**
 * Levenberg–Marquardt fit of m pseudo-Voigt profiles (P. Thompson, D. E. Cox and J. B. Hastings, J. Appl. Cryst.
 * 20, 79 (1987)) plus a linear baseline to r[lo..hi]. Parameters: per profile centre, height, FWHM; one shared
 * Lorentzian share η (fixed for Gaussian or Lorentzian shapes); baseline a, b. The damped step solves J augmented
 * with √λ·diag(‖J_c‖) rows (Marquardt's scaling) by the QR least squares.
 *
 * Convergence: the fit stops once a step (taken or refused) moves every free parameter by less than SETTLED of its
 * standard deviation (from the damped covariance and the window's residual variance): further steps would change
 * nothing a caller can see. Otherwise it stops on a relative χ² improvement below 1e-8, on λ > 10⁸ or after 60
 * iterations.
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

function residualSumOfSquares(pb: Problem, p: readonly number[]): number {
  let s = 0;
  for (let i = pb.lo; i <= pb.hi; i++) s += ((pb.r[i] as number) - modelAt(pb, p, pb.x[i] as number)) ** 2;
  return s;
}

/** Analytic Jacobian (column-major over the free parameters) and residuals at p, written into jac and res. */
function jacobianAt(pb: Problem, p: readonly number[], jac: Float64Array, res: Float64Array): void {
  const { x, r, lo, m, col } = pb;
  const npts = res.length;
  const x0 = x[lo] as number;
  const eta = clampEta(p[pb.etaIndex] as number);
  const etaCol = col[pb.etaIndex] as number;
  const baseCol = col[pb.baseIndex] as number;
  const slopeCol = col[pb.baseIndex + 1] as number;
  for (let i = 0; i < npts; i++) {
    const xi = x[lo + i] as number;
    let v = (p[pb.baseIndex] as number) + (p[pb.baseIndex + 1] as number) * (xi - x0);
    let dEta = 0;
    for (let k = 0; k < m; k++) {
      const c = p[3 * k] as number;
      const h = p[3 * k + 1] as number;
      const w = Math.abs(p[3 * k + 2] as number);
      const u = (xi - c) / w;
      const G = Math.exp(-LN2x4 * u * u);
      const L = 1 / (1 + 4 * u * u);
      const shapeValue = (1 - eta) * G + eta * L;
      v += h * shapeValue;
      const dShapeDu = -(1 - eta) * 2 * LN2x4 * u * G - eta * 8 * u * L * L;
      jac[(col[3 * k] as number) * npts + i] = (-h * dShapeDu) / w;
      jac[(col[3 * k + 1] as number) * npts + i] = shapeValue;
      jac[(col[3 * k + 2] as number) * npts + i] = (-h * dShapeDu * u) / w;
      dEta += h * (L - G);
    }
    if (etaCol >= 0) jac[etaCol * npts + i] = dEta;
    jac[baseCol * npts + i] = 1;
    jac[slopeCol * npts + i] = xi - x0;
    res[i] = (r[lo + i] as number) - v;
  }
}

/** Buffers of one fit, reused by every iteration. */
interface Workspace {
  readonly jac: Float64Array;
  readonly res: Float64Array;
  /** [M; √λD] (2q × q, column-major) and [c; 0]. */
  readonly aug: Float64Array;
  readonly rhs: Float64Array;
}

/** J and the residuals at one parameter point reduced to q rows (J = Q M, c = Qᵀres), with ‖J_c‖². */
interface Linearisation {
  readonly m: Float64Array;
  readonly c: Float64Array;
  readonly norms2: Float64Array;
}

function linearise(pb: Problem, p: readonly number[], ws: Workspace, q: number): Linearisation {
  jacobianAt(pb, p, ws.jac, ws.res);
  const npts = ws.res.length;
  const norms2 = new Float64Array(q);
  for (let c = 0; c < q; c++) {
    let nrm = 0;
    for (let i = 0; i < npts; i++) nrm += (ws.jac[c * npts + i] as number) ** 2;
    norms2[c] = nrm;
  }
  return { ...reduceToTriangle(npts, q, ws.jac, ws.res), norms2 };
}

/**
 * The damped Gauss–Newton step: least squares of [J; √λ·diag(‖J_c‖)] δ = [res; 0] (Marquardt's scaling), solved
 * as [M; √λ·diag(‖J_c‖)] δ = [c; 0]: a refused step costs a 2q × q solve, not a new factorisation of J.
 */
function dampedStep(lin: Linearisation, ws: Workspace, q: number, lambda: number) {
  const rows = 2 * q;
  ws.aug.fill(0);
  ws.rhs.fill(0);
  ws.rhs.set(lin.c);
  for (let c = 0; c < q; c++) {
    for (let i = 0; i < q; i++) ws.aug[c * rows + i] = lin.m[c * q + i] as number;
    ws.aug[c * rows + q + c] = Math.sqrt(lambda * Math.max(lin.norms2[c] as number, 1e-300));
  }
  return solveLeastSquares({
    rows,
    cols: q,
    design: ws.aug,
    observations: ws.rhs,
    rankTolerance: 1e-13,
    conditionNumber: false,
  });
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

/** True when every component of the step is below SETTLED of its σ (σ² = variance · damped covariance diagonal). */
function hasSettled(delta: Float64Array, covariance: Float64Array, variance: number): boolean {
  const q = delta.length;
  for (let c = 0; c < q; c++) {
    const sigma2 = variance * (covariance[c * q + c] as number);
    const d = delta[c] as number;
    if (!(d * d <= SETTLED * SETTLED * sigma2)) return false;
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
  let p = initialParameters(x, r, members, halfWidths, step, shape);
  const etaIndex = 3 * m;
  const freeIdx = p.flatMap((_, j) => (j !== etaIndex || shape === 'voigt' ? [j] : []));
  const q = freeIdx.length;
  // Too few points in the window to fit these profiles: nothing comes of it.
  if (npts <= q) return { profiles: [], rss: 0, dof: 0, model: () => 0 };
  const col = new Int32Array(p.length).fill(-1);
  freeIdx.forEach((j, c) => {
    col[j] = c;
  });
  const pb: Problem = { x, r, lo, hi, m, etaIndex, baseIndex: etaIndex + 1, col, freeIdx, step };
  const ws: Workspace = {
    jac: new Float64Array(npts * q),
    res: new Float64Array(npts),
    aug: new Float64Array(2 * q * q),
    rhs: new Float64Array(2 * q),
  };
  let lambda = 1e-3;
  let current = residualSumOfSquares(pb, p);
  let lin: Linearisation | undefined;
  for (let iter = 0; iter < MAX_ITERATIONS; iter++) {
    lin ??= linearise(pb, p, ws, q);
    const sol = dampedStep(lin, ws, q, lambda);
    if (sol.rankDeficient) break;
    const trial = [...p];
    freeIdx.forEach((j, c) => {
      trial[j] = (p[j] as number) + (sol.coefficients[c] as number);
    });
    const settled = hasSettled(sol.coefficients, sol.covariance, current / (npts - q));
    const next = staysInside(pb, trial) ? residualSumOfSquares(pb, trial) : Number.POSITIVE_INFINITY;
    if (next < current) {
      const improvement = (current - next) / Math.max(current, 1e-300);
      p = trial;
      lin = undefined;
      current = next;
      lambda = Math.max(lambda / 10, 1e-12);
      if (improvement < 1e-8 || settled) break;
    } else {
      lambda *= 10;
      if (lambda > 1e8 || settled) break;
    }
  }
  // (JᵀJ)⁻¹ per unit noise variance, at the start of the last iteration; scaled by the pooled noise by the caller.
  const cov = solveLeastSquares({
    rows: npts,
    cols: q,
    design: ws.jac,
    observations: new Float64Array(npts),
    conditionNumber: false,
  });
  const final = p;
  return {
    profiles: profilesOf(pb, p, (c) => (cov.rankDeficient ? Number.NaN : (cov.covariance[c * q + c] as number))),
    rss: current,
    dof: Math.max(0, npts - q),
    model: (xi: number) => modelAt(pb, final, xi),
  };
}

import { rkrTurningPoints, type TurningPoints } from './rkr.js';
import { cubicSpline, evaluateSpline } from './spline.js';
import { type VibrationalSeries, vibrationalSlope } from './vibrational-terms.js';

/**
 * The RKR curve as a function V(r) for the radial equation: turning points on a dense grid
 * v_k = −½ + (vTop + ½)(k/K)² (nearly even steps in r near the minimum, where r − r_e ∝ √(v + ½)), a cubic spline
 * through them clamped to the slopes dV/dr = (dG/dv)/(dr/dv) of the RKR branches at the top, and beyond the
 * outermost points an exponential continuation matching value, slope and curvature there
 * (a Morse-shaped wall A(1 − e^{−β(r − ρ)})², else an exponential, else a straight line, whichever the signs of the
 * derivatives allow).
 */
export interface RkrCurveModel {
  readonly potential: (r: number) => number;
  /** Innermost and outermost turning points used (at vTop), Å. */
  readonly inner: number;
  readonly outer: number;
  readonly knots: number;
}

export function rkrCurveModel(
  series: VibrationalSeries,
  hbar2Over2mu: number,
  vTop: number,
  options: { readonly knots?: number; readonly rotational?: (x: number) => number } = {},
): RkrCurveModel | undefined {
  const K = options.knots ?? 200;
  const input = { series, hbar2Over2mu, ...(options.rotational ? { rotational: options.rotational } : {}) };
  const pts: TurningPoints[] = [];
  for (let k = 1; k <= K; k++) pts.push(rkrTurningPoints(input, -0.5 + (vTop + 0.5) * (k / K) ** 2));
  const re = rkrTurningPoints(input, -0.5).rMin;
  const xs = [...pts.map((t) => t.rMin).reverse(), re, ...pts.map((t) => t.rMax)];
  const ys = [...pts.map((t) => t.energy).reverse(), 0, ...pts.map((t) => t.energy)];
  for (let i = 1; i < xs.length; i++) if (!((xs[i] as number) > (xs[i - 1] as number))) return undefined;

  // dr/dv and d²r/dv² of each branch at vTop by one-sided differences of second order.
  const d = 1e-3 * (vTop + 0.5);
  const t0 = pts[K - 1] as TurningPoints;
  const t1 = rkrTurningPoints(input, vTop - d);
  const t2 = rkrTurningPoints(input, vTop - 2 * d);
  const x = vTop + 0.5;
  const g1 = vibrationalSlope(series, x);
  const g2 = (vibrationalSlope(series, x + 1e-4) - vibrationalSlope(series, x - 1e-4)) / 2e-4;
  const t3 = rkrTurningPoints(input, vTop - 3 * d);
  const backward = (a: number, b: number, c: number, e: number) => {
    const r1 = (3 * a - 4 * b + c) / (2 * d);
    const r2 = (2 * a - 5 * b + 4 * c - e) / (d * d);
    return { slope: g1 / r1, curvature: (g2 * r1 - g1 * r2) / r1 ** 3 };
  };
  const inner = backward(t0.rMin, t1.rMin, t2.rMin, t3.rMin);
  const outer = backward(t0.rMax, t1.rMax, t2.rMax, t3.rMax);
  const spline = cubicSpline(xs, ys, { startSlope: inner.slope, endSlope: outer.slope });
  const r0 = xs[0] as number;
  const rN = xs[xs.length - 1] as number;
  const vTopEnergy = t0.energy;
  const continuation = (r1: number, slope: number, curvature: number) =>
    morseLike(r1, vTopEnergy, slope, curvature) ?? exponential(r1, vTopEnergy, slope, curvature);
  const innerExt = continuation(r0, inner.slope, inner.curvature);
  const outerExt = continuation(rN, outer.slope, outer.curvature);
  return {
    potential: (r) => (r < r0 ? innerExt(r) : r > rN ? outerExt(r) : evaluateSpline(spline, r)),
    inner: r0,
    outer: rN,
    knots: xs.length,
  };
}

/**
 * A(1 − e^{−β(r − ρ)})² through (r₁, V, V′, V″). With z = e^{−β(r₁ − ρ)}: V′/V = 2βz/(1 − z) = p and
 * V″/V = 2β²z(2z − 1)/(1 − z)² = q, so q/p² = 1 − 1/(2z), z = 1/(2(1 − q/p²)), β = p(1 − z)/(2z), A = V/(1 − z)².
 */
function morseLike(r1: number, V: number, slope: number, curvature: number): ((r: number) => number) | undefined {
  if (!(V > 0)) return undefined;
  const p = slope / V;
  const q = curvature / V;
  const ratio = q / (p * p);
  if (!(ratio < 1)) return undefined;
  const z = 1 / (2 * (1 - ratio));
  const beta = (p * (1 - z)) / (2 * z);
  if (!(beta > 0) || !Number.isFinite(beta) || z === 1) return undefined;
  const A = V / (1 - z) ** 2;
  return (r: number) => {
    const y = 1 - z * Math.exp(-beta * (r - r1));
    return A * y * y;
  };
}

/** V₁ + c(e^{−b(r − r₁)} − 1) with V′ = −cb, V″ = cb² at r₁ (b = −V″/V′ > 0), else the tangent line. */
function exponential(r1: number, V: number, slope: number, curvature: number): (r: number) => number {
  const b = -curvature / slope;
  if (!(b > 0) || !Number.isFinite(b)) return (r: number) => V + slope * (r - r1);
  const c = -slope / b;
  return (r: number) => V + c * (Math.exp(-b * (r - r1)) - 1);
}

/**
 * Cubic spline through (x_i, y_i), x strictly increasing: the second derivatives come from the usual tridiagonal
 * system (de Boor, A Practical Guide to Splines (1978), ch. IV), solved by the Thomas algorithm. Each end is
 * either natural (y″ = 0) or clamped to a given slope. Outside the knots the spline is continued by straight lines
 * with the end slopes; callers wanting a better continuation evaluate their own beyond `x[0]` and `x[n−1]`.
 */
export interface CubicSpline {
  readonly x: Float64Array;
  readonly y: Float64Array;
  /** Second derivatives at the knots. */
  readonly m: Float64Array;
}

export interface SplineEnds {
  /** dy/dx at x[0]; natural end when absent. */
  readonly startSlope?: number;
  /** dy/dx at x[n−1]; natural end when absent. */
  readonly endSlope?: number;
}

export function cubicSpline(xs: readonly number[], ys: readonly number[], ends: SplineEnds = {}): CubicSpline {
  const n = xs.length;
  if (n < 3 || ys.length !== n) throw new RangeError('a cubic spline needs three or more points, as many x as y');
  const x = Float64Array.from(xs);
  const y = Float64Array.from(ys);
  for (let i = 1; i < n; i++) {
    if (!((x[i] as number) > (x[i - 1] as number))) throw new RangeError(`spline abscissae not increasing at ${i}`);
  }
  // Rows: sub[i] m[i−1] + diag[i] m[i] + sup[i] m[i+1] = rhs[i].
  const sub = new Float64Array(n);
  const diag = new Float64Array(n);
  const sup = new Float64Array(n);
  const rhs = new Float64Array(n);
  const h = (i: number) => (x[i + 1] as number) - (x[i] as number);
  const s = (i: number) => ((y[i + 1] as number) - (y[i] as number)) / h(i);
  if (ends.startSlope === undefined) diag[0] = 1;
  else {
    diag[0] = h(0) / 3;
    sup[0] = h(0) / 6;
    rhs[0] = s(0) - ends.startSlope;
  }
  for (let i = 1; i < n - 1; i++) {
    sub[i] = h(i - 1) / 6;
    diag[i] = (h(i - 1) + h(i)) / 3;
    sup[i] = h(i) / 6;
    rhs[i] = s(i) - s(i - 1);
  }
  if (ends.endSlope === undefined) diag[n - 1] = 1;
  else {
    sub[n - 1] = h(n - 2) / 6;
    diag[n - 1] = h(n - 2) / 3;
    rhs[n - 1] = ends.endSlope - s(n - 2);
  }
  for (let i = 1; i < n; i++) {
    const w = (sub[i] as number) / (diag[i - 1] as number);
    diag[i] = (diag[i] as number) - w * (sup[i - 1] as number);
    rhs[i] = (rhs[i] as number) - w * (rhs[i - 1] as number);
  }
  const m = new Float64Array(n);
  m[n - 1] = (rhs[n - 1] as number) / (diag[n - 1] as number);
  for (let i = n - 2; i >= 0; i--)
    m[i] = ((rhs[i] as number) - (sup[i] as number) * (m[i + 1] as number)) / (diag[i] as number);
  return { x, y, m };
}

/** The natural spline (y″ = 0 at both ends). */
export const naturalCubicSpline = (xs: readonly number[], ys: readonly number[]): CubicSpline => cubicSpline(xs, ys);

function slopeAt(s: CubicSpline, i: number, atRight: boolean): number {
  const h = (s.x[i + 1] as number) - (s.x[i] as number);
  const dy = ((s.y[i + 1] as number) - (s.y[i] as number)) / h;
  return atRight
    ? dy + (h * (2 * (s.m[i + 1] as number) + (s.m[i] as number))) / 6
    : dy - (h * (2 * (s.m[i] as number) + (s.m[i + 1] as number))) / 6;
}

export function evaluateSpline(s: CubicSpline, t: number): number {
  const n = s.x.length;
  const x0 = s.x[0] as number;
  const xn = s.x[n - 1] as number;
  if (t <= x0) return (s.y[0] as number) + slopeAt(s, 0, false) * (t - x0);
  if (t >= xn) return (s.y[n - 1] as number) + slopeAt(s, n - 2, true) * (t - xn);
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((s.x[mid] as number) <= t) lo = mid;
    else hi = mid;
  }
  const h = (s.x[hi] as number) - (s.x[lo] as number);
  const a = ((s.x[hi] as number) - t) / h;
  const b = 1 - a;
  return (
    a * (s.y[lo] as number) +
    b * (s.y[hi] as number) +
    (((a * a * a - a) * (s.m[lo] as number) + (b * b * b - b) * (s.m[hi] as number)) * h * h) / 6
  );
}

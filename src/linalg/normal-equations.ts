/**
 * Small symmetric positive-definite systems: the normal equations of a tiny least-squares problem (a
 * Levenberg–Marquardt step of a few profiles, q ≲ 30 parameters over a few hundred points), solved by Cholesky on
 * the Jacobi-scaled matrix (unit diagonal: Golub & Van Loan, Matrix Computations, 4th ed., §4.2 and §3.5.2).
 *
 * Forming JᵀJ squares the condition number of J; after the scaling, the columns of a profile fit have condition
 * numbers of 10–10⁴, so 10⁻⁸ or better of relative accuracy is left in the step and the covariance — far below
 * the noise these fits report. A problem that needs more than that (NIST StRD Filip, κ ≈ 10¹⁵) belongs to the
 * pivoted QR of least-squares.ts, not here.
 */

/** Cholesky pivots below this (on the unit-diagonal scaled matrix) count as a singular matrix. */
const PIVOT_FLOOR = 1e-15;

/** Work arrays of one q × q problem, reused from one solve to the next. */
export interface SmallSpdWork {
  readonly q: number;
  /** Lower Cholesky factor of the scaled matrix, row-major q × q. */
  readonly l: Float64Array;
  /** √diag of the matrix (the Jacobi scaling). */
  readonly d: Float64Array;
  readonly y: Float64Array;
  /** Inverse of the lower factor, row-major q × q (only for the inverse's diagonal). */
  readonly linv: Float64Array;
}

export function smallSpdWork(q: number): SmallSpdWork {
  return {
    q,
    l: new Float64Array(q * q),
    d: new Float64Array(q),
    y: new Float64Array(q),
    linv: new Float64Array(q * q),
  };
}

/**
 * Cholesky factor of D⁻¹(A + λ·diag(A))D⁻¹, D = √diag(A), for A symmetric (its upper triangle, row-major, is
 * read). False when a diagonal element of A is not positive or a pivot falls below PIVOT_FLOOR: the matrix is
 * (numerically) singular.
 */
export function factorDamped(a: Float64Array, lambda: number, w: SmallSpdWork): boolean {
  const { q, l, d } = w;
  for (let i = 0; i < q; i++) {
    const aii = a[i * q + i] as number;
    if (!(aii > 0)) return false;
    d[i] = Math.sqrt(aii);
  }
  for (let j = 0; j < q; j++) {
    let s = 1 + lambda;
    for (let k = 0; k < j; k++) s -= (l[j * q + k] as number) ** 2;
    if (!(s > PIVOT_FLOOR)) return false;
    const ljj = Math.sqrt(s);
    l[j * q + j] = ljj;
    const dj = d[j] as number;
    for (let i = j + 1; i < q; i++) {
      let t = (a[j * q + i] as number) / (dj * (d[i] as number));
      for (let k = 0; k < j; k++) t -= (l[i * q + k] as number) * (l[j * q + k] as number);
      l[i * q + j] = t / ljj;
    }
  }
  return true;
}

/** x = (A + λ·diag(A))⁻¹ g from the factor of factorDamped. */
export function solveFactored(g: Float64Array, w: SmallSpdWork, x: Float64Array): void {
  const { q, l, d, y } = w;
  for (let i = 0; i < q; i++) {
    let s = (g[i] as number) / (d[i] as number);
    for (let k = 0; k < i; k++) s -= (l[i * q + k] as number) * (y[k] as number);
    y[i] = s / (l[i * q + i] as number);
  }
  for (let i = q - 1; i >= 0; i--) {
    let s = y[i] as number;
    for (let k = i + 1; k < q; k++) s -= (l[k * q + i] as number) * (x[k] as number);
    x[i] = s / (l[i * q + i] as number);
  }
  for (let i = 0; i < q; i++) x[i] = (x[i] as number) / (d[i] as number);
}

/** The diagonal of (A + λ·diag(A))⁻¹ from the factor of factorDamped: Σₖ (L⁻¹)ₖᵢ² / dᵢ². */
export function inverseDiagonal(w: SmallSpdWork, out: Float64Array): void {
  const { q, l, d, linv } = w;
  for (let c = 0; c < q; c++) {
    // Column c of L⁻¹ by forward substitution of the unit vector e_c (zero above row c).
    linv[c * q + c] = 1 / (l[c * q + c] as number);
    for (let i = c + 1; i < q; i++) {
      let s = 0;
      for (let k = c; k < i; k++) s -= (l[i * q + k] as number) * (linv[k * q + c] as number);
      linv[i * q + c] = s / (l[i * q + i] as number);
    }
  }
  for (let i = 0; i < q; i++) {
    let s = 0;
    for (let k = i; k < q; k++) s += (linv[k * q + i] as number) ** 2;
    out[i] = s / (d[i] as number) ** 2;
  }
}

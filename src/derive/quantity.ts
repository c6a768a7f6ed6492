/** A fitted or derived number with its standard uncertainty (k = 1, JCGM 100:2008) and its unit. */
export interface Quantity {
  readonly value: number;
  readonly uncertainty: number;
  readonly unit: string;
}

export const quantity = (value: number, uncertainty: number, unit: string): Quantity => ({ value, uncertainty, unit });

/**
 * First-order propagation σ² = J Σ Jᵀ of a function of several correlated inputs (JCGM 100:2008, eq. 13), with
 * the Jacobian by central differences. `cov` is the row-major covariance of `x`.
 */
export function propagate(f: (x: readonly number[]) => number, x: readonly number[], cov: ArrayLike<number>): number {
  const p = x.length;
  const jac = new Array<number>(p).fill(0);
  for (let i = 0; i < p; i++) {
    const sigma = Math.sqrt(Math.max(cov[i * p + i] as number, 0));
    const xi = x[i] as number;
    const h = sigma > 0 ? sigma * 1e-3 : Math.max(Math.abs(xi) * 1e-7, 1e-12);
    const up = [...x];
    const dn = [...x];
    up[i] = xi + h;
    dn[i] = xi - h;
    jac[i] = (f(up) - f(dn)) / (2 * h);
  }
  let v = 0;
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) v += (jac[i] as number) * (cov[i * p + j] as number) * (jac[j] as number);
  }
  return Math.sqrt(Math.max(v, 0));
}

/** The sub-covariance of the listed indices from a row-major p × p matrix. */
export function subCovariance(cov: ArrayLike<number>, p: number, idx: readonly number[]): Float64Array {
  const m = idx.length;
  const out = new Float64Array(m * m);
  for (let a = 0; a < m; a++) {
    for (let b = 0; b < m; b++) out[a * m + b] = cov[(idx[a] as number) * p + (idx[b] as number)] as number;
  }
  return out;
}

/**
 * Weighted linear least squares by Householder QR with column pivoting (Businger & Golub, Numer. Math. 7, 269
 * (1965); Golub & Van Loan, Matrix Computations, 4th ed., §5.4.2) on a column-scaled design.
 *
 * Rows are multiplied by √wᵢ, columns are scaled to unit Euclidean norm (equilibration: a column of x³ ≈ 10¹⁰
 * and a column of ones become comparable), then QR with pivoting reveals the numerical rank. The normal
 * equations are never formed. The covariance (AᵀWA)⁻¹ = S⁻¹P R⁻¹R⁻ᵀ PᵀS⁻¹ comes from the triangular factor.
 */

export interface LeastSquaresInput {
  /** Number of observations. */
  readonly rows: number;
  /** Number of parameters. */
  readonly cols: number;
  /** Design matrix, column-major: element (i, j) at design[j * rows + i]. Not modified. */
  readonly design: Float64Array;
  /** Observations, length rows. */
  readonly observations: Float64Array;
  /** Weights wᵢ = 1/σᵢ², length rows; all 1 when absent. */
  readonly weights?: Float64Array;
  /** Compute the leverages hᵢᵢ (diagonal of the hat matrix) for studentised residuals. Default false. */
  readonly leverage?: boolean;
  /**
   * Relative tolerance on |R_kk| / |R_00| below which a pivot counts as zero.
   * Default max(rows, cols) · ε, the convention of LAPACK-based solvers such as numpy's lstsq.
   */
  readonly rankTolerance?: number;
  /** Compute the condition number (one small SVD). Default true; inner loops of nonlinear fits skip it. */
  readonly conditionNumber?: boolean;
}

export interface LeastSquaresResult {
  /** Numerical rank of the scaled weighted design. */
  readonly rank: number;
  /** True when rank < cols; coefficients and covariance are then absent. */
  readonly rankDeficient: boolean;
  /**
   * For a rank-deficient design: groups of parameter indices whose columns are linearly dependent
   * (each group: one column the others determine, plus the ones it depends on).
   */
  readonly dependencies: readonly (readonly number[])[];
  readonly coefficients: Float64Array;
  /** (AᵀWA)⁻¹, row-major cols × cols (unscaled by the residual variance). */
  readonly covariance: Float64Array;
  /** yᵢ − (Ax)ᵢ, unweighted. */
  readonly residuals: Float64Array;
  /** Σ wᵢ rᵢ². */
  readonly chiSquare: number;
  /** 2-norm condition number of the weighted, column-scaled design (from the singular values of R). */
  readonly conditionNumber: number;
  /** Diagonal of the hat matrix (only when requested). */
  readonly leverages?: Float64Array;
}

const EPS = 2.220446049250313e-16;

export function solveLeastSquares(input: LeastSquaresInput): LeastSquaresResult {
  const { rows: n, cols: p, design, observations, weights } = input;
  if (design.length !== n * p || observations.length !== n || (weights && weights.length !== n)) {
    throw new RangeError(`least squares: inconsistent sizes (rows ${n}, cols ${p}, design ${design.length})`);
  }
  if (n < p) throw new RangeError(`least squares: ${n} observations cannot determine ${p} parameters`);

  // Weighted, column-scaled working copy.
  const a = new Float64Array(n * p);
  const b = new Float64Array(n);
  const sw = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = weights ? Math.sqrt(weights[i] as number) : 1;
    sw[i] = s;
    b[i] = (observations[i] as number) * s;
  }
  const scale = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const off = j * n;
    let ss = 0;
    for (let i = 0; i < n; i++) {
      const v = (design[off + i] as number) * (sw[i] as number);
      a[off + i] = v;
      ss += v * v;
    }
    const norm = Math.sqrt(ss);
    scale[j] = norm > 0 ? norm : 1;
    if (norm > 0) {
      const inv = 1 / norm;
      for (let i = 0; i < n; i++) a[off + i] = (a[off + i] as number) * inv;
    }
  }

  // Householder QR with column pivoting.
  const perm = new Int32Array(p);
  const colNorm = new Float64Array(p);
  const colNormRef = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    perm[j] = j;
    // Columns were just scaled to unit norm (or are all zero).
    colNorm[j] = scale[j] === 1 && !hasNonZero(a, j * n, n) ? 0 : 1;
    colNormRef[j] = colNorm[j] as number;
  }
  const rdiag = new Float64Array(p);
  const tmp = new Float64Array(n);
  for (let k = 0; k < p; k++) {
    // Pivot: the remaining column of largest norm.
    let best = k;
    for (let j = k + 1; j < p; j++) if ((colNorm[j] as number) > (colNorm[best] as number)) best = j;
    if (best !== k) {
      const ok = k * n;
      const ob = best * n;
      tmp.set(a.subarray(ok, ok + n));
      a.copyWithin(ok, ob, ob + n);
      a.set(tmp, ob);
      swap(perm, k, best);
      swapF(colNorm, k, best);
      swapF(colNormRef, k, best);
    }
    const off = k * n;
    let ss = 0;
    for (let i = k; i < n; i++) {
      const v = a[off + i] as number;
      ss += v * v;
    }
    let alpha = Math.sqrt(ss);
    if (alpha === 0) {
      rdiag[k] = 0;
      continue;
    }
    if ((a[off + k] as number) > 0) alpha = -alpha;
    // Reflector H = I − β v vᵀ with v = x − αe₁ stored in place of the column, α = −sign(x₁)‖x‖.
    a[off + k] = (a[off + k] as number) - alpha;
    // 2 / vᵀv with vᵀv = −2α·v₁ (v₁ = x₁ − α), which avoids cancellation.
    const beta = -1 / (alpha * (a[off + k] as number));
    const vk = a.subarray(off, off + n);
    for (let j = k + 1; j < p; j++) {
      const oj = j * n;
      const cj = a.subarray(oj, oj + n);
      axpy(cj, vk, -dot(vk, cj, k) * beta, k);
      // Norm downdate of the remaining part of column j (LAPACK xGEQP3 style, with recomputation on loss).
      const rkj = a[oj + k] as number;
      const cn = colNorm[j] as number;
      if (cn > 0) {
        let t = 1 - (rkj / cn) ** 2;
        t = Math.max(t, 0);
        const ratio = cn / (colNormRef[j] as number);
        if (t * ratio * ratio <= Math.sqrt(EPS)) {
          let s2 = 0;
          for (let i = k + 1; i < n; i++) {
            const v = a[oj + i] as number;
            s2 += v * v;
          }
          colNorm[j] = Math.sqrt(s2);
          colNormRef[j] = colNorm[j] as number;
        } else {
          colNorm[j] = cn * Math.sqrt(t);
        }
      }
    }
    axpy(b, vk, -dot(vk, b, k) * beta, k);
    rdiag[k] = alpha;
  }

  // Numerical rank.
  const tol = (input.rankTolerance ?? Math.max(n, p) * EPS) * Math.abs(rdiag[0] as number);
  let rank = 0;
  while (rank < p && Math.abs(rdiag[rank] as number) > tol) rank++;

  // R (upper triangular p × p, row-major) in pivoted order.
  const r = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    r[i * p + i] = rdiag[i] as number;
    for (let j = i + 1; j < p; j++) r[i * p + j] = a[j * n + i] as number;
  }
  const conditionNumber =
    rank < p
      ? Number.POSITIVE_INFINITY
      : input.conditionNumber === false
        ? Number.NaN
        : triangularConditionNumber(r, p);

  if (rank < p) {
    return {
      rank,
      rankDeficient: true,
      dependencies: dependentGroups(r, p, rank, perm),
      coefficients: new Float64Array(p).fill(Number.NaN),
      covariance: new Float64Array(p * p).fill(Number.NaN),
      residuals: new Float64Array(n).fill(Number.NaN),
      chiSquare: Number.NaN,
      conditionNumber,
    };
  }

  // Back substitution R z = (Qᵀb)[0:p].
  const z = new Float64Array(p);
  for (let i = p - 1; i >= 0; i--) {
    let s = b[i] as number;
    for (let j = i + 1; j < p; j++) s -= (r[i * p + j] as number) * (z[j] as number);
    z[i] = s / (r[i * p + i] as number);
  }
  const coefficients = new Float64Array(p);
  for (let k = 0; k < p; k++) {
    const j = perm[k] as number;
    coefficients[j] = (z[k] as number) / (scale[j] as number);
  }

  // R⁻¹ (upper triangular), then (RᵀR)⁻¹ = R⁻¹R⁻ᵀ, unpermuted and unscaled.
  const rinv = invertUpperTriangular(r, p);
  const covariance = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = i; j < p; j++) {
      let s = 0;
      for (let k = j; k < p; k++) s += (rinv[i * p + k] as number) * (rinv[j * p + k] as number);
      const pi = perm[i] as number;
      const pj = perm[j] as number;
      const v = s / ((scale[pi] as number) * (scale[pj] as number));
      covariance[pi * p + pj] = v;
      covariance[pj * p + pi] = v;
    }
  }

  // Residuals column by column (contiguous access in the column-major design).
  const residuals = Float64Array.from(observations);
  for (let j = 0; j < p; j++) {
    const off = j * n;
    const c = coefficients[j] as number;
    for (let i = 0; i < n; i++) residuals[i] = (residuals[i] as number) - (design[off + i] as number) * c;
  }
  let chiSquare = 0;
  for (let i = 0; i < n; i++) {
    const v = (residuals[i] as number) * (sw[i] as number);
    chiSquare += v * v;
  }

  let leverages: Float64Array | undefined;
  if (input.leverage) {
    // hᵢᵢ = ‖row i of Ã R⁻¹‖², Ã the weighted, scaled, permuted design; built one column of Ã R⁻¹ at a time.
    leverages = new Float64Array(n);
    const q = new Float64Array(n);
    for (let c = 0; c < p; c++) {
      q.fill(0);
      for (let k = 0; k <= c; k++) {
        const f = (rinv[k * p + c] as number) / (scale[perm[k] as number] as number);
        if (f === 0) continue;
        const off = (perm[k] as number) * n;
        for (let i = 0; i < n; i++) q[i] = (q[i] as number) + (design[off + i] as number) * f;
      }
      for (let i = 0; i < n; i++) {
        const v = (q[i] as number) * (sw[i] as number);
        leverages[i] = (leverages[i] as number) + v * v;
      }
    }
  }

  return {
    rank,
    rankDeficient: false,
    dependencies: [],
    coefficients,
    covariance,
    residuals,
    chiSquare,
    conditionNumber,
    ...(leverages ? { leverages } : {}),
  };
}

/** Σ x[i] y[i] for i ≥ from, with four accumulators (kept small so that V8 inlines it). */
function dot(x: Float64Array, y: Float64Array, from: number): number {
  const n = x.length;
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let i = from;
  for (; i + 3 < n; i += 4) {
    s0 += (x[i] as number) * (y[i] as number);
    s1 += (x[i + 1] as number) * (y[i + 1] as number);
    s2 += (x[i + 2] as number) * (y[i + 2] as number);
    s3 += (x[i + 3] as number) * (y[i + 3] as number);
  }
  for (; i < n; i++) s0 += (x[i] as number) * (y[i] as number);
  return s0 + s1 + s2 + s3;
}

/** y[i] += f x[i] for i ≥ from. */
function axpy(y: Float64Array, x: Float64Array, f: number, from: number): void {
  const n = x.length;
  for (let i = from; i < n; i++) y[i] = (y[i] as number) + f * (x[i] as number);
}

function hasNonZero(a: Float64Array, off: number, n: number): boolean {
  for (let i = 0; i < n; i++) if (a[off + i] !== 0) return true;
  return false;
}

function swap(arr: Int32Array, i: number, j: number): void {
  const t = arr[i] as number;
  arr[i] = arr[j] as number;
  arr[j] = t;
}
function swapF(arr: Float64Array, i: number, j: number): void {
  const t = arr[i] as number;
  arr[i] = arr[j] as number;
  arr[j] = t;
}

function invertUpperTriangular(r: Float64Array, p: number): Float64Array {
  const inv = new Float64Array(p * p);
  for (let j = 0; j < p; j++) {
    inv[j * p + j] = 1 / (r[j * p + j] as number);
    for (let i = j - 1; i >= 0; i--) {
      let s = 0;
      for (let k = i + 1; k <= j; k++) s += (r[i * p + k] as number) * (inv[k * p + j] as number);
      inv[i * p + j] = -s / (r[i * p + i] as number);
    }
  }
  return inv;
}

/**
 * For each column beyond the numerical rank, the columns it is a combination of: solve R₁₁ z = R₁₂ and keep
 * the entries that matter. Indices are the caller's (unpermuted) parameter indices.
 */
function dependentGroups(r: Float64Array, p: number, rank: number, perm: Int32Array): number[][] {
  const groups: number[][] = [];
  for (let c = rank; c < p; c++) {
    const z = new Float64Array(rank);
    for (let i = rank - 1; i >= 0; i--) {
      let s = r[i * p + c] as number;
      for (let j = i + 1; j < rank; j++) s -= (r[i * p + j] as number) * (z[j] as number);
      z[i] = s / (r[i * p + i] as number);
    }
    let zmax = 0;
    for (let i = 0; i < rank; i++) zmax = Math.max(zmax, Math.abs(z[i] as number));
    const group = [perm[c] as number];
    for (let i = 0; i < rank; i++)
      if (Math.abs(z[i] as number) > 1e-6 * Math.max(zmax, 1e-300)) group.push(perm[i] as number);
    groups.push(group);
  }
  return groups;
}

/**
 * κ₂(R) = σ_max/σ_min from the singular values of the p × p triangle, by one-sided Jacobi rotations
 * (Hestenes 1958; Demmel & Veselić, SIAM J. Matrix Anal. Appl. 13, 1204 (1992)), accurate for small p.
 */
export function triangularConditionNumber(r: Float64Array, p: number): number {
  const sv = singularValues(r, p, p);
  let max = 0;
  let min = Number.POSITIVE_INFINITY;
  for (const s of sv) {
    max = Math.max(max, s);
    min = Math.min(min, s);
  }
  return min > 0 ? max / min : Number.POSITIVE_INFINITY;
}

/** Singular values of a row-major m × n matrix (m ≥ n) by one-sided Jacobi on its columns. */
export function singularValues(m0: Float64Array, m: number, n: number): number[] {
  const u = Float64Array.from(m0);
  for (let sweep = 0; sweep < 60; sweep++) {
    let off = 0;
    for (let i = 0; i < n - 1; i++) {
      for (let j = i + 1; j < n; j++) {
        let alpha = 0;
        let beta = 0;
        let gamma = 0;
        for (let k = 0; k < m; k++) {
          const ui = u[k * n + i] as number;
          const uj = u[k * n + j] as number;
          alpha += ui * ui;
          beta += uj * uj;
          gamma += ui * uj;
        }
        if (gamma === 0) continue;
        const conv = Math.abs(gamma) / Math.sqrt(alpha * beta);
        off = Math.max(off, conv);
        if (conv < 1e-15) continue;
        const zeta = (beta - alpha) / (2 * gamma);
        const t = Math.sign(zeta || 1) / (Math.abs(zeta) + Math.sqrt(1 + zeta * zeta));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = c * t;
        for (let k = 0; k < m; k++) {
          const ui = u[k * n + i] as number;
          const uj = u[k * n + j] as number;
          u[k * n + i] = c * ui - s * uj;
          u[k * n + j] = s * ui + c * uj;
        }
      }
    }
    if (off < 1e-15) break;
  }
  const out: number[] = [];
  for (let j = 0; j < n; j++) {
    let ss = 0;
    for (let k = 0; k < m; k++) ss += (u[k * n + j] as number) ** 2;
    out.push(Math.sqrt(ss));
  }
  return out;
}

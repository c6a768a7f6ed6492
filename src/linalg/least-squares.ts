/**
 * Weighted linear least squares by Householder QR with column pivoting (Businger & Golub, Numer. Math. 7, 269
 * (1965); Golub & Van Loan, Matrix Computations, 4th ed., §5.4.2) on a column-scaled design.
 *
 * Rows are multiplied by √wᵢ, columns are scaled to unit Euclidean norm (equilibration: a column of x³ ≈ 10¹⁰
 * and a column of ones become comparable), then QR with pivoting reveals the numerical rank. The normal
 * equations are never formed. The covariance (AᵀWA)⁻¹ = S⁻¹P R⁻¹R⁻ᵀ PᵀS⁻¹ comes from the triangular factor.
 *
 * Line lists repeat their design rows (a transition measured again, by another instrument or in another scan):
 * when at most half the rows are distinct they are merged exactly (summed weights, weighted mean observations)
 * before the factorisation, and residuals, χ² and leverages are taken back to every row. Working copies live in
 * one reused buffer; stages: compressRows → pivotedQR (householderStep per column) → rank → backSubstitute →
 * covarianceFrom → residuals → leveragesOf.
 */

import { copyFloats, copyInts, floats, ints } from './small-arrays.js';
import { remembered, worthRemembering } from './solve-memo.js';
import { type RowSystem, reduceBySupport } from './support-blocks.js';

export interface LeastSquaresInput {
  /** Number of observations. */
  readonly rows: number;
  /** Number of parameters. */
  readonly cols: number;
  /**
   * Design matrix, column-major: element (i, j) at design[j * rows + i]; or its columns, each of length rows (a caller
   * that keeps its columns hands them over without copying them into one array). Not modified.
   */
  readonly design: Float64Array | Columns;
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
  /**
   * For a full-rank solve: the leverages and the condition number computed afterwards from the factors this solve
   * kept (the same operations as `leverage: true` and `conditionNumber: true` would have made, so the same bits),
   * for a trial fit that turns out to be the chosen one: it need not be solved again.
   */
  readonly later?: {
    leverages(): Float64Array;
    conditionNumber(): number;
  };
}

/** A design as its columns (each of length rows). */
export type Columns = readonly Float64Array[];

/** The columns of a design given either way (views into a column-major array, which copy nothing). */
function columnsOf(design: Float64Array | Columns, n: number, p: number): Columns {
  if (!(design instanceof Float64Array)) return design;
  const cols: Float64Array[] = [];
  for (let j = 0; j < p; j++) cols.push(design.subarray(j * n, j * n + n));
  return cols;
}

function sizeOf(design: Float64Array | Columns, n: number): number {
  if (design instanceof Float64Array) return design.length;
  let size = 0;
  for (const c of design) size += c.length === n ? n : Number.NaN;
  return size;
}

const EPS = 2.220446049250313e-16;

/**
 * Factorisations since the process started (a solve answered from a `rememberingSolves` scope's memo is not one):
 * read by `npm run bench` to price a whole fit in solves.
 */
export const solveCount = { value: 0 };

export function solveLeastSquares(input: LeastSquaresInput): LeastSquaresResult {
  const { rows: n, cols: p } = input;
  if (!worthRemembering(n, p)) return solvePlain(input);
  const design = columnsOf(input.design, n, p);
  const arrays = [...design, input.observations, ...(input.weights ? [input.weights] : [])];
  return handOut(
    remembered({ tag: `plain ${optionsTag(input)}`, arrays }, (own) =>
      keepingLater(
        solvePlain({
          ...input,
          design: own.slice(0, p) as Float64Array[],
          observations: own[p] as Float64Array,
          ...(input.weights ? { weights: own[p + 1] as Float64Array } : {}),
        }),
      ),
    ),
  );
}

/** The sizes and options of a solve, as the memo tells solves apart. */
function optionsTag(input: Omit<LeastSquaresInput, 'design'>): string {
  const { rows, cols, weights, leverage, rankTolerance, conditionNumber } = input;
  return `${rows} ${cols} ${weights ? 'w' : '-'} ${leverage === true} ${rankTolerance ?? '-'} ${conditionNumber !== false}`;
}

/** A remembered result with its later leverages and condition number computed once, for every caller. */
function keepingLater(r: LeastSquaresResult): LeastSquaresResult {
  const later = r.later;
  if (!later) return r;
  let leverages: Float64Array | undefined;
  let conditionNumber: number | undefined;
  return {
    ...r,
    later: {
      leverages: () => {
        leverages ??= later.leverages();
        return leverages;
      },
      conditionNumber: () => {
        conditionNumber ??= later.conditionNumber();
        return conditionNumber;
      },
    },
  };
}

/** A remembered result as one caller gets it: its own copies of every array (no caller sees another's changes). */
function handOut(r: LeastSquaresResult): LeastSquaresResult {
  const later = r.later;
  return {
    ...r,
    coefficients: copyFloats(r.coefficients),
    covariance: copyFloats(r.covariance),
    residuals: copyFloats(r.residuals),
    ...(r.leverages ? { leverages: copyFloats(r.leverages) } : {}),
    ...(later
      ? { later: { leverages: () => copyFloats(later.leverages()), conditionNumber: () => later.conditionNumber() } }
      : {}),
  };
}

function solvePlain(input: LeastSquaresInput): LeastSquaresResult {
  solveCount.value++;
  const { rows: n, cols: p, observations, weights } = input;
  const size = sizeOf(input.design, n);
  if (size !== n * p || observations.length !== n || (weights && weights.length !== n)) {
    throw new RangeError(`least squares: inconsistent sizes (rows ${n}, cols ${p}, design ${size})`);
  }
  if (n < p) throw new RangeError(`least squares: ${n} observations cannot determine ${p} parameters`);
  const design = columnsOf(input.design, n, p);
  // Repeated design rows (the same transition measured again) merge exactly into one row of summed weight.
  return solveSystem({ ...input, design }, compressRows(design, n, p, observations, weights));
}

/** Whether n rows of p columns with `distinct` different rows are merged before the factorisation. */
export function mergesRows(n: number, p: number, distinct: number): boolean {
  return n >= 64 && n >= 4 * p && distinct - 1 < n / 2;
}

/**
 * The same solve, with the design given by its distinct rows (`distinct`, count × cols, column-major) and each
 * row's index among them (`group`, numbered in order of first appearance): for a caller that knows which rows are
 * identical (the same transition measured again), so that it builds only the distinct rows and the kernel neither
 * hashes nor compares them. Where `mergesRows` says no, the full design is expanded and solved as
 * `solveLeastSquares` would. Same answers as `solveLeastSquares` on the full design when the groups are exactly
 * its identical rows.
 */
export function solveGroupedLeastSquares(input: GroupedInput): LeastSquaresResult {
  const { rows: n, cols: p, count: m } = input;
  if (!worthRemembering(n, p)) return solveGrouped(input);
  const distinct = columnsOf(input.distinct, m, p);
  const arrays = [...distinct, input.group, input.observations, ...(input.weights ? [input.weights] : [])];
  return handOut(
    remembered({ tag: `grouped ${m} ${optionsTag(input)}`, arrays }, (own) =>
      keepingLater(
        solveGrouped({
          ...input,
          distinct: own.slice(0, p) as Float64Array[],
          group: own[p] as Int32Array,
          observations: own[p + 1] as Float64Array,
          ...(input.weights ? { weights: own[p + 2] as Float64Array } : {}),
        }),
      ),
    ),
  );
}

type GroupedInput = Omit<LeastSquaresInput, 'design'> & {
  readonly distinct: Float64Array | Columns;
  readonly group: Int32Array;
  readonly count: number;
};

function solveGrouped(input: GroupedInput): LeastSquaresResult {
  const { rows: n, cols: p, group, count: m, observations, weights } = input;
  if (sizeOf(input.distinct, m) !== m * p || group.length !== n || observations.length !== n) {
    throw new RangeError(`least squares: inconsistent sizes (rows ${n}, cols ${p}, distinct rows ${m})`);
  }
  const distinct = columnsOf(input.distinct, m, p);
  if (!mergesRows(n, p, m)) {
    const design = distinct.map((c) => {
      const full = floats(n);
      for (let i = 0; i < n; i++) full[i] = c[group[i] as number] as number;
      return full;
    });
    return solvePlain({ ...input, design });
  }
  solveCount.value++;
  if (n < p) throw new RangeError(`least squares: ${n} observations cannot determine ${p} parameters`);
  return solveSystem(input, mergeGroups(distinct, m, group, observations, weights));
}

/** The system the QR factorises: the merged rows, or every row of the caller's design. */
type System = RowSystem;

function solveSystem(
  input: Omit<LeastSquaresInput, 'design'> & { readonly design?: Columns },
  merged: MergedRows | undefined,
): LeastSquaresResult {
  const { rows: n, cols: p, observations, weights } = input;
  const sys: System = merged ?? { rows: n, design: input.design as Columns, rowOf: undefined, observations, weights };
  const qr = factorise(sys, p);
  const { rdiag, r, perm, scale } = qr;
  // Numerical rank.
  const tol = (input.rankTolerance ?? Math.max(n, p) * EPS) * Math.abs(rdiag[0] as number);
  let rank = 0;
  while (rank < p && Math.abs(rdiag[rank] as number) > tol) rank++;
  if (rank < p) return rankDeficientResult(r, n, p, rank, perm);
  const conditionNumber = input.conditionNumber === false ? Number.NaN : triangularConditionNumber(r, p);
  const coefficients = backSubstitute(qr, p);
  const rinv = invertUpperTriangular(r, p);
  const covariance = covarianceFrom(rinv, perm, scale, p);
  const residuals = merged ? residualsByGroup(merged, observations, coefficients, p) : copyFloats(observations);
  if (!merged) subtractDesignTimes(residuals, sys.design, coefficients, n, p);
  // Every array these read is this solve's own or the caller's (never modified).
  const allLeverages = () => {
    const h = leveragesOf(sys.rows, p, sys.design, sys.rowOf, sys.weights, rinv, perm, scale);
    return merged ? spreadLeverages(h, merged, weights, n) : h;
  };
  const leverages = input.leverage ? allLeverages() : undefined;
  return {
    rank,
    rankDeficient: false,
    dependencies: [],
    coefficients,
    covariance,
    residuals,
    chiSquare: weightedSquares(residuals, weights),
    conditionNumber,
    ...(leverages ? { leverages } : {}),
    later: {
      leverages: () => leverages ?? allLeverages(),
      conditionNumber: () => (Number.isNaN(conditionNumber) ? triangularConditionNumber(r, p) : conditionNumber),
    },
  };
}

/**
 * The pivoted QR of the system, over its rows reduced set by set (`reduceBySupport`) where that halves the work: the
 * scale is then the original columns' weighted norms times the reduced columns' (which are 1 in exact arithmetic).
 */
function factorise(sys: System, p: number): Factorisation {
  const reduced = reduceBySupport(sys, p);
  if (!reduced) return pivotedQR(sys.rows, p, sys.design, sys.rowOf, sys.observations, sys.weights);
  const qr = pivotedQR(reduced.rows, p, reduced.design, undefined, reduced.observations, undefined);
  const scale = qr.scale;
  for (let j = 0; j < p; j++) scale[j] = (scale[j] as number) * (reduced.scale[j] as number);
  return qr;
}

/** A rank-deficient solve: the dependent groups, an infinite condition number, NaN everywhere else. */
function rankDeficientResult(
  r: Float64Array,
  n: number,
  p: number,
  rank: number,
  perm: Int32Array,
): LeastSquaresResult {
  return {
    rank,
    rankDeficient: true,
    dependencies: dependentGroups(r, p, rank, perm),
    coefficients: floats(p).fill(Number.NaN),
    covariance: floats(p * p).fill(Number.NaN),
    residuals: floats(n).fill(Number.NaN),
    chiSquare: Number.NaN,
    conditionNumber: Number.POSITIVE_INFINITY,
  };
}

/**
 * The least-squares problem min ‖A x − b‖ reduced to p rows: A = Q M and c = (Qᵀb)[0:p], M (p × p, column-major,
 * in the caller's column order) from the pivoted QR. Any problem that appends rows to A (a Levenberg–Marquardt
 * damping √λD, for every λ tried) can then be solved as [M; √λD] x = [c; 0] without factorising A again.
 */
export function reduceToTriangle(
  rows: number,
  cols: number,
  design: Float64Array,
  observations: Float64Array,
): { readonly m: Float64Array; readonly c: Float64Array } {
  const qr = pivotedQR(rows, cols, columnsOf(design, rows, cols), undefined, observations, undefined);
  const m = floats(cols * cols);
  for (let k = 0; k < cols; k++) {
    const j = qr.perm[k] as number;
    const sj = qr.scale[j] as number;
    for (let i = 0; i <= k; i++) m[j * cols + i] = (qr.r[i * cols + k] as number) * sj;
  }
  return { m, c: copyFloats(qr.b.subarray(0, cols)) };
}

/**
 * One grow-only buffer for the working copies of every solve (the kernel is synchronous and never re-entered, so
 * consecutive solves share it); results are always fresh arrays.
 */
let pool = new Float64Array(0);
function workspace(length: number): Float64Array {
  if (pool.length < length) pool = new Float64Array(Math.max(length, Math.ceil(pool.length * 1.5)));
  return pool;
}

interface Factorisation {
  /** Householder vectors below the diagonal, R above it, column-major rows × cols (in the shared workspace). */
  readonly a: Float64Array;
  /** Qᵀ √W y. */
  readonly b: Float64Array;
  readonly rdiag: Float64Array;
  /** R (upper triangular cols × cols, row-major) in pivoted order. */
  readonly r: Float64Array;
  readonly perm: Int32Array;
  /** Euclidean norm of each weighted design column (1 for an all-zero column). */
  readonly scale: Float64Array;
}

/** Weighted, column-scaled working copy, then Householder QR with column pivoting (norm downdates as LAPACK xGEQP3). */
function pivotedQR(
  n: number,
  p: number,
  design: Columns,
  rowOf: Int32Array | undefined,
  observations: Float64Array,
  weights: Float64Array | undefined,
): Factorisation {
  const buf = workspace(n * p + 2 * n);
  const a = buf.subarray(0, n * p);
  const b = buf.subarray(n * p, n * p + n);
  const sw = buf.subarray(n * p + n, n * p + 2 * n);
  for (let i = 0; i < n; i++) {
    const s = weights ? Math.sqrt(weights[i] as number) : 1;
    sw[i] = s;
    b[i] = (observations[i] as number) * s;
  }
  const scale = scaledCopy(a, design, rowOf, sw, n, p);
  const perm = ints(p);
  const colNorm = floats(p);
  const colNormRef = floats(p);
  for (let j = 0; j < p; j++) {
    perm[j] = j;
    // Columns were just scaled to unit norm (or are all zero).
    colNorm[j] = scale[j] === 1 && !hasNonZero(a, j * n, n) ? 0 : 1;
    colNormRef[j] = colNorm[j] as number;
  }
  const rdiag = floats(p);
  for (let k = 0; k < p; k++) {
    let best = k;
    for (let j = k + 1; j < p; j++) if ((colNorm[j] as number) > (colNorm[best] as number)) best = j;
    if (best !== k) {
      for (let i = 0; i < n; i++) {
        const t = a[k * n + i] as number;
        a[k * n + i] = a[best * n + i] as number;
        a[best * n + i] = t;
      }
      swap(perm, k, best);
      swapF(colNorm, k, best);
      swapF(colNormRef, k, best);
    }
    rdiag[k] = householderStep(a, b, n, p, k, colNorm, colNormRef);
  }
  const r = floats(p * p);
  for (let i = 0; i < p; i++) {
    r[i * p + i] = rdiag[i] as number;
    for (let j = i + 1; j < p; j++) r[i * p + j] = a[j * n + i] as number;
  }
  return { a, b, rdiag, r, perm, scale };
}

/**
 * a = design · diag(√w) with unit-norm columns (row i of a is row rowOf[i] of the design, or row i without rowOf);
 * returns the column norms (1 for an all-zero column).
 */
function scaledCopy(
  a: Float64Array,
  design: Columns,
  rowOf: Int32Array | undefined,
  sw: Float64Array,
  n: number,
  p: number,
): Float64Array {
  const scale = floats(p);
  for (let j = 0; j < p; j++) {
    const off = j * n;
    const c = design[j] as Float64Array;
    let ss = 0;
    if (rowOf)
      for (let i = 0; i < n; i++) {
        const v = (c[rowOf[i] as number] as number) * (sw[i] as number);
        a[off + i] = v;
        ss += v * v;
      }
    else
      for (let i = 0; i < n; i++) {
        const v = (c[i] as number) * (sw[i] as number);
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
  return scale;
}

/**
 * Reflector k: H = I − β v vᵀ with v = x − αe₁ stored in place of column k, α = −sign(x₁)‖x‖, applied to the
 * columns right of k and to b; the remaining column norms are downdated. Returns α, the diagonal of R.
 */
function householderStep(
  a: Float64Array,
  b: Float64Array,
  n: number,
  p: number,
  k: number,
  colNorm: Float64Array,
  colNormRef: Float64Array,
): number {
  const off = k * n;
  let ss = 0;
  let nonZero = 0;
  for (let i = k; i < n; i++) {
    const x = a[off + i] as number;
    ss += x ** 2;
    if (x !== 0) nonZero++;
  }
  let alpha = Math.sqrt(ss);
  if (alpha === 0) return 0;
  if ((a[off + k] as number) > 0) alpha = -alpha;
  a[off + k] = (a[off + k] as number) - alpha;
  // 2 / vᵀv with vᵀv = −2α·v₁ (v₁ = x₁ − α), which avoids cancellation.
  const beta = -1 / (alpha * (a[off + k] as number));
  let j = k + 1;
  if (4 * (nonZero + 1) <= 3 * (n - k)) {
    const support = supportOf(a, off, n, k);
    for (; j < p; j++) reflectSparse(a, j * n, a, off, support, n, k, beta);
    reflectSparse(b, 0, a, off, support, n, k, beta);
  } else {
    for (; j + 3 < p; j += 4) reflectFour(a, j * n, off, n, k, beta);
    for (; j < p; j++) reflect(a, j * n, a, off, n, k, beta);
    reflect(b, 0, a, off, n, k, beta);
  }
  for (j = k + 1; j < p; j++) downdateNorm(a, n, k, j, colNorm, colNormRef);
  return alpha;
}

/** The rows i ≥ k where reflector k (at `off`) is non-zero, ascending (in the shared integer workspace). */
function supportOf(a: Float64Array, off: number, n: number, k: number): Int32Array {
  const rows = intWorkspace(n - k);
  let count = 0;
  for (let i = k; i < n; i++) if (a[off + i] !== 0) rows[count++] = i;
  return rows.subarray(0, count);
}

/**
 * `reflect` over the rows where the reflector is non-zero (`support`): each product goes to the partial sum `reflect`
 * puts it in ((i − k) mod 4 in its blocks of four, the first for the rows after them), and the terms left out are
 * v_i·y_i = ±0, which change no sum (each starts at +0 and +0 + −0 = +0); y_i + f·0 = y_i, up to the sign of a zero
 * y_i, which no later step reads as anything but zero.
 */
function reflectSparse(
  y: Float64Array,
  oy: number,
  v: Float64Array,
  ov: number,
  support: Int32Array,
  n: number,
  k: number,
  beta: number,
) {
  const blocks = k + 4 * Math.floor((n - k) / 4);
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  for (let t = 0; t < support.length; t++) {
    const i = support[t] as number;
    const term = (v[ov + i] as number) * (y[oy + i] as number);
    const slot = i < blocks ? (i - k) & 3 : 0;
    if (slot === 0) s0 += term;
    else if (slot === 1) s1 += term;
    else if (slot === 2) s2 += term;
    else s3 += term;
  }
  const f = -(s0 + s1 + s2 + s3) * beta;
  for (let t = 0; t < support.length; t++) {
    const i = support[t] as number;
    y[oy + i] = (y[oy + i] as number) + f * (v[ov + i] as number);
  }
}

/** Norm downdate of the remaining part of column j after step k, recomputed when too much has cancelled. */
function downdateNorm(
  a: Float64Array,
  n: number,
  k: number,
  j: number,
  colNorm: Float64Array,
  colNormRef: Float64Array,
) {
  const oj = j * n;
  const rkj = a[oj + k] as number;
  const cn = colNorm[j] as number;
  if (cn > 0) {
    const t = Math.max(1 - (rkj / cn) ** 2, 0);
    const ratio = cn / (colNormRef[j] as number);
    if (t * ratio * ratio <= Math.sqrt(EPS)) {
      let s2 = 0;
      for (let i = k + 1; i < n; i++) s2 += (a[oj + i] as number) ** 2;
      colNorm[j] = Math.sqrt(s2);
      colNormRef[j] = colNorm[j] as number;
    } else {
      colNorm[j] = cn * Math.sqrt(t);
    }
  }
}

/**
 * `reflect` on the four consecutive columns of `a` starting at oy (each n long), reflector at ov: each column's sums
 * and updates are those `reflect` makes, in the same order, so the same bits; the reflector is read once for four.
 */
function reflectFour(a: Float64Array, oy: number, ov: number, n: number, k: number, beta: number) {
  const dots = fourDots(a, oy, ov, n, k);
  const fa = -(dots[0] as number) * beta;
  const fb = -(dots[1] as number) * beta;
  const fc = -(dots[2] as number) * beta;
  const fd = -(dots[3] as number) * beta;
  const o1 = oy + n;
  const o2 = o1 + n;
  const o3 = o2 + n;
  for (let t = k; t < n; t++) {
    const v = a[ov + t] as number;
    a[oy + t] = (a[oy + t] as number) + fa * v;
    a[o1 + t] = (a[o1 + t] as number) + fb * v;
    a[o2 + t] = (a[o2 + t] as number) + fc * v;
    a[o3 + t] = (a[o3 + t] as number) + fd * v;
  }
}

/** The reflector's dot products with four consecutive columns, each summed as `reflect` sums it (a shared scratch). */
function fourDots(a: Float64Array, oy: number, ov: number, n: number, k: number): Float64Array {
  const o1 = oy + n;
  const o2 = o1 + n;
  const o3 = o2 + n;
  let a0 = 0;
  let a1 = 0;
  let a2 = 0;
  let a3 = 0;
  let b0 = 0;
  let b1 = 0;
  let b2 = 0;
  let b3 = 0;
  let c0 = 0;
  let c1 = 0;
  let c2 = 0;
  let c3 = 0;
  let d0 = 0;
  let d1 = 0;
  let d2 = 0;
  let d3 = 0;
  let i = k;
  for (; i + 3 < n; i += 4) {
    const v0 = a[ov + i] as number;
    const v1 = a[ov + i + 1] as number;
    const v2 = a[ov + i + 2] as number;
    const v3 = a[ov + i + 3] as number;
    a0 += v0 * (a[oy + i] as number);
    a1 += v1 * (a[oy + i + 1] as number);
    a2 += v2 * (a[oy + i + 2] as number);
    a3 += v3 * (a[oy + i + 3] as number);
    b0 += v0 * (a[o1 + i] as number);
    b1 += v1 * (a[o1 + i + 1] as number);
    b2 += v2 * (a[o1 + i + 2] as number);
    b3 += v3 * (a[o1 + i + 3] as number);
    c0 += v0 * (a[o2 + i] as number);
    c1 += v1 * (a[o2 + i + 1] as number);
    c2 += v2 * (a[o2 + i + 2] as number);
    c3 += v3 * (a[o2 + i + 3] as number);
    d0 += v0 * (a[o3 + i] as number);
    d1 += v1 * (a[o3 + i + 1] as number);
    d2 += v2 * (a[o3 + i + 2] as number);
    d3 += v3 * (a[o3 + i + 3] as number);
  }
  for (; i < n; i++) {
    const v = a[ov + i] as number;
    a0 += v * (a[oy + i] as number);
    b0 += v * (a[o1 + i] as number);
    c0 += v * (a[o2 + i] as number);
    d0 += v * (a[o3 + i] as number);
  }
  dotScratch[0] = a0 + a1 + a2 + a3;
  dotScratch[1] = b0 + b1 + b2 + b3;
  dotScratch[2] = c0 + c1 + c2 + c3;
  dotScratch[3] = d0 + d1 + d2 + d3;
  return dotScratch;
}
const dotScratch = new Float64Array(4);

/** y[oy + i] −= β (v·y) v[ov + i] for i ≥ k: one reflector applied to one column (four accumulators in the dot). */
function reflect(y: Float64Array, oy: number, v: Float64Array, ov: number, n: number, k: number, beta: number) {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let i = k;
  for (; i + 3 < n; i += 4) {
    s0 += (v[ov + i] as number) * (y[oy + i] as number);
    s1 += (v[ov + i + 1] as number) * (y[oy + i + 1] as number);
    s2 += (v[ov + i + 2] as number) * (y[oy + i + 2] as number);
    s3 += (v[ov + i + 3] as number) * (y[oy + i + 3] as number);
  }
  for (; i < n; i++) s0 += (v[ov + i] as number) * (y[oy + i] as number);
  const f = -(s0 + s1 + s2 + s3) * beta;
  let t = k;
  for (; t + 3 < n; t += 4) {
    y[oy + t] = (y[oy + t] as number) + f * (v[ov + t] as number);
    y[oy + t + 1] = (y[oy + t + 1] as number) + f * (v[ov + t + 1] as number);
    y[oy + t + 2] = (y[oy + t + 2] as number) + f * (v[ov + t + 2] as number);
    y[oy + t + 3] = (y[oy + t + 3] as number) + f * (v[ov + t + 3] as number);
  }
  for (; t < n; t++) y[oy + t] = (y[oy + t] as number) + f * (v[ov + t] as number);
}

/** Back substitution R z = (Qᵀb)[0:p], unpermuted and unscaled. */
function backSubstitute(qr: Factorisation, p: number): Float64Array {
  const { r, b, perm, scale } = qr;
  const z = floats(p);
  for (let i = p - 1; i >= 0; i--) {
    let s = b[i] as number;
    for (let j = i + 1; j < p; j++) s -= (r[i * p + j] as number) * (z[j] as number);
    z[i] = s / (r[i * p + i] as number);
  }
  const coefficients = floats(p);
  for (let k = 0; k < p; k++) {
    const j = perm[k] as number;
    coefficients[j] = (z[k] as number) / (scale[j] as number);
  }
  return coefficients;
}

/** (AᵀWA)⁻¹ = S⁻¹P R⁻¹R⁻ᵀ PᵀS⁻¹, row-major. */
function covarianceFrom(rinv: Float64Array, perm: Int32Array, scale: Float64Array, p: number): Float64Array {
  const covariance = floats(p * p);
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
  return covariance;
}

/** y −= A x, column by column (contiguous access in the column-major design). */
function subtractDesignTimes(y: Float64Array, design: Columns, x: Float64Array, n: number, p: number) {
  for (let j = 0; j < p; j++) {
    const col = design[j] as Float64Array;
    const c = x[j] as number;
    for (let i = 0; i < n; i++) y[i] = (y[i] as number) - (col[i] as number) * c;
  }
}

/** Σ wᵢ eᵢ² (wᵢ = 1 without weights), summed in row order. */
function weightedSquares(e: Float64Array, weights: Float64Array | undefined): number {
  let sum = 0;
  if (weights) for (let i = 0; i < e.length; i++) sum += (e[i] as number) * (e[i] as number) * (weights[i] as number);
  else for (let i = 0; i < e.length; i++) sum += (e[i] as number) * (e[i] as number);
  return sum;
}

/**
 * hᵢᵢ = ‖row i of Ã R⁻¹‖², Ã the weighted, scaled, permuted design, one row at a time: entry c of the row is
 * Σ_{k ≤ c} ã_ik (R⁻¹)_kc, summed in ascending k; a zero ã_ik (most entries of a level model's row) adds nothing and is
 * skipped, which leaves every sum as it was (it starts at +0 and the terms are finite).
 */
function leveragesOf(
  n: number,
  p: number,
  design: Columns,
  rowOf: Int32Array | undefined,
  weights: Float64Array | undefined,
  rinv: Float64Array,
  perm: Int32Array,
  scale: Float64Array,
): Float64Array {
  const leverages = floats(n);
  const f = workspace(p * p + p);
  const s = f.subarray(p * p, p * p + p);
  const cols: Float64Array[] = [];
  for (let k = 0; k < p; k++) {
    const sk = scale[perm[k] as number] as number;
    for (let c = k; c < p; c++) f[k * p + c] = (rinv[k * p + c] as number) / sk;
    cols.push(design[perm[k] as number] as Float64Array);
  }
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < p; c++) s[c] = 0;
    const row = rowOf ? (rowOf[i] as number) : i;
    for (let k = 0; k < p; k++) {
      const a = (cols[k] as Float64Array)[row] as number;
      if (a === 0) continue;
      for (let c = k; c < p; c++) {
        const fkc = f[k * p + c] as number;
        if (fkc !== 0) s[c] = (s[c] as number) + a * fkc;
      }
    }
    let h = 0;
    for (let c = 0; c < p; c++) h += (s[c] as number) ** 2;
    leverages[i] = weights ? h * (weights[i] as number) : h;
  }
  return leverages;
}

/** Rows merged from identical design rows: Σw and the weighted mean of y, and the merged row of each input row. */
interface MergedRows {
  readonly rows: number;
  /** The merged rows: row rowOf[g] of `design`, or row g without rowOf. */
  readonly design: Columns;
  readonly rowOf: Int32Array | undefined;
  readonly observations: Float64Array;
  readonly weights: Float64Array;
  readonly group: Int32Array;
}

/**
 * Identical design rows merged exactly: Σᵢ wᵢ(yᵢ − xβ)² = W(ȳ − xβ)² + a constant, W = Σwᵢ, ȳ = Σwᵢyᵢ / W, so the
 * coefficients, covariance and R are those of the full system. Worth it only when rows repeat (at most half the
 * rows distinct); otherwise undefined.
 */
function compressRows(
  design: Columns,
  n: number,
  p: number,
  observations: Float64Array,
  weights: Float64Array | undefined,
): MergedRows | undefined {
  if (n < 64 || n < 4 * p) return undefined;
  const groups = groupsOfRows(design, n, p, n / 2);
  if (!groups) return undefined;
  // Each merged row is read from the design at its first row (not copied).
  return mergeGroups(design, groups.firstRow.length, groups.group, observations, weights, copyInts(groups.firstRow));
}

/** The merged system of `m` distinct rows: Σw and the weighted mean of y per group, in the rows' order. */
function mergeGroups(
  design: Columns,
  m: number,
  group: Int32Array,
  observations: Float64Array,
  weights: Float64Array | undefined,
  rowOf?: Int32Array,
): MergedRows {
  const n = group.length;
  const w = floats(m);
  const wy = floats(m);
  for (let i = 0; i < n; i++) {
    const g = group[i] as number;
    const wi = weights ? (weights[i] as number) : 1;
    w[g] = (w[g] as number) + wi;
    wy[g] = (wy[g] as number) + wi * (observations[i] as number);
  }
  for (let g = 0; g < m; g++) wy[g] = (w[g] as number) > 0 ? (wy[g] as number) / (w[g] as number) : 0;
  return { rows: m, design, rowOf, observations: wy, weights: w, group };
}

/** One grow-only integer buffer for the grouping's scratch (first rows, hashes, table), as `workspace`. */
let intPool = new Int32Array(0);
function intWorkspace(length: number): Int32Array {
  if (intPool.length < length) intPool = new Int32Array(Math.max(length, Math.ceil(intPool.length * 1.5)));
  return intPool;
}

/** One entry's 64 bits as two 32-bit words (shared scratch: the kernel is synchronous). */
const entry = new Float64Array(1);
const entryWords = new Int32Array(entry.buffer);

/**
 * Hash of row i from the bits of its entries: the low and the high words in two independent multiply-xor chains (so
 * that neither waits for the other), then the final avalanche of MurmurHash3 (Appleby). The sign bit is left out so
 * that 0 and −0, which compare equal, hash alike.
 */
function rowHash(design: Columns, p: number, i: number): number {
  let lo = 0x811c9dc5 | 0;
  let hi = 0x2545f491;
  for (let j = 0; j < p; j++) {
    entry[0] = (design[j] as Float64Array)[i] as number;
    lo = Math.imul(lo ^ (entryWords[0] as number), 0x01000193);
    hi = Math.imul(hi ^ ((entryWords[1] as number) & 0x7fffffff), 0x9e3779b1);
  }
  let h = lo ^ ((hi << 16) | (hi >>> 16));
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  return h ^ (h >>> 16);
}

function sameRow(design: Columns, p: number, a: number, b: number): boolean {
  for (let j = 0; j < p; j++) {
    const c = design[j] as Float64Array;
    if (c[a] !== c[b]) return false;
  }
  return true;
}

/** Length of the table for at most `most` groups: the power of two the doublings stop at. */
function tableLength(most: number): number {
  let size = 64;
  while (2 * most >= size) size *= 2;
  return size;
}

/** The open-addressing table of `m` groups re-filled at `size` slots from the groups' hashes. */
function refill(slots: Int32Array, hashes: Int32Array, m: number, size: number): void {
  slots.fill(-1, 0, size);
  for (let g = 0; g < m; g++) {
    let s = (hashes[g] as number) & (size - 1);
    while ((slots[s] as number) >= 0) s = (s + 1) & (size - 1);
    slots[s] = g;
  }
}

/**
 * Rows grouped exactly, in one pass: each row is compared entry by entry with the first row of a group it may
 * belong to (identical rows only share a group). Rows repeat in runs and in cycles (a list sorted by position, a
 * band scanned again), so the group that followed the previous row's group last time and the previous row's group
 * are tried first; otherwise the row's hash finds its candidates in an open-addressing table of group numbers
 * (`HashedGroups`). Returns each row's group (numbered in order of first appearance) and each group's first row (a
 * view into the integer workspace, valid until the next grouping); undefined once there are more than `most` groups.
 */
function groupsOfRows(design: Columns, n: number, p: number, most: number) {
  const table = new HashedGroups(design, p, most);
  const { firstRow, successor } = table;
  const group = ints(n);
  let prev = -1;
  for (let i = 0; i < n; i++) {
    let g = prev >= 0 ? (successor[prev] as number) : -1;
    if (g < 0 || !sameRow(design, p, firstRow[g] as number, i)) {
      g = prev >= 0 && sameRow(design, p, firstRow[prev] as number, i) ? prev : table.groupOf(i);
      if (g < 0) return undefined;
      if (prev >= 0) successor[prev] = g;
    }
    group[i] = g;
    prev = g;
  }
  return { group, firstRow: firstRow.subarray(0, table.count) };
}

/**
 * Groups of identical rows found by hashing: each group's first row, its hash and the group that last followed it
 * (-1 before any), in the integer workspace; the table of group numbers doubles as groups appear.
 */
class HashedGroups {
  count = 0;
  private size = 64;
  readonly firstRow: Int32Array;
  readonly successor: Int32Array;
  private readonly hashes: Int32Array;
  private readonly slots: Int32Array;
  constructor(
    private readonly design: Columns,
    private readonly p: number,
    private readonly most: number,
  ) {
    const cap = Math.floor(most) + 1;
    const scratch = intWorkspace(3 * cap + tableLength(cap));
    this.firstRow = scratch.subarray(0, cap);
    this.successor = scratch.subarray(cap, 2 * cap).fill(-1);
    this.hashes = scratch.subarray(2 * cap, 3 * cap);
    this.slots = scratch.subarray(3 * cap);
    this.slots.fill(-1, 0, this.size);
  }
  /** The group of row i, a new one if no group's first row equals it; -1 past `most` groups. */
  groupOf(i: number): number {
    const { design, p, slots, hashes, firstRow } = this;
    const hash = rowHash(design, p, i);
    let s = hash & (this.size - 1);
    let g = slots[s] as number;
    while (g >= 0 && ((hashes[g] as number) !== hash || !sameRow(design, p, firstRow[g] as number, i))) {
      s = (s + 1) & (this.size - 1);
      g = slots[s] as number;
    }
    if (g >= 0) return g;
    if (this.count >= this.most) return -1;
    g = this.count++;
    firstRow[g] = i;
    hashes[g] = hash;
    slots[s] = g;
    if (2 * this.count > this.size) {
      this.size *= 2;
      refill(slots, hashes, this.count, this.size);
    }
    return g;
  }
}

/** yᵢ − (Ax)ᵢ for every row, (Ax)ᵢ taken from its merged row (identical design rows give identical fits). */
function residualsByGroup(merged: MergedRows, observations: Float64Array, x: Float64Array, p: number): Float64Array {
  const { rows: m, rowOf } = merged;
  const fitted = floats(m);
  for (let j = 0; j < p; j++) {
    const col = merged.design[j] as Float64Array;
    const c = x[j] as number;
    if (rowOf) for (let g = 0; g < m; g++) fitted[g] = (fitted[g] as number) + (col[rowOf[g] as number] as number) * c;
    else for (let g = 0; g < m; g++) fitted[g] = (fitted[g] as number) + (col[g] as number) * c;
  }
  const residuals = floats(observations.length);
  for (let i = 0; i < residuals.length; i++)
    residuals[i] = (observations[i] as number) - (fitted[merged.group[i] as number] as number);
  return residuals;
}

/** A row's share of its merged row's leverage is its share of the merged weight: hᵢ = (h_g / W_g) wᵢ. */
function spreadLeverages(
  h: Float64Array,
  merged: MergedRows,
  weights: Float64Array | undefined,
  n: number,
): Float64Array {
  const m = merged.rows;
  const perWeight = workspace(m).subarray(0, m);
  for (let g = 0; g < m; g++) {
    const wg = merged.weights[g] as number;
    perWeight[g] = wg > 0 ? (h[g] as number) / wg : 0;
  }
  const out = floats(n);
  const group = merged.group;
  if (weights) for (let i = 0; i < n; i++) out[i] = (perWeight[group[i] as number] as number) * (weights[i] as number);
  else for (let i = 0; i < n; i++) out[i] = perWeight[group[i] as number] as number;
  return out;
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
  const inv = floats(p * p);
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
    const z = floats(rank);
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
 * κ₂(R) = σ_max/σ_min from the singular values of the p × p triangle, by one-sided Jacobi rotations (Hestenes 1958;
 * Demmel & Veselić, SIAM J. Matrix Anal. Appl. 13, 1204 (1992)) on the rows of R, which column pivoting leaves
 * nearly orthogonal (fewer sweeps than on its columns); accurate for small p.
 */
export function triangularConditionNumber(r: Float64Array, p: number): number {
  // Row i of the row-major R is column i of Rᵀ, whose singular values are R's.
  const u = copyFloats(r);
  const d = floats(p);
  rotateToOrthogonal(u, d, p, p, true);
  let max = 0;
  let min = Number.POSITIVE_INFINITY;
  for (let j = 0; j < p; j++) {
    const s = Math.sqrt(d[j] as number);
    max = Math.max(max, s);
    min = Math.min(min, s);
  }
  return min > 0 ? max / min : Number.POSITIVE_INFINITY;
}

/** Singular values of a row-major m × n matrix (m ≥ n) by one-sided Jacobi on its columns. */
export function singularValues(m0: Float64Array, m: number, n: number): number[] {
  // Column j of the row-major matrix, made contiguous (at j·m).
  const u = floats(m * n);
  for (let k = 0; k < m; k++) for (let j = 0; j < n; j++) u[j * m + k] = m0[k * n + j] as number;
  const d = floats(n);
  rotateToOrthogonal(u, d, m, n, false);
  const out: number[] = [];
  for (let j = 0; j < n; j++) out.push(Math.sqrt(d[j] as number));
  return out;
}

/** Σₖ u[a + k]·u[b + k] for k < m. */
function dotAt(u: Float64Array, a: number, b: number, m: number): number {
  let s = 0;
  for (let k = 0; k < m; k++) s += (u[a + k] as number) * (u[b + k] as number);
  return s;
}

/**
 * One-sided Jacobi on the n columns of length m of `u` (column j at j·m), rotated in place until every pair is
 * orthogonal to 1e-15; `d` receives the squared column norms (the squared singular values). With `updateNorms` the
 * norms are summed at the start of each sweep and, within it, those of a rotated pair updated (α − tγ, β + tγ);
 * without, both are summed again for every pair.
 */
function rotateToOrthogonal(u: Float64Array, d: Float64Array, m: number, n: number, updateNorms: boolean): void {
  for (let sweep = 0; sweep < 60; sweep++) {
    if (updateNorms) for (let j = 0; j < n; j++) d[j] = dotAt(u, j * m, j * m, m);
    let off = 0;
    for (let i = 0; i < n - 1; i++) {
      for (let j = i + 1; j < n; j++) {
        const gamma = dotAt(u, i * m, j * m, m);
        if (gamma === 0) continue;
        const alpha = updateNorms ? (d[i] as number) : dotAt(u, i * m, i * m, m);
        const beta = updateNorms ? (d[j] as number) : dotAt(u, j * m, j * m, m);
        const conv = Math.abs(gamma) / Math.sqrt(alpha * beta);
        off = Math.max(off, conv);
        if (conv < 1e-15) continue;
        const zeta = (beta - alpha) / (2 * gamma);
        const t = Math.sign(zeta || 1) / (Math.abs(zeta) + Math.sqrt(1 + zeta * zeta));
        rotatePair(u, i * m, j * m, m, t);
        d[i] = alpha - t * gamma;
        d[j] = beta + t * gamma;
      }
    }
    if (off < 1e-15) break;
  }
  for (let j = 0; j < n; j++) d[j] = dotAt(u, j * m, j * m, m);
}

/** The plane rotation of tangent t on columns a and b of length m: (uₐ, u_b) ← (c·uₐ − s·u_b, s·uₐ + c·u_b). */
function rotatePair(u: Float64Array, a: number, b: number, m: number, t: number): void {
  const c = 1 / Math.sqrt(1 + t * t);
  const s = c * t;
  for (let k = 0; k < m; k++) {
    const ua = u[a + k] as number;
    const ub = u[b + k] as number;
    u[a + k] = c * ua - s * ub;
    u[b + k] = s * ua + c * ub;
  }
}

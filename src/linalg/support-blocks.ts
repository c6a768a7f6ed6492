/**
 * Rows that share their non-zero columns, each set reduced to a triangle before the pivoted QR.
 *
 * A level model's row has entries only in the columns of its two levels (and its source's offset): every line of one
 * band, and one source, has the same few non-zero columns. An orthogonal transformation of the rows of such a set
 * (Householder QR of its n_g × s_g block, Golub & Van Loan, Matrix Computations, 4th ed., §5.2) leaves the least-squares
 * problem as it was: the same coefficients, covariance, R up to the signs of its rows and the same column norms (which
 * the pivoting reads), in exact arithmetic. So a set of n_g rows becomes min(n_g, s_g) rows, and the QR of the whole
 * design runs over Σ min(n_g, s_g) rows instead of n: a hot CO list of 2 300 lines in 30 bands and 86 level columns
 * is reduced to about 300 rows. Householder QR without pivoting is backward stable column by column (Higham, Accuracy
 * and Stability of Numerical Algorithms, 2nd ed., Thm 19.4), and the rows are weighted and the columns scaled to unit
 * norm over the whole design first, as the QR that follows would scale them.
 *
 * What the reduced rows cannot give (each line's residual, χ², leverage) the caller takes from the original rows
 * with the coefficients and R⁻¹. Used only where the estimate of the work says it halves it or better; the answers
 * then differ from the plain QR's in the last bits.
 */

import type { Columns } from './least-squares.js';
import { floats, ints } from './small-arrays.js';

/** The rows a solve factorises: row i is row rowOf[i] of the design's columns (row i without rowOf), weighted. */
export interface RowSystem {
  readonly rows: number;
  readonly design: Columns;
  readonly rowOf: Int32Array | undefined;
  readonly observations: Float64Array;
  readonly weights: Float64Array | undefined;
}

/** The reduced system: rows √W-weighted with columns scaled by `scale` (each original column's weighted norm). */
export interface ReducedRows {
  readonly rows: number;
  /** The reduced design's columns, each of length `rows` (in this module's reused buffer: read before the next call). */
  readonly design: Columns;
  /** Qᵀ √W y of the reduced rows. */
  readonly observations: Float64Array;
  /** The weighted Euclidean norm of each design column over all the original rows (1 for an all-zero column). */
  readonly scale: Float64Array;
}

/** Work below which nothing is reduced (n·p², in multiply-adds): a kernel solve under ~20 µs. */
const LEAST_WORK = 1 << 17;

/** Rows grouped by their set of non-zero columns, in order of first appearance. */
interface SupportSets {
  readonly count: number;
  /** Each row's set. */
  readonly set: Int32Array;
  /** Each set's rows, consecutive (`rowsOf` from `start[g]` to `start[g + 1]`), in row order. */
  readonly start: Int32Array;
  readonly rowsOf: Int32Array;
  /** Each set's columns, consecutive (`columns` from `colStart[g]` to `colStart[g + 1]`), ascending. */
  readonly colStart: Int32Array;
  readonly columns: Int32Array;
}

/**
 * The system reduced set by set, or undefined where that would not halve the work of the QR (few rows per set, or
 * sets as wide as the design) or the design is small.
 */
export function reduceBySupport(system: RowSystem, p: number): ReducedRows | undefined {
  const { rows: n, design, rowOf, observations, weights } = system;
  if (n * p * p < LEAST_WORK || n < 2 * p) return undefined;
  const sets = supportSets(n, p, design, rowOf);
  if (!sets || !halvesTheWork(sets, n, p)) return undefined;
  const sw = scratchFloats(0, n);
  for (let i = 0; i < n; i++) sw[i] = weights ? Math.sqrt(weights[i] as number) : 1;
  const scale = weightedNorms(sets, p, design, rowOf, sw);
  const rows = reducedRowCount(sets);
  const buf = scratchFloats(1, rows * (p + 1)).fill(0);
  const cols: Float64Array[] = [];
  for (let j = 0; j < p; j++) cols.push(buf.subarray(j * rows, (j + 1) * rows));
  const b = buf.subarray(p * rows, (p + 1) * rows);
  let at = 0;
  for (let g = 0; g < sets.count; g++) {
    const block = scaledBlock(sets, g, design, rowOf, observations, sw, scale);
    at = writeTriangle(block, sets, g, cols, b, at);
  }
  return { rows, design: cols, observations: b, scale };
}

/** Σ_g n_g (s_g + 1)² for the sets' own reductions plus m·p² for the QR of the m reduced rows, against n·p². */
function halvesTheWork(sets: SupportSets, n: number, p: number): boolean {
  let work = 0;
  for (let g = 0; g < sets.count; g++) {
    const ng = rowsIn(sets, g);
    const sg = columnsIn(sets, g);
    if (ng > sg) work += ng * (sg + 1) ** 2;
    work += Math.min(ng, sg) * p * p;
  }
  return 2 * work <= n * p * p;
}

function reducedRowCount(sets: SupportSets): number {
  let rows = 0;
  for (let g = 0; g < sets.count; g++) rows += Math.min(rowsIn(sets, g), columnsIn(sets, g));
  return rows;
}

const rowsIn = (sets: SupportSets, g: number) => (sets.start[g + 1] as number) - (sets.start[g] as number);
const columnsIn = (sets: SupportSets, g: number) => (sets.colStart[g + 1] as number) - (sets.colStart[g] as number);

/**
 * Each row's set of non-zero columns, found by a hash of its pattern of zeros and confirmed against the first row of
 * its set (every column of the set non-zero in the row, and no more non-zero entries than the set has columns);
 * undefined on more sets than n / 4 (nothing to gain) or on two patterns with one hash.
 */
function supportSets(n: number, p: number, design: Columns, rowOf: Int32Array | undefined): SupportSets | undefined {
  const { hash, width } = supportHashes(n, p, design, rowOf);
  const set = scratchInts(2, n);
  const first: number[] = [];
  const byHash = new Map<number, number>();
  for (let i = 0; i < n; i++) {
    let g = byHash.get(hash[i] as number);
    if (g === undefined) {
      g = first.length;
      if (g > n / 4) return undefined;
      first.push(i);
      byHash.set(hash[i] as number, g);
    }
    set[i] = g;
  }
  const sets = setsOf(set, first, p, design, rowOf);
  return sameSupports(sets, design, rowOf, width) ? sets : undefined;
}

/**
 * Each row's hash of its non-zero columns' numbers and their count. With a branch: on a level model's rows (about a
 * tenth of the entries non-zero) it took 0.2 ms for 2 300 × 86 entries, the branch-free loop 0.5 ms.
 */
function supportHashes(n: number, p: number, design: Columns, rowOf: Int32Array | undefined) {
  const hash = scratchInts(0, n);
  const width = scratchInts(1, n);
  for (let j = 0; j < p; j++) {
    const c = design[j] as Float64Array;
    const mark = Math.imul(j + 1, 0x9e3779b1);
    if (rowOf) {
      for (let i = 0; i < n; i++)
        if (c[rowOf[i] as number] !== 0) {
          hash[i] = Math.imul((hash[i] as number) ^ mark, 0x01000193);
          width[i] = (width[i] as number) + 1;
        }
    } else
      for (let i = 0; i < n; i++)
        if (c[i] !== 0) {
          hash[i] = Math.imul((hash[i] as number) ^ mark, 0x01000193);
          width[i] = (width[i] as number) + 1;
        }
  }
  return { hash, width };
}

/** Whether each row's non-zero columns are exactly its set's: all of them non-zero, and as many as the row has. */
function sameSupports(sets: SupportSets, design: Columns, rowOf: Int32Array | undefined, width: Int32Array): boolean {
  for (let g = 0; g < sets.count; g++) {
    const c0 = sets.colStart[g] as number;
    const c1 = sets.colStart[g + 1] as number;
    for (let r = sets.start[g] as number; r < (sets.start[g + 1] as number); r++) {
      const i = sets.rowsOf[r] as number;
      if (width[i] !== c1 - c0) return false;
      const row = rowOf ? (rowOf[i] as number) : i;
      for (let c = c0; c < c1; c++) if ((design[sets.columns[c] as number] as Float64Array)[row] === 0) return false;
    }
  }
  return true;
}

/** The sets' rows and columns laid out consecutively. */
function setsOf(
  set: Int32Array,
  first: readonly number[],
  p: number,
  design: Columns,
  rowOf: Int32Array | undefined,
): SupportSets {
  const count = first.length;
  const start = ints(count + 1);
  for (const g of set) start[g + 1] = (start[g + 1] as number) + 1;
  for (let g = 0; g < count; g++) start[g + 1] = (start[g + 1] as number) + (start[g] as number);
  const fill = start.slice(0, count);
  const rowsOf = scratchInts(3, set.length);
  for (let i = 0; i < set.length; i++) {
    const g = set[i] as number;
    rowsOf[fill[g] as number] = i;
    fill[g] = (fill[g] as number) + 1;
  }
  const colStart = ints(count + 1);
  const columns: number[] = [];
  for (let g = 0; g < count; g++) {
    const r = rowOf ? (rowOf[first[g] as number] as number) : (first[g] as number);
    for (let j = 0; j < p; j++) if ((design[j] as Float64Array)[r] !== 0) columns.push(j);
    colStart[g + 1] = columns.length;
  }
  return { count, set, start, rowsOf, colStart, columns: Int32Array.from(columns) };
}

/** ‖√W a_j‖ for each column (1 for an all-zero column), as the QR scales them, summed over each set's own columns. */
function weightedNorms(
  sets: SupportSets,
  p: number,
  design: Columns,
  rowOf: Int32Array | undefined,
  sw: Float64Array,
): Float64Array {
  const ss = floats(p);
  for (let g = 0; g < sets.count; g++) {
    const r0 = sets.start[g] as number;
    const r1 = sets.start[g + 1] as number;
    for (let c = sets.colStart[g] as number; c < (sets.colStart[g + 1] as number); c++) {
      const j = sets.columns[c] as number;
      const col = design[j] as Float64Array;
      let sum = ss[j] as number;
      for (let r = r0; r < r1; r++) {
        const i = sets.rowsOf[r] as number;
        const v = (col[rowOf ? (rowOf[i] as number) : i] as number) * (sw[i] as number);
        sum += v * v;
      }
      ss[j] = sum;
    }
  }
  const scale = floats(p);
  for (let j = 0; j < p; j++) scale[j] = (ss[j] as number) > 0 ? Math.sqrt(ss[j] as number) : 1;
  return scale;
}

/** One set's rows, weighted and scaled, as a column-major n_g × (s_g + 1) block (the last column √W y). */
interface Block {
  readonly a: Float64Array;
  readonly rows: number;
  readonly cols: number;
}

function scaledBlock(
  sets: SupportSets,
  g: number,
  design: Columns,
  rowOf: Int32Array | undefined,
  observations: Float64Array,
  sw: Float64Array,
  scale: Float64Array,
): Block {
  const r0 = sets.start[g] as number;
  const ng = rowsIn(sets, g);
  const c0 = sets.colStart[g] as number;
  const sg = columnsIn(sets, g);
  const a = scratchFloats(2, ng * (sg + 1));
  for (let c = 0; c < sg; c++) {
    const j = sets.columns[c0 + c] as number;
    const col = design[j] as Float64Array;
    const inv = 1 / (scale[j] as number);
    for (let r = 0; r < ng; r++) {
      const i = sets.rowsOf[r0 + r] as number;
      a[c * ng + r] = (col[rowOf ? (rowOf[i] as number) : i] as number) * (sw[i] as number) * inv;
    }
  }
  for (let r = 0; r < ng; r++) {
    const i = sets.rowsOf[r0 + r] as number;
    a[sg * ng + r] = (observations[i] as number) * (sw[i] as number);
  }
  return { a, rows: ng, cols: sg + 1 };
}

/**
 * The set's block triangulated (when it has more rows than columns) and its first min(n_g, s_g) rows written into the
 * reduced design from row `at`; returns the next free row.
 */
function writeTriangle(
  block: Block,
  sets: SupportSets,
  g: number,
  cols: Float64Array[],
  b: Float64Array,
  at: number,
): number {
  const { a, rows: ng, cols: w } = block;
  const sg = w - 1;
  if (ng > sg) triangulate(a, ng, w, sg);
  const keep = Math.min(ng, sg);
  const c0 = sets.colStart[g] as number;
  for (let c = 0; c < sg; c++) {
    const col = cols[sets.columns[c0 + c] as number] as Float64Array;
    // Below the diagonal are the reflectors (zeros of R) once triangulated.
    const last = ng > sg ? Math.min(c, keep - 1) : keep - 1;
    for (let r = 0; r <= last; r++) col[at + r] = a[c * ng + r] as number;
  }
  for (let r = 0; r < keep; r++) b[at + r] = a[sg * ng + r] as number;
  return at + keep;
}

/**
 * Householder QR without pivoting of the first k columns of a column-major rows × w block, applied to all w columns:
 * R (and Qᵀ of the rest) above the diagonal, the diagonal written in place.
 */
function triangulate(a: Float64Array, rows: number, w: number, k: number): void {
  for (let c = 0; c < k; c++) {
    const off = c * rows;
    let ss = 0;
    for (let i = c; i < rows; i++) ss += (a[off + i] as number) ** 2;
    if (ss === 0) continue;
    let alpha = Math.sqrt(ss);
    if ((a[off + c] as number) > 0) alpha = -alpha;
    const v1 = (a[off + c] as number) - alpha;
    a[off + c] = v1;
    // 2 / vᵀv with vᵀv = −2α·v₁.
    const beta = -1 / (alpha * v1);
    for (let j = c + 1; j < w; j++) {
      const oj = j * rows;
      let s = 0;
      for (let i = c; i < rows; i++) s += (a[off + i] as number) * (a[oj + i] as number);
      const f = s * beta;
      if (f === 0) continue;
      for (let i = c; i < rows; i++) a[oj + i] = (a[oj + i] as number) - f * (a[off + i] as number);
    }
    a[off + c] = alpha;
  }
}

/**
 * Grow-only scratch, reused by every call (the kernel is synchronous and never re-entered): four integer arrays (row
 * hashes, widths, sets, rows by set) and three float arrays (√w, the reduced system, one set's block). `scratchInts`
 * hands them out zeroed, `scratchFloats` as they are.
 */
const intPools: Int32Array[] = [0, 1, 2, 3].map(() => new Int32Array(0));
const floatPools: Float64Array[] = [0, 1, 2].map(() => new Float64Array(0));
function scratchInts(k: 0 | 1 | 2 | 3, n: number): Int32Array {
  if ((intPools[k] as Int32Array).length < n) intPools[k] = new Int32Array(grownLength(intPools[k] as Int32Array, n));
  return (intPools[k] as Int32Array).subarray(0, n).fill(0);
}
function scratchFloats(k: 0 | 1 | 2, n: number): Float64Array {
  if ((floatPools[k] as Float64Array).length < n)
    floatPools[k] = new Float64Array(grownLength(floatPools[k] as Float64Array, n));
  return (floatPools[k] as Float64Array).subarray(0, n);
}
const grownLength = (pool: { length: number }, n: number) => Math.max(n, Math.ceil(pool.length * 1.5));

import { describe, expect, it } from 'vitest';
import { solveLeastSquares } from '../../src/linalg/least-squares.js';
import { reduceBySupport } from '../../src/linalg/support-blocks.js';
import { levelSystem } from '../helpers/level-system.js';
import { seededRandom } from '../helpers/random.js';

// The kernel reduces the rows that share their non-zero columns (a band's lines in a level model) to a triangle
// each before the pivoted QR. Nothing here compares the kernel with itself: the solves are checked against the
// normal equations solved in the test (Gaussian elimination with partial pivoting on the column-scaled matrix) and
// against identities every weighted least-squares solution satisfies (Xᵀ W e = 0; Σ hᵢᵢ = p; C · XᵀWX = I).

/** Each line again right after itself, with new noise of the same σ (rows 2i and 2i + 1 are line i). */
function twice(s: ReturnType<typeof levelSystem>, seed: number): ReturnType<typeof levelSystem> {
  const u = seededRandom(seed + 100);
  const rows = 2 * s.rows;
  const design = new Float64Array(rows * s.cols);
  const y = new Float64Array(rows);
  const w = new Float64Array(rows);
  for (let i = 0; i < s.rows; i++) {
    for (let j = 0; j < s.cols; j++) {
      const x = s.design[j * s.rows + i] as number;
      design[j * rows + 2 * i] = x;
      design[j * rows + 2 * i + 1] = x;
    }
    const wi = s.w[i] as number;
    y[2 * i] = s.y[i] as number;
    y[2 * i + 1] = (s.y[i] as number) + (u() - 0.5) / Math.sqrt(wi);
    w[2 * i] = wi;
    w[2 * i + 1] = wi;
  }
  return { rows, cols: s.cols, design, y, w };
}

/** A system's rows as the kernel hands them over: its columns, no merged rows. */
function rowSystem(s: ReturnType<typeof levelSystem>) {
  const design = Array.from({ length: s.cols }, (_, j) => s.design.subarray(j * s.rows, (j + 1) * s.rows));
  return { rows: s.rows, design, rowOf: undefined, observations: s.y, weights: s.w };
}

const at = (d: Float64Array, rows: number, i: number, j: number) => d[j * rows + i] as number;

/** XᵀWX and XᵀWy of a column-major design. */
function normalEquations(s: { rows: number; cols: number; design: Float64Array; y: Float64Array; w: Float64Array }) {
  const { rows, cols, design, y, w } = s;
  const a = Array.from({ length: cols }, () => new Array<number>(cols).fill(0));
  const b = new Array<number>(cols).fill(0);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) {
      const xj = at(design, rows, i, j) * (w[i] as number);
      if (xj === 0) continue;
      b[j] = (b[j] as number) + xj * (y[i] as number);
      for (let k = 0; k < cols; k++)
        (a[j] as number[])[k] = ((a[j] as number[])[k] as number) + xj * at(design, rows, i, k);
    }
  return { a, b };
}

/** Gaussian elimination with partial pivoting on the Jacobi-scaled normal equations (unit diagonal). */
function solveNormal(a0: number[][], b0: number[]): number[] {
  const n = b0.length;
  const d = a0.map((r, i) => Math.sqrt(r[i] as number));
  const a = a0.map((r, i) => r.map((x, j) => x / ((d[i] as number) * (d[j] as number))));
  const b = b0.map((x, i) => x / (d[i] as number));
  for (let c = 0; c < n; c++) {
    let best = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r]?.[c] as number) > Math.abs(a[best]?.[c] as number)) best = r;
    [a[c], a[best]] = [a[best] as number[], a[c] as number[]];
    [b[c], b[best]] = [b[best] as number, b[c] as number];
    for (let r = c + 1; r < n; r++) {
      const f = (a[r]?.[c] as number) / (a[c]?.[c] as number);
      for (let k = c; k < n; k++) (a[r] as number[])[k] = (a[r]?.[k] as number) - f * (a[c]?.[k] as number);
      b[r] = (b[r] as number) - f * (b[c] as number);
    }
  }
  const z = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = b[r] as number;
    for (let k = r + 1; k < n; k++) s -= (a[r]?.[k] as number) * (z[k] as number);
    z[r] = s / (a[r]?.[r] as number);
  }
  return z.map((x, i) => x / (d[i] as number));
}

// Bands of a hot CO-like scan: fundamentals, hot bands and overtones over six levels (each band one support set).
const HOT: readonly (readonly [number, number])[] = [
  [1, 0],
  [2, 1],
  [3, 2],
  [4, 3],
  [5, 4],
  [2, 0],
  [3, 1],
  [4, 2],
];

describe('rows reduced by their shared non-zero columns', () => {
  it('reduces a level model with many lines per band to a few rows per band', () => {
    const s = levelSystem(HOT, 6, 60, 1);
    const sw = Float64Array.from(s.w, Math.sqrt);
    const reduced = reduceBySupport(rowSystem(s), s.cols);
    expect(reduced).toBeDefined();
    // Per band: the lines with J″ ≥ 2 share 8 columns (two T at most, B, D, H of both levels); R(0) and P(1) have
    // fewer (J = 0 has no B, D, H). So far fewer rows than lines, and at least the columns' number.
    expect(reduced?.rows).toBeGreaterThanOrEqual(s.cols);
    expect(reduced?.rows).toBeLessThan(s.rows / 8);
    // Column norms survive the orthogonal reduction: each reduced column has unit norm after the original scaling.
    for (let j = 0; j < s.cols; j++) {
      let ss = 0;
      for (let i = 0; i < s.rows; i++) ss += (at(s.design, s.rows, i, j) * (sw[i] as number)) ** 2;
      expect(reduced?.scale[j]).toBeCloseTo(Math.sqrt(ss), 6);
      const c = reduced?.design[j] as Float64Array;
      expect(Math.hypot(...c)).toBeCloseTo(1, 12);
    }
  });

  it('leaves dense and small designs to the plain QR', () => {
    const dense = levelSystem([[1, 0]], 2, 60, 2);
    // One band: every line J″ ≥ 2 has every column; nothing to gain.
    expect(reduceBySupport(rowSystem(dense), dense.cols)).toBeUndefined();
    const small = levelSystem(HOT.slice(0, 2), 3, 5, 3);
    expect(reduceBySupport(rowSystem(small), small.cols)).toBeUndefined();
  });

  it.each([
    [1, false],
    [2, false],
    [3, false],
    [4, true],
  ])(
    'solves as the normal equations do, and satisfies the identities (seed %i, each line twice: %s)',
    (seed, again) => {
      // Each line measured twice (a second instrument, its own noise): the kernel merges the repeated rows, then
      // reduces the merged rows.
      const s = again ? twice(levelSystem(HOT, 6, 40, seed), seed) : levelSystem(HOT, 6, 40, seed);
      const r = solveLeastSquares({
        rows: s.rows,
        cols: s.cols,
        design: s.design,
        observations: s.y,
        weights: s.w,
        leverage: true,
      });
      expect(r.rankDeficient).toBe(false);
      const { a, b } = normalEquations(s);
      const ref = solveNormal(a, b);
      // σ of each coefficient from the kernel's covariance: the two solutions agree to 1e-4 of it (measured: 1e-6,
      // the normal equations' own rounding, κ² ε, being most of it; a row lost or misread moves them by ≳ 0.01 σ).
      for (let j = 0; j < s.cols; j++) {
        const sd = Math.sqrt(r.covariance[j * s.cols + j] as number);
        expect(Math.abs((r.coefficients[j] as number) - (ref[j] as number))).toBeLessThan(1e-4 * sd);
      }
      // Xᵀ W e = 0, to the rounding of residuals that are 10⁻⁷ of the positions (the plain QR leaves 1e-8 of the sum
      // of magnitudes here, the reduced rows 2e-8; a coefficient wrong by its σ leaves more than 1e-3).
      for (let j = 0; j < s.cols; j++) {
        let dot = 0;
        let mag = 0;
        for (let i = 0; i < s.rows; i++) {
          const t = at(s.design, s.rows, i, j) * (s.w[i] as number) * (r.residuals[i] as number);
          dot += t;
          mag += Math.abs(t);
        }
        expect(Math.abs(dot)).toBeLessThan(1e-7 * mag);
      }
      // χ² is Σ w e² of the residuals it reports; the leverages sum to p, each in [0, 1].
      const chi = s.w.reduce((acc, wi, i) => acc + wi * (r.residuals[i] as number) ** 2, 0);
      expect(r.chiSquare).toBeCloseTo(chi, 8);
      const h = r.leverages as Float64Array;
      expect(h.reduce((x, y) => x + y, 0)).toBeCloseTo(s.cols, 9);
      expect(Math.min(...h)).toBeGreaterThanOrEqual(0);
      expect(Math.max(...h)).toBeLessThanOrEqual(1 + 1e-12);
      // C · XᵀWX = I.
      for (let i = 0; i < s.cols; i++)
        for (let k = 0; k < s.cols; k++) {
          let sum = 0;
          for (let j = 0; j < s.cols; j++) sum += (r.covariance[i * s.cols + j] as number) * (a[j]?.[k] as number);
          // Relative to the row's scale: |C_ij| |A_jk| summed.
          let mag = 0;
          for (let j = 0; j < s.cols; j++)
            mag += Math.abs((r.covariance[i * s.cols + j] as number) * (a[j]?.[k] as number));
          expect(Math.abs(sum - (i === k ? 1 : 0))).toBeLessThan(1e-8 * Math.max(mag, 1));
        }
    },
  );

  it('finds levels no band ties to the rest: their terms cannot be told apart', () => {
    // Bands 1-0, 3-2, 4-3 and 4-2: the terms of levels 2, 3 and 4 are fixed against each other, not against 0 and 1
    // (adding one constant to T₂, T₃ and T₄ changes no line).
    const s = levelSystem(
      [
        [1, 0],
        [3, 2],
        [4, 3],
        [4, 2],
      ],
      5,
      50,
      4,
    );
    expect(reduceBySupport(rowSystem(s), s.cols)).toBeDefined();
    const r = solveLeastSquares({ rows: s.rows, cols: s.cols, design: s.design, observations: s.y, weights: s.w });
    expect(r.rankDeficient).toBe(true);
    expect(r.rank).toBe(s.cols - 1);
    // The dependent group is T₂, T₃ and T₄ (columns 1, 2, 3: the terms come first, T₁ at 0).
    expect(r.dependencies).toHaveLength(1);
    expect([...(r.dependencies[0] as number[])].sort()).toEqual([1, 2, 3]);
  });
});

import { inverse, Matrix, SingularValueDecomposition } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { singularValues, solveLeastSquares, triangularConditionNumber } from '../../src/linalg/least-squares.js';
import { seededRandom } from '../helpers/random.js';

// The whole output of the solver (coefficients, the full covariance (AᵀWA)⁻¹ with its off-diagonal terms,
// residuals, χ², leverages, condition number, rank and dependencies) against ml-matrix 6.15.1, an independent
// general-purpose library (its inverse, SVD and matrix products on the full weighted design). Everything is
// computed inside `it` so that mutation testing sees it. Tolerances are stated per check (relative unless said).

interface Problem {
  rows: number;
  cols: number;
  design: Float64Array;
  y: Float64Array;
  w?: Float64Array;
}

/** A well-conditioned weighted polynomial problem with columns of very different scale (x³ up to 10⁶). */
function polynomialProblem(rows: number, cols: number, seed: number, repeatEvery = 0, weighted = true): Problem {
  const u = seededRandom(seed);
  const design = new Float64Array(rows * cols);
  const y = new Float64Array(rows);
  const w = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    const x = repeatEvery > 0 ? (i % repeatEvery) * 7 - 40 : ((i * 97) % rows) - rows / 2 + u();
    w[i] = weighted ? 0.2 + 3 * u() : 1;
    for (let j = 0; j < cols; j++) design[j * rows + i] = x ** j;
    y[i] = 2 - 0.3 * x + 1e-3 * x * x - 2e-6 * x ** 3 + (u() - 0.5) / Math.sqrt(w[i] as number);
  }
  return { rows, cols, design, y, ...(weighted ? { w } : {}) };
}

/**
 * Rows shaped as a level model builds them for `bands` bands sharing a lower level: band b's row holds 1, t, t² in its
 * own three columns and −x, −x² in the last two (x = 0 on every seventh distinct row, so −0), the other entries 0; t
 * and x drawn at random so that the reference's normal equations stay well conditioned. Rows cycle through `perBand`
 * distinct rows per band (every row distinct when 0), weighted.
 */
function bandProblem(rows: number, bands: number, seed: number, perBand: number): Problem {
  const u = seededRandom(seed);
  const cols = 3 * bands + 2;
  const distinct = perBand > 0 ? bands * perBand : rows;
  const ts = Array.from({ length: distinct }, () => 2 * u() - 1);
  const xs = Array.from({ length: distinct }, (_, k) => (k % 7 === 0 ? 0 : u()));
  const design = new Float64Array(rows * cols);
  const y = new Float64Array(rows);
  const w = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    const k = i % distinct;
    const band = perBand > 0 ? Math.floor(k / perBand) : k % bands;
    const t = ts[k] as number;
    const x = xs[k] as number;
    design[3 * band * rows + i] = 1;
    design[(3 * band + 1) * rows + i] = t;
    design[(3 * band + 2) * rows + i] = t * t;
    design[3 * bands * rows + i] = -x;
    design[(3 * bands + 1) * rows + i] = -(x * x);
    w[i] = 0.5 + u();
    y[i] = 3 * (band + 1) + 1.9 * t - 1.7 * x - 0.2 * (t * t - x * x) + (u() - 0.5) * 1e-2;
  }
  return { rows, cols, design, y, w };
}

/** √W A and √W y as ml-matrix matrices, and the reference normal matrix inverse, hat diagonal and coefficients. */
function reference(pr: Problem) {
  const { rows: n, cols: p, design, y, w } = pr;
  const a = new Matrix(n, p);
  const aw = new Matrix(n, p);
  const yw = new Matrix(n, 1);
  for (let i = 0; i < n; i++) {
    const s = Math.sqrt(w ? (w[i] as number) : 1);
    for (let j = 0; j < p; j++) {
      a.set(i, j, design[j * n + i] as number);
      aw.set(i, j, (design[j * n + i] as number) * s);
    }
    yw.set(i, 0, (y[i] as number) * s);
  }
  const cov = inverse(aw.transpose().mmul(aw));
  const x = cov.mmul(aw.transpose().mmul(yw));
  const hat = aw.mmul(cov).mmul(aw.transpose());
  return { a, aw, cov, x, hat };
}

const relErr = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe('least squares against ml-matrix on the full weighted design', () => {
  it.each([
    ['30 weighted rows, cubic', 30, 4, 3, 0, true],
    ['200 rows, no weights, quadratic', 200, 3, 8, 0, false],
    ['256 weighted rows repeating 16 distinct ones (merged)', 256, 4, 5, 16, true],
    ['128 unweighted rows repeating 12 distinct ones (merged)', 128, 3, 6, 12, false],
    ['256 weighted rows, each of 128 distinct rows twice (merged at the limit)', 256, 4, 9, 128, true],
    ['258 weighted rows, 129 distinct (one more than half: not merged)', 258, 4, 10, 129, true],
  ] as const)('%s: coefficients, full covariance, residuals, χ², leverages', (_name, n, p, seed, every, weighted) => {
    matchesReference(polynomialProblem(n, p, seed, every, weighted));
  });

  // Rows of a line list's level model: each band's rows are non-zero only in its own upper-level columns (1, x, x²)
  // and the shared lower-level ones (−x, −x², −0 where x = 0), so most entries are zero; 5, 8 and 11 columns (odd
  // and even counts), merged and not.
  it.each([
    ['1 band, 300 rows of 30 distinct (merged)', 300, 1, 21, 30],
    ['2 bands, 400 rows of 80 distinct (merged)', 400, 2, 22, 40],
    ['3 bands, 500 rows of 243 distinct (merged)', 500, 3, 23, 81],
    ['3 bands, 150 rows, all distinct (not merged)', 150, 3, 24, 0],
  ] as const)('sparse band rows, %s: the same checks', (_name, n, bands, seed, perBand) => {
    matchesReference(bandProblem(n, bands, seed, perBand));
  });

  function matchesReference(pr: Problem) {
    const { rows: n, cols: p } = pr;
    const r = solveLeastSquares({
      rows: n,
      cols: p,
      design: pr.design,
      observations: pr.y,
      ...(pr.w ? { weights: pr.w } : {}),
      leverage: true,
    });
    const ref = reference(pr);
    expect(r.rank).toBe(p);
    expect(r.rankDeficient).toBe(false);
    expect(r.dependencies).toEqual([]);
    // Coefficients and covariance to 1e-9 (the normal equations of the reference lose up to κ² ≈ 1e6 of 1e-16).
    for (let j = 0; j < p; j++) {
      expect(relErr(r.coefficients[j] as number, ref.x.get(j, 0)), `x${j}`).toBeLessThan(1e-9);
      for (let k = 0; k < p; k++) {
        expect(relErr(r.covariance[j * p + k] as number, ref.cov.get(j, k)), `C${j}${k}`).toBeLessThan(1e-8);
      }
    }
    // Residuals yᵢ − (Ax)ᵢ of every input row, and χ² = Σ wᵢ rᵢ², from the reference coefficients (1e-9 absolute
    // on residuals of order 1).
    let chi = 0;
    for (let i = 0; i < n; i++) {
      let fit = 0;
      for (let j = 0; j < p; j++) fit += (pr.design[j * n + i] as number) * ref.x.get(j, 0);
      const res = (pr.y[i] as number) - fit;
      expect(Math.abs((r.residuals[i] as number) - res), `r${i}`).toBeLessThan(1e-9);
      chi += (pr.w ? (pr.w[i] as number) : 1) * res * res;
    }
    expect(relErr(r.chiSquare, chi)).toBeLessThan(1e-9);
    // Leverages: the diagonal of √W A (AᵀWA)⁻¹ Aᵀ √W, row by row, to 1e-9 absolute.
    const h = r.leverages as Float64Array;
    expect(h.length).toBe(n);
    for (let i = 0; i < n; i++) expect(Math.abs((h[i] as number) - ref.hat.get(i, i)), `h${i}`).toBeLessThan(1e-9);
    // Condition number of the column-scaled weighted design, from ml-matrix's SVD (1e-9).
    const scaled = ref.aw.clone();
    for (let j = 0; j < p; j++) {
      const col = scaled.getColumn(j);
      const norm = Math.hypot(...col);
      scaled.setColumn(
        j,
        col.map((v) => v / norm),
      );
    }
    expect(relErr(r.conditionNumber, new SingularValueDecomposition(scaled).condition)).toBeLessThan(1e-9);
  }

  it('the condition number is skipped on request (NaN) and leverages only on request', () => {
    const pr = polynomialProblem(20, 3, 2);
    const r = solveLeastSquares({ rows: 20, cols: 3, design: pr.design, observations: pr.y, conditionNumber: false });
    expect(r.conditionNumber).toBeNaN();
    expect(r.leverages).toBeUndefined();
    expect('leverages' in r).toBe(false);
    const s = solveLeastSquares({ rows: 20, cols: 3, design: pr.design, observations: pr.y, leverage: false });
    expect(Number.isFinite(s.conditionNumber)).toBe(true);
    expect(s.conditionNumber).toBeGreaterThan(1);
  });

  it('singular values of a 7 × 4 and a triangular 4 × 4 matrix equal ml-matrix SVD (1e-12 relative)', () => {
    const u = seededRandom(77);
    const m = 7;
    const n = 4;
    const data = Float64Array.from({ length: m * n }, () => u() - 0.5);
    // One column scaled up, so the values spread over three decades.
    for (let k = 0; k < m; k++) data[k * n + 2] = (data[k * n + 2] as number) * 1000;
    const ref = new SingularValueDecomposition(
      Array.from({ length: m }, (_, k) => Array.from(data.subarray(k * n, k * n + n))),
    ).diagonal
      .slice()
      .sort((x, y) => x - y);
    const ours = singularValues(data, m, n).sort((x, y) => x - y);
    expect(ours.length).toBe(n);
    for (let j = 0; j < n; j++) expect(relErr(ours[j] as number, ref[j] as number)).toBeLessThan(1e-12);

    const r = new Float64Array([4, 1, -2, 0.5, 0, 3, 1, 2, 0, 0, 0.01, 1, 0, 0, 0, 2]);
    const svd = new SingularValueDecomposition(
      Array.from({ length: 4 }, (_, k) => Array.from(r.subarray(k * 4, k * 4 + 4))),
    );
    expect(relErr(triangularConditionNumber(r, 4), svd.condition)).toBeLessThan(1e-10);
    // A singular triangle: κ = ∞.
    expect(triangularConditionNumber(new Float64Array([1, 2, 0, 0]), 2)).toBe(Number.POSITIVE_INFINITY);
  });
});

describe('rank deficiency and bad sizes', () => {
  it('two dependent columns in five: rank 3, each group a true linear dependency, everything else NaN', () => {
    // Columns 1, t, t², 2t + 3 and t² − t (the last two depend on the first three).
    const n = 12;
    const cols = [
      (_t: number) => 1,
      (t: number) => t,
      (t: number) => t * t,
      (t: number) => 2 * t + 3,
      (t: number) => t * t - t,
    ];
    const design = new Float64Array(n * 5);
    for (let i = 0; i < n; i++) for (const [j, f] of cols.entries()) design[j * n + i] = f(i - 4);
    const y = Float64Array.from({ length: n }, (_, i) => Math.sin(i));
    const r = solveLeastSquares({ rows: n, cols: 5, design, observations: y });
    expect(r.rank).toBe(3);
    expect(r.rankDeficient).toBe(true);
    expect(r.conditionNumber).toBe(Number.POSITIVE_INFINITY);
    expect(r.chiSquare).toBeNaN();
    expect([...r.coefficients].every(Number.isNaN)).toBe(true);
    expect(r.covariance.length).toBe(25);
    expect([...r.covariance].every(Number.isNaN)).toBe(true);
    expect(r.residuals.length).toBe(n);
    expect([...r.residuals].every(Number.isNaN)).toBe(true);
    expect(r.dependencies.length).toBe(2);
    for (const g of r.dependencies) {
      expect(g.length).toBeGreaterThanOrEqual(2);
      // The first column of the group is a combination of the others: solve it from them (ml-matrix) and require
      // a residual below 1e-9 of the column's norm.
      const [head, ...rest] = g as [number, ...number[]];
      const a = new Matrix(n, rest.length);
      const b = new Matrix(n, 1);
      for (let i = 0; i < n; i++) {
        for (const [k, c] of rest.entries()) a.set(i, k, design[c * n + i] as number);
        b.set(i, 0, design[head * n + i] as number);
      }
      const x = inverse(a.transpose().mmul(a)).mmul(a.transpose().mmul(b));
      const res = b.clone().sub(a.mmul(x)).norm();
      expect(res).toBeLessThan(1e-9 * b.norm());
    }
    expect(new Set(r.dependencies.flat())).toEqual(new Set([0, 1, 2, 3, 4]));
  });

  it('a column of zeros is rank deficient and named alone with no partner', () => {
    const n = 6;
    const design = new Float64Array(n * 3);
    for (let i = 0; i < n; i++) {
      design[i] = 1;
      design[2 * n + i] = i;
    }
    const r = solveLeastSquares({ rows: n, cols: 3, design, observations: new Float64Array(n).fill(2) });
    expect(r.rank).toBe(2);
    expect(r.dependencies).toEqual([[1]]);
  });

  it('the rank tolerance is relative to the largest pivot and can be set', () => {
    // Columns 1 and 1 + 1e-9·t: independent in double precision, dependent at a tolerance of 1e-6.
    const n = 10;
    const design = new Float64Array(n * 2);
    for (let i = 0; i < n; i++) {
      design[i] = 1;
      design[n + i] = 1 + 1e-9 * i;
    }
    const y = Float64Array.from({ length: n }, (_, i) => 3 + 2e-9 * i);
    const loose = solveLeastSquares({ rows: n, cols: 2, design, observations: y, rankTolerance: 1e-6 });
    expect(loose.rankDeficient).toBe(true);
    expect(loose.rank).toBe(1);
    const strict = solveLeastSquares({ rows: n, cols: 2, design, observations: y });
    expect(strict.rankDeficient).toBe(false);
    // y = 1 + 2·(1 + 1e-9 t): coefficients 1 and 2, to 1e-5 (κ ≈ 1e10 leaves about six digits).
    expect(Math.abs((strict.coefficients[0] as number) - 1)).toBeLessThan(1e-5);
    expect(Math.abs((strict.coefficients[1] as number) - 2)).toBeLessThan(1e-5);
  });

  it('column pivoting reveals the rank when a repeated column comes second: columns 1, 1, t have rank 2', () => {
    // Without pivoting the second column's remainder is zero at step 2 and the rank count would stop at 1.
    const n = 8;
    const design = new Float64Array(n * 3);
    for (let i = 0; i < n; i++) {
      design[i] = 1;
      design[n + i] = 1;
      design[2 * n + i] = i;
    }
    const r = solveLeastSquares({ rows: n, cols: 3, design, observations: new Float64Array(n).fill(1) });
    expect(r.rank).toBe(2);
    expect(r.dependencies.map((g) => [...g].sort())).toEqual([[0, 1]]);
  });

  it('the default rank tolerance is max(rows, cols)·ε (numpy lstsq convention): 1000 rows, a pivot of 3e-14', () => {
    // Columns 1 and 1 + 1e-13·t, t uniform in [−½, ½): the second pivot of the scaled design is about
    // 1e-13 · std(t) = 2.9e-14, below 1000·ε = 2.2e-13 (rank 1) but far above 2·ε = 4.4e-16.
    const n = 1000;
    const design = new Float64Array(n * 2);
    for (let i = 0; i < n; i++) {
      design[i] = 1;
      design[n + i] = 1 + 1e-13 * (i / n - 0.5);
    }
    const y = Float64Array.from({ length: n }, (_, i) => i % 3);
    expect(solveLeastSquares({ rows: n, cols: 2, design, observations: y }).rank).toBe(1);
    expect(solveLeastSquares({ rows: n, cols: 2, design, observations: y, rankTolerance: 1e-15 }).rank).toBe(2);
  });

  it.each([
    [{ rows: 3, cols: 2, design: new Float64Array(5), observations: new Float64Array(3) }, 'rows 3, cols 2, design 5'],
    [{ rows: 3, cols: 2, design: new Float64Array(6), observations: new Float64Array(2) }, 'rows 3, cols 2, design 6'],
    [
      {
        rows: 3,
        cols: 2,
        design: new Float64Array(6),
        observations: new Float64Array(3),
        weights: new Float64Array(4),
      },
      'rows 3, cols 2, design 6',
    ],
  ])('inconsistent sizes are a RangeError naming them (%#)', (input, sizes) => {
    expect(() => solveLeastSquares(input)).toThrow(new RangeError(`least squares: inconsistent sizes (${sizes})`));
  });

  it('fewer observations than parameters is a RangeError; as many is solved exactly', () => {
    expect(() =>
      solveLeastSquares({ rows: 2, cols: 3, design: new Float64Array(6), observations: new Float64Array(2) }),
    ).toThrow(new RangeError('least squares: 2 observations cannot determine 3 parameters'));
    const r = solveLeastSquares({
      rows: 2,
      cols: 2,
      design: new Float64Array([1, 1, 0, 1]),
      observations: new Float64Array([3, 5]),
    });
    expect([...r.coefficients].map((v) => Math.round(v * 1e12) / 1e12)).toEqual([3, 2]);
    expect(r.chiSquare).toBeLessThan(1e-24);
  });
});

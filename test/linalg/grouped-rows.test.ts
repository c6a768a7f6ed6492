import { describe, expect, it } from 'vitest';
import {
  type LeastSquaresResult,
  mergesRows,
  solveGroupedLeastSquares,
  solveLeastSquares,
} from '../../src/linalg/least-squares.js';
import { seededRandom } from '../helpers/random.js';

// A caller that knows which rows are identical (the fit: lines of the same transition) hands the kernel the
// distinct rows and each row's group. That must give, bit for bit, what the kernel gives on the full design, where
// it finds the same groups by hashing and comparing: on both sides of the merge rule, with and without leverages.

function system(rows: number, cols: number, distinct: number, seed: number) {
  const u = seededRandom(seed);
  const rowsOfGroup = new Float64Array(distinct * cols);
  for (let g = 0; g < distinct; g++)
    for (let j = 0; j < cols; j++) rowsOfGroup[j * distinct + g] = (1 + g * 0.37) ** j * (j % 2 ? -1 : 1);
  const group = new Int32Array(rows);
  const y = new Float64Array(rows);
  const w = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    group[i] = i < distinct ? i : Math.floor(u() * distinct);
    w[i] = 0.2 + 3 * u();
    y[i] = 2.1 - 0.4 * (group[i] as number) + (u() - 0.5) / Math.sqrt(w[i] as number);
  }
  const design = new Float64Array(rows * cols);
  for (let j = 0; j < cols; j++)
    for (let i = 0; i < rows; i++) design[j * rows + i] = rowsOfGroup[j * distinct + (group[i] as number)] as number;
  return { rows, cols, distinct: rowsOfGroup, count: distinct, group, design, y, w };
}

function bits(r: LeastSquaresResult) {
  return {
    rank: r.rank,
    coefficients: Array.from(r.coefficients),
    covariance: Array.from(r.covariance),
    residuals: Array.from(r.residuals),
    chiSquare: r.chiSquare,
    leverages: r.leverages ? Array.from(r.leverages) : undefined,
    conditionNumber: r.conditionNumber,
  };
}

describe('solveGroupedLeastSquares', () => {
  it.each([
    [200, 4, 30, true],
    [500, 6, 81, true],
    [129, 3, 65, true],
    [130, 3, 66, false],
    [60, 3, 10, false],
    [100, 30, 20, false],
  ])('%i rows, %i columns, %i distinct: the same bits as the full design (merged: %s)', (n, p, m, merges) => {
    const s = system(n, p, m, n + p + m);
    expect(mergesRows(n, p, m)).toBe(merges);
    for (const leverage of [true, false]) {
      const full = solveLeastSquares({ rows: n, cols: p, design: s.design, observations: s.y, weights: s.w, leverage });
      const grouped = solveGroupedLeastSquares({
        rows: n,
        cols: p,
        distinct: s.distinct,
        group: s.group,
        count: m,
        observations: s.y,
        weights: s.w,
        leverage,
      });
      expect(bits(grouped)).toEqual(bits(full));
      expect(Array.from(grouped.later?.leverages() ?? [])).toEqual(Array.from(full.later?.leverages() ?? []));
    }
  });

  it('refuses groups that do not fit the sizes', () => {
    const s = system(100, 3, 20, 1);
    expect(() =>
      solveGroupedLeastSquares({
        rows: 100,
        cols: 3,
        distinct: s.distinct,
        group: s.group.subarray(0, 99),
        count: 20,
        observations: s.y,
      }),
    ).toThrow(RangeError);
    expect(() =>
      solveGroupedLeastSquares({
        rows: 100,
        cols: 3,
        distinct: s.distinct,
        group: s.group,
        count: 21,
        observations: s.y,
      }),
    ).toThrow(RangeError);
  });
});

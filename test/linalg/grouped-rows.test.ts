import { describe, expect, it } from 'vitest';
import { mergesRows, solveGroupedLeastSquares, solveLeastSquares } from '../../src/linalg/least-squares.js';
import { seededRandom } from '../helpers/random.js';
import { solveBits as bits } from '../helpers/solve-bits.js';

// A caller that knows which rows are identical (the fit: lines of the same transition) hands the kernel the
// distinct rows and each row's group. That must give, bit for bit, what the kernel gives on the full design, where
// it finds the same groups by hashing and comparing: on both sides of the merge rule, with and without leverages.

function system(
  rows: number,
  cols: number,
  distinct: number,
  seed: number,
  order?: (i: number, u: () => number) => number,
) {
  const u = seededRandom(seed);
  const rowsOfGroup = new Float64Array(distinct * cols);
  for (let g = 0; g < distinct; g++)
    for (let j = 0; j < cols; j++) rowsOfGroup[j * distinct + g] = (1 + g * 0.37) ** j * (j % 2 ? -1 : 1);
  const group = new Int32Array(rows);
  const y = new Float64Array(rows);
  const w = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    group[i] = order ? order(i, u) : i < distinct ? i : Math.floor(u() * distinct);
    w[i] = 0.2 + 3 * u();
    y[i] = 2.1 - 0.4 * (group[i] as number) + (u() - 0.5) / Math.sqrt(w[i] as number);
  }
  const design = new Float64Array(rows * cols);
  for (let j = 0; j < cols; j++)
    for (let i = 0; i < rows; i++) design[j * rows + i] = rowsOfGroup[j * distinct + (group[i] as number)] as number;
  return { rows, cols, distinct: rowsOfGroup, count: distinct, group, design, y, w };
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

  // The kernel tries the group that followed the previous row's group last time, then the previous row's group,
  // before hashing: orders where those guesses are right, wrong, or right only sometimes must all find the groups.
  it.each([
    ['cycles of the same order', (i: number) => i % 40],
    ['runs of one row', (i: number) => Math.floor(i / 7) % 40],
    ['cycles in alternating directions', (i: number) => (Math.floor(i / 40) % 2 ? 39 - (i % 40) : i % 40)],
    ['cycles broken at random', (i: number, u: () => number) => (u() < 0.2 ? Math.floor(u() * 40) : i % 40)],
  ])('rows in %s: the groups the kernel finds are the given ones (same bits)', (_, order) => {
    const s = system(400, 5, 40, 7, order);
    expect(new Set(s.group).size).toBe(40);
    const full = solveLeastSquares({
      rows: 400,
      cols: 5,
      design: s.design,
      observations: s.y,
      weights: s.w,
      leverage: true,
    });
    // The same groups numbered in order of first appearance, as the kernel numbers them.
    const first = new Map<number, number>();
    for (const g of s.group) if (!first.has(g)) first.set(g, first.size);
    const renumbered = Int32Array.from(s.group, (g) => first.get(g) as number);
    const distinct = new Float64Array(40 * 5);
    for (const [g, k] of first) for (let j = 0; j < 5; j++) distinct[j * 40 + k] = s.distinct[j * 40 + g] as number;
    const grouped = solveGroupedLeastSquares({
      rows: 400,
      cols: 5,
      distinct,
      group: renumbered,
      count: 40,
      observations: s.y,
      weights: s.w,
      leverage: true,
    });
    expect(bits(full)).toEqual(bits(grouped));
  });

  it('rows equal but for the sign of a zero share a group; rows one bit apart do not', () => {
    const n = 128;
    const values = [0, 1, 1 + Number.EPSILON, 3];
    const design = new Float64Array(n * 2);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      design[i] = 1;
      design[n + i] = i % 8 === 4 ? -0 : (values[i % 4] as number);
      y[i] = (i % 4) + 0.001 * (i % 3);
    }
    const full = solveLeastSquares({ rows: n, cols: 2, design, observations: y, leverage: true });
    const grouped = solveGroupedLeastSquares({
      rows: n,
      cols: 2,
      distinct: Float64Array.from([1, 1, 1, 1, ...values]),
      group: Int32Array.from({ length: n }, (_, i) => i % 4),
      count: 4,
      observations: y,
      leverage: true,
    });
    expect(bits(full)).toEqual(bits(grouped));
    expect(full.leverages?.[1]).not.toBe(full.leverages?.[2]);
  });
});

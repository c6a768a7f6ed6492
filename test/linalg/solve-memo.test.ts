import { describe, expect, it } from 'vitest';
import {
  type LeastSquaresResult,
  solveCount,
  solveGroupedLeastSquares,
  solveLeastSquares,
} from '../../src/linalg/least-squares.js';
import { rememberingSolves } from '../../src/linalg/solve-memo.js';
import { seededRandom } from '../helpers/random.js';
import { solveBits } from '../helpers/solve-bits.js';

const bits = (r: LeastSquaresResult) => solveBits(r, { later: true });

// A solve asked again inside rememberingSolves is answered from the first one. The answer must be the one a new
// factorisation gives, bit for bit; each caller must own its arrays; the factors kept for later must not read a
// caller's array that the caller changes afterwards; and one changed bit of any input must be a new solve.

/**
 * A sparse design like a line list's: a row is a line between two of seven levels, with the term values of levels
 * 1–6 (±1) and three rotational columns of each of its two levels; 27 columns (the memo keeps solves of 24 and more).
 */
function levelLikeSystem(rows: number, seed: number) {
  const u = seededRandom(seed);
  const levels = 7;
  const origins = levels - 1;
  const cols = origins + 3 * levels;
  const design = new Float64Array(rows * cols);
  const y = new Float64Array(rows);
  const w = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    const lower = Math.floor(u() * (levels - 1));
    const upper = lower + 1 + Math.floor(u() * (levels - 1 - lower));
    const j = Math.floor(u() * 40);
    const x = j * (j + 1);
    design[(upper - 1) * rows + i] = 1;
    if (lower > 0) design[(lower - 1) * rows + i] = -1;
    for (let t = 0; t < 3; t++) {
      design[(origins + 3 * upper + t) * rows + i] = (t % 2 ? -1 : 1) * (x + 2 * (j + 1)) ** (t + 1) * 1e-3 ** t;
      design[(origins + 3 * lower + t) * rows + i] = -((t % 2 ? -1 : 1) * x ** (t + 1)) * 1e-3 ** t;
    }
    w[i] = 1 / (0.001 + 0.01 * u()) ** 2;
    y[i] = 2000 + 4 * x * 1e-3 + 0.01 * (u() - 0.5);
  }
  return { rows, cols, design, y, w };
}

describe('solves remembered within one call', () => {
  const s = levelLikeSystem(900, 7);
  const input = { rows: s.rows, cols: s.cols, design: s.design, observations: s.y, weights: s.w, leverage: true };

  it('answers a repeated solve without factorising again, with the bits of a new factorisation', () => {
    const fresh = bits(solveLeastSquares(input));
    expect(fresh.rank).toBe(s.cols);
    const before = solveCount.value;
    const [first, second] = rememberingSolves(() => [solveLeastSquares(input), solveLeastSquares(input)]);
    expect(solveCount.value - before).toBe(1);
    expect(bits(first as LeastSquaresResult)).toEqual(fresh);
    expect(bits(second as LeastSquaresResult)).toEqual(fresh);
    // Outside a scope every call factorises.
    const outside = solveCount.value;
    solveLeastSquares(input);
    solveLeastSquares(input);
    expect(solveCount.value - outside).toBe(2);
  });

  it('gives each caller its own arrays: one caller changing its result does not reach the next', () => {
    const fresh = bits(solveLeastSquares(input));
    rememberingSolves(() => {
      const a = solveLeastSquares(input);
      expect(a.later).toBeDefined();
      a.coefficients.fill(0);
      a.covariance.fill(0);
      a.residuals.fill(0);
      a.leverages?.fill(0);
      a.later?.leverages().fill(0);
      const b = solveLeastSquares(input);
      expect(bits(b)).toEqual(fresh);
    });
  });

  it('solves on its own copies: a caller reusing its arrays afterwards changes neither the later leverages nor a repeat', () => {
    const design = s.design.slice();
    const y = s.y.slice();
    const own = { ...input, design, observations: y, leverage: false };
    const fresh = bits(solveLeastSquares(own));
    rememberingSolves(() => {
      const a = solveLeastSquares(own);
      design.fill(3);
      y.fill(-1);
      expect(Array.from(a.later?.leverages() ?? [])).toEqual(fresh.later?.leverages);
      design.set(s.design);
      y.set(s.y);
      expect(bits(solveLeastSquares(own))).toEqual(fresh);
    });
  });

  it('one changed bit of the design, an observation, a weight or an option is a new solve', () => {
    const before = solveCount.value;
    rememberingSolves(() => {
      solveLeastSquares(input);
      const design = s.design.slice();
      const at = design.findIndex((x, i) => i >= 4 * s.rows && x !== 0);
      design[at] = (design[at] as number) * (1 + Number.EPSILON);
      const y = s.y.slice();
      y[899] = (y[899] as number) + 1e-9;
      const w = s.w.slice();
      w[0] = -0 + (w[0] as number) * 2;
      const changed = [
        solveLeastSquares({ ...input, design }),
        solveLeastSquares({ ...input, observations: y }),
        solveLeastSquares({ ...input, weights: w }),
        solveLeastSquares({ ...input, weights: undefined }),
        solveLeastSquares({ ...input, leverage: false }),
        solveLeastSquares({ ...input, conditionNumber: false }),
      ];
      expect(solveCount.value - before).toBe(7);
      expect(bits(changed[0] as LeastSquaresResult)).toEqual(bits(solveLeastSquares({ ...input, design })));
      expect((changed[1] as LeastSquaresResult).chiSquare).not.toBe(solveLeastSquares(input).chiSquare);
    });
  });

  it('remembers grouped solves too, with the bits of a new factorisation', () => {
    // Every transition measured three times: the fit hands the kernel the distinct rows and each row's group.
    const m = 200;
    const d = levelLikeSystem(m, 11);
    const n = 3 * m;
    const group = Int32Array.from({ length: n }, (_, i) => i % m);
    const u = seededRandom(5);
    const y = Float64Array.from(group, (g) => (d.y[g] as number) + 0.002 * (u() - 0.5));
    const w = Float64Array.from(group, (g) => d.w[g] as number);
    const grouped = { rows: n, cols: d.cols, distinct: d.design, group, count: m, observations: y, weights: w };
    const fresh = bits(solveGroupedLeastSquares(grouped));
    expect(fresh.rank).toBe(d.cols);
    const before = solveCount.value;
    const [a, b] = rememberingSolves(() => [solveGroupedLeastSquares(grouped), solveGroupedLeastSquares(grouped)]);
    expect(solveCount.value - before).toBe(1);
    expect(bits(a as LeastSquaresResult)).toEqual(fresh);
    expect(bits(b as LeastSquaresResult)).toEqual(fresh);
  });

  it('leaves small solves alone (factorising them costs about what hashing would)', () => {
    const small = levelLikeSystem(100, 3);
    const cols = 10; // the origins and the first two levels only
    const before = solveCount.value;
    rememberingSolves(() => {
      for (let k = 0; k < 2; k++)
        solveLeastSquares({ rows: 100, cols, design: small.design.subarray(0, 100 * cols), observations: small.y });
    });
    expect(solveCount.value - before).toBe(2);
  });

  it('drops the memo when the outermost call returns, and shares it with a call inside', () => {
    const before = solveCount.value;
    rememberingSolves(() => {
      solveLeastSquares(input);
      rememberingSolves(() => solveLeastSquares(input));
    });
    rememberingSolves(() => solveLeastSquares(input));
    expect(solveCount.value - before).toBe(2);
  });
});

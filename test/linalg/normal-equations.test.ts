import { inverse, Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { factorDamped, inverseDiagonal, smallSpdWork, solveFactored } from '../../src/linalg/normal-equations.js';
import { seededRandom } from '../helpers/random.js';

/** JᵀJ (row-major, full) and Jᵀr of a random tall J whose columns differ in scale by up to 10⁴. */
function normalEquationsOf(rows: number, q: number, seed: number) {
  const u = seededRandom(seed);
  const j = Matrix.zeros(rows, q);
  for (let c = 0; c < q; c++) {
    const scale = 10 ** (4 * u() - 2);
    for (let i = 0; i < rows; i++) j.set(i, c, scale * (u() - 0.5 + (c === 0 ? 1 : 0)));
  }
  const r = Matrix.columnVector(Array.from({ length: rows }, () => u() - 0.5));
  const jtj = j.transpose().mmul(j);
  const jtr = j.transpose().mmul(r);
  return { jtj, jtr, a: Float64Array.from(jtj.to1DArray()), g: Float64Array.from(jtr.to1DArray()) };
}

// Reference: ml-matrix (an independent general-purpose library) solving the same damped matrix by LU and inverting
// it. Tolerance 1e-9 relative: the systems have condition numbers up to ~10⁴ after Jacobi scaling (common practice:
// κ·ε with a margin).
describe('small damped normal equations by scaled Cholesky', () => {
  it.each([
    [6, 0],
    [9, 1e-3],
    [15, 10],
  ])('q = %i, λ = %f: the step and the diagonal of the inverse equal ml-matrix to 1e-9', (q, lambda) => {
    const { jtj, jtr, a, g } = normalEquationsOf(200, q, q);
    const damped = jtj.clone();
    for (let i = 0; i < q; i++) damped.set(i, i, jtj.get(i, i) * (1 + lambda));
    const expected = solve(damped, jtr).to1DArray();
    const expectedInv = inverse(damped);
    const w = smallSpdWork(q);
    expect(factorDamped(a, lambda, w)).toBe(true);
    const x = new Float64Array(q);
    solveFactored(g, w, x);
    const diag = new Float64Array(q);
    inverseDiagonal(w, diag);
    for (let i = 0; i < q; i++) {
      expect(Math.abs((x[i] as number) - (expected[i] as number))).toBeLessThan(1e-9 * Math.abs(expected[i] as number));
      const e = expectedInv.get(i, i);
      expect(Math.abs((diag[i] as number) - e)).toBeLessThan(1e-9 * e);
    }
  });

  it('reads only the upper triangle: garbage below the diagonal changes nothing', () => {
    const q = 7;
    const { a, g } = normalEquationsOf(50, q, 11);
    const w1 = smallSpdWork(q);
    factorDamped(a, 1e-2, w1);
    const x1 = new Float64Array(q);
    solveFactored(g, w1, x1);
    const spoiled = Float64Array.from(a);
    for (let i = 1; i < q; i++) for (let j = 0; j < i; j++) spoiled[i * q + j] = 1e30;
    const w2 = smallSpdWork(q);
    factorDamped(spoiled, 1e-2, w2);
    const x2 = new Float64Array(q);
    solveFactored(g, w2, x2);
    expect(Array.from(x2)).toEqual(Array.from(x1));
  });

  it('a zero column or two equal columns without damping is refused as singular; damping lifts the second', () => {
    const q = 3;
    // Columns 1, t, 0: the third column of J is zero, so is its diagonal element of JᵀJ.
    const zero = new Float64Array([4, 6, 0, 6, 14, 0, 0, 0, 0]);
    expect(factorDamped(zero, 0, smallSpdWork(q))).toBe(false);
    expect(factorDamped(zero, 1, smallSpdWork(q))).toBe(false);
    // Columns 1, t, t: exactly dependent.
    const equal = new Float64Array([4, 6, 6, 6, 14, 14, 6, 14, 14]);
    expect(factorDamped(equal, 0, smallSpdWork(q))).toBe(false);
    expect(factorDamped(equal, 1e-3, smallSpdWork(q))).toBe(true);
  });
});

import { describe, expect, it } from 'vitest';
import { dunhamFromConstants, printedDigitsUncertainty } from '../../src/potential/constants-input.js';

describe('customary constants as Dunham coefficients', () => {
  it('flips the signs of ω_e x_e and α_e (Y20 = −ω_e x_e, Y11 = −α_e; SCIENCE.md §1) and their covariances', () => {
    const d = dunhamFromConstants({
      values: {
        omega_e: { value: 2000 },
        omega_e_x_e: { value: 10 },
        B_e: { value: 2 },
        alpha_e: { value: 0.02 },
        D_e: { value: 6e-6 },
      },
      covariance: {
        names: ['omega_e', 'omega_e_x_e', 'D_e'],
        matrix: [
          [4e-4, 1e-4, 0],
          [1e-4, 1e-4, 0],
          [0, 0, 1e-14],
        ],
      },
    });
    expect(d.coefficients).toEqual([
      { k: 1, l: 0, value: 2000 },
      { k: 2, l: 0, value: -10 },
      { k: 0, l: 1, value: 2 },
      { k: 1, l: 1, value: -0.02 },
    ]);
    const p = d.coefficients.length;
    expect(d.covariance[0]).toBe(4e-4);
    expect(d.covariance[1]).toBe(-1e-4);
    expect(d.covariance[p]).toBe(-1e-4);
    expect(d.covariance[p + 1]).toBe(1e-4);
    expect(d.covariance[2 * p + 2]).toBe(0);
  });
  it('refuses an asymmetric covariance and one naming constants not given', () => {
    const values = { omega_e: { value: 2000 }, B_e: { value: 2 } };
    expect(() =>
      dunhamFromConstants({
        values,
        covariance: {
          names: ['omega_e', 'B_e'],
          matrix: [
            [1, 0.5],
            [0, 1],
          ],
        },
      }),
    ).toThrow(/symmetric/);
    expect(() => dunhamFromConstants({ values, covariance: { names: ['alpha_e'], matrix: [[1]] } })).toThrow(
      /not given/,
    );
  });
});

describe('uncertainty implied by printed digits (library constants have no stated uncertainty)', () => {
  // GUM (JCGM 100:2008) F.2.2.1: a value known to a resolution δ has u = δ/√12 (uniform over ±δ/2).
  it.each([
    [2990.9463, 1e-4],
    [10.593416, 1e-6],
    [1.93128087, 1e-8],
    [-0.0122, 1e-4],
    [13.28831, 1e-5],
    [2170, 10], // a printed trailing zero cannot be seen: the conservative resolution
  ])('%f carries δ = %f, u = δ/√12', (value, delta) => {
    expect(printedDigitsUncertainty(value) / (delta / Math.sqrt(12)) - 1).toBeCloseTo(0, 12);
  });
});

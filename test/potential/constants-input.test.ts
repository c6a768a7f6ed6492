import { describe, expect, it } from 'vitest';
import { dunhamFromConstants } from '../../src/potential/constants-input.js';

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

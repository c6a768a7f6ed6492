import { describe, expect, it } from 'vitest';
import { dunhamFromConstants, printedDigitsUncertainty } from '../../src/potential/constants-input.js';
import { potentialCurves } from '../../src/potential/potential-curve.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { seededRandom } from '../helpers/random.js';

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

  it('propagated to the turning points, it matches a Monte Carlo of uniform rounding errors (400 draws, 15 %)', () => {
    // CO X ¹Σ⁺, Huber & Herzberg (1979), recalled (as potential-curve.test.ts), each at its printed digits.
    const printed = {
      omega_e: 2169.81358,
      omega_e_x_e: 13.28831,
      omega_e_y_e: 0.010511,
      B_e: 1.93128087,
      alpha_e: 0.01750441,
    };
    const mu = reducedMass(parseSpecies('CO'));
    const curves = (values: Record<string, number>, withUncertainty: boolean) => {
      const d = dunhamFromConstants({
        values: Object.fromEntries(
          Object.entries(values).map(([k, v]) => [
            k,
            { value: v, ...(withUncertainty ? { uncertainty: printedDigitsUncertainty(v) } : {}) },
          ]),
        ),
      });
      return potentialCurves({
        coefficients: d.coefficients,
        covariance: d.covariance,
        reducedMass: mu,
        vMax: 10,
        verify: false,
      });
    };
    const reported = curves(printed, true).levels;
    const rand = seededRandom(1701);
    const draws = 400;
    const sum = new Float64Array(22);
    const sq = new Float64Array(22);
    for (let t = 0; t < draws; t++) {
      const perturbed = Object.fromEntries(
        Object.entries(printed).map(([k, v]) => [k, v + (rand() - 0.5) * printedDigitsUncertainty(v) * Math.sqrt(12)]),
      );
      // Deviations from the unperturbed points (σ ~ 1e-8 Å on 1 Å: sums of squares of the values would cancel).
      curves(perturbed, false).levels.forEach((l, i) => {
        const dMin = l.rMin.value - (reported[i]?.rMin.value as number);
        const dMax = l.rMax.value - (reported[i]?.rMax.value as number);
        sum[2 * i] = (sum[2 * i] as number) + dMin;
        sq[2 * i] = (sq[2 * i] as number) + dMin ** 2;
        sum[2 * i + 1] = (sum[2 * i + 1] as number) + dMax;
        sq[2 * i + 1] = (sq[2 * i + 1] as number) + dMax ** 2;
      });
    }
    reported.forEach((l, i) => {
      for (const [k, q] of [
        [2 * i, l.rMin],
        [2 * i + 1, l.rMax],
      ] as const) {
        const mean = (sum[k] as number) / draws;
        const sd = Math.sqrt(Math.max(0, (sq[k] as number) / draws - mean * mean));
        expect(q.uncertainty).toBeGreaterThan(0);
        // The standard error of an SD from 400 draws is ≈ 3.5 %; 15 % is about 4 of them.
        expect(Math.abs(sd / q.uncertainty - 1)).toBeLessThan(0.15);
      }
    });
  });
});

import { describe, expect, it } from 'vitest';
import { dunhamFromConstants, printedDigitsUncertainty } from '../../src/potential/constants-input.js';
import { potentialCurves } from '../../src/potential/potential-curve.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { seededRandom } from '../helpers/random.js';

// The Monte Carlo check of the printed-digits uncertainty (its own file: 400 curves, too slow for a mutation run of
// the RKR kernels; the rule itself is tested in constants-input.test.ts).
describe('uncertainty implied by printed digits, carried to the turning points', () => {
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

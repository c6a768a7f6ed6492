import { describe, expect, it } from 'vitest';
import { matchLines } from '../../src/assign/match.js';

/**
 * One-to-one matching scores a pair by the negative log-likelihood of a Gaussian of the prediction's width. The
 * case is the real one of test/assign/real-co.test.ts: 2-0 R(29) of CO, predicted by the fitted band to 1.4e-5
 * cm⁻¹ (tolerance 5e-5), and R(72) past the band head, a long extrapolation 0.02 cm⁻¹ away with a tolerance of
 * 0.1 cm⁻¹. In units of their tolerances R(72) is the closer (0.2 against 0.28), but it is the far less likely.
 */
describe('matching predictions to peaks', () => {
  const peak = { index: 0, position: 4342.199965 };
  const sharp = { key: 'R(29)', position: 4342.199979, tolerance: 5e-5 };
  const vague = { key: 'R(72)', position: 4342.18, tolerance: 0.1 };

  it('a sharp prediction takes the peak from a vague one that is as close in units of its own tolerance', () => {
    const m = matchLines([vague, sharp], [peak]);
    expect(m.matches.map((x) => x.prediction.key)).toEqual(['R(29)']);
    expect(m.matches[0]?.residual).toBeCloseTo(-1.4e-5, 9);
  });

  it('the vague prediction still takes a peak nobody else explains, and nothing outside a tolerance is taken', () => {
    const far = { index: 1, position: 4342.25 };
    const m = matchLines([vague, sharp], [peak, far]);
    expect(new Map(m.matches.map((x) => [x.prediction.key, x.peak.index]))).toEqual(
      new Map([
        ['R(29)', 0],
        ['R(72)', 1],
      ]),
    );
    expect(matchLines([sharp], [{ index: 2, position: 4342.2001 }]).matches).toEqual([]);
  });
});

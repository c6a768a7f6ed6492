import { describe, expect, it } from 'vitest';
import { keyedPrediction } from '../../src/assign/assign-lines.js';
import { matchLines } from '../../src/assign/match.js';

// keyedPrediction builds the matcher's prediction member by member; what it must carry is what the spread form
// carried: the placement's members, the expected intensity when known, and the ratio limit only for a borrowed scale.
describe('keyedPrediction', () => {
  it('keeps the placement, keys it by the candidate number, adds intensity and the limit of a borrowed scale', () => {
    const fitted = { position: 2143.27, tolerance: 0.004, withSigma: { model: 0.001, perSigma: 5 } };
    expect(keyedPrediction(17, fitted, undefined, true)).toEqual({ key: '17', ...fitted });
    expect(keyedPrediction(17, fitted, 0.5, false)).toEqual({ key: '17', ...fitted, intensity: 0.5 });
    const reference = { position: 2147.08, tolerance: 0.03, tier: 1 };
    expect(keyedPrediction(3, reference, 0.25, true)).toEqual({
      key: '3',
      ...reference,
      intensity: 0.25,
      intensityRatioLimit: 20,
    });
    // No intensity member at all when none is known (the matcher then judges by position alone).
    expect('intensity' in keyedPrediction(3, reference, undefined, true)).toBe(false);
  });

  it('a line 10× its expected intensity is taken under a borrowed scale (×20 allowed), not under its own (×8)', () => {
    const peak = [{ index: 0, position: 2147.08, intensity: 2.5 }];
    const placed = { position: 2147.08, tolerance: 0.03, tier: 1 };
    expect(matchLines([keyedPrediction(3, placed, 0.25, true)], peak).matches).toHaveLength(1);
    expect(matchLines([keyedPrediction(3, placed, 0.25, false)], peak).matches).toHaveLength(0);
    // 25× is beyond either.
    expect(matchLines([keyedPrediction(3, placed, 0.1, true)], peak).matches).toHaveLength(0);
  });
});

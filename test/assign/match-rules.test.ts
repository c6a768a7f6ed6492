import { describe, expect, it } from 'vitest';
import { lowerBound, matchLines, type Prediction, toleranceFor } from '../../src/assign/match.js';

// The rules of one-to-one matching (src/assign/match.ts) on hand-made predictions and peaks whose costs are worked
// out in the comments: cost = (Δ/tol)² + 2 ln tol + 100·tier (+ ½ ln²(I_obs/I_pred) when both intensities are
// known). Dyadic positions keep boundary cases exact in binary. Computed inside `it`.

const keysToPeaks = (m: ReturnType<typeof matchLines>) =>
  Object.fromEntries(m.matches.map((x) => [x.prediction.key, x.peak.index]));

describe('lowerBound: first index whose value is not below x', () => {
  it('on a sorted array with repeats, below, above and between', () => {
    const a = Float64Array.from([1, 2, 2, 3]);
    expect(lowerBound(a, 2)).toBe(1);
    expect(lowerBound(a, 0)).toBe(0);
    expect(lowerBound(a, 1)).toBe(0);
    expect(lowerBound(a, 2.5)).toBe(3);
    expect(lowerBound(a, 3)).toBe(3);
    expect(lowerBound(a, 4)).toBe(4);
    expect(lowerBound(new Float64Array(0), 1)).toBe(0);
    const long = Float64Array.from({ length: 1000 }, (_, i) => i);
    expect(lowerBound(long, 617.5)).toBe(618);
    expect(lowerBound(long, 617)).toBe(617);
  });
});

describe('tolerances', () => {
  const pr: Prediction = { key: 'a', position: 100, tolerance: 0.01, withSigma: { model: 0.003, perSigma: 2 } };

  it("a peak's own σ counts when both sides carry it: √(0.003² + (2·0.002)²) = 0.005", () => {
    expect(toleranceFor(pr, { index: 0, position: 100, sigma: 0.002 })).toBeCloseTo(0.005, 15);
    expect(toleranceFor(pr, { index: 0, position: 100 })).toBe(0.01);
    expect(toleranceFor({ key: 'b', position: 100, tolerance: 0.02 }, { index: 0, position: 100, sigma: 1 })).toBe(
      0.02,
    );
  });

  it('the search reaches as far as the widest σ-based tolerance; a peak without σ keeps the plain tolerance', () => {
    const wide: Prediction = { key: 'w', position: 100, tolerance: 0.01, withSigma: { model: 0.001, perSigma: 3 } };
    // Peak 0 (σ 0.02): tol √(0.001² + 0.06²) = 0.060008, Δ = 0.05 → |r| = 0.83: taken.
    const m = matchLines([wide], [{ index: 0, position: 100.05, sigma: 0.02 }]);
    expect(keysToPeaks(m)).toEqual({ w: 0 });
    expect(m.matches[0]?.residual).toBeCloseTo(0.05, 12);
    // Peaks without σ 0.02 below and 0.03 above: tol 0.01, |r| = 2 and 3: not taken, although within the reach that
    // peak 0's σ opens.
    const n = matchLines(
      [wide],
      [
        { index: 1, position: 99.98 },
        { index: 2, position: 100.03 },
        { index: 3, position: 101, sigma: 0.02 },
      ],
    );
    expect(n.matches).toEqual([]);
    // The reach follows the largest σ sent, wherever it stands in the list (a smaller one after it).
    const o = matchLines(
      [wide],
      [
        { index: 5, position: 100.05, sigma: 0.02 },
        { index: 6, position: 103, sigma: 0.001 },
      ],
    );
    expect(keysToPeaks(o)).toEqual({ w: 5 });
    // …and one 0.008 away is taken (|r| = 0.8).
    expect(keysToPeaks(matchLines([wide], [{ index: 4, position: 100.008 }]))).toEqual({ w: 4 });
  });

  it('a peak exactly one tolerance away is taken, on either side (|r| ≤ 1)', () => {
    const p = { key: 'p', position: 100, tolerance: 0.5 };
    expect(keysToPeaks(matchLines([p], [{ index: 0, position: 100.5 }]))).toEqual({ p: 0 });
    expect(keysToPeaks(matchLines([p], [{ index: 0, position: 99.5 }]))).toEqual({ p: 0 });
    expect(matchLines([p], [{ index: 0, position: 100.5000001 }]).matches).toEqual([]);
  });
});

describe('who takes a peak', () => {
  it('a fitted prediction (tier 0) takes a peak before a reference one (tier 1), even when farther', () => {
    const peak = { index: 7, position: 100 };
    const reference = { key: 'ref', position: 100, tolerance: 0.1, tier: 1 };
    const fitted = { key: 'fit', position: 100.05, tolerance: 0.1 };
    // Costs: fitted 0.25 + 2 ln 0.1 = −4.36; reference 0 + 2 ln 0.1 + 100 = 95.4.
    const m = matchLines([reference, fitted], [peak]);
    expect(keysToPeaks(m)).toEqual({ fit: 7 });
    expect(m.matches[0]?.residual).toBeCloseTo(-0.05, 12);
    // A peak taken is no competition (the reference prediction lost a peak, not a peak its prediction).
    expect(m.competitions).toEqual([]);
  });

  it('intensities: a ratio beyond 8 either way excludes a pair, exactly 8 does not; the limit can be raised', () => {
    const pr = (intensity: number, limit?: number): Prediction => ({
      key: 'k',
      position: 100,
      tolerance: 0.1,
      intensity,
      ...(limit !== undefined ? { intensityRatioLimit: limit } : {}),
    });
    const pk = (intensity?: number) => [
      { index: 0, position: 100.01, ...(intensity !== undefined ? { intensity } : {}) },
    ];
    expect(matchLines([pr(10)], pk(100)).matches).toEqual([]);
    expect(matchLines([pr(10)], pk(1)).matches).toEqual([]);
    expect(matchLines([pr(10)], pk(80)).matches).toHaveLength(1);
    expect(matchLines([pr(10)], pk(70)).matches).toHaveLength(1);
    expect(matchLines([pr(10, 20)], pk(100)).matches).toHaveLength(1);
    // A peak of intensity 0 (or a negative one, a baseline artefact) cannot be a predicted line of positive intensity.
    expect(matchLines([pr(10)], pk(0)).matches).toEqual([]);
    expect(matchLines([pr(10)], pk(-5)).matches).toEqual([]);
    // Unknown on either side, or a prediction of 0: position alone.
    expect(matchLines([pr(10)], pk()).matches).toHaveLength(1);
    expect(matchLines([pr(0)], pk(1000)).matches).toHaveLength(1);
    expect(matchLines([{ key: 'k', position: 100, tolerance: 0.1 }], pk(1000)).matches).toHaveLength(1);
  });

  it('of two predictions as close, the one whose intensity agrees takes the peak (½ ln² of the ratio is added)', () => {
    // Peak at 100 (intensity 10); A at 99.99 expects 10 (ln 1 = 0), B at 100.01 expects 50 (½ ln²5 = 1.30).
    const a = { key: 'A', position: 99.99, tolerance: 0.1, intensity: 10 };
    const b = { key: 'B', position: 100.01, tolerance: 0.1, intensity: 50 };
    expect(keysToPeaks(matchLines([b, a], [{ index: 0, position: 100, intensity: 10 }]))).toEqual({ A: 0 });
    // B is nearer by 0.005 (r² 0.0025 against 0.0225), but the intensity still decides.
    const b2 = { ...b, position: 100.005 };
    expect(keysToPeaks(matchLines([b2, a], [{ index: 0, position: 100, intensity: 10 }]))).toEqual({ A: 0 });
    // Without intensities, the nearer one.
    expect(
      keysToPeaks(
        matchLines(
          [
            { key: 'A', position: 99.99, tolerance: 0.1 },
            { key: 'B', position: 100.005, tolerance: 0.1 },
          ],
          [{ index: 0, position: 100 }],
        ),
      ),
    ).toEqual({ B: 0 });
  });

  it('two peaks for one prediction: the nearer wins, the loser is reported unless it was matched elsewhere', () => {
    const one = { key: 'P(3)', position: 100, tolerance: 0.1 };
    // Peaks sent out of order: indices are those of the input.
    const peaks = [
      { index: 5, position: 100.03 },
      { index: 4, position: 100.01 },
    ];
    const m = matchLines([one], peaks);
    expect(keysToPeaks(m)).toEqual({ 'P(3)': 4 });
    expect(m.matches[0]?.residual).toBeCloseTo(0.01, 12);
    expect(m.competitions).toEqual([{ peak: 5, winner: 4, prediction: 'P(3)' }]);
    // A second, vaguer prediction at 100.2 (tol 0.2) takes the loser: costs 0.01 − 4.61 (4 to P(3)), 0.09 − 4.61
    // (5 to P(3), lost), 0.72 − 3.22 (5 to R) and 0.90 − 3.22 (4 to R, peak taken).
    const two = { key: 'R(9)', position: 100.2, tolerance: 0.2 };
    const n = matchLines([one, two], peaks);
    expect(keysToPeaks(n)).toEqual({ 'P(3)': 4, 'R(9)': 5 });
    expect(n.competitions).toEqual([]);
    expect(n.matches.find((x) => x.prediction.key === 'R(9)')?.residual).toBeCloseTo(-0.17, 12);
  });

  it('nothing in reach: no matches, no competitions; a prediction below every peak and one above', () => {
    const m = matchLines(
      [
        { key: 'lo', position: 50, tolerance: 1 },
        { key: 'hi', position: 500, tolerance: 1 },
      ],
      [
        { index: 0, position: 100 },
        { index: 1, position: 200 },
      ],
    );
    expect(m).toEqual({ matches: [], competitions: [] });
  });

  it('many lines: each prediction takes its own peak (a comb of 20 with spacing 3.8 and 0.01 offsets)', () => {
    const predictions = Array.from({ length: 20 }, (_, i) => ({
      key: `R(${i})`,
      position: 2000 + 3.8 * i,
      tolerance: 0.05,
    }));
    const peaks = Array.from({ length: 20 }, (_, i) => ({ index: 19 - i, position: 2000 + 3.8 * (19 - i) + 0.01 }));
    const m = matchLines(predictions, peaks);
    expect(m.matches).toHaveLength(20);
    for (const x of m.matches) {
      expect(x.prediction.key).toBe(`R(${x.peak.index})`);
      expect(x.residual).toBeCloseTo(0.01, 9);
    }
  });
});

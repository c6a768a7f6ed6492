import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import {
  aboveBaseline,
  firstNoiseEstimate,
  lowerQuantile,
  strongestWidthInPoints,
  toAbsorbance,
} from '../../src/spectra/peak-baseline.js';
import { findCandidates, groupCandidates } from '../../src/spectra/peak-candidates.js';

/**
 * The first stages of the peak finder on arrays written out by hand (microseconds each): every expected index, width
 * and window is worked out in the comment beside it from the rule the stage documents.
 */

describe('peak-baseline', () => {
  it('lowerQuantile clamps q above 1 to the largest value', () => {
    const v = Float64Array.from([3, 1, 2]);
    expect(lowerQuantile(v, 1.5, new Float64Array(3))).toBe(3);
    expect(lowerQuantile(v, -1, new Float64Array(3))).toBe(1);
  });

  it('the step is the median of uneven steps', () => {
    // Steps 1, 2, 3, 4, 5, 6: the lower median, order statistic ⌊0.5·5⌋ = 2, is 3.
    expect(toAbsorbance([0, 1, 3, 6, 10, 15, 21], [0, 0, 0, 0, 0, 0, 0], 'absorbance').step).toBe(3);
  });

  it('first and last x equal: read as increasing, refused where it turns', () => {
    try {
      toAbsorbance([1, 2, 3, 4, 3, 2, 1], [0, 0, 0, 0, 0, 0, 0], undefined);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ScienceError);
      expect((e as ScienceError).message).toBe('x must be strictly monotonic; it is not at point 4');
    }
  });

  it('transmittance up to exactly 1.5 is a fraction, above it per cent', () => {
    const frac = toAbsorbance([1, 2, 3, 4, 5, 6, 7], [1.5, 0.1, 1, 1, 1, 1, 1], 'transmittance');
    expect(frac.absorbance[0]).toBe(-Math.log10(1.5));
    expect(frac.absorbance[1]).toBe(1);
    const pct = toAbsorbance([1, 2, 3, 4, 5, 6, 7], [1.6, 10, 100, 100, 100, 100, 100], 'transmittance');
    expect(pct.absorbance[1]).toBe(1);
  });

  it('strongestWidthInPoints: half-height crossings of the tallest (first of equal) feature above the lowest value', () => {
    // Top 5 at index 4, half 2.5: 3 at index 3 is above, 1 at index 2 is not; right the same: 6 − 2 = 4.
    expect(strongestWidthInPoints(Float64Array.from([0, 0, 1, 3, 5, 3, 1, 0, 0]))).toBe(4);
    // Equal tops: the first (index 1, crossings 0 and 2: width 2), not the wider second.
    expect(strongestWidthInPoints(Float64Array.from([0, 5, 0, 0, 0, 5, 5, 5, 0]))).toBe(2);
    // Lowest 1, top 6: half 3.5; 4 is above it, 2 is not: crossings 2 and 6.
    expect(strongestWidthInPoints(Float64Array.from([1, 1, 2, 4, 6, 4, 2, 1, 1]))).toBe(4);
    // A value exactly at half height is not above it: crossings 2 and 4.
    expect(strongestWidthInPoints(Float64Array.from([0, 0, 3, 6, 3, 0, 0]))).toBe(2);
    // At the ends the crossing stops at the first and last sample.
    expect(strongestWidthInPoints(Float64Array.from([6, 4, 1, 1, 1, 1, 1]))).toBe(2);
    expect(strongestWidthInPoints(Float64Array.from([1, 1, 1, 1, 1, 4, 6]))).toBe(2);
  });

  it('aboveBaseline with one segment subtracts that segment’s 20th percentile', () => {
    // 50 points (< 64: one segment); values 0…49 shuffled by a fixed rule; ⌊0.2·49⌋ = 9 → the level is 9.
    const n = 50;
    const a = Float64Array.from({ length: n }, (_, i) => (i * 17) % n);
    const x = Float64Array.from({ length: n }, (_, i) => 100 + i);
    const r = aboveBaseline({ x, absorbance: a, step: 1 });
    for (let i = 0; i < n; i++) expect(r[i]).toBe((a[i] as number) - 9);
  });

  it('aboveBaseline with several segments equals the documented rule computed by sorting', () => {
    // 400 points, one Gaussian line of FWHM 20 samples on a bent baseline: 12 × 20 = 240 > 400/4, so segments of
    // max(64, round(400/100), 100) = 100 points; levels at the ⌊0.2·99⌋ = 19th order statistic, joined through the
    // segment centres, extended flat-sloped beyond the outer ones.
    const n = 400;
    const x = Float64Array.from({ length: n }, (_, i) => 2000 + 0.05 * i);
    const a = Float64Array.from(
      x,
      (_v, i) => 0.1 + 1e-3 * Math.abs(i - 150) + Math.exp(-4 * Math.LN2 * ((i - 230) / 20) ** 2) + 0.001 * Math.sin(i),
    );
    const seg = 100;
    const centres: number[] = [];
    const levels: number[] = [];
    for (let from = 0; from < n; from += seg) {
      const to = Math.min(n, from + seg);
      centres.push(0.5 * ((x[from] as number) + (x[to - 1] as number)));
      const sorted = Array.from(a.subarray(from, to)).sort((p, q) => p - q);
      levels.push(sorted[Math.floor(0.2 * (to - from - 1))] as number);
    }
    const r = aboveBaseline({ x, absorbance: a, step: 0.05 });
    for (let i = 0; i < n; i++) {
      const xi = x[i] as number;
      let k = 0;
      for (let j = 1; j <= centres.length - 2; j++) if ((centres[j] as number) < xi) k = j;
      const t = (xi - (centres[k] as number)) / ((centres[k + 1] as number) - (centres[k] as number));
      const base = (levels[k] as number) + t * ((levels[k + 1] as number) - (levels[k] as number));
      expect(r[i]).toBe((a[i] as number) - base);
    }
  });

  it('firstNoiseEstimate of fewer than 9 points has no segment: 1e-12', () => {
    expect(firstNoiseEstimate(Float64Array.from([1, 5, 2, 8, 3, 9, 4, 7]))).toBe(1e-12);
  });
});

describe('peak-candidates', () => {
  const f = (v: number[], threshold: number, prominence = 0) =>
    findCandidates(Float64Array.from(v), threshold, prominence);

  it('a maximum at the threshold counts; a flat top counts at its last sample', () => {
    expect(f([0, 1, 2, 1, 0, 0, 0], 2).index).toEqual([2]);
    // 3, 3: the second is ≥ its left and > its right. Half height 1.5: crossings 1 and 4, half width 1.5.
    expect(f([0, 1, 3, 3, 1, 0, 0], 1)).toEqual({ index: [3], halfWidth: [1.5] });
  });

  it('a split top within one half width: the higher sample stays, the first of equal ones', () => {
    // Maxima 3 (5) and 5 (5): half width at 3 is (7 − 1)/2 = 3 ≥ 2 apart, so one; equal, so the first.
    expect(f([0, 1, 4, 5, 4.5, 5, 4, 1, 0], 1)).toEqual({ index: [3], halfWidth: [3] });
    // Maxima 3 (5) and 6 (5.2): half width at 3 is (7 − 1)/2 = 3, exactly the distance: one, the higher at 6,
    // whose half width (crossings 1 and 7) is 3.
    expect(f([0, 1, 4, 5, 4.5, 4.6, 5.2, 2, 1, 0], 1)).toEqual({ index: [6], halfWidth: [3] });
  });

  it('half widths at the ends of the array and at exactly half height', () => {
    // Top at 1, half 2.5: the left crossing stops at sample 0, the right at 2: (2 − 0)/2 = 1.
    expect(f([4, 5, 1, 0, 0, 0, 0], 1).halfWidth).toEqual([1]);
    expect(f([0, 0, 0, 0, 1, 5, 4], 1).halfWidth).toEqual([1]);
    // 3 is exactly half of 6, not above it: crossings 2 and 4, half width 1.
    expect(f([0, 0, 3, 6, 3, 0, 0], 1).halfWidth).toEqual([1]);
  });

  it('the half width is searched at most 200 samples out', () => {
    // A Gaussian of FWHM 1000 samples: its half-height points are 500 out, so both searches stop at 200.
    const r = Array.from({ length: 3000 }, (_, i) => Math.exp(-4 * Math.LN2 * ((i - 1500) / 1000) ** 2));
    expect(f(r, 0.5)).toEqual({ index: [1500], halfWidth: [200] });
  });

  it('prominence: a walk past lower neighbours to the deeper dip; equal neighbours do not stop it; ≥ counts', () => {
    // Maxima 1 (10), 4 (3), 8 (4), far enough apart not to merge (half widths 1, 3, 3); dips 0 and 2. With
    // prominence 2: the 3 stands 1 above the dip before the higher 4 (dropped); the 4 stands 4 − 2 = 2 above that
    // dip (kept: exactly the prominence).
    expect(f([0, 10, 0, 0, 3, 2, 2, 2, 4, 0, 0], 1, 2).index).toEqual([1, 8]);
    // Maxima 1 (3), 5 (4), 9 (10); dips 2.5 and 0. The 4 stands only 1.5 above the dip beside the lower 3 but walks
    // on past it to the end (no higher maximum on that side): kept; the 3 is dropped at the higher 4.
    expect(f([0, 3, 2.5, 2.5, 2.5, 4, 0, 0, 0, 10, 0], 1, 2).index).toEqual([5, 9]);
    // Maxima 1 (4), 5 (4), 9 (10); dips 3 and 0. An equal neighbour is not higher: the first 4 walks on to the dip
    // 0 beyond it (kept); the second walks left to the end (kept).
    expect(f([0, 4, 3, 3, 3, 4, 0, 0, 0, 10, 0], 1, 2).index).toEqual([1, 5, 9]);
  });

  it('prominence: the walk goes on in its own direction, never back over the line', () => {
    // Maxima 1 (5), 4 (4), 7 (3), 10 (6), half widths 1; dips 0, 1.5, 1.5; prominence 3. The 4 walks right past the
    // lower 3 over shallow dips (1.5 below it: 2.5 < 3) to the higher 6: dropped, though its left dip is deep.
    expect(f([0, 5, 0, 0, 4, 1.5, 1.5, 3, 1.5, 1.5, 6, 0, 0], 1, 3).index).toEqual([1, 10]);
  });

  it('groups: closer than 3 half widths (the larger of the two); windows 4 widest half widths out, half-way at most', () => {
    // 10 and 14: 4 < 3·max(2, 1) = 6, one group. 14 and 24: 10 ≥ 6; 24 and 32: 8 ≥ 6; 32 and 97: far.
    const g = groupCandidates({ index: [10, 14, 24, 32, 97], halfWidth: [2, 1, 2, 2, 2] }, 100);
    expect(g).toEqual([
      // lo max(0, 10 − 8, −∞) = 2; hi min(99, 14 + 8, ⌊(14 + 24)/2⌋ = 19) = 19.
      { members: [10, 14], halfWidths: [2, 1], widest: 2, lo: 2, hi: 19 },
      // lo max(0, 16, ⌈19⌉) = 19; hi min(99, 32, ⌊28⌋) = 28.
      { members: [24], halfWidths: [2], widest: 2, lo: 19, hi: 28 },
      // lo max(0, 24, 28) = 28; hi min(99, 40, ⌊64.5⌋) = 40.
      { members: [32], halfWidths: [2], widest: 2, lo: 28, hi: 40 },
      // lo max(0, 89, ⌈64.5⌉ = 65) = 89; hi min(99, 105, +∞) = 99.
      { members: [97], halfWidths: [2], widest: 2, lo: 89, hi: 99 },
    ]);
    // Exactly 3 half widths apart is not closer: two groups.
    expect(groupCandidates({ index: [10, 16], halfWidth: [2, 2] }, 100)).toHaveLength(2);
  });
});

import { describe, expect, it } from 'vitest';
import { aboveBaseline, firstNoiseEstimate, lowerQuantile, toAbsorbance } from '../../src/spectra/peak-baseline.js';
import { findCandidates, groupCandidates } from '../../src/spectra/peak-candidates.js';
import { seededNormal, seededRandom } from '../helpers/random.js';

describe('peak finder stages', () => {
  it('lowerQuantile by selection equals the sorted order statistic ⌊q(n−1)⌋ and leaves its input alone', () => {
    const u = seededRandom(11);
    for (const n of [1, 2, 7, 64, 1001]) {
      const v = Float64Array.from({ length: n }, () => Math.round(u() * 50) / 7); // with ties
      const before = Float64Array.from(v);
      const sorted = Float64Array.from(v).sort();
      for (const q of [0, 0.2, 0.25, 0.5, 0.9, 1]) {
        const k = Math.min(n - 1, Math.floor(q * (n - 1)));
        // Exact: a selected sample value (tolerance 0).
        expect(lowerQuantile(v, q, new Float64Array(n))).toBe(sorted[k]);
      }
      expect(v).toEqual(before);
    }
  });

  it('the first noise estimate lies between 0.7 and 1.0 of the σ of white noise on a sloping baseline', () => {
    const g = seededNormal(5);
    const n = 20_000;
    const x = Float64Array.from({ length: n }, (_, i) => 1000 + 0.01 * i);
    const y = Float64Array.from(x, (xi) => 0.1 + 1e-4 * (xi - 1000) + 0.002 * g());
    const r = aboveBaseline(toAbsorbance(x, y, 'absorbance'));
    // Taken at the 25th percentile of 32-point segment estimates (lines raise the others), so low for pure noise
    // by design: about 0.8 σ here; the final noise comes from the fit residuals. Stated band 0.7–1.0.
    const ratio = firstNoiseEstimate(r) / 0.002;
    expect(ratio).toBeGreaterThan(0.7);
    expect(ratio).toBeLessThan(1.0);
  });

  it('transmittance in percent becomes absorbance and x is turned to increasing order', () => {
    const x = [7, 6, 5, 4, 3, 2, 1];
    const t = [100, 50, 10, 100, 100, 100, 100];
    const s = toAbsorbance(x, t, 'transmittance');
    expect(Array.from(s.x)).toEqual([1, 2, 3, 4, 5, 6, 7]);
    // −log10(0.5) = 0.30103 (exact to 5 digits); point x = 6 came second.
    expect(s.absorbance[5]).toBeCloseTo(0.30103, 5);
    expect(s.absorbance[4]).toBeCloseTo(1, 12);
    expect(s.step).toBe(1);
  });

  it('candidates: one per line top, overlapping lines grouped, isolated lines alone', () => {
    const n = 2000;
    const r = new Float64Array(n);
    const line = (c: number, w: number, h: number) => {
      for (let i = 0; i < n; i++) r[i] = (r[i] as number) + h * Math.exp(-4 * Math.LN2 * ((i - c) / w) ** 2);
    };
    line(300, 10, 1);
    line(312, 10, 0.6); // 1.2 FWHM from the first: a blend
    line(1200, 10, 0.8);
    const c = findCandidates(r, 0.1);
    // The blend pulls the weaker top one sample towards the stronger line.
    expect(c.index).toEqual([300, 311, 1200]);
    const groups = groupCandidates(c, n);
    expect(groups.map((g) => g.members)).toEqual([[300, 311], [1200]]);
    // The first window stops half-way to the isolated line's candidate at the latest.
    expect(groups[0]?.hi).toBeLessThanOrEqual(756);
  });

  it("prominence: noise maxima on a strong line's wings are dropped, a weaker line beyond a real dip is kept", () => {
    const n = 3000;
    const sigma = 0.01;
    const z = seededNormal(21);
    const r = new Float64Array(n);
    // Lorentzian lines (FWHM 20 samples): 2.0 at 1000 (wings above the 6σ threshold for ~±170 samples) and 0.3 at
    // 1100, 5 FWHM away with a dip far below both; noise σ = 0.01.
    for (let i = 0; i < n; i++) {
      const l = (c: number, h: number) => h / (1 + 4 * ((i - c) / 20) ** 2);
      r[i] = l(1000, 2) + l(1100, 0.3) + sigma * z();
    }
    const all = findCandidates(r, 6 * sigma);
    const prominent = findCandidates(r, 6 * sigma, 4 * sigma);
    // Without the prominence rule the wings carry extra maxima; with it, one candidate per line.
    expect(all.index.length).toBeGreaterThan(2);
    expect(prominent.index.length).toBe(2);
    expect(Math.abs((prominent.index[0] as number) - 1000)).toBeLessThanOrEqual(2);
    expect(Math.abs((prominent.index[1] as number) - 1100)).toBeLessThanOrEqual(3);
  });

  it('the first noise estimate equals the same rule computed by sorting (segments of 32 differences, a short last one)', () => {
    const z = seededNormal(5);
    // Smooth noise, and noise rounded to 1/8 so that segments hold tied differences and tied deviations.
    for (const [n, tied] of [9, 40, 41, 1000, 4097].flatMap((n) => [[n, false] as const, [n, true] as const])) {
      const r = Float64Array.from({ length: n }, (_, i) => (tied ? Math.round(8 * z()) / 8 : 0.01 * z() + 1e-4 * i));
      // Independent of the finder's selection: sort each segment, take ⌊(len−1)/2⌋ and ⌊0.25(k−1)⌋ order statistics.
      const lower = (v: number[], q: number) => [...v].sort((a, b) => a - b)[Math.floor(q * (v.length - 1))] as number;
      const seg: number[] = [];
      for (let s0 = 0; s0 + 8 <= n - 1; s0 += 32) {
        const d = Array.from(
          { length: Math.min(n - 1, s0 + 32) - s0 },
          (_, i) => (r[s0 + i + 1] as number) - (r[s0 + i] as number),
        );
        const med = lower(d, 0.5);
        seg.push(
          (1.4826 *
            lower(
              d.map((v) => Math.abs(v - med)),
              0.5,
            )) /
            Math.SQRT2,
        );
      }
      expect(firstNoiseEstimate(r)).toBe(Math.max(lower(seg, 0.25), 1e-12));
    }
  });
});

import { describe, expect, it } from 'vitest';
import { MAD_TO_SIGMA, median, quantile, robustSigma, selectInPlace } from '../../src/stats/robust.js';

/** Reference: sort a copy and interpolate (the definition of the type-7 quantile, Hyndman & Fan 1996). */
function sortedQuantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  const h = (s.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, s.length - 1);
  return (s[lo] as number) + (h - lo) * ((s[hi] as number) - (s[lo] as number));
}

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

describe('robust statistics by selection', () => {
  it('quantiles agree with sorting on random inputs with ties (exact)', () => {
    const rnd = lcg(7);
    for (let trial = 0; trial < 200; trial++) {
      const n = 1 + Math.floor(rnd() * 40);
      const xs = Array.from({ length: n }, () => Math.round(rnd() * 10) / 2);
      for (const q of [0, 0.1, 0.25, 0.5, 0.75, 0.9, 1]) expect(quantile(xs, q)).toBe(sortedQuantile(xs, q));
    }
  });

  it('selectInPlace returns the k-th order statistic', () => {
    const xs = [5, 1, 4, 1, 5, 9, 2, 6];
    const sorted = [...xs].sort((a, b) => a - b);
    for (let k = 0; k < xs.length; k++) expect(selectInPlace([...xs], k)).toBe(sorted[k]);
  });

  it('median of an even count interpolates; empty input is NaN; input is left untouched', () => {
    const xs = [3, 1, 2, 10];
    expect(median(xs)).toBe(2.5);
    expect(xs).toEqual([3, 1, 2, 10]);
    expect(Number.isNaN(median([]))).toBe(true);
  });

  it('every quantile of an empty input is NaN, the end points q = 0 and 1 included', () => {
    // q = 0 and 1 land exactly on an order statistic (h = lo), so only the empty-input guard gives NaN there.
    for (const q of [0, 0.25, 1]) expect(quantile([], q)).toBeNaN();
    expect(robustSigma([])).toBeNaN();
  });

  it('MAD factor is 1/Φ⁻¹(3/4) (Φ⁻¹(0.75) = 0.674489750196082, from memory of normal tables)', () => {
    expect(MAD_TO_SIGMA).toBeCloseTo(1 / 0.674489750196082, 12);
  });

  it('robust sigma of normal samples is within 5 % of 1 for n = 20 000 and ignores 10 % gross outliers', () => {
    const rnd = lcg(11);
    const xs: number[] = [];
    for (let i = 0; i < 20_000; i++) {
      // Box–Muller
      const u = Math.max(rnd(), 1e-12);
      const v = rnd();
      xs.push(Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v));
    }
    expect(Math.abs(robustSigma(xs) - 1)).toBeLessThan(0.05);
    for (let i = 0; i < 2000; i++) xs[i] = 1000 + i;
    expect(Math.abs(robustSigma(xs) - 1)).toBeLessThan(0.2);
  });
});

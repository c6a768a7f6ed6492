import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { toAbsorbance } from '../../src/spectra/peak-baseline.js';
import {
  findPeaks,
  finishPeaks,
  fitGroups,
  type Peak,
  type PeakOptions,
  packGroups,
  preparePeakSearch,
} from '../../src/spectra/peaks.js';
import { area, centreVariances, cramerRao, K_GAUSS, type Line, makeSpectrum } from '../helpers/profiles.js';
import { seededNormal } from '../helpers/random.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

/**
 * The peak finder on small synthetic spectra (a few hundred to a thousand points, milliseconds each) made here from
 * closed-form profiles: Gaussian h·exp(−4 ln2 u²), Lorentzian h/(1 + 4u²), u = (x − c)/w with w the FWHM, and
 * their linear mix (a pseudo-Voigt of Lorentzian share η). Areas by the closed forms h·w·√(π/(4 ln 2)) (Gaussian)
 * and π·h·w/2 (Lorentzian). Positions, heights and widths are checked against the values put in, within 4 of the
 * Cramér–Rao standard deviations that this test computes itself from the profile's derivatives (written out below)
 * and the noise σ put in; everything is computed inside `it`.
 */

/** One found peak checked against the line put in: position, height, width within 4 CRB σ; area by propagation. */
function expectLine(p: Peak | undefined, l: Line, crb: ReturnType<typeof cramerRao>) {
  expect(p, `line at ${l.c}`).toBeDefined();
  const q = p as Peak;
  expect(Math.abs(q.position - l.c)).toBeLessThan(4 * crb.c);
  expect(Math.abs(q.height - l.h)).toBeLessThan(4 * crb.h);
  expect(Math.abs(q.width - l.w)).toBeLessThan(4 * crb.w);
  // Area = h·w·k(η): |δA| ≤ k(w|δh| + h|δw|) + h·w·|δη|·|π/2 − k|, each term at its 4σ bound.
  const k = (1 - l.eta) * K_GAUSS + (l.eta * Math.PI) / 2;
  const tolA = 4 * (k * (l.w * crb.h + l.h * crb.w) + l.h * l.w * crb.eta * Math.abs(Math.PI / 2 - K_GAUSS));
  expect(Math.abs(q.intensity - area(l))).toBeLessThan(tolA);
  expect(Math.abs(q.lorentzianFraction - l.eta)).toBeLessThanOrEqual(4 * crb.eta);
}

describe('one line on a sloping baseline, each shape', () => {
  const base = { from: 2000, step: 0.01, n: 700, sigma: 0.002, a0: 0.05, a1: 0.004 };

  it.each([
    ['gaussian', 0, 1],
    ['gaussian', 0, 2],
    ['lorentzian', 1, 3],
    ['lorentzian', 1, 4],
    ['voigt', 0.5, 5],
    ['voigt', 0.3, 6],
  ] as const)('%s (η = %f), seed %i: position, height, width, area and η within 4 CRB σ', (shape, eta, seed) => {
    const l: Line = { c: 2003.4567, h: 0.4, w: 0.12, eta };
    const s = makeSpectrum([l], { ...base, seed });
    const r = findPeaks(s.x, s.y, { shape });
    expect(r.peaks).toHaveLength(1);
    expect(r.points).toBe(700);
    expect(r.step).toBeCloseTo(0.01, 12);
    const crb = cramerRao(l, s.x, base.sigma, shape === 'voigt');
    expectLine(r.peaks[0], l, crb);
    // The pooled noise comes from the window's residuals (about 50 points, relative sd ≈ 1/√(2·45) = 11 %): within
    // 0.6–1.4 of the σ put in (about 3.5 sd).
    expect(r.noise / base.sigma).toBeGreaterThan(0.6);
    expect(r.noise / base.sigma).toBeLessThan(1.4);
    // The stated uncertainty is the covariance σ (≈ the CRB σ, the same window and model) scaled by that noise, with
    // 2 % of the step in quadrature: within 0.6–1.5 of √(CRB² + (0.0002)²).
    const expected = Math.hypot(crb.c, 0.02 * base.step);
    expect((r.peaks[0] as Peak).uncertainty / expected).toBeGreaterThan(0.6);
    expect((r.peaks[0] as Peak).uncertainty / expected).toBeLessThan(1.5);
  });
});

describe('several lines', () => {
  const lines: Line[] = [
    { c: 2001.5, h: 0.4, w: 0.1, eta: 0.5 },
    { c: 2003.0, h: 0.2, w: 0.1, eta: 0.5 },
    { c: 2004.5, h: 0.3, w: 0.1, eta: 0.5 },
    // 3 σ: below the default threshold of 6 σ.
    { c: 2006.0, h: 0.006, w: 0.1, eta: 0.5 },
  ];
  const opts = { from: 2000, step: 0.01, n: 800, sigma: 0.002, seed: 7 };

  it('found in order of position, the weak one left out; maxPeaks keeps the tallest', () => {
    const s = makeSpectrum(lines, opts);
    const r = findPeaks(s.x, s.y);
    expect(r.peaks).toHaveLength(3);
    for (let k = 0; k < 3; k++)
      expectLine(r.peaks[k], lines[k] as Line, cramerRao(lines[k] as Line, s.x, opts.sigma, true));
    const two = findPeaks(s.x, s.y, { maxPeaks: 2 });
    expect(two.peaks.map((p) => Math.round(p.position * 10) / 10)).toEqual([2001.5, 2004.5]);
    // A lower threshold (2 σ) finds the 3 σ line too (its position within 4 CRB σ).
    const low = findPeaks(s.x, s.y, { threshold: 2 });
    const weak = low.peaks.find((p) => Math.abs(p.position - 2006) < 0.1);
    expect(weak).toBeDefined();
  });

  it('transmittance in per cent with decreasing x gives the same peaks as absorbance', () => {
    const s = makeSpectrum(lines.slice(0, 3), { ...opts, sigma: 0, seed: 1 });
    const z = seededNormal(8);
    const a = s.y.map((v) => v + 0.002 * z());
    const t = a.map((v) => 100 * 10 ** -v).reverse();
    const xr = [...s.x].reverse();
    const fromT = findPeaks(xr, t, { yUnit: 'transmittance' });
    const fromA = findPeaks(s.x, a);
    expect(fromT.peaks).toHaveLength(3);
    for (let k = 0; k < 3; k++) {
      // The same absorbance up to rounding of 10^−a and back (1e-12): the same peaks to 1e-6 of the step.
      expect(Math.abs((fromT.peaks[k] as Peak).position - (fromA.peaks[k] as Peak).position)).toBeLessThan(1e-8);
    }
    // Transmittance as a fraction (max ≤ 1.5) is not taken for per cent.
    const frac = findPeaks(
      xr,
      t.map((v) => v / 100),
      { yUnit: 'transmittance' },
    );
    expect(Math.abs((frac.peaks[0] as Peak).position - (fromA.peaks[0] as Peak).position)).toBeLessThan(1e-8);
  });

  it('the stages run on packed chunks give exactly what findPeaks gives', () => {
    const s = makeSpectrum(lines.slice(0, 3), opts);
    const whole = findPeaks(s.x, s.y);
    const search = preparePeakSearch(s.x, s.y);
    expect(search.groups).toHaveLength(3);
    const fits = [...fitGroups(packGroups(search, 0, 1)), ...fitGroups(packGroups(search, 1, 3))];
    expect(finishPeaks(search, fits)).toEqual(whole);
    const packed = packGroups(search, 1, 3);
    const g = search.groups;
    expect(packed.x.length).toBe(
      (g[1]?.hi as number) - (g[1]?.lo as number) + (g[2]?.hi as number) - (g[2]?.lo as number) + 2,
    );
    expect(packed.groups[0]?.lo).toBe(0);
    expect(packed.groups[1]?.lo).toBe((g[1]?.hi as number) - (g[1]?.lo as number) + 1);
    expect(packed.x[packed.groups[1]?.members[0] as number]).toBe(search.x[g[2]?.members[0] as number]);
  });
});

describe('lines the finder leaves out', () => {
  it('a line closer to an end of the spectrum than half its width', () => {
    // FWHM 0.1 (10 samples); centres 0.03 and 0.08 from the first point, and 0.03 from the last.
    const mk = (c: number) =>
      makeSpectrum([{ c, h: 0.4, w: 0.1, eta: 0 }], { from: 2000, step: 0.01, n: 400, sigma: 0.002, seed: 9 });
    const near = mk(2000.03);
    expect(findPeaks(near.x, near.y).peaks).toHaveLength(0);
    const inside = mk(2000.08);
    expect(findPeaks(inside.x, inside.y).peaks).toHaveLength(1);
    const end = mk(2003.96);
    expect(findPeaks(end.x, end.y).peaks).toHaveLength(0);
  });

  it('with five or more lines, one more than 4 times wider than the median is baseline structure', () => {
    const narrow = (c: number): Line => ({ c, h: 0.4, w: 0.08, eta: 0 });
    const broad: Line = { c: 2007, h: 0.2, w: 0.45, eta: 0 };
    const five = [2001, 2002, 2003, 2004, 2005].map(narrow);
    const s = makeSpectrum([...five, broad], { from: 2000, step: 0.01, n: 900, sigma: 0.002, seed: 10 });
    const r = findPeaks(s.x, s.y, { shape: 'gaussian' });
    expect(r.peaks.map((p) => Math.round(p.position))).toEqual([2001, 2002, 2003, 2004, 2005]);
    // With only four lines in all the broad one is kept.
    const s4 = makeSpectrum([...five.slice(0, 3), broad], { from: 2000, step: 0.01, n: 900, sigma: 0.002, seed: 10 });
    const r4 = findPeaks(s4.x, s4.y, { shape: 'gaussian' });
    expect(r4.peaks.map((p) => Math.round(p.position))).toEqual([2001, 2002, 2003, 2007]);
  });
});

describe('blends, phantoms, noise alone, narrow lines', () => {
  it('a shoulder 7/8 of a FWHM from a stronger line is found as a blend', () => {
    // Two pseudo-Voigt lines 7/8 of a FWHM apart in a noisy spectrum: the weaker is a shoulder without its own maximum, found
    // in the residual of a one-line fit. Positions within 4 Cramér–Rao σ (σ = 0.002, step 0.01, FWHM 0.08).
    const sa: Line = { c: 2002, h: 0.4, w: 0.08, eta: 0.5 };
    const sb: Line = { c: 2002.07, h: 0.2, w: 0.08, eta: 0.5 };
    const s = makeSpectrum([sa, sb], { from: 2000, step: 0.01, n: 400, sigma: 0.002, seed: 12 });
    const found = findPeaks(s.x, s.y);
    expect(found.peaks).toHaveLength(2);
    const win = s.x.filter((v) => v >= 2001.8 && v <= 2002.3);
    const vv = centreVariances([sa, sb], win, true);
    expect(Math.abs((found.peaks[0] as Peak).position - sa.c)).toBeLessThan(4 * 0.002 * Math.sqrt(vv[0] as number));
    expect(Math.abs((found.peaks[1] as Peak).position - sb.c)).toBeLessThan(4 * 0.002 * Math.sqrt(vv[1] as number));
  });

  it('a true Voigt (numerically convolved) of high signal to noise gives one line, not a phantom blend', () => {
    const s = syntheticSpectrum({
      lines: [{ position: 2002, strength: 0.5 }],
      from: 2000,
      to: 2004,
      step: 0.01,
      gaussianFwhm: 0.08,
      lorentzianFwhm: 0.06,
      noise: 0.0005,
      baseline: [0.02, 0],
      seed: 13,
    });
    const r = findPeaks(s.x, s.y);
    expect(r.peaks).toHaveLength(1);
    // The pseudo-Voigt misses a Voigt by about 1 % of its height (Thompson, Cox & Hastings 1987): the noise figure
    // from the residuals lies between the σ put in and σ + 1 % of the height.
    expect(r.noise).toBeGreaterThan(0.0005 * 0.8);
    expect(r.noise).toBeLessThan(0.0005 + 0.01 * 0.5);
  });

  it('a spectrum of pure noise has no peaks and keeps the first noise figure', () => {
    const z = seededNormal(14);
    const xs = Array.from({ length: 2000 }, (_, i) => 1000 + 0.01 * i);
    const ys = xs.map(() => 0.001 * z());
    const r = findPeaks(xs, ys);
    expect(r.peaks).toHaveLength(0);
    // The first estimate: 0.7–1.0 of σ (test/spectra/peak-stages.test.ts states that band).
    expect(r.noise / 0.001).toBeGreaterThan(0.7);
    expect(r.noise / 0.001).toBeLessThan(1.0);
  });

  it('with five or more lines, one narrower than a quarter of the median width is left out', () => {
    const wide = (c: number): Line => ({ c, h: 0.4, w: 0.2, eta: 0 });
    const lines = [2001, 2002, 2003, 2004, 2005].map(wide);
    const narrow: Line = { c: 2006.5, h: 0.4, w: 0.04, eta: 0 };
    const s = makeSpectrum([...lines, narrow], { from: 2000, step: 0.01, n: 800, sigma: 0.002, seed: 15 });
    const r = findPeaks(s.x, s.y, { shape: 'gaussian' });
    expect(r.peaks.map((p) => Math.round(p.position))).toEqual([2001, 2002, 2003, 2004, 2005]);
  });
});

describe('input refused before any fit', () => {
  const refusal = (x: number[], y: number[], o: PeakOptions = {}) => {
    try {
      toAbsorbance(x, y, o.yUnit);
    } catch (e) {
      if (e instanceof ScienceError) return { code: e.code, message: e.message, details: e.details };
    }
    throw new Error('expected a refusal');
  };
  const seven = [1, 2, 3, 4, 5, 6, 7];

  it('with the code, the message and the point named', () => {
    expect(refusal(seven, [1, 2, 3])).toEqual({
      code: 'INPUT_INVALID',
      message: 'x has 7 points but y has 3',
      details: {},
    });
    expect(refusal([1, 2, 3, 4, 5, 6], [1, 2, 3, 4, 5, 6])).toEqual({
      code: 'INPUT_INVALID',
      message: 'a spectrum needs at least 7 points, not 6',
      details: {},
    });
    expect(refusal(seven, [1, 2, Number.NaN, 4, 5, 6, 7])).toEqual({
      code: 'INPUT_INVALID',
      message: 'point 2 is not a finite number',
      details: { point: 2 },
    });
    expect(refusal([1, 2, 3, Number.POSITIVE_INFINITY, 5, 6, 7], seven).details).toEqual({ point: 3 });
    expect(refusal([1, 2, 3, 3, 5, 6, 7], seven)).toEqual({
      code: 'INPUT_INVALID',
      message: 'x must be strictly monotonic; it is not at point 3',
      details: { point: 3 },
    });
    // Decreasing x: the point is named in the caller's order (index 2 of 7, turned round to 4).
    expect(refusal([7, 6, 5, 5, 3, 2, 1], seven)).toEqual({
      code: 'INPUT_INVALID',
      message: 'x must be strictly monotonic; it is not at point 2',
      details: { point: 4 },
    });
    expect(() => findPeaks(seven, [1, 2, 3])).toThrow(ScienceError);
  });

  it('transmittance at or below zero is clipped to 1e-6 (absorbance 6), not a NaN', () => {
    const s = toAbsorbance(seven, [0.5, 0, -0.1, 1, 1, 1, 1], 'transmittance');
    expect(Array.from(s.absorbance).slice(0, 3)).toEqual([-Math.log10(0.5), 6, 6]);
  });
});

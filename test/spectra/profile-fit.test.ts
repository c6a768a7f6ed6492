import { describe, expect, it } from 'vitest';
import { fitProfiles } from '../../src/spectra/pseudo-voigt-fit.js';
import { area, centreVariances, type Line, lineAt } from '../helpers/profiles.js';

/**
 * The pseudo-Voigt profile fit (src/spectra/pseudo-voigt-fit.ts) on its own, on noise-free lines written out in
 * test/helpers/profiles.ts: the fit must land on the values put in, and its centre variance per unit noise variance
 * must equal the inverse Fisher matrix computed there from the profile's derivatives. Milliseconds each.
 */
describe('the profile fit on its own', () => {
  it('recovers a noise-free pseudo-Voigt with a linear baseline exactly (relative 1e-7)', () => {
    const l: Line = { c: 50.3, h: 2, w: 6, eta: 0.35 };
    const x = Float64Array.from({ length: 101 }, (_, i) => i);
    const r = Float64Array.from(x, (v) => lineAt(l, v) + 0.1 - 0.002 * v);
    // Start from the sample nearest the centre with a half width of 3 samples.
    const f = fitProfiles(x, r, { lo: 0, hi: 100 }, [50], [3], 1, 'voigt');
    const p = f.profiles[0];
    expect(p?.valid).toBe(true);
    expect(Math.abs((p?.position as number) - l.c)).toBeLessThan(1e-7 * l.w);
    expect(Math.abs((p?.height as number) - l.h)).toBeLessThan(1e-7 * l.h);
    expect(Math.abs((p?.width as number) - l.w)).toBeLessThan(1e-7 * l.w);
    expect(Math.abs((p?.lorentzianFraction as number) - l.eta)).toBeLessThan(1e-6);
    expect(Math.abs((p?.intensity as number) - area(l))).toBeLessThan(1e-6 * area(l));
    expect(f.dof).toBe(101 - 6);
    expect(f.rss).toBeLessThan(1e-20);
    for (const v of [0, 37.5, 50.3, 99]) expect(f.model(v)).toBeCloseTo(lineAt(l, v) + 0.1 - 0.002 * v, 9);
  });

  it('two overlapping Gaussians (1 FWHM apart) fitted together; a window too short for its parameters gives nothing', () => {
    const a: Line = { c: 40, h: 1, w: 8, eta: 0 };
    const b: Line = { c: 48, h: 0.6, w: 8, eta: 0 };
    const x = Float64Array.from({ length: 101 }, (_, i) => i);
    const r = Float64Array.from(x, (v) => lineAt(a, v) + lineAt(b, v));
    const f = fitProfiles(x, r, { lo: 10, hi: 80 }, [40, 49], [4, 4], 1, 'gaussian');
    expect(f.profiles.map((p) => p.lorentzianFraction)).toEqual([0, 0]);
    expect(Math.abs((f.profiles[0]?.position as number) - 40)).toBeLessThan(1e-6);
    expect(Math.abs((f.profiles[1]?.position as number) - 48)).toBeLessThan(1e-6);
    expect(Math.abs((f.profiles[1]?.height as number) - 0.6)).toBeLessThan(1e-6);
    expect(f.dof).toBe(71 - 8);
    // Gaussian: 3 parameters per profile + 2 for the baseline = 5 ≥ 5 points.
    const none = fitProfiles(x, r, { lo: 38, hi: 42 }, [40], [4], 1, 'gaussian');
    expect(none).toMatchObject({ profiles: [], rss: 0, dof: 0 });
    expect(none.model(40)).toBe(0);
  });
});

describe("the fit's covariance against the Fisher matrix written out here", () => {
  it.each([
    ['voigt', 0.35],
    ['gaussian', 0],
    ['lorentzian', 1],
  ] as const)(
    '%s: a noise-free line off-centre in its window, the centre variance per unit noise to 1e-6',
    (shape, eta) => {
      const l: Line = { c: 41.3, h: 2, w: 6, eta };
      const x = Float64Array.from({ length: 101 }, (_, i) => i);
      const r = Float64Array.from(x, (v) => lineAt(l, v) + 0.1 - 0.002 * v);
      const f = fitProfiles(x, r, { lo: 20, hi: 80 }, [41], [3], 1, shape);
      const pts = Array.from({ length: 61 }, (_, i) => 20 + i);
      const [v] = centreVariances([l], pts, shape === 'voigt');
      expect(Math.abs((f.profiles[0]?.varianceUnit as number) / (v as number) - 1)).toBeLessThan(1e-6);
      expect(Math.abs((f.profiles[0]?.position as number) - l.c)).toBeLessThan(1e-7 * l.w);
    },
  );

  it('two blended lines: both centre variances', () => {
    const a: Line = { c: 40, h: 1, w: 8, eta: 0.5 };
    const b: Line = { c: 47, h: 0.5, w: 8, eta: 0.5 };
    const x = Float64Array.from({ length: 101 }, (_, i) => i);
    const r = Float64Array.from(x, (v) => lineAt(a, v) + lineAt(b, v));
    const f = fitProfiles(x, r, { lo: 10, hi: 85 }, [40, 48], [5, 5], 1, 'voigt');
    const pts = Array.from({ length: 76 }, (_, i) => 10 + i);
    const v = centreVariances([a, b], pts, true);
    for (let k = 0; k < 2; k++)
      expect(Math.abs((f.profiles[k]?.varianceUnit as number) / (v[k] as number) - 1)).toBeLessThan(1e-6);
  });

  it('a member on a flat window is no valid profile', () => {
    const x = Float64Array.from({ length: 50 }, (_, i) => i);
    const f = fitProfiles(x, new Float64Array(50), { lo: 0, hi: 49 }, [25], [3], 1, 'gaussian');
    expect(f.profiles[0]?.valid).toBe(false);
  });
});

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
import { fitProfiles } from '../../src/spectra/pseudo-voigt-fit.js';
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

interface Line {
  c: number;
  h: number;
  w: number;
  eta: number;
}

const K_GAUSS = Math.sqrt(Math.PI / (4 * Math.LN2)); // 1.0644670 (area of a unit Gaussian of unit FWHM)
const area = (l: Line) => l.h * l.w * ((1 - l.eta) * K_GAUSS + (l.eta * Math.PI) / 2);

function lineAt(l: Line, x: number): number {
  const u = (x - l.c) / l.w;
  return l.h * ((1 - l.eta) * Math.exp(-4 * Math.LN2 * u * u) + l.eta / (1 + 4 * u * u));
}

/** x from `from` in `n` steps; absorbance = lines + a0 + a1 (x − from) + seeded white noise σ. */
function makeSpectrum(
  lines: Line[],
  opts: { from: number; step: number; n: number; sigma: number; seed: number; a0?: number; a1?: number },
) {
  const z = seededNormal(opts.seed);
  const x = Array.from({ length: opts.n }, (_, i) => opts.from + i * opts.step);
  const y = x.map(
    (v) =>
      (opts.a0 ?? 0) +
      (opts.a1 ?? 0) * (v - opts.from) +
      lines.reduce((s, l) => s + lineAt(l, v), 0) +
      opts.sigma * z(),
  );
  return { x, y };
}

/**
 * Cramér–Rao standard deviations of (c, h, w[, η]) of one line fitted with a local linear baseline a + b(x − x0)
 * over the points within ±2 FWHM of the line (the finder's window reaches 4 half widths out), white noise σ:
 * the square roots of the diagonal of (JᵀJ/σ²)⁻¹, J the derivatives of the model at the true values.
 *   ∂/∂c = h[(1−η)·8ln2·u·G + η·8u·L²]/w,  ∂/∂h = (1−η)G + ηL,  ∂/∂w = h[(1−η)·8ln2·u²·G + η·8u²·L²]/w,
 *   ∂/∂η = h(L − G),  ∂/∂a = 1,  ∂/∂b = x − x0;  G = exp(−4 ln2 u²), L = 1/(1 + 4u²).
 */
function cramerRao(l: Line, x: readonly number[], sigma: number, freeEta: boolean) {
  const pts = x.filter((v) => Math.abs(v - l.c) <= 2 * l.w);
  const x0 = pts[0] as number;
  const rows = pts.map((v) => {
    const u = (v - l.c) / l.w;
    const G = Math.exp(-4 * Math.LN2 * u * u);
    const L = 1 / (1 + 4 * u * u);
    const r = [
      (l.h * ((1 - l.eta) * 8 * Math.LN2 * u * G + l.eta * 8 * u * L * L)) / l.w,
      (1 - l.eta) * G + l.eta * L,
      (l.h * ((1 - l.eta) * 8 * Math.LN2 * u * u * G + l.eta * 8 * u * u * L * L)) / l.w,
    ];
    if (freeEta) r.push(l.h * (L - G));
    r.push(1, v - x0);
    return r;
  });
  const q = (rows[0] as number[]).length;
  // Augmented [F | I], Gauss–Jordan with partial pivoting.
  const a = Array.from({ length: q }, (_, i) => [
    ...Array.from(
      { length: q },
      (_, j) => rows.reduce((s, r) => s + (r[i] as number) * (r[j] as number), 0) / sigma ** 2,
    ),
    ...Array.from({ length: q }, (_, j) => (i === j ? 1 : 0)),
  ]);
  for (let col = 0; col < q; col++) {
    let piv = col;
    for (let i = col + 1; i < q; i++) if (Math.abs(a[i]?.[col] as number) > Math.abs(a[piv]?.[col] as number)) piv = i;
    [a[col], a[piv]] = [a[piv] as number[], a[col] as number[]];
    const p = a[col] as number[];
    const d = p[col] as number;
    for (let j = 0; j < 2 * q; j++) p[j] = (p[j] as number) / d;
    for (let i = 0; i < q; i++) {
      if (i === col) continue;
      const row = a[i] as number[];
      const f = row[col] as number;
      for (let j = 0; j < 2 * q; j++) row[j] = (row[j] as number) - f * (p[j] as number);
    }
  }
  const sd = (k: number) => Math.sqrt((a[k] as number[])[q + k] as number);
  return { c: sd(0), h: sd(1), w: sd(2), eta: freeEta ? sd(3) : 0 };
}

/**
 * (JᵀJ)⁻¹ per unit noise variance for several lines sharing η, with a linear baseline a + b(x − x0) over exactly the
 * points given (x0 the first): the same derivatives as above, summed for η. Returns the variance of each centre.
 */
function centreVariances(lines: readonly Line[], pts: readonly number[], freeEta: boolean): number[] {
  const x0 = pts[0] as number;
  const rows = pts.map((v) => {
    const r: number[] = [];
    let dEta = 0;
    for (const l of lines) {
      const u = (v - l.c) / l.w;
      const G = Math.exp(-4 * Math.LN2 * u * u);
      const L = 1 / (1 + 4 * u * u);
      r.push(
        (l.h * ((1 - l.eta) * 8 * Math.LN2 * u * G + l.eta * 8 * u * L * L)) / l.w,
        (1 - l.eta) * G + l.eta * L,
        (l.h * ((1 - l.eta) * 8 * Math.LN2 * u * u * G + l.eta * 8 * u * u * L * L)) / l.w,
      );
      dEta += l.h * (L - G);
    }
    if (freeEta) r.push(dEta);
    r.push(1, v - x0);
    return r;
  });
  const inv = invert(rows);
  return lines.map((_, k) => (inv[3 * k] as number[])[3 * k] as number);
}

/** (RᵀR)⁻¹ by Gauss–Jordan with partial pivoting. */
function invert(rows: readonly number[][]): number[][] {
  const q = (rows[0] as number[]).length;
  const a = Array.from({ length: q }, (_, i) => [
    ...Array.from({ length: q }, (_, j) => rows.reduce((s, r) => s + (r[i] as number) * (r[j] as number), 0)),
    ...Array.from({ length: q }, (_, j) => (i === j ? 1 : 0)),
  ]);
  for (let col = 0; col < q; col++) {
    let piv = col;
    for (let i = col + 1; i < q; i++) if (Math.abs(a[i]?.[col] as number) > Math.abs(a[piv]?.[col] as number)) piv = i;
    [a[col], a[piv]] = [a[piv] as number[], a[col] as number[]];
    const p = a[col] as number[];
    const d = p[col] as number;
    for (let j = 0; j < 2 * q; j++) p[j] = (p[j] as number) / d;
    for (let i = 0; i < q; i++) {
      if (i === col) continue;
      const row = a[i] as number[];
      const f = row[col] as number;
      for (let j = 0; j < 2 * q; j++) row[j] = (row[j] as number) - f * (p[j] as number);
    }
  }
  return a.map((r) => r.slice(q));
}

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

  it('two blended lines: both centre variances, and the blend found from a shoulder by findPeaks', () => {
    const a: Line = { c: 40, h: 1, w: 8, eta: 0.5 };
    const b: Line = { c: 47, h: 0.5, w: 8, eta: 0.5 };
    const x = Float64Array.from({ length: 101 }, (_, i) => i);
    const r = Float64Array.from(x, (v) => lineAt(a, v) + lineAt(b, v));
    const f = fitProfiles(x, r, { lo: 10, hi: 85 }, [40, 48], [5, 5], 1, 'voigt');
    const pts = Array.from({ length: 76 }, (_, i) => 10 + i);
    const v = centreVariances([a, b], pts, true);
    for (let k = 0; k < 2; k++)
      expect(Math.abs((f.profiles[k]?.varianceUnit as number) / (v[k] as number) - 1)).toBeLessThan(1e-6);
    // The same pair, 7/8 of a FWHM apart, in a noisy spectrum: the weaker is a shoulder without its own maximum, found
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

  it('a member on a flat window is no valid profile; a spectrum of pure noise has no peaks and the first noise figure', () => {
    const x = Float64Array.from({ length: 50 }, (_, i) => i);
    const flat = new Float64Array(50);
    const f = fitProfiles(x, flat, { lo: 0, hi: 49 }, [25], [3], 1, 'gaussian');
    expect(f.profiles[0]?.valid).toBe(false);
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

import { describe, expect, it } from 'vitest';
import { findPeaks } from '../../src/spectra/peaks.js';
import { seededNormal } from '../helpers/random.js';

/**
 * Peak position σ judged by pulls over 200 seeded noisy spectra per case, written here (pure Lorentzian or pure
 * Gaussian lines, analytic, independent of src/): six lines per spectrum alternating strong (peak 0.5, S/N 250) and
 * weak (peak 0.03, S/N 15) on a flat 0.01 baseline, noise 0.002, Lorentzian FWHM 0.16 or Gaussian FWHM 0.1 cm⁻¹,
 * steps 0.02 and 0.004 cm⁻¹; 600 strong and 600 weak lines per case.
 *
 * Required (stated): |pull| ≤ 1 for at least 60 % and |pull| ≤ 2 for at least 92 % of lines (a Gaussian σ gives
 * 68 % and 95 %). Strong lines at step 0.02 sit on the sampling floor (2 % of the step, in quadrature): required
 * rms pull above 0.2 — with the old floor of 10 % of the step the σ were ten times the errors (rms pull 0.095
 * Lorentzian, 0.063 Gaussian; 1σ coverage 100 %).
 *
 * Measured 2026-12-02 (1σ / 2σ coverage, rms pull):
 *   step 0.02  Lorentz strong 0.985 / 1.000 / 0.42, weak 0.735 / 0.970 / 0.90
 *   step 0.02  Gauss   strong 0.998 / 1.000 / 0.30, weak 0.748 / 0.970 / 0.88
 *   step 0.004 Gauss   strong 0.943 / 1.000 / 0.52, weak 0.707 / 0.953 / 0.98
 *   step 0.004 Lorentz strong 0.853 / 0.998 / 0.69, weak 0.715 / 0.962 / 0.99
 * Before the baseline segments were tied to the line width (at least 12 FWHM of the strongest feature), the 64-point
 * segments at step 0.004 were 1.6 FWHM long: the baseline sat on the lines' wings, Lorentzian positions were off by
 * up to 2e-3 cm⁻¹ (strong 0.010 / 0.028 / 12.3, weak 0.435 / 0.822 / 1.46) and Gaussian strong lines 0.657 / 0.933.
 */
function spectrum(seed: number, step: number, profile: 'lorentz' | 'gauss') {
  const z = seededNormal(seed);
  const from = 1000;
  const to = 1012;
  const lines = Array.from({ length: 6 }, (_, k) => ({
    position: from + 1.5 + 1.6 * k + 3.7 * step * z(),
    height: k % 2 === 0 ? 0.5 : 0.03,
  }));
  const fwhm = profile === 'lorentz' ? 0.16 : 0.1;
  const g = fwhm / 2;
  const s = fwhm / (2 * Math.sqrt(2 * Math.LN2));
  const n = Math.floor((to - from) / step) + 1;
  const x = Array.from({ length: n }, (_, i) => from + i * step);
  const y = x.map((v) => {
    let a = 0.01;
    for (const l of lines) {
      const d = v - l.position;
      a += l.height * (profile === 'lorentz' ? (g * g) / (d * d + g * g) : Math.exp((-d * d) / (2 * s * s)));
    }
    return a + 0.002 * z();
  });
  return { x, y, lines };
}

interface Coverage {
  readonly n: number;
  readonly one: number;
  readonly two: number;
  readonly rms: number;
}

function coverage(pulls: readonly number[]): Coverage {
  return {
    n: pulls.length,
    one: pulls.filter((p) => Math.abs(p) <= 1).length / pulls.length,
    two: pulls.filter((p) => Math.abs(p) <= 2).length / pulls.length,
    rms: Math.sqrt(pulls.reduce((a, p) => a + p * p, 0) / pulls.length),
  };
}

function measure(step: number, profile: 'lorentz' | 'gauss'): { strong: Coverage; weak: Coverage } {
  const strong: number[] = [];
  const weak: number[] = [];
  for (let t = 0; t < 200; t++) {
    const { x, y, lines } = spectrum(1000 + t, step, profile);
    const found = findPeaks(x, y).peaks;
    for (const l of lines) {
      let best = found[0];
      for (const p of found)
        if (best && Math.abs(p.position - l.position) < Math.abs(best.position - l.position)) best = p;
      if (!best || Math.abs(best.position - l.position) > 0.05) continue;
      (l.height > 0.1 ? strong : weak).push((best.position - l.position) / best.uncertainty);
    }
  }
  const r = { strong: coverage(strong), weak: coverage(weak) };
  if (process.env.PULLS_LOG) console.log(step, profile, JSON.stringify(r));
  return r;
}

function meetsRequirement(c: Coverage) {
  expect(c.n).toBeGreaterThanOrEqual(570);
  expect(c.one).toBeGreaterThanOrEqual(0.6);
  expect(c.two).toBeGreaterThanOrEqual(0.92);
}

describe('peak position σ against pulls over 200 seeded noisy spectra per case', () => {
  it.each(['lorentz', 'gauss'] as const)(
    'step 0.02 cm⁻¹, %s: coverage met, strong lines not drowned by the floor',
    (profile) => {
      const r = measure(0.02, profile);
      meetsRequirement(r.strong);
      meetsRequirement(r.weak);
      expect(r.weak.one).toBeLessThanOrEqual(0.8);
      expect(r.strong.rms).toBeGreaterThan(0.2);
    },
  );

  it('step 0.004 cm⁻¹, Gaussian: coverage met for strong and weak lines', () => {
    const r = measure(0.004, 'gauss');
    meetsRequirement(r.strong);
    meetsRequirement(r.weak);
  });

  it('step 0.004 cm⁻¹, Lorentzian: coverage met at 40 points per FWHM (baseline segments ≥ 12 FWHM)', () => {
    const r = measure(0.004, 'lorentz');
    meetsRequirement(r.strong);
    meetsRequirement(r.weak);
  });
});

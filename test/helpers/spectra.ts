import { seededNormal } from './random.js';

/**
 * Synthetic absorption spectra: Voigt lines (a Gaussian of FWHM wG convolved with a Lorentzian of FWHM wL,
 * computed by direct numerical convolution, independent of the pseudo-Voigt the peak finder fits), a sloping
 * baseline, Gaussian noise.
 */
export interface SpectrumSpec {
  readonly lines: readonly { position: number; strength: number }[];
  readonly from: number;
  readonly to: number;
  readonly step: number;
  readonly gaussianFwhm: number;
  readonly lorentzianFwhm: number;
  readonly noise: number;
  readonly baseline: readonly [number, number];
  readonly seed: number;
}

export function syntheticSpectrum(s: SpectrumSpec): { x: Float64Array; y: Float64Array } {
  const n = Math.floor((s.to - s.from) / s.step) + 1;
  const x = Float64Array.from({ length: n }, (_, i) => s.from + i * s.step);
  const y = new Float64Array(n);
  const sigma = s.gaussianFwhm / (2 * Math.sqrt(2 * Math.LN2));
  const gamma = s.lorentzianFwhm / 2;
  const nodes = 81;
  const span = 5 * sigma;
  const reach = 40 * Math.max(s.gaussianFwhm, s.lorentzianFwhm);
  // Peak height of the unit-area Voigt, to make `strength` a peak absorbance.
  const voigt = (dx: number) => {
    let v = 0;
    let wsum = 0;
    for (let k = 0; k < nodes; k++) {
      const d = -span + (2 * span * k) / (nodes - 1);
      const g = Math.exp((-d * d) / (2 * sigma * sigma));
      wsum += g;
      const u = dx - d;
      v += (g * gamma) / (Math.PI * (u * u + gamma * gamma));
    }
    return v / wsum;
  };
  const peak = voigt(0);
  for (const l of s.lines) {
    const i0 = Math.max(0, Math.floor((l.position - reach - s.from) / s.step));
    const i1 = Math.min(n - 1, Math.ceil((l.position + reach - s.from) / s.step));
    for (let i = i0; i <= i1; i++) y[i] = (y[i] as number) + (l.strength * voigt((x[i] as number) - l.position)) / peak;
  }
  const z = seededNormal(s.seed);
  for (let i = 0; i < n; i++) {
    y[i] = (y[i] as number) + s.baseline[0] + s.baseline[1] * ((x[i] as number) - s.from) + s.noise * z();
  }
  return { x, y };
}

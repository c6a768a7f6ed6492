import { syntheticSpectrum } from '../test/helpers/spectra.js';

/**
 * The large spectrum of the bench: 400 cm⁻¹ (1900–2300) at 0.0004 cm⁻¹ spacing, 1 000 001 points, 80 lines of an
 * invented CO-like band (origin 2143 cm⁻¹, B 1.92 cm⁻¹, lines 0.01 cm⁻¹ wide), absorbance with noise 5·10⁻⁴;
 * x written to 4 decimals and y to 6 (what an instrument file carries), as the JSON body of /v1/peaks.
 */
export function largeSpectrumLines(): { position: number; strength: number }[] {
  const lines: { position: number; strength: number }[] = [];
  for (let j = 0; j < 40; j++) {
    const s = 0.05 + 0.4 * Math.exp(-((j - 8) ** 2) / 120);
    lines.push({ position: 2143 + 2 * 1.92 * (j + 1) - 0.0175 * (j + 1) * (j + 2), strength: s });
    lines.push({ position: 2143 - 2 * 1.92 * (j + 1) - 0.0175 * j * (j + 1), strength: s });
  }
  return lines;
}

export function largeSpectrum(step = 0.0004, from = 1900, to = 2300) {
  return syntheticSpectrum({
    lines: largeSpectrumLines(),
    from,
    to,
    step,
    gaussianFwhm: 25 * step,
    lorentzianFwhm: 12 * step,
    noise: 0.0005,
    baseline: [0.02, 1e-5],
    seed: 1,
  });
}

export function largeSpectrumBody(): { body: string; points: number } {
  const s = largeSpectrum();
  const x = Array.from(s.x, (v) => Math.round(v * 1e4) / 1e4);
  const y = Array.from(s.y, (v) => Math.round(v * 1e6) / 1e6);
  return { body: JSON.stringify({ spectrum: { x, y } }), points: x.length };
}

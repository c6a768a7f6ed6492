import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';

/**
 * The x unit of a spectrum as instruments and JCAMP-DX files spell it. The spectrum is our own: three Lorentzian
 * lines (HWHM 0.05 cm⁻¹, peak absorbance 0.3) at invented positions near the CO fundamental, sampled every
 * 0.01 cm⁻¹, with seeded uniform noise of ±0.001 absorbance (a noise-free spectrum whose line wings span the whole
 * window gives baseline artefacts; see DEVELOPERS.md, known limits).
 */
const app = useApp();
const CENTRES = [2139.4262, 2143.9, 2147.0812];

function spectrumInWavenumbers(): { x: number[]; y: number[] } {
  const x: number[] = [];
  const y: number[] = [];
  let seed = 1;
  for (let i = 0; i <= 1200; i++) {
    const nu = 2137 + i * 0.01;
    seed = (seed * 16807) % 2147483647;
    x.push(Number(nu.toFixed(4)));
    const noise = (seed / 2147483647 - 0.5) * 0.002;
    y.push(CENTRES.reduce((a, c) => a + 0.3 * (0.05 ** 2 / ((nu - c) ** 2 + 0.05 ** 2)), noise));
  }
  return { x, y };
}

async function peaksWith(xUnit: string | undefined, toX: (nu: number) => number = (nu) => nu) {
  const { x, y } = spectrumInWavenumbers();
  const spectrum = { x: x.map(toX), y, ...(xUnit === undefined ? {} : { xUnit }) };
  return app().inject({ method: 'POST', url: '/v1/peaks', payload: { spectrum } });
}

describe('spectrum xUnit spellings', () => {
  it.each(['1/cm', '1/CM', 'cm^-1', 'cm⁻¹', 'wavenumbers'])('%s reads as cm-1: the same peaks as cm-1', async (u) => {
    const reference = await peaksWith('cm-1');
    const spelled = await peaksWith(u);
    expect(reference.statusCode).toBe(200);
    expect(spelled.statusCode).toBe(200);
    expect(spelled.json().peaks).toEqual(reference.json().peaks);
    expect(reference.json().peaks.map((p: { position: number }) => p.position)).toHaveLength(CENTRES.length);
  });
  it.each(['µm', 'μm', 'micrometers'])('%s reads as vacuum micrometres: peaks back at the centres', async (u) => {
    const r = await peaksWith(u, (nu) => 1e4 / nu);
    expect(r.statusCode).toBe(200);
    const found = r.json().peaks.map((p: { position: number }) => p.position);
    expect(found).toHaveLength(CENTRES.length);
    // each centre within 3 of its stated σ (the x values were converted to µm and back)
    for (const [i, c] of CENTRES.entries()) {
      const p = r.json().peaks[i];
      expect(Math.abs(p.position - c)).toBeLessThan(3 * p.uncertainty);
    }
  });
  it('an unknown unit is a 400 that lists the accepted spellings', async () => {
    const r = await peaksWith('furlongs');
    expect(r.statusCode).toBe(400);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(r.json().detail).toMatch(/spectrum\/xUnit/);
    expect(r.json().detail).toContain('1/cm');
  });
});

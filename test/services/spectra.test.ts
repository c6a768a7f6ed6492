import { describe, expect, it } from 'vitest';
import { predictBand } from '../../src/models/predict.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { useApp } from '../helpers/app.js';
import { writeJcamp } from '../helpers/jcamp-writer.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

const app = useApp();
// HCl fundamental of both chlorine isotopes (library constants, Huber & Herzberg), 296 K envelope, FTIR-like
// sampling 0.1 cm⁻¹ and widths 0.3 cm⁻¹.
const lines = ['H35Cl', 'H37Cl'].flatMap((s, k) => {
  const y = dunhamFromEntry(constantsFor(parseSpecies(s)) ?? (undefined as never));
  return predictBand(y, { upper: 1, lower: 0 }, 12).map((p) => ({
    position: p.position,
    strength:
      (k === 0 ? 0.7576 : 0.2424) *
      0.6 *
      ((p.branch === 'R' ? p.j + 1 : p.j) / 4) *
      Math.exp((-1.4388 * p.lowerEnergy) / 296),
  }));
});
const s = syntheticSpectrum({
  lines,
  from: 2600,
  to: 3150,
  step: 0.1,
  gaussianFwhm: 0.25,
  lorentzianFwhm: 0.15,
  noise: 0.0005,
  baseline: [0.02, 1e-5],
  seed: 9,
});
const json = { spectrum: { x: Array.from(s.x), y: Array.from(s.y) } };
const jcamp = writeJcamp(s.x, s.y, 'DIFDUP', { yFactor: 1e-5, perLine: 10 });

describe('spectra through the service', () => {
  it('POST /v1/peaks with JSON finds the lines with uncertainties', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/peaks', payload: json });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.peaks[0]).toMatchObject({
      position: expect.any(Number),
      uncertainty: expect.any(Number),
      intensity: expect.any(Number),
      width: expect.any(Number),
    });
    const peaks = j.peaks as { position: number; uncertainty: number }[];
    // Every generated line with a peak absorbance of at least 0.004 (8× the noise) is found within 3.5σ of its
    // reported position uncertainty (and 0.05 cm⁻¹); no peak lies more than 0.05 cm⁻¹ from a generated line.
    const strong = lines.filter((l) => l.strength >= 0.004 && l.position > 2600 && l.position < 3150);
    expect(strong.length).toBeGreaterThan(35);
    for (const l of strong) {
      const near = peaks.reduce((b, p) =>
        Math.abs(p.position - l.position) < Math.abs(b.position - l.position) ? p : b,
      );
      const d = Math.abs(near.position - l.position);
      expect(d, `line at ${l.position.toFixed(3)}`).toBeLessThan(Math.min(0.05, 3.5 * near.uncertainty));
    }
    for (const p of peaks) {
      const d = Math.min(...lines.map((l) => Math.abs(l.position - p.position)));
      expect(d, `peak at ${p.position.toFixed(3)}`).toBeLessThan(0.05);
    }
  });

  it('POST /v1/peaks with a JCAMP-DX body gives the same peaks as JSON', async () => {
    const a = (await app().inject({ method: 'POST', url: '/v1/peaks', payload: json })).json();
    const b = (
      await app().inject({
        method: 'POST',
        url: '/v1/peaks',
        payload: jcamp,
        headers: { 'content-type': 'chemical/x-jcamp-dx' },
      })
    ).json();
    expect(b.peaks.length).toBe(a.peaks.length);
    // The JCAMP file rounds absorbance to 1e-5: positions agree within their uncertainty.
    b.peaks.forEach((p: { position: number; uncertainty: number }, i: number) => {
      expect(Math.abs(p.position - a.peaks[i].position)).toBeLessThan(p.uncertainty);
    });
  });

  it('POST /v1/fits?species=HCl with a JCAMP-DX body chains peaks → assignment → fit: B_e within 4σ of Huber & Herzberg', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits?species=HCl',
      payload: jcamp,
      headers: { 'content-type': 'chemical/x-jcamp-dx' },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.spectrum.points).toBe(s.x.length);
    const eq = j.equilibrium.find((e: { species: string }) => e.species === '1H-35Cl');
    expect(Math.abs(eq.B_e.value - 10.593416)).toBeLessThan(4 * eq.B_e.uncertainty + 2e-4);
  });

  it('POST /v1/checks with a CSV spectrum gives a verdict', async () => {
    const csv = `wavenumber,absorbance\n${Array.from(s.x, (x, i) => `${x},${s.y[i]}`).join('\n')}`;
    const r = await app().inject({
      method: 'POST',
      url: '/v1/checks?species=HCl',
      payload: csv,
      headers: { 'content-type': 'text/csv' },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(['pass', 'warn', 'fail']).toContain(j.verdict);
    expect(j.checks.find((c: { id: string }) => c.id === 'identity').status).toBe('pass');
  });

  it('a malformed JCAMP-DX body is a 422 problem naming the line; lines and spectrum together a 400', async () => {
    const bad = jcamp.replace(/\n(\d[^\n]*)\n/, '\n$1!\n');
    const r = await app().inject({
      method: 'POST',
      url: '/v1/peaks',
      payload: bad,
      headers: { 'content-type': 'chemical/x-jcamp-dx' },
    });
    expect(r.statusCode).toBe(422);
    expect(r.headers['content-type']).toMatch(/problem\+json/);
    expect(r.json().detail).toMatch(/line \d+/);
    const both = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { ...json, lines: [{ position: 2900 }] },
    });
    expect(both.statusCode).toBe(400);
    const mismatch = await app().inject({
      method: 'POST',
      url: '/v1/peaks',
      payload: { spectrum: { x: [1, 2, 3, 4, 5, 6, 7, 8], y: [1, 2, 3] } },
    });
    expect(mismatch.statusCode).toBe(400);
  });
});

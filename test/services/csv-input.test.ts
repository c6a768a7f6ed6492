import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import { CO_12_16, termValue } from '../helpers/independent-lines.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

/**
 * CSV bodies as labs export them, through the service at the `npm start` defaults. The lines are the real 12C16O
 * 1-0 lines of test/fixtures/co-database-lines (positions and uncertainties as published, cm⁻¹).
 */
const app = useApp();
const CO_10 = CO_DATABASE.lines.filter((l) => l.band === '1-0' && l.j <= 15);

const post = (url: string, payload: string) =>
  app().inject({ method: 'POST', url, headers: { 'content-type': 'text/csv' }, payload });

describe('a CSV whose rows have more fields than its header', () => {
  const decimalComma = (x: number) => String(x).replace('.', ',');

  it('decimal commas with "," as the separator: 422 naming line 2, 4 fields against 2 and the likely cause', async () => {
    const csv = `position,uncertainty\n${CO_10.map((l) => `${decimalComma(l.position)},${decimalComma(0.002)}`).join('\n')}\n`;
    for (const route of ['/v1/fits?species=CO', '/v1/checks?species=CO']) {
      const r = await post(route, csv);
      expect(r.statusCode, r.body).toBe(422);
      expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
      const p = r.json();
      expect(p.code).toBe('INPUT_INVALID');
      expect(p.detail).toMatch(/CSV line 2: has 4 fields, the header has 2/);
      expect(p.detail).toMatch(/decimal commas with ',' as the separator/);
      expect(p).toMatchObject({ line: 2, fields: 4, allowedFields: 2 });
    }
  });

  it('the same numbers with ";" as the separator are read and fitted (the file was otherwise right)', async () => {
    const csv = `position;uncertainty\n${CO_10.map((l) => `${decimalComma(l.position)};${decimalComma(0.002)}`).join('\n')}\n`;
    const r = await post('/v1/fits?species=CO', csv);
    expect(r.statusCode, r.body).toBe(200);
    // Band origin of 12C16O 1-0: 2143.27111 cm⁻¹ (the same lines parsed correctly, fresh-eyes report); 0.01 cm⁻¹
    // covers 0.002 cm⁻¹ stated per line on 31 lines with ample margin.
    expect(Math.abs(r.json().bands[0].origin.value - 2143.2711)).toBeLessThan(0.01);
  });

  it('a header-less list and a single column with decimal commas are refused, not read as position and intensity', async () => {
    const fourFields = `${CO_10.map((l) => `${decimalComma(l.position)},${decimalComma(0.002)}`).join('\n')}\n`;
    const r1 = await post('/v1/fits?species=CO', fourFields);
    expect(r1.statusCode, r1.body).toBe(422);
    expect(r1.json().detail).toMatch(/CSV line 1: has 4 fields, without a header a line list has at most 3/);
    const single = '2139,0426\n2143,2712\n2147,0812\n';
    const r2 = await post('/v1/fits?species=CO', single);
    expect(r2.statusCode, r2.body).toBe(422);
    expect(r2.json().detail).toMatch(/"0426" is not a number of its own.*decimal commas/);
  });

  it('a spectrum with decimal commas and "," separators is refused on /v1/peaks', async () => {
    const x = (i: number) => decimalComma(Number((2140.001 + i * 0.02).toFixed(3)));
    const rows = Array.from({ length: 200 }, (_, i) => `${x(i)},${decimalComma(0.101 + (i % 7) * 0.01)}`);
    const r = await post('/v1/peaks', `wavenumber,absorbance\n${rows.join('\n')}\n`);
    expect(r.statusCode, r.body).toBe(422);
    expect(r.json().detail).toMatch(/CSV line 2: has 4 fields, the header has 2/);
  });
});

/**
 * A 12C16O 1-0 absorbance spectrum of our own: positions from the independent term formula with Huber & Herzberg
 * constants (test/helpers/independent-lines.ts), 296 K Boltzmann envelope, Voigt lines (FWHM 0.08 G, 0.02 L),
 * seeded noise 0.002, sampled every 0.01 cm⁻¹ over 2100–2190 cm⁻¹. It holds no line of any other isotopologue.
 */
const C2 = 1.438776877; // second radiation constant, cm K (CODATA 2018)
const coLines = Array.from({ length: 20 }, (_, j) => j).flatMap((j) => {
  const lower = (jj: number) => termValue(CO_12_16.constants, 0, jj);
  const pop = (jj: number) => Math.exp((-C2 * (lower(jj) - lower(0))) / 296);
  const r = { position: termValue(CO_12_16.constants, 1, j + 1) - lower(j), strength: 0.05 * (j + 1) * pop(j) };
  const p =
    j > 0 ? [{ position: termValue(CO_12_16.constants, 1, j - 1) - lower(j), strength: 0.05 * j * pop(j) }] : [];
  return [r, ...p];
});
const TRUE_ORIGIN = termValue(CO_12_16.constants, 1, 0) - termValue(CO_12_16.constants, 0, 0);
const coSpectrum = syntheticSpectrum({
  lines: coLines,
  from: 2100,
  to: 2190,
  step: 0.01,
  gaussianFwhm: 0.08,
  lorentzianFwhm: 0.02,
  noise: 0.002,
  baseline: [0, 0],
  seed: 17,
});
const spectrumCsv = (header: string, x: (nu: number) => number = (nu) => nu, unitsRow?: string) =>
  `${header}\n${unitsRow !== undefined ? `${unitsRow}\n` : ''}${Array.from(coSpectrum.x, (nu, i) => `${x(nu).toFixed(8)},${(coSpectrum.y[i] as number).toFixed(5)}`).join('\n')}\n`;

async function fitsAsCoSpectrum(csv: string) {
  const r = await post('/v1/fits?species=CO', csv);
  expect(r.statusCode, r.body.slice(0, 400)).toBe(200);
  const j = r.json();
  // One band of one isotopologue: the spectrum holds nothing else.
  expect(j.bands.map((b: { species: string; band: string }) => `${b.species} ${b.band}`)).toEqual(['12C-16O 1-0']);
  expect(j.statistics.lines).toBeLessThan(60);
  const o = j.bands[0].origin;
  // The origin within 5σ of its own uncertainty and 0.005 cm⁻¹ of the generator's G(1) − G(0) = 2143.2711 cm⁻¹.
  expect(Math.abs(o.value - TRUE_ORIGIN)).toBeLessThan(Math.max(5 * o.uncertainty, 0.005));
  return j;
}

describe('a CSV header naming absorbance or transmittance is a spectrum, whatever its x column is called', () => {
  it.each(['position (cm-1),absorbance', 'position,absorbance', 'x,absorbance', 'wavenumber (cm-1),absorbance'])(
    '"%s": peaks are found and one band is fitted, not 9000 points as lines',
    async (header) => {
      await fitsAsCoSpectrum(spectrumCsv(header));
    },
  );

  it('"position,transmittance" in percent: the same single band', async () => {
    const csv = `position,transmittance\n${Array.from(coSpectrum.x, (nu, i) => `${nu.toFixed(4)},${(100 * 10 ** -(coSpectrum.y[i] as number)).toFixed(4)}`).join('\n')}\n`;
    await fitsAsCoSpectrum(csv);
  });
});

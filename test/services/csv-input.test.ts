import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DEFAULT_CONFIG } from '../../services/config.js';
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

/** 1 cm⁻¹ = 29 979.2458 MHz (c, exact in the SI). */
const MHZ_PER_CM = 29979.2458;
const um = (nu: number) => 1e4 / nu;

describe('a unit in the CSV header is honoured for one column and for spectra', () => {
  // The first ten 12C16O pure-rotation lines of the real list (cm⁻¹, 6 decimals as published), sent in MHz.
  const rotation = CO_DATABASE.lines.filter((l) => l.band === '0-0' && l.j < 10).sort((a, b) => a.j - b.j);
  const B0_PUBLISHED_MHZ = CO_DATABASE.published.B_v_MHz.value[0] as number; // Gendriesch et al. 2009 (fixture)

  it.each(['frequency (MHz)', 'position (MHz)', 'frequency / MHz', 'freq [MHz]'])(
    'a single column headed "%s" is read in MHz: B0 of 12C16O comes out, not "nothing predicted near 115270 cm-1"',
    async (header) => {
      const csv = `${header}\n${rotation.map((l) => (l.position * MHZ_PER_CM).toFixed(4)).join('\n')}\n`;
      const r = await post('/v1/fits?species=CO', csv);
      expect(r.statusCode, r.body.slice(0, 300)).toBe(200);
      const b = r.json().levels[0].B;
      // B0 in cm⁻¹ against Gendriesch et al. 2009; the list's 6 decimals (±5e-7 cm⁻¹ rounding on each line) allow
      // about 1e-7 cm⁻¹ on B0 from ten lines: 2e-6 cm⁻¹ (1e-6 relative) is a tolerance of twenty such units.
      expect(Math.abs(b.value - B0_PUBLISHED_MHZ / MHZ_PER_CM)).toBeLessThan(2e-6);
    },
  );

  it('a units row under a one-column header ("frequency" / "MHz") works the same', async () => {
    const csv = `frequency\nMHz\n${rotation.map((l) => (l.position * MHZ_PER_CM).toFixed(4)).join('\n')}\n`;
    const r = await post('/v1/fits?species=CO', csv);
    expect(r.statusCode, r.body.slice(0, 300)).toBe(200);
    expect(Math.abs(r.json().levels[0].B.value - B0_PUBLISHED_MHZ / MHZ_PER_CM)).toBeLessThan(2e-6);
  });

  it('a single column headed "position (um)": the CO 1-0 lines are found at their wavenumbers', async () => {
    const csv = `position (um)\n${CO_10.map((l) => (1e4 / l.position).toFixed(8)).join('\n')}\n`;
    const r = await post('/v1/fits?species=CO', csv);
    expect(r.statusCode, r.body.slice(0, 300)).toBe(200);
    // 2143.2711 cm⁻¹ as above; 1e-8 µm on 4.67 µm is 5e-5 cm⁻¹ per line, 0.005 cm⁻¹ is ample.
    expect(Math.abs(r.json().bands[0].origin.value - 2143.2711)).toBeLessThan(0.005);
  });

  it.each([
    ['wavelength (um),absorbance', undefined],
    ['position [um],absorbance', undefined],
    ['wavelength (µm),absorbance', undefined],
    ['wavelength,absorbance', 'um,'],
  ])('a spectrum headed "%s" (units row %s) is read in µm', async (header, unitsRow) => {
    await fitsAsCoSpectrum(spectrumCsv(header, um, unitsRow));
  });

  it('?unit=um names the unit of a CSV whose header does not', async () => {
    const r = await post('/v1/fits?species=CO&unit=um', spectrumCsv('wavelength,absorbance', um));
    expect(r.statusCode, r.body.slice(0, 300)).toBe(200);
    expect(Math.abs(r.json().bands[0].origin.value - TRUE_ORIGIN)).toBeLessThan(0.005);
    const lines = `position\n${CO_10.map((l) => (1e4 / l.position).toFixed(8)).join('\n')}\n`;
    const r2 = await post('/v1/fits?species=CO&unit=%C2%B5m', lines);
    expect(r2.statusCode, r2.body.slice(0, 300)).toBe(200);
  });

  it('?unit= that contradicts the header, or a frequency for a spectrum, is refused', async () => {
    const r = await post('/v1/fits?species=CO&unit=nm', spectrumCsv('wavelength (um),absorbance', um));
    expect(r.statusCode).toBe(422);
    expect(r.json().detail).toMatch(/the CSV header names the unit um, the query unit=nm/);
    const r2 = await post('/v1/fits?species=CO&unit=MHz', spectrumCsv('wavelength,absorbance', um));
    expect(r2.statusCode).toBe(400);
    expect(r2.json().detail).toMatch(/a spectrum's x is in cm-1, um or nm, not MHz/);
    const r3 = await post(
      '/v1/fits?species=CO',
      spectrumCsv('frequency (MHz),absorbance', (nu) => nu * MHZ_PER_CM),
    );
    expect(r3.statusCode).toBe(400);
    expect(r3.json().detail).toMatch(/x unit "MHz" is not one of cm-1, um, nm/);
  });
});

describe('the 422 for positions that read like µm gives the remedy for the body that was sent', () => {
  it('a CSV spectrum without a unit: name it in the header or send ?unit=um (a CSV body has no "unit" key)', async () => {
    const r = await post('/v1/fits?species=CO', spectrumCsv('wavelength,absorbance', um));
    expect(r.statusCode).toBe(422);
    const detail: string = r.json().detail;
    expect(detail).toMatch(/read as wavelengths in µm/);
    expect(detail).toMatch(/name the unit in the CSV header \("wavelength \(um\),absorbance"\) or send \?unit=um$/);
    expect(detail).not.toMatch(/"unit": "um"/);
  });

  it('a CSV line list: the header "position (um)" or ?unit=um', async () => {
    const r = await post(
      '/v1/fits?species=CO',
      `position\n${CO_10.map((l) => (1e4 / l.position).toFixed(8)).join('\n')}\n`,
    );
    expect(r.statusCode).toBe(422);
    expect(r.json().detail).toMatch(/"position \(um\)"\) or send \?unit=um$/);
  });

  it('a JSON spectrum: "spectrum": {"xUnit": "um"}; a JSON line list: "unit": "um"', async () => {
    // 2120–2170 cm⁻¹ of the spectrum, as µm
    const spectrum = {
      x: Array.from(coSpectrum.x.subarray(2000, 7000), um),
      y: Array.from(coSpectrum.y.subarray(2000, 7000)),
    };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', spectrum } });
    expect(r.statusCode).toBe(422);
    expect(r.json().detail).toMatch(/send "spectrum": \{"xUnit": "um", …\}$/);
    const lines = CO_10.map((l) => ({ position: 1e4 / l.position }));
    const r2 = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines } });
    expect(r2.statusCode).toBe(422);
    expect(r2.json().detail).toMatch(/send "unit": "um"$/);
  });

  it('the same advice for a JSON spectrum too large for the event loop (parsed in a worker, its bytes moved there)', async () => {
    // The advice reads the body's form before its bytes leave for the worker (services/raw-body.ts).
    const spectrum = { x: Array.from(coSpectrum.x, um), y: Array.from(coSpectrum.y) };
    const payload = JSON.stringify({ species: 'CO', spectrum });
    expect(payload.length).toBeGreaterThan(DEFAULT_CONFIG.offloadBytes);
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    expect(r.statusCode).toBe(422);
    expect(r.json().detail).toMatch(/send "spectrum": \{"xUnit": "um", …\}$/);
  });
});

describe("the README's CSV example", () => {
  it('fits as the README says: 12C16O 1-0 with the origin of the constants it was computed from', async () => {
    const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
    const block = readme.match(/### CSV line lists[\s\S]*?```\n(Position;[\s\S]*?)```/)?.[1];
    expect(block).toBeDefined();
    const r = await post('/v1/fits?species=CO', block as string);
    expect(r.statusCode, r.body.slice(0, 300)).toBe(200);
    const j = r.json();
    expect(j.statistics.lines).toBe(10);
    // The README says 2143.271; the constants give 2143.2711 (the independent generator's G(1) − G(0)), and the
    // made-up deviations (≤ 0.0016 cm⁻¹) move it by less than 0.001 cm⁻¹.
    expect(j.bands[0].origin.value.toFixed(3)).toBe('2143.271');
    expect(Math.abs(j.bands[0].origin.value - TRUE_ORIGIN)).toBeLessThan(0.001);
    expect(readme).toContain('gives a band origin of 2143.271 cm⁻¹');
  });
});

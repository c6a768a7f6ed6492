import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';

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

import { describe, expect, it } from 'vitest';
import { prefersCsv } from '../../services/formats/csv-tables.js';
import { roundedDisplay } from '../../services/formats/round.js';
import { checkExample, fitExample } from '../../services/openapi/examples.js';
import { parseCsv } from '../../src/spectra/csv.js';
import { useApp } from '../helpers/app.js';
import { rowsOf } from '../helpers/csv-rows.js';

const app = useApp();

describe('rounded display form (two significant digits of the uncertainty; common practice, cf. GUM 7.2.6)', () => {
  it.each([
    [2143.271234, 0.000456, '2143.27123 ± 0.00046'],
    [1.92252876, 0.0000123, '1.922529 ± 0.000012'],
    [6.1215e-6, 2.1e-9, '(6.1215 ± 0.0021)e-6'],
    [12345.6, 23, '12346 ± 23'],
    [12345.6, 230, '12350 ± 230'],
    [2143.27, 0.0996, '2143.27 ± 0.10'],
    [-0.01750441, 0.00000234, '-0.0175044 ± 0.0000023'],
  ])('%f ± %f → %s (worked by hand)', (v, u, s) => {
    expect(roundedDisplay(v, u)).toBe(s);
  });
  it('a value without a usable uncertainty is shown as it is', () => {
    expect(roundedDisplay(1.5, 0)).toBe('1.5');
    expect(roundedDisplay(1.5, Number.NaN)).toBe('1.5');
  });
});

describe('Accept negotiation', () => {
  it.each([
    ['text/csv', true],
    ['text/csv, application/json;q=0.9', true],
    ['application/json, text/csv;q=0.5', false],
    ['*/*', false],
    ['text/csv;q=0', false],
    [undefined, false],
  ])('%s → CSV %s', (accept, csv) => {
    expect(prefersCsv(accept)).toBe(csv);
  });
});

describe('results as labs file them', () => {
  it('Accept: text/csv on /v1/fits gives the per-line table, which the CSV reader takes back at full precision', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      headers: { accept: 'text/csv' },
      payload: { ...fitExample, lines: fitExample.lines.map((l, k) => ({ ...l, id: k === 0 ? 'P(1), "first"' : k })) },
    });
    expect(r.statusCode, r.body).toBe(200);
    expect(r.headers['content-type']).toMatch(/^text\/csv/);
    const rows = rowsOf(r.body);
    expect(rows[0]?.slice(0, 7)).toEqual(['index', 'id', 'species', 'band', 'branch', 'j', 'position (cm-1)']);
    expect(rows).toHaveLength(fitExample.lines.length + 1);
    expect(rows[1]?.[1]).toBe('P(1), "first"');
    const back = parseCsv(r.body);
    expect(back.kind).toBe('lines');
    if (back.kind === 'lines') {
      expect(back.unit).toBe('cm-1');
      expect(back.lines.map((l) => l.position)).toEqual(fitExample.lines.map((l) => l.position));
      expect(back.lines.map((l) => l.assignment)).toEqual(fitExample.lines.map((l) => l.assignment));
    }
  });

  it('?table=constants gives band origins, level and equilibrium constants with the same numbers as the JSON', async () => {
    const json = (await app().inject({ method: 'POST', url: '/v1/fits', payload: fitExample })).json();
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits?table=constants',
      headers: { accept: 'text/csv' },
      payload: fitExample,
    });
    expect(r.statusCode, r.body).toBe(200);
    const rows = rowsOf(r.body);
    expect(rows[0]).toEqual(['group', 'species', 'band or level', 'name', 'value', 'uncertainty', 'unit', 'display']);
    const origin = rows.find((x) => x[0] === 'band' && x[3] === 'origin');
    expect(Number(origin?.[4])).toBe(json.bands[0].origin.value);
    expect(Number(origin?.[5])).toBe(json.bands[0].origin.uncertainty);
    expect(origin?.[7]).toBe(roundedDisplay(json.bands[0].origin.value, json.bands[0].origin.uncertainty));
    expect(rows.filter((x) => x[0] === 'level' && x[3] === 'B')).toHaveLength(json.levels.length);
  });

  it('Accept: text/csv on /v1/checks gives the checks table with ?table=checks, the lines table by default', async () => {
    const json = (await app().inject({ method: 'POST', url: '/v1/checks', payload: checkExample })).json();
    const checks = await app().inject({
      method: 'POST',
      url: '/v1/checks?table=checks',
      headers: { accept: 'text/csv' },
      payload: checkExample,
    });
    expect(checks.statusCode, checks.body).toBe(200);
    const rows = rowsOf(checks.body);
    expect(rows.slice(1).map((x) => [x[0], x[1]])).toEqual(
      json.checks.map((c: { id: string; status: string }) => [c.id, c.status]),
    );
    const lines = await app().inject({
      method: 'POST',
      url: '/v1/checks',
      headers: { accept: 'text/csv' },
      payload: checkExample,
    });
    expect(rowsOf(lines.body)).toHaveLength(checkExample.lines.length + 1);
  });

  it('JSON stays the default and full precision; ?display=rounded adds display strings and changes no number', async () => {
    const plain = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      headers: { accept: 'application/json, text/csv;q=0.5' },
      payload: fitExample,
    });
    expect(plain.headers['content-type']).toMatch(/^application\/json/);
    const rounded = await app().inject({ method: 'POST', url: '/v1/fits?display=rounded', payload: fitExample });
    expect(rounded.statusCode, rounded.body).toBe(200);
    const a = plain.json();
    const b = rounded.json();
    const o = b.bands[0].origin;
    expect(o.value).toBe(a.bands[0].origin.value);
    expect(o.display).toBe(roundedDisplay(o.value, o.uncertainty));
    expect(b.levels[0].B.display).toBe(roundedDisplay(b.levels[0].B.value, b.levels[0].B.uncertainty));
    expect(a.bands[0].origin.display).toBeUndefined();
    const strip = (x: unknown): unknown =>
      JSON.parse(JSON.stringify(x, (k, v) => (k === 'display' || k === 'input' || k === 'software' ? undefined : v)));
    expect(strip(b)).toEqual(strip(a));
  });
});

describe('the same forms for bodies large enough to be handled in a worker (npm start defaults)', () => {
  it('a 300 kB body (above OFFLOAD_BYTES) still answers CSV to Accept: text/csv and display strings to ?display=rounded', async () => {
    const { buildApp } = await import('../../services/app.js');
    const { loadConfig } = await import('../../services/config.js');
    const config = loadConfig({});
    expect(config.workers).toBeGreaterThan(0);
    const big = await buildApp({ config });
    try {
      // Whitespace after the JSON makes the body large without changing it.
      const payload = `${JSON.stringify(fitExample)}${' '.repeat(300_000)}`;
      expect(payload.length).toBeGreaterThan(config.offloadBytes);
      const headers = { 'content-type': 'application/json' };
      const csv = await big.inject({
        method: 'POST',
        url: '/v1/fits',
        headers: { ...headers, accept: 'text/csv' },
        payload,
      });
      expect(csv.statusCode, csv.body).toBe(200);
      expect(csv.headers['content-type']).toMatch(/^text\/csv/);
      expect(rowsOf(csv.body)).toHaveLength(fitExample.lines.length + 1);
      const rounded = await big.inject({ method: 'POST', url: '/v1/fits?display=rounded', headers, payload });
      expect(rounded.statusCode, rounded.body).toBe(200);
      const o = rounded.json().bands[0].origin;
      expect(o.display).toBe(roundedDisplay(o.value, o.uncertainty));
    } finally {
      await big.close();
    }
  }, 60_000);
});

import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { parseCsv } from '../../src/spectra/csv.js';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * What a CSV line list says beyond positions reaches the fit as the same list in JSON would: the instrument each line
 * came from (`source`, which sets the σ of lines sent without one from their instrument's scatter) and the line's id,
 * and a misspelt column name is refused naming the column meant, never dropped in silence. The lines are the 494
 * real 12C16O database lines of test/fixtures/co-database-lines (source in its SOURCE.md): 0-0, 1-0 and 2-1 as one
 * instrument, 2-0 and 3-0 as another, without σ.
 */
const app = useApp();

const rows = CO_DATABASE.lines.map((l, k) => ({
  id: `L${k + 1}`,
  position: l.position,
  source: ['0-0', '1-0', '2-1'].includes(l.band) ? 'ftir-A' : 'laser-B',
  assignment: { band: l.band, branch: l.branch, j: l.j },
}));
const csv = [
  'id,position (cm-1),instrument,band,branch,j',
  ...rows.map((r) => `${r.id},${r.position},${r.source},${r.assignment.band},${r.assignment.branch},${r.assignment.j}`),
].join('\n');

describe('CSV line-list columns', () => {
  it('source (or instrument) and id are read; a column the reader does not know and is no slip is still skipped', () => {
    const d = parseCsv('position,source,id,time,fwhm\n2143.27,lab-1,a7,12:00,0.01\n2147.08,,,12:01,0.01\n');
    expect(d).toStrictEqual({
      kind: 'lines',
      lines: [{ position: 2143.27, source: 'lab-1', id: 'a7' }, { position: 2147.08 }],
    });
  });

  it('a name one or two slips from a known one is refused, naming the column meant', () => {
    for (const [header, meant] of [
      ['position,uncertainity', 'uncertainty'],
      ['postion,uncertainty', 'position'],
      ['position,intesity', 'intensity'],
      ['position,instrumnet', 'instrument'],
    ] as const) {
      let err: unknown;
      try {
        parseCsv(`${header}\n2143.27,0.001\n`);
      } catch (e) {
        err = e;
      }
      expect(err, header).toBeInstanceOf(ScienceError);
      expect((err as Error).message).toContain(`did you mean "${meant}"`);
    }
  });

  it('a two-instrument CSV gives the fit of the same list sent as JSON (npm start defaults)', async () => {
    const fromCsv = await app().inject({
      method: 'POST',
      url: '/v1/fits?species=CO',
      headers: { 'content-type': 'text/csv' },
      payload: csv,
    });
    expect(fromCsv.statusCode, fromCsv.body.slice(0, 300)).toBe(200);
    const fromJson = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines: rows } });
    expect(fromJson.statusCode).toBe(200);
    const a = fromCsv.json();
    const b = fromJson.json();
    expect(a.parameters).toStrictEqual(b.parameters);
    expect(a.warnings.map((w: { code: string }) => w.code)).toStrictEqual(
      b.warnings.map((w: { code: string }) => w.code),
    );
    const echoed = a.lines.map((l: { id: string; source: string }) => [l.id, l.source]);
    expect(echoed).toStrictEqual(rows.map((r) => [r.id, r.source]));
  });

  it('a misspelt uncertainty column is a 4xx problem naming the column, not a fit without σ', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits?species=CO',
      headers: { 'content-type': 'text/csv' },
      payload: 'position,uncertainity\n2147.081,0.001\n2139.426,0.001\n2150.856,0.001\n',
    });
    expect(r.statusCode).toBeGreaterThanOrEqual(400);
    expect(r.statusCode).toBeLessThan(500);
    expect(r.headers['content-type']).toContain('application/problem+json');
    expect(r.json().detail).toContain('did you mean "uncertainty"');
    // A header the reader cannot take is the file's structure (422 INPUT_INVALID), not a bad number in a cell.
    expect(r.statusCode).toBe(422);
    expect(r.json().detail).not.toContain('finite number');
  });
});

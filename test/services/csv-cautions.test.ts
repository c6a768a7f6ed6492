import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * `Accept: text/csv` answers of /v1/fits and /v1/checks carry the safety notice and the warning codes that the JSON
 * answer carries, in the Branchwise-Notice and Branchwise-Warnings response headers; the CSV table itself is the
 * same bytes as before (extend, never rename). With `?comments=true` the table is preceded by "# " comment lines
 * holding the notice and every warning with its message. Before, a CSV answer carried neither. The JSON answer of
 * the same request is the reference each header and comment line is compared with.
 */
const app = useApp();
const hcl = readFileSync(new URL('../../examples/fernhollow-hcl-cylinder-7741.json', import.meta.url), 'utf8');

async function post(url: string, payload: string, accept?: string) {
  return app().inject({
    method: 'POST',
    url,
    payload,
    headers: { 'content-type': 'application/json', ...(accept ? { accept } : {}) },
    remoteAddress: nextClient(),
  });
}

interface Json {
  notice: string;
  warnings?: { code: string; message: string }[];
  fit?: { warnings: { code: string; message: string }[] } | null;
}

describe('CSV answers carry the notice and the warnings', () => {
  it.each([
    ['/v1/fits', (j: Json) => j.warnings ?? []],
    ['/v1/checks', (j: Json) => j.fit?.warnings ?? []],
  ])(
    '%s: headers name the notice and the warning codes of the JSON answer; the table is unchanged',
    async (url, warningsOf) => {
      const json = await post(url, hcl);
      expect(json.statusCode).toBe(200);
      const j = json.json() as Json;
      const warnings = warningsOf(j);
      expect(warnings.length).toBeGreaterThan(0);
      const csv = await post(url, hcl, 'text/csv');
      expect(csv.statusCode).toBe(200);
      expect(csv.headers['content-type']).toMatch(/^text\/csv/);
      expect(csv.headers['branchwise-notice']).toBe(j.notice);
      expect(String(csv.headers['branchwise-warnings']).split(', ')).toEqual([...new Set(warnings.map((w) => w.code))]);
      // The table starts with its header row, as lab software parses it: no comment line unless asked for.
      expect(csv.body.startsWith('index,id,species,')).toBe(true);

      const commented = await post(`${url}?comments=true`, hcl, 'text/csv');
      expect(commented.statusCode).toBe(200);
      const lines = commented.body.split('\r\n');
      expect(lines[0]).toBe(`# notice: ${j.notice}`);
      expect(lines.slice(1, 1 + warnings.length)).toEqual(warnings.map((w) => `# warning ${w.code}: ${w.message}`));
      expect(lines.slice(1 + warnings.length).join('\r\n')).toBe(csv.body);
      const off = await post(`${url}?comments=false`, hcl, 'text/csv');
      expect(off.body).toBe(csv.body);
    },
  );

  it('a request without warnings says "none"; a bad ?comments= is a 400 naming the query parameter', async () => {
    const body = JSON.stringify(assignedFitBody('CO', ['1-0'], 25, 0.001, 5));
    const json = (await post('/v1/fits', body)).json() as Json;
    const csv = await post('/v1/fits', body, 'text/csv');
    expect(csv.headers['branchwise-warnings']).toBe(
      (json.warnings ?? []).length === 0 ? 'none' : [...new Set((json.warnings ?? []).map((w) => w.code))].join(', '),
    );
    const bad = await post('/v1/fits?comments=yes', body, 'text/csv');
    expect(bad.statusCode).toBe(400);
    expect(bad.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(bad.json().errors[0].path).toMatch(/comments/);
  });

  it('a large body (answered by a worker) gets the same headers and comment lines', async () => {
    const small = assignedFitBody('HCl', ['1-0', '2-0'], 20, 0.002, 11);
    const payload = JSON.stringify({ species: 'HCl', lines: Array.from({ length: 40 }, () => small.lines).flat() });
    expect(payload.length).toBeGreaterThan(DEFAULT_CONFIG.offloadBytes);
    const j = (await post('/v1/fits', payload)).json() as Json;
    const csv = await post('/v1/fits?comments=true', payload, 'text/csv');
    expect(csv.statusCode).toBe(200);
    expect(csv.headers['branchwise-notice']).toBe(j.notice);
    const codes = [...new Set((j.warnings ?? []).map((w) => w.code))];
    expect(csv.headers['branchwise-warnings']).toBe(codes.length > 0 ? codes.join(', ') : 'none');
    expect(csv.headers['content-disposition']).toBe('inline; filename="fit-lines.csv"');
    expect(csv.body.split('\r\n')[0]).toBe(`# notice: ${j.notice}`);
  });
});

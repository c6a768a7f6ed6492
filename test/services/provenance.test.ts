import { createHash } from 'node:crypto';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { hclScan } from '../helpers/scans.js';

/**
 * Provenance on every JSON response (API-CONTRACT.md, additions): the software and library versions, and the
 * SHA-256 of the body exactly as it was sent, so that a stored answer can be tied to its input.
 */
const app = useApp();
const scan = hclScan({ exactReference: true });
const sha = (s: string | Buffer) => createHash('sha256').update(s).digest('hex');
const SAMPLE = { id: 'S-17', operator: 'B. Analyst', measuredAt: '2026-11-30T14:05:00+01:00', notes: 'ünïcode ✓' };

describe('provenance and sample on every response', () => {
  const fitBody = JSON.stringify({ species: 'HCl', sample: SAMPLE, lines: scan.peaks });
  it.each([
    ['/v1/fits', fitBody],
    ['/v1/checks', fitBody],
    ['/v1/predictions', JSON.stringify({ species: 'HCl', jMax: 5, sample: SAMPLE })],
    [
      '/v1/peaks',
      JSON.stringify({ sample: SAMPLE, spectrum: { x: [1, 2, 3, 4, 5, 6, 7, 8, 9], y: [0, 0, 0, 0, 1, 0, 0, 0, 0] } }),
    ],
  ])('POST %s echoes the sample and carries the digest of the bytes sent', async (url, body) => {
    // Extra whitespace changes the bytes but not the JSON: the digest must follow the bytes.
    const sent = `${body}\n\n`;
    const r = await app().inject({
      method: 'POST',
      url,
      headers: { 'content-type': 'application/json' },
      payload: sent,
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.input.sha256).toBe(sha(sent));
    expect(j.input.sha256).not.toBe(sha(body));
    expect(j.software.name).toBe('branchwise');
    expect(j.software.version).toMatch(/^\d+\.\d+\.\d+/);
    expect(j.software.libraryVersion).toMatch(/^\d{4}\.\d+\.\d+\+[0-9a-f]{12}$/);
    expect(j.sample).toEqual(SAMPLE);
  });

  it('GET /v1/species carries the software and the digest of the empty body', async () => {
    const j = (await app().inject({ method: 'GET', url: '/v1/species' })).json();
    expect(j.software.libraryVersion).toMatch(/\+[0-9a-f]{12}$/);
    expect(j.input.sha256).toBe(sha(''));
  });

  it('a CSV body is hashed as its text; a compressed body is refused, never hashed as something else', async () => {
    const csv = `position,intensity\n${scan.peaks.map((p) => `${p.position},${p.intensity}`).join('\n')}`;
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits?species=HCl',
      headers: { 'content-type': 'text/csv' },
      payload: csv,
    });
    expect(r.statusCode).toBe(200);
    expect(r.json().input.sha256).toBe(sha(csv));
    const gz = gzipSync(Buffer.from(fitBody));
    const z = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      headers: { 'content-type': 'application/json', 'content-encoding': 'gzip' },
      payload: gz,
    });
    // fastify does not inflate bodies by itself: a compressed body is refused, never hashed as something else.
    expect(z.statusCode).toBeGreaterThanOrEqual(400);
    expect(z.statusCode).toBeLessThan(500);
  });

  it('echoes line ids, and refuses a sample that is not one', async () => {
    const lines = scan.peaks.map((p, i) => ({ ...p, id: i % 2 ? `L-${i}` : i }));
    const j = (await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'HCl', lines } })).json();
    expect(j.lines.map((l: { id: unknown }) => l.id)).toEqual(lines.map((l) => l.id));
    for (const u of j.assignment.unexplained) expect(u.id).toBe(lines[u.index]?.id);
    for (const bad of [
      { measuredAt: '30/11/2026' },
      { measuredAt: '2026-11-30T14:05:00' },
      { colour: 'blue' },
      { id: 'x'.repeat(201) },
    ]) {
      const r = await app().inject({
        method: 'POST',
        url: '/v1/fits',
        payload: { species: 'HCl', sample: bad, lines: scan.peaks },
      });
      expect(r.statusCode).toBe(400);
      expect(r.headers['content-type']).toMatch(/problem\+json/);
    }
  });
});

describe('the sample of a CSV or JCAMP-DX body', () => {
  it('comes from sample.* query parameters, is validated as in JSON and printed in the report', async () => {
    const csv = `position,intensity\n${scan.peaks.map((p) => `${p.position},${p.intensity}`).join('\n')}`;
    const q = new URLSearchParams({ species: 'HCl', 'sample.id': 'CSV-9', 'sample.measuredAt': '2026-12-01' });
    const j = (
      await app().inject({
        method: 'POST',
        url: `/v1/checks?${q}`,
        headers: { 'content-type': 'text/csv' },
        payload: csv,
      })
    ).json();
    expect(j.sample).toEqual({ id: 'CSV-9', measuredAt: '2026-12-01' });
    const html = (
      await app().inject({
        method: 'POST',
        url: `/v1/reports?${q}`,
        headers: { 'content-type': 'text/csv' },
        payload: csv,
      })
    ).body;
    expect(html).toContain('CSV-9');
    q.set('sample.measuredAt', 'last Tuesday');
    const bad = await app().inject({
      method: 'POST',
      url: `/v1/checks?${q}`,
      headers: { 'content-type': 'text/csv' },
      payload: csv,
    });
    expect(bad.statusCode).toBe(400);
  });
});

describe('provenance through GraphQL and NDJSON batches', () => {
  it('GraphQL fit and check carry the software, the digest of the HTTP body and the sample', async () => {
    const lines = scan.peaks.map((p) => `{position: ${p.position}, uncertainty: ${p.uncertainty}}`).join(', ');
    const query = `{ fit(input: {species: "HCl", sample: {id: "G-1", measuredAt: "2026-12-01"}, lines: [${lines}]}) { software { name version libraryVersion } input { sha256 } sample { id measuredAt } } check(input: {species: "HCl", lines: [${lines}]}) { verdict software { name } input { sha256 } fit { software { name } } } }`;
    const payload = JSON.stringify({ query });
    const r = await app().inject({
      method: 'POST',
      url: '/graphql',
      headers: { 'content-type': 'application/json' },
      payload,
    });
    expect(r.statusCode).toBe(200);
    const d = r.json().data;
    expect(d.fit.software.name).toBe('branchwise');
    expect(d.fit.input.sha256).toBe(sha(payload));
    expect(d.fit.sample).toEqual({ id: 'G-1', measuredAt: '2026-12-01' });
    expect(d.check.input.sha256).toBe(sha(payload));
    // The fit nested in a check carries no provenance of its own.
    expect(d.check.fit.software).toBeNull();
  });

  it('each batch result carries the digest of its own NDJSON line', async () => {
    const a = JSON.stringify({ species: 'HCl', sample: { id: 'B-1' }, lines: scan.peaks });
    const b = JSON.stringify({ species: 'HCl', lines: scan.peaks.slice(0, 30) });
    const r = await app().inject({
      method: 'POST',
      url: '/v1/batch/fits',
      headers: { 'content-type': 'application/x-ndjson' },
      payload: `${a}\n${b}\n`,
    });
    expect(r.statusCode).toBe(200);
    const records = r.body
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l));
    expect(records.map((x) => x.result.input.sha256)).toEqual([sha(a), sha(b)]);
    expect(records[0].result.sample).toEqual({ id: 'B-1' });
    expect(records[1].result.software.libraryVersion).toMatch(/\+[0-9a-f]{12}$/);
  });
});

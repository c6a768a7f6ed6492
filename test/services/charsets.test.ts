import { describe, expect, it } from 'vitest';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * Bodies in the charset their Content-Type declares. A lab's CSV exported in ISO-8859-1 or windows-1252 writes "µ"
 * as the single byte 0xB5; read as UTF-8 it was "�m" and the unit was refused. The lines are the real 12C16O lines
 * of test/fixtures/co-database-lines, sent as vacuum wavelengths in µm (1e4 / ν). The app at the `npm start`
 * defaults (large bodies decoded in a worker).
 */
const app = useApp();
const CO_10 = CO_DATABASE.lines.filter((l) => l.band === '1-0');

function send(url: string, type: string, payload: Buffer) {
  return app().inject({ method: 'POST', url, headers: { 'content-type': type }, payload });
}

/** A CSV line list in µm (the 1-0 lines, or the rows given), with σ of 0.001 cm⁻¹ as µm. */
const micronCsv = (rows = CO_10) =>
  `position (µm),uncertainty (µm)\n${rows.map((l) => `${(1e4 / l.position).toFixed(10)},${((1e4 * 0.001) / l.position ** 2).toExponential(4)}`).join('\n')}\n`;

describe('a CSV in ISO-8859-1 or windows-1252 is read in its charset', () => {
  it('"position (µm)" in Latin-1 bytes gives the same fit as the UTF-8 text', async () => {
    const text = micronCsv();
    const utf8 = await send('/v1/fits?species=CO', 'text/csv', Buffer.from(text, 'utf8'));
    expect(utf8.statusCode, utf8.body.slice(0, 300)).toBe(200);
    const latin1Bytes = Buffer.from(text, 'latin1');
    expect(latin1Bytes.length).toBe(Buffer.from(text, 'utf8').length - 2); // "µ" is one byte, twice
    for (const charset of ['iso-8859-1', 'ISO-8859-1', 'latin1', 'windows-1252', '"cp1252"']) {
      const r = await send('/v1/fits?species=CO', `text/csv; charset=${charset}`, latin1Bytes);
      expect(r.statusCode, `${charset}: ${r.body.slice(0, 300)}`).toBe(200);
      expect(r.json().parameters).toEqual(utf8.json().parameters);
    }
  });

  it('the same Latin-1 bytes with no charset declared are a 4xx problem, not a 5xx', async () => {
    const r = await send('/v1/fits?species=CO', 'text/csv', Buffer.from(micronCsv(), 'latin1'));
    expect(r.statusCode).toBeGreaterThanOrEqual(400);
    expect(r.statusCode).toBeLessThan(500);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
  });

  it('past OFFLOAD_BYTES (decoded in a worker) the same charset is read the same way', async () => {
    const rows = Array.from(
      { length: Math.ceil((DEFAULT_CONFIG.offloadBytes * 1.5) / 30 / CO_10.length) },
      () => CO_10,
    ).flat();
    const text = micronCsv(rows);
    const bytes = Buffer.from(text, 'latin1');
    expect(bytes.length).toBeGreaterThan(DEFAULT_CONFIG.offloadBytes);
    const small = await send('/v1/fits?species=CO', 'text/csv; charset=iso-8859-1', Buffer.from(micronCsv(), 'latin1'));
    const large = await send('/v1/fits?species=CO', 'text/csv; charset=iso-8859-1', bytes);
    expect(large.statusCode, large.body.slice(0, 300)).toBe(small.statusCode);
    // Repeated lines: the same transitions, so the same band origin to well within its uncertainty.
    const origin = (r: typeof small) => r.json().bands[0].origin;
    expect(Math.abs(origin(large).value - origin(small).value)).toBeLessThan(origin(small).uncertainty);
  });
});

describe('charsets the service cannot read are a 415 before the body is read', () => {
  it('an unknown label, and any charset but UTF-8 on an NDJSON batch', async () => {
    for (const [url, type] of [
      ['/v1/fits?species=CO', 'text/csv; charset=x-martian'],
      ['/v1/fits', 'application/json; charset=no-such-encoding'],
      ['/v1/batch/fits', 'application/x-ndjson; charset=iso-8859-1'],
    ] as const) {
      const r = await send(url, type, Buffer.from('{}\n'));
      expect(r.statusCode, type).toBe(415);
      expect(r.json().code).toBe('UNSUPPORTED_MEDIA_TYPE');
      expect(r.json().detail).toMatch(/charset=.*UTF-8/);
    }
  });

  it('US-ASCII and UTF-8 labels are read as before', async () => {
    const text = micronCsv();
    for (const charset of ['us-ascii', 'utf-8', 'UTF8']) {
      const r = await send('/v1/fits?species=CO', `text/csv; charset=${charset}`, Buffer.from(text, 'utf8'));
      expect(r.statusCode, charset).toBe(200);
    }
  });
});

describe('two different Content-Type headers', () => {
  it('are a 400 naming both, not the body read as the first (Node keeps the first)', async () => {
    const body = JSON.stringify({ species: 'CO', lines: CO_10.map((l) => ({ position: l.position })) });
    // inject takes headers as an object: two values of one header are given as an array.
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      headers: { 'content-type': ['text/csv', 'application/json'] as unknown as string },
      payload: body,
    });
    expect(r.statusCode).toBe(400);
    expect(r.json().code).toBe('BAD_REQUEST');
    expect(r.json().detail).toMatch(/"text\/csv", "application\/json"/);
  });
});

import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * Answers a hostile or careless client got from `npm start` with its defaults, found by probing the service from
 * outside: each one now says what it is, in RFC 9457 form (https://www.rfc-editor.org/rfc/rfc9457).
 */
const app = useApp();
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

describe('problems other than 400 say their own status', () => {
  it('a static path leaving the docs folder: 403 typed and titled Forbidden (was /problems/bad-request)', async () => {
    const r = await app().inject({ method: 'GET', url: '/docs/static/%00' });
    expect(r.statusCode).toBe(403);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    const p = r.json();
    expect([p.type, p.title, p.code, p.status]).toEqual(['/problems/forbidden', 'Forbidden', 'FORBIDDEN', 403]);
  });

  it('a path parameter over the router limit: 414 typed and titled URI too long, the echo truncated', async () => {
    const r = await app().inject({ method: 'GET', url: `/v1/species/${'C'.repeat(5000)}` });
    expect(r.statusCode).toBe(414);
    const p = r.json();
    expect([p.type, p.title, p.code, p.status]).toEqual([
      '/problems/uri-too-long',
      'URI too long',
      'URI_TOO_LONG',
      414,
    ]);
    expect(p.detail.length).toBeLessThanOrEqual(300);
    // The problem type has its page, as every other one does.
    const page = await app().inject({ method: 'GET', url: '/problems/uri-too-long' });
    expect(page.statusCode).toBe(200);
  });
});

describe('X-Request-Id', () => {
  it('an id-like value is echoed; a 10 000-character or markup value is replaced by a fresh id', async () => {
    const kept = await app().inject({ method: 'GET', url: '/healthz', headers: { 'x-request-id': 'scan-0042.a:b_c' } });
    expect(kept.headers['x-request-id']).toBe('scan-0042.a:b_c');
    for (const bad of ['a'.repeat(10_000), '<script>alert(1)</script>', 'two words', '']) {
      const r = await app().inject({ method: 'GET', url: '/healthz', headers: { 'x-request-id': bad } });
      expect(r.statusCode).toBe(200);
      expect(String(r.headers['x-request-id'])).toMatch(UUID);
    }
  });
});

describe('NDJSON batch opening with a byte order mark', () => {
  it('the first record is read past the BOM (as a JSON body is) and gives the answer the same record gives without it', async () => {
    const body = JSON.stringify(assignedFitBody('HCl', ['1-0'], 8, 0.002, 1));
    const send = (payload: string) =>
      app().inject({
        method: 'POST',
        url: '/v1/batch/fits',
        payload,
        headers: { 'content-type': 'application/x-ndjson' },
      });
    const read = (raw: string) =>
      raw
        .trim()
        .split('\n')
        .map((l) => JSON.parse(l));
    const withBom = read((await send(`\ufeff${body}\n${body}\n`)).body);
    const plain = read((await send(`${body}\n${body}\n`)).body);
    expect(withBom.map((o) => o.status)).toEqual([200, 200]);
    expect(withBom[0].result.levels).toEqual(plain[0].result.levels);
    expect(withBom[0].result.levels).toEqual(withBom[1].result.levels);
    // A BOM inside the file (not at its start) is no byte order mark: that line stays broken JSON.
    const inside = read((await send(`${body}\n\ufeff${body}\n`)).body);
    expect(inside.map((o) => o.status)).toEqual([200, 400]);
  });
});

describe('a body declared in UTF-16 or UTF-32', () => {
  it('JSON, CSV, JCAMP-DX and NDJSON in UTF-16 get 415 naming the charset (were 400/422 errors about their content); UTF-8 declared is read', async () => {
    const json = JSON.stringify(assignedFitBody('HCl', ['1-0'], 8, 0.002, 1));
    const csv = 'position\n2906.25\n2925.9\n2944.9\n2865.1\n2843.6\n2821.6\n';
    const jcamp = '##TITLE=x\n##JCAMP-DX=4.24\n##END=\n';
    const cases: [string, string, string][] = [
      ['/v1/fits', 'application/json; charset=utf-16', json],
      ['/v1/fits', 'application/json; charset="UTF-16LE"', json],
      ['/v1/fits?species=HCl', 'text/csv; charset=utf-16', csv],
      ['/v1/fits?species=HCl', 'chemical/x-jcamp-dx; charset=utf-32', jcamp],
      ['/v1/batch/fits', 'application/x-ndjson; charset=utf-16', `${json}\n`],
    ];
    for (const [url, type, text] of cases) {
      const bom = Buffer.from([0xff, 0xfe]);
      const payload = Buffer.concat([bom, Buffer.from(text, 'utf16le')]);
      const r = await app().inject({ method: 'POST', url, payload, headers: { 'content-type': type } });
      expect(r.statusCode, `${url} ${type}`).toBe(415);
      expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(r.json().code).toBe('UNSUPPORTED_MEDIA_TYPE');
      expect(r.json().detail).toMatch(/charset=.*UTF-8/i);
    }
    const utf8 = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: json,
      headers: { 'content-type': 'application/json; charset=UTF-8' },
    });
    expect(utf8.statusCode).toBe(200);
  });
});

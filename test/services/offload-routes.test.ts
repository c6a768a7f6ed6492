import { describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * Every POST route under /v1/ with a body past OFFLOAD_BYTES (256 KiB by default), with the defaults of `npm start`.
 * Only the routes whose handlers take an unparsed body leave it for a worker (services/raw-body.ts#RAW_BODY_ROUTES);
 * a large body of valid JSON to /v1/predictions or /v1/potentials used to reach their handlers unparsed and was
 * answered 500 (a species read as undefined). Whitespace padding keeps the JSON valid and its meaning the same.
 */
const app = useApp();
const pad = (body: object, bytes: number) => `${JSON.stringify(body)}${' '.repeat(bytes)}`;
const post = (url: string, payload: string) =>
  app().inject({
    method: 'POST',
    url,
    payload,
    headers: { 'content-type': 'application/json' },
    remoteAddress: nextClient(),
  });

describe('large bodies on every route', () => {
  it.each([
    ['/v1/predictions', { species: 'CO', jMax: 3 }],
    ['/v1/potentials', { species: 'CO', vMax: 3 }],
  ])('%s answers a valid body padded past 256 KiB as it answers the body itself', async (url, body) => {
    const small = await post(url, JSON.stringify(body));
    const large = await post(url, pad(body, 300_000));
    expect(300_000).toBeGreaterThan(DEFAULT_CONFIG.offloadBytes);
    expect(small.statusCode).toBe(200);
    expect(large.statusCode).toBe(200);
    // The same answer but for the digest of the bytes sent.
    const { input: _a, ...a } = small.json();
    const { input: _b, ...b } = large.json();
    expect(b).toEqual(a);
  });

  it('/v1/potentials takes a body of several MB (its limit is BODY_LIMIT, 32 MiB): 200, not 500', async () => {
    const r = await post('/v1/potentials', pad({ species: 'CO', vMax: 2 }, 2_000_000));
    expect(r.statusCode).toBe(200);
    expect(r.json().levels.length).toBeGreaterThan(0);
  });

  it('/v1/potentials of a large line list (fitted first) gets the answer the event loop gives', async () => {
    const lines = assignedFitBody('HCl', ['1-0', '2-0'], 20, 0.002, 5).lines;
    const body = { species: 'HCl', vMax: 3, lines: Array.from({ length: 40 }, () => lines).flat() };
    const payload = JSON.stringify(body);
    expect(payload.length).toBeGreaterThan(DEFAULT_CONFIG.offloadBytes);
    const inline = await buildApp({ config: { ...DEFAULT_CONFIG, workers: 0 } });
    const a = await inline.inject({
      method: 'POST',
      url: '/v1/potentials',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    await inline.close();
    const b = await post('/v1/potentials', payload);
    expect(a.statusCode).toBe(200);
    expect(b.statusCode).toBe(200);
    expect(b.json().levels).toEqual(a.json().levels);
    expect(b.json().input.sha256).toBe(a.json().input.sha256);
  });

  it.each(['/v1/predictions', '/v1/potentials'])(
    '%s: a large body nested too deep, or with a 1 MB species, is a 4xx problem',
    async (url) => {
      const deep = `${'{"a":'.repeat(100_000)}1${'}'.repeat(100_000)}`;
      const longSpecies = JSON.stringify({ species: 'C'.repeat(1_000_000) });
      for (const payload of [deep, longSpecies]) {
        const r = await post(url, payload);
        expect(r.statusCode).toBeGreaterThanOrEqual(400);
        expect(r.statusCode).toBeLessThan(500);
        expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
      }
    },
  );
});

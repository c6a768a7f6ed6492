import type { AddressInfo } from 'node:net';
import { connect } from 'node:net';
import { getIntrospectionQuery } from 'graphql';
import { describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { type Config, DEFAULT_CONFIG, loadConfig } from '../../services/config.js';

/** Abuse limits that hold, and HTTP hygiene; the defaults of `npm start` unless a test narrows one limit. */
const build = (over: Partial<Config> = {}) => buildApp({ config: { ...DEFAULT_CONFIG, ...over } });
const KEY = 'abuse-test-key-0123456789';

describe('rate limits key on the client, not on what it claims', () => {
  it('without keys configured, a made-up Authorization header does not buy a fresh quota', async () => {
    const app = await build({ rateLimitPerMinute: 3 });
    const codes: number[] = [];
    for (let i = 0; i < 5; i++) {
      const r = await app.inject({
        method: 'GET',
        url: '/v1/species',
        headers: { authorization: `Bearer random-${i}` },
      });
      codes.push(r.statusCode);
    }
    expect(codes).toEqual([200, 200, 200, 429, 429]);
    const r = await app.inject({ method: 'GET', url: '/v1/species' });
    expect(r.json().code).toBe('RATE_LIMITED');
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    await app.close();
  });

  it('wrong keys are counted against the address; a valid key has its own quota', async () => {
    const app = await build({ rateLimitPerMinute: 2, apiKeys: [KEY] });
    const wrong = [];
    for (let i = 0; i < 3; i++)
      wrong.push(
        (await app.inject({ method: 'GET', url: '/v1/species', headers: { authorization: `Bearer wrong-${i}` } }))
          .statusCode,
      );
    expect(wrong).toEqual([401, 401, 429]);
    const right = await app.inject({ method: 'GET', url: '/v1/species', headers: { authorization: `Bearer ${KEY}` } });
    expect(right.statusCode).toBe(200);
    await app.close();
  });

  it('behind a trusted proxy each client has its own bucket; untrusted X-Forwarded-For is ignored', async () => {
    const trusting = await build({ rateLimitPerMinute: 1, trustProxy: ['127.0.0.1'] });
    const viaProxy = (client: string) =>
      trusting.inject({ method: 'GET', url: '/v1/species', headers: { 'x-forwarded-for': client } });
    expect((await viaProxy('192.0.2.1')).statusCode).toBe(200);
    expect((await viaProxy('192.0.2.2')).statusCode).toBe(200);
    expect((await viaProxy('192.0.2.1')).statusCode).toBe(429);
    await trusting.close();
    const plain = await build({ rateLimitPerMinute: 1 });
    const spoof = (client: string) =>
      plain.inject({ method: 'GET', url: '/v1/species', headers: { 'x-forwarded-for': client } });
    expect((await spoof('192.0.2.1')).statusCode).toBe(200);
    expect((await spoof('192.0.2.2')).statusCode).toBe(429);
    await plain.close();
  });

  it('TRUST_PROXY is read from the environment', () => {
    expect(loadConfig({}).trustProxy).toBe(false);
    expect(loadConfig({ TRUST_PROXY: 'true' }).trustProxy).toBe(true);
    expect(loadConfig({ TRUST_PROXY: '2' }).trustProxy).toBe(2);
    expect(loadConfig({ TRUST_PROXY: '10.0.0.0/8, 127.0.0.1' }).trustProxy).toEqual(['10.0.0.0/8', '127.0.0.1']);
  });
});

describe('GraphQL limits', () => {
  it('lets the standard introspection query through', async () => {
    const app = await build();
    const r = await app.inject({ method: 'POST', url: '/graphql', payload: { query: getIntrospectionQuery() } });
    expect(r.statusCode).toBe(200);
    expect(r.json().data.__schema.queryType.name).toBe('Query');
    await app.close();
  });

  it('refuses more than four computations in one query, however aliased, with extensions.code', async () => {
    const app = await build();
    const aliased = Array.from(
      { length: 100 },
      (_, i) => `a${i}: predict(input: {species: "HCl", jMax: 3}) { species }`,
    );
    const r = await app.inject({ method: 'POST', url: '/graphql', payload: { query: `{ ${aliased.join(' ')} }` } });
    expect(r.statusCode).toBe(400);
    expect(r.json().errors[0].extensions.code).toBe('GRAPHQL_REFUSED');
    const four = aliased.slice(0, 4).join(' ');
    const ok = await app.inject({ method: 'POST', url: '/graphql', payload: { query: `{ ${four} }` } });
    expect(ok.statusCode).toBe(200);
    expect(Object.keys(ok.json().data)).toHaveLength(4);
    await app.close();
  });

  it('applies the small-body limit (SMALL_BODY_LIMIT, 1 MiB by default)', async () => {
    const app = await build();
    const r = await app.inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: '{ species { formula } }', variables: { pad: 'x'.repeat(2 * 1024 * 1024) } },
    });
    expect(r.statusCode).toBe(413);
    await app.close();
  });
});

describe('HTTP hygiene', () => {
  it('/metrics does not show the runtime version unless configured', async () => {
    const app = await build();
    const m = (await app.inject({ method: 'GET', url: '/metrics' })).body;
    expect(m).not.toMatch(/nodejs_version_info/);
    expect(m).toMatch(/branchwise_process_resident_memory_bytes/);
    await app.close();
    const shown = await build({ metricsRuntimeVersion: true });
    expect((await shown.inject({ method: 'GET', url: '/metrics' })).body).toMatch(/nodejs_version_info/);
    await shown.close();
  });

  it('a wrong method is a 405 problem with Allow, also on probes', async () => {
    const app = await build();
    const r = await app.inject({ method: 'DELETE', url: '/v1/fits' });
    expect(r.statusCode).toBe(405);
    expect(r.headers.allow).toBe('POST');
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    const p = await app.inject({ method: 'POST', url: '/healthz' });
    expect(p.statusCode).toBe(405);
    expect(String(p.headers.allow)).toMatch(/GET/);
    await app.close();
  });

  it('error details that echo input are truncated', async () => {
    const app = await build();
    const r = await app.inject({ method: 'GET', url: `/v1/species/${'Xx'.repeat(5000)}` });
    expect(r.statusCode).toBeGreaterThanOrEqual(400);
    expect(r.json().detail.length).toBeLessThanOrEqual(300);
    expect(r.json().instance.length).toBeLessThanOrEqual(200);
    await app.close();
  });

  it('an HTTP-level error (headers too large) is answered as problem+json too', async () => {
    const app = await build();
    await app.listen({ host: '127.0.0.1', port: 0 });
    const port = (app.server.address() as AddressInfo).port;
    const answer = await new Promise<string>((resolve, reject) => {
      const s = connect(port, '127.0.0.1', () => {
        s.write(`GET /healthz HTTP/1.1\r\nHost: x\r\nX-Big: ${'a'.repeat(20_000)}\r\n\r\n`);
      });
      let data = '';
      s.on('data', (d) => {
        data += d.toString();
      });
      s.on('end', () => resolve(data));
      s.on('error', reject);
    });
    expect(answer).toMatch(/^HTTP\/1\.1 431/);
    expect(answer).toMatch(/content-type: application\/problem\+json/i);
    expect(answer).toMatch(/"code":"HEADERS_TOO_LARGE"/);
    await app.close();
  });
});

import { describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { type Config, DEFAULT_CONFIG, loadConfig } from '../../services/config.js';
import { assignedFitBody } from '../helpers/requests.js';

const build = (over: Partial<Config>) => buildApp({ config: { ...DEFAULT_CONFIG, ...over } });
const body = assignedFitBody('HCl', ['1-0'], 8, 0.002, 7);
const KEY = 'a-test-key-of-some-length-0001';

describe('production features', () => {
  it('API keys: 401 problem without or with a wrong key, 200 with the right one; probes stay open', async () => {
    const app = await build({ apiKeys: [KEY] });
    const none = await app.inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(none.statusCode).toBe(401);
    expect(none.headers['content-type']).toMatch(/problem\+json/);
    expect(none.headers['www-authenticate']).toMatch(/Bearer/);
    const wrong = await app.inject({
      method: 'POST',
      url: '/v1/fits',
      payload: body,
      headers: { authorization: `Bearer ${KEY}x` },
    });
    expect(wrong.statusCode).toBe(401);
    const right = await app.inject({
      method: 'POST',
      url: '/v1/fits',
      payload: body,
      headers: { authorization: `Bearer ${KEY}` },
    });
    expect(right.statusCode).toBe(200);
    const gql = await app.inject({ method: 'POST', url: '/graphql', payload: { query: '{ species { formula } }' } });
    expect(gql.statusCode).toBe(401);
    expect((await app.inject({ method: 'GET', url: '/healthz' })).statusCode).toBe(200);
    await app.close();
  });

  it('keys shorter than 16 characters are refused at start-up', () => {
    expect(() => loadConfig({ API_KEYS: 'short' })).toThrow(/16 characters/);
  });

  it('CORS is closed by default and open to the allowed origins only', async () => {
    const closed = await build({});
    const a = await closed.inject({ method: 'GET', url: '/v1/species', headers: { origin: 'https://lab.example' } });
    expect(a.headers['access-control-allow-origin']).toBeUndefined();
    await closed.close();
    const open = await build({ corsOrigins: ['https://lab.example'] });
    const b = await open.inject({ method: 'GET', url: '/v1/species', headers: { origin: 'https://lab.example' } });
    expect(b.headers['access-control-allow-origin']).toBe('https://lab.example');
    const c = await open.inject({ method: 'GET', url: '/v1/species', headers: { origin: 'https://other.example' } });
    expect(c.headers['access-control-allow-origin']).toBeUndefined();
    await open.close();
  });

  it('rate limits answer 429 problem+json with Retry-After; probes are not limited', async () => {
    const app = await build({ rateLimitPerMinute: 3 });
    const codes: number[] = [];
    for (let i = 0; i < 4; i++) codes.push((await app.inject({ method: 'GET', url: '/v1/species' })).statusCode);
    expect(codes).toEqual([200, 200, 200, 429]);
    const r = await app.inject({ method: 'GET', url: '/v1/species' });
    expect(r.headers['content-type']).toMatch(/problem\+json/);
    expect(r.headers['retry-after']).toBeDefined();
    for (let i = 0; i < 5; i++) expect((await app.inject({ method: 'GET', url: '/healthz' })).statusCode).toBe(200);
    await app.close();
  });

  it('security headers, request ids echoed (and taken from x-request-id)', async () => {
    const app = await build({});
    const r = await app.inject({ method: 'GET', url: '/v1/species', headers: { 'x-request-id': 'scan-0042' } });
    expect(r.headers['content-security-policy']).toMatch(/default-src 'self'/);
    expect(r.headers['x-content-type-options']).toBe('nosniff');
    expect(r.headers['x-request-id']).toBe('scan-0042');
    await app.close();
  });

  it('metrics expose request durations by route template, fit durations, line counts and verdicts', async () => {
    const app = await build({});
    await app.inject({ method: 'POST', url: '/v1/fits', payload: body });
    await app.inject({ method: 'POST', url: '/v1/checks', payload: body });
    await app.inject({ method: 'GET', url: '/v1/species/HCl' });
    const m = (await app.inject({ method: 'GET', url: '/metrics' })).body;
    expect(m).toMatch(
      /branchwise_http_request_duration_seconds_count\{route="\/v1\/fits",method="POST",status="2xx"\} 1/,
    );
    expect(m).toMatch(/route="\/v1\/species\/:formula"/);
    expect(m).toMatch(/branchwise_fit_duration_seconds_count\{kind="fit"\} 1/);
    expect(m).toMatch(/branchwise_fit_lines_bucket\{le="50",kind="fit"\} 1/);
    expect(m).toMatch(/branchwise_check_verdicts_total\{verdict="(pass|warn|fail)"\} 1/);
    await app.close();
  });

  it('large fits run in a worker thread and give the same answer as inline', async () => {
    const inline = await build({});
    const pooled = await build({ workers: 1, workerThreshold: 5 });
    const a = (await inline.inject({ method: 'POST', url: '/v1/fits', payload: body })).json();
    const b = (await pooled.inject({ method: 'POST', url: '/v1/fits', payload: body })).json();
    expect(b.parameters).toEqual(a.parameters);
    const bad = await pooled.inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { ...body, lines: body.lines.map((l) => ({ ...l, assignment: { ...l.assignment, branch: 'Q' } })) },
    });
    expect(bad.statusCode).toBe(422);
    expect(bad.json().code).toBe('ASSIGNMENT_INVALID');
    await inline.close();
    await pooled.close();
  });

  it('sheds load with 503 problem+json and Retry-After under pressure, while probes keep answering', async () => {
    // A heap limit of one byte is always exceeded: deterministic pressure (the event-loop limit works the same way).
    const app = await build({ maxHeapUsedBytes: 1 });
    await app.ready();
    await new Promise((r) => setTimeout(r, 150));
    const r = await app.inject({ method: 'GET', url: '/v1/species' });
    expect(r.statusCode).toBe(503);
    expect(r.headers['retry-after']).toBe('10');
    expect(r.headers['content-type']).toMatch(/problem\+json/);
    expect(r.json().code).toBe('OVERLOADED');
    expect((await app.inject({ method: 'GET', url: '/healthz' })).statusCode).toBe(200);
    expect((await app.inject({ method: 'GET', url: '/readyz' })).statusCode).toBe(200);
    await app.close();
  });

  it('GraphQL refuses batched queries and over-long query text', async () => {
    const app = await build({});
    const batch = await app.inject({
      method: 'POST',
      url: '/graphql',
      payload: [{ query: '{ species { formula } }' }],
    });
    expect(batch.statusCode).toBe(400);
    const long = await app.inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: `{ species { formula ${' '.repeat(30_000)} } }` },
    });
    expect(long.statusCode).toBe(400);
    const deep = await app.inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: `{ fit(input: {lines: []}) { lines { assignment { band } } } }` },
    });
    expect(deep.statusCode).toBeLessThan(500);
    await app.close();
  });
});

import { describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * Large bodies (≥ OFFLOAD_BYTES, 256 KiB by default) are parsed, validated, run and serialised in a worker: the
 * answers must be the ones the event loop would give (same numbers, same problems), and admission refuses a large
 * request before reading its body when the budget is taken. Defaults of `npm start` unless a test says otherwise.
 */
const app = useApp();
const small = assignedFitBody('HCl', ['1-0', '2-0'], 20, 0.002, 11);
// Repeated scans of the same lines (an averaging run), past 256 KiB of JSON.
const large = { species: 'HCl', lines: Array.from({ length: 40 }, () => small.lines).flat() };

describe('large bodies off the event loop', () => {
  it('a large body gets the answer the event loop gives (WORKERS=0 for the reference)', async () => {
    const payload = JSON.stringify(large);
    expect(payload.length).toBeGreaterThan(DEFAULT_CONFIG.offloadBytes);
    const inline = await buildApp({ config: { ...DEFAULT_CONFIG, workers: 0 } });
    const a = await inline.inject({
      method: 'POST',
      url: '/v1/fits',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    await inline.close();
    const b = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload,
      headers: { 'content-type': 'application/json' },
      remoteAddress: nextClient(),
    });
    expect(a.statusCode).toBe(200);
    expect(b.statusCode).toBe(200);
    expect(b.headers['content-type']).toMatch(/^application\/json/);
    // Same parameters to the last digit (the same code ran, in another thread); provenance hashes the same bytes.
    expect(b.json().parameters).toEqual(a.json().parameters);
    expect(b.json().input.sha256).toBe(a.json().input.sha256);
  });

  it('a large body that breaks the schema gets the same 400 problem, with paths', async () => {
    const broken = { ...large, lines: large.lines.map((l, i) => (i === 1234 ? { ...l, position: -1 } : l)) };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: broken, remoteAddress: nextClient() });
    expect(r.statusCode).toBe(400);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(r.json().code).toBe('VALIDATION_FAILED');
    expect(r.json().errors[0].path).toBe('lines/1234/position');
  });

  it('a large body of bad JSON, or nested too deep, is a 4xx problem', async () => {
    const text = `${JSON.stringify(large).slice(0, -10)}`;
    const r = await app().inject({
      method: 'POST',
      url: '/v1/checks',
      payload: text,
      headers: { 'content-type': 'application/json' },
      remoteAddress: nextClient(),
    });
    expect(r.statusCode).toBeGreaterThanOrEqual(400);
    expect(r.statusCode).toBeLessThan(500);
    const deep = `${'['.repeat(40)}${' '.repeat(300_000)}${']'.repeat(40)}`;
    const d = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: deep,
      headers: { 'content-type': 'application/json' },
      remoteAddress: nextClient(),
    });
    expect(d.statusCode).toBe(400);
  });

  it('a byte order mark, or JSON cut short, gets the answer below the threshold and above it alike', async () => {
    const json = JSON.stringify(small);
    // The same lines padded with blanks to just under and just over OFFLOAD_BYTES (three bytes of BOM included).
    const padded = (n: number) => `${json.slice(0, -1)}${' '.repeat(n - json.length - 3)}}`;
    const bom = Buffer.from([0xef, 0xbb, 0xbf]);
    const post = (body: Buffer) =>
      app().inject({
        method: 'POST',
        url: '/v1/fits',
        payload: body,
        headers: { 'content-type': 'application/json' },
        remoteAddress: nextClient(),
      });
    const sizes = [DEFAULT_CONFIG.offloadBytes - 1, DEFAULT_CONFIG.offloadBytes + 1];
    const [below, above] = await Promise.all(sizes.map((n) => post(Buffer.concat([bom, Buffer.from(padded(n))]))));
    expect(below?.statusCode).toBe(200);
    expect(above?.statusCode).toBe(200);
    expect(above?.json().parameters).toEqual(below?.json().parameters);
    const [cutBelow, cutAbove] = await Promise.all(sizes.map((n) => post(Buffer.from(padded(n).slice(0, -1)))));
    for (const r of [cutBelow, cutAbove]) {
      expect(r?.statusCode).toBe(400);
      expect(r?.headers['content-type']).toMatch(/^application\/problem\+json/);
    }
    expect(cutAbove?.json().code).toBe(cutBelow?.json().code);
    expect(cutAbove?.json().title).toBe(cutBelow?.json().title);
  });

  it('admission: a second large request while the budget is taken is a 503 with Retry-After, before its body is read', async () => {
    const tight = await buildApp({ config: { ...DEFAULT_CONFIG, maxActiveLines: 3000 } });
    const payload = JSON.stringify(large);
    const first = tight.inject({
      method: 'POST',
      url: '/v1/fits',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    // Let the first one be admitted, then send the second while it runs.
    await new Promise((r) => setTimeout(r, 20));
    const second = await tight.inject({
      method: 'POST',
      url: '/v1/fits',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    expect((await first).statusCode).toBe(200);
    expect(second.statusCode).toBe(503);
    expect(second.headers['retry-after']).toBe('10');
    expect(second.json().code).toBe('OVERLOADED');
    // Once the first is answered its reservation is given back.
    const third = await tight.inject({
      method: 'POST',
      url: '/v1/fits',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    expect(third.statusCode).toBe(200);
    await tight.close();
  });

  it('a processing deadline stops the work and answers 503 DEADLINE_EXCEEDED', async () => {
    const hurried = await buildApp({ config: { ...DEFAULT_CONFIG, processingDeadlineMs: 1 } });
    const r = await hurried.inject({ method: 'POST', url: '/v1/fits', payload: large });
    expect(r.statusCode).toBe(503);
    expect(r.json().code).toBe('DEADLINE_EXCEEDED');
    // The pool is usable afterwards (the stopped worker was replaced).
    const again = await hurried.inject({ method: 'POST', url: '/v1/fits', payload: small });
    expect(again.statusCode).toBe(200);
    await hurried.close();
  });

  it("a large body's bytes are moved to the worker, not copied: after the job, the request's copy is empty", async () => {
    const a = await buildApp();
    const sent: Uint8Array[] = [];
    const run = a.pool.run.bind(a.pool);
    a.pool.run = (job, size, options) => {
      if (job.kind === 'raw') sent.push(job.bytes);
      return run(job, size, options);
    };
    const payload = JSON.stringify(large);
    const r = await a.inject({
      method: 'POST',
      url: '/v1/fits',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    expect(r.statusCode).toBe(200);
    expect(r.json().statistics.lines).toBe(large.lines.length);
    expect(sent).toHaveLength(1);
    // A transferred ArrayBuffer is detached on this side: a copied one would still hold the body.
    expect(sent[0]?.byteLength).toBe(0);
    await a.close();
  });

  it('a large body is run once: the handler ends with the answer of the worker (no second, inline run after it)', async () => {
    // Regression: the handler awaited the reply (a thenable, which resolves to undefined once the response is
    // written) and went on to run the use case again, inline, on the unparsed body.
    const a = await buildApp();
    const kinds: string[] = [];
    const run = a.pool.run.bind(a.pool);
    a.pool.run = (job, size, options) => {
      kinds.push(job.kind);
      return run(job, size, options);
    };
    for (const url of ['/v1/fits', '/v1/checks', '/v1/reports']) {
      const r = await a.inject({
        method: 'POST',
        url,
        payload: JSON.stringify(large),
        headers: { 'content-type': 'application/json' },
      });
      expect(r.statusCode, url).toBe(200);
      expect(Number(r.headers['content-length']), url).toBe(r.rawPayload.length);
    }
    await new Promise((r) => setTimeout(r, 100));
    expect(kinds).toEqual(['raw', 'raw', 'raw']);
    await a.close();
  });

  it('a GraphQL fit of more than 200 kB reserves its lines once: one that fits MAX_ACTIVE_LINES is answered', async () => {
    // Regression: admission reserved the body's estimate (bytes / 100) and the pool the fit's lines again, so a
    // 2 600-line fit under a 3 000-line budget was refused by its own first reservation.
    const a = await buildApp({ config: { ...DEFAULT_CONFIG, maxActiveLines: 3000 } });
    const lines = Array.from({ length: 30 }, () => small.lines)
      .flat()
      .slice(0, 2600);
    const payload = JSON.stringify({
      query: 'query F($input: FitInput!) { fit(input: $input) { statistics { lines } } }',
      variables: { input: { species: 'HCl', lines } },
    });
    expect(payload.length).toBeGreaterThan(DEFAULT_CONFIG.workerThreshold * 100);
    const r = await a.inject({
      method: 'POST',
      url: '/graphql',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    expect(r.json().errors).toBeUndefined();
    expect(r.json().data.fit.statistics.lines).toBeGreaterThan(2000);
    expect(a.pool.activeLines).toBe(0);
    await a.close();
  });

  it('a compact body with more lines than its Content-Length suggests reserves its true line count before it runs', async () => {
    // Regression: admission estimated ~100 bytes a line and the worker ran whatever the body held, so compact lists
    // (bare positions are ~20 bytes a line) were admitted several times over MAX_ACTIVE_LINES. Lines of ~65 bytes
    // (over the 25 % slack the worker allows).
    const a = await buildApp();
    const lines = Array.from({ length: 70 }, () => small.lines)
      .flat()
      .map((l) => ({ position: Math.round(l.position * 1e4) / 1e4, assignment: l.assignment }));
    const payload = JSON.stringify({ species: 'HCl', lines });
    expect(payload.length).toBeGreaterThan(DEFAULT_CONFIG.offloadBytes);
    expect(1.25 * (payload.length / 100)).toBeLessThan(lines.length);
    const runs: { reserved?: number; active: number }[] = [];
    const run = a.pool.run.bind(a.pool);
    a.pool.run = (job, size, options) => {
      runs.push({ ...('reservedLines' in job ? { reserved: job.reservedLines } : {}), active: a.pool.activeLines });
      return run(job, size, options);
    };
    const r = await a.inject({
      method: 'POST',
      url: '/v1/fits',
      payload,
      headers: { 'content-type': 'application/json' },
    });
    expect(r.statusCode).toBe(200);
    expect(runs).toHaveLength(2);
    expect(runs[0]?.reserved).toBeLessThan(lines.length);
    expect(runs[1]?.reserved).toBe(lines.length);
    // While it ran, the budget held all of its lines (the admission estimate plus the rest).
    expect(runs[1]?.active).toBeGreaterThanOrEqual(lines.length);
    await a.close();
  });
});

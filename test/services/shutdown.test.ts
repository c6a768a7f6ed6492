import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { shutdownOnSignals } from '../../services/shutdown.js';
import { assignedFitBody } from '../helpers/requests.js';

/** Graceful shutdown keeps its promise: in-flight work finishes; a batch cut short says where to resume. */
const body = JSON.stringify(assignedFitBody('HCl', ['1-0'], 8, 0.002, 21));

describe('graceful shutdown', () => {
  it('a batch cut short by shutdown ends with a closing record naming the line to resume from', async () => {
    const app = await buildApp();
    let release: () => void = () => {};
    const gate = new Promise<void>((r) => {
      release = r;
    });
    let step = 0;
    const input = new Readable({
      read() {
        step++;
        if (step <= 2) this.push(`${body}\n`);
        else if (step === 3) void gate.then(() => this.push(`${body}\n${body}\n${body}\n`));
        else if (step === 4) this.push(null);
      },
    });
    const answer = app.inject({
      method: 'POST',
      url: '/v1/batch/fits',
      payload: input,
      headers: { 'content-type': 'application/x-ndjson' },
    });
    // Shutdown begins while the batch waits for its third line.
    await new Promise((r) => setTimeout(r, 300));
    app.appState.ready = false;
    expect((await app.inject({ method: 'GET', url: '/readyz' })).statusCode).toBe(503);
    release();
    const out = (await answer).body
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as Record<string, unknown>);
    expect(out.slice(0, 2).map((o) => o.status)).toEqual([200, 200]);
    expect(out[2]).toMatchObject({ incomplete: true, resumeFromLine: 3, resumeFromIndex: 2 });
    expect(out).toHaveLength(3);
    await app.close();
  });

  it('on a signal, readiness turns false at once, the request in flight finishes, then the exit is clean', async () => {
    const app = await buildApp();
    const exits: number[] = [];
    const shutdown = shutdownOnSignals(app, 20_000, (c) => void exits.push(c));
    const inFlight = app.inject({
      method: 'POST',
      url: '/v1/checks',
      payload: body,
      headers: { 'content-type': 'application/json' },
    });
    await new Promise((r) => setImmediate(r));
    const closing = shutdown('SIGTERM');
    expect(app.appState.ready).toBe(false);
    const answered = await inFlight;
    expect(answered.statusCode).toBe(200);
    // No keep-alive once closing: a proxy must not send its next request on this connection (it would get a 503).
    expect(answered.headers.connection).toBe('close');
    await closing;
    expect(exits).toEqual([0]);
  });

  it('the grace period forces the exit when work does not finish in time', async () => {
    const app = await buildApp();
    const exits: number[] = [];
    // A close that never finishes stands for work stuck past the grace period.
    app.addHook('onClose', () => new Promise(() => {}));
    const shutdown = shutdownOnSignals(app, 50, (c) => void exits.push(c));
    void shutdown('SIGTERM');
    await new Promise((r) => setTimeout(r, 200));
    expect(exits).toEqual([1]);
  });
});

import { describe, expect, it } from 'vitest';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { type LoadSignals, pressureOf } from '../../services/plugins/shedding.js';
import { useApp } from '../helpers/app.js';

/**
 * A lone client is not shed for its own work. Found in the full suite on a loaded machine (load 11 on 2 cores): a
 * test file's earlier inline fits each kept the loop busy over a second, the last three 100 ms ticks were all late by
 * more than MAX_EVENT_LOOP_DELAY_MS (1 000), and the file's next small request, sent after the others were answered,
 * got 503 OVERLOADED. The app runs with the defaults of `npm start` (DEFAULT_CONFIG, test/helpers/app.ts).
 */
const app = useApp();

/** Keep the event loop busy for `ms` of wall time, then let its timers run. */
async function busy(ms: number): Promise<void> {
  const end = performance.now() + ms;
  while (performance.now() < end) {
    // a synchronous task, as an inline fit is
  }
  await new Promise((r) => setTimeout(r, 5));
}

describe('shedding on event-loop delay', () => {
  it('a request sent after the loop was busy three ticks in a row, nothing else in flight, is answered (was 503)', async () => {
    await app().inject({ method: 'GET', url: '/healthz' });
    for (let i = 0; i < 4; i++) await busy(DEFAULT_CONFIG.maxEventLoopDelayMs + 300);
    const r = await app().inject({ method: 'GET', url: '/v1/species' });
    expect(r.statusCode, r.body.slice(0, 200)).toBe(200);
  });

  it('pressureOf: a late loop is overload only while other requests are in flight', () => {
    const late: LoadSignals = { eventLoopDelay: () => 5000, stop: () => undefined };
    const none = () => 0;
    expect(pressureOf(DEFAULT_CONFIG, late, none, 0)).toBeUndefined();
    expect(pressureOf(DEFAULT_CONFIG, late, none, 1)).toEqual({ kind: 'eventLoopDelay', value: 5000, limit: 1000 });
    const onTime: LoadSignals = { eventLoopDelay: () => 10, stop: () => undefined };
    expect(pressureOf(DEFAULT_CONFIG, onTime, none, 5)).toBeUndefined();
  });
});

import type { FastifyInstance } from 'fastify';
import type { Config } from '../config.js';
import { problem, sendProblem } from '../errors.js';

/**
 * Load shedding on signals that mean overload, each one a real measurement:
 * - event-loop delay: a 100 ms timer measures how late it fires. Shedding needs the last three ticks all late by
 *   more than MAX_EVENT_LOOP_DELAY_MS (a loop that stays busy) while other requests are in flight; one long task
 *   followed by a free loop is not overload, nor is a lone client whose own requests came one after another, and
 *   before three ticks have been measured there is no signal at all (never "no sample = infinite");
 * - the worker queue: more jobs waiting than MAX_QUEUE;
 * - memory: heap above MAX_HEAP_USED_BYTES or resident set above MAX_RSS_BYTES, when configured.
 * Only the protected scope sheds: probes and metrics keep answering (a busy instance is not a dead one).
 */
export interface LoadSignals {
  /** The loop's delay in ms: the smallest of the last three measured lags (0 until three are measured). */
  eventLoopDelay(): number;
  stop(): void;
}

const TICK_MS = 100;

export function watchEventLoop(): LoadSignals {
  const lags: number[] = [];
  let last = performance.now();
  const timer = setInterval(() => {
    const now = performance.now();
    lags.push(Math.max(0, now - last - TICK_MS));
    if (lags.length > 3) lags.shift();
    last = now;
  }, TICK_MS);
  timer.unref();
  return {
    eventLoopDelay: () => (lags.length < 3 ? 0 : Math.min(...lags)),
    stop: () => clearInterval(timer),
  };
}

export interface Pressure {
  readonly kind: 'eventLoopDelay' | 'queue' | 'heapUsed' | 'rss';
  readonly value: number;
  readonly limit: number;
}

/**
 * The pressure on the service, if any. The event-loop delay counts only while other requests are in flight
 * (`othersInFlight`): the last ticks are late also when one client's own requests, one after another, each kept
 * the loop busy for a second or more (inline fits on a loaded machine), and that client must not be refused once its
 * last request is answered; a loop that is late while others wait is overload.
 */
export function pressureOf(
  config: Config,
  signals: LoadSignals,
  queued: () => number,
  othersInFlight = Number.POSITIVE_INFINITY,
): Pressure | undefined {
  if (config.maxEventLoopDelayMs > 0 && othersInFlight > 0) {
    const d = signals.eventLoopDelay();
    if (d > config.maxEventLoopDelayMs) return { kind: 'eventLoopDelay', value: d, limit: config.maxEventLoopDelayMs };
  }
  if (config.maxQueue > 0 && queued() >= config.maxQueue)
    return { kind: 'queue', value: queued(), limit: config.maxQueue };
  if (config.maxHeapUsedBytes > 0) {
    const h = process.memoryUsage().heapUsed;
    if (h > config.maxHeapUsedBytes) return { kind: 'heapUsed', value: h, limit: config.maxHeapUsedBytes };
  }
  if (config.maxRssBytes > 0) {
    const r = process.memoryUsage.rss();
    if (r > config.maxRssBytes) return { kind: 'rss', value: r, limit: config.maxRssBytes };
  }
  return undefined;
}

export const RETRY_AFTER_S = 10;

/** Adds shedding to the scope it is called on. */
export function shedLoad(scope: FastifyInstance, config: Config, signals: LoadSignals, queued: () => number): void {
  // Requests of the scope admitted and not yet answered (or aborted).
  const inFlight = new Set<object>();
  const done = async (request: { raw: object }) => {
    inFlight.delete(request.raw);
  };
  scope.addHook('onResponse', done);
  scope.addHook('onRequestAbort', done);
  scope.addHook('onRequest', async (request, reply) => {
    const p = pressureOf(config, signals, queued, inFlight.size);
    if (!p) {
      inFlight.add(request.raw);
      return;
    }
    reply.header('retry-after', String(RETRY_AFTER_S));
    return sendProblem(
      reply,
      problem(
        'OVERLOADED',
        503,
        'Service overloaded',
        `the service is shedding load (${p.kind} ${Math.round(p.value)} over ${p.limit}); retry in ${RETRY_AFTER_S} s`,
        request,
      ),
    );
  });
}

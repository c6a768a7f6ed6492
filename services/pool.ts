import { Piscina } from 'piscina';
import { ScienceError, type ScienceErrorCode } from '../src/errors.js';
import type { Config } from './config.js';
import { HttpProblem } from './errors.js';
import { RETRY_AFTER_S } from './plugins/shedding.js';
import { ClientError } from './raw-body.js';
import { NonFiniteResult } from './usecases/finite.js';
import { type Job, type JobResult, runJob } from './worker.js';

/**
 * Large jobs run in worker threads (piscina) so that the event loop, and with it /healthz and small requests,
 * stays responsive; small ones run inline, where a thread hop would cost more than the work.
 *
 * Admission control: a job is refused with 503 + Retry-After when MAX_QUEUE jobs already wait for a thread, or
 * when the estimated sizes of the admitted jobs would exceed MAX_ACTIVE_LINES (memory grows with the lines; one
 * job is always admitted when nothing else runs). Deadlines: an admitted job is stopped (its worker thread torn
 * down) when PROCESSING_DEADLINE_MS passes or when the caller's signal aborts (the client went away).
 * @see https://github.com/piscinajs/piscina
 */
export interface RunOptions {
  /** Aborts the job (e.g. the client closed the connection). */
  readonly signal?: AbortSignal;
  /** The request was admitted (and its size reserved) before its body was read: no second admission. */
  readonly admitted?: boolean;
  /** Buffers moved to the worker with the job, not copied (a large body's bytes); unusable here afterwards. */
  readonly transfer?: readonly ArrayBuffer[];
}

export interface Pool {
  run<T>(job: Job, size: number, options?: RunOptions): Promise<T>;
  close(): Promise<void>;
  readonly threads: number;
  /** Jobs waiting for a thread. */
  readonly queued: number;
  /** Estimated size (lines) of the jobs admitted and not yet finished. */
  readonly activeLines: number;
  /** Reserve `lines` of the admission budget (false when it would overflow); give them back with release. */
  reserve(lines: number): boolean;
  /**
   * Reserve `extra` lines more for a request that already holds `held`: false when that would overflow the budget
   * while other work holds part of it (alone, a request may always grow).
   */
  reserveMore(held: number, extra: number): boolean;
  release(lines: number): void;
  /**
   * Start the worker threads and run a tiny job in each, so that the first large request does not pay for the
   * thread's start (module loading competes with the event loop on a small machine). server.ts calls it at start-up.
   */
  warm(): Promise<void>;
}

export const overloaded = (detail: string): HttpProblem =>
  new HttpProblem('OVERLOADED', 503, 'Service overloaded', `${detail}; retry in ${RETRY_AFTER_S} s`, {
    'retry-after': String(RETRY_AFTER_S),
  });

/**
 * Inline jobs take turns with the event loop: the first runs at once, and while one has run in this turn of the
 * loop the next waits for the next turn (setImmediate), so that connections, /healthz and timers are served between
 * them. A burst of small fits arrives in one poll of the loop and ran there back to back, the event loop held for
 * all of them: 64 concurrent 116-line fits from one client kept /healthz unanswered for 9.8 s (load ~13, 2 cores).
 * Only the synchronous part holds the turn; the order of the jobs and their results are unchanged.
 */
export function inlineTurns(): <T>(work: () => T) => T | Promise<T> {
  let busy = false;
  const waiting: (() => void)[] = [];
  const release = () =>
    setImmediate(() => {
      const next = waiting.shift();
      if (next) next();
      else busy = false;
    });
  return <T>(work: () => T): T | Promise<T> => {
    const run = (): T => {
      try {
        return work();
      } finally {
        release();
      }
    };
    if (!busy) {
      busy = true;
      return run();
    }
    return new Promise<void>((resolve) => waiting.push(resolve)).then(run);
  };
}

export function createPool(config: Config): Pool {
  const threads = config.workers;
  const inline = inlineTurns();
  const isTs = import.meta.url.endsWith('.ts');
  const piscina =
    threads > 0
      ? new Piscina({
          filename: new URL(isTs ? './worker.ts' : './worker.js', import.meta.url).href,
          minThreads: 0, // started by warm() in the server; tests that build many apps start none
          maxThreads: threads,
          // From the TypeScript sources (tests, npm run dev) the worker needs the same loader as the main thread.
          ...(isTs ? { execArgv: ['--import', 'tsx'] } : {}),
          idleTimeout: 60_000,
        })
      : undefined;
  let activeLines = 0;
  const reserve = (lines: number) => {
    if (activeLines > 0 && activeLines + lines > config.maxActiveLines) return false;
    activeLines += lines;
    return true;
  };
  const reserveMore = (held: number, extra: number) => {
    if (activeLines - held > 0 && activeLines + extra > config.maxActiveLines) return false;
    activeLines += extra;
    return true;
  };
  const release = (lines: number) => {
    activeLines -= lines;
  };
  const unwrap = <T>(r: JobResult): T => {
    if (r.ok) return r.value as T;
    if ('nonFinite' in r) throw new NonFiniteResult(r.nonFinite.quantity, r.nonFinite.value);
    if ('budget' in r) throw new NeedsBudget(r.budget, r.bytes);
    // The status, code and title fastify's parser gives a small body of broken JSON (services/errors.ts).
    if ('invalidJson' in r) throw new HttpProblem('INVALID_JSON', 400, 'Body is not valid JSON', r.invalidJson);
    if ('clientError' in r) throw new ClientError(r.clientError);
    if ('validation' in r) {
      const errors = r.validation;
      throw new HttpProblem(
        'VALIDATION_FAILED',
        400,
        'Request does not match the schema',
        errors
          .slice(0, 5)
          .map((e) => `${e.path}: ${e.message}`)
          .join('; '),
        {},
        { errors },
      );
    }
    throw new ScienceError(r.error.code as ScienceErrorCode, r.error.message, r.error.details);
  };
  return {
    threads,
    get queued() {
      return piscina?.queueSize ?? 0;
    },
    get activeLines() {
      return activeLines;
    },
    reserve,
    reserveMore,
    release,
    async warm() {
      if (!piscina) return;
      const tiny: Job = {
        kind: 'predict',
        body: { species: 'HCl', bands: ['1-0'], jMax: 1, temperature: 296, unit: 'cm-1' },
      };
      await Promise.all(Array.from({ length: threads }, () => piscina.run(tiny)));
    },
    async run<T>(job: Job, size: number, options: RunOptions = {}): Promise<T> {
      if (!piscina || size < config.workerThreshold) return unwrap<T>(await inline(() => runJob(job)));
      if (config.maxQueue > 0 && piscina.queueSize >= config.maxQueue)
        throw overloaded(`${piscina.queueSize} jobs are waiting for a worker (MAX_QUEUE ${config.maxQueue})`);
      const admit = !options.admitted;
      if (admit && !reserve(size))
        throw overloaded(
          `${activeLines} lines are being processed and this request adds ${size} (MAX_ACTIVE_LINES ${config.maxActiveLines})`,
        );
      const deadline = config.processingDeadlineMs > 0 ? AbortSignal.timeout(config.processingDeadlineMs) : undefined;
      const signals = [deadline, options.signal].filter((s): s is AbortSignal => s !== undefined);
      const signal = signals.length > 0 ? AbortSignal.any(signals) : undefined;
      try {
        const transferList = options.transfer ? { transferList: [...options.transfer] } : {};
        return unwrap<T>((await piscina.run(job, { ...(signal ? { signal } : {}), ...transferList })) as JobResult);
      } catch (e) {
        if (deadline?.aborted)
          throw new HttpProblem(
            'DEADLINE_EXCEEDED',
            503,
            'Processing deadline exceeded',
            `the work took longer than ${config.processingDeadlineMs} ms (PROCESSING_DEADLINE_MS) and was stopped`,
          );
        if (options.signal?.aborted)
          throw new HttpProblem('CLIENT_CLOSED', 499, 'Client closed the request', 'the work was stopped');
        throw e;
      } finally {
        if (admit) release(size);
      }
    },
    async close() {
      await piscina?.destroy();
    },
  };
}

export { jobSize } from './job-size.js';

/**
 * A large body turned out bigger than the lines reserved for it (its Content-Length suggested fewer: a compact
 * list of bare positions is ~20 bytes a line, not the ~100 assumed): the worker stops after parsing and says how
 * many; the caller reserves the rest of the budget or refuses, then runs the job again.
 */
export class NeedsBudget extends Error {
  constructor(
    readonly lines: number,
    /** The body's bytes, moved back from the worker for the run that follows. */
    readonly bytes?: Uint8Array,
  ) {
    super(`the body holds ${lines} lines, more than were reserved for it`);
  }
}

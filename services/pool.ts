import { Piscina } from 'piscina';
import { ScienceError, type ScienceErrorCode } from '../src/errors.js';
import type { Config } from './config.js';
import { type Job, type JobResult, runJob } from './worker.js';

/**
 * Large fits run in worker threads (piscina) so that the event loop, and with it /healthz and small requests, stays
 * responsive; small ones run inline, where a thread hop would cost more than the fit.
 * @see https://github.com/piscinajs/piscina
 */
export interface Pool {
  run<T>(job: Job, size: number): Promise<T>;
  close(): Promise<void>;
  readonly threads: number;
}

export function createPool(config: Config): Pool {
  const threads = config.workers;
  const isTs = import.meta.url.endsWith('.ts');
  const piscina =
    threads > 0
      ? new Piscina({
          filename: new URL(isTs ? './worker.ts' : './worker.js', import.meta.url).href,
          minThreads: 1,
          maxThreads: threads,
          // From the TypeScript sources (tests, npm run dev) the worker needs the same loader as the main thread.
          ...(isTs ? { execArgv: ['--import', 'tsx'] } : {}),
          idleTimeout: 60_000,
        })
      : undefined;
  const unwrap = <T>(r: JobResult): T => {
    if (r.ok) return r.value as T;
    throw new ScienceError(r.error.code as ScienceErrorCode, r.error.message, r.error.details);
  };
  return {
    threads,
    async run<T>(job: Job, size: number): Promise<T> {
      if (!piscina || size < config.workerThreshold) return unwrap<T>(runJob(job));
      return unwrap<T>((await piscina.run(job)) as JobResult);
    },
    async close() {
      await piscina?.destroy();
    },
  };
}

/** How big a request is, in lines (a spectrum counts a hundredth of its points). */
export function jobSize(body: { lines?: readonly unknown[]; spectrum?: { x: readonly unknown[] } }): number {
  return (body.lines?.length ?? 0) + Math.ceil((body.spectrum?.x.length ?? 0) / 100);
}

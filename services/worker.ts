import { ScienceError } from '../src/errors.js';
import type { Provenance } from './provenance.js';
import type { CheckRequest } from './schemas/checks.js';
import type { FitRequest } from './schemas/fit.js';
import type { PeaksRequest } from './schemas/peaks.js';
import { runCheck } from './usecases/check.js';
import { runFit } from './usecases/fit.js';
import { runPeaks } from './usecases/peaks.js';
import { runReport } from './usecases/report.js';

/** The use cases a worker thread runs; the request bodies arrive already validated. */
export type Job =
  | { kind: 'fit'; body: FitRequest }
  | { kind: 'check'; body: CheckRequest }
  | { kind: 'report'; body: CheckRequest; provenance?: Provenance }
  | { kind: 'peaks'; body: PeaksRequest };

export type JobResult =
  | { ok: true; value: unknown }
  | { ok: false; error: { code: string; message: string; details: Record<string, unknown> } };

export function runJob(job: Job): JobResult {
  try {
    switch (job.kind) {
      case 'fit':
        return { ok: true, value: runFit(job.body) };
      case 'check':
        return { ok: true, value: runCheck(job.body) };
      case 'report':
        return { ok: true, value: runReport(job.body, { ...(job.provenance ? { provenance: job.provenance } : {}) }) };
      case 'peaks':
        return { ok: true, value: runPeaks(job.body) };
    }
  } catch (e) {
    // Science errors cross the thread boundary as plain data and are rebuilt on the other side.
    if (e instanceof ScienceError)
      return { ok: false, error: { code: e.code, message: e.message, details: { ...e.details } } };
    throw e;
  }
}

export default runJob;

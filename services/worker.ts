import { ScienceError } from '../src/errors.js';
import type { Provenance } from './provenance.js';
import type { CheckRequest } from './schemas/checks.js';
import type { FitRequest } from './schemas/fit.js';
import type { PeaksRequest } from './schemas/peaks.js';
import type { PotentialRequest } from './schemas/potentials.js';
import type { PredictionRequest } from './schemas/predictions.js';
import { runCheck } from './usecases/check.js';
import { assertFinite, NonFiniteResult } from './usecases/finite.js';
import { runFit } from './usecases/fit.js';
import { runPeaks } from './usecases/peaks.js';
import { runPotential } from './usecases/potential.js';
import { runPrediction } from './usecases/predict.js';
import { runReport } from './usecases/report.js';

/** The use cases a worker thread runs; the request bodies arrive already validated. */
export type Job =
  | { kind: 'fit'; body: FitRequest }
  | { kind: 'check'; body: CheckRequest }
  | { kind: 'report'; body: CheckRequest; provenance?: Provenance }
  | { kind: 'peaks'; body: PeaksRequest }
  | { kind: 'predict'; body: PredictionRequest }
  | { kind: 'potential'; body: PotentialRequest };

export type JobResult =
  | { ok: true; value: unknown }
  | { ok: false; error: { code: string; message: string; details: Record<string, unknown> } }
  | { ok: false; nonFinite: { quantity: string; value: string } };

function run(job: Job): unknown {
  switch (job.kind) {
    case 'fit':
      return assertFinite(runFit(job.body));
    case 'check':
      return assertFinite(runCheck(job.body));
    case 'report':
      return runReport(job.body, { ...(job.provenance ? { provenance: job.provenance } : {}) });
    case 'peaks':
      return assertFinite(runPeaks(job.body));
    case 'predict':
      return assertFinite(runPrediction(job.body));
    case 'potential':
      return assertFinite(runPotential(job.body));
  }
}

export function runJob(job: Job): JobResult {
  try {
    return { ok: true, value: run(job) };
  } catch (e) {
    // Science errors cross the thread boundary as plain data and are rebuilt on the other side.
    if (e instanceof ScienceError)
      return { ok: false, error: { code: e.code, message: e.message, details: { ...e.details } } };
    if (e instanceof NonFiniteResult) return { ok: false, nonFinite: { quantity: e.quantity, value: e.value } };
    throw e;
  }
}

export default runJob;

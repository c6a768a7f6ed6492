import { move, transferableSymbol, valueSymbol } from 'piscina';
import type { z } from 'zod';
import { ScienceError } from '../src/errors.js';
import { cautionHeaders, prefersCsv, resultCsvAnswer, type TableName } from './formats/csv-tables.js';
import { withDetail } from './formats/respond.js';
import { withDisplay } from './formats/round.js';
import { jobSize } from './job-size.js';
import type { Provenance } from './provenance.js';
import { decodeBody, InvalidJsonBody, type Limits, NonFiniteLiteral } from './raw-body.js';
import { type CheckRequest, CheckResponseSchema, checkRequestSchema } from './schemas/checks.js';
import { type FitRequest, FitResponseSchema, fitRequestSchema } from './schemas/fit.js';
import { type PeaksRequest, type PeaksResponse, PeaksResponseSchema, parsePeaksRequest } from './schemas/peaks.js';
import {
  type PotentialRequest,
  type PotentialResponse,
  PotentialResponseSchema,
  potentialRequestSchema,
} from './schemas/potentials.js';
import type { PredictionRequest } from './schemas/predictions.js';
import { compiledSerializer } from './serializer.js';
import { runCheck } from './usecases/check.js';
import { assertFinite, NonFiniteResult } from './usecases/finite.js';
import { runFit } from './usecases/fit.js';
import { runPeaksInThreads } from './usecases/peaks.js';
import { runPotential } from './usecases/potential.js';
import { runPrediction } from './usecases/predict.js';
import { runReport } from './usecases/report.js';

/** The use cases a worker thread runs; the request bodies arrive already validated. */
export type Job =
  | { kind: 'fit'; body: FitRequest }
  | { kind: 'check'; body: CheckRequest }
  | { kind: 'report'; body: CheckRequest; provenance?: Provenance }
  | { kind: 'peaks'; body: PeaksRequest; peakThreads?: number }
  | { kind: 'predict'; body: PredictionRequest }
  | { kind: 'potential'; body: PotentialRequest }
  | RawJob;

/** A large body, as received: parsed, validated, run and serialised here (services/raw-body.ts). */
export interface RawJob {
  readonly kind: 'raw';
  readonly route: 'fit' | 'check' | 'report' | 'peaks' | 'potential';
  /** The body's bytes (a view on a SharedArrayBuffer: services/raw-body.ts). */
  readonly bytes: Uint8Array;
  readonly contentType: string;
  readonly query: Record<string, unknown>;
  readonly limits: Limits;
  /** Lines reserved for this body: a body with over 25 % more stops after parsing and answers { budget: lines }. */
  readonly reservedLines?: number;
  readonly provenance: Provenance;
  /** The request's Accept header: fits and checks answer CSV when it prefers text/csv (services/formats/). */
  readonly accept?: string;
  /** Threads for the group fits of a large spectrum (PEAK_THREADS); one when absent. */
  readonly peakThreads?: number;
}

/** What a raw job answers: the response body, already serialised and encoded (UTF-8). */
export interface RawAnswer {
  readonly body: Uint8Array;
  readonly type: string;
  /** The QA verdict, for the metrics. */
  readonly verdict?: string;
  /** Response headers beside the type (a CSV answer's cautions). */
  readonly headers?: Record<string, string>;
}

export type JobResult =
  | { ok: true; value: unknown }
  | { ok: false; error: { code: string; message: string; details: Record<string, unknown> } }
  | { ok: false; nonFinite: { quantity: string; value: string } }
  | { ok: false; budget: number; bytes?: Uint8Array }
  | { ok: false; invalidJson: string }
  | { ok: false; clientError: string }
  | { ok: false; validation: { path: string; message: string }[] };

class NeedsBudget extends Error {
  constructor(readonly lines: number) {
    super('more lines than reserved');
  }
}

class ValidationFailed extends Error {
  constructor(readonly issues: z.core.$ZodIssue[]) {
    super('validation failed');
  }
}

const requestSchemas = new Map<string, z.ZodType>();
function requestSchema(route: 'fit' | 'check' | 'report' | 'potential', maxLines: number): z.ZodType {
  const key = `${route}:${maxLines}`;
  let s = requestSchemas.get(key);
  if (!s) {
    s =
      route === 'fit'
        ? fitRequestSchema(maxLines)
        : route === 'potential'
          ? potentialRequestSchema(maxLines)
          : checkRequestSchema(maxLines);
    requestSchemas.set(key, s);
  }
  return s;
}

/** UTF-8 bytes in an ArrayBuffer of their own (so that it can be moved to the main thread, not copied). */
const utf8 = (text: string): Uint8Array => new TextEncoder().encode(text);

function runRaw(job: RawJob): RawAnswer | Promise<RawAnswer> {
  const decoded = decodeBody(job, job.limits);
  const parsed =
    job.route === 'peaks'
      ? parsePeaksRequest(decoded)
      : requestSchema(job.route, job.limits.maxLines).safeParse(decoded);
  if (!parsed.success) throw new ValidationFailed(parsed.error.issues);
  const body = withDetail(parsed.data as FitRequest & { sample?: object }, job.query);
  const size = jobSize(body as { lines?: readonly unknown[]; spectrum?: { x: readonly unknown[] } });
  // 25 % slack: a body of ~80-byte lines runs at once on its estimate; a compact one (bare positions, ~20 bytes a
  // line) stops here and runs again once its true size is reserved.
  if (job.reservedLines !== undefined && size > 1.25 * job.reservedLines) throw new NeedsBudget(size);
  if (job.route === 'report')
    return {
      body: utf8(runReport(body as CheckRequest, { provenance: job.provenance })),
      type: 'text/html; charset=utf-8',
    };
  if (job.route === 'peaks')
    return runPeaksInThreads(body as unknown as PeaksRequest, job.peakThreads ?? 1).then((r) =>
      rawAnswer(job, body, r),
    );
  if (job.route === 'potential') return rawAnswer(job, body, runPotential(body as unknown as PotentialRequest));
  return rawAnswer(job, body, job.route === 'fit' ? runFit(body) : runCheck(body as CheckRequest));
}

/** A raw job's result stamped, checked finite and serialised as the route answers it. */
function rawAnswer(
  job: RawJob,
  body: { sample?: object },
  result: ReturnType<typeof runFit> | ReturnType<typeof runCheck> | PeaksResponse | PotentialResponse,
): RawAnswer {
  const stamped = { ...assertFinite(result), ...(body.sample ? { sample: body.sample } : {}), ...job.provenance };
  const responseSchema: z.ZodType =
    job.route === 'fit'
      ? FitResponseSchema
      : job.route === 'check'
        ? CheckResponseSchema
        : job.route === 'potential'
          ? PotentialResponseSchema
          : PeaksResponseSchema;
  // CSV tables and rounded display strings are forms of fits and checks only, as for a small body.
  const tabular = job.route === 'fit' || job.route === 'check' || job.route === 'report';
  const verdict = 'verdict' in result ? { verdict: String(result.verdict) } : {};
  // The same forms as a small body gets (services/formats/respond.ts): CSV tables, or rounded display strings.
  if (tabular && prefersCsv(job.accept)) {
    const table = (job.query.table as TableName | undefined) ?? 'lines';
    const kind = job.route as 'fit' | 'check';
    return {
      body: utf8(resultCsvAnswer(kind, stamped as never, table, job.query.comments === 'true')),
      type: 'text/csv; charset=utf-8',
      headers: {
        'content-disposition': `inline; filename="${kind}-${table}.csv"`,
        ...cautionHeaders(kind, stamped as never),
      },
      ...verdict,
    };
  }
  const shown = tabular && job.query.display === 'rounded' ? withDisplay(stamped) : stamped;
  // Serialised as a small body's answer is (services/serializer.ts), without checking it against its schema.
  return { body: utf8(compiledSerializer(responseSchema)(shown)), type: 'application/json; charset=utf-8', ...verdict };
}

function run(job: Job): unknown {
  switch (job.kind) {
    case 'fit':
      return assertFinite(runFit(job.body));
    case 'check':
      return assertFinite(runCheck(job.body));
    case 'report':
      return runReport(job.body, { ...(job.provenance ? { provenance: job.provenance } : {}) });
    case 'peaks':
      return runPeaksInThreads(job.body, job.peakThreads ?? 1).then(assertFinite);
    case 'predict':
      return assertFinite(runPrediction(job.body));
    case 'potential':
      return assertFinite(runPotential(job.body));
    case 'raw':
      return runRaw(job);
  }
}

/** Runs a job; a large spectrum's peaks (group fits in threads) answer later, everything else at once. */
export function runJob(job: Job): JobResult | Promise<JobResult> {
  try {
    const value = run(job);
    return value instanceof Promise ? value.then(succeeded, failed) : succeeded(value);
  } catch (e) {
    return failed(e);
  }
}

const succeeded = (value: unknown): JobResult => ({ ok: true, value });

function failed(e: unknown): JobResult {
  // Science errors cross the thread boundary as plain data and are rebuilt on the other side.
  if (e instanceof ScienceError)
    return { ok: false, error: { code: e.code, message: e.message, details: { ...e.details } } };
  if (e instanceof NonFiniteResult) return { ok: false, nonFinite: { quantity: e.quantity, value: e.value } };
  if (e instanceof NeedsBudget) return { ok: false, budget: e.lines };
  if (e instanceof InvalidJsonBody) return { ok: false, invalidJson: e.message };
  if (e instanceof NonFiniteLiteral) return { ok: false, validation: [{ path: e.field, message: e.reason }] };
  if (e instanceof ValidationFailed)
    return {
      ok: false,
      validation: e.issues.map((i) => ({ path: i.path.map(String).join('/') || '(body)', message: i.message })),
    };
  // The parser's own 400s (nesting, a forbidden key) get the answer they get inline: a 100 000-deep body of
  // objects, large enough for a worker, was a VALIDATION_FAILED where the same depth of arrays, parsed inline, was
  // a BAD_REQUEST.
  if (e instanceof Error && (e as { statusCode?: number }).statusCode === 400)
    return { ok: false, clientError: e.message };
  throw e;
}

/**
 * The worker's entry: a raw job's answer bytes are moved (transferred) to the main thread instead of being
 * copied and deserialised there (bench/loop-pause.ts: a 100 000-line fit's answer of ~30 MB held the event loop
 * for 100 ms on arrival and 260 ms more when written to the socket as a string).
 */
export default async function runInWorker(job: Job): Promise<JobResult | ReturnType<typeof move>> {
  const r = await runJob(job);
  if (job.kind !== 'raw') return r;
  // A body that must wait for more budget goes back with its bytes (they were moved here) for the next run.
  if (!r.ok && 'budget' in r)
    return move({ [transferableSymbol]: job.bytes.buffer, [valueSymbol]: { ...r, bytes: job.bytes } });
  if (!r.ok) return r;
  const bytes = (r.value as RawAnswer).body;
  return move({ [transferableSymbol]: bytes.buffer, [valueSymbol]: r });
}

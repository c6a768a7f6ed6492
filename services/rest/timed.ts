import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import type { Config } from '../config.js';
import { NeedsBudget, overloaded, type RunOptions } from '../pool.js';
import { provenanceOf } from '../provenance.js';
import { RawBody } from '../raw-body.js';
import type { RawAnswer, RawJob } from '../worker.js';

/** Run a use case and record its duration and size in the metrics. */
export async function timed<T>(app: FastifyInstance, kind: string, size: number, f: () => Promise<T>): Promise<T> {
  const end = app.metrics.fitDuration.labels(kind).startTimer();
  app.metrics.fitLines.labels(kind).observe(size);
  try {
    return await f();
  } finally {
    end();
  }
}

/**
 * Options for the pool: a signal that aborts when the client goes away before its answer is written (the work for
 * it is stopped), and whether the request was admitted before its body was read (plugins/admission.ts).
 */
export function workOptions(req: FastifyRequest, reply: FastifyReply): RunOptions {
  const c = new AbortController();
  reply.raw.once('close', () => {
    if (!reply.raw.writableFinished) c.abort();
  });
  return { signal: c.signal, admitted: req.admittedLines !== undefined };
}

/**
 * Answer a large body (left unparsed by the body parser) from a worker that parses, validates, runs and serialises
 * it: true when it was answered (the handler then returns the reply), false when the body was parsed here as usual.
 * The answer arrives as UTF-8 bytes moved out of the worker, and is written as they are: neither decoding a string
 * of tens of MB from the worker's message nor encoding it for the socket happens on the event loop.
 * (A boolean, not the reply: a FastifyReply is a thenable, and awaiting it waits for the response to finish and
 * yields undefined.)
 */
export async function answerRawBody(
  app: FastifyInstance,
  config: Config,
  route: RawJob['route'],
  req: FastifyRequest,
  reply: FastifyReply,
): Promise<boolean> {
  if (!(req.body instanceof RawBody)) return false;
  const raw = req.body;
  const job: RawJob = {
    kind: 'raw',
    route,
    bytes: raw.bytes,
    contentType: raw.contentType,
    query: raw.query,
    limits: { maxLines: config.maxLines, maxPoints: config.maxPoints },
    provenance: provenanceOf(req),
    ...(req.headers.accept ? { accept: req.headers.accept } : {}),
    ...(route === 'peaks' ? { peakThreads: config.peakThreads } : {}),
  };
  // Admission reserved the Content-Length's estimate (or the pool reserves it now); the worker checks it against
  // the lines it parses and, when there are more, the rest is reserved before the job runs again.
  const estimate = req.admittedLines ?? Math.max(raw.size, config.workerThreshold);
  // The bytes move to the worker with the job (services/raw-body.ts); a job stopped for more budget sends them back.
  const run = (reservedLines: number, admitted: boolean, bytes: Uint8Array) =>
    timed(app, route, reservedLines, () =>
      app.pool.run<RawAnswer>({ ...job, bytes, reservedLines }, reservedLines, {
        ...workOptions(req, reply),
        admitted,
        transfer: [bytes.buffer as ArrayBuffer],
      }),
    );
  let a: RawAnswer;
  try {
    a = await run(estimate, req.admittedLines !== undefined, raw.bytes);
  } catch (e) {
    if (!(e instanceof NeedsBudget)) throw e;
    const bytes = e.bytes ?? raw.bytes;
    const held = req.admittedLines;
    if (held === undefined) a = await run(e.lines, false, bytes);
    else {
      const extra = e.lines - held;
      if (!app.pool.reserveMore(held, extra))
        throw overloaded(
          `${app.pool.activeLines} lines are being processed and this request adds ${e.lines}, more than its Content-Length suggested (MAX_ACTIVE_LINES ${config.maxActiveLines})`,
        );
      reply.raw.once('close', () => app.pool.release(extra));
      a = await run(e.lines, true, bytes);
    }
  }
  if (a.verdict) app.metrics.verdicts.labels(a.verdict).inc();
  if (a.headers) reply.headers(a.headers);
  reply.type(a.type).send(Buffer.from(a.body.buffer, a.body.byteOffset, a.body.byteLength));
  return true;
}

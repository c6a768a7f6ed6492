import { PassThrough, type Readable } from 'node:stream';
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Config } from '../config.js';
import { sendUnsupportedMediaType, toProblem } from '../errors.js';
import { jobSize } from '../pool.js';
import { stampedBytes } from '../provenance.js';
import { nonFiniteLiteral } from '../raw-body.js';
import { checkRequestSchema } from '../schemas/checks.js';
import { fitRequestSchema } from '../schemas/fit.js';
import { ndjsonLines } from './ndjson-lines.js';
import { timed } from './timed.js';

export const NDJSON = 'application/x-ndjson';

/**
 * POST /v1/batch/fits and /v1/batch/checks: NDJSON in (one request body a line), NDJSON out (one result a line,
 * in the same order), processed one at a time as the lines arrive, so that memory stays bounded however long
 * the archive. A line that fails carries its problem; the stream goes on.
 */
export const batchRoutes =
  (config: Config): FastifyPluginAsyncZod =>
  async (app) => {
    const kinds = {
      fits: { kind: 'fit', schema: fitRequestSchema(config.maxLines) },
      checks: { kind: 'check', schema: checkRequestSchema(config.maxLines) },
    } as const;
    for (const [path, { kind, schema }] of Object.entries(kinds)) {
      app.post(
        `/batch/${path}`,
        {
          // Only NDJSON: refused before any body is read (a JSON or text body would otherwise be parsed whole).
          onRequest: async (req, reply) => {
            if (
              String(req.headers['content-type'] ?? '')
                .split(';')[0]
                ?.trim()
                .toLowerCase() === NDJSON
            )
              return;
            return sendUnsupportedMediaType(reply, `send ${NDJSON}, one request a line`, req);
          },
          schema: {
            operationId: path === 'fits' ? 'fitBatch' : 'checkBatch',
            tags: ['batch'],
            summary: `Many ${path} as NDJSON`,
            description: `Send ${NDJSON}: one /v1/${path} request body a line. The answer streams one line per request, in order: {"index", "line", "status", "result"} or {"index", "line", "status", "problem"}, where line is the 1-based number of the input line (blank lines counted) and index = line − 1. Each line may be at most BODY_LIMIT bytes. When the service shuts down mid-batch it finishes the line in hand and ends with {"incomplete": true, "reason", "resumeFromLine", "resumeFromIndex"}: send the lines from there again.`,
            response: {
              200: { description: 'one result a line', content: { [NDJSON]: { schema: z.string() } } },
            },
          },
        },
        async (req, reply) => {
          const input = req.body as Readable;
          const out = new PassThrough();
          reply.type(NDJSON);
          const writeLine = async (obj: unknown) => {
            if (!out.write(`${JSON.stringify(obj)}\n`)) await new Promise((r) => out.once('drain', r));
          };
          (async () => {
            // index: the zero-based number of the input line, blank lines counted (so that a result points at its
            // line in the file: line = index + 1); blank lines themselves get no answer.
            let next = 0;
            for await (const piece of ndjsonLines(input, config.bodyLimit)) {
              const i = next++;
              const line = 'text' in piece ? piece.text.replace(/\r$/, '') : '';
              if ('text' in piece && line.trim() === '') continue;
              if (!app.appState.ready) {
                // Shutting down: no new line is started; the closing record says where to resume.
                await writeLine({
                  incomplete: true,
                  reason: 'the service is shutting down',
                  resumeFromLine: i + 1,
                  resumeFromIndex: i,
                });
                break;
              }
              const write = (o: { status: number; result?: unknown; problem?: unknown }) =>
                writeLine({ index: i, line: i + 1, ...o });
              try {
                if ('tooLong' in piece)
                  throw Object.assign(new Error(`line ${i} is longer than ${config.bodyLimit} bytes (BODY_LIMIT)`), {
                    statusCode: 413,
                    code: 'FST_ERR_CTP_BODY_TOO_LARGE',
                  });
                // A byte order mark opening the file (an editor's UTF-8 "with BOM") is skipped, as on the JSON routes; the
                // first record was answered 400 INVALID_JSON for it.
                const parsed = schema.safeParse(
                  JSON.parse(i === 0 && line.charCodeAt(0) === 0xfeff ? line.slice(1) : line),
                );
                if (!parsed.success) {
                  await write({
                    status: 400,
                    problem: {
                      type: '/problems/validation-failed',
                      title: 'Request does not match the schema',
                      status: 400,
                      code: 'VALIDATION_FAILED',
                      detail: parsed.error.issues
                        .slice(0, 3)
                        .map((x) => `${x.path.join('/') || '(body)'}: ${x.message}`)
                        .join('; '),
                      errors: parsed.error.issues.map((x) => ({ path: x.path.join('/'), message: x.message })),
                    },
                  });
                  continue;
                }
                const body = parsed.data;
                const result = await timed(app, kind, jobSize(body), () =>
                  app.pool.run({ kind, body } as never, jobSize(body)),
                );
                // Each result carries what a single request would: the software and the digest of its line.
                await write({ status: 200, result: stampedBytes(line, result as object, body.sample) });
              } catch (e) {
                // A line that is not JSON gets the code the single endpoints give a body that is not JSON.
                const p = toProblem(
                  e instanceof SyntaxError
                    ? (nonFiniteLiteral(line) ??
                        Object.assign(e, { statusCode: 400, code: 'FST_ERR_CTP_INVALID_JSON_BODY' }))
                    : e,
                  req,
                );
                if (p.status >= 500) req.log.error({ err: e, index: i }, 'batch line failed');
                await write({ status: p.status, problem: p });
              }
            }
            out.end();
          })().catch((e) => {
            req.log.error({ err: e }, 'batch stream failed');
            out.destroy(e as Error);
          });
          return reply.send(out as never);
        },
      );
    }
  };

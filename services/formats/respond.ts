import type { FastifyReply, FastifyRequest } from 'fastify';
import type { CheckResponse } from '../schemas/checks.js';
import type { FitResponse } from '../schemas/fit.js';
import { cautionHeaders, prefersCsv, resultCsvAnswer, type TableName } from './csv-tables.js';
import { withDisplay } from './round.js';

/**
 * The result of /v1/fits or /v1/checks in the form asked for: CSV when the Accept header prefers text/csv (the
 * table named by ?table=), otherwise JSON at full precision, with rounded `display` strings beside the numbers when
 * ?display=rounded.
 */
export function resultInForm<T extends FitResponse | CheckResponse>(
  req: FastifyRequest,
  reply: FastifyReply,
  kind: 'fit' | 'check',
  result: T,
): T | FastifyReply {
  const q = (req.query ?? {}) as { display?: string; table?: TableName; comments?: string };
  if (prefersCsv(req.headers.accept)) {
    const table = q.table ?? 'lines';
    return reply
      .type('text/csv; charset=utf-8')
      .header('content-disposition', `inline; filename="${kind}-${table}.csv"`)
      .headers(cautionHeaders(kind, result))
      .send(resultCsvAnswer(kind, result, table, q.comments === 'true'));
  }
  return q.display === 'rounded' ? withDisplay(result) : result;
}

/**
 * The body with `options.lean` set from ?detail= (lean: true, full: false) when the query gives it; unchanged
 * otherwise. JCAMP-DX and CSV bodies carry no options of their own, so the query is their way to ask.
 */
export function withDetail<T extends { options?: { lean?: boolean } }>(body: T, query: unknown): T {
  const detail = (query as { detail?: unknown } | undefined)?.detail;
  if (detail !== 'lean' && detail !== 'full') return body;
  return { ...body, options: { ...body.options, lean: detail === 'lean' } };
}

import type { FastifyInstance } from 'fastify';
import type { Config } from '../config.js';
import { problem, sendProblem } from '../errors.js';
import type { Pool } from '../pool.js';
import { RETRY_AFTER_S } from './shedding.js';

declare module 'fastify' {
  interface FastifyRequest {
    /** Lines reserved for this request at admission (estimated from Content-Length), when it is a large one. */
    admittedLines?: number;
  }
}

/** Bytes per line assumed when a size is estimated from Content-Length (a JSON line with an assignment). */
export const BYTES_PER_LINE = 100;

/**
 * Admission before the body is read: a request whose Content-Length says it is large (at least WORKER_THRESHOLD
 * lines at about 100 bytes a line) reserves its estimated lines of MAX_ACTIVE_LINES, or is answered 503 +
 * Retry-After without its body being parsed. The reservation is given back when the answer is written or the
 * client goes away. Small requests, NDJSON batches and GraphQL (admitted per computation by the pool) pass.
 */
export function admitBySize(scope: FastifyInstance, config: Config, pool: Pool): void {
  if (pool.threads === 0) return;
  scope.addHook('onRequest', async (request, reply) => {
    const length = Number(request.headers['content-length'] ?? 0);
    const lines = Math.ceil(length / BYTES_PER_LINE);
    if (!(lines >= config.workerThreshold)) return;
    if (String(request.headers['content-type'] ?? '').startsWith('application/x-ndjson')) return;
    // GraphQL bodies are bounded by SMALL_BODY_LIMIT, and each computation in them reserves its own size in the
    // pool: reserving the body's estimate here as well counted the same lines twice.
    if (request.routeOptions.url === '/graphql') return;
    if (!pool.reserve(lines)) {
      reply.header('retry-after', String(RETRY_AFTER_S));
      return sendProblem(
        reply,
        problem(
          'OVERLOADED',
          503,
          'Service overloaded',
          `${pool.activeLines} lines are being processed and this request adds about ${lines} (MAX_ACTIVE_LINES ${config.maxActiveLines}); retry in ${RETRY_AFTER_S} s`,
          request,
        ),
      );
    }
    request.admittedLines = lines;
    reply.raw.once('close', () => pool.release(lines));
  });
}

import type { FastifyInstance } from 'fastify';
import type { Config } from '../config.js';
import { HttpProblem } from '../errors.js';
import { NDJSON } from '../rest/batch.js';

/**
 * The request deadline for bodies: a body not received completely within REQUEST_TIMEOUT_MS of the request's start
 * is answered 408 problem+json and the connection is closed. Node's own requestTimeout answers only a request whose
 * headers are late (measured on Node 20: a client that sent its headers and then stalled mid-body held its request
 * and connection open indefinitely). NDJSON batches are streams read line by line while answers go out, and are
 * left to their own limits (services/rest/batch.ts).
 * Registered after the body hash (services/provenance.ts), so the stream it watches is the one the parsers read.
 */
export function limitBodyTime(app: FastifyInstance, config: Config): void {
  if (config.requestTimeoutMs <= 0) return;
  app.addHook('preParsing', async (request, reply, payload) => {
    if (String(request.headers['content-type'] ?? '').startsWith(NDJSON)) return payload;
    // Only a body can be late. A request without one (a GET) was armed too, and cleared only when its answer was
    // sent: a GET pipelined behind a request whose answer closed the connection (broken JSON: 400, connection
    // close) is never answered, and when its timer fired the body stream it destroyed had no reader listening for
    // the error: the process exited (measured: POST of "{bad" with GET /healthz in the same write, then dead
    // REQUEST_TIMEOUT_MS later).
    const hasBody =
      request.headers['transfer-encoding'] !== undefined || Number(request.headers['content-length'] ?? 0) > 0;
    if (!hasBody) return payload;
    const left = Math.max(0, config.requestTimeoutMs - reply.elapsedTime);
    const timer = setTimeout(() => {
      // Nobody waits for this body any more (connection gone, answer sent): nothing to answer, nothing to destroy.
      if (reply.sent || request.raw.destroyed || request.raw.socket?.destroyed) return;
      payload.destroy(
        new HttpProblem(
          'REQUEST_TIMEOUT',
          408,
          'Request Timeout',
          `the body was not received completely within REQUEST_TIMEOUT_MS (${config.requestTimeoutMs} ms)`,
          { connection: 'close' },
        ),
      );
    }, left);
    const clear = () => clearTimeout(timer);
    payload.once('end', clear);
    payload.once('close', clear);
    reply.raw.once('close', clear);
    // The request itself closes when its body has been received or its connection has gone.
    request.raw.once('close', clear);
    return payload;
  });
}

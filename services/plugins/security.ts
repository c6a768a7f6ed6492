import cors from '@fastify/cors';
import type { FastifyInstance } from 'fastify';
import helmet from 'helmet';
import type { Config } from '../config.js';

/**
 * Security headers and CORS. The page and the report carry inline scripts and styles of their own, nothing
 * external. CORS is closed unless origins are allowed explicitly.
 *
 * The headers are helmet's, from one middleware built at start-up and run on every response's raw response as
 * @fastify/helmet does (routes with a policy of their own replace headers after it: page/route.ts, plugins/docs.ts).
 * @fastify/helmet builds the middleware again for every request (its content-security-policy parsed and checked
 * each time: about 3 % of the CPU of a 60-line fit request); the headers are the same.
 * @see https://helmetjs.github.io/
 */
export async function secureHeaders(app: FastifyInstance, config: Config): Promise<void> {
  const headers = helmet({
    contentSecurityPolicy: {
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'", "'unsafe-inline'"],
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", 'data:'],
        frameSrc: ["'self'"],
        objectSrc: ["'none'"],
        baseUri: ["'none'"],
        frameAncestors: ["'self'"],
      },
    },
  });
  app.addHook('onRequest', (request, reply, done) => {
    headers(request.raw, reply.raw, (e?: unknown) => done(e instanceof Error ? e : undefined));
  });
  await app.register(cors, { origin: config.corsOrigins.length > 0 ? [...config.corsOrigins] : false });
}

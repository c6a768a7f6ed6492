import rateLimit from '@fastify/rate-limit';
import type { FastifyInstance } from 'fastify';
import type { Config } from '../config.js';
import { HttpProblem } from '../errors.js';
import type { KeyRing } from './api-keys.js';

/**
 * Requests per minute per client, on the protected scope only (probes and metrics are never limited). A client
 * is its API key when it presents a valid one, else its address: a made-up Authorization header does not buy a
 * fresh quota, and wrong keys are counted against the address (the limit runs before the key check). Behind a
 * proxy the address is the client's only when TRUST_PROXY says which hops to believe.
 * @see https://github.com/fastify/fastify-rate-limit
 */
export async function limitRate(scope: FastifyInstance, config: Config, keys: KeyRing): Promise<void> {
  if (config.rateLimitPerMinute <= 0) return;
  await scope.register(rateLimit, {
    global: false,
    max: config.rateLimitPerMinute,
    timeWindow: '1 minute',
    keyGenerator: (req) => {
      const key = keys.validKey(req);
      return key !== undefined ? `key:${key}` : `ip:${req.ip}`;
    },
    errorResponseBuilder: (_req, ctx) =>
      new HttpProblem(
        'RATE_LIMITED',
        429,
        'Too many requests',
        `more than ${ctx.max} requests a minute from this client; retry in ${Math.ceil(ctx.ttl / 1000)} s`,
      ),
  });
  scope.addHook('onRequest', scope.rateLimit());
}

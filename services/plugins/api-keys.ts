import { createHash, timingSafeEqual } from 'node:crypto';
import type { FastifyInstance, FastifyRequest } from 'fastify';
import type { Config } from '../config.js';
import { problem, sendProblem } from '../errors.js';

/**
 * Bearer API keys. The check is a hook of the protected scope (the /v1 routes and GraphQL), so it runs for every
 * route that scope matched, whatever spelling of the path reached it (percent-encoding, doubled slashes, an
 * absolute-form target): protection is decided by the router's match, never by comparing the raw URL.
 * @see https://fastify.dev/docs/latest/Reference/Encapsulation/
 */
export interface KeyRing {
  readonly enabled: boolean;
  /** The presented key's digest when it is one of the configured keys; undefined otherwise. */
  validKey(request: FastifyRequest): string | undefined;
}

const digestOf = (s: string) => createHash('sha256').update(s).digest();

export function keyRing(config: Config): KeyRing {
  const digests = config.apiKeys.map(digestOf);
  return {
    enabled: digests.length > 0,
    validKey(request) {
      if (digests.length === 0) return undefined;
      const m = /^Bearer\s+(\S+)$/i.exec(request.headers.authorization ?? '');
      if (!m) return undefined;
      const d = digestOf(m[1] as string);
      // Constant time: every configured key is compared, whatever matched.
      let ok = false;
      for (const k of digests) ok = timingSafeEqual(d, k) || ok;
      return ok ? d.toString('hex').slice(0, 16) : undefined;
    },
  };
}

/** Adds the key check to the scope it is called on (not wrapped in fastify-plugin on purpose). */
export function requireApiKey(scope: FastifyInstance, keys: KeyRing): void {
  if (!keys.enabled) return;
  scope.addHook('onRequest', async (request, reply) => {
    if (keys.validKey(request) !== undefined) return;
    reply.header('www-authenticate', 'Bearer realm="branchwise"');
    return sendProblem(
      reply,
      problem(
        'UNAUTHORIZED',
        401,
        'Authentication required',
        'send a valid API key as "Authorization: Bearer <key>"',
        request,
      ),
    );
  });
}

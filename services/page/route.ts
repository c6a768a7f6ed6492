import type { FastifyInstance } from 'fastify';
import type { Config } from '../config.js';
import { PAGE_POLICY, renderPage } from './index.js';

/**
 * GET /: the page, open like the probes (no key, no rate limit), with its own security policy. The general policy's
 * upgrade-insecure-requests would send the page's fetch to https on a lab network served over plain HTTP, and
 * cross-origin-opener-policy is refused (with a console error) on an http origin other than localhost.
 */
export function pageRoute(app: FastifyInstance, config: Config): void {
  const page = renderPage({ keysRequired: config.apiKeys.length > 0 });
  app.get('/', { schema: { hide: true } }, async (_req, reply) => {
    // helmet writes its headers on the raw response; these replace them for this route only.
    reply.raw.removeHeader('cross-origin-opener-policy');
    reply.raw.setHeader('content-security-policy', PAGE_POLICY);
    return reply.type('text/html; charset=utf-8').send(page);
  });
}

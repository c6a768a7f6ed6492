import swaggerUi from '@fastify/swagger-ui';
import type { FastifyInstance } from 'fastify';

/** Where the human-readable documentation of the OpenAPI document is served. */
export const DOCS_PATH = '/docs';

/**
 * The documentation page's Content-Security-Policy: its scripts and styles come from this service only (no CDN),
 * and, unlike the general policy, no `upgrade-insecure-requests`, which would send the page's own requests to https
 * on a lab network served over plain HTTP.
 */
export const DOCS_POLICY = [
  "default-src 'self'",
  "script-src 'self'",
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data:",
  "connect-src 'self'",
  "font-src 'self' data:",
  "base-uri 'none'",
  "form-action 'self'",
  "frame-ancestors 'self'",
  "object-src 'none'",
].join('; ');

/**
 * The OpenAPI document as a readable, browsable page at /docs/ (and /docs/json, /docs/yaml). Everything it needs is
 * served from the installed package: no CDN, works offline. Requires @fastify/swagger to be registered first.
 */
export async function docsPage(app: FastifyInstance): Promise<void> {
  await app.register(async (scope) => {
    scope.addHook('onRequest', async (_req, reply) => {
      // helmet wrote the general headers on the raw response already; these replace them for the docs only.
      reply.raw.removeHeader('cross-origin-opener-policy');
      reply.raw.setHeader('content-security-policy', DOCS_POLICY);
    });
    await scope.register(swaggerUi, {
      routePrefix: DOCS_PATH,
      uiConfig: { docExpansion: 'list', deepLinking: true, tryItOutEnabled: false, defaultModelsExpandDepth: 1 },
      staticCSP: false,
    });
  });
}

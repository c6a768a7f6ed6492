import swaggerUi from '@fastify/swagger-ui';
import type { FastifyInstance } from 'fastify';

/** Where the human-readable documentation of the OpenAPI document is served. */
export const DOCS_PATH = '/docs';

/**
 * The OpenAPI document as a readable, browsable page at /docs (and /docs/json, /docs/yaml). Everything it needs is
 * served from the installed package: no CDN, works offline. Requires @fastify/swagger to be registered first.
 */
export async function docsPage(app: FastifyInstance): Promise<void> {
  await app.register(swaggerUi, {
    routePrefix: DOCS_PATH,
    uiConfig: { docExpansion: 'list', deepLinking: true, tryItOutEnabled: false, defaultModelsExpandDepth: 1 },
    // The UI fetches the document from this same service.
    staticCSP: false,
  });
}

import type { FastifyInstance } from 'fastify';
import { PROBLEM_DESCRIPTIONS } from '../errors.js';

/**
 * The open routes (the page is services/page/route.ts): liveness and readiness probes, the OpenAPI document, metrics and the problem-type
 * pages. None of them needs a key, none is rate limited or shed: a busy instance must still say it is alive.
 */
export function openRoutes(app: FastifyInstance): void {
  app.get('/healthz', { schema: { hide: true } }, async () => ({ status: 'ok' }));
  app.get('/readyz', { schema: { hide: true } }, async (_req, reply) => {
    if (!app.appState.ready) return reply.status(503).send({ status: 'shutting down' });
    return { status: 'ready' };
  });
  app.get('/openapi.json', { schema: { hide: true } }, async () => app.swagger());
  app.get('/metrics', { schema: { hide: true } }, async (_req, reply) =>
    reply.type(app.metrics.registry.contentType).send(await app.metrics.registry.metrics()),
  );
  app.get<{ Params: { slug: string } }>('/problems/:slug', { schema: { hide: true } }, async (req, reply) => {
    const text = PROBLEM_DESCRIPTIONS[req.params.slug];
    if (!text) return reply.callNotFound();
    return reply.type('text/plain; charset=utf-8').send(`${req.params.slug}: ${text}\n`);
  });
}

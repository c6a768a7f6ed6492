import { randomUUID } from 'node:crypto';
import swagger from '@fastify/swagger';
import Fastify, { type FastifyInstance, type FastifyServerOptions } from 'fastify';
import {
  jsonSchemaTransform,
  jsonSchemaTransformObject,
  serializerCompiler,
  validatorCompiler,
} from 'fastify-type-provider-zod';
import mercurius from 'mercurius';
import { type Config, DEFAULT_CONFIG } from './config.js';
import { PROBLEM_DESCRIPTIONS, problemType, sendProblem, toProblem } from './errors.js';
import { resolvers } from './graphql/resolvers.js';
import { typeDefs } from './graphql/schema.js';
import { openapiInfo } from './openapi-info.js';
import { PAGE } from './page/index.js';
import { checkRoutes } from './rest/checks.js';
import { fitRoutes } from './rest/fits.js';
import { peakRoutes } from './rest/peaks.js';
import { reportRoutes } from './rest/reports.js';
import { speciesRoutes } from './rest/species.js';
import { CSV_TYPES, JCAMP_TYPES, textBodyToJson } from './text-bodies.js';

/** Deepest JSON nesting accepted; the contract's bodies need 4 levels. */
export const MAX_JSON_DEPTH = 32;

export interface AppOptions {
  readonly config?: Config;
  readonly logger?: FastifyServerOptions['logger'];
}

export interface AppState {
  /** False once shutdown has begun: /readyz then answers 503 so that load balancers stop sending work. */
  ready: boolean;
}

declare module 'fastify' {
  interface FastifyInstance {
    appState: AppState;
  }
}

function jsonDepth(value: unknown): number {
  let max = 0;
  const stack: [unknown, number][] = [[value, 1]];
  while (stack.length > 0) {
    const [v, d] = stack.pop() as [unknown, number];
    if (v === null || typeof v !== 'object') continue;
    if (d > max) max = d;
    if (max > MAX_JSON_DEPTH) return max;
    for (const x of Array.isArray(v) ? v : Object.values(v as object)) stack.push([x, d + 1]);
  }
  return max;
}

/**
 * The application as a plugin-style factory: tests build it and call `inject` without a port; server.ts listens.
 * @see https://fastify.dev/docs/latest/Reference/Server/
 */
export async function buildApp(options: AppOptions = {}): Promise<FastifyInstance> {
  const config = options.config ?? DEFAULT_CONFIG;
  const app = Fastify({
    logger: options.logger ?? false,
    bodyLimit: config.bodyLimit,
    onProtoPoisoning: 'error',
    onConstructorPoisoning: 'error',
    requestIdHeader: 'x-request-id',
    genReqId: () => randomUUID(),
    ajv: { customOptions: { strict: false } },
  });
  app.decorate('appState', { ready: true });

  // JSON with a nesting limit: fastify's secure parser (prototype poisoning refused), then an iterative depth check.
  const defaultJson = app.getDefaultJsonParser('error', 'error');
  app.addContentTypeParser('application/json', { parseAs: 'string' }, (req, body, done) => {
    defaultJson(req, body as string, (err: Error | null, parsed?: unknown) => {
      if (err) return done(err, undefined);
      if (jsonDepth(parsed) > MAX_JSON_DEPTH) {
        const e = Object.assign(new Error(`JSON nested deeper than ${MAX_JSON_DEPTH} levels`), { statusCode: 400 });
        return done(e, undefined);
      }
      done(null, parsed);
    });
  });

  // JCAMP-DX and CSV bodies become the JSON body of the same endpoint (query string: species, temperature).
  app.addContentTypeParser([...JCAMP_TYPES, ...CSV_TYPES], { parseAs: 'string' }, (req, body, done) => {
    try {
      done(
        null,
        textBodyToJson(String(req.headers['content-type'] ?? ''), body as string, req.query as Record<string, unknown>),
      );
    } catch (e) {
      done(e as Error, undefined);
    }
  });

  app.addHook('onSend', async (request, reply) => {
    reply.header('x-request-id', request.id);
  });

  app.setErrorHandler((error, request, reply) => {
    const p = toProblem(error, request);
    if (p.status >= 500) request.log.error({ err: error }, 'request failed');
    else request.log.info({ code: p.code, status: p.status }, 'request refused');
    return sendProblem(reply, p);
  });
  app.setNotFoundHandler((request, reply) =>
    sendProblem(reply, {
      type: problemType('NOT_FOUND'),
      title: 'Not found',
      status: 404,
      detail: `no route ${request.method} ${request.url.split('?')[0]}`,
      instance: request.url,
      code: 'NOT_FOUND',
    }),
  );

  await app.register(swagger, {
    openapi: openapiInfo,
    // Only zod-described routes belong in the document (STACK.md G4: the transform throws on others).
    transform: (d) => {
      const s = d.schema as Record<string, unknown> | undefined;
      const zodDescribed = s?.body !== undefined || s?.params !== undefined || s?.response !== undefined;
      const isZod = (x: unknown) => typeof x === 'object' && x !== null && '_zod' in x;
      if (
        !s ||
        s.hide ||
        !zodDescribed ||
        ![s.body, s.params, s.querystring].every((x) => x === undefined || isZod(x))
      ) {
        return { schema: { hide: true }, url: d.url };
      }
      return jsonSchemaTransform(d);
    },
    transformObject: jsonSchemaTransformObject,
  });

  app.get('/', { schema: { hide: true } }, async (_req, reply) => reply.type('text/html; charset=utf-8').send(PAGE));
  app.get('/healthz', { schema: { hide: true } }, async () => ({ status: 'ok' }));
  app.get('/readyz', { schema: { hide: true } }, async (_req, reply) => {
    if (!app.appState.ready) return reply.status(503).send({ status: 'shutting down' });
    return { status: 'ready' };
  });
  app.get('/openapi.json', { schema: { hide: true } }, async () => app.swagger());
  app.get<{ Params: { slug: string } }>('/problems/:slug', { schema: { hide: true } }, async (req, reply) => {
    const text = PROBLEM_DESCRIPTIONS[req.params.slug];
    if (!text) return reply.callNotFound();
    return reply.type('text/plain; charset=utf-8').send(`${req.params.slug}: ${text}\n`);
  });

  // The zod-validated REST routes live in their own encapsulated scope (STACK.md G3).
  await app.register(
    async (scope) => {
      scope.setValidatorCompiler(validatorCompiler);
      scope.setSerializerCompiler(serializerCompiler);
      await scope.register(fitRoutes(config));
      await scope.register(checkRoutes(config));
      await scope.register(peakRoutes);
      await scope.register(reportRoutes(config));
      await scope.register(speciesRoutes);
    },
    { prefix: '/v1' },
  );

  await app.register(mercurius, {
    schema: typeDefs,
    resolvers: resolvers(config) as never,
    graphiql: false,
    queryDepth: 12,
  });

  return app;
}

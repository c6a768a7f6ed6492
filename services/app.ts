import { createHash, randomUUID, timingSafeEqual } from 'node:crypto';
import cors from '@fastify/cors';
import helmet from '@fastify/helmet';
import rateLimit from '@fastify/rate-limit';
import swagger from '@fastify/swagger';
import underPressure from '@fastify/under-pressure';
import Fastify, {
  type FastifyInstance,
  type FastifyReply,
  type FastifyRequest,
  type FastifyServerOptions,
} from 'fastify';
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
import { createMetrics, type Metrics } from './metrics.js';
import { openapiInfo } from './openapi-info.js';
import { PAGE } from './page/index.js';
import { createPool, type Pool } from './pool.js';
import { batchRoutes, NDJSON } from './rest/batch.js';
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
    pool: Pool;
    metrics: Metrics;
  }
}

/** Constant-time comparison of a presented key with the configured ones (SHA-256 digests of equal length). */
function keyMatches(presented: string, keys: readonly Buffer[]): boolean {
  const digest = createHash('sha256').update(presented).digest();
  let ok = false;
  for (const k of keys) ok = timingSafeEqual(digest, k) || ok;
  return ok;
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
    requestTimeout: config.requestTimeoutMs,
  });
  app.decorate('appState', { ready: true });
  app.decorate('pool', createPool(config));
  app.decorate('metrics', createMetrics());
  app.addHook('onClose', async () => {
    await app.pool.close();
  });

  // Security headers. The page and the report carry inline scripts and styles of their own, nothing external.
  await app.register(helmet, {
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
  // CORS is closed unless origins are allowed explicitly.
  await app.register(cors, { origin: config.corsOrigins.length > 0 ? [...config.corsOrigins] : false });

  // Optional bearer authentication on the work routes; probes, metrics, the page and the document stay open.
  const keyDigests = config.apiKeys.map((k) => createHash('sha256').update(k).digest());
  const open = (url: string) => !url.startsWith('/v1/') && !url.startsWith('/graphql');
  if (keyDigests.length > 0) {
    app.addHook('onRequest', async (request, reply) => {
      if (open(request.url)) return;
      const h = request.headers.authorization ?? '';
      const m = /^Bearer\s+(\S+)$/i.exec(h);
      if (!m || !keyMatches(m[1] as string, keyDigests)) {
        reply.header('www-authenticate', 'Bearer realm="branchwise"');
        return sendProblem(reply, {
          type: problemType('UNAUTHORIZED'),
          title: 'Authentication required',
          status: 401,
          detail: 'send a valid API key as "Authorization: Bearer <key>"',
          instance: request.url,
          code: 'UNAUTHORIZED',
        });
      }
    });
  }
  if (config.rateLimitPerMinute > 0) {
    await app.register(rateLimit, {
      max: config.rateLimitPerMinute,
      timeWindow: '1 minute',
      allowList: (req) => open(req.url),
      // Per API key when one is sent (hashed, never logged), else per address.
      keyGenerator: (req) => {
        const h = req.headers.authorization;
        return h ? createHash('sha256').update(h).digest('hex').slice(0, 16) : req.ip;
      },
      errorResponseBuilder: (req, ctx) => ({
        type: problemType('RATE_LIMITED'),
        title: 'Too many requests',
        status: 429,
        statusCode: 429,
        detail: `more than ${ctx.max} requests a minute; retry in ${Math.ceil(ctx.ttl / 1000)} s`,
        instance: req.url,
        code: 'RATE_LIMITED',
      }),
    });
  }
  if (config.maxEventLoopDelayMs > 0 || config.maxHeapUsedBytes > 0) {
    await app.register(underPressure, {
      ...(config.maxEventLoopDelayMs > 0 ? { maxEventLoopDelay: config.maxEventLoopDelayMs } : {}),
      ...(config.maxHeapUsedBytes > 0 ? { maxHeapUsedBytes: config.maxHeapUsedBytes } : {}),
      sampleInterval: 50,
      retryAfter: 10,
      exposeStatusRoute: false,
      // Probes and metrics keep answering under pressure (a busy instance is not a dead one); work is shed.
      pressureHandler: ((req: FastifyRequest, reply: FastifyReply, type: string, value: number | undefined) => {
        if (open(req.url)) return undefined;
        reply.status(503).header('retry-after', '10').type('application/problem+json');
        return {
          type: problemType('OVERLOADED'),
          title: 'Service overloaded',
          status: 503,
          detail: `the service is shedding load (${type}${value !== undefined ? ` ${Math.round(Number(value))}` : ''}); retry in 10 s`,
          instance: req.url,
          code: 'OVERLOADED',
        };
      }) as never,
    });
  }

  // Request metrics by route template (bounded labels).
  app.addHook('onResponse', async (request, reply) => {
    app.metrics.requestDuration
      .labels(request.routeOptions.url ?? 'unmatched', request.method, `${Math.floor(reply.statusCode / 100)}xx`)
      .observe(reply.elapsedTime / 1000);
  });

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

  // NDJSON batches are read as a stream by their route, line by line.
  app.addContentTypeParser(NDJSON, (_req, payload, done) => done(null, payload));

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
  app.get('/metrics', { schema: { hide: true } }, async (_req, reply) =>
    reply.type(app.metrics.registry.contentType).send(await app.metrics.registry.metrics()),
  );
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
      await scope.register(peakRoutes(config));
      await scope.register(reportRoutes(config));
      await scope.register(batchRoutes(config));
      await scope.register(speciesRoutes);
    },
    { prefix: '/v1' },
  );

  // GraphQL: depth-limited, no batching, bounded query text.
  app.addHook('preValidation', async (request, reply) => {
    if (!request.url.startsWith('/graphql') || request.method !== 'POST') return;
    const body = request.body as { query?: unknown } | unknown[] | undefined;
    const text = Array.isArray(body) ? '' : typeof body?.query === 'string' ? body.query : '';
    if (Array.isArray(body) || text.length > 20_000) {
      return sendProblem(reply, {
        type: problemType('GRAPHQL_REFUSED'),
        title: 'GraphQL request refused',
        status: 400,
        detail: Array.isArray(body)
          ? 'batched queries are not accepted'
          : 'the query text is longer than 20 000 characters',
        instance: request.url,
        code: 'GRAPHQL_REFUSED',
      });
    }
  });
  await app.register(mercurius, {
    schema: typeDefs,
    resolvers: resolvers(config, app) as never,
    graphiql: false,
    queryDepth: 12,
    allowBatchedQueries: false,
  });

  return app;
}

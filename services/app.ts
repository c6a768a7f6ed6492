import { randomUUID } from 'node:crypto';
import swagger from '@fastify/swagger';
import Fastify, { type FastifyInstance, type FastifyServerOptions } from 'fastify';
import {
  jsonSchemaTransform,
  jsonSchemaTransformObject,
  serializerCompiler,
  validatorCompiler,
} from 'fastify-type-provider-zod';
import { type Config, DEFAULT_CONFIG } from './config.js';
import { sendProblem, toProblem } from './errors.js';
import { createMetrics, type Metrics } from './metrics.js';
import { finishDocument } from './openapi/finish.js';
import { openapiInfo, PACKAGE_VERSION } from './openapi-info.js';
import { pageRoute } from './page/route.js';
import { admitBySize } from './plugins/admission.js';
import { keyRing, requireApiKey } from './plugins/api-keys.js';
import { limitBodyTime } from './plugins/body-deadline.js';
import { parseBodies } from './plugins/body-parsers.js';
import { docsPage } from './plugins/docs.js';
import { graphqlRoutes } from './plugins/graphql.js';
import { openRoutes } from './plugins/probes.js';
import { answerProtocolEdges, answerWithProblems, clientErrorHandler, requireHost } from './plugins/problems.js';
import { limitRate } from './plugins/rate-limit.js';
import { secureHeaders } from './plugins/security.js';
import { shedLoad, watchEventLoop } from './plugins/shedding.js';
import { createPool, type Pool } from './pool.js';
import { hashRequestBodies } from './provenance.js';
import { RawBody } from './raw-body.js';
import { batchRoutes } from './rest/batch.js';
import { checkRoutes } from './rest/checks.js';
import { fitRoutes } from './rest/fits.js';
import { peakRoutes } from './rest/peaks.js';
import { potentialRoutes } from './rest/potentials.js';
import { reportRoutes } from './rest/reports.js';
import { speciesRoutes } from './rest/species.js';
import type { fitRequestSchema } from './schemas/fit.js';
import { quickFitRequest } from './schemas/fit-quick.js';
import { quickPeaksRequest } from './schemas/peaks.js';
import { compiledSerializerCompiler } from './serializer.js';

export { MAX_JSON_DEPTH } from './plugins/body-parsers.js';

/** What a caller's X-Request-Id may be to be used as the request's id. */
const REQUEST_ID = /^[A-Za-z0-9._:-]{1,128}$/;

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

/**
 * The application as a plugin-style factory: tests build it and call `inject` without a port; server.ts listens.
 * Each cross-cutting concern is a function in services/plugins/; this one only puts them in order. The work
 * routes (/v1 and GraphQL) live in one encapsulated scope that holds their protection (rate limit, keys,
 * shedding): whatever path spelling the router matched, the route's scope decides.
 * @see https://fastify.dev/docs/latest/Reference/Server/
 */
export async function buildApp(options: AppOptions = {}): Promise<FastifyInstance> {
  const config = options.config ?? DEFAULT_CONFIG;
  const app = Fastify({
    logger: options.logger ?? false,
    bodyLimit: config.bodyLimit,
    onProtoPoisoning: 'error',
    onConstructorPoisoning: 'error',
    // A caller's X-Request-Id is taken when it looks like an id (1–128 of A–Z a–z 0–9 . _ : -); anything else gets a
    // fresh one: a 10 000-character or markup value was echoed in the response header and written to every log line.
    requestIdHeader: false,
    genReqId: (req) => {
      const given = req.headers['x-request-id'];
      return typeof given === 'string' && REQUEST_ID.test(given) ? given : randomUUID();
    },
    ajv: { customOptions: { strict: false } },
    requestTimeout: config.requestTimeoutMs,
    // A request that reached the server on an open connection while it closes is served (within the grace period),
    // not refused with fastify's bare 503: behind nginx that 503 went to the client (docker/loopback-check.sh, 1 in
    // ~300 requests when an instance was stopped). New connections are refused once closing; see the onSend hook.
    return503OnClosing: false,
    // Node checks the request timeout every connectionsCheckingInterval (30 s by default): a tenth of the timeout
    // keeps the 408 within REQUEST_TIMEOUT_MS + 10 % instead of up to 30 s late.
    // Node's own Host check answers a bare 400 with no body: turned off here, answered as a problem by requireHost.
    http: {
      requireHostHeader: false,
      ...(config.requestTimeoutMs > 0
        ? { connectionsCheckingInterval: Math.min(30_000, Math.max(100, Math.round(config.requestTimeoutMs / 10))) }
        : {}),
    },
    clientErrorHandler,
    // The router's own refusals (a malformed URL, a parameter over maxParamLength) as problems too.
    frameworkErrors: (error, request, reply) => {
      sendProblem(reply, toProblem(error, request));
    },
    trustProxy:
      typeof config.trustProxy === 'number'
        ? (
            (hops: number) => (_addr: string, i: number) =>
              i < hops
          )(config.trustProxy)
        : config.trustProxy,
  });
  answerProtocolEdges(app.server);
  requireHost(app);
  app.decorate('appState', { ready: true });
  app.decorate('pool', createPool(config));
  app.decorate('metrics', createMetrics(config));
  const signals = watchEventLoop();
  app.addHook('onClose', async () => {
    signals.stop();
    await app.pool.close();
  });

  answerWithProblems(app);
  await secureHeaders(app, config);

  // Request metrics by route template (bounded labels).
  app.addHook('onResponse', async (request, reply) => {
    app.metrics.requestDuration
      .labels(request.routeOptions.url ?? 'unmatched', request.method, `${Math.floor(reply.statusCode / 100)}xx`)
      .observe(reply.elapsedTime / 1000);
  });
  app.addHook('onSend', async (request, reply) => {
    reply.header('x-request-id', request.id);
    // Shutting down: no keep-alive. A proxy would otherwise send its next request on this connection and get the
    // 503 fastify gives requests that reach a closing server; a new connection is refused instead, which nginx
    // retries on another replica (proxy_next_upstream error). Measured with docker/loopback-check.sh.
    if (!app.appState.ready) reply.header('connection', 'close');
  });

  parseBodies(app, config);
  // The SHA-256 of every body as received, for the provenance of each response.
  hashRequestBodies(app);
  // A body that is not received within REQUEST_TIMEOUT_MS: 408 (after the hash, so it watches the parsers' stream).
  limitBodyTime(app, config);

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
    // What the zod schemas cannot say (text bodies, protections, probes, examples): services/openapi/finish.ts.
    transformObject: (d) => finishDocument(jsonSchemaTransformObject(d), PACKAGE_VERSION),
  });

  await docsPage(app);
  openRoutes(app);
  pageRoute(app, config);

  // The protected scope: rate limit first (so that wrong keys are counted), then keys, then shedding.
  const keys = keyRing(config);
  await app.register(async (work) => {
    await limitRate(work, config, keys);
    requireApiKey(work, keys);
    shedLoad(work, config, signals, () => app.pool.queued);
    admitBySize(work, config, app.pool);
    // The zod-validated REST routes live in their own encapsulated scope (STACK.md G3).
    await work.register(
      async (v1) => {
        // A large body left unparsed (RawBody) is validated by the worker that parses it.
        // A spectrum's two long arrays are checked by a loop, not element by element by zod (schemas/peaks.ts).
        v1.setValidatorCompiler((route) => {
          const validate = validatorCompiler(route as Parameters<typeof validatorCompiler>[0]);
          const peaksBody = route.httpPart === 'body' && route.url.endsWith('/peaks');
          // A fit request's lines of the commonest form are checked by a loop (schemas/fit-quick.ts).
          const fitsBody = route.httpPart === 'body' && route.url === '/v1/fits';
          const fitSchema = fitsBody ? (route.schema as ReturnType<typeof fitRequestSchema>) : undefined;
          return (data: unknown) => {
            if (data instanceof RawBody) return { value: data };
            const quick = peaksBody
              ? quickPeaksRequest(data)
              : fitSchema
                ? quickFitRequest(data, config.maxLines, fitSchema)
                : undefined;
            return quick ? { value: quick } : validate(data);
          };
        });
        v1.setSerializerCompiler(config.validateResponses ? serializerCompiler : compiledSerializerCompiler);
        await v1.register(fitRoutes(config));
        await v1.register(checkRoutes(config));
        await v1.register(peakRoutes(config));
        await v1.register(reportRoutes(config));
        await v1.register(batchRoutes(config));
        await v1.register(speciesRoutes);
        await v1.register(potentialRoutes(config));
      },
      { prefix: '/v1' },
    );
    await graphqlRoutes(work, config, app);
  });

  return app;
}

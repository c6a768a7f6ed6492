import { buildApp } from './app.js';
import { loadConfig } from './config.js';
import { CheckResponseSchema } from './schemas/checks.js';
import { FitResponseSchema } from './schemas/fit.js';
import { PeaksResponseSchema } from './schemas/peaks.js';
import { warmSerializers } from './serializer.js';
import { shutdownOnSignals } from './shutdown.js';

/**
 * Listen, and close gracefully on SIGINT/SIGTERM (services/shutdown.ts): readiness turns false first, in-flight
 * requests finish, then the process exits. A second signal, or SHUTDOWN_GRACE_MS without closing, forces the exit.
 */
const config = loadConfig();
const app = await buildApp({
  config,
  logger: {
    level: config.logLevel,
    redact: { paths: ['req.headers.authorization', 'req.headers.cookie', 'req.headers["x-api-key"]'], remove: true },
  },
});

const shutdown = shutdownOnSignals(app, config.shutdownGraceMs);
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));

// Worker threads start before the port opens: /readyz is true only once large work can run without delay.
await app.pool.warm();
// The serialisers of the main answers compiled now (~0.15 s of CPU), not during the first request that needs them.
warmSerializers([FitResponseSchema, CheckResponseSchema, PeaksResponseSchema]);
await app.listen({ host: config.host, port: config.port });
{
  // Where to go next, in one line: the service, its page and its documentation.
  const address = app.server.address();
  const port = typeof address === 'object' && address ? address.port : config.port;
  const host = ['0.0.0.0', '::'].includes(config.host)
    ? 'localhost'
    : config.host.includes(':')
      ? `[${config.host}]`
      : config.host;
  const base = `http://${host}:${port}`;
  app.log.info(
    { url: base, page: `${base}/`, docs: `${base}/docs/`, openapi: `${base}/openapi.json` },
    `branchwise listening on ${base} (page ${base}/, documentation ${base}/docs/)`,
  );
}

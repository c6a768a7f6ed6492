import { buildApp } from './app.js';
import { loadConfig } from './config.js';

/**
 * Listen, and close gracefully on SIGINT/SIGTERM: readiness turns false first, in-flight requests finish, then
 * the process exits. A second signal, or 10 s without closing, forces the exit.
 */
const config = loadConfig();
const app = await buildApp({
  config,
  logger: {
    level: config.logLevel,
    redact: { paths: ['req.headers.authorization', 'req.headers.cookie', 'req.headers["x-api-key"]'], remove: true },
  },
});

let closing = false;
async function shutdown(signal: string): Promise<void> {
  if (closing) process.exit(1);
  closing = true;
  app.appState.ready = false;
  app.log.info({ signal }, 'shutting down');
  const timer = setTimeout(() => process.exit(1), 10_000);
  timer.unref();
  await app.close();
  process.exit(0);
}
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));

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

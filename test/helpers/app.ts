import type { AddressInfo } from 'node:net';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll } from 'vitest';
import { buildApp } from '../../services/app.js';
import { DEFAULT_CONFIG } from '../../services/config.js';

/** Build the app once per test file, without a port; close it afterwards. */
export function useApp(): () => FastifyInstance {
  let app: FastifyInstance | undefined;
  beforeAll(async () => {
    app = await buildApp();
    await app.ready();
  });
  afterAll(async () => {
    await app?.close();
  });
  return () => app as FastifyInstance;
}

/**
 * The app with the defaults of `npm start`, listening on a free port of 127.0.0.1 for the file's tests (real sockets,
 * for what inject cannot send); closed afterwards. `port()` is valid inside tests.
 */
export function useListeningApp(): { app: () => FastifyInstance; port: () => number } {
  let app: FastifyInstance | undefined;
  let port = 0;
  beforeAll(async () => {
    app = await buildApp({ config: DEFAULT_CONFIG });
    await app.listen({ host: '127.0.0.1', port: 0 });
    port = (app.server.address() as AddressInfo).port;
  });
  afterAll(async () => {
    await app?.close();
  });
  return { app: () => app as FastifyInstance, port: () => port };
}

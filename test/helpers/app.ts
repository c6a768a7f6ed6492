import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll } from 'vitest';
import { buildApp } from '../../services/app.js';

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

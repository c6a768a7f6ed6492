import cors from '@fastify/cors';
import helmet from '@fastify/helmet';
import type { FastifyInstance } from 'fastify';
import type { Config } from '../config.js';

/**
 * Security headers and CORS. The page and the report carry inline scripts and styles of their own, nothing
 * external. CORS is closed unless origins are allowed explicitly.
 * @see https://github.com/fastify/fastify-helmet
 */
export async function secureHeaders(app: FastifyInstance, config: Config): Promise<void> {
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
  await app.register(cors, { origin: config.corsOrigins.length > 0 ? [...config.corsOrigins] : false });
}

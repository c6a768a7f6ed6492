import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import type { Config } from '../config.js';
import { problemResponses } from '../schemas/common.js';
import { FitResponseSchema, fitRequestSchema } from '../schemas/fit.js';
import { runFit } from '../usecases/fit.js';

/** POST /v1/fits. */
export const fitRoutes =
  (config: Config): FastifyPluginAsyncZod =>
  async (app) => {
    app.post(
      '/fits',
      {
        schema: {
          tags: ['fits'],
          summary: 'Fit an assigned line list',
          description:
            'Fits band origins, per-level rotational and centrifugal constants and, across bands, Dunham coefficients and equilibrium constants, with full covariance. Lines come back in request order with their status.',
          body: fitRequestSchema(config.maxLines),
          response: { 200: FitResponseSchema, ...problemResponses },
        },
      },
      async (req) => runFit(req.body),
    );
  };

import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import type { Config } from '../config.js';
import { resultInForm, withDetail } from '../formats/respond.js';
import { jobSize } from '../pool.js';
import { stamped } from '../provenance.js';
import { problemResponses } from '../schemas/common.js';
import type { FitResponse } from '../schemas/fit.js';
import { FitResponseSchema, fitRequestSchema } from '../schemas/fit.js';
import { ResultQuerySchema } from '../schemas/query.js';
import { answerRawBody, timed, workOptions } from './timed.js';

/** POST /v1/fits. */
export const fitRoutes =
  (config: Config): FastifyPluginAsyncZod =>
  async (app) => {
    app.post(
      '/fits',
      {
        bodyLimit: config.bodyLimit,
        schema: {
          operationId: 'fitLines',
          tags: ['fits'],
          summary: 'Fit a line list or a spectrum',
          description:
            'Fits band origins, per-level rotational and centrifugal constants and, across bands, Dunham coefficients and equilibrium constants, with full covariance. Unassigned lines are assigned first; a spectrum (JSON, JCAMP-DX or CSV) is turned into peaks first. Lines come back in request order with their status.',
          querystring: ResultQuerySchema,
          body: fitRequestSchema(config.maxLines),
          response: { 200: FitResponseSchema, ...problemResponses },
        },
      },
      async (req, reply) => {
        if (await answerRawBody(app, config, 'fit', req, reply)) return reply;
        const r = await timed(app, 'fit', jobSize(req.body), () =>
          app.pool.run<FitResponse>(
            { kind: 'fit', body: withDetail(req.body, req.query) },
            jobSize(req.body),
            workOptions(req, reply),
          ),
        );
        return resultInForm(req, reply, 'fit', stamped(req, r, req.body.sample));
      },
    );
  };

import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import type { Config } from '../config.js';
import { resultInForm, withDetail } from '../formats/respond.js';
import { jobSize } from '../pool.js';
import { stamped } from '../provenance.js';
import { type CheckResponse, CheckResponseSchema, checkRequestSchema } from '../schemas/checks.js';
import { problemResponses } from '../schemas/common.js';
import { PredictionRequestSchema, type PredictionResponse, PredictionResponseSchema } from '../schemas/predictions.js';
import { ResultQuerySchema } from '../schemas/query.js';
import { answerRawBody, timed, workOptions } from './timed.js';

/** POST /v1/checks and POST /v1/predictions. */
export const checkRoutes =
  (config: Config): FastifyPluginAsyncZod =>
  async (app) => {
    app.post(
      '/checks',
      {
        bodyLimit: config.bodyLimit,
        schema: {
          operationId: 'checkLines',
          tags: ['checks'],
          summary: 'QA verdict on a line list or spectrum',
          description:
            'Fits the lines (assigning them if needed) and checks identity, wavenumber calibration, unexplained lines, isotope ratio, rotational temperature and fit quality against a tolerance profile. Not a safety or purity certification.',
          querystring: ResultQuerySchema,
          body: checkRequestSchema(config.maxLines),
          response: { 200: CheckResponseSchema, ...problemResponses },
        },
      },
      async (req, reply) => {
        if (await answerRawBody(app, config, 'check', req, reply)) return reply;
        const r = await timed(app, 'check', jobSize(req.body), () =>
          app.pool.run<CheckResponse>(
            { kind: 'check', body: withDetail(req.body, req.query) },
            jobSize(req.body),
            workOptions(req, reply),
          ),
        );
        app.metrics.verdicts.labels(r.verdict).inc();
        return resultInForm(req, reply, 'check', stamped(req, r, req.body.sample));
      },
    );
    app.post(
      '/predictions',
      {
        bodyLimit: config.smallBodyLimit,
        schema: {
          operationId: 'predictLines',
          tags: ['checks'],
          summary: 'Predicted lines with propagated uncertainties',
          description:
            'Line positions of chosen bands from library or caller constants (with covariance), with relative intensities at a temperature, for planning scans and choosing calibration lines.',
          body: PredictionRequestSchema,
          response: { 200: PredictionResponseSchema, ...problemResponses },
        },
      },
      async (req) =>
        stamped(req, await app.pool.run<PredictionResponse>({ kind: 'predict', body: req.body }, 1), req.body.sample),
    );
  };

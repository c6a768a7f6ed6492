import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import type { Config } from '../config.js';
import { CheckResponseSchema, checkRequestSchema } from '../schemas/checks.js';
import { problemResponses } from '../schemas/common.js';
import { PredictionRequestSchema, PredictionResponseSchema } from '../schemas/predictions.js';
import { runCheck } from '../usecases/check.js';
import { runPrediction } from '../usecases/predict.js';

/** POST /v1/checks and POST /v1/predictions. */
export const checkRoutes =
  (config: Config): FastifyPluginAsyncZod =>
  async (app) => {
    app.post(
      '/checks',
      {
        schema: {
          tags: ['checks'],
          summary: 'QA verdict on a line list',
          description:
            'Fits the lines (assigning them if needed) and checks identity, wavenumber calibration, unexplained lines, isotope ratio, rotational temperature and fit quality against a tolerance profile. Not a safety or purity certification.',
          body: checkRequestSchema(config.maxLines),
          response: { 200: CheckResponseSchema, ...problemResponses },
        },
      },
      async (req) => runCheck(req.body),
    );
    app.post(
      '/predictions',
      {
        schema: {
          tags: ['checks'],
          summary: 'Predicted lines with propagated uncertainties',
          description:
            'Line positions of chosen bands from library or caller constants (with covariance), with relative intensities at a temperature, for planning scans and choosing calibration lines.',
          body: PredictionRequestSchema,
          response: { 200: PredictionResponseSchema, ...problemResponses },
        },
      },
      async (req) => runPrediction(req.body),
    );
  };

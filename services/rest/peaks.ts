import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { problemResponses } from '../schemas/common.js';
import { PeaksRequestSchema, PeaksResponseSchema } from '../schemas/peaks.js';
import { runPeaks } from '../usecases/peaks.js';

/** POST /v1/peaks. */
export const peakRoutes: FastifyPluginAsyncZod = async (app) => {
  app.post(
    '/peaks',
    {
      schema: {
        tags: ['spectra'],
        summary: 'Peaks of a spectrum',
        description:
          'Baseline, noise, and pseudo-Voigt line-shape fits (blends fitted together) give each peak position with its standard uncertainty, integrated intensity and width. The body is JSON, a JCAMP-DX file (chemical/x-jcamp-dx) or CSV (text/csv).',
        body: PeaksRequestSchema,
        response: { 200: PeaksResponseSchema, ...problemResponses },
      },
    },
    async (req) => runPeaks(req.body),
  );
};

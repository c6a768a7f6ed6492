import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import type { Config } from '../config.js';
import { jobSize } from '../pool.js';
import { stamped } from '../provenance.js';
import { problemResponses } from '../schemas/common.js';
import { PeaksRequestSchema, type PeaksResponse, PeaksResponseSchema } from '../schemas/peaks.js';
import { SpeciesQuerySchema } from '../schemas/query.js';
import { answerRawBody, timed, workOptions } from './timed.js';

/** POST /v1/peaks. */
export const peakRoutes =
  (config: Config): FastifyPluginAsyncZod =>
  async (app) => {
    app.post(
      '/peaks',
      {
        bodyLimit: config.bodyLimit,
        schema: {
          operationId: 'findPeaks',
          tags: ['spectra'],
          summary: 'Peaks of a spectrum',
          description:
            'Baseline, noise, and pseudo-Voigt line-shape fits (blends fitted together) give each peak position with its standard uncertainty, integrated intensity and width. The body is JSON, a JCAMP-DX file (chemical/x-jcamp-dx) or CSV (text/csv).',
          body: PeaksRequestSchema,
          // What a JCAMP-DX or CSV body takes from the query (unit, sample), checked as on /v1/fits.
          querystring: SpeciesQuerySchema,
          response: { 200: PeaksResponseSchema, ...problemResponses },
        },
      },
      async (req, reply) => {
        if (await answerRawBody(app, config, 'peaks', req, reply)) return reply;
        const r = await timed(app, 'peaks', jobSize(req.body), () =>
          app.pool.run<PeaksResponse>(
            { kind: 'peaks', body: req.body, peakThreads: config.peakThreads },
            jobSize(req.body),
            workOptions(req, reply),
          ),
        );
        return stamped(req, r, req.body.sample);
      },
    );
  };

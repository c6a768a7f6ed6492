import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import type { Config } from '../config.js';
import { jobSize } from '../pool.js';
import { stamped } from '../provenance.js';
import { problemResponses } from '../schemas/common.js';
import { type PotentialResponse, PotentialResponseSchema, potentialRequestSchema } from '../schemas/potentials.js';
import { answerRawBody } from './timed.js';

/** POST /v1/potentials. */
export const potentialRoutes =
  (config: Config): FastifyPluginAsyncZod =>
  async (app) => {
    app.post(
      '/potentials',
      {
        bodyLimit: config.bodyLimit,
        schema: {
          operationId: 'potentialCurves',
          tags: ['potentials'],
          summary: 'Potential curve: RKR turning points and the Morse curve',
          description:
            'First-order RKR turning points r₋, r₊ of each level up to vMax, with uncertainties propagated from the covariance of the constants, the Morse curve from ω_e, ω_e x_e and B_e, points of both curves for plotting, and a Numerov check of the RKR curve. The constants come from the body (as for /v1/predictions; default the reference library) or from a fit of a line list or spectrum (the body of /v1/fits). Levels where G(v) stops increasing, or far beyond the levels the data reached, are refused (422).',
          body: potentialRequestSchema(config.maxLines),
          response: {
            200: PotentialResponseSchema,
            ...problemResponses,
            404: {
              ...problemResponses[422],
              description: 'species not in the reference library and no constants sent',
            },
          },
        },
      },
      async (req, reply) => {
        if (await answerRawBody(app, config, 'potential', req, reply)) return reply;
        return stamped(
          req,
          await app.pool.run<PotentialResponse>({ kind: 'potential', body: req.body }, Math.max(jobSize(req.body), 1)),
          req.body.sample,
        );
      },
    );
  };

import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Config } from '../config.js';
import { jobSize } from '../pool.js';
import { provenanceOf } from '../provenance.js';
import { checkRequestSchema } from '../schemas/checks.js';
import { problemResponses } from '../schemas/common.js';
import { SpeciesQuerySchema } from '../schemas/query.js';
import { answerRawBody, timed, workOptions } from './timed.js';

/** POST /v1/reports. */
export const reportRoutes =
  (config: Config): FastifyPluginAsyncZod =>
  async (app) => {
    app.post(
      '/reports',
      {
        bodyLimit: config.bodyLimit,
        schema: {
          operationId: 'renderReport',
          tags: ['checks'],
          summary: 'A readable QA report',
          description:
            'The body of /v1/checks (JSON, JCAMP-DX or CSV) → one self-contained HTML document: verdict, checks, constants, stick spectrum, residuals, combination differences, Boltzmann plot, Fortrat diagram, unexplained lines and the cautions.',
          querystring: SpeciesQuerySchema,
          body: checkRequestSchema(config.maxLines),
          response: {
            200: { description: 'the report', content: { 'text/html': { schema: z.string() } } },
            ...problemResponses,
          },
        },
      },
      async (req, reply) => {
        if (await answerRawBody(app, config, 'report', req, reply)) return reply;
        const html = await timed(app, 'report', jobSize(req.body), () =>
          app.pool.run<string>(
            { kind: 'report', body: req.body, provenance: provenanceOf(req) },
            jobSize(req.body),
            workOptions(req, reply),
          ),
        );
        return reply.type('text/html; charset=utf-8').send(html);
      },
    );
  };

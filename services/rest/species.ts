import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { stamped } from '../provenance.js';
import { problemResponses } from '../schemas/common.js';
import { SpeciesEntryResponseSchema, SpeciesListSchema, SpeciesParamsSchema } from '../schemas/species.js';
import { getSpecies, listSpecies } from '../usecases/species.js';

/** GET /v1/species and GET /v1/species/{formula}. */
export const speciesRoutes: FastifyPluginAsyncZod = async (app) => {
  app.get(
    '/species',
    {
      schema: {
        operationId: 'listSpecies',
        tags: ['species'],
        summary: 'The reference library',
        description: 'Each species with its constants, each constant with its published source and provenance.',
        response: { 200: SpeciesListSchema },
      },
    },
    async (req) => stamped(req, listSpecies()),
  );
  app.get(
    '/species/:formula',
    {
      schema: {
        operationId: 'getSpecies',
        tags: ['species'],
        summary: 'One entry of the reference library',
        params: SpeciesParamsSchema,
        response: {
          200: SpeciesEntryResponseSchema,
          404: { ...problemResponses[422], description: 'not in the reference library' },
          422: problemResponses[422],
        },
      },
    },
    async (req) => stamped(req, getSpecies(req.params.formula)),
  );
};

import type { FastifyInstance } from 'fastify';
import mercurius from 'mercurius';
import type { Config } from '../config.js';
import { problem, sendProblem } from '../errors.js';
import { limitQueryCost } from '../graphql/limits.js';
import { resolvers } from '../graphql/resolvers.js';
import { typeDefs } from '../graphql/schema.js';

/** Longest GraphQL query text accepted, in characters. */
export const MAX_QUERY_CHARS = 20_000;

/**
 * GraphQL: no batching, bounded query text, the small-body limit, limits on depth, fields and computations. Registered inside the protected
 * scope so that keys, rate limit and shedding apply to it exactly as to /v1.
 * @see https://mercurius.dev/#/docs/api/options
 */
export async function graphqlRoutes(scope: FastifyInstance, config: Config, app: FastifyInstance): Promise<void> {
  // The small-body limit: a GraphQL request is a query and its variables, never a bulk upload.
  scope.addHook('onRoute', (route) => {
    if (route.url === '/graphql') route.bodyLimit = config.smallBodyLimit;
  });
  scope.addHook('preValidation', async (request, reply) => {
    // The hook sits on the scope shared with the REST routes: only /graphql is a GraphQL request.
    if (request.method !== 'POST' || request.routeOptions.url !== '/graphql') return;
    const body = request.body as { query?: unknown } | unknown[] | undefined;
    const text = Array.isArray(body) ? '' : typeof body?.query === 'string' ? body.query : '';
    if (Array.isArray(body) || text.length > MAX_QUERY_CHARS) {
      return sendProblem(
        reply,
        problem(
          'GRAPHQL_REFUSED',
          400,
          'GraphQL request refused',
          Array.isArray(body)
            ? 'batched queries are not accepted'
            : `the query text is longer than ${MAX_QUERY_CHARS} characters`,
          request,
        ),
      );
    }
  });
  await scope.register(mercurius, {
    schema: typeDefs,
    resolvers: resolvers(config, app) as never,
    graphiql: false,
    // Depth, field count and computations per request (introspection allowed): graphql/limits.ts.
    validationRules: [limitQueryCost],
    allowBatchedQueries: false,
  });
}

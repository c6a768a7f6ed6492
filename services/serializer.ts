import type { FastifySerializerCompiler } from 'fastify/types/schema.js';

/**
 * The REST responses' serialiser in production: JSON.stringify, without checking the body against its zod schema
 * on every request (that check costs more than the serialisation). The schemas are enforced where they cost
 * nothing at run time: by the tests (test/services/response-schemas.test.ts runs the routes with
 * VALIDATE_RESPONSES on and compares the bytes; openapi-responses.test.ts checks real answers against the
 * document), and by `VALIDATE_RESPONSES=true` for anyone who wants it in a deployment.
 */
export const plainSerializer: FastifySerializerCompiler<unknown> = () => (data) => JSON.stringify(data);

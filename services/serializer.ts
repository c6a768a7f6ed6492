import fastJsonStringify from 'fast-json-stringify';
import type { FastifySerializerCompiler } from 'fastify/types/schema.js';
import { z } from 'zod';

/**
 * The REST responses' serialisers in production. A 2xx answer described by a zod schema is written by a serialiser
 * compiled from that schema's JSON Schema (fast-json-stringify, the library fastify uses for its own JSON Schema
 * routes): it knows every field's type in advance, so it writes numbers and strings without JSON.stringify's
 * inspection of each value (≈ 3× faster on a 60-line fit answer, measured in DEVELOPERS.md). Everything else (problem
 * documents, text bodies, routes without a zod schema) goes through JSON.stringify.
 *
 * What the compiled form changes, and why it is safe here:
 * - fields come in the schema's order, not the object's (JSON objects are unordered);
 * - a field the schema does not name is left out, as `z.object` parsing would leave it out;
 * - numbers are written by the same Number → string conversion as JSON.stringify, digit for digit, but a NaN throws
 *   where JSON.stringify writes null: every use case's result has passed `assertFinite` before it gets here.
 * test/services/compiled-serializer.test.ts compares both serialisers on real answers of every JSON route.
 *
 * No response is checked against its zod schema in production (that check costs more than the serialisation). The
 * schemas are enforced where they cost nothing at run time: by the tests (test/services/response-schemas.test.ts
 * runs every JSON route with VALIDATE_RESPONSES on; openapi-responses.test.ts checks real answers against the
 * document), and by `VALIDATE_RESPONSES=true` for anyone who wants it in a deployment.
 */
type Serialise = (data: unknown) => string;

const isZod = (x: unknown): x is z.ZodType => typeof x === 'object' && x !== null && '_zod' in x;

/** Compiled serialisers by schema: one compilation per schema and process (tests build many apps). */
const compiled = new WeakMap<z.ZodType, Serialise>();

/** The JSON Schema of what a zod schema puts on the wire (its output side), for the compiler. */
export function wireSchema(schema: z.ZodType): Record<string, unknown> {
  return z.toJSONSchema(schema, { target: 'draft-7', io: 'output', unrepresentable: 'any' }) as Record<string, unknown>;
}

/** The compiled serialiser of a zod schema (compiled once, on first use). */
export function compiledSerializer(schema: z.ZodType): Serialise {
  let f = compiled.get(schema);
  if (!f) {
    f = fastJsonStringify(wireSchema(schema) as unknown as Parameters<typeof fastJsonStringify>[0]) as Serialise;
    compiled.set(schema, f);
  }
  return f;
}

/**
 * fastify's serializer compiler for the /v1 scope: compiled for 2xx zod schemas, JSON.stringify otherwise. The
 * compilation is left to the first answer of the route, so that building the app (every service test does) costs
 * nothing for routes it does not call.
 */
export const compiledSerializerCompiler: FastifySerializerCompiler<unknown> = ({ schema, httpStatus }) => {
  if (!isZod(schema) || !/^2\d\d$/.test(String(httpStatus))) return (data) => JSON.stringify(data);
  let f: Serialise | undefined;
  return (data) => {
    f ??= compiledSerializer(schema);
    return f(data);
  };
};

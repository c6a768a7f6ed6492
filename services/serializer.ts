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

type JsonSchema = Record<string, unknown>;

/**
 * The JSON Schema of what a zod schema puts on the wire (its output side), for the compiler, with each `anyOf` of
 * plain types (`number | null`, `string | integer`, `integer | integer[]`, …) written as a list of types. The
 * compiler tells such a list apart by `typeof` as it writes; for an `anyOf` it asks a schema validator (ajv) which
 * branch a value matches, compiled on first use: measured, that compilation took about a second of the first
 * answer of /v1/fits on a loaded machine, and the checks cost on every answer. Unions of objects stay `anyOf`.
 */
export function wireSchema(schema: z.ZodType): JsonSchema {
  const json = z.toJSONSchema(schema, { target: 'draft-7', io: 'output', unrepresentable: 'any' }) as JsonSchema;
  // Twice: the second pass can take `X | null` apart for a definition X whose own unions the first pass rewrote.
  const once = typeListsForPlainUnions(json, {}) as JsonSchema;
  return typeListsForPlainUnions(once, (once.definitions ?? {}) as Record<string, JsonSchema>) as JsonSchema;
}

/**
 * Order in which a value's type is tested: null first, string last (the compiler's string test takes any object
 * with its own toString, an array among them).
 */
const TYPE_ORDER = ['null', 'boolean', 'integer', 'number', 'array', 'object', 'string'];

function typeListsForPlainUnions(node: unknown, definitions: Record<string, JsonSchema>): unknown {
  if (Array.isArray(node)) return node.map((x) => typeListsForPlainUnions(x, definitions));
  if (typeof node !== 'object' || node === null) return node;
  const out: JsonSchema = {};
  for (const [k, v] of Object.entries(node)) out[k] = typeListsForPlainUnions(v, definitions);
  if (!Array.isArray(out.anyOf)) return out;
  const options = (out.anyOf as JsonSchema[]).map((o) => objectBehind(o, definitions));
  const types = options.map((o) => o.type);
  const structured = options.filter((o) => o.type === 'array' || o.type === 'object');
  const plain =
    options.every((o) => typeof o.type === 'string' && o.$ref === undefined && o.anyOf === undefined) &&
    new Set(types).size === types.length &&
    structured.length <= 1 &&
    !(types.includes('integer') && types.includes('number'));
  if (!plain) return out;
  const { anyOf: _anyOf, ...rest } = out;
  // Keywords of the array or object branch (items, properties, …) say how to write it; the other branches' keywords
  // (minimum, maxLength, …) only validate, which the compiler does not do.
  const { type: _type, ...shape } = structured[0] ?? {};
  return { ...rest, ...shape, type: TYPE_ORDER.filter((t) => types.includes(t)) };
}

/** `{ $ref: "#/definitions/X" }` of an object schema: that schema (its own refs stay valid in the same document). */
function objectBehind(option: JsonSchema, definitions: Record<string, JsonSchema>): JsonSchema {
  const ref = option.$ref;
  if (typeof ref !== 'string' || Object.keys(option).length !== 1 || !ref.startsWith('#/definitions/')) return option;
  const target = definitions[ref.slice('#/definitions/'.length)];
  return target?.type === 'object' ? target : option;
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

/** Compile the serialisers of these schemas now (server.ts, before the port opens), so no request waits for one. */
export function warmSerializers(schemas: readonly z.ZodType[]): void {
  for (const s of schemas) compiledSerializer(s);
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

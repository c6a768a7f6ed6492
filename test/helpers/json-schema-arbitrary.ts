import fc from 'fast-check';

/**
 * fast-check arbitraries from the JSON Schema (draft 2020-12) of an OpenAPI 3.1 document: values the schema
 * accepts. Covers what the served document uses: $ref into components, anyOf/oneOf, enum/const, objects with
 * required and optional properties, arrays with bounds, numbers and integers with (exclusive) bounds, strings with
 * length bounds or a pattern, booleans, null. Sizes are kept small so that each case is cheap to serve.
 */
type Schema = Record<string, unknown>;

export function schemaArbitrary(schema: Schema, doc: Schema, depth = 0): fc.Arbitrary<unknown> {
  if (typeof schema.$ref === 'string') return schemaArbitrary(resolveRef(schema.$ref, doc), doc, depth);
  if ('const' in schema) return fc.constant(schema.const);
  if (Array.isArray(schema.enum)) return fc.constantFrom(...(schema.enum as unknown[]));
  for (const k of ['anyOf', 'oneOf'] as const) {
    const alts = schema[k] as Schema[] | undefined;
    if (alts) return fc.oneof(...alts.map((s) => schemaArbitrary(s, doc, depth + 1)));
  }
  if (Array.isArray(schema.allOf)) return schemaArbitrary(Object.assign({}, ...(schema.allOf as Schema[])), doc, depth);
  const type = schema.type;
  if (Array.isArray(type)) return fc.oneof(...type.map((t) => schemaArbitrary({ ...schema, type: t }, doc, depth)));
  switch (type) {
    case 'object': {
      const props = (schema.properties ?? {}) as Record<string, Schema>;
      const required = new Set((schema.required ?? []) as string[]);
      // Deep optional parts are left out beyond a few levels, so that generated bodies stay small.
      const keys = Object.keys(props).filter((k) => required.has(k) || depth < 4);
      const model = Object.fromEntries(keys.map((k) => [k, schemaArbitrary(props[k] as Schema, doc, depth + 1)]));
      return fc.record(model, { requiredKeys: keys.filter((k) => required.has(k)) });
    }
    case 'array': {
      const min = (schema.minItems as number | undefined) ?? 0;
      const max = Math.min((schema.maxItems as number | undefined) ?? min + 4, min + 4);
      return fc.array(schemaArbitrary((schema.items ?? {}) as Schema, doc, depth + 1), {
        minLength: min,
        maxLength: max,
      });
    }
    case 'integer': {
      const min = Math.max(bound(schema, 'minimum', 'exclusiveMinimum', 1) ?? -1000, -1e6);
      const max = Math.min(bound(schema, 'maximum', 'exclusiveMaximum', -1) ?? 1000, 1e6);
      return fc.integer({ min: Math.ceil(min), max: Math.floor(max) });
    }
    case 'number': {
      const lo = bound(schema, 'minimum', 'exclusiveMinimum', 0);
      const hi = bound(schema, 'maximum', 'exclusiveMaximum', 0);
      return fc.double({
        min: lo ?? -1e6,
        max: hi ?? 1e6,
        minExcluded: schema.exclusiveMinimum !== undefined,
        maxExcluded: schema.exclusiveMaximum !== undefined,
        noNaN: true,
        noDefaultInfinity: true,
      });
    }
    case 'string': {
      if (typeof schema.pattern === 'string') {
        const max = (schema.maxLength as number | undefined) ?? 40;
        return fc.stringMatching(new RegExp(schema.pattern)).filter((s) => s.length <= max);
      }
      const minLength = (schema.minLength as number | undefined) ?? 0;
      const maxLength = Math.min((schema.maxLength as number | undefined) ?? 20, minLength + 20);
      return fc.string({ minLength, maxLength });
    }
    case 'boolean':
      return fc.boolean();
    case 'null':
      return fc.constant(null);
    default:
      return fc.jsonValue({ maxDepth: 2 });
  }
}

/** An inclusive or exclusive bound as a number (the exclusive one nudged inwards when integers are wanted). */
function bound(schema: Schema, inclusive: string, exclusive: string, nudge: number): number | undefined {
  if (typeof schema[inclusive] === 'number') return schema[inclusive] as number;
  if (typeof schema[exclusive] === 'number') return (schema[exclusive] as number) + nudge;
  return undefined;
}

export function resolveRef(ref: string, doc: Schema): Schema {
  if (!ref.startsWith('#/')) throw new Error(`external $ref ${ref} is not supported`);
  let node: unknown = doc;
  for (const part of ref.slice(2).split('/')) {
    node = (node as Record<string, unknown>)[part.replace(/~1/g, '/').replace(/~0/g, '~')];
  }
  if (!node || typeof node !== 'object') throw new Error(`$ref ${ref} does not resolve`);
  return node as Schema;
}

import type { FastifyInstance } from 'fastify';
import type { Config } from '../config.js';
import { NDJSON } from '../rest/batch.js';
import { CSV_TYPES, JCAMP_TYPES, textBodyToJson } from '../text-bodies.js';

/** Deepest JSON nesting accepted; the contract's bodies need 4 levels. */
export const MAX_JSON_DEPTH = 32;

export function jsonDepth(value: unknown): number {
  let max = 0;
  const stack: [unknown, number][] = [[value, 1]];
  while (stack.length > 0) {
    const [v, d] = stack.pop() as [unknown, number];
    if (v === null || typeof v !== 'object') continue;
    if (d > max) max = d;
    if (max > MAX_JSON_DEPTH) return max;
    for (const x of Array.isArray(v) ? v : Object.values(v as object)) stack.push([x, d + 1]);
  }
  return max;
}

export function tooDeep(): Error {
  return Object.assign(new Error(`JSON nested deeper than ${MAX_JSON_DEPTH} levels`), { statusCode: 400 });
}

/**
 * Body parsers: JSON with a nesting limit (fastify's secure parser: prototype poisoning refused), JCAMP-DX and
 * CSV turned into the JSON body of the same endpoint (query string: species, temperature), NDJSON left as a
 * stream for the batch routes.
 */
export function parseBodies(app: FastifyInstance, config: Config): void {
  const defaultJson = app.getDefaultJsonParser('error', 'error');
  app.addContentTypeParser('application/json', { parseAs: 'string' }, (req, body, done) => {
    defaultJson(req, body as string, (err: Error | null, parsed?: unknown) => {
      if (err) return done(err, undefined);
      if (jsonDepth(parsed) > MAX_JSON_DEPTH) return done(tooDeep(), undefined);
      done(null, parsed);
    });
  });
  app.addContentTypeParser([...JCAMP_TYPES, ...CSV_TYPES], { parseAs: 'string' }, (req, body, done) => {
    try {
      done(
        null,
        textBodyToJson(
          String(req.headers['content-type'] ?? ''),
          body as string,
          req.query as Record<string, unknown>,
          config,
        ),
      );
    } catch (e) {
      done(e as Error, undefined);
    }
  });
  app.addContentTypeParser(NDJSON, (_req, payload, done) => done(null, payload));
}

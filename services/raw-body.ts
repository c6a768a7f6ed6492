import { ScienceError } from '../src/errors.js';
import type { Config } from './config.js';
import { CSV_TYPES, JCAMP_TYPES, textBodyToJson } from './text-bodies.js';

/**
 * A large body left unparsed on the event loop: the worker that does the work also parses it (JSON, JCAMP-DX or
 * CSV), validates it with the route's schema and serialises the answer, so that none of those steps, each
 * proportional to the size of the body, freezes /healthz or the other requests.
 */
export class RawBody {
  constructor(
    readonly text: string,
    readonly contentType: string,
    readonly query: Record<string, unknown>,
  ) {}
  /** Estimated size in lines, for admission and the metrics: about 100 bytes a line (a spectrum point 20). */
  get size(): number {
    return Math.ceil(this.text.length / 100);
  }
}

/** Deepest JSON nesting accepted; the contract's bodies need 4 levels. */
export const MAX_JSON_DEPTH = 32;

/**
 * The nesting depth of a parsed JSON value, iteratively; stops counting past the limit. Keys that could poison a
 * prototype when the value is merged later ("__proto__", "constructor") are refused, as fastify's parser does.
 */
export function jsonDepth(value: unknown): number {
  let max = 0;
  const stack: [unknown, number][] = [[value, 1]];
  while (stack.length > 0) {
    const [v, d] = stack.pop() as [unknown, number];
    if (v === null || typeof v !== 'object') continue;
    if (d > max) max = d;
    if (max > MAX_JSON_DEPTH) return max;
    // Numbers and strings add no depth: only objects and arrays are stacked (a 10⁶-point spectrum is two arrays).
    if (Array.isArray(v)) {
      // Indexed: for…of over the 10⁶ numbers of a spectrum took about five times as long.
      for (let i = 0, n = v.length; i < n; i++) {
        const x: unknown = v[i];
        if (x !== null && typeof x === 'object') stack.push([x, d + 1]);
      }
    } else
      for (const [k, x] of Object.entries(v as object)) {
        if (k === '__proto__' || k === 'constructor')
          throw Object.assign(new Error(`Object contains forbidden prototype property "${k}"`), { statusCode: 400 });
        stack.push([x, d + 1]);
      }
  }
  return max;
}

export function tooDeep(): Error {
  return Object.assign(new Error(`JSON nested deeper than ${MAX_JSON_DEPTH} levels`), { statusCode: 400 });
}

export type Limits = Pick<Config, 'maxLines' | 'maxPoints'>;

/** The body as the route's JSON, parsed where it is called (in a worker for large bodies). */
export function decodeBody(raw: Pick<RawBody, 'text' | 'contentType' | 'query'>, limits: Limits): unknown {
  const type = raw.contentType.split(';')[0]?.trim().toLowerCase() ?? '';
  if ((JCAMP_TYPES as readonly string[]).includes(type) || (CSV_TYPES as readonly string[]).includes(type))
    return textBodyToJson(type, raw.text, raw.query, limits);
  let parsed: unknown;
  try {
    parsed = JSON.parse(raw.text);
  } catch (e) {
    throw new ScienceError('INPUT_INVALID', `the body is not valid JSON: ${(e as Error).message.slice(0, 200)}`, {});
  }
  if (jsonDepth(parsed) > MAX_JSON_DEPTH) throw tooDeep();
  return parsed;
}

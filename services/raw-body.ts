import { Buffer } from 'node:buffer';
import type { Config } from './config.js';
import { CSV_TYPES, JCAMP_TYPES, textBodyToJson } from './text-bodies.js';

/**
 * The routes whose handlers take a RawBody (services/rest/timed.ts#answerRawBody): only their large bodies are left
 * unparsed for a worker. Any other route parses its body on the event loop, whatever its size (its schema would
 * otherwise meet a RawBody, not the request).
 */
export const RAW_BODY_ROUTES: ReadonlySet<string> = new Set([
  '/v1/fits',
  '/v1/checks',
  '/v1/reports',
  '/v1/peaks',
  '/v1/potentials',
]);

/**
 * A large body left unparsed on the event loop: the worker that does the work also decodes it (UTF-8), parses it
 * (JSON, JCAMP-DX or CSV), validates it with the route's schema and serialises the answer, so that none of those
 * steps, each proportional to the size of the body, freezes /healthz or the other requests. The bytes as read are
 * moved to the worker (transferred, not copied; services/rest/timed.ts), where a string of tens of MB was decoded
 * here, copied into the worker's message and out of it again.
 */
export class RawBody {
  /** The body's bytes, in an ArrayBuffer of their own (so that it can be transferred). */
  readonly bytes: Uint8Array;
  /** Whether the body holds a `"spectrum"` key, read before the bytes leave (for the advice of an error). */
  readonly namesSpectrum: boolean;
  constructor(
    body: Uint8Array,
    readonly contentType: string,
    readonly query: Record<string, unknown>,
  ) {
    this.bytes = body.byteOffset === 0 && body.byteLength === body.buffer.byteLength ? body : body.slice();
    this.size = Math.ceil(body.byteLength / 100);
    this.namesSpectrum = Buffer.from(body.buffer, body.byteOffset, body.byteLength).includes('"spectrum"');
  }
  /** Estimated size in lines, for admission and the metrics: about 100 bytes a line (a spectrum point 20). */
  readonly size: number;
}

/** Charset labels read as UTF-8, as fastify reads a body itself (ASCII is a subset). */
const UTF8_LABELS = new Set(['utf-8', 'utf8', 'us-ascii', 'ascii']);

/** The charset a Content-Type declares, lower-cased; undefined when it declares none. */
export function declaredCharset(contentType: string): string | undefined {
  return /;\s*charset\s*=\s*"?([^";\s]+)/i.exec(contentType)?.[1]?.toLowerCase();
}

/**
 * The body's text. UTF-8 (none declared, utf-8 or us-ascii) is decoded as fastify decodes a body it parses itself
 * (invalid bytes become U+FFFD); another charset the WHATWG Encoding Standard names (ISO-8859-1, windows-1252, …) by
 * that decoder: a CSV exported in Latin-1 with "position (µm)" in its header was read as "�m" and refused. Labels
 * no decoder knows never get here (`unreadableCharset`, a 415 before the body is read).
 * @see https://encoding.spec.whatwg.org/#names-and-labels
 */
export function bodyText(bytes: Uint8Array, contentType = ''): string {
  const charset = declaredCharset(contentType);
  if (charset === undefined || UTF8_LABELS.has(charset))
    return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('utf8');
  return new TextDecoder(charset).decode(bytes);
}

/**
 * The declared charset when the service cannot read a body in it, else undefined: UTF-16 and UTF-32 (a Windows
 * "Unicode" export: lines are split and numbers read byte-wise, so these are refused rather than decoded), labels
 * no decoder knows, and any charset but UTF-8 on an NDJSON stream (read line by line as UTF-8).
 */
export function unreadableCharset(contentType: string, ndjson: boolean): string | undefined {
  const charset = declaredCharset(contentType);
  if (charset === undefined || UTF8_LABELS.has(charset)) return undefined;
  if (ndjson || /^(utf-?(16|32)(le|be)?|ucs-?2|unicode)$/.test(charset)) return charset;
  try {
    new TextDecoder(charset);
    return undefined;
  } catch {
    return charset;
  }
}

/** Deepest JSON nesting accepted; the contract's bodies need 4 levels. */
export const MAX_JSON_DEPTH = 32;

/**
 * The nesting depth of a parsed JSON value, iteratively; stops counting past the limit. Keys that could poison a
 * prototype when the value is merged later ("__proto__", "constructor") are refused, as fastify's parser does.
 * Values and depths go on two stacks kept between calls: a pair per value cost 47 kB of garbage a 60-line fit request
 * (measured with V8's sampling heap profiler).
 */
export function jsonDepth(value: unknown): number {
  if (value === null || typeof value !== 'object') return 0;
  const values = depthStack.values;
  const depths = depthStack.depths;
  let top = 0;
  values[0] = value;
  depths[0] = 1;
  let max = 0;
  try {
    while (top >= 0) {
      const v = values[top] as object;
      const d = depths[top] as number;
      top--;
      if (d > max) max = d;
      if (max > MAX_JSON_DEPTH) return max;
      // Numbers and strings add no depth: only objects and arrays are stacked (a 10⁶-point spectrum is two arrays).
      if (Array.isArray(v)) {
        // Indexed: for…of over the 10⁶ numbers of a spectrum took about five times as long.
        for (let i = 0, n = v.length; i < n; i++) {
          const x: unknown = v[i];
          if (x !== null && typeof x === 'object') {
            values[++top] = x;
            depths[top] = d + 1;
          }
        }
      } else
        for (const k in v) {
          if (!Object.hasOwn(v, k)) continue;
          if (k === '__proto__' || k === 'constructor')
            throw Object.assign(new Error(`Object contains forbidden prototype property "${k}"`), { statusCode: 400 });
          const x: unknown = (v as Record<string, unknown>)[k];
          if (x !== null && typeof x === 'object') {
            values[++top] = x;
            depths[top] = d + 1;
          }
        }
    }
    return max;
  } finally {
    // Emptied, so that no request's data stays reachable; a stack grown past a few thousand entries is dropped.
    if (values.length > 4096) values.length = depths.length = 0;
    else values.fill(undefined);
  }
}

/** jsonDepth's stacks (the service is single-threaded per isolate and jsonDepth does not re-enter). */
const depthStack = { values: [] as unknown[], depths: [] as number[] };

export function tooDeep(): Error {
  return Object.assign(new Error(`JSON nested deeper than ${MAX_JSON_DEPTH} levels`), { statusCode: 400 });
}

/** A large body that is not JSON: the 400 INVALID_JSON problem a small one gets (services/pool.ts rebuilds it). */
export class InvalidJsonBody extends Error {}

/**
 * A body that is JSON but for a NaN or Infinity where a number goes (Python's json.dumps writes them unless
 * allow_nan=False): the 400 VALIDATION_FAILED a finite number out of range gets, naming the field, not the parser's
 * "Unexpected token N" with no field. services/pool.ts rebuilds it from a worker.
 */
export class NonFiniteLiteral extends Error {
  /** A client error (GraphQL answers it 400, as a body that is not JSON). */
  readonly statusCode = 400;
  readonly reason: string;
  constructor(
    readonly field: string,
    readonly token: string,
  ) {
    const reason = `expected a finite number, received ${token} (JSON has no NaN or Infinity): send a finite number or leave the field out`;
    super(`${field}: ${reason}`);
    this.reason = reason;
  }
}

const NON_FINITE_TOKEN = /^[+-]?(?:nan|inf(?:inity)?)(?![\w.])/i;

/**
 * Where the first NaN or ±Infinity literal of a JSON text stands, as a path ("lines/3/position"; "(body)" for the
 * whole body), or undefined when there is none outside strings. Run only on a body JSON.parse refused: one pass
 * over the text, tracking the containers and the current key or index.
 */
export function nonFiniteLiteral(text: string): NonFiniteLiteral | undefined {
  const path: (string | number)[] = [];
  const inArray: boolean[] = [];
  let key = false;
  for (let i = 0, n = text.length; i < n; i++) {
    const c = text.charCodeAt(i);
    if (c === 0x22) {
      let j = i + 1;
      while (j < n && text.charCodeAt(j) !== 0x22) j += text.charCodeAt(j) === 0x5c ? 2 : 1;
      if (key) {
        let name: string;
        try {
          name = JSON.parse(text.slice(i, j + 1)) as string;
        } catch {
          name = text.slice(i + 1, j);
        }
        path[path.length - 1] = name;
      }
      i = j;
    } else if (c === 0x7b || c === 0x5b) {
      inArray.push(c === 0x5b);
      path.push(c === 0x5b ? 0 : '');
      key = c === 0x7b;
    } else if (c === 0x7d || c === 0x5d) {
      inArray.pop();
      path.pop();
    } else if (c === 0x2c) {
      if (inArray.at(-1)) path[path.length - 1] = (path.at(-1) as number) + 1;
      else key = true;
    } else if (c === 0x3a) key = false;
    else if (c === 0x4e || c === 0x6e || c === 0x49 || c === 0x69 || c === 0x2b || c === 0x2d) {
      const m = NON_FINITE_TOKEN.exec(text.slice(i, i + 10));
      if (m) return new NonFiniteLiteral(path.join('/') || '(body)', m[0]);
    }
  }
  return undefined;
}

/** A 400 the parser raises (nesting, a forbidden key): crosses from a worker as its message, the same answer. */
export class ClientError extends Error {
  readonly statusCode = 400;
}

export type Limits = Pick<Config, 'maxLines' | 'maxPoints'>;

/** The body as the route's JSON, parsed where it is called (in a worker for large bodies). */
export function decodeBody(raw: Pick<RawBody, 'bytes' | 'contentType' | 'query'>, limits: Limits): unknown {
  const text = bodyText(raw.bytes, raw.contentType);
  const type = raw.contentType.split(';')[0]?.trim().toLowerCase() ?? '';
  if ((JCAMP_TYPES as readonly string[]).includes(type) || (CSV_TYPES as readonly string[]).includes(type))
    return textBodyToJson(type, text, raw.query, limits);
  let parsed: unknown;
  try {
    // A leading byte order mark is skipped, as fastify's parser skips it for a small body.
    parsed = JSON.parse(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);
  } catch (e) {
    throw (
      nonFiniteLiteral(text) ?? new InvalidJsonBody(`the body is not valid JSON: ${(e as Error).message.slice(0, 200)}`)
    );
  }
  if (jsonDepth(parsed) > MAX_JSON_DEPTH) throw tooDeep();
  return parsed;
}

import type { FastifyInstance, FastifyRequest } from 'fastify';
import type { Config } from '../config.js';
import { HttpProblem, problem, sendProblem, sendUnsupportedMediaType } from '../errors.js';
import {
  bodyText,
  jsonDepth,
  MAX_JSON_DEPTH,
  nonFiniteLiteral,
  RAW_BODY_ROUTES,
  RawBody,
  tooDeep,
  unreadableCharset,
} from '../raw-body.js';
import { NDJSON } from '../rest/batch.js';
import { CSV_TYPES, JCAMP_TYPES, textBodyToJson } from '../text-bodies.js';

export { MAX_JSON_DEPTH };

/**
 * fastify's parser answers a `__proto__` or `constructor.prototype` key (prototype poisoning, refused) with the same
 * error as broken JSON; a body that plain JSON.parse reads was refused for such a key, and is told so.
 */
function forbiddenPropertyOr(err: Error, body: string): Error {
  try {
    JSON.parse(body);
  } catch {
    return err;
  }
  return new HttpProblem(
    'FORBIDDEN_PROPERTY',
    400,
    'Forbidden property',
    'the body is valid JSON but holds a "__proto__" or "constructor.prototype" key, which is refused',
  );
}

/** Every Content-Type header value as sent, in order (a request normally has one or none). */
function contentTypesSent(rawHeaders: readonly string[]): string[] {
  const types: string[] = [];
  for (let i = 0; i + 1 < rawHeaders.length; i += 2)
    if ((rawHeaders[i] as string).toLowerCase() === 'content-type') types.push((rawHeaders[i + 1] as string).trim());
  return types;
}

/**
 * Body parsers: JSON with a nesting limit (fastify's secure parser: prototype poisoning refused), JCAMP-DX and
 * CSV turned into the JSON body of the same endpoint (query string: species, temperature), NDJSON left as a
 * stream for the batch routes.
 */
export function parseBodies(app: FastifyInstance, config: Config): void {
  // No route takes plain text: without this, fastify's text/plain parser handed a JSON or CSV body sent as
  // text/plain to the schema as a string ("expected object, received string"); now it is a 415 naming the types.
  app.removeContentTypeParser('text/plain');
  // No content coding is decoded: a gzip or deflate body reached the parsers as its compressed bytes and was
  // answered "Body is not valid JSON" (or a CSV error quoting binary); now it is a 415 naming the coding, sent
  // before the body is read.
  app.addHook('onRequest', async (request, reply) => {
    const coding = String(request.headers['content-encoding'] ?? '')
      .trim()
      .toLowerCase();
    if (coding === '' || coding === 'identity') return;
    const hasBody = request.headers['transfer-encoding'] !== undefined || Number(request.headers['content-length']) > 0;
    if (!hasBody) return;
    return sendUnsupportedMediaType(
      reply,
      `Content-Encoding "${coding}" is not accepted: send the body uncompressed`,
      request,
    );
  });
  // Bodies are read in the charset they declare, UTF-8 when none. One declared in UTF-16 or UTF-32 (a Windows
  // "Unicode" export) was read as UTF-8 anyway: JSON answered 400 "Body is not valid JSON", a CSV 422 "the CSV header
  // names no position column", a JCAMP-DX file "does not start with ##TITLE=": none said what to change. Those, and
  // labels no decoder knows, are a 415 naming the charset, before the body is read.
  app.addHook('onRequest', async (request, reply) => {
    const types = contentTypesSent(request.raw.rawHeaders);
    // Node keeps the first of two Content-Type headers: a JSON body sent with "text/csv" before "application/json"
    // was read as CSV ("the CSV holds no rows"). Two different types are a 400 naming both.
    if (types.length > 1 && types.some((t) => t !== types[0]))
      return sendProblem(
        reply,
        problem(
          'BAD_REQUEST',
          400,
          'Bad request',
          `Content-Type is sent ${types.length} times (${types.map((t) => `"${t.slice(0, 60)}"`).join(', ')}): send one`,
          request,
        ),
      );
    const type = String(request.headers['content-type'] ?? '');
    const charset = unreadableCharset(type, type.split(';')[0]?.trim().toLowerCase() === NDJSON);
    if (charset === undefined) return;
    return sendUnsupportedMediaType(
      reply,
      `charset=${charset.slice(0, 20)} is not read: send the body in UTF-8 (JSON must be, RFC 8259 §8.1; CSV and JCAMP-DX may also be ISO-8859-1 or windows-1252)`,
      request,
    );
  });
  const defaultJson = app.getDefaultJsonParser('error', 'error');
  // Large bodies of the work routes (RAW_BODY_ROUTES) go to a worker unparsed, as bytes (services/raw-body.ts); the
  // others are decoded here by bodyText, as the worker decodes them: the declared charset, else UTF-8 as fastify
  // reads a body itself.
  const offload = (req: FastifyRequest, body: Buffer) =>
    config.workers > 0 &&
    config.offloadBytes > 0 &&
    body.length >= config.offloadBytes &&
    RAW_BODY_ROUTES.has(req.routeOptions.url ?? '');
  app.addContentTypeParser('application/json', { parseAs: 'buffer' }, (req, bytes, done) => {
    if (offload(req, bytes as Buffer))
      return done(null, new RawBody(bytes as Buffer, 'application/json', req.query as Record<string, unknown>));
    const body = bodyText(bytes as Buffer, String(req.headers['content-type'] ?? ''));
    defaultJson(req, body, (err: Error | null, parsed?: unknown) => {
      if (err) return done(nonFiniteLiteral(body) ?? forbiddenPropertyOr(err, body), undefined);
      try {
        if (jsonDepth(parsed) > MAX_JSON_DEPTH) return done(tooDeep(), undefined);
      } catch (e) {
        return done(e as Error, undefined);
      }
      done(null, parsed);
    });
  });
  app.addContentTypeParser([...JCAMP_TYPES, ...CSV_TYPES], { parseAs: 'buffer' }, (req, bytes, done) => {
    if (offload(req, bytes as Buffer))
      return done(
        null,
        new RawBody(bytes as Buffer, String(req.headers['content-type']), req.query as Record<string, unknown>),
      );
    try {
      done(
        null,
        textBodyToJson(
          String(req.headers['content-type'] ?? ''),
          bodyText(bytes as Buffer, String(req.headers['content-type'] ?? '')),
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

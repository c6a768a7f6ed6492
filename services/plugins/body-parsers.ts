import type { FastifyInstance } from 'fastify';
import type { Config } from '../config.js';
import { HttpProblem, sendUnsupportedMediaType } from '../errors.js';
import { jsonDepth, MAX_JSON_DEPTH, RawBody, tooDeep } from '../raw-body.js';
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
  // Bodies are read as UTF-8. One declared in UTF-16 or UTF-32 (a Windows "Unicode" export) was read as UTF-8
  // anyway: JSON answered 400 "Body is not valid JSON", a CSV 422 "the CSV header names no position column", a
  // JCAMP-DX file "does not start with ##TITLE=": none said what to change. Now a 415 names the charset.
  app.addHook('onRequest', async (request, reply) => {
    const charset = /;\s*charset\s*=\s*"?([^";\s]+)/i.exec(String(request.headers['content-type'] ?? ''))?.[1];
    if (charset === undefined || !/^(utf-?(16|32)(le|be)?|ucs-?2|unicode)$/i.test(charset)) return;
    return sendUnsupportedMediaType(
      reply,
      `charset=${charset.slice(0, 20)} is not read: bodies are read as UTF-8 (JSON must be, RFC 8259 §8.1); send the body in UTF-8`,
      request,
    );
  });
  const defaultJson = app.getDefaultJsonParser('error', 'error');
  // Large bodies of the work routes go to a worker unparsed, as bytes (services/raw-body.ts); the others are decoded
  // here exactly as fastify decodes a body it reads as a string (UTF-8, invalid bytes as U+FFFD).
  const offload = (req: { url: string }, body: Buffer) =>
    config.workers > 0 && config.offloadBytes > 0 && body.length >= config.offloadBytes && req.url.includes('/v1/');
  app.addContentTypeParser('application/json', { parseAs: 'buffer' }, (req, bytes, done) => {
    if (offload(req, bytes as Buffer))
      return done(null, new RawBody(bytes as Buffer, 'application/json', req.query as Record<string, unknown>));
    const body = (bytes as Buffer).toString('utf8');
    defaultJson(req, body, (err: Error | null, parsed?: unknown) => {
      if (err) return done(forbiddenPropertyOr(err, body), undefined);
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
          (bytes as Buffer).toString('utf8'),
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

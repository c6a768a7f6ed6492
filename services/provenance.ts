import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { Transform } from 'node:stream';
import type { FastifyInstance, FastifyRequest } from 'fastify';
import { LIBRARY_EDITION, libraryEntries } from '../src/species/library.js';

/**
 * Provenance of every answer: the software and reference-library versions, and the SHA-256 of the request body as
 * it arrived (hashed while it streams in, before any parser sees it), so that a filed report can be tied to the
 * exact bytes it was computed from.
 */

declare module 'fastify' {
  interface FastifyRequest {
    /** SHA-256 (hex) of the body as received; of the empty body when none was sent. */
    inputSha256?: string;
  }
}

function packageVersion(): string {
  // services/ and dist/services/ both sit below the package root.
  for (const rel of ['../package.json', '../../package.json']) {
    try {
      const pkg = JSON.parse(readFileSync(new URL(rel, import.meta.url), 'utf8')) as {
        name?: string;
        version?: string;
      };
      if (pkg.name === 'branchwise' && typeof pkg.version === 'string') return pkg.version;
    } catch {
      // try the next candidate
    }
  }
  return 'unknown';
}

/** The edition of the library and the first 12 hex digits of a digest of every value and source in it. */
function libraryVersion(): string {
  const digest = createHash('sha256').update(JSON.stringify(libraryEntries())).digest('hex').slice(0, 12);
  return `${LIBRARY_EDITION}+${digest}`;
}

export interface Software {
  readonly name: string;
  readonly version: string;
  readonly libraryVersion: string;
}

export const SOFTWARE: Software = Object.freeze({
  name: 'branchwise',
  version: packageVersion(),
  libraryVersion: libraryVersion(),
});

export const EMPTY_SHA256 = createHash('sha256').digest('hex');

export interface Provenance {
  readonly software: Software;
  readonly input: { readonly sha256: string };
}

export function provenanceOf(req: FastifyRequest): Provenance {
  return { software: SOFTWARE, input: { sha256: req.inputSha256 ?? EMPTY_SHA256 } };
}

/** Hash every request body as its bytes pass by (compressed or not, exactly as sent). */
export function hashRequestBodies(app: FastifyInstance): void {
  app.addHook('preParsing', async (request, reply, payload) => {
    const hash = createHash('sha256');
    const tap = new Transform({
      transform(chunk: Buffer, _enc, done) {
        hash.update(chunk);
        done(null, chunk);
      },
      flush(done) {
        request.inputSha256 = hash.digest('hex');
        done();
      },
    });
    payload.on('error', (e) => tap.destroy(e));
    // An answer sent before the body was read (a content type no route takes: 415) left the piped body stalled
    // once the tap's buffer filled, and Node no longer discards an unread body it sees being consumed: the next
    // request on the keep-alive connection then waited behind it unanswered. The rest is discarded, as Node does.
    reply.raw.once('finish', () => {
      if (payload.readableEnded || payload.destroyed) return;
      payload.unpipe(tap);
      payload.resume();
    });
    return payload.pipe(tap);
  });
}

/** A use case's result with the request's provenance and, when it sent one, its sample. */
export function stamped<T extends object>(
  req: FastifyRequest,
  result: T,
  sample?: object,
): T & Provenance & { sample?: object } {
  return { ...result, ...(sample ? { sample } : {}), ...provenanceOf(req) };
}

/** The same for one record of a batch: the digest of that record's bytes (its NDJSON line, without the line end). */
export function stampedBytes<T extends object>(
  bytes: string,
  result: T,
  sample?: object,
): T & Provenance & { sample?: object } {
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  return { ...result, ...(sample ? { sample } : {}), software: SOFTWARE, input: { sha256 } };
}

import { execFile } from 'node:child_process';
import { readFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { promisify } from 'node:util';
import type { FastifyInstance } from 'fastify';
import createClient from 'openapi-fetch';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { paths } from '../../openapi/types.js';
import { buildApp } from '../../services/app.js';
import { loadConfig } from '../../services/config.js';
import { openapiTypes } from '../../services/tools/openapi-document.js';

/**
 * The OpenAPI document as a new integrator meets it: linted by a maintained OpenAPI linter, turned into a typed
 * client by a generator, and that client (and every example the document carries) used against the running
 * service started with the defaults of `npm start` (rate limit, load shedding and timeouts on).
 */
const doc = JSON.parse(readFileSync('openapi/openapi.json', 'utf8'));
const run = promisify(execFile);

let app: FastifyInstance;
let base = '';
beforeAll(async () => {
  app = await buildApp({ config: loadConfig({ PORT: '0' }) });
  await app.listen({ host: '127.0.0.1', port: 0 });
  base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
});
afterAll(async () => {
  await app?.close();
});

type Operation = {
  operationId?: string;
  security?: unknown[];
  parameters?: { name: string; in: string; example?: unknown }[];
  responses: Record<string, unknown>;
  requestBody?: {
    content: Record<string, { schema?: unknown; example?: unknown; examples?: Record<string, { value: unknown }> }>;
  };
};
const operations = (): [string, string, Operation][] =>
  Object.entries(doc.paths as Record<string, Record<string, Operation>>).flatMap(([path, item]) =>
    Object.entries(item).map(([method, op]) => [path, method, op] as [string, string, Operation]),
  );

describe('the OpenAPI document tells the truth', () => {
  it('Redocly CLI (recommended rules) reports 0 errors and 0 warnings', async () => {
    const { stdout } = await run(
      'node_modules/.bin/redocly',
      ['lint', 'openapi/openapi.json', '--format=json', '--max-problems=1000'],
      { env: { ...process.env, REDOCLY_TELEMETRY: 'off', REDOCLY_SUPPRESS_UPDATE_NOTICE: 'true', NO_COLOR: '1' } },
    ).catch((e: { stdout: string }) => ({ stdout: e.stdout }));
    const report = JSON.parse(stdout.slice(stdout.indexOf('{'))) as {
      totals: { errors: number; warnings: number };
      problems: { ruleId: string; message: string }[];
    };
    expect(report.problems.map((p) => `${p.ruleId}: ${p.message}`)).toEqual([]);
    expect(report.totals).toMatchObject({ errors: 0, warnings: 0 });
  }, 60_000);

  it('every operation has a unique operationId', () => {
    const ids = operations().map(([, , op]) => op.operationId);
    expect(ids.every((id) => typeof id === 'string' && id.length > 0)).toBe(true);
    expect(new Set(ids).size).toBe(ids.length);
  });

  it('info.version is the package version', () => {
    expect(doc.info.version).toBe(JSON.parse(readFileSync('package.json', 'utf8')).version);
  });

  it('request bodies are the input form: spectrum units that the server defaults are not required', () => {
    const spectrum = doc.components.schemas.Spectrum;
    expect(spectrum.required).toEqual(['x', 'y']);
    const prediction = doc.components.schemas.PredictionRequest;
    expect(prediction.required).toEqual(['species']);
  });

  it('no schema is listed twice as X and XInput', () => {
    const names = Object.keys(doc.components.schemas);
    expect(names.filter((n) => n.endsWith('Input') && names.includes(n.slice(0, -5)))).toEqual([]);
  });

  it('JCAMP-DX, CSV and NDJSON bodies are declared where the service accepts them', () => {
    for (const path of ['/v1/fits', '/v1/checks', '/v1/reports', '/v1/peaks']) {
      expect(Object.keys(doc.paths[path].post.requestBody.content)).toEqual(
        expect.arrayContaining(['application/json', 'chemical/x-jcamp-dx', 'text/csv']),
      );
    }
    for (const path of ['/v1/batch/fits', '/v1/batch/checks'])
      expect(Object.keys(doc.paths[path].post.requestBody.content)).toEqual(['application/x-ndjson']);
  });

  it('the work routes declare the bearer scheme and the 401, 405, 429 and 503 answers; probes are listed and open', () => {
    expect(doc.components.securitySchemes.bearerAuth).toMatchObject({ type: 'http', scheme: 'bearer' });
    for (const [path, , op] of operations()) {
      if (!path.startsWith('/v1/')) {
        expect(op.security).toEqual([]);
        continue;
      }
      expect(op.security).toEqual([{ bearerAuth: [] }, {}]);
      expect(Object.keys(op.responses)).toEqual(expect.arrayContaining(['200', '401', '405', '429', '503']));
    }
    expect(Object.keys(doc.paths)).toEqual(expect.arrayContaining(['/healthz', '/readyz', '/metrics']));
    expect(doc.paths['/v1/species/{formula}'].get.responses['404']).toBeDefined();
  });
});

describe('a typed client generated from the document, used against the running service', () => {
  it('the committed openapi/types.d.ts is what openapi-typescript generates from the committed document', async () => {
    expect(readFileSync('openapi/types.d.ts', 'utf8')).toBe(await openapiTypes(doc));
  });

  it('fits, peaks, species and a refused body through openapi-fetch', async () => {
    const client = createClient<paths>({ baseUrl: base });
    const example = doc.paths['/v1/fits'].post.requestBody.content['application/json'].examples.assigned.value;
    const fit = await client.POST('/v1/fits', { body: example });
    expect(fit.response.status).toBe(200);
    // CO 1-0 band origin 2143.27 cm-1 (Huber & Herzberg; from memory); the example lines are an invented scan
    // generated from the library constants with 0.002 cm-1 noise, so 0.01 cm-1 is ample.
    // The document declares JSON or CSV (Accept: text/csv) for this answer; without Accept it is JSON.
    const data = fit.data;
    if (data === undefined || typeof data === 'string') throw new Error('expected the JSON form');
    const origin = data.bands.find((b) => b.band === '1-0')?.origin;
    expect(origin?.value).toBeCloseTo(2143.27, 1);
    expect(Math.abs((origin?.value ?? 0) - 2143.27)).toBeLessThan(0.01);

    const species = await client.GET('/v1/species/{formula}', { params: { path: { formula: 'CO' } } });
    expect(species.data?.formula).toBe('12C-16O');
    const missing = await client.GET('/v1/species/{formula}', { params: { path: { formula: 'ClF' } } });
    expect(missing.response.status).toBe(404);
    expect(missing.error).toMatchObject({ code: 'SPECIES_NOT_IN_LIBRARY' });
    expect(missing.response.headers.get('content-type')).toMatch(/application\/problem\+json/);

    // The generated types know the document: a misspelt field does not compile (npm run typecheck fails without the
    // error below being there).
    // @ts-expect-error "position" is required, "pos" is not a field of Line
    await client.POST('/v1/fits', { body: { lines: [{ pos: 1 }] } }).catch(() => undefined);
    const bad = await client.POST('/v1/fits', { body: { lines: [] } });
    expect(bad.response.status).toBe(400);
    expect(bad.error).toMatchObject({ status: 400, code: 'VALIDATION_FAILED' });
  });

  it('every example in the document is accepted by the operation that carries it', async () => {
    const tried: string[] = [];
    for (const [path, method, op] of operations()) {
      for (const [type, media] of Object.entries(op.requestBody?.content ?? {})) {
        const values = media.examples
          ? Object.values(media.examples).map((e) => e.value)
          : media.example !== undefined
            ? [media.example]
            : [];
        for (const v of values) {
          // Text bodies carry no species: the query string does, as its example in the document shows.
          const query = new URLSearchParams(
            type === 'application/json'
              ? []
              : (op.parameters ?? [])
                  .filter((p) => p.in === 'query' && p.example !== undefined)
                  .map((p) => [p.name, String(p.example)]),
          );
          const r = await fetch(`${base}${path}${query.size > 0 ? `?${query}` : ''}`, {
            method: method.toUpperCase(),
            headers: { 'content-type': type },
            body: typeof v === 'string' ? v : JSON.stringify(v),
          });
          const text = await r.text();
          tried.push(`${path} ${type} ${r.status}`);
          expect(r.status, `${path} ${type}: ${text.slice(0, 300)}`).toBe(200);
        }
      }
    }
    expect(tried.length).toBeGreaterThanOrEqual(12);
  }, 60_000);

  it('the documentation page is served from the service itself, with no resource from elsewhere', async () => {
    const page = await fetch(`${base}/docs/`);
    expect(page.status).toBe(200);
    // Served over plain HTTP on a lab network, the page must not have its requests upgraded to https.
    const csp = page.headers.get('content-security-policy') ?? '';
    expect(csp).toMatch(/script-src 'self'/);
    expect(csp).not.toMatch(/upgrade-insecure-requests/);
    const html = await page.text();
    const external = [...html.matchAll(/(?:src|href)="(https?:[^"]+)"/g)].map((m) => m[1]);
    expect(external).toEqual([]);
    for (const asset of [...html.matchAll(/(?:src|href)="\.\/([^"]+)"/g)].map((m) => m[1])) {
      const r = await fetch(`${base}/docs/${asset}`);
      expect(r.status, asset).toBe(200);
      expect((await r.arrayBuffer()).byteLength, asset).toBeGreaterThan(0);
    }
    const json = await fetch(`${base}/docs/json`);
    expect((await json.json()).info.version).toBe(doc.info.version);
  });
});

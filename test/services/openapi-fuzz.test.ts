import { Ajv2020 } from 'ajv/dist/2020.js';
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';
import { resolveRef, schemaArbitrary } from '../helpers/json-schema-arbitrary.js';

/**
 * Schema-driven fuzzing of the live service (the defaults of `npm start`), read from the OpenAPI document it
 * serves: for every operation, bodies the document accepts are never answered 5xx, every status is one the
 * document declares, and every JSON answer validates against the declared schema; bodies it refuses get a 4xx
 * problem; methods it does not list get 405 with Allow. Seeded; each case is its own client (under its quota).
 */
type Doc = { paths: Record<string, Record<string, Operation>> } & Record<string, unknown>;
type Operation = {
  parameters?: { in: string; name: string; schema: Record<string, unknown> }[];
  requestBody?: { content: Record<string, { schema: Record<string, unknown> }> };
  responses: Record<string, { content?: Record<string, { schema?: unknown }> }>;
};

const app = useApp();
let doc: Doc;
let ajv: Ajv2020;
const pointer = (...parts: string[]) => parts.map((p) => p.replace(/~/g, '~0').replace(/\//g, '~1')).join('/');

beforeAll(async () => {
  doc = (await app().inject({ method: 'GET', url: '/openapi.json' })).json() as Doc;
  ajv = new Ajv2020({ strict: false, allErrors: true });
  ajv.addSchema({ ...doc, $id: 'served' });
});

const operations = () =>
  Object.entries(doc.paths).flatMap(([path, ops]) => Object.entries(ops).map(([method, op]) => ({ path, method, op })));

/** Body schemas of the NDJSON batch routes: one request of the route they batch a line. */
const BATCHED: Record<string, string> = { '/v1/batch/fits': '/v1/fits', '/v1/batch/checks': '/v1/checks' };

function bodySchema(path: string, op: Operation): Record<string, unknown> | undefined {
  const target = BATCHED[path];
  if (target) return doc.paths[target]?.post?.requestBody?.content['application/json']?.schema;
  return op.requestBody?.content['application/json']?.schema;
}

async function call(method: string, path: string, url: string, body?: unknown) {
  const batch = BATCHED[path] !== undefined;
  return app().inject({
    method: method.toUpperCase() as 'GET',
    url,
    remoteAddress: nextClient(),
    ...(body !== undefined
      ? {
          payload: batch ? `${JSON.stringify(body)}\n` : JSON.stringify(body),
          headers: { 'content-type': batch ? 'application/x-ndjson' : 'application/json' },
        }
      : {}),
  });
}

/** The answer is one the document declares for the operation, and its body matches the declared schema. */
function expectDeclared(
  path: string,
  method: string,
  op: Operation,
  r: { statusCode: number; headers: Record<string, unknown>; body: string },
) {
  const where = `${method.toUpperCase()} ${path} → ${r.statusCode}: ${r.body.slice(0, 300)}`;
  expect(r.statusCode, where).toBeLessThan(500);
  expect(Object.keys(op.responses), where).toContain(String(r.statusCode));
  const type = String(r.headers['content-type'] ?? '').split(';')[0] as string;
  const declared = op.responses[String(r.statusCode)]?.content ?? {};
  expect(Object.keys(declared), where).toContain(type);
  if (type.endsWith('json') && !type.includes('ndjson')) {
    const v = ajv.getSchema(
      `served#/${pointer('paths', path, method, 'responses', String(r.statusCode), 'content', type, 'schema')}`,
    );
    expect(v, where).toBeDefined();
    const ok = v?.(JSON.parse(r.body));
    expect(ok ? [] : (v?.errors ?? []).map((e) => `${e.instancePath} ${e.message}`), where).toEqual([]);
  }
  if (type === 'application/x-ndjson') {
    for (const line of r.body.split('\n').filter((l) => l.trim() !== '')) {
      expect((JSON.parse(line) as { status: number }).status, where).toBeLessThan(500);
    }
  }
}

/**
 * Rules the document states in words rather than in JSON Schema: a spectrum's x and y have the same length, a
 * request sends lines or a spectrum (exactly one), a sample's measuredAt is an ISO 8601 time. Applied to generated
 * bodies so that "accepted by the document" means accepted by its text too.
 */
function conform(body: unknown, linesOrSpectrum: boolean): unknown {
  if (!body || typeof body !== 'object' || Array.isArray(body)) return body;
  const b = { ...(body as Record<string, unknown>) };
  const s = b.spectrum as { x?: unknown[]; y?: unknown[] } | undefined;
  if (s?.x && s.y) {
    const n = Math.min(s.x.length, s.y.length);
    b.spectrum = { ...s, x: s.x.slice(0, n), y: s.y.slice(0, n) };
  }
  if ('lines' in b && 'spectrum' in b) delete b.spectrum;
  if (linesOrSpectrum && !('lines' in b) && !('spectrum' in b)) b.lines = [{ position: 2906.25 }];
  // /v1/potentials: constants (and vData) come either from the body or from a fit of lines, never both.
  if (linesOrSpectrum && 'vMax' in b) {
    delete b.constants;
    delete b.vData;
  }
  // Rules the document states in words: a line's uncertainty is at least 1e-15 of its position, a covariance's
  // diagonal is ≥ 0.
  if (Array.isArray(b.lines))
    b.lines = b.lines.map((l: Record<string, unknown>) =>
      typeof l?.uncertainty === 'number' && typeof l.position === 'number'
        ? { ...l, uncertainty: Math.max(l.uncertainty, 1e-15 * l.position) }
        : l,
    );
  const constants = b.constants as { covariance?: { matrix?: number[][] } } | undefined;
  if (constants?.covariance?.matrix)
    b.constants = {
      ...constants,
      covariance: {
        ...constants.covariance,
        matrix: constants.covariance.matrix.map((row, i) => row.map((v, j) => (i === j ? Math.abs(v) : v))),
      },
    };
  // options.referenceSource names the source of a line (stated in words): the first line gets it; no lines, no option.
  const options = b.options as Record<string, unknown> | undefined;
  if (typeof options?.referenceSource === 'string') {
    const lines = Array.isArray(b.lines) ? (b.lines as Record<string, unknown>[]) : [];
    const first = lines[0];
    if (first && typeof first === 'object')
      b.lines = [{ ...first, source: options.referenceSource }, ...lines.slice(1)];
    else b.options = Object.fromEntries(Object.entries(options).filter(([k]) => k !== 'referenceSource'));
  }
  // A spectrum's x in a wavelength unit is at least 1e-8 µm or 1e-5 nm (its wavenumber at most 1e12 cm-1).
  const spectrum = b.spectrum as { x?: unknown; xUnit?: unknown } | undefined;
  if (
    spectrum &&
    Array.isArray(spectrum.x) &&
    typeof spectrum.xUnit === 'string' &&
    !/^(1\/|cm|wave)/i.test(spectrum.xUnit)
  )
    b.spectrum = { ...spectrum, x: spectrum.x.map((v: number) => Math.max(Math.abs(v), 1e-5)) };
  const sample = b.sample as Record<string, unknown> | undefined;
  if (sample && 'measuredAt' in sample) b.sample = { ...sample, measuredAt: '2026-12-02T09:30:00Z' };
  return b;
}

function concreteUrl(path: string, op: Operation): fc.Arbitrary<string> {
  const params = (op.parameters ?? []).filter((p) => p.in === 'path');
  if (params.length === 0) return fc.constant(path);
  return fc
    .tuple(...params.map((p) => schemaArbitrary(p.schema, doc) as fc.Arbitrary<string>))
    .map((values) => params.reduce((u, p, i) => u.replace(`{${p.name}}`, encodeURIComponent(String(values[i]))), path));
}

describe('schema-driven fuzzing of the served OpenAPI document', () => {
  it('covers every operation the document lists', () => {
    const ops = operations().map((o) => `${o.method} ${o.path}`);
    expect(ops.length).toBeGreaterThanOrEqual(9);
    for (const o of operations())
      if (o.method === 'post') expect(bodySchema(o.path, o.op), `${o.method} ${o.path}`).toBeDefined();
  });

  it('bodies the document accepts: never 5xx, declared statuses and schemas only', async () => {
    for (const { path, method, op } of operations()) {
      const schema = bodySchema(path, op);
      const top = schema && typeof schema.$ref === 'string' ? resolveRef(schema.$ref, doc) : schema;
      const linesOrSpectrum = 'lines' in ((top?.properties ?? {}) as object);
      const body = schema
        ? schemaArbitrary(schema, doc).map((b) => conform(b, linesOrSpectrum))
        : fc.constant(undefined);
      await fc.assert(
        fc.asyncProperty(concreteUrl(path, op), body, async (url, b) => {
          const r = await call(method, path, url, b);
          const refused = (r.statusCode === 400 ? [r.body] : []).concat(
            r.headers['content-type'] === 'application/x-ndjson'
              ? r.body.split('\n').filter((l) => /"status":400/.test(l))
              : [],
          );
          expect(refused, `${method} ${url} ${String(JSON.stringify(b)).slice(0, 200)}`).toEqual([]);
          expectDeclared(path, method, op, r);
        }),
        { numRuns: 40, seed: 2026 },
      );
    }
  });

  it('bodies the document refuses (an unknown property, a wrong type) get a 4xx problem', async () => {
    for (const { path, method, op } of operations()) {
      const schema = bodySchema(path, op);
      if (!schema) continue;
      const broken = fc.oneof(
        (schemaArbitrary(schema, doc) as fc.Arbitrary<Record<string, unknown>>).map((b) => ({ ...b, notInSchema: 1 })),
        fc.oneof(fc.integer(), fc.string(), fc.constant([]), fc.constant(null)),
      );
      await fc.assert(
        fc.asyncProperty(concreteUrl(path, op), broken, async (url, b) => {
          const r = await call(method, path, url, b);
          const where = `${method} ${path} ${JSON.stringify(b).slice(0, 100)} → ${r.statusCode}`;
          if (BATCHED[path]) {
            // A batch answers each line in-band: the refused line carries its 400.
            expect(r.statusCode, where).toBe(200);
            expect((JSON.parse(r.body.split('\n')[0] as string) as { status: number }).status, where).toBe(400);
          } else {
            expect(r.statusCode, where).toBe(400);
            expectDeclared(path, method, op, r);
          }
        }),
        { numRuns: 20, seed: 2027 },
      );
    }
  });

  it('methods the document does not list get 405 with Allow', async () => {
    for (const [path, ops] of Object.entries(doc.paths)) {
      const listed = Object.keys(ops).map((m) => m.toUpperCase());
      const url = path.replace('{formula}', 'HCl');
      for (const m of ['GET', 'POST', 'PUT', 'DELETE', 'PATCH'].filter((x) => !listed.includes(x))) {
        const r = await app().inject({ method: m as 'GET', url, remoteAddress: nextClient() });
        expect(r.statusCode, `${m} ${url}`).toBe(405);
        expect(String(r.headers['content-type'])).toMatch(/^application\/problem\+json/);
        const allow = String(r.headers.allow).split(/,\s*/);
        for (const l of listed) expect(allow, `${m} ${url}`).toContain(l);
      }
    }
  });
});

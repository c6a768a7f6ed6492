import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * Property-based fuzzing (fast-check, seeded): arbitrary JSON and mutated valid bodies never produce a 5xx, and
 * every error is problem+json. 1 000 cases per endpoint.
 */
const app = useApp();
const valid = assignedFitBody('HCl', ['1-0'], 6, 0.002, 3);

const anyJson = fc.jsonValue({ maxDepth: 5 });
const numberish = fc.oneof(
  fc.double({ noNaN: false }),
  fc.integer(),
  fc.constantFrom(0, -1, 1e308, -1e308, 5e-324),
  fc.string(),
  fc.constant(null),
);
const mutatedLine = fc.record(
  {
    position: numberish,
    uncertainty: numberish,
    intensity: numberish,
    assignment: fc.record(
      {
        band: fc.oneof(fc.constantFrom('1-0', '2-0', '0-0', '2-1', '0-1', '99-0', ''), fc.string()),
        branch: fc.oneof(fc.constantFrom('P', 'Q', 'R'), fc.string()),
        j: fc.oneof(fc.integer({ min: -5, max: 500 }), numberish),
        species: fc.oneof(fc.constantFrom('H35Cl', 'H37Cl', 'CO', 'D35Cl', 'Xx', ''), fc.string()),
      },
      { requiredKeys: [] },
    ),
  },
  { requiredKeys: [] },
);
const mutatedBody = fc.record(
  {
    species: fc.oneof(fc.constantFrom('HCl', 'CO', 'HBr', 'H2', '13C-16O', ''), fc.string({ maxLength: 50 })),
    unit: fc.oneof(fc.constantFrom('cm-1', 'MHz', 'GHz', 'THz', 'um', 'nm'), fc.string()),
    lines: fc.oneof(
      fc.array(mutatedLine, { maxLength: 30 }),
      fc.constant(valid.lines),
      fc.shuffledSubarray(valid.lines),
      fc.array(fc.constantFrom(...valid.lines), { maxLength: 40 }),
    ),
    options: fc.record(
      {
        uncertaintyMode: fc.constantFrom('a-posteriori', 'absolute', 'other'),
        rejectionThreshold: numberish,
        maxCentrifugalOrder: fc.integer({ min: -1, max: 6 }),
        massReducedDunham: fc.boolean(),
        termSignificance: numberish,
      },
      { requiredKeys: [] },
    ),
  },
  { requiredKeys: [] },
);

async function check(method: 'GET' | 'POST', url: string, payload?: string) {
  const r = await app().inject({
    method,
    url,
    remoteAddress: nextClient(),
    ...(payload !== undefined ? { payload, headers: { 'content-type': 'application/json' } } : {}),
  });
  expect(r.statusCode, r.body.slice(0, 300)).toBeLessThan(500);
  expect(r.statusCode, 'each case is its own client, under its quota').not.toBe(429);
  if (r.statusCode >= 400 && !url.startsWith('/graphql'))
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
  return r;
}

describe('fuzzing', () => {
  it('POST /v1/fits with arbitrary JSON', async () => {
    await fc.assert(
      fc.asyncProperty(anyJson, async (v) => void (await check('POST', '/v1/fits', JSON.stringify(v)))),
      {
        numRuns: 1000,
        seed: 42,
      },
    );
  });
  it('POST /v1/fits with mutated valid bodies', async () => {
    await fc.assert(
      fc.asyncProperty(mutatedBody, async (v) => void (await check('POST', '/v1/fits', JSON.stringify(v)))),
      {
        numRuns: 1000,
        seed: 43,
      },
    );
  });
  it('POST /v1/checks with mutated bodies and tolerance profiles', async () => {
    const tolerances = fc.record(
      {
        calibrationOffset: numberish,
        unexplainedFraction: numberish,
        temperature: fc.record({ expected: numberish, tolerance: numberish }),
        minCompleteness: numberish,
      },
      { requiredKeys: [] },
    );
    await fc.assert(
      fc.asyncProperty(
        mutatedBody,
        tolerances,
        async (v, t) => void (await check('POST', '/v1/checks', JSON.stringify({ ...v, tolerances: t }))),
      ),
      { numRuns: 1000, seed: 46 },
    );
  });
  it('POST /v1/predictions with arbitrary constants, bands and units', async () => {
    const body = fc.record(
      {
        species: fc.oneof(fc.constantFrom('CO', 'HCl', 'HBr', '13C16O', 'DF', '12C32S', 'Xx'), fc.string()),
        bands: fc.oneof(
          fc.array(fc.constantFrom('1-0', '2-0', '0-0', '3-1', '0-1', '99-98'), { maxLength: 5 }),
          anyJson,
        ),
        jMax: numberish,
        temperature: numberish,
        unit: fc.constantFrom('cm-1', 'MHz', 'GHz', 'THz', 'um', 'nm', 'x'),
        constants: fc.record(
          {
            values: fc.dictionary(
              fc.constantFrom('omega_e', 'B_e', 'alpha_e', 'D_e', 'bogus'),
              fc.record({ value: numberish, uncertainty: numberish }, { requiredKeys: [] }),
            ),
            covariance: fc.record(
              {
                names: fc.array(fc.constantFrom('omega_e', 'B_e', 'D_e'), { maxLength: 4 }),
                matrix: fc.array(fc.array(numberish, { maxLength: 4 }), { maxLength: 4 }),
              },
              { requiredKeys: [] },
            ),
          },
          { requiredKeys: [] },
        ),
      },
      { requiredKeys: [] },
    );
    await fc.assert(
      fc.asyncProperty(body, async (v) => void (await check('POST', '/v1/predictions', JSON.stringify(v)))),
      {
        numRuns: 1000,
        seed: 47,
      },
    );
  });
  it('POST /v1/peaks with arbitrary spectra', async () => {
    const spectrum = fc.record(
      {
        x: fc.oneof(
          fc.array(numberish, { maxLength: 40 }),
          fc.constant(Array.from({ length: 30 }, (_, i) => 2000 + i * 0.1)),
        ),
        y: fc.oneof(
          fc.array(numberish, { maxLength: 40 }),
          fc.array(fc.double({ min: -1, max: 2, noNaN: true }), { minLength: 30, maxLength: 30 }),
        ),
        yUnit: fc.constantFrom('absorbance', 'transmittance', 'other'),
        xUnit: fc.constantFrom('cm-1', 'um', 'nm', 'furlong'),
      },
      { requiredKeys: [] },
    );
    await fc.assert(
      fc.asyncProperty(
        spectrum,
        fc.record({ threshold: numberish, shape: fc.constantFrom('gaussian', 'voigt', 'x') }, { requiredKeys: [] }),
        async (sp, po) => void (await check('POST', '/v1/peaks', JSON.stringify({ spectrum: sp, peakOptions: po }))),
      ),
      { numRuns: 1000, seed: 48 },
    );
  });
  it('POST /v1/reports with mutated bodies', async () => {
    await fc.assert(
      fc.asyncProperty(mutatedBody, async (v) => void (await check('POST', '/v1/reports', JSON.stringify(v)))),
      {
        numRuns: 1000,
        seed: 49,
      },
    );
  });
  it('POST /v1/batch/fits with arbitrary NDJSON answers 200 with one line per request, never a 5xx line', async () => {
    const line = fc.oneof(
      mutatedBody.map((b) => JSON.stringify(b)),
      fc.string({ maxLength: 40 }),
      anyJson.map((j) => JSON.stringify(j)),
    );
    await fc.assert(
      fc.asyncProperty(fc.array(line, { maxLength: 5 }), async (lines) => {
        const payload = lines.map((l) => l.replace(/\n/g, ' ')).join('\n');
        const r = await app().inject({
          method: 'POST',
          url: '/v1/batch/fits',
          remoteAddress: nextClient(),
          payload,
          headers: { 'content-type': 'application/x-ndjson' },
        });
        expect(r.statusCode).toBe(200);
        const out = r.body
          .split('\n')
          .filter((l) => l.trim() !== '')
          .map((l) => JSON.parse(l) as { status: number });
        expect(out.length).toBe(lines.filter((l) => l.replace(/\n/g, ' ').trim() !== '').length);
        for (const o of out) expect(o.status).toBeLessThan(500);
      }),
      { numRuns: 1000, seed: 50 },
    );
  });
  it('GET /v1/species/{formula} with arbitrary strings', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.string({ maxLength: 60 }),
        async (s) => void (await check('GET', `/v1/species/${encodeURIComponent(s)}`)),
      ),
      { numRuns: 1000, seed: 44 },
    );
  });
  it('POST /graphql fit with mutated inputs answers 200 or 400 with errors, never 5xx', async () => {
    const q = 'query F($input: FitInput!) { fit(input: $input) { statistics { fitted } } }';
    await fc.assert(
      fc.asyncProperty(mutatedBody, async (v) => {
        const r = await check('POST', '/graphql', JSON.stringify({ query: q, variables: { input: v } }));
        const j = r.json();
        expect(j.data?.fit !== undefined || Array.isArray(j.errors)).toBe(true);
      }),
      { numRuns: 1000, seed: 45 },
    );
  });
});

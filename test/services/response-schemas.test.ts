import { readFileSync } from 'node:fs';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { CheckResponseSchema } from '../../services/schemas/checks.js';
import { FitResponseSchema } from '../../services/schemas/fit.js';
import { assignedFitBody } from '../helpers/requests.js';
import { hclScan } from '../helpers/scans.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

/**
 * Production answers are serialised without checking them against their zod schemas (by serialisers compiled from
 * them, services/serializer.ts); this file runs the same requests, on every route that answers JSON, through an
 * app that checks every answer (VALIDATE_RESPONSES: zod parses it, then JSON.stringify) and requires the same bytes:
 * a field the schema does not know, a wrong type or a missing required field fails here instead of in production,
 * and so does any difference between the compiled serialiser and JSON.stringify of the checked answer.
 */
let plain: FastifyInstance;
let checked: FastifyInstance;
beforeAll(async () => {
  plain = await buildApp();
  checked = await buildApp({ config: { ...DEFAULT_CONFIG, validateResponses: true } });
});
afterAll(async () => {
  await plain.close();
  await checked.close();
});

const scan = hclScan({ offset: 0.1, missing: 0.1, spurious: 0.2, seed: 78 });
const spectrum = syntheticSpectrum({
  lines: [
    { position: 2100, strength: 0.3 },
    { position: 2103, strength: 0.2 },
  ],
  from: 2095,
  to: 2108,
  step: 0.01,
  gaussianFwhm: 0.1,
  lorentzianFwhm: 0.05,
  noise: 0.001,
  baseline: [0, 0],
  seed: 9,
});

/** The path of the first difference between two parsed JSON values (numbers compared with Object.is), or undefined. */
function firstDifference(a: unknown, b: unknown, path = ''): string | undefined {
  if (typeof a !== 'object' || a === null || typeof b !== 'object' || b === null)
    return Object.is(a, b) ? undefined : `${path || '/'}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`;
  if (Array.isArray(a) !== Array.isArray(b)) return `${path}: array vs object`;
  const ka = Object.keys(a).sort();
  const kb = Object.keys(b).sort();
  if (ka.join() !== kb.join()) return `${path}: keys ${ka.join()} vs ${kb.join()}`;
  for (const k of ka) {
    const d = firstDifference((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}/${k}`);
    if (d) return d;
  }
  return undefined;
}

const example = (name: string) =>
  JSON.parse(readFileSync(new URL(`../../examples/${name}`, import.meta.url), 'utf8')) as Record<string, unknown>;

describe('answers serialised without the schema check are those the checked app sends', () => {
  it.each([
    ['POST', '/v1/fits', assignedFitBody('CO', ['1-0', '2-0'], 12, 0.001, 2)],
    ['POST', '/v1/fits?display=rounded', assignedFitBody('CO', ['1-0'], 10, 0.001, 5)],
    ['POST', '/v1/fits', example('co2-nu3-assigned.json')],
    ['POST', '/v1/fits', { ...example('fernhollow-co-cylinder-0192.json'), sample: { id: 'cylinder 0192' } }],
    ['POST', '/v1/predictions', { species: 'HCl', bands: ['1-0'], jMax: 5, temperature: 296 }],
    ['POST', '/v1/potentials', { species: 'CO', vMax: 3 }],
    ['GET', '/v1/species/CO', undefined],
    ['GET', '/v1/species/CO2', undefined],
    ['POST', '/v1/fits', { ...assignedFitBody('CO', ['1-0'], 12, 0.001, 3), options: { lean: true } }],
    ['POST', '/v1/fits', { species: 'HCl', lines: scan.peaks }],
    ['POST', '/v1/peaks', { spectrum: { x: Array.from(spectrum.x), y: Array.from(spectrum.y) } }],
    ['POST', '/v1/checks', { species: 'HCl', lines: scan.peaks }],
    ['GET', '/v1/species', undefined],
    ['POST', '/v1/fits', { species: 'CO', lines: [{ position: 'x' }] }],
  ] as const)('%s %s', async (method, url, payload) => {
    const a = await plain.inject({ method, url, ...(payload ? { payload } : {}) });
    const b = await checked.inject({ method, url, ...(payload ? { payload } : {}) });
    expect(b.statusCode).toBe(a.statusCode);
    expect(a.statusCode).toBeLessThan(500);
    expect(a.headers['content-type']).toMatch(/json/);
    // Same members and values, number for number (key order may differ: the compiled serialiser follows the schema).
    expect(firstDifference(JSON.parse(a.body), JSON.parse(b.body))).toBeUndefined();
    expect(a.body.length).toBe(b.body.length);
  });
});

describe('lean answers', () => {
  it('leave out the echoed uncertainty and given assignment of every line, and nothing else', async () => {
    const body = assignedFitBody('CO', ['1-0'], 15, 0.001, 4);
    const full = (await plain.inject({ method: 'POST', url: '/v1/fits', payload: body })).json();
    const lean = (
      await plain.inject({ method: 'POST', url: '/v1/fits', payload: { ...body, options: { lean: true } } })
    ).json();
    expect(lean.lines).toHaveLength(full.lines.length);
    full.lines.forEach((l: Record<string, unknown>, i: number) => {
      const { uncertainty: _u, assignment: _a, ...rest } = l;
      expect(lean.lines[i]).toEqual(rest);
    });
    // The constants do not depend on the answer's shape (exact).
    expect(lean.levels).toEqual(full.levels);
    expect(lean.equilibrium).toEqual(full.equilibrium);
    // The per-line part shrinks by about 40 % (measured 0.61 of its size for a 61-line CO fit); stated bound 0.7.
    expect(JSON.stringify(lean.lines).length).toBeLessThan(0.7 * JSON.stringify(full.lines).length);
  });
});

describe('?detail= asks for the lean answer on any body (JSON, CSV), and overrides options.lean', () => {
  const body = assignedFitBody('CO', ['1-0'], 12, 0.001, 6);
  const post = async (url: string, payload: unknown, type = 'application/json') =>
    (
      await plain.inject({
        method: 'POST',
        url,
        headers: { 'content-type': type },
        payload: typeof payload === 'string' ? payload : JSON.stringify(payload),
      })
    ).json() as { lines: Record<string, unknown>[] };
  it('JSON: ?detail=lean is options.lean; ?detail=full wins over options.lean', async () => {
    const viaBody = await post('/v1/fits', { ...body, options: { lean: true } });
    const viaQuery = await post('/v1/fits?detail=lean', body);
    expect(viaQuery.lines).toEqual(viaBody.lines);
    expect(viaQuery.lines[0]?.uncertainty).toBeUndefined();
    const full = await post('/v1/fits?detail=full', { ...body, options: { lean: true } });
    expect(full.lines[0]?.uncertainty).toBe(0.001);
  });
  it('CSV line list with ?species=CO&detail=lean (a CSV body has no options of its own)', async () => {
    const csv = [
      'position,uncertainty,band,branch,j',
      ...body.lines.map((l) => `${l.position},0.001,1-0,${l.assignment.branch},${l.assignment.j}`),
    ].join('\n');
    const lean = await post('/v1/fits?species=CO&detail=lean', csv, 'text/csv');
    const full = await post('/v1/fits?species=CO', csv, 'text/csv');
    expect(lean.lines).toHaveLength(body.lines.length);
    expect(lean.lines.every((l) => l.uncertainty === undefined && l.assignment === undefined)).toBe(true);
    expect(full.lines.every((l) => l.uncertainty === 0.001)).toBe(true);
  });
  it('an unknown detail is a 400 naming the parameter', async () => {
    const r = await plain.inject({ method: 'POST', url: '/v1/fits?detail=short', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('detail');
  });
});

describe("NDJSON batch results (written with JSON.stringify, one a line) match the single routes' schemas", () => {
  it.each([
    ['fits', FitResponseSchema],
    ['checks', CheckResponseSchema],
  ] as const)('/v1/batch/%s', async (path, schema) => {
    const bodies = [assignedFitBody('HCl', ['1-0'], 8, 0.002, 11), { species: 'HCl', lines: scan.peaks }];
    const r = await plain.inject({
      method: 'POST',
      url: `/v1/batch/${path}`,
      payload: bodies.map((b) => JSON.stringify(b)).join('\n'),
      headers: { 'content-type': 'application/x-ndjson' },
    });
    const out = r.body
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as { status: number; result?: unknown });
    expect(out.map((o) => o.status)).toEqual([200, 200]);
    for (const o of out) {
      const parsed = schema.safeParse(o.result);
      expect(parsed.success ? '' : parsed.error.message).toBe('');
    }
  });
});

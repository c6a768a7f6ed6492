import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { assignedFitBody } from '../helpers/requests.js';
import { hclScan } from '../helpers/scans.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

/**
 * Production answers are serialised without checking them against their zod schemas; this file runs the same
 * requests through an app that checks every answer (VALIDATE_RESPONSES) and requires the same JSON (key order aside): a field the
 * schema does not know, a wrong type or a missing required field fails here instead of in production.
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

describe('answers serialised without the schema check are those the checked app sends', () => {
  it.each([
    ['POST', '/v1/fits', assignedFitBody('CO', ['1-0', '2-0'], 12, 0.001, 2)],
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
    expect(a.json()).toEqual(b.json());
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

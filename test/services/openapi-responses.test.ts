import { readFileSync } from 'node:fs';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { assignedFitBody } from '../helpers/requests.js';
import { hclScan } from '../helpers/scans.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

/** Real responses validated against the committed OpenAPI document (JSON Schema 2020-12 via Ajv). */
const doc = JSON.parse(readFileSync('openapi/openapi.json', 'utf8'));
const ajv = new Ajv2020({ strict: false, allErrors: true });
ajv.addSchema({ ...doc, $id: 'doc' });
const validate = (component: string, data: unknown) => {
  const v = ajv.getSchema(`doc#/components/schemas/${component}`);
  if (!v) throw new Error(`no component ${component}`);
  const ok = v(data);
  return ok ? [] : (v.errors ?? []).map((e) => `${e.instancePath} ${e.message}`);
};
const app = useApp();

describe('responses match the OpenAPI document', () => {
  const scan = hclScan({ offset: 0.1, missing: 0.1, spurious: 0.2, seed: 77 });
  it.each([
    ['assigned lines', assignedFitBody('CO', ['1-0', '2-0'], 10, 0.001, 1)],
    ['a bare scan', { species: 'HCl', lines: scan.peaks }],
    [
      'pure rotation in MHz',
      {
        species: 'CO',
        unit: 'MHz',
        lines: [115271.2018, 230538.0, 345795.9899, 461040.7682].map((f, j) => ({
          position: f,
          assignment: { band: '0-0', branch: 'R', j },
        })),
      },
    ],
  ])('POST /v1/fits (%s) → FitResponse', async (_n, body) => {
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(200);
    expect(validate('FitResponse', r.json())).toEqual([]);
  });
  it('POST /v1/checks → CheckResponse', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: { species: 'HCl', lines: scan.peaks } });
    expect(validate('CheckResponse', r.json())).toEqual([]);
  });
  it('POST /v1/peaks → PeaksResponse; POST /v1/predictions → PredictionResponse', async () => {
    const s = syntheticSpectrum({
      lines: [{ position: 2143.27, strength: 0.3 }],
      from: 2140,
      to: 2146,
      step: 0.02,
      gaussianFwhm: 0.1,
      lorentzianFwhm: 0.05,
      noise: 0.0005,
      baseline: [0, 0],
      seed: 1,
    });
    const p = await app().inject({
      method: 'POST',
      url: '/v1/peaks',
      payload: { spectrum: { x: Array.from(s.x), y: Array.from(s.y) } },
    });
    expect(validate('PeaksResponse', p.json())).toEqual([]);
    const q = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: { species: 'HCl', bands: ['1-0', '2-0'] },
    });
    expect(validate('PredictionResponse', q.json())).toEqual([]);
  });
  it('GET /v1/species → SpeciesList, /v1/species/HCl → SpeciesEntry; problems → Problem', async () => {
    expect(validate('SpeciesList', (await app().inject({ method: 'GET', url: '/v1/species' })).json())).toEqual([]);
    expect(
      validate('SpeciesEntryResponse', (await app().inject({ method: 'GET', url: '/v1/species/HCl' })).json()),
    ).toEqual([]);
    const bad = await app().inject({ method: 'POST', url: '/v1/fits', payload: { lines: [{ position: -1 }] } });
    expect(validate('Problem', bad.json())).toEqual([]);
    const sci = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: 'HCl', lines: [{ position: 2900, assignment: { band: '1-0', branch: 'P', j: 0 } }] },
    });
    expect(validate('Problem', sci.json())).toEqual([]);
  });
});

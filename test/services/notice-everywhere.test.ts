import { describe, expect, it } from 'vitest';
import { SAFETY_NOTICE } from '../../services/notice.js';
import { checkExample, fitExample, peaksExample, predictionExample } from '../../services/openapi/examples.js';
import { useApp } from '../helpers/app.js';

const app = useApp();

/**
 * The README promises the safety caution in the `notice` field of every JSON result: a lab that files one answer
 * (often the library entry it checked its constants against) must find it there, not only in the list.
 */
describe('every JSON result carries the safety notice', () => {
  const gets = ['/v1/species', '/v1/species/CO', '/v1/species/H35Cl', '/v1/species/CO2', '/v1/species/16O-12C-16O'];
  for (const url of gets) {
    it(`GET ${url}`, async () => {
      const r = await app().inject({ method: 'GET', url });
      expect(r.statusCode).toBe(200);
      expect(r.json().notice).toBe(SAFETY_NOTICE);
    });
  }
  const posts: [string, unknown][] = [
    ['/v1/fits', fitExample],
    ['/v1/checks', checkExample],
    ['/v1/peaks', peaksExample],
    ['/v1/predictions', predictionExample],
    ['/v1/potentials', { species: 'CO', vMax: 2 }],
  ];
  for (const [url, body] of posts) {
    it(`POST ${url}`, async () => {
      const r = await app().inject({ method: 'POST', url, payload: body as object });
      expect(r.statusCode).toBe(200);
      expect(r.json().notice).toBe(SAFETY_NOTICE);
    });
  }
  it('GraphQL library entries (species, linearSpecies)', async () => {
    const query = '{ species(formula: "CO") { formula notice } linearSpecies(formula: "CO2") { formula notice } }';
    const r = await app().inject({ method: 'POST', url: '/graphql', payload: { query } });
    expect(r.statusCode).toBe(200);
    const data = r.json().data as Record<string, { notice: string }[]>;
    expect(data.species?.[0]?.notice).toBe(SAFETY_NOTICE);
    expect(data.linearSpecies?.[0]?.notice).toBe(SAFETY_NOTICE);
  });
});

import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';

/** GET /v1/species for linear polyatomics and GraphQL `linearSpecies` (defaults of `npm start`). */
const app = useApp();
const get = (url: string) => app().inject({ method: 'GET', url });

type V = { value: number; uncertainty: number | null; unit: string; status: string; source: string };
type Level = { v: number[]; l: number; rank?: number; label: string; databaseLabel: string; G: V; B: V; D: V };

describe('GET /v1/species for linear polyatomics', () => {
  it('answers CO2 with the chain 16O-12C-16O, its mass, levels and sources (was a 422 species parse error)', async () => {
    const r = await get('/v1/species/CO2');
    expect(r.statusCode).toBe(200);
    const e = r.json();
    expect(e.formula).toBe('16O-12C-16O');
    expect(e.kind).toBe('linear');
    expect(e.aliases).toContain('CO2');
    // AME2020: m(12C) = 12 exactly, m(16O) = 15.994914619 u → 43.989829239 u; tolerance 1e-6 u.
    expect(e.mass.value).toBeCloseTo(43.989829239, 6);
    // HITRAN isotopologue abundance of 626: 0.984204 (from memory); tolerance 1e-3.
    expect(e.naturalAbundance).toBeCloseTo(0.9842, 3);
    const levels = e.levels as Level[];
    const ground = levels.find((l) => l.databaseLabel === '00001') as Level;
    // B0 of 12C16O2 ≈ 0.39022 cm-1 (Herzberg, Infrared and Raman Spectra, from memory); tolerance 5e-5 cm-1.
    expect(Math.abs(ground.B.value - 0.39022)).toBeLessThan(5e-5);
    const nu3 = levels.find((l) => l.v.join() === '0,0,1' && l.l === 0) as Level;
    // ν3 band origin of 12C16O2: 2349.143 cm-1 (HITRAN, from memory); tolerance 0.01 cm-1.
    expect(Math.abs(nu3.G.value - 2349.143)).toBeLessThan(0.01);
    // API-CONTRACT.md: an unknown uncertainty is null, never 0.
    for (const l of levels)
      for (const x of [l.G, l.B, l.D]) if (l !== ground || x !== l.G) expect(x.uncertainty).not.toBe(0);
    for (const l of levels) for (const key of l.B.source.split('+')) expect(e.sources[key]?.cite).toBeTruthy();
  });

  it('reads chains and isotopic formulas, either way along the axis, and echoes the chain', async () => {
    expect((await get('/v1/species/16O-12C-16O')).json().formula).toBe('16O-12C-16O');
    expect((await get('/v1/species/18O-12C-16O')).json().formula).toBe('16O-12C-18O');
    expect((await get('/v1/species/HCN')).json().formula).toBe('1H-12C-14N');
    expect((await get('/v1/species/N2O')).json().formula).toBe('14N-14N-16O');
  });

  it('answers a linear species outside the library with 404 problem+json naming the known chains', async () => {
    const r = await get('/v1/species/CS2');
    expect(r.statusCode).toBe(404);
    expect(r.headers['content-type']).toContain('application/problem+json');
    expect(r.json().detail).toContain('32S-12C-32S');
  });

  it('lists the linear library beside the diatomic one, which is unchanged', async () => {
    const body = (await get('/v1/species')).json();
    expect(body.species.every((s: { reducedMass?: unknown }) => s.reducedMass !== undefined)).toBe(true);
    const chains = (body.linear as { formula: string }[]).map((s) => s.formula);
    expect(chains).toEqual(expect.arrayContaining(['16O-12C-16O', '14N-14N-16O', '1H-12C-14N', '1H-12C-12C-1H']));
    expect(body.species.map((s: { formula: string }) => s.formula)).not.toContain('16O-12C-16O');
  });

  it('answers GraphQL linearSpecies with the REST entry, and species(formula: "CO2") with a pointer to it', async () => {
    const gql = (query: string) => app().inject({ method: 'POST', url: '/graphql', payload: { query } });
    const r = (await gql('{ linearSpecies(formula: "CO2") { formula mass { value } levels } }')).json();
    const rest = (await get('/v1/species/CO2')).json();
    expect(r.data.linearSpecies[0].formula).toBe('16O-12C-16O');
    expect(r.data.linearSpecies[0].levels).toEqual(rest.levels);
    const all = (await gql('{ linearSpecies { formula } }')).json();
    expect(all.data.linearSpecies.length).toBe(rest.levels ? (await get('/v1/species')).json().linear.length : 0);
    const wrong = (await gql('{ species(formula: "CO2") { formula } }')).json();
    expect(wrong.errors[0].message).toContain('linearSpecies');
  });
});

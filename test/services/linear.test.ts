import { describe, expect, it } from 'vitest';
import { FitResponseSchema } from '../../services/schemas/fit.js';
import { useApp } from '../helpers/app.js';
import { CO2_000, CO2_001, HCN_000, HCN_010, ownBand, ownNormal } from '../linear/own-linear-lines.js';

/** Linear polyatomic fits and predictions over REST and GraphQL, with the app as `npm start` builds it. */
const app = useApp();

const co2Lines = () => ownBand(CO2_001, CO2_000, 50, 2e-4, ownNormal(5));

describe('linear polyatomic molecules over the services', () => {
  it('POST /v1/fits with CO2 assignments echoes the chain, the convention, levels with v arrays and band labels', async () => {
    const res = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO2', lines: co2Lines() } });
    expect(res.statusCode).toBe(200);
    const body = res.json();
    expect(FitResponseSchema.safeParse(body).success).toBe(true);
    expect(body.species[0].formula).toBe('16O-12C-16O');
    expect(body.convention).toMatch(/e and lower \(\+\) for f/);
    const upper = body.levels.find((l: { label: string }) => l.label === '00⁰1');
    expect(upper.v).toEqual([0, 0, 1]);
    expect(upper.l).toBe(0);
    // R&Y 1981 B(00011) = 0.3871414 (note §1.1), within 4σ of the fitted σ.
    expect(Math.abs(upper.B.value - 0.3871414)).toBeLessThan(4 * upper.B.uncertainty);
    expect(body.bands[0].label).toBe('00⁰1–00⁰0');
    expect(body.bands[0].band).toBe('00⁰1–00⁰0');
    expect(Math.abs(body.bands[0].origin.value - 2349.1433)).toBeLessThan(4 * body.bands[0].origin.uncertainty);
    expect(body.notice).toMatch(/certif/i);
  });

  it('answers a CSV constants table with level labels and q rows for a Π–Σ band', async () => {
    const lines = ownBand(HCN_010, HCN_000, 20, 1e-3, ownNormal(6));
    const res = await app().inject({
      method: 'POST',
      url: '/v1/fits?table=constants',
      headers: { accept: 'text/csv' },
      payload: { species: '1H-12C-14N', lines },
    });
    expect(res.statusCode).toBe(200);
    expect(res.body).toMatch(/01¹0,q,/);
  });

  it('GraphQL fit and predict give the same constants as REST', async () => {
    const lines = co2Lines();
    const rest = (await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO2', lines } })).json();
    const query = `query($input: FitInput!) { fit(input: $input) { species { formula mass { value } } convention
      levels { v l label B { value uncertainty } } bands { label origin { value } upper { v l } } } }`;
    const gq = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query, variables: { input: { species: 'CO2', lines } } },
    });
    expect(gq.statusCode).toBe(200);
    const data = gq.json().data.fit;
    expect(data.species[0].formula).toBe('16O-12C-16O');
    expect(data.levels[1].B.value).toBe(rest.levels[1].B.value);
    expect(data.bands[0].upper).toEqual({ v: [0, 0, 1], l: 0 });
    const pq = `query($input: PredictionInput!) { predict(input: $input) { species convention lines { band branch j position { value } upperParity } } }`;
    const p = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: {
        query: pq,
        variables: {
          input: {
            species: 'CO2',
            jMax: 10,
            levels: [
              { v: [0, 0, 0], l: 0, G: 0, B: 0.39021894, D: 1.33373e-7 },
              { v: [0, 0, 1], l: 0, G: 2349.1433, B: 0.3871414, D: 1.33034e-7 },
            ],
            levelBands: [{ upper: { v: [0, 0, 1], l: 0 }, lower: { v: [0, 0, 0], l: 0 } }],
          },
        },
      },
    });
    const pl = p.json().data.predict.lines as { branch: string; j: number }[];
    // J″ ≤ 10, even only (CO2 ground state): R(0..10) 6 lines and P(2..10) 5 lines.
    expect(pl.length).toBe(11);
    expect(pl.every((l) => l.j % 2 === 0)).toBe(true);
  });

  it('POST /v1/predictions with levels and { upper, lower } bands', async () => {
    const res = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: {
        species: 'HCN',
        jMax: 5,
        levels: [
          { v: [0, 0, 0], l: 0, G: 0, B: 1.478221814, D: 2.909e-6 },
          { v: [0, 1, 0], l: 1, G: 713.4613, B: 1.4817726, D: 2.976e-6, q: 0.00748756 },
        ],
        bands: [{ upper: { v: [0, 1, 0], l: 1 }, lower: { v: [0, 0, 0], l: 0 } }],
      },
    });
    expect(res.statusCode).toBe(200);
    const lines = res.json().lines as { branch: string; j: number; upperParity: string; relativeIntensity: number }[];
    // P(2..5), Q(1..5), R(0..5): 15 lines; Q lines reach f.
    expect(lines.length).toBe(15);
    expect(lines.filter((l) => l.branch === 'Q').every((l) => l.upperParity === 'f')).toBe(true);
    expect(Math.max(...lines.map((l) => l.relativeIntensity))).toBe(1);
  });

  it.each([
    [
      'an unknown atom',
      {
        species: '16O-12C-16Q',
        lines: [
          {
            position: 2350,
            assignment: { upper: { v: [0, 0, 1], l: 0 }, lower: { v: [0, 0, 0], l: 0 }, branch: 'R', j: 0 },
          },
        ],
      },
      422,
    ],
    ['a chain of one atom', { species: '16O-', lines: [{ position: 2350 }] }, 422],
    [
      'l > v2',
      {
        species: 'CO2',
        lines: [
          {
            position: 2350,
            assignment: { upper: { v: [0, 1, 0], l: 3 }, lower: { v: [0, 0, 0], l: 0 }, branch: 'R', j: 0 },
          },
        ],
      },
      422,
    ],
    [
      'an odd J in the CO2 ground state',
      {
        species: 'CO2',
        lines: [
          {
            position: 2350,
            assignment: { upper: { v: [0, 0, 1], l: 0 }, lower: { v: [0, 0, 0], l: 0 }, branch: 'R', j: 1 },
          },
        ],
      },
      422,
    ],
    [
      'a band string for a polyatomic',
      { species: 'CO2', lines: [{ position: 2350, assignment: { band: '1-0', branch: 'R', j: 0 } }] },
      422,
    ],
    [
      'four quanta',
      {
        species: 'CO2',
        lines: [
          {
            position: 2350,
            assignment: { upper: { v: [0, 0, 1, 0], l: 0 }, lower: { v: [0, 0, 0], l: 0 }, branch: 'R', j: 0 },
          },
        ],
      },
      422,
    ],
    [
      'a negative l',
      {
        species: 'CO2',
        lines: [
          {
            position: 2350,
            assignment: { upper: { v: [0, 0, 1], l: -1 }, lower: { v: [0, 0, 0], l: 0 }, branch: 'R', j: 0 },
          },
        ],
      },
      400,
    ],
    [
      'too few lines',
      {
        species: 'CO2',
        lines: [
          {
            position: 2350,
            assignment: { upper: { v: [0, 0, 1], l: 0 }, lower: { v: [0, 0, 0], l: 0 }, branch: 'R', j: 0 },
          },
        ],
      },
      422,
    ],
  ])('refuses %s with a problem+json', async (_what, payload, status) => {
    const res = await app().inject({ method: 'POST', url: '/v1/fits', payload });
    expect(res.statusCode).toBe(status);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  });

  it('refuses linear predictions with diatomic band strings, and diatomic strings still predict as before', async () => {
    const bad = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: { species: 'CO2', bands: ['1-0', '2-0'] },
    });
    expect(bad.statusCode).toBe(422);
    expect(bad.headers['content-type']).toMatch(/application\/problem\+json/);
    const co = await app().inject({ method: 'POST', url: '/v1/predictions', payload: { species: '12C16O', jMax: 3 } });
    expect(co.statusCode).toBe(200);
    expect(co.json().species).toBe('12C-16O');
  });
});

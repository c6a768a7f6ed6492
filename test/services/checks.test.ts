import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { seededRandom } from '../helpers/random.js';
import { syntheticScan } from '../helpers/scans.js';

const app = useApp();
const scan = syntheticScan({
  isotopologues: [{ species: 'CO', abundance: 1 }],
  bands: [{ upper: 1, lower: 0, strength: 1 }],
  temperature: 296,
  offset: 0.2,
  scalePpm: 0,
  sigma: 0.002,
  missing: 0,
  spurious: 0,
  detection: 1e-3,
  seed: 61,
  exactReference: true,
});

describe('POST /v1/checks and POST /v1/predictions', () => {
  it('returns verdict, checks with the contract ids, the fit and the caution', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: { species: 'CO', lines: scan.peaks } });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.verdict).toBe('fail');
    expect(j.checks.map((c: { id: string }) => c.id)).toEqual([
      'identity',
      'calibration',
      'unexplained-lines',
      'isotope-ratio',
      'temperature',
      'fit-quality',
    ]);
    for (const c of j.checks) expect(['pass', 'warn', 'fail', 'not-evaluated']).toContain(c.status);
    expect(j.fit.species[0].formula).toBe('12C-16O');
    expect(j.notice).toMatch(/licensed practice/);
  });

  it('GraphQL check gives the same verdict and checks as REST', async () => {
    const rest = (
      await app().inject({ method: 'POST', url: '/v1/checks', payload: { species: 'CO', lines: scan.peaks } })
    ).json();
    const q =
      'query C($i: FitInput!, $t: JSON) { check(input: $i, tolerances: $t) { verdict checks { id status message measured } } }';
    const g = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: q, variables: { i: { species: 'CO', lines: scan.peaks }, t: null } },
    });
    const gc = g.json().data.check;
    expect(gc.verdict).toBe(rest.verdict);
    expect(gc.checks.map((c: { id: string; status: string; message: string }) => [c.id, c.status, c.message])).toEqual(
      rest.checks.map((c: { id: string; status: string; message: string }) => [c.id, c.status, c.message]),
    );
  });

  it('CO declared for 150 random lines (no σ, seeded): the fit warns ASSIGNMENT_NOT_BEYOND_CHANCE, identity fails', async () => {
    const rnd = seededRandom(4242);
    const lines = Array.from({ length: 150 }, () => ({ position: 2000 + 300 * rnd(), intensity: rnd() }));
    const fit = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines } });
    expect(fit.statusCode).toBe(200);
    const codes = fit.json().warnings.map((w: { code: string }) => w.code);
    expect(codes).toContain('ASSIGNMENT_NOT_BEYOND_CHANCE');
    const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: { species: 'CO', lines } });
    expect(r.statusCode).toBe(200);
    const identity = r.json().checks[0];
    expect(identity.id).toBe('identity');
    expect(identity.status).toBe('fail');
    expect(identity.message).toMatch(
      /no more than lines at random would at this line density: the lines may not be 12C-16O/,
    );
    // The CO scan of this file is judged beyond chance: no such warning in its fit.
    const real = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines: scan.peaks } });
    expect(real.json().warnings.map((w: { code: string }) => w.code)).not.toContain('ASSIGNMENT_NOT_BEYOND_CHANCE');
  });

  it('a check whose lines cannot be fitted still answers 200 with a failed identity', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: { species: 'HCl', lines: scan.peaks } });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.verdict).toBe('fail');
    expect(j.checks[0].status).toBe('fail');
    expect(j.checks[0].measured.bestMatch).toBe('12C-16O');
  });

  it('predicts library lines in GHz for pure rotation: CO J=1–0 at 115.2712 GHz (REFERENCE-DATA §4b) within 1 MHz', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: { species: 'CO', bands: ['0-0'], jMax: 3, unit: 'GHz' },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    const l0 = j.lines.find((l: { j: number }) => l.j === 0);
    expect(l0.position.unit).toBe('GHz');
    expect(Math.abs(l0.position.value - 115.2712018)).toBeLessThan(1e-3);
    const g = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: {
        query:
          '{ predict(input: { species: "CO", bands: ["0-0"], jMax: 3, unit: "GHz" }) { lines { j position { value } } } }',
      },
    });
    expect(g.json().data.predict.lines[0].position.value).toBe(l0.position.value);
  });

  it('a species without constants is a 404 problem, bad covariance a 422', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/predictions', payload: { species: '12C32S' } });
    expect(r.statusCode).toBe(404);
    const c = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: {
        species: 'CO',
        constants: {
          values: { omega_e: { value: 2169 }, B_e: { value: 1.93 } },
          covariance: { names: ['D_e'], matrix: [[1]] },
        },
      },
    });
    expect(c.statusCode).toBe(422);
    expect(c.headers['content-type']).toMatch(/problem\+json/);
  });
});

import { describe, expect, it } from 'vitest';
import { FitResponseSchema } from '../../services/schemas/fit.js';
import { useApp } from '../helpers/app.js';
import { CO2_626, genLineList, genUnassigned } from '../helpers/independent-linear.js';

/** Unassigned linear-molecule lists over the services (the app as `npm start` builds it). */
const app = useApp();

describe('automatic assignment of linear molecules over the services', () => {
  it('POST /v1/fits with species CO2 and no assignment: lines assigned automatically (source auto), B″ not doubled', async () => {
    const truth = genLineList({
      molecule: CO2_626,
      bands: [{ upper: '00011', lower: '00001' }],
      jMax: 60,
      sigma: 1e-3,
      spurious: 2,
      seed: 31,
      minRelativeIntensity: 1e-3,
    });
    const lines = genUnassigned(truth);
    const res = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO2', lines } });
    expect(res.statusCode).toBe(200);
    const body = res.json();
    expect(FitResponseSchema.safeParse(body).success).toBe(true);
    const auto = body.lines.filter((l: { assignment?: { source: string } }) => l.assignment?.source === 'auto');
    // Every real line assigned with the generator's J″ and branch; the 2 spurious lines left unassigned.
    expect(auto.length).toBe(truth.filter((l) => l.kind === 'line').length);
    for (const l of auto) {
      const t = truth[l.index];
      expect(`${l.assignment.branch}${l.assignment.j}`).toBe(`${t?.branch}${t?.j}`);
    }
    const ground = body.levels.find((l: { label: string }) => l.label === '00⁰0');
    // Rothman & Young B″ = 0.39021894 (the generator's truth), within 4σ; a diatomic-style numbering would give ≈ 0.78.
    expect(Math.abs(ground.B.value - 0.39021894)).toBeLessThan(4 * ground.B.uncertainty);
  });

  it('a linear species without reference constants and no assignment is a 4xx problem, not a 5xx', async () => {
    const res = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: '32S-12C-32S', lines: [{ position: 1530 }, { position: 1531 }, { position: 1532 }] },
    });
    expect(res.statusCode).toBeGreaterThanOrEqual(400);
    expect(res.statusCode).toBeLessThan(500);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  });
});

describe('QA checks of linear molecules over the services', () => {
  it('POST /v1/checks with an unassigned CO2 ν3 list off by 0.02 cm⁻¹: identity and calibration pass, offset measured', async () => {
    const lines = genUnassigned(
      genLineList({
        molecule: CO2_626,
        bands: [{ upper: '00011', lower: '00001' }],
        jMax: 60,
        sigma: 1e-3,
        offset: 0.02,
        seed: 32,
        minRelativeIntensity: 1e-3,
      }),
    );
    const res = await app().inject({ method: 'POST', url: '/v1/checks', payload: { species: 'CO2', lines } });
    expect(res.statusCode).toBe(200);
    const body = res.json();
    const byId = new Map(body.checks.map((c: { id: string }) => [c.id, c]));
    expect((byId.get('identity') as { status: string }).status).toBe('pass');
    const cal = byId.get('calibration') as {
      status: string;
      measured: { offset: { value: number; uncertainty: number } };
    };
    expect(cal.status).toBe('pass');
    expect(Math.abs(cal.measured.offset.value - 0.02)).toBeLessThan(4 * cal.measured.offset.uncertainty + 1e-4);
    expect(body.fit.species[0].formula).toBe('16O-12C-16O');
    expect(body.notice).toMatch(/certif/i);
  });
});

describe('unassigned lists sent without a species', () => {
  it('a CO2 ν3 list: no diatomic explains it, the linear library does (fit of 16O-12C-16O); checks likewise', async () => {
    const lines = genUnassigned(
      genLineList({ molecule: CO2_626, bands: [{ upper: '00011', lower: '00001' }], jMax: 50, sigma: 1e-3, seed: 33 }),
    );
    const fit = await app().inject({ method: 'POST', url: '/v1/fits', payload: { lines } });
    expect(fit.statusCode).toBe(200);
    expect(fit.json().species[0].formula).toBe('16O-12C-16O');
    const check = await app().inject({ method: 'POST', url: '/v1/checks', payload: { lines } });
    expect(check.statusCode).toBe(200);
    const identity = check.json().checks.find((c: { id: string }) => c.id === 'identity');
    expect(identity.status).toBe('pass');
    expect(identity.measured.bestMatch).toBe('16O-12C-16O');
  });
  it('lines that neither library explains keep the SPECIES_UNIDENTIFIED problem (4xx)', async () => {
    const lines = [1234.5, 1237.1, 1240.9, 1244.2, 1249.8, 1251.3].map((position) => ({ position }));
    const res = await app().inject({ method: 'POST', url: '/v1/fits', payload: { lines } });
    expect(res.statusCode).toBeGreaterThanOrEqual(400);
    expect(res.statusCode).toBeLessThan(500);
  });
});

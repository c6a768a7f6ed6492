import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';

const app = useApp();

/**
 * 12C32S X¹Σ⁺ constants (Huber & Herzberg 1979, from memory): ω_e = 1285.08, ω_e x_e = 6.46, B_e = 0.8200436,
 * α_e = 0.005918, D_e = 1.4e-6 cm⁻¹; r_e = 1.5349 Å. Term values written here, not taken from src/models.
 */
function csFundamental() {
  const we = 1285.08;
  const wexe = 6.46;
  const Be = 0.8200436;
  const ae = 0.005918;
  const De = 1.4e-6;
  const term = (v: number, J: number) => {
    const h = v + 0.5;
    const x = J * (J + 1);
    return we * h - wexe * h * h + (Be - ae * h) * x - De * x * x;
  };
  const lines = [];
  for (let J = 0; J <= 25; J++) {
    lines.push({
      position: term(1, J + 1) - term(0, J),
      uncertainty: 0.001,
      assignment: { band: '1-0', branch: 'R', j: J },
    });
    if (J >= 1) {
      lines.push({
        position: term(1, J - 1) - term(0, J),
        uncertainty: 0.001,
        assignment: { band: '1-0', branch: 'P', j: J },
      });
    }
  }
  return lines;
}

describe('species outside the reference library', () => {
  it('fits assigned CS lines: the species is accepted and r_e comes from the AME2020 reduced mass', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: 'CS', lines: csFundamental() },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.species[0].formula).toBe('12C-32S');
    // μ(12C32S) = 8.725194057 u from AME2020 (computed by hand, see test/species); tolerance 1e-9 u.
    expect(Math.abs(j.species[0].reducedMass.value - 8.725194057117)).toBeLessThan(1e-9);
    // r_e of Huber & Herzberg, 1.5349 Å (from memory); one band gives B_e from B_0 and B_1: tolerance 0.001 Å.
    expect(Math.abs(j.equilibrium[0].r_e.value - 1.5349)).toBeLessThan(1e-3);
  });

  it.each(['7Li1H', 'NaCl', 'SiO', 'KBr', 'AlF', '23Na35Cl'])(
    '%s is a valid species: 404 from the library, not 422',
    async (s) => {
      const r = await app().inject({ method: 'GET', url: `/v1/species/${encodeURIComponent(s)}` });
      expect(r.statusCode).toBe(404);
      expect(r.headers['content-type']).toMatch(/application\/problem\+json/);
      expect(r.json().code).toBe('SPECIES_NOT_IN_LIBRARY');
    },
  );
});

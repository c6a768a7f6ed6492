import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { independentLines, type MoleculeConstants } from '../helpers/independent-lines.js';

/**
 * Numbering from structure through POST /v1/fits: the evidence is in the response, and a band whose numbering the
 * data cannot decide is a 422 problem, never a fit. CS X ¹Σ⁺ constants: Huber & Herzberg (1979), from memory (the
 * higher terms magnitudes only).
 */
const CS: MoleculeConstants = {
  formula: '12C-32S',
  constants: {
    omega_e: { value: 1285.08, source: 'Huber & Herzberg, from memory' },
    omega_e_x_e: { value: 6.46, source: 'Huber & Herzberg, from memory' },
    omega_e_y_e: { value: 0, source: 'not used' },
    B_e: { value: 0.8200436, source: 'Huber & Herzberg, from memory' },
    alpha_e: { value: 0.0059182, source: 'Huber & Herzberg, from memory' },
    gamma_e: { value: -1.3e-6, source: 'magnitude from memory' },
    // From CS's microwave D_0 (test/assign/structure.test.ts); the 1.4e-6 recalled before broke Kratzer's relation.
    D_e: { value: 1.331e-6, source: 'from the recalled CS rotational rest frequencies' },
    beta_e: { value: -2e-9, source: 'magnitude from memory' },
    H_e: { value: 0, source: 'not used' },
  },
};
const app = useApp();

function lines(pMin: number, seed: number, jMax = 40) {
  return independentLines({
    molecule: CS,
    seed,
    sigma: 0.001,
    unassigned: true,
    bands: [
      { upper: 1, lower: 0, jMin: pMin, jMax, branches: ['P'] },
      { upper: 1, lower: 0, jMax, branches: ['R'] },
    ],
  }).lines.map((l) => ({ position: l.position, uncertainty: l.uncertainty }));
}

describe('POST /v1/fits numbering a species the library lacks', () => {
  it('P(1) and R(0) present: method structure, the chosen numbering and its runners-up in the response', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: '12C32S', lines: lines(1, 5) },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.assignment.method).toBe('structure');
    expect(j.assignment.numbering.margin).toBeGreaterThanOrEqual(9);
    expect(j.assignment.numbering.chosen.lineAtOrigin).toBe(false);
    expect(j.assignment.numbering.runnersUp.length).toBeGreaterThan(0);
    // B_0 = B_e − α_e/2 + γ_e/4 of the generating constants, within 1e-4 cm⁻¹ (the fit's own σ is about 1e-6).
    const b0 = j.levels.find((l: { v: number }) => l.v === 0).B.value;
    expect(Math.abs(b0 - (0.8200436 - 0.0059182 / 2))).toBeLessThan(1e-4);
  });

  it('P(1)–P(4) missing, no intensities, J ≤ 40: numbered by the Kratzer test, right, with its warning', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: '12C32S', lines: lines(5, 6) },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    const b0 = j.levels.find((l: { v: number }) => l.v === 0).B.value;
    // A numbering one line off moves B_0 by α_e ≈ 0.006 cm⁻¹.
    expect(Math.abs(b0 - (0.8200436 - 0.0059182 / 2))).toBeLessThan(1e-4);
    expect(j.assignment.numbering.chosen.kratzerRatio).toBeGreaterThan(0.98);
    expect(j.assignment.numbering.chosen.kratzerRatio).toBeLessThan(1.02);
    expect(j.warnings.map((w: { code: string }) => w.code)).toContain('NUMBERING_UNCERTAIN');
  });

  it('P(1)–P(4) missing, no intensities, J ≤ 15 (D″ loose): 422 NUMBERING_AMBIGUOUS as problem+json with the numberings weighed', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: '12C32S', lines: lines(5, 6, 15) },
    });
    expect(r.statusCode).toBe(422);
    expect(r.headers['content-type']).toMatch(/problem\+json/);
    const p = r.json();
    expect(p.code).toBe('NUMBERING_AMBIGUOUS');
    expect(p.detail).toMatch(/no numbering of its band is clearly best/);
    expect(p.numberings.length).toBeGreaterThan(1);
  });
});

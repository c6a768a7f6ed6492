import { describe, expect, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';

// Real ¹²C¹⁶O database lines (fixtures/co-database-lines, HITRAN2020) of 1-0, 2-0, 3-0: four vibrational levels fix
// Y10, Y20 and Y30 with no freedom left, so ω_e carries the truncation of Y40 only if a prior on Y40 is in the fit
// (src/fit/truncation.ts#dunhamPriors). Without it ω_e came out 2169.8142569 ± 0.0000019 cm⁻¹, 355σ from Huber &
// Herzberg's 2169.81358 (from memory, REFERENCE-DATA §3); ω_e x_e 900σ and ω_e y_e 1 900σ off.
// Huber & Herzberg (1979), from memory: ω_e 2169.81358, ω_e x_e 13.28831, ω_e y_e 0.010511 cm⁻¹.
const HH = { omega_e: 2169.81358, omega_e_x_e: 13.28831, omega_e_y_e: 0.010511 };
const iso = parseSpecies('12C-16O');
const masses = new Map([[iso.formula, reducedMass(iso)]]);

function vibrationalBands(bands: readonly string[]): LineInput[] {
  return CO_DATABASE.lines
    .filter((l) => bands.includes(l.band))
    .map((l) => {
      const [upper, lower] = l.band.split('-').map(Number) as [number, number];
      return {
        position: l.position,
        uncertainty: l.uncertainty,
        assignment: {
          species: iso.formula,
          band: { upper, lower },
          branch: l.branch,
          j: l.j,
          source: 'given' as const,
        },
      };
    });
}

describe('ω_e, ω_e x_e, ω_e y_e from four real CO levels carry the truncation of Y40', () => {
  it('1-0, 2-0, 3-0: Y40 constrained, and each within 3σ of Huber & Herzberg', () => {
    const r = fitLineList(vibrationalBands(['1-0', '2-0', '3-0']), masses);
    expect(r.model.constraints.map((c) => c.parameter)).toContain('Y40');
    const y40 = r.model.constraints.find((c) => c.parameter === 'Y40');
    // 0 ± 5 (B_e/ω_e)|Y30| (the library has no ω_e z_e for CO): 5 × 1.9313/2169.8 × 0.0105 ≈ 4.7e-5, within 10 %.
    expect(y40?.prior.value).toBe(0);
    expect(Math.abs((y40?.prior.uncertainty as number) / 4.7e-5 - 1)).toBeLessThan(0.1);
    const eq = r.equilibrium[0];
    for (const k of ['omega_e', 'omega_e_x_e', 'omega_e_y_e'] as const) {
      const q = eq?.[k] as { value: number; uncertainty: number };
      expect(Math.abs(q.value - HH[k]), k).toBeLessThan(3 * q.uncertainty);
    }
    // The σ of ω_e is now of the order of the Y40 truncation (≈ 1e-3 cm⁻¹), not 2e-6.
    expect(eq?.omega_e?.uncertainty as number).toBeGreaterThan(1e-4);
    expect(r.warnings.some((w) => w.message.includes('include that of ω_e z_e (Y40)'))).toBe(true);
  });

  it('1-0 and 2-0 only: Y30 is the constrained term, as before, and Y40 is not added', () => {
    const r = fitLineList(vibrationalBands(['1-0', '2-0']), masses);
    const names = r.model.constraints.map((c) => c.parameter);
    expect(names).toContain('Y30');
    expect(names).not.toContain('Y40');
    const q = r.equilibrium[0]?.omega_e as { value: number; uncertainty: number };
    expect(Math.abs(q.value - HH.omega_e)).toBeLessThan(3 * q.uncertainty);
  });
});

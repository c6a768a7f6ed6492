import { describe, expect, it } from 'vitest';
import { runPotential } from '../../services/usecases/potential.js';
import { CO_12_16, independentLines } from '../helpers/independent-lines.js';

/**
 * Turning points from fitted constants cover the truth: 200 seeded CO scans (1-0, 2-0, 2-1; σ = 0.003 cm⁻¹) made by
 * the independent generator from Huber & Herzberg constants with γ_e, β_e and H_e (terms the fit may not carry: the
 * fitted model is not the one that made the data); truth = the same RKR from the generating constants. Required:
 * 1σ coverage 60–80 %, 2σ 92–99 %, mean pull within ±0.3 (measured 72.5–73 %, 97–97.5 %, +0.05…+0.08).
 */
describe('uncertainties of turning points from a fit', () => {
  it('cover the turning points of the generating constants (v = 0…2, 200 trials)', () => {
    const c = CO_12_16.constants;
    const values = Object.fromEntries(
      (['omega_e', 'omega_e_x_e', 'omega_e_y_e', 'B_e', 'alpha_e', 'gamma_e'] as const).map((k) => [
        k,
        { value: c[k].value },
      ]),
    );
    const truth = runPotential({ species: 'CO', vMax: 2, verify: false, constants: { values } } as never);
    const pulls: number[] = [];
    for (let t = 0; t < 200; t++) {
      const list = independentLines({
        molecule: CO_12_16,
        bands: [
          { upper: 1, lower: 0, jMax: 22 },
          { upper: 2, lower: 0, jMax: 22 },
          { upper: 2, lower: 1, jMax: 18 },
        ],
        sigma: 0.003,
        seed: 1000 + t,
      });
      const lines = list.lines.map((l) => {
        const a = l.assignment;
        if (!a) throw new Error('generator gave an unassigned line');
        return {
          position: l.position,
          ...(l.uncertainty !== undefined ? { uncertainty: l.uncertainty } : {}),
          assignment: { band: `${a.band.upper}-${a.band.lower}`, branch: a.branch, j: a.j },
        };
      });
      const r = runPotential({ species: 'CO', vMax: 2, verify: false, lines } as never);
      for (let v = 0; v <= 2; v++) {
        const a = r.levels[v];
        const b = truth.levels[v];
        if (!a || !b) throw new Error(`level ${v} missing`);
        pulls.push(
          (a.rMin.value - b.rMin.value) / a.rMin.uncertainty,
          (a.rMax.value - b.rMax.value) / a.rMax.uncertainty,
        );
      }
    }
    const within = (k: number) => pulls.filter((p) => Math.abs(p) < k).length / pulls.length;
    expect(within(1)).toBeGreaterThan(0.6);
    expect(within(1)).toBeLessThan(0.8);
    expect(within(2)).toBeGreaterThan(0.92);
    expect(within(2)).toBeLessThan(0.99);
    expect(Math.abs(pulls.reduce((s, p) => s + p, 0) / pulls.length)).toBeLessThan(0.3);
  }, 120_000);
});

import { describe, expect, it } from 'vitest';
import { fitLineList } from '../../src/fit/fit-lines.js';
import { syntheticAssignedLines } from '../helpers/synthetic.js';

/**
 * Pull test: lines generated from known constants with seeded Gaussian noise, fitted back; the reported standard
 * uncertainties (k = 1) must cover the truth about 68.3 % of the time. Bar from the brief: coverage between 0.60
 * and 0.76 over at least 200 fits. The truths are the generating Dunham coefficients (HH constants of H³⁵Cl
 * and ¹²C¹⁶O from the library), turned into the level-model quantities they imply.
 */
describe('uncertainty calibration over 240 seeded synthetic fits', () => {
  it('1σ coverage of level constants, band origins and equilibrium constants is between 0.60 and 0.76', () => {
    let inside = 0;
    let total = 0;
    const pulls: number[] = [];
    const tally = (value: number, sigma: number, truth: number) => {
      const z = (value - truth) / sigma;
      pulls.push(z);
      total++;
      if (Math.abs(z) <= 1) inside++;
    };
    for (let seed = 1; seed <= 240; seed++) {
      const co = seed % 3 === 0;
      const { lines, masses, y } = syntheticAssignedLines(
        co
          ? {
              species: 'CO',
              bands: [
                { upper: 1, lower: 0 },
                { upper: 2, lower: 0 },
                { upper: 3, lower: 0 },
              ],
              jMax: 18,
              sigma: 0.002,
              seed,
            }
          : { species: 'HCl', bands: [{ upper: 1, lower: 0 }], jMax: 10, sigma: 0.003, seed },
      );
      const Y = (k: number, l: number) => y.get(`${k},${l}`) ?? 0;
      const G = (v: number) => [1, 2, 3, 4].reduce((s, k) => s + Y(k, 0) * (v + 0.5) ** k, 0);
      const r = fitLineList(lines, masses);
      for (const lv of r.levels) {
        tally(lv.B.value, lv.B.uncertainty, Y(0, 1) + Y(1, 1) * (lv.v + 0.5));
        if (lv.D) tally(lv.D.value, lv.D.uncertainty, -Y(0, 2));
      }
      for (const b of r.bands) {
        const [u, l] = b.band.split('-').map(Number) as [number, number];
        if (b.origin) tally(b.origin.value, b.origin.uncertainty, G(u) - G(l));
      }
      const eq = r.equilibrium[0];
      if (eq?.B_e) tally(eq.B_e.value, eq.B_e.uncertainty, Y(0, 1));
      if (eq?.alpha_e) tally(eq.alpha_e.value, eq.alpha_e.uncertainty, -Y(1, 1));
      if (eq?.omega_e) tally(eq.omega_e.value, eq.omega_e.uncertainty, Y(1, 0));
      if (eq?.omega_e_x_e) tally(eq.omega_e_x_e.value, eq.omega_e_x_e.uncertainty, -Y(2, 0));
    }
    const coverage = inside / total;
    expect(total).toBeGreaterThan(1000);
    expect(coverage).toBeGreaterThan(0.6);
    expect(coverage).toBeLessThan(0.76);
    // The pulls should also be centred: |mean| < 0.1 (a bias check, common practice for pull distributions).
    const mean = pulls.reduce((s, z) => s + z, 0) / pulls.length;
    expect(Math.abs(mean)).toBeLessThan(0.1);
  });
});

import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { HCL_1_35, independentLines } from '../helpers/independent-lines.js';

/**
 * Automatic assignment must not shrink the variance (issue 11, item 4): over 200 seeded scans of the H35Cl
 * fundamental (independent generator, σ = 0.003 cm⁻¹ Gaussian, uncertainties sent, four spurious lines), the
 * a-posteriori reduced χ² and the standard uncertainty of B_0 with automatic assignment are compared with those of
 * the same scan sent with its true assignments. Bars: the mean ratio of reduced χ² (auto/true) within 0.97–1.03,
 * and in at least 98 % of the scans at least as many true lines fitted as with the true assignments (a matching
 * that dropped the noisiest lines would give ratios below 1 and fewer fitted lines).
 */
describe('automatic assignment keeps the scatter a correct model leaves', () => {
  it('200 scans: reduced χ² and σ(B_0) with automatic assignment match those with the true assignments', () => {
    const trials = 200;
    let chiRatio = 0;
    let sigmaRatio = 0;
    let complete = 0;
    for (let t = 0; t < trials; t++) {
      const g = independentLines({
        molecule: HCL_1_35,
        seed: 1000 + t,
        sigma: 0.003,
        spurious: 4,
        bands: [{ upper: 1, lower: 0, jMax: 10 }],
      });
      const given = analyseLineList(g.lines, parseSpecies('H35Cl'));
      const bare = g.lines.map(({ assignment: _a, ...rest }) => rest);
      const auto = analyseLineList(bare, parseSpecies('H35Cl'));
      const chiG = given.result.statistics.reducedChiSquare as number;
      const chiA = auto.result.statistics.reducedChiSquare as number;
      chiRatio += chiA / chiG;
      const bG = given.result.levels.find((l) => l.v === 0)?.B.uncertainty as number;
      const bA = auto.result.levels.find((l) => l.v === 0)?.B.uncertainty as number;
      sigmaRatio += bA / bG;
      const fitted = (r: typeof auto) =>
        r.result.lines.filter((l, i) => l.status === 'fitted' && !g.truth[i]?.spurious).length;
      if (fitted(auto) >= fitted(given)) complete++;
    }
    console.info(
      `auto/true over ${trials} scans: mean reduced-χ² ratio ${(chiRatio / trials).toFixed(3)}, mean σ(B_0) ratio ${(sigmaRatio / trials).toFixed(3)}, as many true lines fitted as with the true assignments in ${complete}`,
    );
    expect(chiRatio / trials).toBeGreaterThanOrEqual(0.97);
    expect(chiRatio / trials).toBeLessThanOrEqual(1.03);
    expect(sigmaRatio / trials).toBeGreaterThanOrEqual(0.97);
    expect(complete / trials).toBeGreaterThanOrEqual(0.98);
  });
});

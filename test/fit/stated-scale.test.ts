import { describe, expect, it } from 'vitest';
import { fitLineList, fitLineListDetailed, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_12_16, independentLines, termValue } from '../helpers/independent-lines.js';
import { PullTally, tallyBandsAndLevels } from '../helpers/pulls.js';

/**
 * Stated uncertainties that disagree between groups of one list (a-posteriori mode): the fundamental's σ stated 30×
 * too large (a database's coarse code), the overtone's stated right. Lines from the independent generator
 * (test/helpers/independent-lines.ts: CO with ω_e y_e, γ_e, β_e, H_e). With one scale s² for the whole list the
 * overtone's lines are judged against s ≈ 0.7 of their σ, so honest 3.6σ lines become 5σ "outliers"; with a scale
 * per group they are judged against their own scatter.
 */
const co = parseSpecies(CO_12_16.formula);
const masses = new Map([[co.formula, reducedMass(co)]]);
const C = CO_12_16.constants;

function mixed(seed: number): LineInput[] {
  const fundamental = independentLines({
    molecule: CO_12_16,
    bands: [{ upper: 1, lower: 0, jMax: 24 }],
    sigma: 0.0005,
    reportedSigmaFactor: 30,
    seed,
  }).lines;
  const overtone = independentLines({
    molecule: CO_12_16,
    bands: [{ upper: 2, lower: 0, jMax: 24 }],
    sigma: 0.002,
    seed: seed + 50_000,
  }).lines;
  return [...fundamental, ...overtone] as LineInput[];
}

describe('stated uncertainties that disagree between groups (a-posteriori mode)', () => {
  it('honest 3.6σ lines of the correctly stated band stay in the fit, and the rescaling is reported', () => {
    const lines = mixed(1);
    // Three overtone lines put at 3.6 of their stated σ from their true position (the generator's own noise
    // removed): within what a correct model leaves (Bonferroni floor for 98 lines: 4.0).
    const exact = (i: number) => {
      const a = (lines[i] as LineInput).assignment as NonNullable<LineInput['assignment']>;
      const uj = a.branch === 'R' ? a.j + 1 : a.j - 1;
      return termValue(C, a.band.upper, uj) - termValue(C, a.band.lower, a.j);
    };
    for (const i of [55, 70, 85]) lines[i] = { ...(lines[i] as LineInput), position: exact(i) + 3.6 * 0.002 };
    const d = fitLineListDetailed(lines, masses);
    expect(d.result.statistics.rejected).toBe(0);
    const w = d.result.warnings.find((x) => x.code === 'UNCERTAINTY_RESCALED');
    expect(w?.message).toContain('12C-16O 1-0');
    // The fundamental's stated 0.015 cm-1 is taken at its scatter 0.0005 (tolerance ±25 %: one rms from 49 lines
    // scatters by about 10 %); the overtone keeps about its own 0.002, raised by the three planted lines (their
    // 3 × 3.6² add about 0.8 to a mean square of 1 over 49 lines: × 1.3), so up to 1.5.
    const t10 = { species: co.formula, band: { upper: 1, lower: 0 }, branch: 'R' as const, j: 3 };
    const t20 = { species: co.formula, band: { upper: 2, lower: 0 }, branch: 'R' as const, j: 3 };
    expect(d.lineSigma(t10, { uncertainty: 0.015 }) / 0.0005).toBeGreaterThan(0.75);
    expect(d.lineSigma(t10, { uncertainty: 0.015 }) / 0.0005).toBeLessThan(1.25);
    expect(d.lineSigma(t20, { uncertainty: 0.002 }) / 0.002).toBeGreaterThan(0.75);
    expect(d.lineSigma(t20, { uncertainty: 0.002 }) / 0.002).toBeLessThan(1.5);
  });

  it('absolute mode takes the stated σ at their word (no rescaling)', () => {
    const r = fitLineList(mixed(2), masses, { uncertaintyMode: 'absolute' });
    expect(r.warnings.some((x) => x.code === 'UNCERTAINTY_RESCALED')).toBe(false);
  });

  it('lists whose groups agree are left as they were (σ right in both bands: no rescaling in 200 lists but a few)', () => {
    let rescaled = 0;
    for (let seed = 1; seed <= 200; seed++) {
      const lines = [
        ...independentLines({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 20 }], sigma: 0.001, seed })
          .lines,
        ...independentLines({
          molecule: CO_12_16,
          bands: [{ upper: 2, lower: 0, jMax: 20 }],
          sigma: 0.004,
          seed: seed + 50_000,
        }).lines,
      ] as LineInput[];
      const r = fitLineList(lines, masses);
      if (r.warnings.some((x) => x.code === 'UNCERTAINTY_RESCALED')) rescaled++;
    }
    // Each of two groups is tested at p < 0.001 two-sided: expected 0.4 false alarms in 200 lists; ≤ 3 allowed
    // (Poisson tail P(≥ 4) ≈ 8e-4).
    expect(rescaled).toBeLessThanOrEqual(3);
  });

  it('200 lists: the level constants and band origins are covered (1σ 0.60–0.76, 2σ 0.91–0.99)', () => {
    const tally = new PullTally();
    for (let seed = 1; seed <= 200; seed++) {
      const r = fitLineList(mixed(seed), masses);
      tallyBandsAndLevels(tally, r, C);
    }
    if (process.env.PULLS_LOG) console.info(tally.table());
    const s = tally.summary();
    // The bands of test/fit/scatter.test.ts (nominal 0.683 and 0.954; the pulls of one list are correlated).
    expect(s.within1).toBeGreaterThan(0.6);
    expect(s.within1).toBeLessThan(0.76);
    expect(s.within2).toBeGreaterThan(0.91);
    expect(s.within2).toBeLessThan(0.99);
    expect(Math.abs(s.mean)).toBeLessThan(0.35);
  });
});

import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { type HeldoutOptions, heldoutScan, scoreScan } from '../helpers/heldout-scans.js';

// A hot gas sent without intensities and without a temperature (src/assign/analyse.ts#withoutIntensities): nothing
// to read the temperature from, so the hot bands are never predicted strong enough to seed at 296 K. The lines are
// assigned again as if hot when fewer than half are fitted, a hot band was found, or, the case here, as many lines as
// make a hot band are left unexplained while over half are fitted (the fundamental plus spurious lines). Scans of
// test/helpers/heldout-scans.ts (its own Dunham constants with higher terms, natural isotopologues; nothing shared
// with the library): H¹⁹F and H³⁵Cl/H³⁷Cl 1-0 with its hot bands at 950–1 200 K, 20 % spurious lines, σ sent on half.
// Measured before the unexplained-lines trigger: clear lines 997 of 1 046 right (H¹⁹F 2-1 left in five of six
// scans), none wrong, 3 of 279 spurious taken; after: 1 045 of 1 046, none wrong, 3 taken.

function scan(molecule: 'HF' | 'HCl', k: number) {
  const o: HeldoutOptions = {
    molecule,
    temperature: 900 + 50 * k,
    deltaV: [1],
    a: { offset: 0.02 * (k - 3), sigma: 0.002 },
    sigmaGiven: k % 2 === 0,
    intensities: false,
    detection: 0.001,
    missing: 0.02,
    spurious: 0.2,
    resolution: 0.02,
    seed: 1000 + k,
  };
  return heldoutScan(o);
}

describe('a hot scan without intensities or temperature', () => {
  it('HF and HCl 1-0 with hot bands, 950–1 200 K: ≥ 99 % of clear lines right, none wrong, ≤ 2 % spurious taken', () => {
    const total = { clear: 0, clearRight: 0, wrong: 0, spurious: 0, spuriousTaken: 0 };
    for (const molecule of ['HF', 'HCl'] as const) {
      for (let k = 1; k <= 6; k++) {
        const s = scan(molecule, k);
        const r = analyseLineList(s.peaks, parseSpecies(molecule), {}).result;
        const score = scoreScan(s.truth, r.lines);
        for (const key of Object.keys(total) as (keyof typeof total)[]) total[key] += score[key];
      }
    }
    expect(total.wrong).toBe(0);
    expect(total.clearRight / total.clear).toBeGreaterThanOrEqual(0.99);
    expect(total.spuriousTaken / total.spurious).toBeLessThanOrEqual(0.02);
  });
});

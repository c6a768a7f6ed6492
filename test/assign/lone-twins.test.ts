import { describe, expect, it } from 'vitest';
import type { AnalyseOptions } from '../../src/assign/analyse.js';
import type { CandidateLine } from '../../src/assign/candidates.js';
import { resolveLoneTwins, type TwinContext, twinCandidates } from '../../src/assign/lone-twins.js';
import type { ObservedPeak } from '../../src/assign/match.js';
import { analysedHeldout } from '../helpers/heldout-analysed.js';

/**
 * Lines of the two bromine isotopologues taken for one another where the reference drifts from the lines by more
 * than the isotope splitting (src/assign/lone-twins.ts). Held-out scans of test/helpers/heldout-scans.ts: their own
 * Dunham constants (γ_e, β_e, H_e, L_e that the library lacks), natural abundances (CIAAW, from memory), two
 * instruments whose lines are interleaved at random.
 */
describe('HBr 2-0/3-0 with hot bands at 837 K, two instruments interleaved (held-out seed 163)', () => {
  const { r, s } = analysedHeldout(163, { temperature: 837 });

  it('numbers ≥ 95 % of the clear lines right and ≤ 5 wrong (before: 132 of 318, 102 wrong: H81Br 3-1 and 4-2 lines taken as H79Br)', () => {
    expect(s.wrong, s.misses.slice(0, 8).join('; ')).toBeLessThanOrEqual(5);
    expect(s.clearRight / s.clear).toBeGreaterThanOrEqual(0.95);
  });

  it('finds 3-1 of both isotopologues', () => {
    for (const species of ['1H-79Br', '1H-81Br'])
      expect(r.bands.find((b) => b.species === species && b.band === '3-1')?.lines, species).toBeGreaterThanOrEqual(25);
  });
});

describe('HBr 1-0 with hot bands at 1421 K, two instruments interleaved (held-out seed 35)', () => {
  const { s } = analysedHeldout(35, { temperature: 1421 });

  it('≥ 78 % of the clear lines right and ≤ 6 wrong (before: 195 of 260, 44 wrong, high-J twins swapped; measured 207, 3)', () => {
    expect(s.wrong, s.misses.slice(0, 8).join('; ')).toBeLessThanOrEqual(6);
    expect(s.clearRight / s.clear).toBeGreaterThanOrEqual(0.78);
  });
});

describe('the lone-twin test itself', () => {
  // Two isotopologues of one transition 0.4 cm⁻¹ apart (A above B), equal abundance.
  const cand = (species: string, position: number): CandidateLine => ({
    species,
    band: { upper: 1, lower: 0 },
    branch: 'P',
    j: 10,
    position,
    lowerEnergy: 900,
    intensity: 1,
  });
  const a = cand('1H-79Br', 2400.4);
  const b = cand('1H-81Br', 2400.0);
  const twins = twinCandidates([a, b]);
  const context = (
    positions: number[],
    intensities?: number[],
    refused = false,
    fitted: TwinContext['fitted'] = () => undefined,
  ): TwinContext => {
    const peaks = positions.map((position, i) => ({
      position,
      uncertainty: 0.002,
      ...(intensities ? { intensity: intensities[i] as number } : {}),
    }));
    const free: ObservedPeak[] = peaks.map((p, index) => ({ index, sigma: 0.002, ...p }));
    return { peaks, freeNear: () => free, refused: () => refused, swapped: () => {}, fitted };
  };

  it('pairs each candidate with the other isotopologue’s same transition, not with itself', () => {
    expect(twins.get(a)).toEqual([b]);
    expect(twins.get(b)).toEqual([a]);
    expect(twinCandidates([a, cand('1H-81Br', 2397)]).size).toBe(0);
  });

  it('a line held as A with a free peak where A would be if it were B: relabelled B, the peak A', () => {
    // Both shifted by the same 0.9 cm⁻¹ (the reference's drift), 0.4 apart as the splitting says.
    const auto = new Map([[0, a]]);
    expect(resolveLoneTwins(context([2400.9, 2401.302]), twins, auto)).toBe(1);
    expect(auto.get(0)).toBe(b);
    expect(auto.get(1)).toBe(a);
  });

  it('kept when a peak also sits where B would be with the present labelling, or when the swap is refused', () => {
    const both = new Map([[1, a]]);
    expect(resolveLoneTwins(context([2400.5, 2400.9, 2401.3]), twins, both)).toBe(0);
    expect(both.get(1)).toBe(a);
    const refused = new Map([[0, a]]);
    expect(resolveLoneTwins(context([2400.9, 2401.3], undefined, true), twins, refused)).toBe(0);
  });

  it('left to the fit when the last fit places both twins within a sixth of the splitting (3σ)', () => {
    const sharp = new Map([[0, a]]);
    const fit = (c: CandidateLine) => ({ value: c.position + 0.9, variance: 0.01 ** 2 });
    expect(resolveLoneTwins(context([2400.9, 2401.302], undefined, false, fit), twins, sharp)).toBe(0);
    const loose = new Map([[0, a]]);
    const vague = (c: CandidateLine) => ({ value: c.position + 0.9, variance: 0.1 ** 2 });
    expect(resolveLoneTwins(context([2400.9, 2401.302], undefined, false, vague), twins, loose)).toBe(1);
  });

  it('kept when the partner is off the splitting by more than 3σ, or its intensity strays from the abundance ratio', () => {
    const far = new Map([[0, a]]);
    expect(resolveLoneTwins(context([2400.9, 2401.36]), twins, far)).toBe(0);
    const weak = new Map([[0, a]]);
    expect(resolveLoneTwins(context([2400.9, 2401.3], [1, 0.1]), twins, weak)).toBe(0);
    const even = new Map([[0, a]]);
    expect(resolveLoneTwins(context([2400.9, 2401.3], [1, 0.9]), twins, even)).toBe(1);
  });
});

/** A held-out scan's bars: most wrong lines, least share of clear lines right. */
interface Guard {
  readonly title: string;
  readonly seed: number;
  readonly options: AnalyseOptions;
  readonly wrong: number;
  readonly clearShare: number;
}

// Judged from the first round in every assignment (not as a second attempt kept when it fits more), the swaps sent
// seeds 98 and 55 elsewhere: 213 → 197 of 214 clear lines, 106 → 93 with 7 wrong (and seed 32, too slow for this
// suite: 632 → 310 of 752; 652 measured now).
const GUARDS: readonly Guard[] = [
  {
    title: 'HBr 2-0/3-0 at 993 K sent without a temperature, σ sent (seed 98): measured 213 of 214, none wrong',
    seed: 98,
    options: {},
    wrong: 0,
    clearShare: 0.97,
  },
  {
    title: 'HBr 3-0 at 349 K, one instrument (seed 55): measured 106 of 106, none wrong',
    seed: 55,
    options: { temperature: 349 },
    wrong: 0,
    clearShare: 0.97,
  },
  {
    title:
      'HBr 2-0/3-0 at 438 K, two instruments in windows (seed 126): before 94 of 107, 5 wrong; measured 107, 1 wrong',
    seed: 126,
    options: {},
    wrong: 2,
    clearShare: 0.97,
  },
  {
    title: 'HBr 2-0/3-0 at 1437 K, one instrument (seed 1): before 228 of 276, 14 wrong; measured 273, none wrong',
    seed: 1,
    options: { temperature: 1437 },
    wrong: 2,
    clearShare: 0.95,
  },
];

describe('held-out scans the twin judgement must help or leave alone', () => {
  for (const g of GUARDS)
    it(g.title, () => {
      const { s } = analysedHeldout(g.seed, g.options);
      expect(s.wrong, s.misses.slice(0, 8).join('; ')).toBeLessThanOrEqual(g.wrong);
      expect(s.clearRight / s.clear).toBeGreaterThanOrEqual(g.clearShare);
    });
});

import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import type { CandidateLine } from '../../src/assign/candidates.js';
import { driftedVote, driftFactor, driftLimit, shiftAt } from '../../src/assign/drift.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import {
  type HeldoutOptions,
  heldoutScan,
  isotopologues,
  MOLECULES,
  rotationalConstant,
  scoreScan,
} from '../helpers/heldout-scans.js';

/**
 * The library holds no γ_e: its overtones of the light hydrides drift from the true lines as J grows. The lists here
 * come from test/helpers/heldout-scans.ts (its own constants, with γ_e, β_e, H_e the library lacks, each value's
 * source named there; nothing of src/), so the library is not the model that made them.
 */

const line = (upper: number, lower: number, branch: 'P' | 'R', j: number, position = 0): CandidateLine => ({
  species: '1H-19F',
  band: { upper, lower },
  branch,
  j,
  position,
  lowerEnergy: 0,
  intensity: 1,
});

describe('the drift of a reference without γ_e', () => {
  it('driftFactor is (v′+½)² J′(J′+1) − (v″+½)² J″(J″+1), worked by hand', () => {
    expect(driftFactor(line(2, 0, 'R', 0))).toBe(6.25 * 2);
    expect(driftFactor(line(2, 0, 'P', 1))).toBe(-0.25 * 2);
    expect(driftFactor(line(3, 0, 'R', 4))).toBe(12.25 * 30 - 0.25 * 20);
    expect(driftFactor(line(3, 1, 'P', 3))).toBe(12.25 * 6 - 2.25 * 12);
  });

  it('shiftAt adds the drift to the offset only when there is one', () => {
    expect(shiftAt({ offset: 0.1 }, line(2, 0, 'R', 0))).toBe(0.1);
    expect(shiftAt({ offset: 0.1, drift: 0.002 }, line(2, 0, 'R', 0))).toBeCloseTo(0.1 + 0.002 * 12.5, 15);
  });

  it('driftLimit: half α_e²/B_e of the library entry, none when the entry has γ_e', () => {
    const hf = dunhamFromEntry(constantsFor(parseSpecies('1H-19F')) ?? expect.fail('HF in the library'));
    // Library HF: α_e 0.798, B_e 20.9557 cm⁻¹ (Huber & Herzberg, as the library quotes them).
    expect(driftLimit(hf)).toBeCloseTo((0.5 * 0.798 ** 2) / 20.9557, 12);
    // The generator's HF γ_e (5.4e-3 cm⁻¹, magnitude from memory) lies inside it.
    expect(driftLimit(hf)).toBeGreaterThan(5.4e-3);
    expect(driftLimit(new Map([...hf, ['2,1', 5e-3]]))).toBe(0);
    expect(driftLimit(undefined)).toBe(0);
  });

  it('driftedVote finds the offset and drift that put a drifting band on its peaks', () => {
    // A band whose true lines lie at the reference + 0.07 + 0.004 × driftFactor (made here, not by the library).
    const top = [0, 1, 2, 3, 4].flatMap((j) => [
      line(2, 0, 'R', j, 7750 + 40 * (j + 1)),
      ...(j > 0 ? [line(2, 0, 'P', j, 7750 - 40 * j)] : []),
    ]);
    const observed = top.map((c) => c.position + 0.07 + 0.004 * driftFactor(c));
    const sorted = Float64Array.from(observed).sort();
    const d = driftedVote(top, observed, sorted, 0.5, 0.015, new Float64Array(), 0);
    const v = d ?? expect.fail('a vote');
    expect(v.matches).toBe(top.length);
    // A seed, not a fit: the smallest drift that puts every line within the vote's tolerance wins.
    expect(Math.abs(v.drift - 0.004)).toBeLessThan(5e-4);
    top.forEach((c, i) => {
      expect(Math.abs((observed[i] as number) - c.position - shiftAt(v, c))).toBeLessThanOrEqual(v.tolerance);
    });
    // Without a drift allowed, no drift is found.
    expect(driftedVote(top, observed, sorted, 0.5, 0, new Float64Array(), 0)).toBeUndefined();
  });
});

const HF_OVERTONES: HeldoutOptions = {
  molecule: 'HF',
  temperature: 400,
  deltaV: [2, 3],
  a: { offset: 0.06, sigma: 0.001 },
  sigmaGiven: false,
  intensities: true,
  detection: 1e-3,
  missing: 0.05,
  spurious: 0.1,
  resolution: 0.01,
  seed: 1,
};

describe('H19F 2-0 + 3-0 lists from the held-out generator (γ_e 5.4e-3 cm⁻¹ the library lacks)', () => {
  const cases: [string, HeldoutOptions][] = [
    ['one instrument', HF_OVERTONES],
    ['one instrument, σ sent, seed 2', { ...HF_OVERTONES, sigmaGiven: true, seed: 2 }],
    [
      'two instruments, lines at random',
      { ...HF_OVERTONES, seed: 3, b: { offset: -0.01, sigma: 0.002, layout: 'random' } },
    ],
  ];
  for (const [name, o] of cases) {
    it(`${name}: every clear line right, none wrong (refused before: "nothing matches the declared species")`, () => {
      const scan = heldoutScan(o);
      const a = analyseLineList(scan.peaks, parseSpecies('HF'), { temperature: o.temperature });
      const s = scoreScan(scan.truth, a.result.lines);
      expect(s.wrong, s.misses.join('; ')).toBe(0);
      expect(s.clear).toBeGreaterThan(15);
      expect(s.clearRight, s.misses.join('; ')).toBe(s.clear);
    });
  }

  it("B_2 and B_3 as fitted lie within 3σ of the generator's (its Y_k1 summed at v + ½)", () => {
    const scan = heldoutScan(HF_OVERTONES);
    const a = analyseLineList(scan.peaks, parseSpecies('HF'), { temperature: HF_OVERTONES.temperature });
    const hf = isotopologues(MOLECULES.HF).find((i) => i.formula === '1H-19F') ?? expect.fail('1H-19F');
    for (const v of [2, 3]) {
      const level = a.result.levels.find((l) => l.species === '1H-19F' && l.v === v) ?? expect.fail(`B_${v}`);
      const truth = rotationalConstant(hf.y, v);
      expect(Math.abs(level.B.value - truth) / level.B.uncertainty, `B_${v}`).toBeLessThan(3);
    }
  });
});

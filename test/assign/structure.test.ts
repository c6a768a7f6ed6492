import { afterAll, describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { ScienceError } from '../../src/errors.js';
import { constantsFor } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CS, LIH, NACL, SIO } from '../helpers/absent-species.js';
import { independentLines, type MoleculeConstants } from '../helpers/independent-lines.js';

/**
 * Numbering from band structure alone, for species the library does not hold. Lines come from the independent
 * generator (test/helpers/independent-lines.ts: its own term values and J bookkeeping) with the constants below,
 * ground states X ¹Σ⁺, all from Huber & Herzberg, Constants of Diatomic Molecules (1979), FROM MEMORY (the higher
 * terms γ_e, β_e, H_e are recalled magnitudes only, or estimates where marked). The bars (issue 12): ≥ 98 % of
 * the true lines correct, ≤ 5 % of spurious lines taken, and never a wrong numbering reported: where the data
 * cannot decide (no intensities and lines missing at the origin) the service must refuse with NUMBERING_AMBIGUOUS.
 */
// X ¹Σ⁺ constants of CS, SiO, LiH and NaCl: test/helpers/absent-species.ts (Huber & Herzberg 1979, from memory; CS
// D_e from its microwave D_0).

interface Scenario {
  readonly molecule: MoleculeConstants;
  readonly pMin: number;
  readonly pMax: number;
  readonly rMax: number;
  readonly sigma: number;
  readonly intensities: boolean;
  readonly uncertainties: boolean;
  readonly spurious: number;
  readonly seed: number;
}

/** Shares measured per scenario, printed once at the end (for the closing note). */
const measured: Record<string, string> = {};
const pct = (a: number, b: number) => (b > 0 ? `${((100 * a) / b).toFixed(1)} %` : '–');

function record(name: string, r: ReturnType<typeof run>): void {
  measured[name] = r.refused
    ? 'refused (NUMBERING_AMBIGUOUS)'
    : `correct ${pct(r.correct, r.trueLines)}, wrong ${pct(r.wrong, r.trueLines)}, unassigned ${pct(r.unassigned, r.trueLines)}, spurious taken ${pct(r.spuriousTaken, r.spurious)} (margin ${r.a.assignment.numbering?.margin?.toFixed(1) ?? '∞'})`;
}

function run(s: Scenario) {
  const list = independentLines({
    molecule: s.molecule,
    seed: s.seed,
    sigma: s.sigma,
    withUncertainties: s.uncertainties,
    unassigned: true,
    spurious: s.spurious,
    ...(s.intensities ? { temperature: 296, intensityNoise: 0.1 } : {}),
    bands: [
      { upper: 1, lower: 0, jMin: s.pMin, jMax: s.pMax, branches: ['P'] },
      { upper: 1, lower: 0, jMax: s.rMax, branches: ['R'] },
    ],
  });
  const formula = s.molecule.formula.replace('-', '');
  try {
    const a = analyseLineList(list.lines, parseSpecies(formula));
    let correct = 0;
    let wrong = 0;
    let unassigned = 0;
    let spuriousTaken = 0;
    let trueLines = 0;
    let spurious = 0;
    a.result.lines.forEach((l, i) => {
      const t = list.truth[i];
      const as = l.status === 'fitted' ? l.assignment : undefined;
      if (!t || t.spurious) {
        spurious++;
        if (as) spuriousTaken++;
        return;
      }
      trueLines++;
      if (!as) unassigned++;
      else if (as.band === t.band && as.branch === t.branch && as.j === t.j) correct++;
      else wrong++;
    });
    return { refused: false as const, a, correct, wrong, unassigned, spuriousTaken, trueLines, spurious };
  } catch (e) {
    if (e instanceof ScienceError && e.code === 'NUMBERING_AMBIGUOUS') return { refused: true as const, error: e };
    throw e;
  }
}

const base = { sigma: 0.001, uncertainties: true, intensities: false, spurious: 0, seed: 1 };
/** Lines near the origin present (P(1) and R(0)): the numbering must be found, with or without intensities. */
const decisive: [string, Scenario][] = [
  ['CS, P(1)–P(60), R(0)–R(7)', { ...base, molecule: CS, pMin: 1, pMax: 60, rMax: 7 }],
  [
    'CS, P(1)–P(99), R(0)–R(7), no uncertainties',
    { ...base, molecule: CS, pMin: 1, pMax: 99, rMax: 7, uncertainties: false },
  ],
  [
    'CS, P(1)–P(20), R(0)–R(40), 8 spurious lines',
    { ...base, molecule: CS, pMin: 1, pMax: 20, rMax: 40, spurious: 8, seed: 2 },
  ],
  [
    'SiO, P(1)–P(45), R(0)–R(45), 10 spurious lines',
    { ...base, molecule: SIO, pMin: 1, pMax: 45, rMax: 45, spurious: 10, seed: 3 },
  ],
  [
    'LiH, P(1)–P(15), R(0)–R(15), σ 0.005',
    { ...base, molecule: LIH, pMin: 1, pMax: 15, rMax: 15, sigma: 0.005, seed: 5 },
  ],
  ['LiH, P(1)–P(6), R(0)–R(18)', { ...base, molecule: LIH, pMin: 1, pMax: 6, rMax: 18, seed: 6 }],
  [
    'NaCl, P(1)–P(80), R(0)–R(80), no uncertainties',
    { ...base, molecule: NACL, pMin: 1, pMax: 80, rMax: 80, uncertainties: false, seed: 7 },
  ],
  // The innermost P lines cut, intensities sent: the Boltzmann plot decides.
  [
    'CS, P(5)–P(40), R(0)–R(40), intensities',
    { ...base, molecule: CS, pMin: 5, pMax: 40, rMax: 40, intensities: true, spurious: 8, seed: 8 },
  ],
  [
    'SiO, P(3)–P(50), R(0)–R(30), intensities',
    { ...base, molecule: SIO, pMin: 3, pMax: 50, rMax: 30, intensities: true, seed: 9 },
  ],
  [
    'NaCl, P(4)–P(70), R(0)–R(70), intensities',
    { ...base, molecule: NACL, pMin: 4, pMax: 70, rMax: 70, intensities: true, seed: 10 },
  ],
];
/** The innermost P lines cut and no intensities: a right numbering, or a refusal; never a wrong one. */
const hard: [string, Scenario][] = [
  ['CS, P(2)–P(40), R(0)–R(40)', { ...base, molecule: CS, pMin: 2, pMax: 40, rMax: 40, seed: 11 }],
  [
    'CS, P(5)–P(40), R(0)–R(40), 8 spurious lines',
    { ...base, molecule: CS, pMin: 5, pMax: 40, rMax: 40, spurious: 8, seed: 12 },
  ],
  ['SiO, P(3)–P(60), R(0)–R(10)', { ...base, molecule: SIO, pMin: 3, pMax: 60, rMax: 10, seed: 13 }],
  // P(1) present, but the whole list read as one R branch (its P lines as R(0)–R(9) with the origin gap a lost R
  // line) fits the positions as well; D″ is then loose (Kratzer 0.82 ± 12 %, against 1.003 ± 4 %): odds of about
  // 10 : 1, not enough to number.
  ['SiO, P(1)–P(10), R(0)–R(50)', { ...base, molecule: SIO, pMin: 1, pMax: 10, rMax: 50, seed: 4 }],
  ['LiH, P(2)–P(15), R(0)–R(15)', { ...base, molecule: LIH, pMin: 2, pMax: 15, rMax: 15, seed: 14 }],
];

describe('numbering a band from its structure alone (species absent from the library)', () => {
  afterAll(() => {
    console.info(
      Object.entries(measured)
        .map(([k, v]) => `${k}: ${v}`)
        .join('\n'),
    );
  });

  it('the species used are indeed absent from the reference library', () => {
    for (const m of [CS, SIO, LIH, NACL]) expect(constantsFor(parseSpecies(m.formula))).toBeUndefined();
  });

  for (const [name, s] of decisive) {
    it(`${name}: numbered right (≥ 98 %), ≤ 5 % spurious, evidence reported`, () => {
      const r = run(s);
      record(name, r);
      expect(r.refused, r.refused ? r.error.message : '').toBe(false);
      if (r.refused) return;
      expect(r.wrong).toBe(0);
      expect(r.correct / r.trueLines).toBeGreaterThanOrEqual(0.98);
      if (r.spurious > 0) expect(r.spuriousTaken / r.spurious).toBeLessThanOrEqual(0.05);
      const n = r.a.assignment.numbering;
      expect(n?.margin ?? Number.POSITIVE_INFINITY).toBeGreaterThanOrEqual(9);
      expect(n?.chosen.lineAtOrigin).toBe(false);
      expect(n?.runnersUp.length).toBeGreaterThan(0);
      expect(r.a.result.warnings.find((w) => w.code === 'ASSIGNED_FROM_STRUCTURE')?.message).toMatch(/runner-up/);
    });
  }

  for (const [name, s] of hard) {
    it(`${name}, no intensities: right or refused, never wrong`, () => {
      const r = run(s);
      record(`${name}, no intensities`, r);
      if (r.refused) {
        expect(r.error.message).toMatch(/no numbering of its band is clearly best/);
        expect((r.error.details.numberings as unknown[]).length).toBeGreaterThan(1);
        return;
      }
      expect(r.wrong).toBe(0);
      expect(r.correct / r.trueLines).toBeGreaterThanOrEqual(0.98);
    });
  }

  // The P branch cut at several J, each species, with and without intensities, 4 spurious lines, generator seeds
  // 11, 21, 31 (96 lists): never a wrong numbering; with P(1) present, or with intensities and P(1)–P(2) cut, always
  // the right one; right in ≥ 98 % of the lists.
  // Measured (test/sweeps/structure-sweep.ts, which prints the evidence of every refusal): 96 right, 0 wrong,
  // 0 refused. Seeds 11–61 with and without σ (384 lists): 380 right, 0 wrong, 2 refused, 2 one line short
  // (DEVELOPERS.md). Before: 85 right, 0 wrong, 11 refused — progressions grown
  // from a spurious seed claimed the true gap's lines, gaps counted with the smaller neighbouring spacing (LiH's
  // differ by 15 % across the gap), Δ₂F″ intercepts without the (J+½)⁵ term LiH needs, Pekeris's ω_e x_e taken
  // without its +9 % bias (NaCl's true and shifted numberings 4σ apart, now 7σ).
  const tally = { right: 0, wrong: 0, refused: 0, partial: 0 };
  const jMax: [MoleculeConstants, number][] = [
    [CS, 40],
    [SIO, 45],
    [LIH, 15],
    [NACL, 70],
  ];
  // One test per seed (32 lists each, a few seconds alone; the timeout allows for a loaded machine), then the share.
  for (const seed of [11, 21, 31])
    it(`the P branch cut at J = 1, 2, 3, 5, seed ${seed}: never numbered wrong; right with P(1), or with intensities and P(1)–P(2) cut`, () => {
      for (const intensities of [false, true])
        for (const pMin of [1, 2, 3, 5])
          for (const [molecule, top] of jMax) {
            const s = { ...base, molecule, pMin, pMax: top, rMax: top, intensities, spurious: 4, seed };
            const r = run(s);
            const name = `${molecule.formula} P(${pMin})+ ${intensities ? 'I' : '-'} seed ${seed}`;
            if (r.refused) {
              tally.refused++;
              expect(pMin === 1 || (intensities && pMin <= 2), `${name} refused`).toBe(false);
              continue;
            }
            if (r.wrong > 0.5 * r.trueLines) tally.wrong++;
            expect(r.wrong, name).toBeLessThanOrEqual(0.02 * r.trueLines);
            if (r.correct >= 0.98 * r.trueLines) tally.right++;
            else tally.partial++;
          }
    }, 180_000);

  it('over the 96 lists of seeds 11, 21, 31: right in ≥ 98 %, wrong in none (measured 96 right)', () => {
    expect(tally.right + tally.wrong + tally.refused + tally.partial).toBe(96);
    expect(tally.wrong).toBe(0);
    expect(tally.right / 96).toBeGreaterThanOrEqual(0.98);
    measured['P branch cut at J = 1, 2, 3, 5, seeds 11, 21, 31 (96 lists)'] =
      `right ${tally.right}, wrong ${tally.wrong}, refused ${tally.refused}, partly assigned ${tally.partial}`;
  });
});

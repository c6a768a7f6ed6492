import { afterAll, describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { runChecks } from '../../src/qa/checks.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CO_DATABASE as db } from '../helpers/co-database.js';
import { CO_12_16, HBR_1_79, HCL_1_35, independentLines } from '../helpers/independent-lines.js';
import { isotopologue, type ScanOptions, type ScanTruth, scan, shares } from '../helpers/scan-scenarios.js';

/**
 * The scenario sweep of issue 12: every scenario of its Tests section over several seeds, the shares of true lines
 * assigned correctly / wrongly / left unassigned and of spurious lines taken, summed over the seeds, printed as a
 * table and held to the goals (≥ 98 % correct, ≥ 95 % for the close HBr doublet, ≤ 5 % spurious taken,
 * no wrong label). A line counts as assigned when the fit keeps it (status "fitted").
 *
 * Scans: test/helpers/scan-scenarios.ts on the independent generator (test/helpers/independent-lines.ts: its own
 * term values and J bookkeeping, published constant sets with ω_e y_e, γ_e, β_e, H_e, each value's source named
 * there; isotopologues by first-order mass scaling; nothing from src/models). Perturbed sets move CO's B_e by
 * +3e-4 relative and α_e by −1 %, beyond the library's stated uncertainty, so the library's predictions drift with J
 * the way a wrong reference would. Real lines: test/fixtures/co-database-lines/ (HITRAN2020, Gordon et al., JQSRT
 * 277, 107949 (2022)), sent without their labels. Natural abundances CIAAW 2013 (Meija et al., Pure Appl. Chem. 88,
 * 293 (2016)), from memory: 12C 0.9893, 13C 0.0107; 16O 0.99757, 17O 0.00038, 18O 0.00205; 35Cl 0.7576, 37Cl
 * 0.2424; 79Br 0.5069, 81Br 0.4931. Seeds fixed: the table is the same on every run.
 */

const CO13 = isotopologue(CO_12_16, ['12C', '16O'], ['13C', '16O']);
const CO18 = isotopologue(CO_12_16, ['12C', '16O'], ['12C', '18O']);
const CO17 = isotopologue(CO_12_16, ['12C', '16O'], ['12C', '17O']);
const HBR81 = isotopologue(HBR_1_79, ['1H', '79Br'], ['1H', '81Br']);
const HCL37 = isotopologue(HCL_1_35, ['1H', '35Cl'], ['1H', '37Cl']);
const DCL35 = isotopologue(HCL_1_35, ['1H', '35Cl'], ['2H', '35Cl']);
const DCL37 = isotopologue(HCL_1_35, ['1H', '35Cl'], ['2H', '37Cl']);
const CO_PERTURBED = {
  ...CO_12_16,
  constants: {
    ...CO_12_16.constants,
    B_e: { value: CO_12_16.constants.B_e.value * (1 + 3e-4), source: 'Huber & Herzberg B_e moved by +3e-4 (test)' },
    alpha_e: { value: CO_12_16.constants.alpha_e.value * 0.99, source: 'Huber & Herzberg α_e moved by −1 % (test)' },
  },
};

const SEEDS = [101, 102, 103];

interface Tally {
  runs: number;
  trueLines: number;
  correct: number;
  wrong: number;
  unassigned: number;
  spurious: number;
  spuriousTaken: number;
  misses: string[];
}

const table = new Map<string, Tally & { goal: number }>();

function tally(name: string, goal: number): Tally & { goal: number } {
  let t = table.get(name);
  if (!t) {
    t = { runs: 0, trueLines: 0, correct: 0, wrong: 0, unassigned: 0, spurious: 0, spuriousTaken: 0, misses: [], goal };
    table.set(name, t);
  }
  return t;
}

function add(t: Tally, s: ReturnType<typeof shares>): void {
  t.runs++;
  t.trueLines += s.trueLines;
  t.correct += s.correct;
  t.wrong += s.wrong;
  t.unassigned += s.unassigned;
  t.spurious += s.spurious;
  t.spuriousTaken += s.spuriousTaken;
  t.misses.push(...s.misses);
}

const pct = (a: number, b: number) => (b > 0 ? `${((100 * a) / b).toFixed(1)}` : '–');

/**
 * The goals. Wrong labels: at most one line in 200, and only as a pair of blended lines of two bands
 * exchanged (a wrong numbering of a band would mislabel most of its lines and fail the share of correct ones).
 */
function expectGoals(t: Tally & { goal: number }): void {
  const why = t.misses.slice(0, 8).join('; ');
  expect(t.correct / t.trueLines, why).toBeGreaterThanOrEqual(t.goal);
  expect(t.wrong / t.trueLines, why).toBeLessThanOrEqual(0.005);
  if (t.spurious > 0) expect(t.spuriousTaken / t.spurious).toBeLessThanOrEqual(0.05);
}

const common = { sigma: 0.002, missing: 0.1, spurious: 0.1, detection: 1e-4 } as const;

/** One generated scenario over the seeds: the scan options per seed, the species declared and the options. */
function sweep(
  name: string,
  goal: number,
  options: (seed: number) => ScanOptions,
  species: string | undefined,
  analyse: { temperature?: number; maxOffset?: number } = {},
): void {
  it(name, () => {
    const t = tally(name, goal);
    for (const seed of SEEDS) {
      const s = scan(options(seed));
      const a = analyseLineList(s.lines, species ? parseSpecies(species) : undefined, analyse);
      add(t, shares(s.truth, a.result.lines));
    }
    expectGoals(t);
  });
}

const hotCo = (withSigma: boolean) => (seed: number) => ({
  ...common,
  withUncertainties: withSigma,
  withIntensities: withSigma,
  temperature: 1500,
  seed,
  parts: [
    {
      molecule: CO_12_16,
      abundance: 1,
      bands: [
        { upper: 1, lower: 0, jMax: 60 },
        { upper: 2, lower: 1, jMax: 60, strength: 2 },
        { upper: 3, lower: 2, jMax: 60, strength: 3 },
      ],
    },
  ],
});

const twoInstruments = (labelled: boolean) => (seed: number) => ({
  ...common,
  withUncertainties: false,
  withIntensities: true,
  temperature: 296,
  seed,
  parts: [
    {
      molecule: CO_12_16,
      abundance: 1,
      bands: [
        { upper: 1, lower: 0, jMax: 30, offset: 0.02, ...(labelled ? { source: 'FTIR' } : {}) },
        {
          upper: 2,
          lower: 0,
          jMax: 22,
          offset: 0.35,
          sigma: 0.001,
          strength: 0.01,
          ...(labelled ? { source: 'diode laser' } : {}),
        },
      ],
    },
  ],
});

const hbr = (withSigma: boolean) => (seed: number) => ({
  ...common,
  withUncertainties: withSigma,
  withIntensities: true,
  spurious: 0.15,
  temperature: 296,
  seed,
  parts: [
    { molecule: HBR_1_79, abundance: 0.5069, bands: [{ upper: 1, lower: 0, jMax: 22 }] },
    { molecule: HBR81, abundance: 0.4931, bands: [{ upper: 1, lower: 0, jMax: 22 }] },
  ],
});

afterAll(() => {
  const rows = [...table.entries()].map(
    ([name, t]) =>
      `| ${name} | ${t.runs} | ${t.trueLines} | ${pct(t.correct, t.trueLines)} | ${pct(t.wrong, t.trueLines)} | ${pct(t.unassigned, t.trueLines)} | ${t.spuriousTaken}/${t.spurious} | ${(100 * t.goal).toFixed(1)} |`,
  );
  console.info(
    [
      '| scenario | lists | true lines | correct % | wrong % | unassigned % | spurious taken | goal % |',
      '| --- | --- | --- | --- | --- | --- | --- | --- |',
      ...rows,
    ].join('\n'),
  );
});

describe('scenario sweep (issue 12), shares summed over three seeds per scenario', () => {
  sweep('CO 1500 K, 1-0 + 2-1 + 3-2 to J 60, σ and intensities', 0.98, hotCo(true), '12C16O', { temperature: 1500 });
  sweep('CO 1500 K, the same as bare positions', 0.98, hotCo(false), '12C16O', { temperature: 1500 });

  sweep(
    'CO 296 K window to 1e-6: 12C16O 1-0 + 2-1, 13C, 18O, 17O',
    0.98,
    (seed) => ({
      ...common,
      sigma: 0.001,
      missing: 0.05,
      spurious: 0.05,
      detection: 1e-6,
      withUncertainties: true,
      withIntensities: true,
      temperature: 296,
      seed,
      parts: [
        {
          molecule: CO_12_16,
          abundance: 0.9893 * 0.99757,
          bands: [
            { upper: 1, lower: 0, jMax: 70 },
            { upper: 2, lower: 1, jMax: 60, strength: 2 },
          ],
        },
        { molecule: CO13, abundance: 0.0107 * 0.99757, bands: [{ upper: 1, lower: 0, jMax: 60 }] },
        { molecule: CO18, abundance: 0.9893 * 0.00205, bands: [{ upper: 1, lower: 0, jMax: 60 }] },
        { molecule: CO17, abundance: 0.9893 * 0.00038, bands: [{ upper: 1, lower: 0, jMax: 60 }] },
      ],
    }),
    'CO',
  );

  sweep(
    'CO 1-0 + 2-0 from perturbed constants (B_e +3e-4, α_e −1 %), no σ',
    0.98,
    (seed) => ({
      ...common,
      withUncertainties: false,
      withIntensities: true,
      temperature: 296,
      seed,
      parts: [
        {
          molecule: CO_PERTURBED,
          abundance: 1,
          bands: [
            { upper: 1, lower: 0, jMax: 40 },
            { upper: 2, lower: 0, jMax: 35, strength: 0.01 },
          ],
        },
      ],
    }),
    '12C16O',
  );

  sweep('two instruments (sources labelled): 1-0 +0.02, 2-0 +0.35 cm⁻¹', 0.98, twoInstruments(true), '12C16O');
  sweep('two instruments (no source labels): 1-0 +0.02, 2-0 +0.35 cm⁻¹', 0.98, twoInstruments(false), '12C16O');

  sweep(
    'HCl 0-0 (far infrared) with 1-0, both chlorine isotopes',
    0.98,
    (seed) => ({
      ...common,
      missing: 0.05,
      detection: 1e-7,
      withUncertainties: true,
      withIntensities: true,
      temperature: 296,
      seed,
      parts: [
        {
          molecule: HCL_1_35,
          abundance: 0.7576,
          bands: [
            { upper: 0, lower: 0, jMax: 14, offset: 0.01 },
            { upper: 1, lower: 0, jMax: 14 },
          ],
        },
        {
          molecule: HCL37,
          abundance: 0.2424,
          bands: [
            { upper: 0, lower: 0, jMax: 14, offset: 0.01 },
            { upper: 1, lower: 0, jMax: 14 },
          ],
        },
      ],
    }),
    'HCl',
  );

  sweep('H79Br/H81Br close doublets, σ given', 0.95, hbr(true), 'HBr');
  sweep('H79Br/H81Br close doublets, no σ', 0.95, hbr(false), 'HBr');

  sweep(
    'DCl declared: 2H-35Cl + 2H-37Cl 1-0',
    0.98,
    (seed) => ({
      ...common,
      missing: 0.05,
      spurious: 0.05,
      detection: 1e-3,
      withUncertainties: true,
      withIntensities: true,
      temperature: 296,
      seed,
      parts: [
        { molecule: DCL35, abundance: 0.7576, bands: [{ upper: 1, lower: 0, jMax: 25 }] },
        { molecule: DCL37, abundance: 0.2424, bands: [{ upper: 1, lower: 0, jMax: 25 }] },
      ],
    }),
    'DCl',
  );

  it('a predicted band beyond the offset searched is named with its best offset (2-0 generated +0.9 cm⁻¹)', () => {
    const name = 'overtone +0.9 cm⁻¹, maxOffset 1.2 (named at 0.5)';
    const t = tally(name, 0.98);
    for (const seed of SEEDS) {
      const s = scan({
        ...twoInstruments(false)(seed),
        parts: [
          {
            molecule: CO_12_16,
            abundance: 1,
            bands: [
              { upper: 1, lower: 0, jMax: 30 },
              { upper: 2, lower: 0, jMax: 20, offset: 0.9, strength: 0.01 },
            ],
          },
        ],
      });
      const narrow = analyseLineList(s.lines, parseSpecies('12C16O'), { maxOffset: 0.5 });
      const w = narrow.result.warnings.find((x) => x.code === 'BAND_NOT_FOUND' && x.message.includes('2-0'));
      // Named with the best offset its own lines find: +0.9 plus the library's own error at low J (a few 0.01).
      expect(w?.message).toMatch(/best offset is \+0\.(8[5-9]|9[0-5])\d cm-1/);
      const wide = analyseLineList(s.lines, parseSpecies('12C16O'), { maxOffset: 1.2 });
      add(t, shares(s.truth, wide.result.lines));
    }
    expectGoals(t);
  });

  it('mislabelled input: two P lines of H35Cl swapped in an assigned list, each rejected line names its right label', () => {
    const name = 'assigned HCl 1-0 with P(J), P(J+1) swapped: right label suggested';
    const t = tally(name, 1);
    for (const seed of SEEDS) {
      const g = independentLines({ molecule: HCL_1_35, seed, sigma: 0.002, bands: [{ upper: 1, lower: 0, jMax: 12 }] });
      const j = 3 + (seed % 5);
      const lines = g.lines.map((l) =>
        l.assignment?.branch === 'P' && (l.assignment.j === j || l.assignment.j === j + 1)
          ? { ...l, assignment: { ...l.assignment, j: 2 * j + 1 - l.assignment.j } }
          : l,
      );
      const a = analyseLineList(lines, parseSpecies('H35Cl'));
      // Counted over the two swapped lines: correct = rejected with the right label in its reason.
      g.lines.forEach((l, i) => {
        if (l.assignment?.branch !== 'P' || (l.assignment.j !== j && l.assignment.j !== j + 1)) return;
        const out = a.result.lines[i];
        t.trueLines++;
        const right = new RegExp(`fits 1H-35Cl 1-0 P\\(${l.assignment.j}\\)`);
        if (out?.status === 'rejected' && right.test(out.reason ?? '')) t.correct++;
        else if (out?.status === 'fitted') t.wrong++;
        else {
          t.unassigned++;
          t.misses.push(`P(${l.assignment.j}) sent as P(${2 * j + 1 - l.assignment.j}): ${out?.status} ${out?.reason}`);
        }
      });
      t.runs++;
    }
    expectGoals(t);
  });
});

describe('real CO database lines sent without labels: every line must come back as published', () => {
  for (const withSigma of [true, false]) {
    it(`all 494 lines (0-0 to J = 80, 1-0, 2-0, 3-0, 2-1)${withSigma ? ', with their σ' : ', without σ'}`, () => {
      const name = `real 12C16O database lines${withSigma ? ', σ given' : ', no σ'} (label as published)`;
      const t = tally(name, 1);
      const peaks = db.lines.map((l) => ({
        position: l.position,
        ...(withSigma ? { uncertainty: l.uncertainty } : {}),
      }));
      const a = analyseLineList(peaks, parseSpecies('12C16O'));
      const truth: ScanTruth[] = db.lines.map((l) => ({ species: '12C-16O', band: l.band, branch: l.branch, j: l.j }));
      // Labelled as published (fitted or rejected by the fit: the label is what is judged here): 494 of 494 with and
      // without σ. With σ, 3-0 R(34) and R(40) (8 and 13 times their stated σ of 1e-5 from the band's fit, by its
      // head) were left unassigned until lines with σ got the floor of 1e-4 of the line spacing lines without σ had
      // (src/assign/assign-lines.ts#fittedPrediction); the fit rejects them, as when the published labels are sent.
      add(
        t,
        shares(
          truth,
          a.result.lines.map((l) => ({ ...l, status: l.assignment ? 'fitted' : l.status })),
        ),
      );
      expectGoals(t);
    });
  }

  it('the 1-0 and 2-1 lines with their σ pass the QA checks', () => {
    const lines = db.lines.filter((l) => l.band === '1-0' || l.band === '2-1');
    const peaks = lines.map((l) => ({ position: l.position, uncertainty: l.uncertainty }));
    const a = analyseLineList(peaks, parseSpecies('12C16O'));
    expect(runChecks(peaks, parseSpecies('12C16O'), a).verdict).toBe('pass');
  });
});

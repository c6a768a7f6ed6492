import { describe, expect, it } from 'vitest';
import { checkRequestSchema } from '../../services/schemas/checks.js';
import { runCheck } from '../../services/usecases/check.js';
import { type CalibrationPoint, calibrateAgainstLibrary } from '../../src/qa/calibration.js';
import { libraryUncertainties } from '../../src/qa/library-uncertainty.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import {
  gaussianStream,
  HBR_1_79,
  HCL_1_35,
  independentLines,
  type MoleculeConstants,
  uniformStream,
} from '../helpers/independent-lines.js';
import { pullSummary } from '../helpers/pulls.js';

/**
 * Is the calibration offset's σ honest when the lines are perfect and the reference is not? Pulls (fitted − true)/σ
 * of the offset over 240 seeded lists with known offsets (0, 0.003 and 0.2 cm⁻¹) and line σ from 2e-5 to 2e-2 cm⁻¹
 * (log-uniform), a random set of bands and J″ ≤ 4–20. Truth that is not the library's:
 *   - ¹²C¹⁶O: the real positions of the HITRAN2020 database (test/fixtures/co-database-lines, SOURCE.md there),
 *     with Gaussian noise of the chosen σ added;
 *   - H³⁵Cl, H⁷⁹Br: the independent generator's sets (test/helpers/independent-lines.ts: Huber & Herzberg from
 *     memory with γ_e, β_e, H_e from memory; the library has none of these three).
 * Required coverage: |pull| ≤ 1 in at least 60 % and ≤ 2 in at least 90 % of the lists of each species (a normal
 * pull gives 68 % and 95 %; overconfidence is what this catches). With the library's constants taken as exact (the
 * rule before) the CO lists fail it, which shows that the test can fail.
 */

const CO = '12C-16O';
const CO_BANDS = [
  ['1-0'],
  ['1-0', '2-0'],
  ['1-0', '2-1'],
  ['1-0', '2-0', '3-0'],
  ['0-0', '1-0'],
  ['0-0', '1-0', '2-0', '3-0', '2-1'],
];
const HX_BANDS = [['1-0'], ['1-0', '2-0'], ['1-0', '2-0', '3-0'], ['1-0', '2-1']];
const OFFSETS = [0, 0.003, 0.2];

interface Drawn {
  readonly bands: readonly string[];
  readonly jMax: number;
  readonly sigma: number;
  readonly offset: number;
}

function draw(seed: number, bandSets: readonly (readonly string[])[]): Drawn {
  const u = uniformStream(seed);
  return {
    bands: bandSets[Math.floor(u() * bandSets.length)] as readonly string[],
    jMax: 4 + Math.floor(u() * 17),
    sigma: 2e-5 * 1000 ** u(),
    offset: OFFSETS[seed % 3] as number,
  };
}

const point = (band: string, branch: string, j: number, observed: number, sigma: number): CalibrationPoint => {
  const [upperV, lowerV] = band.split('-').map(Number) as [number, number];
  const upperJ = branch === 'R' ? j + 1 : j - 1;
  return { observed, sigma, upperV, upperJ, lowerV, lowerJ: j };
};

function coList(seed: number): { pts: CalibrationPoint[]; offset: number } {
  const d = draw(seed, CO_BANDS);
  const noise = gaussianStream(seed + 7919);
  const pts = CO_DATABASE.lines
    .filter((l) => d.bands.includes(l.band) && l.j <= d.jMax)
    .map((l) => point(l.band, l.branch, l.j, l.position + d.offset + d.sigma * noise(), d.sigma));
  return { pts, offset: d.offset };
}

function hxList(molecule: MoleculeConstants, seed: number): { pts: CalibrationPoint[]; offset: number } {
  const d = draw(seed, HX_BANDS);
  const { lines } = independentLines({
    molecule,
    bands: d.bands.map((b) => {
      const [upper, lower] = b.split('-').map(Number) as [number, number];
      return { upper, lower, jMax: d.jMax };
    }),
    sigma: d.sigma,
    seed,
  });
  const pts = lines.map((l) => {
    const a = l.assignment as NonNullable<typeof l.assignment>;
    return point(`${a.band.upper}-${a.band.lower}`, a.branch, a.j, l.position + d.offset, d.sigma);
  });
  return { pts, offset: d.offset };
}

/** Offset pulls of `count` lists of one species, with the library's σ (honest) or without (constants exact). */
function pulls(formula: string, list: (seed: number) => { pts: CalibrationPoint[]; offset: number }, honest: boolean) {
  const entry = constantsFor(parseSpecies(formula));
  if (!entry) throw new Error(`no library entry for ${formula}`);
  const y = dunhamFromEntry(entry);
  const sigma = honest ? libraryUncertainties(entry) : undefined;
  const out: number[] = [];
  for (let seed = 1; seed <= 80; seed++) {
    const { pts, offset } = list(seed);
    const c = calibrateAgainstLibrary(pts, y, formula, 20, sigma);
    if (!c) throw new Error(`no calibration for ${formula} seed ${seed}`);
    out.push((c.offset.value - offset) / c.offset.uncertainty);
  }
  return pullSummary(out);
}

const SPECIES: [string, (seed: number) => { pts: CalibrationPoint[]; offset: number }][] = [
  [CO, coList],
  ['1H-35Cl', (s) => hxList(HCL_1_35, s)],
  ['1H-79Br', (s) => hxList(HBR_1_79, s)],
];

describe('calibration offset pulls over 240 seeded lists whose truth is not the library', () => {
  it.each(SPECIES)('%s: |pull| ≤ 1 in ≥ 60 %% and ≤ 2 in ≥ 90 %% of 80 lists', (formula, list) => {
    const s = pulls(formula, list, true);
    expect(s.n).toBe(80);
    expect(s.within1).toBeGreaterThanOrEqual(0.6);
    expect(s.within2).toBeGreaterThanOrEqual(0.9);
  });

  it('with the library constants taken as exact, the real CO lists miss that coverage', () => {
    const s = pulls(CO, coList, false);
    expect(s.within2).toBeLessThan(0.9);
  });
});

describe('the real CO database list through the check (npm start defaults, tolerance 0.001 cm⁻¹)', () => {
  const schema = checkRequestSchema(100_000);
  const run = (shift: number) => {
    const lines = CO_DATABASE.lines.map((l) => ({
      position: l.position + shift,
      uncertainty: l.uncertainty,
      assignment: { species: CO, band: l.band, branch: l.branch, j: l.j },
    }));
    const r = runCheck(schema.parse({ species: CO, lines, tolerances: { calibrationOffset: 0.001 } }));
    const c = r.checks.find((x) => x.id === 'calibration');
    if (!c) throw new Error('no calibration check');
    return { c, offset: c.measured.offset as { value: number; uncertainty: number } };
  };

  it('no offset: passes, and the offset is within 2σ of zero (before: −3.1e-4 ± 3.5e-7, 900σ)', () => {
    const { c, offset } = run(0);
    expect(c.status).toBe('pass');
    expect(Math.abs(offset.value)).toBeLessThanOrEqual(2 * offset.uncertainty);
    expect(offset.uncertainty).toBeLessThan(0.001);
  });

  it('an injected offset of 0.01 cm⁻¹ fails, measured within 2σ of 0.01', () => {
    const { c, offset } = run(0.01);
    expect(c.status).toBe('fail');
    expect(Math.abs(offset.value - 0.01)).toBeLessThanOrEqual(2 * offset.uncertainty);
  });
});

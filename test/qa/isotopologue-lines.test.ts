import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { runChecks } from '../../src/qa/checks.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CO_DATABASE as db } from '../helpers/co-database.js';
import { CO_12_16, HCL_1_35, independentLines } from '../helpers/independent-lines.js';
import { isotopologue } from '../helpers/scan-scenarios.js';

/**
 * A reference list of two isotopologues in QA (issue 12, item 7). The 12C16O fundamental is real: the 116 database
 * lines of test/fixtures/co-database-lines/ (HITRAN2020, Gordon et al., JQSRT 277, 107949 (2022)) with their stated
 * σ. No real 13C16O list is stored, so its fundamental (R(0)–R(40), P(1)–P(40)) comes from the independent generator
 * (test/helpers/independent-lines.ts: Huber & Herzberg's 12C16O set with ω_e y_e, γ_e, β_e, H_e, mass-scaled to
 * 13C16O with AME2020 masses), with the database's typical σ of 1e-4 cm⁻¹ as noise and stated σ.
 */
const CO13 = isotopologue(CO_12_16, ['12C', '16O'], ['13C', '16O']);

function list() {
  const real = db.lines.filter((l) => l.band === '1-0');
  const g = independentLines({
    molecule: CO13,
    bands: [{ upper: 1, lower: 0, jMax: 40 }],
    sigma: 1e-4,
    seed: 5,
    unassigned: true,
  });
  const peaks = [
    ...real.map((l) => ({ position: l.position, uncertainty: l.uncertainty })),
    ...g.lines.map((l) => ({ position: l.position, uncertainty: 1e-4 })),
  ];
  const truth = [
    ...real.map((l) => `12C-16O ${l.band} ${l.branch}(${l.j})`),
    ...g.truth.map((t) => `13C-16O ${t.band} ${t.branch}(${t.j})`),
  ];
  return { peaks, truth };
}

const label = (l: { assignment?: { species: string; band: string; branch: string; j: number } }) =>
  l.assignment ? `${l.assignment.species} ${l.assignment.band} ${l.assignment.branch}(${l.assignment.j})` : '';

describe('12C16O + 13C16O fundamental lines with their σ in QA', () => {
  for (const declared of ['CO', undefined]) {
    it(`declared ${declared ?? 'nothing'}: every line as published or generated, and the checks pass`, () => {
      const { peaks, truth } = list();
      const species = declared ? parseSpecies(declared) : undefined;
      const a = analyseLineList(peaks, species);
      const right = a.result.lines.filter((l, i) => label(l) === truth[i]).length;
      expect(right).toBe(peaks.length);
      const report = runChecks(peaks, species, a);
      expect(report.verdict, report.checks.map((c) => `${c.id} ${c.status}: ${c.message}`).join('\n')).toBe('pass');
    });
  }

  it('declared 12C16O: the 13C16O lines fail unexplained-lines, and the message names them and what to declare', () => {
    const { peaks } = list();
    const a = analyseLineList(peaks, parseSpecies('12C16O'));
    const check = runChecks(peaks, parseSpecies('12C16O'), a).checks.find((c) => c.id === 'unexplained-lines');
    expect(check?.status).toBe('fail');
    // Before, the message said only "81 line(s) ... are explained by no band".
    expect(check?.message).toMatch(/they would fit carbon monoxide \(13C-16O\).*declare the molecule, "CO"/);
    expect(check?.measured.explainedBy).toEqual([expect.objectContaining({ species: '13C-16O' })]);
  });

  it('declared D35Cl with 2H-37Cl lines: the hint names 2H-37Cl and "DCl", not HCl', () => {
    const d35 = isotopologue(HCL_1_35, ['1H', '35Cl'], ['2H', '35Cl']);
    const d37 = isotopologue(HCL_1_35, ['1H', '35Cl'], ['2H', '37Cl']);
    const lines = [d35, d37].flatMap(
      (m, k) =>
        independentLines({
          molecule: m,
          bands: [{ upper: 1, lower: 0, jMax: 20 }],
          sigma: 0.002,
          seed: 7 + k,
          unassigned: true,
        }).lines,
    );
    const a = analyseLineList(lines, parseSpecies('D35Cl'));
    const check = runChecks(lines, parseSpecies('D35Cl'), a).checks.find((c) => c.id === 'unexplained-lines');
    expect(check?.message).toMatch(/\(2H-37Cl\).*declare the molecule, "DCl"/);
  });
});

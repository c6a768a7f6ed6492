import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { ScienceError } from '../../src/errors.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CO_12_16, HCL_1_35, independentLines } from '../helpers/independent-lines.js';

/** Reasons a caller can act on (issue 12, items 8 and 9), on lists from the independent generator. */
function errorOf(f: () => unknown): ScienceError {
  try {
    f();
  } catch (e) {
    if (e instanceof ScienceError) return e;
    throw e;
  }
  throw new Error('expected a ScienceError');
}

describe('reasons instead of codes', () => {
  const co = independentLines({
    molecule: CO_12_16,
    seed: 1,
    sigma: 0.002,
    unassigned: true,
    bands: [{ upper: 1, lower: 0, jMax: 20 }],
  });

  it('three bare lines: a band needs at least four', () => {
    const e = errorOf(() => analyseLineList(co.lines.slice(0, 3), parseSpecies('12C16O')));
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(e.message).toMatch(/3 line\(s\).*at least 4 lines/);
    expect(e.message).not.toMatch(/no line carries an assignment/);
  });

  it('CO lines declared as HCl: nothing matches HCl, and the lines match carbon monoxide', () => {
    const e = errorOf(() => analyseLineList(co.lines, parseSpecies('HCl')));
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(e.message).toMatch(/nothing matches the declared species/);
    expect(e.details.bestMatch).toBe('12C-16O');
  });
});

describe('the likely label of a rejected line', () => {
  it('P(5) and P(6) of H35Cl sent swapped: each rejected line names the label its position fits', () => {
    const g = independentLines({
      molecule: HCL_1_35,
      seed: 2,
      sigma: 0.002,
      bands: [{ upper: 1, lower: 0, jMax: 12 }],
    });
    const lines = g.lines.map((l) =>
      l.assignment && l.assignment.branch === 'P' && (l.assignment.j === 5 || l.assignment.j === 6)
        ? { ...l, assignment: { ...l.assignment, j: 11 - l.assignment.j } }
        : l,
    );
    const a = analyseLineList(lines, parseSpecies('H35Cl'));
    const rejected = a.result.lines.filter((l) => l.status === 'rejected');
    expect(rejected.map((l) => l.assignment?.j).sort()).toEqual([5, 6]);
    for (const l of rejected) {
      const other = l.assignment?.j === 5 ? 6 : 5;
      expect(l.reason).toMatch(new RegExp(`fits 1H-35Cl 1-0 P\\(${other}\\).*probably mislabelled`));
    }
    expect(a.result.warnings.some((w) => w.code === 'LIKELY_MISLABELLED')).toBe(true);
  });

  it('a correct list gets no suggestion', () => {
    const g = independentLines({
      molecule: HCL_1_35,
      seed: 3,
      sigma: 0.002,
      bands: [{ upper: 1, lower: 0, jMax: 12 }],
    });
    const a = analyseLineList(g.lines, parseSpecies('H35Cl'));
    expect(a.result.warnings.some((w) => w.code === 'LIKELY_MISLABELLED')).toBe(false);
  });
});

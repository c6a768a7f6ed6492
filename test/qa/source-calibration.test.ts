import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import type { PeakInput } from '../../src/assign/assign-lines.js';
import { runChecks } from '../../src/qa/checks.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * The calibration check of a list from two instruments: the 494 real 12C16O database lines of
 * test/fixtures/co-database-lines (source named in its SOURCE.md), 0-0, 1-0 and 2-1 as "ftir-A", 2-0 and 3-0 as
 * "laser-B", laser-B moved by `shift` (the test's own, known shift). Both offsets are far inside the 0.05 cm-1
 * limit against the library, so only the disagreement between the sources can keep the check from passing.
 */
const iso = parseSpecies('12C-16O');
function twoSources(shift: number, withSigma: boolean): PeakInput[] {
  return CO_DATABASE.lines.map((l) => {
    const source = ['0-0', '1-0', '2-1'].includes(l.band) ? 'ftir-A' : 'laser-B';
    const [upper, lower] = l.band.split('-').map(Number) as [number, number];
    return {
      position: l.position + (source === 'laser-B' ? shift : 0),
      ...(withSigma ? { uncertainty: l.uncertainty } : {}),
      source,
      assignment: { species: iso.formula, band: { upper, lower }, branch: l.branch, j: l.j, source: 'given' },
    } as PeakInput;
  });
}
const calibration = (peaks: PeakInput[]) =>
  runChecks(peaks, iso, analyseLineList(peaks, iso)).checks.find((c) => c.id === 'calibration');

describe('calibration check with two sources', () => {
  for (const withSigma of [false, true]) {
    it(`laser-B shifted +0.002 cm-1 ${withSigma ? 'with' : 'without'} σ: not a pass, the disagreement said`, () => {
      const c = calibration(twoSources(0.002, withSigma));
      expect(c?.status).not.toBe('pass');
      expect(c?.status).not.toBe('not-evaluated');
      expect(c?.message).toMatch(/line sources disagree/);
      expect(String(c?.measured.sourcesDisagree)).toMatch(/laser-B lies off zero/);
    });
    it(`no shift ${withSigma ? 'with' : 'without'} σ: nothing about the sources`, () => {
      const c = calibration(twoSources(0, withSigma));
      expect(c?.status).not.toBe('not-evaluated');
      expect(c?.message).not.toMatch(/line sources disagree/);
      expect(c?.measured.sourcesDisagree).toBeUndefined();
    });
  }
});

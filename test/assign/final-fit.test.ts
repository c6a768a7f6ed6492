import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { heldoutScan, scoreScan, sweepOptions } from '../helpers/heldout-scans.js';

/**
 * The final fit of an automatic assignment is the full fit; the rounds fit levels only. A thin band whose levels the
 * full fit cannot determine used to refuse the whole list (FIT_RANK_DEFICIENT). Lists from the held-out generator
 * (test/helpers/heldout-scans.ts, nothing of src/): seed 205 of the sweep, an H79Br/H81Br 1-0 scan from two
 * instruments (128 peaks), whose H81Br 2-1 band held one automatic line.
 */
describe('a band that leaves the level model undetermined is withdrawn, not the list refused', () => {
  const o = sweepOptions(205);
  const scan = heldoutScan(o);
  const a = analyseLineList(scan.peaks, parseSpecies(o.molecule), { temperature: o.temperature });
  const w = a.result.warnings.find((x) => x.code === 'BAND_WITHDRAWN_UNDETERMINED');

  it('says which band went, why, and which lines', () => {
    expect(w?.message).toMatch(/^1H-81Br band 2-1: its 1 automatically assigned line\(s\) were withdrawn because/);
    expect(w?.message).toContain('cannot be told apart');
    expect(w?.lines).toHaveLength(1);
  });

  it('leaves those lines unassigned with a note, and out of LINES_UNEXPLAINED', () => {
    for (const i of w?.lines ?? []) {
      expect(a.result.lines[i]?.status).toBe('unassigned');
      expect(a.notes.get(i)).toMatch(/withdrawn: with its band the level model could not be determined/);
      const unexplained = a.result.warnings.find((x) => x.code === 'LINES_UNEXPLAINED')?.lines ?? [];
      expect(unexplained).not.toContain(i);
    }
  });

  it('fits the rest: most clear lines right (measured 55 of 70, 10 of 77 assigned wrong)', () => {
    const s = scoreScan(scan.truth, a.result.lines);
    expect(s.clearRight / s.clear).toBeGreaterThan(0.7);
    expect(s.wrong / (s.right + s.wrong)).toBeLessThan(0.2);
  });
});

import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { heldoutScan, scoreScan, sweepOptions } from '../helpers/heldout-scans.js';

/**
 * The assignment's round fits estimate their scales without the gross-error screen of src/fit/gross-errors.ts (the
 * final fit keeps it). Held-out seed 41 (test/helpers/heldout-scans.ts: its own Dunham constants, natural
 * abundances, nothing of the library): H79Br and H81Br 2-0 and 3-0 at 318 K from two instruments with their σ.
 * With the screen in the rounds, a round's wrong pairs were screened before the withdrawal could judge them and
 * 1H-81Br 2-0 lines were taken as 1H-79Br: 74 right, 18 wrong, 14 left; without it 106 right, none wrong.
 */
describe('round fits of the assignment, two instruments with σ (held-out seed 41)', () => {
  it('numbers no H81Br line as H79Br', () => {
    const o = sweepOptions(41);
    const scan = heldoutScan(o);
    const r = analyseLineList(scan.peaks, parseSpecies(o.molecule), { temperature: o.temperature });
    const s = scoreScan(scan.truth, r.result.lines);
    expect(s.wrong, s.misses.slice(0, 10).join('; ')).toBe(0);
    expect(s.clearRight).toBe(s.clear);
  });
});

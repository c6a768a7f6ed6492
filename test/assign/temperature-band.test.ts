import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { heldoutScan, scoreScan, sweepOptions } from '../helpers/heldout-scans.js';

/**
 * Which band the temperature is read from when none is sent (src/assign/temperature.ts): the cold band holding most
 * of the intensity, not the one holding most lines. Seed 80 of the held-out sweep (test/helpers/heldout-scans.ts,
 * nothing of src/): a 1281 K CO fundamental, one instrument, σ 0.005 cm⁻¹, 1037 peaks. Assigned at 296 K, its
 * 12C18O 1-0 band held 22 lines (most of them hot lines of 12C16O) to 12C16O 1-0's 20; read from it the plot gave
 * 326 K, too near 296 K to assign again: 59 peaks right, 49 wrong.
 */
describe('the temperature read from the strongest cold band', () => {
  const o = sweepOptions(80);
  const scan = heldoutScan(o);
  const a = analyseLineList(scan.peaks, parseSpecies(o.molecule), {});

  it('reads the generator’s 1281 K within 3σ and says so', () => {
    const w = a.result.warnings.find((x) => x.code === 'TEMPERATURE_ESTIMATED');
    const m = /give (\d+) ± (\d+) K/.exec(w?.message ?? '') ?? expect.fail(w?.message ?? 'no TEMPERATURE_ESTIMATED');
    expect(o.temperature).toBe(1281);
    expect(Math.abs(Number(m[1]) - 1281) / Number(m[2])).toBeLessThan(3);
  });

  it('then assigns the scan: ≥ 95 % of the clear lines right, none wrong (measured 564 of 566, 0)', () => {
    const s = scoreScan(scan.truth, a.result.lines);
    expect(s.wrong, s.misses.slice(0, 5).join('; ')).toBe(0);
    expect(s.clearRight / s.clear).toBeGreaterThanOrEqual(0.95);
  });
});

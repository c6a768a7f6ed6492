import { describe, expect, it } from 'vitest';
import { analysedHeldout } from '../helpers/heldout-analysed.js';

/**
 * A hot scan sent without its temperature. Held-out seed 140 (test/helpers/heldout-scans.ts: its own Dunham
 * constants, natural abundances, nothing of the library): CO 1-0 and 2-0 with their hot bands at 1037 K, two
 * instruments split line by line, intensities sent, no σ. Assigned at the default 296 K, the hot bands were predicted
 * far weaker than seen and the main bands were lost to the intensity checks (413 lines left out for their intensity),
 * so no cold band was left to read the temperature from: 102 lines right, 27 wrong, 866 left (94 of 620 clear lines).
 * When fewer than half the lines are fitted, the assignment starts again from 1000 K: 982 right, none wrong.
 * Since low-J lines of a band found through other bands are searched between the two ends of a shifted loop, the
 * 296 K pass finds a cold band itself; the temperature is then read from it (991 ± 40 K) and the lines assigned
 * again at that temperature: 986 fitted. Either path must end assigned again, from a temperature read within 5 %.
 */
describe('a hot scan without its temperature, poorly assigned from 296 K (held-out seed 140)', () => {
  const { o, scan, r, s } = analysedHeldout(140);

  it('is hot and sent without a temperature, with intensities (what this test is about)', () => {
    expect(o.temperature).toBeGreaterThan(900);
    expect(scan.peaks.every((p) => p.intensity !== undefined)).toBe(true);
  });

  it('assigns ≥ 95 % of the clear lines right and none wrong (before: 94 of 620, 27 wrong)', () => {
    expect(s.wrong, s.misses.slice(0, 8).join('; ')).toBe(0);
    expect(s.clearRight / s.clear).toBeGreaterThanOrEqual(0.95);
  });

  it('says so, with the temperature read from the intensities within 5 % of the truth (measured 991 ± 40 K)', () => {
    const w = r.warnings.find((x) => x.code === 'TEMPERATURE_ESTIMATED');
    expect(w?.message).toMatch(/assigned again (from 1000 K|at the temperature so read)/);
    const read = Number(/give (\d+) ±/.exec(w?.message ?? '')?.[1]);
    expect(Math.abs(read - o.temperature) / o.temperature).toBeLessThan(0.05);
  });
});

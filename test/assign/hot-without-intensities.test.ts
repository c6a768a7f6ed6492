import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { analysedHeldout } from '../helpers/heldout-analysed.js';
import { heldoutScan, scoreScan, sweepOptions } from '../helpers/heldout-scans.js';

/**
 * A hot scan sent with neither its temperature nor intensities, so that no temperature can be read. Held-out seed 188
 * (test/helpers/heldout-scans.ts: its own Dunham constants, natural abundances, nothing of the library): H35Cl and
 * H37Cl 1-0 with hot bands at 1444 K, σ sent. Assigned at 296 K the hot bands were never predicted strong enough to
 * seed: 110 lines right, none wrong, 159 left (98 of 197 clear lines). When fewer than half the lines are fitted, the
 * lines are assigned again as if at 1000 K and that kept when it fits more: 268 right, none wrong.
 */
describe('a hot scan without temperature or intensities (held-out seed 188)', () => {
  const { o, scan, r, s } = analysedHeldout(188);

  it('is hot, with no intensities (what this test is about)', () => {
    expect(o.temperature).toBeGreaterThan(900);
    expect(scan.peaks.some((p) => p.intensity !== undefined)).toBe(false);
  });

  it('assigns ≥ 95 % of the clear lines right and none wrong (before: 98 of 197)', () => {
    expect(s.wrong, s.misses.slice(0, 8).join('; ')).toBe(0);
    expect(s.clearRight / s.clear).toBeGreaterThanOrEqual(0.95);
  });

  it('says that it assumed a hot gas, and how many lines each start fitted', () => {
    const w = r.warnings.find((x) => x.code === 'TEMPERATURE_ASSUMED_HOT');
    expect(w?.message).toMatch(
      /at 296 K (\d+) of 275 lines were fitted, so they were assigned again as if at 1000 K \((\d+) fitted\)/,
    );
    const [, before, after] = /at 296 K (\d+) of .* \((\d+) fitted\)/.exec(w?.message ?? '') ?? [];
    expect(Number(after)).toBeGreaterThan(Number(before));
    expect(r.statistics.fitted).toBe(Number(after));
  });
});

/** A cold list without intensities that the default temperature explains is not assigned again (no warning). */
describe('a cold scan without temperature or intensities', () => {
  it('keeps the 296 K assignment: held-out seed with no hot start needed', () => {
    const seed = Array.from({ length: 240 }, (_, i) => i + 1).find((k) => {
      const x = sweepOptions(k);
      return !x.intensities && x.temperature < 400 && !x.b && k % 2 === 0;
    });
    expect(seed).toBeDefined();
    const o = sweepOptions(seed as number);
    const scan = heldoutScan(o);
    const r = analyseLineList(scan.peaks, parseSpecies(o.molecule), {}).result;
    expect(r.warnings.some((x) => x.code === 'TEMPERATURE_ASSUMED_HOT')).toBe(false);
    expect(scoreScan(scan.truth, r.lines).wrong).toBe(0);
  });
});

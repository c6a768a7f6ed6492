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

/**
 * Most lines fitted at 296 K, but a hot band among them. Held-out seed 210: 12C16O 1-0 with hot bands at 1399 K, σ
 * sent, no intensities, 22 % spurious peaks. At 296 K 2-1 was found with 112 lines, yet 3-2 and 4-3 were never
 * seeded (the assignment fitted more than half the lines, so the hot start was not tried): 366 right, 15 wrong, 204
 * left (237 of 339 clear lines). A hot band with 10 or more fitted lines now calls for the hot start as well:
 * 512 right, none wrong (whole held-out sweep, 240 scans: seeds 62, 82, 210 changed, all gained).
 */
describe('a hot band found at 296 K calls for the hot start (held-out seed 210)', () => {
  const { o, scan, r, s } = analysedHeldout(210);

  it('is hot, with no intensities, and more than half its lines fitted at 296 K (what this test is about)', () => {
    expect(o.temperature).toBeGreaterThan(1300);
    expect(scan.peaks.some((p) => p.intensity !== undefined)).toBe(false);
    const w = r.warnings.find((x) => x.code === 'TEMPERATURE_ASSUMED_HOT');
    const [, band, before] =
      /found the hot band (12C-16O \d+-\d+) \((\d+) of 713 lines fitted\)/.exec(w?.message ?? '') ?? [];
    expect(band).toBe('12C-16O 2-1');
    expect(Number(before)).toBeGreaterThan(713 / 2);
    expect(r.statistics.fitted).toBeGreaterThan(Number(before));
  });

  it('assigns the hot band 3-2 and ≥ 85 % of the clear lines right, none wrong (before: 237 of 339, 15 wrong)', () => {
    expect(s.wrong, s.misses.slice(0, 8).join('; ')).toBe(0);
    expect(s.clearRight / s.clear).toBeGreaterThanOrEqual(0.85);
    expect(r.bands.find((b) => b.species === '12C-16O' && b.band === '3-2')?.lines).toBeGreaterThanOrEqual(50);
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

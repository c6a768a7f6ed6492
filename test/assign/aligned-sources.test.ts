import { describe, expect, it } from 'vitest';
import { sourceAlignment } from '../../src/assign/assign-lines.js';
import { isotopologueMixture, parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { analysedHeldout } from '../helpers/heldout-analysed.js';
import { heldoutScan, sweepOptions } from '../helpers/heldout-scans.js';

/**
 * A list split line by line between two instruments whose offsets differ by a few tenths of a cm⁻¹. Held-out seed 14
 * (test/helpers/heldout-scans.ts: its own Dunham constants, natural abundances, nothing of the library): H79Br and
 * H81Br 1-0 at 861 K, intensities sent, no σ, instrument A at +0.199 and B at +0.010 cm⁻¹, each line on one of them.
 * The round fits mixed the two instruments' lines 0.19 cm⁻¹ apart, about the isotope shift of the band, and the
 * scatter estimated from that let either isotopologue take the other's lines: 7 lines right of 161, 134 left.
 * The assignment made again on lines moved by the voted offsets onto one instrument's scale (the final fit on the
 * lines as sent): 142 right, none wrong.
 */
describe('a list from two instruments with different offsets, split line by line (held-out seed 14)', () => {
  const { o, scan, r, s } = analysedHeldout(14);

  it('is split line by line between two sources with offsets 0.19 cm⁻¹ apart (what this test is about)', () => {
    expect(o.b?.layout).toBe('random');
    expect(Math.abs((o.b?.offset ?? 0) - o.a.offset)).toBeGreaterThan(0.15);
    expect(new Set(scan.peaks.map((p) => p.source)).size).toBe(2);
  });

  it('assigns ≥ 95 % of the clear lines right and numbers none wrong (before: 7 of 123 clear lines, 134 left)', () => {
    expect(s.wrong, s.misses.slice(0, 8).join('; ')).toBe(0);
    expect(s.clearRight / s.clear).toBeGreaterThanOrEqual(0.95);
  });

  it('fits every line at the position it was sent with, and finds the instruments’ difference within 3σ', () => {
    r.lines.forEach((l, i) => {
      expect(l.position).toBe(scan.peaks[i]?.position);
    });
    const offsets = r.sourceOffsets;
    const a = offsets?.sources.find((x) => x.source === 'A')?.offset;
    const b = offsets?.sources.find((x) => x.source === 'B')?.offset;
    expect(a && b).toBeTruthy();
    const found = (b?.value ?? 0) - (a?.value ?? 0);
    const truth = (o.b?.offset ?? 0) - o.a.offset;
    const sigma = Math.hypot(a?.uncertainty ?? 0, b?.uncertainty ?? 0);
    expect(Math.abs(found - truth)).toBeLessThan(3 * sigma + 1e-4);
  });

  it('reports an ambiguous offset on the source’s own scale (within 0.1 cm⁻¹ of its true offset)', () => {
    const truth: Record<string, number> = { A: o.a.offset, B: o.b?.offset ?? 0 };
    for (const w of r.warnings.filter((x) => x.code === 'OFFSET_AMBIGUOUS')) {
      const m = /source "(\w+)".* as (-?[\d.]+) cm-1/.exec(w.message);
      expect(m, w.message).not.toBeNull();
      expect(Math.abs(Number(m?.[2]) - (truth[m?.[1] ?? ''] ?? Number.NaN))).toBeLessThan(0.1);
    }
  });
});

describe('sourceAlignment', () => {
  const o = sweepOptions(14);
  const scan = heldoutScan(o);
  const species = isotopologueMixture(parseSpecies(o.molecule));
  const masses = new Map(species.map((x) => [x.iso.formula, reducedMass(x.iso)]));

  it('gives each source its voted offset less that of the largest source, near the instruments’ difference', () => {
    const al = sourceAlignment(scan.peaks, species, masses, { temperature: o.temperature });
    expect(al).toBeDefined();
    const truth = (o.b?.offset ?? 0) - o.a.offset;
    const found = (al?.get('B') ?? 0) - (al?.get('A') ?? 0);
    expect(Math.abs(found - truth)).toBeLessThan(0.05);
    expect([...(al?.values() ?? [])].some((d) => d === 0)).toBe(true);
  });

  it('is undefined for one source, and for two sources with the same offset', () => {
    const one = scan.peaks.map(({ source: _s, ...p }) => p);
    expect(sourceAlignment(one, species, masses, { temperature: o.temperature })).toBeUndefined();
    const shifted = scan.peaks.map((p) =>
      p.source === 'B' ? { ...p, position: p.position - ((o.b?.offset ?? 0) - o.a.offset) } : p,
    );
    expect(sourceAlignment(shifted, species, masses, { temperature: o.temperature })).toBeUndefined();
  });
});

import { describe, expect, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * Lines that name their source, sent assigned with their stated σ: the 494 real 12C16O database lines of
 * test/fixtures/co-database-lines (source named in its SOURCE.md), whose σ run from 1e-6 (0-0) to 1e-3 cm⁻¹ and
 * overstate the scatter of some bands fifty-fold. When a source was judged as one group, "ftir-A" (0-0, 1-0 and
 * 2-1) took one scale (× 0.02) from its overstated bands, its 0-0 lines were then judged at 2e-8 cm⁻¹ and 57 of them
 * were rejected: 70 rejected in all against 10 for the same lines without sources. A source's bands and σ are now
 * told apart; the check is against the same list sent without sources.
 */
const iso = parseSpecies('12C-16O');
const masses = new Map([[iso.formula, reducedMass(iso)]]);
type Db = (typeof CO_DATABASE.lines)[number];
const byBand = (l: Db) => (['0-0', '1-0', '2-1'].includes(l.band) ? 'ftir-A' : 'laser-B');
const byLine = (_l: Db, i: number) => (i % 2 ? 'laser-B' : 'ftir-A');

function coLines(source: ((l: Db, i: number) => string) | undefined, shift = 0): LineInput[] {
  return CO_DATABASE.lines.map((l, i) => {
    const [upper, lower] = l.band.split('-').map(Number) as [number, number];
    const s = source?.(l, i);
    return {
      position: l.position + (s === 'laser-B' ? shift : 0),
      uncertainty: l.uncertainty,
      ...(s === undefined ? {} : { source: s }),
      assignment: { species: iso.formula, band: { upper, lower }, branch: l.branch, j: l.j, source: 'given' },
    } as LineInput;
  });
}
const rejected = (lines: LineInput[]) =>
  fitLineList(lines, masses)
    .lines.filter((l) => l.status === 'rejected')
    .map((l) => CO_DATABASE.lines[l.index] as Db);

describe('real CO list from two sources, assigned, σ as stated: a source’s bands and σ judged apart', () => {
  const alone = rejected(coLines(undefined)).length;

  for (const shift of [0, 0.002]) {
    it(`bands split between the sources, laser-B +${shift}: no more rejected than without sources, no 0-0 line`, () => {
      const r = rejected(coLines(byBand, shift));
      expect(r.length, `${r.length} rejected against ${alone} without sources`).toBeLessThanOrEqual(alone);
      expect(r.filter((l) => l.band === '0-0')).toEqual([]);
    });
  }

  it('lines split one by one between the sources: at most twice the rejections without sources, no 0-0 line', () => {
    const r = rejected(coLines(byLine, 0.002));
    expect(r.length, `${r.length} rejected against ${alone} without sources`).toBeLessThanOrEqual(2 * alone);
    expect(r.filter((l) => l.band === '0-0')).toEqual([]);
  });
});

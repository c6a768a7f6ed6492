import { describe, expect, it } from 'vitest';
import { assignFromStructure, numberHotBands, refuseIfFundamentalLeft } from '../../src/assign/analyse.js';
import type { PeakInput } from '../../src/assign/assign-lines.js';
import type { NumberingEvidence } from '../../src/assign/structure.js';
import { ScienceError } from '../../src/errors.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CS } from '../helpers/absent-species.js';
import { type BandRequest, independentLines } from '../helpers/independent-lines.js';

/**
 * The hot-band stages of the numbering from structure (src/assign/analyse.ts: numberHotBands,
 * refuseIfFundamentalLeft), called directly on CS lists from the independent generator (Huber & Herzberg constants
 * from memory, test/helpers/absent-species.ts; its own term values and J bookkeeping), with the first band already
 * numbered as assignFromStructure leaves it. Each test computes inside `it` and takes a fraction of a second.
 */
const cs = parseSpecies('12C32S');
const BAND10 = { upper: 1, lower: 0 } as const;

/** The list with the lines of `first` (a band label of the truth) numbered as band 1-0, the others free. */
function listWith(bands: readonly BandRequest[], seed: number, first = '1-0') {
  const list = independentLines({ molecule: CS, seed, sigma: 0.001, withUncertainties: true, bands });
  const lines: PeakInput[] = list.lines.map((l, i) => {
    const { assignment, ...rest } = l;
    const t = list.truth[i];
    if (t?.band !== first || !assignment) return rest;
    return { ...rest, assignment: { ...assignment, band: BAND10, source: 'auto' as const } };
  });
  // Every line was free before the first band was numbered (no given assignments).
  const free = lines.map((p, index) => ({ p, index }));
  return { list, lines, free };
}

const fundamental = (pMin: number, top: number): BandRequest[] => [
  { upper: 1, lower: 0, jMin: pMin, jMax: top, branches: ['P'] },
  { upper: 1, lower: 0, jMax: top, branches: ['R'] },
];
const hot = (pMin: number, pTop: number, rTop: number): BandRequest[] => [
  { upper: 2, lower: 1, jMin: pMin, jMax: pTop, branches: ['P'] },
  { upper: 2, lower: 1, jMin: 1, jMax: rTop, branches: ['R'] },
];

describe('hot bands from structure', () => {
  it('CS 2-1 beside its numbered 1-0 (no intensities): every hot line right, one warning saying how', () => {
    const { list, lines, free } = listWith([...fundamental(1, 20), ...hot(2, 15, 15)], 1);
    const r = numberHotBands(lines, free, cs, BAND10);
    // 2-1: P(2)…P(15) and R(1)…R(15), 29 lines.
    expect(r.bands.map((b) => ({ band: b.band, matched: b.matched }))).toEqual([
      { band: { upper: 2, lower: 1 }, matched: 29 },
    ]);
    lines.forEach((l, i) => {
      const t = list.truth[i];
      expect(
        `${l.assignment?.band.upper}-${l.assignment?.band.lower} ${l.assignment?.branch}(${l.assignment?.j})`,
      ).toBe(`${t?.band} ${t?.branch}(${t?.j})`);
      if (t?.band === '2-1') expect(l.assignment?.source).toBe('auto');
    });
    expect(r.warnings).toHaveLength(1);
    expect(r.warnings[0]?.code).toBe('ASSIGNED_FROM_STRUCTURE');
    expect(r.warnings[0]?.message).toMatch(
      /^29 further line\(s\) numbered from structure as the hot band 2-1, judged in one fit with the bands below \(shared level v = 1\): .+; runner-up: .+; evidence margin (\d+\.\d|∞)$/,
    );
  });

  it('fewer than twelve lines left: no search; twelve: searched', () => {
    // P(2)…P(6) and R(1)…R(6): 11 lines left.
    const eleven = listWith([...fundamental(1, 20), ...hot(2, 6, 6)], 3);
    expect(numberHotBands(eleven.lines, eleven.free, cs, BAND10)).toEqual({ bands: [], warnings: [] });
    expect(eleven.lines.filter((l) => !l.assignment)).toHaveLength(11);
    // P(2)…P(7) and R(1)…R(6): 12 lines, a band or a warning about them.
    const twelve = listWith([...fundamental(1, 20), ...hot(2, 7, 6)], 3);
    const r = numberHotBands(twelve.lines, twelve.free, cs, BAND10);
    expect(r.bands.length + r.warnings.length).toBeGreaterThan(0);
  });

  it('a hot band without its inner lines (P(2)…P(5) lost): not numbered, BAND_NOT_NUMBERED names the lines left', () => {
    const { list, lines, free } = listWith([...fundamental(1, 20), ...hot(6, 12, 12)], 2);
    const before = lines.map((l) => l.assignment);
    const r = numberHotBands(lines, free, cs, BAND10);
    expect(r.bands).toEqual([]);
    const left = list.truth.flatMap((t, i) => (t.band === '2-1' ? [i] : []));
    // P(6)…P(12) and R(1)…R(12): 19 lines.
    expect(left).toHaveLength(19);
    expect(r.warnings).toHaveLength(1);
    expect(r.warnings[0]?.code).toBe('BAND_NOT_NUMBERED');
    expect(r.warnings[0]?.lines).toEqual(left);
    expect(r.warnings[0]?.message).toMatch(
      /^19 line\(s\) left after band 1-0: no numbering of them as the hot band 2-1 is clearly best \(it must share level v = 1 with band 1-0\); best: .+/,
    );
    // Nothing numbered in place.
    expect(lines.map((l) => l.assignment)).toEqual(before);
  });

  it('the hot band taken as the fundamental, P(1), P(2) of both cut: refused as ambiguous; the right choice passes', () => {
    // CS 1-0 P(3)…P(25), R(0)…R(25) and 2-1 P(4)…P(20), R(1)…R(20): the 2-1 lines numbered first as band 1-0; the
    // lines left number as 1-0 on their own, and the first ones then as 2-1 with them: either may be the fundamental.
    const bands = [...fundamental(3, 25), ...hot(4, 20, 20)];
    const wrong = listWith(bands, 17, '2-1');
    const left = wrong.free.filter((x) => !x.p.assignment);
    let thrown: unknown;
    try {
      refuseIfFundamentalLeft(wrong.lines, wrong.free, left, cs, BAND10);
    } catch (e) {
      thrown = e;
    }
    expect(thrown).toBeInstanceOf(ScienceError);
    const e = thrown as ScienceError;
    expect(e.code).toBe('NUMBERING_AMBIGUOUS');
    expect(e.message).toBe(
      '12C-32S (not in the reference library): two progressions were found, and either may be band 1-0 with the other its hot band 2-1; the band structure alone cannot tell which is the fundamental: send intensities (the fundamental is the stronger below a few thousand kelvin), or a few given assignments',
    );
    const details = e.details as { species: string; numberings: { label: string; score: number }[] };
    expect(details.species).toBe('12C-32S');
    // The two best numberings of each way (alone as 1-0, then jointly as 2-1).
    expect(details.numberings).toHaveLength(4);
    for (const n of details.numberings) expect(typeof n.score).toBe('number');
    // The true fundamental numbered first: the hot lines do not number decisively as 1-0 alone, so no refusal.
    const right = listWith(bands, 17, '1-0');
    expect(() =>
      refuseIfFundamentalLeft(
        right.lines,
        right.free,
        right.free.filter((x) => !x.p.assignment),
        cs,
        BAND10,
      ),
    ).not.toThrow();
  });
});

describe('the whole numbering from structure, called directly (assignFromStructure)', () => {
  const csBand = (seed: number, temperature?: number) =>
    independentLines({
      molecule: CS,
      seed,
      sigma: 0.001,
      withUncertainties: true,
      unassigned: true,
      ...(temperature ? { temperature, intensityNoise: 0.05 } : {}),
      bands: fundamental(1, 20),
    });

  it('CS 1-0 without intensities: every line right and marked auto, NUMBERING_UNCERTAIN, runners-up after the chosen', () => {
    const list = csBand(5);
    const a = assignFromStructure(list.lines, cs, new Map(), {});
    a.result.lines.forEach((l, i) => {
      const t = list.truth[i];
      expect(`${l.assignment?.band} ${l.assignment?.branch}(${l.assignment?.j})`).toBe(
        `${t?.band} ${t?.branch}(${t?.j})`,
      );
    });
    expect(a.assignment.method).toBe('structure');
    expect(a.assignment.bands).toEqual([{ species: '12C-32S', band: '1-0', predicted: 0, matched: 41 }]);
    const codes = a.result.warnings.map((w) => w.code);
    expect(codes[0]).toBe('ASSIGNED_FROM_STRUCTURE');
    // No intensities: the choice rests on Δ₂F″ and Kratzer, which the caller is told.
    expect(codes).toContain('NUMBERING_UNCERTAIN');
    const n = a.assignment.numbering;
    const chosen = n?.chosen as NumberingEvidence;
    const next = n?.runnersUp[0] as NumberingEvidence;
    expect(next.score).toBeGreaterThan(chosen.score);
    expect(next.score - chosen.score).toBeCloseTo(n?.margin as number, 9);
    expect(n?.runnersUp.some((e) => e.label === chosen.label && e.score === chosen.score)).toBe(false);
  });

  it('a line sent with its assignment keeps it; the fit options are passed on', () => {
    const list = csBand(5);
    const k = list.truth.findIndex((t) => t.branch === 'R' && t.j === 5);
    const given = list.lines.map((l, i) =>
      i === k
        ? {
            ...l,
            assignment: {
              species: '12C-32S',
              band: { upper: 1, lower: 0 },
              branch: 'R' as const,
              j: 5,
              source: 'given' as const,
            },
          }
        : l,
    );
    const masses = new Map();
    const a = assignFromStructure(given, cs, masses, {});
    // The 40 free lines numbered; the given one is not among the numbered (matched) lines.
    expect(a.assignment.bands[0]?.matched).toBe(40);
    expect(a.result.lines[k]?.assignment?.j).toBe(5);
    // levelsOnly passed to the final fit: no Dunham stage in the result.
    const plain = assignFromStructure(list.lines, cs, new Map(), {});
    const levels = assignFromStructure(list.lines, cs, new Map(), { fit: { levelsOnly: true } });
    expect(plain.result.dunham.length).toBeGreaterThan(0);
    expect(levels.result.dunham).toEqual([]);
  });
});

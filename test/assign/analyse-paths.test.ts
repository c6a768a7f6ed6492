import { describe, expect, it } from 'vitest';
import { analyseLineList, describeEvidence } from '../../src/assign/analyse.js';
import type { NumberingEvidence } from '../../src/assign/structure.js';
import { ScienceError } from '../../src/errors.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CS, LIH } from '../helpers/absent-species.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import { independentLines } from '../helpers/independent-lines.js';

// The whole path of src/assign/analyse.ts on small lists, one scenario per branch: against the library (the
// HITRAN2020 12C16O fundamental, test/fixtures/co-database-lines), and from band structure (LiH and CS from the
// independent generator, Huber & Herzberg constants from memory: test/helpers/absent-species.ts). Each takes
// about a second; the stages themselves are tested alone, in milliseconds, in analyse-stages.test.ts.

/** The 41 HITRAN lines of the 12C16O fundamental with J″ ≤ 20, bare. */
const coBare = () =>
  CO_DATABASE.lines.filter((x) => x.band === '1-0' && x.j <= 20).map((x) => ({ position: x.position }));

describe('the whole path on small lists', () => {
  it('bare CO lines declared: assigned against the library, each to its HITRAN label', () => {
    const bare = coBare();
    const a = analyseLineList(bare, parseSpecies('CO'));
    expect(a.assignment.method).toBe('reference');
    // Without intensities the abundance floor is 1e-3: 12C16O, 13C16O, 12C18O.
    expect(a.assignment.species).toEqual(['12C-16O', '13C-16O', '12C-18O']);
    expect(a.assignment.identification).toBeUndefined();
    expect(a.assignment.unexplained).toEqual([]);
    const main = a.assignment.bands.find((b) => b.species === '12C-16O' && b.band === '1-0');
    expect(main?.matched).toBe(41);
    const truth = CO_DATABASE.lines.filter((x) => x.band === '1-0' && x.j <= 20);
    a.result.lines.forEach((l, i) => {
      expect(l.assignment?.branch).toBe(truth[i]?.branch);
      expect(l.assignment?.j).toBe(truth[i]?.j);
    });
    // Not declared: the same, with the identification attached.
    const b = analyseLineList(bare, undefined);
    expect(b.assignment.identification?.[0]?.species).toBe('12C-16O');
    expect(b.assignment.species).toEqual(['12C-16O', '13C-16O', '12C-18O']);
  });

  it('with intensities spanning 2e-5 the isotopologues down to 1e-5 in abundance are assigned against', () => {
    // Own intensities: ν S e^{−c₂E″/T} at 296 K with E″ = B J″(J″+1), B = 1.9225 cm⁻¹ (from memory), c₂ = 1.438777 cm K.
    const lines = CO_DATABASE.lines.filter((x) => x.band === '1-0' && x.j <= 36);
    const peaks = lines.map((x) => ({
      position: x.position,
      intensity:
        x.position * (x.branch === 'R' ? x.j + 1 : x.j) * Math.exp((-1.438777 * 1.9225 * x.j * (x.j + 1)) / 296),
    }));
    const range = Math.min(...peaks.map((p) => p.intensity)) / Math.max(...peaks.map((p) => p.intensity));
    // Half the range lies between the abundances of 13C17O (4.2e-6) and 13C18O (2.2e-5) (CIAAW 2013, from memory).
    expect(0.5 * range).toBeGreaterThan(4.5e-6);
    expect(0.5 * range).toBeLessThan(2e-5);
    const a = analyseLineList(peaks, parseSpecies('CO'));
    expect(new Set(a.assignment.species)).toEqual(new Set(['12C-16O', '13C-16O', '12C-18O', '12C-17O', '13C-18O']));
  }, 20_000);

  it('a species the library lacks (LiH): numbered from structure; two spurious lines stay unexplained', () => {
    const li = independentLines({
      molecule: LIH,
      seed: 1,
      sigma: 0.001,
      unassigned: true,
      spurious: 2,
      bands: [{ upper: 1, lower: 0, jMax: 15 }],
    });
    const a = analyseLineList(li.lines, parseSpecies('7Li1H'));
    expect(a.assignment.method).toBe('structure');
    expect(a.assignment.species).toEqual(['7Li-1H']);
    const spurious = li.truth.flatMap((t, i) => (t.spurious ? [i] : []));
    expect(spurious).toHaveLength(2);
    expect(a.assignment.unexplained).toEqual(spurious);
    expect(a.assignment.bands).toEqual([{ species: '7Li-1H', band: '1-0', predicted: 0, matched: 31 }]);
    a.result.lines.forEach((l, i) => {
      const t = li.truth[i];
      if (t?.spurious) expect(l.assignment).toBeUndefined();
      else {
        expect(l.assignment?.branch).toBe(t?.branch);
        expect(l.assignment?.j).toBe(t?.j);
      }
    });
    const n = a.assignment.numbering;
    expect(n?.chosen).toBeDefined();
    expect(n?.runnersUp.length).toBeGreaterThan(0);
    expect(n?.margin).toBeGreaterThanOrEqual(9);
    expect(a.result.warnings.slice(0, 3).map((w) => w.code)).toEqual([
      'ASSIGNED_FROM_STRUCTURE',
      'LINES_UNEXPLAINED',
      'NUMBERING_UNCERTAIN',
    ]);
    expect(a.result.warnings[1]?.lines).toEqual(spurious);
    // Placeholder intensities: ignored, and said first.
    const flat = analyseLineList(
      li.lines.map((l) => ({ ...l, intensity: 1 })),
      parseSpecies('7Li1H'),
    );
    expect(flat.result.warnings.slice(0, 2).map((w) => w.code)).toEqual([
      'INTENSITIES_IGNORED',
      'ASSIGNED_FROM_STRUCTURE',
    ]);
    expect(flat.assignment.unexplained).toEqual(spurious);
  }, 20_000);

  it('LiH 1-0 with its 2-1 hot band interleaved, no intensities: numbered right, or refused saying why', () => {
    const list = independentLines({
      molecule: LIH,
      seed: 15,
      sigma: 0.001,
      withUncertainties: true,
      unassigned: true,
      bands: [
        { upper: 1, lower: 0, jMax: 14 },
        { upper: 2, lower: 1, jMin: 1, jMax: 11 },
      ],
    });
    let a: ReturnType<typeof analyseLineList> | undefined;
    let e: ScienceError | undefined;
    try {
      a = analyseLineList(list.lines, parseSpecies('7Li1H'));
    } catch (x) {
      if (!(x instanceof ScienceError)) throw x;
      e = x;
    }
    if (a) {
      // Never a wrong number: every assigned line carries its true label.
      a.result.lines.forEach((l, i) => {
        if (l.assignment)
          expect(`${l.assignment.band} ${l.assignment.branch}(${l.assignment.j})`).toBe(
            `${list.truth[i]?.band} ${list.truth[i]?.branch}(${list.truth[i]?.j})`,
          );
      });
      return;
    }
    const r = e as ScienceError;
    expect(r.code).toBe('NUMBERING_AMBIGUOUS');
    expect(r.message).toMatch(/^7Li-1H \(not in the reference library\): no numbering of its band is clearly best, /);
    expect(r.message).toMatch(
      /evidence margin -?\d+\.\d where 9 is needed; send intensities, the lines near the band origin, or a few given assignments\. Best: .+\. Next: .+$/,
    );
    const numberings = r.details.numberings as NumberingEvidence[];
    expect(r.details.species).toBe('7Li-1H');
    expect(typeof r.details.margin).toBe('number');
    expect(numberings.length).toBeGreaterThan(0);
    expect(numberings.length).toBeLessThanOrEqual(4);
    expect(r.message).toContain(`Best: ${describeEvidence(numberings[0] as NumberingEvidence)}. Next: `);
    expect(r.message).toContain(`evidence margin ${(r.details.margin as number).toFixed(1)} where`);
    // The reasons for doubt are named when they hold, and only then.
    const chi = /the best fits its lines at χ²\/ν = ([-0-9.e+]+), far beyond their uncertainties/.exec(r.message);
    if (chi) expect(Number(chi[1])).toBeGreaterThan(1);
  }, 20_000);

  it('CS 1-0 and its 2-1 hot band at 1000 K with intensities: both numbered from structure, each line right', () => {
    const list = independentLines({
      molecule: CS,
      seed: 8,
      sigma: 0.001,
      withUncertainties: true,
      unassigned: true,
      spurious: 2,
      temperature: 1000,
      intensityNoise: 0.1,
      bands: [
        { upper: 1, lower: 0, jMin: 1, jMax: 20, branches: ['P'] },
        { upper: 1, lower: 0, jMax: 20, branches: ['R'] },
        { upper: 2, lower: 1, jMin: 2, jMax: 15, branches: ['P'] },
        { upper: 2, lower: 1, jMin: 1, jMax: 15, branches: ['R'] },
      ],
    });
    const a = analyseLineList(list.lines, parseSpecies('12C32S'));
    const spurious = list.truth.flatMap((t, i) => (t.spurious ? [i] : []));
    expect(a.assignment.unexplained).toEqual(spurious);
    a.result.lines.forEach((l, i) => {
      const t = list.truth[i];
      if (t?.spurious) expect(l.assignment).toBeUndefined();
      else
        expect(`${l.assignment?.band} ${l.assignment?.branch}(${l.assignment?.j})`).toBe(
          `${t?.band} ${t?.branch}(${t?.j})`,
        );
    });
    // 1-0: P(1)…P(20) and R(0)…R(20), 41 lines; 2-1: P(2)…P(15) and R(1)…R(15), 29 lines.
    expect(a.assignment.bands).toEqual([
      { species: '12C-32S', band: '1-0', predicted: 0, matched: 41 },
      { species: '12C-32S', band: '2-1', predicted: 0, matched: 29 },
    ]);
    const codes = a.result.warnings.map((w) => w.code);
    expect(codes.slice(0, 3)).toEqual(['ASSIGNED_FROM_STRUCTURE', 'LINES_UNEXPLAINED', 'ASSIGNED_FROM_STRUCTURE']);
    // With intensities there is no doubt about the runner-up's origin to raise.
    expect(codes).not.toContain('NUMBERING_UNCERTAIN');
    expect(a.result.warnings[2]?.message).toMatch(
      /^29 further line\(s\) numbered from structure as the hot band 2-1, judged in one fit with the bands below \(shared level v = 1\): .+; runner-up: .+; evidence margin (\d+\.\d|∞)$/,
    );
    // The numbering of the first band is reported, decisive (margin ≥ 9, or none left to compare: null).
    const margin = a.assignment.numbering?.margin;
    expect(margin === null || (margin as number) >= 9).toBe(true);
  }, 30_000);
});

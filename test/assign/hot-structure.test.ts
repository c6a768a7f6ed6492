import { afterAll, describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { assignByStructure } from '../../src/assign/structure.js';
import { ScienceError } from '../../src/errors.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CS, NACL, SIO } from '../helpers/absent-species.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import { independentLines, type MoleculeConstants } from '../helpers/independent-lines.js';

/**
 * Hot bands from structure alone: a species the library lacks, its fundamental and the 2-1 hot band in one list.
 * The hot band is numbered jointly with the fundamental (its lower level is the fundamental's upper one, so its
 * combination differences must be the fundamental's). Lines from the independent generator (own term values and
 * J bookkeeping) with X ¹Σ⁺ constants from Huber & Herzberg (1979), FROM MEMORY (test/helpers/absent-species.ts:
 * higher terms magnitudes only; CS D_e from its microwave D_0). Bars: never a wrong numbering; each band numbered either
 * ≥ 98 % right or left unassigned (a refusal of the whole list is allowed where the fundamental cannot be told).
 */
const measured: string[] = [];

function run(molecule: MoleculeConstants, top: number, hotTop: number, intensities: boolean, seed: number) {
  const list = independentLines({
    molecule,
    seed,
    sigma: 0.001,
    withUncertainties: true,
    unassigned: true,
    spurious: 4,
    ...(intensities ? { temperature: 1000, intensityNoise: 0.1 } : {}),
    bands: [
      { upper: 1, lower: 0, jMin: 1, jMax: top, branches: ['P'] },
      { upper: 1, lower: 0, jMax: top, branches: ['R'] },
      { upper: 2, lower: 1, jMin: 2, jMax: hotTop, branches: ['P'] },
      { upper: 2, lower: 1, jMin: 1, jMax: hotTop, branches: ['R'] },
    ],
  });
  try {
    const a = analyseLineList(list.lines, parseSpecies(molecule.formula.replace('-', '')));
    const per = new Map<string, { n: number; right: number; wrong: number }>();
    let spurious = 0;
    let taken = 0;
    a.result.lines.forEach((l, i) => {
      const t = list.truth[i];
      if (!t || t.spurious) {
        spurious++;
        if (l.assignment) taken++;
        return;
      }
      const k = t.band as string;
      const s = per.get(k) ?? { n: 0, right: 0, wrong: 0 };
      s.n++;
      const as = l.assignment;
      if (as && as.band === k && as.branch === t.branch && as.j === t.j) s.right++;
      else if (as) s.wrong++;
      per.set(k, s);
    });
    return { refused: false as const, per, spurious, taken };
  } catch (e) {
    if (e instanceof ScienceError && e.code === 'NUMBERING_AMBIGUOUS') return { refused: true as const, error: e };
    throw e;
  }
}

describe('hot bands numbered from structure beside their fundamental', () => {
  afterAll(() => console.info(measured.join('\n')));

  const cases: [string, MoleculeConstants, number, number, boolean, number][] = [
    ['CS 1-0 + 2-1, 1000 K, intensities', CS, 40, 30, true, 8],
    ['CS 1-0 + 2-1, no intensities', CS, 40, 30, false, 15],
    ['SiO 1-0 + 2-1, 1000 K, intensities', SIO, 45, 35, true, 8],
    ['SiO 1-0 + 2-1, no intensities', SIO, 45, 35, false, 15],
    ['NaCl 1-0 + 2-1, 1000 K, intensities', NACL, 70, 50, true, 15],
  ];
  for (const [name, m, top, hotTop, intensities, seed] of cases) {
    it(`${name}: never wrong; each band right (≥ 98 %) or left unassigned`, () => {
      const r = run(m, top, hotTop, intensities, seed);
      if (r.refused) {
        measured.push(`${name}: refused (${r.error.message.slice(0, 80)}…)`);
        return;
      }
      const parts = [...r.per].map(([k, s]) => `${k} right ${s.right}/${s.n}, wrong ${s.wrong}`);
      measured.push(`${name}: ${parts.join('; ')}; spurious taken ${r.taken}/${r.spurious}`);
      for (const [k, s] of r.per) {
        expect(s.wrong, k).toBe(0);
        if (s.right > 0) expect(s.right / s.n, k).toBeGreaterThanOrEqual(0.98);
      }
      expect(r.per.get('1-0')?.right).toBeGreaterThan(0);
      expect(r.taken).toBeLessThanOrEqual(0.05 * r.spurious);
    });
  }

  it('CS with P(1), P(2) of both bands cut and intensities: the fundamental cannot be told from the hot band — refused, not wrong', () => {
    const list = independentLines({
      molecule: CS,
      seed: 17,
      sigma: 0.001,
      withUncertainties: true,
      unassigned: true,
      spurious: 4,
      temperature: 1000,
      intensityNoise: 0.1,
      bands: [
        { upper: 1, lower: 0, jMin: 3, jMax: 40, branches: ['P'] },
        { upper: 1, lower: 0, jMax: 40, branches: ['R'] },
        { upper: 2, lower: 1, jMin: 4, jMax: 30, branches: ['P'] },
        { upper: 2, lower: 1, jMin: 1, jMax: 30, branches: ['R'] },
      ],
    });
    try {
      const a = analyseLineList(list.lines, parseSpecies('12C32S'));
      const wrong = a.result.lines.filter((l, i) => {
        const t = list.truth[i];
        return l.assignment && (!t || t.spurious || l.assignment.band !== t.band || l.assignment.j !== t.j);
      }).length;
      expect(wrong).toBe(0);
      measured.push('CS, P(1)–P(2) cut, intensities: numbered, 0 wrong');
    } catch (e) {
      expect((e as ScienceError).code).toBe('NUMBERING_AMBIGUOUS');
      measured.push(`CS, P(1)–P(2) cut, intensities: refused (${(e as Error).message.slice(0, 60)}…)`);
    }
  });

  it('real CO: the 2-1 hot band numbered from structure beside the published 1-0 lines, P cut at J = 1, 2, 3, 5, with and without σ: every line right', () => {
    const db = CO_DATABASE;
    const co = parseSpecies('12C16O');
    for (const pMin of [1, 2, 3, 5])
      for (const withSigma of [true, false]) {
        const anchors = db.lines
          .filter((l) => l.band === '1-0')
          .map((l) => ({
            position: l.position,
            ...(withSigma ? { uncertainty: l.uncertainty } : {}),
            assignment: {
              species: co.formula,
              band: { upper: 1, lower: 0 },
              branch: l.branch,
              j: l.j,
              source: 'given' as const,
            },
          }));
        const hot = db.lines.filter((l) => l.band === '2-1' && !(l.branch === 'P' && l.j < pMin));
        const s = assignByStructure(
          hot.map((l) => ({ position: l.position, ...(withSigma ? { uncertainty: l.uncertainty } : {}) })),
          co.formula,
          reducedMass(co),
          { upper: 2, lower: 1 },
          anchors,
        );
        expect(s?.decisive, `P(${pMin}) ${withSigma}`).toBe(true);
        let right = 0;
        for (const [i, t] of s?.assigned ?? []) {
          const l = hot[i];
          expect(`${t.branch}(${t.j})`).toBe(`${l?.branch}(${l?.j})`);
          right++;
        }
        expect(right).toBeGreaterThanOrEqual(0.95 * hot.length);
        measured.push(
          `real CO 2-1 beside 1-0, P(${pMin}) and up, ${withSigma ? 'σ' : 'no σ'}: ${right}/${hot.length} right, 0 wrong`,
        );
      }
  });
});

import { describe, expect, it } from 'vitest';
import { candidateLines, isotopologuesMeant } from '../../src/assign/candidates.js';
import {
  identificationWindow,
  identifyIsotopologues,
  identifyLabelledSpecies,
  identifySpecies,
  type LabelledLine,
  speciesFromLabels,
} from '../../src/assign/identify.js';
import { likelyLabels } from '../../src/assign/relabel.js';
import { ScienceError } from '../../src/errors.js';
import { fitLineListDetailed, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';

// Identification (src/assign/identify.ts) and relabelling suggestions (src/assign/relabel.ts) on real positions:
// the 12C16O fundamental of HITRAN2020 (test/fixtures/co-database-lines, see its SOURCE.md), and a few H35Cl and
// H37Cl lines of the fundamental recalled from HITRAN (from memory, ±0.03 cm⁻¹). Small lists, computed inside `it`.

/** The 41 HITRAN lines of the 12C16O fundamental with J″ ≤ 20 (P(1)…P(20), R(0)…R(20)), as the fixture orders them. */
const coFundamental = () => CO_DATABASE.lines.filter((x) => x.band === '1-0' && x.j <= 20);
const labelled = (shift = 0): LabelledLine[] =>
  coFundamental().map((x, index) => ({
    index,
    position: x.position + shift,
    band: { upper: 1, lower: 0 },
    branch: x.branch,
    j: x.j,
  }));
const coLine = (branch: 'P' | 'R', j: number) =>
  (CO_DATABASE.lines.find((x) => x.band === '1-0' && x.branch === branch && x.j === j) as { position: number })
    .position;

/** H35Cl and H37Cl fundamental lines (HITRAN, from memory, ±0.03 cm⁻¹). */
const HCL = {
  '1H-35Cl': { P1: 2865.1, R0: 2906.25, R1: 2925.9 },
  '1H-37Cl': { P1: 2863.03, R0: 2904.11, R1: 2923.73 },
};

function refusal(f: () => unknown): ScienceError {
  try {
    f();
  } catch (e) {
    if (e instanceof ScienceError) return e;
    throw e;
  }
  throw new Error('expected a ScienceError');
}

describe('the window and the lines identification compares', () => {
  it('the observed range widened by 1 cm⁻¹, strongest first when intensities are informative', () => {
    const w = identificationWindow([
      { position: 2000, intensity: 5 },
      { position: 2010, intensity: 1 },
      { position: 1990, intensity: 3 },
    ]);
    expect([w.lo, w.hi]).toEqual([1989, 2011]);
    expect(w.strongObserved).toEqual([
      { index: 0, position: 2000, intensity: 5 },
      { index: 2, position: 1990, intensity: 3 },
      { index: 1, position: 2010, intensity: 1 },
    ]);
  });

  it('the stronger half of a long list (25 lines: 13), at least ten (12 lines: 10)', () => {
    const many = Array.from({ length: 25 }, (_, i) => ({ position: 2000 + i, intensity: i + 1 }));
    const w = identificationWindow(many);
    expect(w.strongObserved.map((p) => p.index)).toEqual([24, 23, 22, 21, 20, 19, 18, 17, 16, 15, 14, 13, 12]);
    const twelve = identificationWindow(many.slice(0, 12));
    expect(twelve.strongObserved).toHaveLength(10);
    expect(twelve.strongObserved.at(-1)).toEqual({ index: 2, position: 2002, intensity: 3 });
  });

  it('all lines, each as strong, when one lacks an intensity or they are placeholders', () => {
    const missing = identificationWindow([
      { position: 2000, intensity: 5 },
      { position: 2010 },
      ...Array.from({ length: 20 }, (_, i) => ({ position: 2020 + i, intensity: i + 1 })),
    ]);
    expect(missing.strongObserved).toHaveLength(22);
    expect(missing.strongObserved.every((p) => p.intensity === 1)).toBe(true);
    expect(missing.strongObserved.map((p) => p.index)).toEqual(Array.from({ length: 22 }, (_, i) => i));
    const flat = identificationWindow(Array.from({ length: 30 }, (_, i) => ({ position: 2000 + i, intensity: 100 })));
    expect(flat.strongObserved).toHaveLength(30);
    expect(flat.strongObserved.every((p) => p.intensity === 1)).toBe(true);
    expect([flat.lo, flat.hi]).toEqual([1999, 2030]);
  });
});

describe('identifying the molecule of bare lines', () => {
  /**
   * The score by its definition: the √intensity share of the 60 strongest predictions (J″ ≤ 12) that found a line,
   * times min(1, 2 × matched / min(observed, predicted)). Here every 12C16O fundamental line with J″ ≤ 12 is
   * observed (25 lines), nothing else is, and 41 lines are observed.
   */
  function expectedCoScore(lo: number, hi: number): number {
    const cands = candidateLines(isotopologuesMeant(parseSpecies('CO'), 1e-3), lo, hi)
      .filter((c) => c.j <= 12)
      .sort((a, b) => b.intensity - a.intensity)
      .slice(0, 60);
    const found = cands.filter((c) => c.species === '12C-16O' && c.band.upper === 1 && c.band.lower === 0);
    expect(found).toHaveLength(25);
    const w = (xs: typeof cands) => xs.reduce((s, c) => s + Math.sqrt(c.intensity), 0);
    return (w(found) / w(cands)) * Math.min(1, (2 * 25) / Math.min(41, 60));
  }

  it('the CO fundamental (41 HITRAN lines, no intensities) is carbon monoxide, at its offset', () => {
    const lines = coFundamental();
    const lo = Math.min(...lines.map((x) => x.position)) - 1;
    const hi = Math.max(...lines.map((x) => x.position)) + 1;
    const expected = expectedCoScore(lo, hi);
    for (const shift of [0, 0.3, -0.25]) {
      const r = identifySpecies(lines.map((x) => ({ position: x.position + shift })));
      const best = r[0] as NonNullable<(typeof r)[number]>;
      expect(best.species).toBe('12C-16O');
      expect(best.name).toBe('carbon monoxide');
      expect(best.matched).toBe(25);
      expect(best.predicted).toBe(60);
      // The library's reference constants reproduce HITRAN's low-J positions to a few 1e-4 cm⁻¹ (tolerance 2e-3).
      expect(Math.abs(best.offset - shift)).toBeLessThan(2e-3);
      expect(Math.abs(best.score - (shift === 0 ? expected : best.score))).toBeLessThan(1e-9);
      expect(best.score).toBeGreaterThan(0.8);
      // Ranked best first; molecules predicting nothing here (HCl, HBr, HF: bands far from 2100 cm⁻¹) score 0.
      for (let i = 1; i < r.length; i++)
        expect((r[i] as { score: number }).score).toBeLessThanOrEqual(r[i - 1]?.score as number);
      for (const s of ['1H-35Cl', '1H-79Br', '1H-19F']) {
        expect(r.find((x) => x.species === s)).toEqual(
          expect.objectContaining({ score: 0, matched: 0, predicted: 0, offset: 0 }),
        );
      }
      expect((r[1] as { score: number }).score).toBeLessThan(0.5);
      // Each molecule once: the library's parents (DCl and DF as their enriched selves), no derived isotopologue.
      expect(r.map((x) => x.species).sort()).toEqual(
        ['12C-16O', '1H-127I', '1H-19F', '1H-35Cl', '1H-79Br', '2H-19F', '2H-35Cl'].sort(),
      );
    }
  });

  it('an offset beyond maxOffset is not found: shifted by 0.3 and searched within ±0.2, CO explains almost nothing', () => {
    const r = identifySpecies(
      coFundamental().map((x) => ({ position: x.position + 0.3 })),
      { maxOffset: 0.2 },
    );
    const co = r.find((x) => x.species === '12C-16O') as { score: number; matched: number };
    expect(co.score).toBeLessThan(0.05);
    expect(co.matched).toBeLessThan(3);
    // Nothing reaches a score: whatever matched (hydrogen iodide 3 of 11) is what lines at random would match.
    expect(r.every((x) => x.score === 0)).toBe(true);
    expect(r[0]?.species).not.toBe('12C-16O');
  });

  it("each of CO's isotopologues alone: the main one explains all 25 of its predictions; none for no lines", () => {
    const r = identifyIsotopologues(
      coFundamental().map((x) => ({ position: x.position })),
      parseSpecies('CO'),
    );
    // Natural isotopologues of CO above 1e-6: 12C16O, 13C16O, 12C18O, 12C17O, 13C18O (2.2e-5), 13C17O (4.2e-6).
    expect(new Set(r.map((x) => x.species))).toEqual(
      new Set(['12C-16O', '13C-16O', '12C-18O', '12C-17O', '13C-18O', '13C-17O']),
    );
    expect(r[0]).toEqual(
      expect.objectContaining({ species: '12C-16O', name: 'carbon monoxide (12C-16O)', matched: 25 }),
    );
    expect(r[0]?.predicted).toBe(25);
    expect(Math.abs((r[0]?.score as number) - 1)).toBeLessThan(1e-12);
    for (const x of r.slice(1)) expect(x.score).toBeLessThan(0.2);
    expect(identifyIsotopologues([], parseSpecies('CO'))).toEqual([]);
    // A floor of 1e-3 leaves the three abundant ones.
    expect(
      identifyIsotopologues(
        coFundamental().map((x) => ({ position: x.position })),
        parseSpecies('CO'),
        { minAbundance: 1e-3 },
      ),
    ).toHaveLength(3);
  });
});

describe('identification: edges of the ranking', () => {
  it('a species the library lacks is named by its formula, and with no line near any prediction scores 0', () => {
    const r = identifyIsotopologues([{ position: 1876 }, { position: 1900 }], parseSpecies('NO'));
    expect(r.length).toBeGreaterThan(0);
    for (const x of r) {
      // Named by the formula asked for (the natural 14N-16O) and the isotopologue's own.
      expect(x.name).toBe(`14N-16O (${x.species})`);
      expect(x).toEqual(expect.objectContaining({ score: 0, matched: 0, offset: 0 }));
    }
    // CO lines with peaks only half-way between its lines (1.9 cm⁻¹ from each): no vote within ±0.5, offset 0.
    const between = [0, 1, 2, 3].map((j) => ({ position: 0.5 * (coLine('R', j) + coLine('R', j + 1)) }));
    const co = identifyIsotopologues(between, parseSpecies('CO'), { minAbundance: 0.5, maxOffset: 0.5 });
    expect(co).toHaveLength(1);
    expect(co[0]?.predicted).toBeGreaterThanOrEqual(3);
    expect(co[0]).toEqual(expect.objectContaining({ species: '12C-16O', score: 0, matched: 0, offset: 0 }));
  });

  it('scattered positions widen the tolerance to 4 × their spread: lines 0.055 off the median are still matched', () => {
    // R(0)…R(12), P(1)…P(12): 11 lines on their HITRAN positions, 3 at +0.01, 11 at +0.055. The winning window
    // (0.06) holds them all: median +0.01, MAD 0.01, spread 0.0148, tolerance 0.059 (the floor alone, 0.03, would
    // lose the eleven at +0.055, 0.045 from the median).
    const low = coFundamental().filter((x) => x.j <= 12);
    expect(low).toHaveLength(25);
    const shifted = low.map((x, i) => ({ position: x.position + (i < 11 ? 0 : i < 14 ? 0.01 : 0.055) }));
    const r = identifyIsotopologues(shifted, parseSpecies('CO'), { minAbundance: 0.5 });
    expect(r[0]?.matched).toBe(25);
    expect(Math.abs((r[0]?.offset as number) - 0.01)).toBeLessThan(2e-3);
  });

  it('every line sent twice (two instruments): 25 matches of at most 60 explain less than half, the score drops', () => {
    const twice = coFundamental().flatMap((x) => [{ position: x.position }, { position: x.position + 0.001 }]);
    const r = identifySpecies(twice);
    const best = r[0] as NonNullable<(typeof r)[number]>;
    const once = identifySpecies(coFundamental().map((x) => ({ position: x.position })))[0] as { score: number };
    expect(best.species).toBe('12C-16O');
    // Every 1-0 line with J″ ≤ 12 is matched, and a copy may give a weak candidate (a hot-band line) a peak too.
    expect(best.matched).toBeGreaterThanOrEqual(25);
    expect(best.matched).toBeLessThanOrEqual(27);
    // Factor min(1, (m / min(82, 60)) / 0.5) = m/30 instead of 1 (the single list's 25/41 ≥ 0.5); the weight share
    // grows by the extra weak matches only (√I ≈ 0.01 against about 20 for the 25 lines): within 1 %.
    const ratio = best.score / once.score;
    expect(ratio).toBeGreaterThanOrEqual(best.matched / 30 - 1e-9);
    expect(ratio).toBeLessThan((best.matched / 30) * 1.01);
  });
});

describe('labelled lines: the vote', () => {
  const line = (index: number, branch: 'P' | 'R', j: number, shift: number): LabelledLine => ({
    index,
    position: coLine(branch, j) + shift,
    band: { upper: 1, lower: 0 },
    branch,
    j,
  });
  const co = (r: ReturnType<typeof identifyLabelledSpecies>) => r.find((x) => x.species === '12C-16O');

  it('of two offsets that explain as many lines the smaller wins, whatever the order of the lines', () => {
    // R(0) 0.3 high and R(1) 0.2 high: each offset explains one line (they differ by 0.1 > tol 0.093).
    for (const lines of [
      [line(0, 'R', 0, 0.3), line(1, 'R', 1, 0.2)],
      [line(0, 'R', 1, 0.2), line(1, 'R', 0, 0.3)],
    ]) {
      const x = co(identifyLabelledSpecies(lines));
      expect(x?.explained).toBe(1);
      expect(Math.abs((x?.offset as number) - 0.2)).toBeLessThan(0.01);
    }
  });

  it('an offset exactly at maxOffset is searched', () => {
    const one = [line(0, 'R', 3, 0.3)];
    const free = co(identifyLabelledSpecies(one, { maxOffset: 1 }))?.offset as number;
    expect(Math.abs(free - 0.3)).toBeLessThan(0.01);
    expect(co(identifyLabelledSpecies(one, { maxOffset: Math.abs(free) }))).toEqual(
      expect.objectContaining({ explained: 1, offset: free }),
    );
    expect(co(identifyLabelledSpecies(one, { maxOffset: Math.abs(free) * 0.999 }))?.explained).toBe(0);
  });

  it('only the first 200 lines vote: a CO line after 200 lines no molecule predicts is not voted for', () => {
    const junk: LabelledLine[] = Array.from({ length: 200 }, (_, i) => ({
      index: i,
      position: 1000 + 1.37 * i,
      band: { upper: 1, lower: 0 },
      branch: 'R',
      j: 0,
    }));
    const x = co(identifyLabelledSpecies([...junk, line(200, 'R', 3, 0.3)]));
    expect(x?.explained).toBe(0);
    expect(x?.offset).toBe(0);
    // Among the first 200 it is voted for.
    expect(co(identifyLabelledSpecies([line(0, 'R', 3, 0.3), ...junk]))?.explained).toBe(1);
  });

  it('molecules explaining as many lines rank by the smaller offset', () => {
    // Two CO lines 0.3 high, two H35Cl lines on their positions: 2 each, HCl at offset ~0 first.
    const lines: LabelledLine[] = [
      line(0, 'R', 0, 0.3),
      line(1, 'R', 1, 0.3),
      { index: 2, position: HCL['1H-35Cl'].R0, band: { upper: 1, lower: 0 }, branch: 'R', j: 0 },
      { index: 3, position: HCL['1H-35Cl'].R1, band: { upper: 1, lower: 0 }, branch: 'R', j: 1 },
    ];
    const r = identifyLabelledSpecies(lines);
    expect(r.slice(0, 2).map((x) => [x.species, x.explained])).toEqual([
      ['1H-35Cl', 2],
      ['12C-16O', 2],
    ]);
  });
});

describe('the species of labelled lines without one', () => {
  it('the CO fundamental explains all 41 labels at offset 0; every line is 12C16O', () => {
    const r = identifyLabelledSpecies(labelled());
    expect(r[0]).toEqual(
      expect.objectContaining({ species: '12C-16O', name: 'carbon monoxide', explained: 41, lines: 41, offset: 0 }),
    );
    expect(new Set(r[0]?.isotopologueOf.values())).toEqual(new Set(['12C-16O']));
    expect([...(r[0]?.isotopologueOf.keys() ?? [])]).toEqual(Array.from({ length: 41 }, (_, i) => i));
    for (const x of r.slice(1)) expect(x.explained).toBe(0);
    expect(identifyLabelledSpecies([])).toEqual([]);
    // Each molecule once, as its mixture: a line takes one of the mixture's own isotopologues.
    expect(r.map((x) => x.species).sort()).toEqual(
      ['12C-16O', '1H-127I', '1H-19F', '1H-35Cl', '1H-79Br', '2H-19F', '2H-35Cl'].sort(),
    );
    const members: Record<string, string[]> = {
      '1H-35Cl': ['1H-35Cl', '1H-37Cl'],
      '2H-35Cl': ['2H-35Cl', '2H-37Cl'],
      '1H-79Br': ['1H-79Br', '1H-81Br'],
    };
    for (const [species, isos] of Object.entries(members)) {
      const x = r.find((y) => y.species === species);
      for (const v of x?.isotopologueOf.values() ?? []) expect(isos).toContain(v);
    }
  });

  it('shifted by 0.3 cm⁻¹ the offset is voted back (within the reference error) and still explains all', () => {
    const r = identifyLabelledSpecies(labelled(0.3));
    expect(r[0]?.species).toBe('12C-16O');
    expect(r[0]?.explained).toBe(41);
    expect(Math.abs((r[0]?.offset as number) - 0.3)).toBeLessThan(0.05);
    // Beyond maxOffset the vote cannot reach it: at ±0.2 only the low-J lines fall within tolerance of offset 0.2.
    const narrow = identifyLabelledSpecies(labelled(0.3), { maxOffset: 0.2 });
    expect(narrow[0]?.explained as number).toBeLessThan(41);
    expect(Math.abs(narrow[0]?.offset as number)).toBeLessThanOrEqual(0.2);
  });

  it('the tolerance 0.05·(1 + (J/10)²) + 2e-5·ν: R(0) explained 0.09 off (tol 0.0929), not 0.1 off', () => {
    const one = (branch: 'P' | 'R', j: number, delta: number): LabelledLine[] => [
      { index: 0, position: coLine(branch, j) + delta, band: { upper: 1, lower: 0 }, branch, j },
    ];
    const explained = (l: LabelledLine[]) =>
      identifyLabelledSpecies(l, { maxOffset: 0 }).find((x) => x.species === '12C-16O')?.explained;
    expect(explained(one('R', 0, 0.09))).toBe(1);
    expect(explained(one('R', 0, 0.1))).toBe(0);
    expect(explained(one('R', 0, -0.09))).toBe(1);
    // R(10) at 2186.6 cm⁻¹: tol 0.1 + 0.0437 = 0.1437.
    expect(explained(one('R', 10, 0.13))).toBe(1);
    expect(explained(one('R', 10, 0.16))).toBe(0);
    // P(20) at 2059.9 cm⁻¹: tol 0.25 + 0.0412 = 0.2912.
    expect(explained(one('P', 20, 0.28))).toBe(1);
    expect(explained(one('P', 20, 0.3))).toBe(0);
  });

  it('HCl labels take the isotopologue whose prediction lies nearest (35Cl and 37Cl 2.1 cm⁻¹ apart)', () => {
    const lines: LabelledLine[] = [];
    for (const [iso, l] of Object.entries(HCL)) {
      lines.push({ index: lines.length, position: l.P1, band: { upper: 1, lower: 0 }, branch: 'P', j: 1 });
      lines.push({ index: lines.length, position: l.R0, band: { upper: 1, lower: 0 }, branch: 'R', j: 0 });
      lines.push({ index: lines.length, position: l.R1, band: { upper: 1, lower: 0 }, branch: 'R', j: 1 });
      expect(iso).toMatch(/^1H-3[57]Cl$/);
    }
    const best = speciesFromLabels(lines);
    expect(best.species).toBe('1H-35Cl');
    expect(best.name).toBe('hydrogen chloride');
    expect(best.explained).toBe(6);
    expect(Math.abs(best.offset)).toBeLessThan(0.05);
    expect([...best.isotopologueOf.values()]).toEqual([
      '1H-35Cl',
      '1H-35Cl',
      '1H-35Cl',
      '1H-37Cl',
      '1H-37Cl',
      '1H-37Cl',
    ]);
  });

  it('clear only with three lines or more, half of them explained, and the runner-up under half as many', () => {
    const co = labelled().slice(0, 4);
    const junk = (n: number, from: number): LabelledLine[] =>
      Array.from({ length: n }, (_, i) => ({
        index: from + i,
        position: 1000 + 37 * i,
        band: { upper: 1, lower: 0 },
        branch: 'R',
        j: 0,
      }));
    expect(speciesFromLabels(labelled().slice(0, 3)).species).toBe('12C-16O');
    expect(speciesFromLabels([...co, ...junk(4, 4)]).explained).toBe(4);
    const twoOnly = refusal(() => speciesFromLabels(labelled().slice(0, 2)));
    expect(twoOnly.code).toBe('SPECIES_UNIDENTIFIED');
    // 4 of 9 is less than half.
    const e = refusal(() => speciesFromLabels([...co, ...junk(5, 4)]));
    expect(e.code).toBe('SPECIES_UNIDENTIFIED');
    expect(e.message).toContain('line 0 and 8 more, counted from 0');
    expect(e.message).toContain('carbon monoxide (12C-16O) explains 4 of 9');
    expect(e.details.line).toBe(0);
    const candidates = e.details.candidates as { species: string; name: string; explained: number; lines: number }[];
    expect(candidates).toHaveLength(5);
    expect(candidates[0]).toEqual({ species: '12C-16O', name: 'carbon monoxide', explained: 4, lines: 9 });
    // A runner-up with half as many: 4 CO lines and 2 H35Cl lines.
    const hcl = (k: number, position: number, j: number): LabelledLine => ({
      index: k,
      position,
      band: { upper: 1, lower: 0 },
      branch: 'R',
      j,
    });
    const close = refusal(() => speciesFromLabels([...co, hcl(4, HCL['1H-35Cl'].R0, 0), hcl(5, HCL['1H-35Cl'].R1, 1)]));
    expect(close.message).toContain(
      'carbon monoxide (12C-16O) explains 4 of 6; hydrogen chloride (1H-35Cl) explains 2 of 6',
    );
    expect(speciesFromLabels([...co, hcl(4, HCL['1H-35Cl'].R0, 0)]).species).toBe('12C-16O');
    // Lines no molecule predicts: the refusal says so, from the first line's index.
    const none = refusal(() => speciesFromLabels(junk(3, 7)));
    expect(none.message).toContain('line 7 and 2 more');
    expect(none.message).toContain('no library species predicts them near their labels');
    expect(none.message).toContain('give "species"');
    const empty = refusal(() => speciesFromLabels([]));
    expect(empty.details.line).toBe(0);
    expect(empty.details.candidates).toEqual([]);
  });
});

describe('labels suggested for rejected lines', () => {
  const mass = () => new Map([['12C-16O', reducedMass(parseSpecies('12C16O'))]]);
  const asInput = (relabel: (branch: 'P' | 'R', j: number) => number, shift: (i: number) => number = () => 0) =>
    coFundamental().map(
      (x, i): LineInput => ({
        position: x.position + shift(i),
        uncertainty: 0.001,
        assignment: {
          species: '12C-16O',
          band: { upper: 1, lower: 0 },
          branch: x.branch,
          j: relabel(x.branch, x.j),
          source: 'given',
        },
      }),
    );
  const swapP5P6 = (b: 'P' | 'R', j: number) => (b === 'P' && j === 5 ? 6 : b === 'P' && j === 6 ? 5 : j);
  const iP5 = () => coFundamental().findIndex((x) => x.branch === 'P' && x.j === 5);
  const iP6 = () => coFundamental().findIndex((x) => x.branch === 'P' && x.j === 6);

  it('a swapped pair P(5)/P(6): each rejected line is told the label its position fits', () => {
    const lines = asInput(swapP5P6);
    const fit = fitLineListDetailed(lines, mass());
    const rejected = fit.result.lines.filter((l) => l.status === 'rejected').map((l) => l.index);
    expect(rejected.sort((a, b) => a - b)).toEqual([iP6(), iP5()].sort((a, b) => a - b));
    const s = likelyLabels(fit, lines);
    expect([...s.keys()].sort((a, b) => a - b)).toEqual(rejected);
    // The fixture's P(5) line was sent labelled P(6): it is told P(5).
    expect(s.get(iP5())).toMatch(
      /^its position fits 12C-16O 1-0 P\(5\) \(residual -?\d\.\d\de-\d+ cm-1, 0\.0σ\): probably mislabelled$/,
    );
    expect(s.get(iP6())).toMatch(/^its position fits 12C-16O 1-0 P\(6\) \(residual /);
  });

  it('within 3σ of the line’s own σ only: 2.5σ off is suggested, 3.5σ off is not', () => {
    for (const [offBy, suggested] of [
      [0.0025, true],
      [0.0035, false],
      [-0.0025, true],
    ] as const) {
      const lines = asInput(swapP5P6, (i) => (i === iP5() ? offBy : 0));
      const fit = fitLineListDetailed(lines, mass());
      const s = likelyLabels(fit, lines);
      expect(s.has(iP5())).toBe(suggested);
      if (suggested) expect(s.get(iP5())).toContain(`(residual ${offBy > 0 ? '' : '-'}2.50e-3 cm-1, 2.5σ)`);
      // Its partner, on position, still gets its own label.
      expect(s.get(iP6())).toContain('P(6)');
    }
  });

  it('a label a fitted line holds is not suggested; nor one beyond five J past the band', () => {
    // The P(6) line sent twice: once right, once as P(5) (the true P(5) line left out). P(6) is held.
    const all = asInput((_b, j) => j);
    const lines = all.filter((_, i) => i !== iP5());
    lines.push({
      ...(all[iP6()] as LineInput),
      assignment: { ...(all[iP6()]?.assignment as NonNullable<LineInput['assignment']>), j: 5 },
    });
    const fit = fitLineListDetailed(lines, mass());
    expect(fit.result.lines.find((l) => l.index === lines.length - 1)?.status).toBe('rejected');
    expect(likelyLabels(fit, lines).size).toBe(0);
    // Fitted J″ ≤ 20: a line at HITRAN's P(25) sent as R(40) is told P(25) (20 + 5); one at P(26) is told nothing.
    for (const [j, told] of [
      [25, true],
      [26, false],
    ] as const) {
      const extra: LineInput = {
        position: coLine('P', j),
        uncertainty: 0.001,
        assignment: { species: '12C-16O', band: { upper: 1, lower: 0 }, branch: 'R', j: 40, source: 'given' },
      };
      const input = [...all, extra];
      const f = fitLineListDetailed(input, mass());
      expect(f.result.lines.find((l) => l.index === all.length)?.status).toBe('rejected');
      const s = likelyLabels(f, input);
      expect(s.has(all.length)).toBe(told);
      if (told) expect(s.get(all.length)).toContain(`P(${j})`);
    }
  });
  it('with a σ of 2 cm⁻¹ several labels lie within 3σ: the nearest free one is told, never a held one or its own', () => {
    // Lines J″ ≤ 20, P(4), P(7) and R(0) left out; P(5)/P(6) swapped; R(8) sent 0.3 high; a line at R(0) sent as
    // R(12); a line at the band origin (2143.2711 cm⁻¹, HITRAN's 1-0 origin, from memory) sent as R(14).
    const base = asInput(swapP5P6).filter((_, i) => {
      const x = coFundamental()[i] as { branch: string; j: number };
      return !((x.branch === 'P' && (x.j === 4 || x.j === 7)) || (x.branch === 'R' && x.j === 0));
    });
    const at = (branch: 'P' | 'R', j: number) => base.findIndex((l) => Math.abs(l.position - coLine(branch, j)) < 1e-9);
    const r8 = at('R', 8);
    base[r8] = { ...(base[r8] as LineInput), position: coLine('R', 8) + 0.3 };
    const label = (branch: 'P' | 'R', j: number) => ({
      species: '12C-16O',
      band: { upper: 1, lower: 0 },
      branch,
      j,
      source: 'given' as const,
    });
    const lines: LineInput[] = [
      ...base,
      { position: coLine('R', 0), uncertainty: 0.001, assignment: label('R', 12) },
      { position: 2143.2711, uncertainty: 0.001, assignment: label('R', 14) },
    ];
    const [atR0, atOrigin] = [lines.length - 2, lines.length - 1];
    const fit = fitLineListDetailed(lines, mass());
    const rejected = fit.result.lines.filter((l) => l.status === 'rejected').map((l) => l.index);
    expect(rejected.sort((a, b) => a - b)).toEqual([at('P', 6), at('P', 5), r8, atR0, atOrigin].sort((a, b) => a - b));
    const wide = lines.map((l) => ({ ...l, uncertainty: 2 }));
    const s = likelyLabels(fit, wide);
    // z = |Δ| / √(var + 2²): the neighbours 3.9 cm⁻¹ away are at 1.95σ, the right label at 0.
    const told = new Map([...s].map(([i, m]) => [i, /fits 12C-16O 1-0 ([PR]\(\d+\))/.exec(m)?.[1]]));
    expect(told).toEqual(
      new Map([
        // The line at P(6)'s position (sent as P(5)) is told P(6), and the other way round.
        [at('P', 6), 'P(6)'],
        [at('P', 5), 'P(5)'],
        [atR0, 'R(0)'],
        // P(0) is no transition: the origin line is told R(0), 3.8 cm⁻¹ (1.9σ) away.
        [atOrigin, 'R(0)'],
      ]),
    );
    expect(s.get(atOrigin)).toContain(', 1.9σ)');
    // R(8) 0.3 high: its own label and its held neighbours are all it is near, so nothing is told.
    expect(s.has(r8)).toBe(false);
  });

  it('a line without σ is judged by the fit’s rms (2e-7 here): 0.0025 off is far beyond 3σ', () => {
    const lines = asInput(swapP5P6, (i) => (i === iP5() ? 0.0025 : 0)).map(({ uncertainty: _u, ...l }) => l);
    const fit = fitLineListDetailed(lines, mass());
    expect(fit.result.statistics.rms).toBeLessThan(1e-5);
    const s = likelyLabels(fit, lines);
    expect(s.has(iP5())).toBe(false);
    expect(s.get(iP6())).toContain('P(6)');
    // Lines not passed at all: the rms for every one, the same outcome.
    expect([...likelyLabels(fit, []).keys()]).toEqual([...s.keys()]);
  });
});

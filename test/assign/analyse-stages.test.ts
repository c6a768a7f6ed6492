import { describe, expect, it } from 'vitest';
import {
  analyseLineList,
  asIdentified,
  describeEvidence,
  dynamicRange,
  givenMasses,
  type Numbering,
  namingBandsNotFound,
  resolveSpecies,
  structureWarnings,
  withLabelSuggestions,
  withoutFlatIntensities,
  withWhatItMatches,
} from '../../src/assign/analyse.js';
import type { PeakInput } from '../../src/assign/assign-lines.js';
import type { IdentificationCandidate } from '../../src/assign/identify.js';
import type { NumberingEvidence } from '../../src/assign/structure.js';
import { ScienceError } from '../../src/errors.js';
import { fitLineListDetailed } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { LIH } from '../helpers/absent-species.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import { independentLines } from '../helpers/independent-lines.js';

// The stages of src/assign/analyse.ts one by one, on small lists: the HITRAN2020 12C16O fundamental
// (test/fixtures/co-database-lines, SOURCE.md), LiH lines from the independent generator (Huber & Herzberg
// constants, from memory: test/helpers/absent-species.ts), and hand-built evidence, warnings and errors whose
// wording is worked out in the test. Everything is computed inside `it`.

/** The 41 HITRAN lines of the 12C16O fundamental with J″ ≤ 20, bare. */
const coBare = (shift = 0): PeakInput[] =>
  CO_DATABASE.lines.filter((x) => x.band === '1-0' && x.j <= 20).map((x) => ({ position: x.position + shift }));
/** The same lines with their HITRAN labels as given assignments (σ 0.001 cm⁻¹), P(5) and P(6) swapped. */
const coGivenSwapped = (): PeakInput[] =>
  CO_DATABASE.lines
    .filter((x) => x.band === '1-0' && x.j <= 20)
    .map((x) => ({
      position: x.position,
      uncertainty: 0.001,
      assignment: {
        species: '12C-16O',
        band: { upper: 1, lower: 0 },
        branch: x.branch,
        j: x.branch === 'P' && x.j === 5 ? 6 : x.branch === 'P' && x.j === 6 ? 5 : x.j,
        source: 'given' as const,
      },
    }));
const indexOf = (branch: 'P' | 'R', j: number) =>
  CO_DATABASE.lines.filter((x) => x.band === '1-0' && x.j <= 20).findIndex((x) => x.branch === branch && x.j === j);

function refusal(f: () => unknown): ScienceError {
  try {
    f();
  } catch (e) {
    if (e instanceof ScienceError) return e;
    throw e;
  }
  throw new Error('expected a ScienceError');
}
function thrown(f: () => unknown): unknown {
  try {
    f();
  } catch (e) {
    return e;
  }
  throw new Error('expected a throw');
}

const evidence = (over: Partial<NumberingEvidence> = {}): NumberingEvidence => ({
  label: 'origin at slot 3',
  originSlot: 3,
  alignment: 0,
  lines: 30,
  reducedChiSquare: 0.5,
  lineAtOrigin: true,
  score: 3,
  parts: { positions: 1, differences: 1, origin: 25, intensities: 0, kratzer: 1 },
  ...over,
});

describe('small helpers', () => {
  it('dynamic range: weakest over strongest, only when every line has a positive intensity', () => {
    expect(
      dynamicRange([
        { position: 1, intensity: 2 },
        { position: 2, intensity: 8 },
        { position: 3, intensity: 4 },
      ]),
    ).toBe(0.25);
    expect(dynamicRange([{ position: 1, intensity: 5 }])).toBe(1);
    expect(dynamicRange([{ position: 1, intensity: 2 }, { position: 2 }])).toBeUndefined();
    expect(
      dynamicRange([
        { position: 1, intensity: 2 },
        { position: 2, intensity: 0 },
      ]),
    ).toBeUndefined();
    expect(
      dynamicRange([
        { position: 1, intensity: -1 },
        { position: 2, intensity: 3 },
      ]),
    ).toBeUndefined();
    expect(dynamicRange([])).toBeUndefined();
  });

  it('flat intensities are dropped with INTENSITIES_IGNORED saying why; informative ones are kept', () => {
    const flat = withoutFlatIntensities([
      { position: 2000, intensity: 1 },
      { position: 2004, intensity: 1 },
    ]);
    expect(flat.peaks).toEqual([{ position: 2000 }, { position: 2004 }]);
    expect(flat.warnings).toEqual([
      {
        code: 'INTENSITIES_IGNORED',
        message:
          'intensities ignored for identification, assignment and numbering: every line carries the same intensity (1), so they carry no information about which line is which (a placeholder?); the lines were assigned by position alone',
      },
    ]);
    const sent = [
      { position: 2000, intensity: 1 },
      { position: 2004, intensity: 3 },
    ];
    const kept = withoutFlatIntensities(sent);
    expect(kept.peaks).toBe(sent);
    expect(kept.warnings).toEqual([]);
  });

  it('reduced masses of the species the given assignments name, once each (AME2020: μ(12C16O) = 6.856208638 u)', () => {
    const a = (species: string) => ({
      species,
      band: { upper: 1, lower: 0 },
      branch: 'R' as const,
      j: 0,
      source: 'given' as const,
    });
    const m = givenMasses([
      { position: 1, assignment: a('12C-16O') },
      { position: 2 },
      { position: 3, assignment: a('1H-35Cl') },
      { position: 4, assignment: a('12C-16O') },
    ]);
    expect([...m.keys()]).toEqual(['12C-16O', '1H-35Cl']);
    // 12 × 15.994914619257 / 27.994914619257 (AME2020 mass of 16O, from memory), to 1e-9 u.
    expect(Math.abs((m.get('12C-16O')?.value as number) - 6.856208638)).toBeLessThan(1e-9);
    expect(givenMasses([{ position: 1 }]).size).toBe(0);
  });

  it('evidence in words: every part present, and the least', () => {
    const full = evidence({
      label: 'origin at slot 14',
      origin: 1359.7123456,
      lowerB: 7.4166543,
      reducedChiSquare: 1.23456,
      differenceIntercept: { value: 1.5e-4, uncertainty: 2.26e-4 },
      lineAtOrigin: false,
      boltzmannScatter: 0.0456,
      kratzerRatio: 1.0123,
      kratzerUncertainty: 0.0234,
      score: 12.345,
    });
    expect(describeEvidence(full)).toBe(
      'origin at slot 14, origin 1359.7123 cm-1, B″ 7.416654 cm-1, reduced χ² 1.23, Δ₂F″ at J = −½ 1.50e-4 ± 2.3e-4, no line at its origin, Boltzmann-plot rms 0.046, D_e/Kratzer 1.012 ± 0.023, score 12.3',
    );
    expect(describeEvidence(evidence())).toBe(
      'origin at slot 3, reduced χ² 0.500, a line lies at its origin, score 3.0',
    );
    expect(describeEvidence(evidence({ kratzerRatio: 0.987, origin: 0 }))).toBe(
      'origin at slot 3, origin 0.0000 cm-1, reduced χ² 0.500, a line lies at its origin, D_e/Kratzer 0.987, score 3.0',
    );
  });
});

describe('warnings that name what was found', () => {
  const co = (code: string, message: string) => ({ code, message });
  const needsTwo =
    '12C-16O: ω_e and ω_e x_e need two or more vibrational intervals (e.g. a fundamental and an overtone); the band origin is ΔG, not ω_e';

  it('VIBRATION_NEEDS_TWO_INTERVALS names the bands of its species searched for and not matched', () => {
    const other = co('TERMS_CONSTRAINED', 'x');
    const w = namingBandsNotFound(
      [co('VIBRATION_NEEDS_TWO_INTERVALS', needsTwo), other],
      [
        { species: '12C-16O', band: '1-0', predicted: 50, matched: 40 },
        { species: '12C-16O', band: '2-0', predicted: 30, matched: 0, bestOffset: { offset: 0.0123, matches: 12 } },
        { species: '12C-16O', band: '3-0', predicted: 30, matched: 5, bestOffset: { offset: -0.5, matches: 5 } },
        { species: '13C-16O', band: '1-0', predicted: 20, matched: 0, bestOffset: { offset: -0.2, matches: 5 } },
      ],
    );
    expect(w[1]).toBe(other);
    // Another warning of the same species (its message also starts "12C-16O: ") is left as it is.
    const constrained = co('TERMS_CONSTRAINED', '12C-16O: the uncertainties of B_e and α_e include that of γ_e');
    const kept = namingBandsNotFound(
      [constrained],
      [{ species: '12C-16O', band: '2-0', predicted: 30, matched: 0, bestOffset: { offset: 0.0123, matches: 12 } }],
    );
    expect(kept[0]).toBe(constrained);
    expect(w[0]).toEqual({
      code: 'VIBRATION_NEEDS_TWO_INTERVALS',
      message:
        '12C-16O: ω_e and ω_e x_e need two or more vibrational intervals, and only one was fitted: band 2-0 (best offset +0.012 cm-1) is predicted in the window and its lines may be in the list, but it was not matched (see BAND_NOT_FOUND); the band origin is ΔG, not ω_e',
    });
    // Two missed bands, one with a negative offset; a warning of another species keeps its own bands.
    const two = namingBandsNotFound(
      [co('VIBRATION_NEEDS_TWO_INTERVALS', needsTwo.replace('12C-16O', '13C-16O'))],
      [
        { species: '13C-16O', band: '1-0', predicted: 20, matched: 0, bestOffset: { offset: -0.2, matches: 5 } },
        { species: '13C-16O', band: '2-0', predicted: 20, matched: 1, bestOffset: { offset: 0, matches: 3 } },
        { species: '12C-16O', band: '2-0', predicted: 30, matched: 0, bestOffset: { offset: 0.0123, matches: 12 } },
      ],
    );
    expect(two[0]?.message).toContain('band 1-0 (best offset -0.200 cm-1), 2-0 (best offset +0.000 cm-1) is predicted');
    expect(two[0]?.message.startsWith('13C-16O: ')).toBe(true);
    // Nothing missed: the warning is returned as it was.
    const plain = co('VIBRATION_NEEDS_TWO_INTERVALS', needsTwo);
    expect(namingBandsNotFound([plain], [{ species: '12C-16O', band: '1-0', predicted: 50, matched: 40 }])[0]).toBe(
      plain,
    );
  });

  it('a numbering from structure: how it was chosen, the lines left out, and a doubt without intensities', () => {
    const chosen = evidence({
      label: 'origin at slot 14',
      parts: { positions: 1, differences: 1, origin: 0, intensities: 0, kratzer: 1 },
    });
    const runnerUp = evidence({
      label: 'origin at slot 15',
      score: 18.24,
      parts: { positions: 1, differences: 1, origin: 0, intensities: 0, kratzer: 1 },
    });
    const s = (over: Partial<Numbering> = {}): Numbering => ({
      assigned: new Map(),
      reducedChiSquare: 0.5,
      evidence: [chosen, runnerUp],
      margin: 15.24,
      fitsUncertainties: true,
      ownEvidence: true,
      decisive: true,
      ...over,
    });
    const lih = parseSpecies('7Li1H');
    const w = structureWarnings(lih, { upper: 1, lower: 0 }, s(), [31, 32], false);
    expect(w.map((x) => x.code)).toEqual(['ASSIGNED_FROM_STRUCTURE', 'LINES_UNEXPLAINED', 'NUMBERING_UNCERTAIN']);
    expect(w[0]?.message).toBe(
      `7Li-1H is not in the reference library: lines were numbered from the band structure alone, as band 1-0. Chosen numbering: ${describeEvidence(chosen)}; runner-up: ${describeEvidence(runnerUp)}; evidence margin 15.2 (at least 9 needed)`,
    );
    expect(w[1]).toEqual({
      code: 'LINES_UNEXPLAINED',
      message: '2 line(s) belong to no progression found; they stay unassigned',
      lines: [31, 32],
    });
    expect(w[2]?.message).toMatch(/^without intensities, and with no line at the runner-up numbering's band origin/);
    // With intensities, or a runner-up that a line at its origin counts against, no doubt is raised.
    expect(structureWarnings(lih, { upper: 1, lower: 0 }, s(), [], true).map((x) => x.code)).toEqual([
      'ASSIGNED_FROM_STRUCTURE',
    ]);
    const ruledOut = s({ evidence: [chosen, { ...runnerUp, parts: { ...runnerUp.parts, origin: 25 } }] });
    expect(structureWarnings(lih, { upper: 2, lower: 0 }, ruledOut, [], false).map((x) => x.code)).toEqual([
      'ASSIGNED_FROM_STRUCTURE',
    ]);
    // No runner-up at all, an infinite margin, another band.
    const alone = structureWarnings(
      lih,
      { upper: 2, lower: 0 },
      s({ evidence: [chosen], margin: Number.POSITIVE_INFINITY }),
      [],
      false,
    );
    expect(alone.map((x) => x.code)).toEqual(['ASSIGNED_FROM_STRUCTURE']);
    expect(alone[0]?.message).toContain('as band 2-0. Chosen numbering: ');
    expect(alone[0]?.message).toContain('; runner-up: none; evidence margin ∞ (at least 9 needed)');
  });
});

describe('what the refusals add', () => {
  const noMatch = () =>
    new ScienceError('FIT_NO_ASSIGNED_LINES', 'nothing matches the declared species 1H-35Cl within ±0.5 cm-1', {
      species: '1H-35Cl',
    });

  it('lines declared as HCl that are CO: the refusal names carbon monoxide, its score and offset', () => {
    const e = refusal(() =>
      withWhatItMatches(coBare(), parseSpecies('HCl'), {}, () => {
        throw noMatch();
      }),
    );
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(e.message).toMatch(
      /^nothing matches the declared species 1H-35Cl within ±0\.5 cm-1; the lines match carbon monoxide \(12C-16O, score 0\.89, offset 0\.000 cm-1\) instead: was the species declared wrongly\?$/,
    );
    expect(e.details).toEqual({ species: '1H-35Cl', bestMatch: '12C-16O', bestScore: expect.any(Number) });
    expect(Math.abs((e.details.bestScore as number) - 0.893)).toBeLessThanOrEqual(0.001);
    // The same lines shifted by 0.3 and searched within ±0.2 match nothing well: the refusal is passed on unchanged.
    const weak = noMatch();
    expect(
      thrown(() =>
        withWhatItMatches(coBare(0.3), parseSpecies('HCl'), { maxOffset: 0.2 }, () => {
          throw weak;
        }),
      ),
    ).toBe(weak);
    // Searched within ±0.5 (the default) the shifted lines are CO again, at offset +0.300.
    const shifted = refusal(() =>
      withWhatItMatches(coBare(0.3), parseSpecies('HCl'), {}, () => {
        throw noMatch();
      }),
    );
    expect(shifted.message).toContain('(12C-16O, score 0.89, offset 0.300 cm-1)');
  });

  it('passed on unchanged: the declared molecule itself, a unit hint, another refusal, another error, or none', () => {
    const same = noMatch();
    expect(
      thrown(() =>
        withWhatItMatches(coBare(), parseSpecies('CO'), {}, () => {
          throw same;
        }),
      ),
    ).toBe(same);
    // Another isotopologue declared (13C16O) is another species here: the refusal names 12C16O.
    const iso = refusal(() =>
      withWhatItMatches(coBare(), parseSpecies('13C16O'), {}, () => {
        throw noMatch();
      }),
    );
    expect(iso.details.bestMatch).toBe('12C-16O');
    const unit = new ScienceError('FIT_NO_ASSIGNED_LINES', 'nothing matches the declared species', {
      suggestedUnit: 'um',
    });
    expect(
      thrown(() =>
        withWhatItMatches(coBare(), parseSpecies('HCl'), {}, () => {
          throw unit;
        }),
      ),
    ).toBe(unit);
    const other = new ScienceError('FIT_NO_ASSIGNED_LINES', '3 line(s): a band needs at least 4 lines');
    expect(
      thrown(() =>
        withWhatItMatches(coBare(), parseSpecies('HCl'), {}, () => {
          throw other;
        }),
      ),
    ).toBe(other);
    const code = new ScienceError('NUMBERING_AMBIGUOUS', 'nothing matches');
    expect(
      thrown(() =>
        withWhatItMatches(coBare(), parseSpecies('HCl'), {}, () => {
          throw code;
        }),
      ),
    ).toBe(code);
    const plain = new Error('nothing matches');
    expect(
      thrown(() =>
        withWhatItMatches(coBare(), parseSpecies('HCl'), {}, () => {
          throw plain;
        }),
      ),
    ).toBe(plain);
    expect(withWhatItMatches(coBare(), parseSpecies('HCl'), {}, () => 42)).toBe(42);
  });

  it('a species identified, not declared, that matches nothing: the candidates first, no "declared species"', () => {
    const ranking: IdentificationCandidate[] = [
      { species: '1H-127I', name: 'hydrogen iodide', score: 0.61234, matched: 6, predicted: 20, offset: 0.1 },
      { species: '2H-35Cl', name: 'deuterium chloride', score: 0.0123, matched: 1, predicted: 30, offset: 0 },
      { species: '1H-19F', name: 'hydrogen fluoride', score: 0, matched: 0, predicted: 0, offset: 0 },
    ];
    const e = refusal(() =>
      asIdentified(ranking, () => {
        throw new ScienceError('FIT_NO_ASSIGNED_LINES', 'nothing matches the declared species 1H-127I', { n: 3 });
      }),
    );
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(e.message).toBe(
      `no species was declared and the library's best identifications do not hold up (1H-127I score 0.61, 2H-35Cl score 0.01): declare "species"; nothing matches the identified species 1H-127I`,
    );
    expect(e.details).toEqual({
      n: 3,
      candidates: [
        { species: '1H-127I', name: 'hydrogen iodide', score: 0.612 },
        { species: '2H-35Cl', name: 'deuterium chloride', score: 0.012 },
        { species: '1H-19F', name: 'hydrogen fluoride', score: 0 },
      ],
    });
    // Declared (no ranking), another message, another code, or no refusal: unchanged.
    const declared = new ScienceError('FIT_NO_ASSIGNED_LINES', 'nothing matches the declared species 1H-127I');
    expect(
      thrown(() =>
        asIdentified(undefined, () => {
          throw declared;
        }),
      ),
    ).toBe(declared);
    const tooFew = new ScienceError('FIT_NO_ASSIGNED_LINES', '3 line(s): a band needs at least 4 lines');
    expect(
      thrown(() =>
        asIdentified(ranking, () => {
          throw tooFew;
        }),
      ),
    ).toBe(tooFew);
    const other = new ScienceError('NUMBERING_AMBIGUOUS', 'the declared species');
    expect(
      thrown(() =>
        asIdentified(ranking, () => {
          throw other;
        }),
      ),
    ).toBe(other);
    const plain = new Error('the declared species');
    expect(
      thrown(() =>
        asIdentified(ranking, () => {
          throw plain;
        }),
      ),
    ).toBe(plain);
    expect(asIdentified(ranking, () => 'ok')).toBe('ok');
  });
});

describe('the species to assign against', () => {
  it('declared first, else the first given assignment, else the identification', () => {
    const declared = resolveSpecies(coBare(), parseSpecies('12C16O'), {});
    expect(declared.species.formula).toBe('12C-16O');
    expect(declared.warnings).toEqual([]);
    expect(declared.identification).toBeUndefined();
    // ¹³C¹⁶O declared for ¹²C¹⁶O lines: its predictions find lines only as often as chance would.
    const wrong = resolveSpecies(coBare(), parseSpecies('13C16O'), {});
    expect(wrong.species.formula).toBe('13C-16O');
    expect(wrong.warnings.map((w) => w.code)).toEqual(['ASSIGNMENT_NOT_BEYOND_CHANCE']);
    expect(wrong.warnings[0]?.message).toMatch(
      /^\d+ of the \d+ strongest predicted lines of 13C-16O \(J″ ≤ 12\) find a line, no more than lines at random would/,
    );
    const given: PeakInput[] = [
      { position: 2906.25 },
      {
        position: 2925.9,
        assignment: { species: '1H-35Cl', band: { upper: 1, lower: 0 }, branch: 'R', j: 1, source: 'given' },
      },
    ];
    expect(resolveSpecies(given, undefined, {}).species.formula).toBe('1H-35Cl');
    const found = resolveSpecies(coBare(), undefined, {});
    // The natural mixture of carbon and oxygen (no enriched atom).
    expect(found.species.formula).toBe(parseSpecies('CO').formula);
    expect(found.identification?.[0]?.species).toBe('12C-16O');
    // Runner-up hydrogen iodide at 0 (0.24 before the chance rule) against 0.89: not close (0.8 × best).
    expect(found.warnings).toEqual([]);
  });

  it('below the minimum score: refused with the best scores, what was needed, and the candidates', () => {
    const e = refusal(() => resolveSpecies(coBare(), undefined, { minIdentificationScore: 0.95 }));
    expect(e.code).toBe('SPECIES_UNIDENTIFIED');
    expect(e.message).toMatch(
      // Hydrogen iodide's 0.24 and deuterium chloride's 0.01 were coincidences: the chance rule sets them to 0.
      /^no species of the reference library explains these lines within ±0\.5 cm-1 \("options\.maxOffset"; best: 12C-16O, score 0\.89; needed 0\.95\); declare "species"$/,
    );
    const candidates = e.details.candidates as { species: string; name: string; score: number }[];
    expect(candidates).toHaveLength(5);
    expect(candidates[0]).toEqual({ species: '12C-16O', name: 'carbon monoxide', score: expect.any(Number) });
    expect(Math.abs((candidates[0]?.score as number) - 0.893)).toBeLessThanOrEqual(0.001);
  });

  it('calibration 1 cm⁻¹ off: nothing within ±0.5, but the refusal says CO matches at +1.000 (or −1.000) and what to send', () => {
    for (const shift of [1, -1]) {
      const e = refusal(() => resolveSpecies(coBare(shift), undefined, {}));
      expect(e.code).toBe('SPECIES_UNIDENTIFIED');
      // Reach: ⌈(1.000 + 0.05) × 10⌉ / 10 = 1.1.
      expect(e.message).toContain(
        `, but at offset ${shift > 0 ? '+' : '-'}1.000 cm-1 they match 12C-16O (score 0.89): if the calibration is that far off, send a larger "options.maxOffset" (e.g. 1.1), or declare "species"`,
      );
      expect(e.message).toMatch(/^no species of the reference library explains these lines within ±0\.5 cm-1 /);
    }
    // Searched within ±0.2, 0.6 off is beyond it but within 4 × 0.2: reach ⌈6.5⌉/10 = 0.7.
    const e = refusal(() => resolveSpecies(coBare(0.6), undefined, { maxOffset: 0.2 }));
    expect(e.message).toContain('within ±0.2 cm-1');
    expect(e.message).toContain('at offset +0.600 cm-1 they match 12C-16O');
    expect(e.message).toContain('(e.g. 0.7)');
    // 1 cm⁻¹ off and searched within ±0.2: 4 × 0.2 = 0.8 does not reach it either; no hint.
    const far = refusal(() => resolveSpecies(coBare(1), undefined, { maxOffset: 0.2 }));
    expect(far.message).not.toContain('they match');
    expect(far.message).toMatch(/; declare "species"$/);
  });
});

describe('the whole path on small lists', () => {
  it('every line assigned: fitted as given; a swapped pair is told its labels (LIKELY_MISLABELLED)', () => {
    const lines = coGivenSwapped();
    const a = analyseLineList(lines, undefined);
    expect(a.assignment).toEqual({ method: 'given', species: ['12C-16O'], bands: [], unexplained: [] });
    expect(a.notes.size).toBe(0);
    const [p5, p6] = [indexOf('P', 5), indexOf('P', 6)];
    const w = a.result.warnings.find((x) => x.code === 'LIKELY_MISLABELLED');
    expect(w?.lines).toEqual([p6, p5].sort((x, y) => x - y));
    expect(w?.message).toMatch(
      new RegExp(
        `^2 rejected line\\(s\\) fit another transition of the fitted bands: line ${Math.min(p5, p6)}: its position fits 12C-16O 1-0 P\\(${p5 < p6 ? 5 : 6}\\) \\(residual [-0-9.e]+ cm-1, 0\\.0σ\\); line ${Math.max(p5, p6)}: its position fits 12C-16O 1-0 P\\(${p5 < p6 ? 6 : 5}\\) `,
      ),
    );
    expect(w?.message).not.toContain('probably mislabelled');
    const l5 = a.result.lines.find((l) => l.index === p5);
    expect(l5?.reason).toMatch(
      /^studentised residual .*; its position fits 12C-16O 1-0 P\(5\) .*: probably mislabelled$/,
    );
    // Lines that fit keep their reason (none).
    expect(a.result.lines.find((l) => l.index === indexOf('R', 3))?.reason).toBeUndefined();
  });

  it('more than six suggestions: six named in the message, all in its lines', () => {
    // Seven P lines sent 30 J too high (P(2) as P(32), …): each is rejected and told its own label back.
    const moved = new Set([2, 4, 8, 12, 14, 16, 18]);
    const lines = coGivenSwapped().map((l, i) => {
      const x = CO_DATABASE.lines.filter((y) => y.band === '1-0' && y.j <= 20)[i] as { branch: 'P' | 'R'; j: number };
      const a = l.assignment as NonNullable<PeakInput['assignment']>;
      return { ...l, assignment: { ...a, j: x.branch === 'P' && moved.has(x.j) ? x.j + 30 : x.j } };
    });
    const fit = fitLineListDetailed(lines, new Map([['12C-16O', reducedMass(parseSpecies('12C16O'))]]));
    const r = withLabelSuggestions(fit, lines);
    expect(fit.result.lines.filter((l) => l.status === 'rejected')).toHaveLength(7);
    const w = r.warnings.find((x) => x.code === 'LIKELY_MISLABELLED');
    expect(w?.lines).toHaveLength(7);
    expect(w?.message.match(/line \d+: /g)).toHaveLength(6);
    expect(w?.message.startsWith('7 rejected line(s) fit another transition')).toBe(true);
    // No suggestion: the fit's own result comes back.
    const clean = coGivenSwapped().map((l, i) => {
      const x = CO_DATABASE.lines.filter((y) => y.band === '1-0' && y.j <= 20)[i] as { j: number };
      return { ...l, assignment: { ...(l.assignment as NonNullable<PeakInput['assignment']>), j: x.j } };
    });
    const f2 = fitLineListDetailed(clean, new Map([['12C-16O', reducedMass(parseSpecies('12C16O'))]]));
    expect(withLabelSuggestions(f2, clean)).toBe(f2.result);
  });

  it('too few lines for a band structure: FIT_NO_ASSIGNED_LINES naming the species', () => {
    const li = independentLines({
      molecule: LIH,
      seed: 1,
      sigma: 0.001,
      unassigned: true,
      bands: [{ upper: 1, lower: 0, jMax: 15 }],
    });
    const e = refusal(() => analyseLineList(li.lines.slice(0, 3), parseSpecies('7Li1H')));
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(e.message).toBe(
      '7Li-1H has no reference constants, and no P/R band structure (a gap with two progressions of at least six lines in all) could be found in these lines',
    );
    expect(e.details).toEqual({ species: '7Li-1H' });
  });
});

import { describe, expect, it } from 'vitest';
import { type AssignResult, assignAndFit, type PeakInput } from '../../src/assign/assign-lines.js';
import { isotopologuesMeant } from '../../src/assign/candidates.js';
import { ScienceError } from '../../src/errors.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE, type CoDatabaseLine } from '../helpers/co-database.js';

// Short whole runs of the automatic assignment (assignAndFit) on small lists of real 12C16O lines
// (test/fixtures/co-database-lines: HITRAN2020, Gordon et al., JQSRT 277, 107949 (2022)), sent without their
// labels: every label that comes back is compared with the published one. Each run takes well under a second; all
// are made inside `it`. The refusals and warnings are API: their codes, details and wording are asserted.

const CO = '12C-16O';

function setup(formula: string) {
  const species = isotopologuesMeant(parseSpecies(formula), 1e-3);
  const masses = new Map(species.map((s) => [s.iso.formula, reducedMass(s.iso)]));
  return { species, masses };
}

/** Fixture lines of a band with jMin ≤ J″ ≤ jMax, P before R as the fixture lists them. */
const band = (b: string, jMax: number, jMin = 0) =>
  CO_DATABASE.lines.filter((l) => l.band === b && l.j <= jMax && l.j >= jMin);

/** Second radiation constant hc/k = 1.438776877503933 cm K (exact SI values of h, c, k). */
const C2 = 1.438776877503933;
/** B_0, B_1 of 12C16O in cm⁻¹ from Gendriesch et al. (2009) in MHz (fixture SOURCE.md), c = 29 979.2458 MHz/cm⁻¹. */
const B_V = [57635.968019 / 29979.2458, 57111.24312 / 29979.2458];
/** G(1) − G(0) of 12C16O, cm⁻¹ (2143.27, Huber & Herzberg 1979, from memory; only the Boltzmann factor uses it). */
const G1 = 2143.27;

/**
 * Relative intensity made here, not by src/: ν × Hönl–London (J″+1 for R, J″ for P) × (v″ + 1) × Boltzmann factor of
 * the lower level at 296 K, E″ = G(v″) + B_v″ J″(J″+1); every band on one scale (overtones as strong as 1-0).
 */
function intensity(l: CoDatabaseLine): number {
  const v = l.band === '2-1' ? 1 : 0;
  const e = v * G1 + (B_V[v] as number) * l.j * (l.j + 1);
  const hl = l.branch === 'R' ? l.j + 1 : l.j;
  return (v + 1) * l.position * hl * Math.exp((-C2 * e) / 296);
}

/** Every line comes back with its published label (band, branch, J″); returns how many carry one. */
function expectPublishedLabels(r: AssignResult, lines: readonly (CoDatabaseLine | undefined)[]): number {
  let labelled = 0;
  r.lines.forEach((x, i) => {
    const l = lines[i];
    const a = x.assignment;
    if (!a) return;
    labelled++;
    expect(l, `line ${i} is no published line but got ${a.branch}(${a.j})`).toBeDefined();
    expect(`${a.species} ${a.band.upper}-${a.band.lower} ${a.branch}(${a.j})`, `line ${i}`).toBe(
      `${CO} ${l?.band} ${l?.branch}(${l?.j})`,
    );
  });
  return labelled;
}

function refusal(f: () => unknown): ScienceError {
  try {
    f();
  } catch (e) {
    if (e instanceof ScienceError) return e;
    throw e;
  }
  throw new Error('no refusal');
}

describe('refusals when nothing can be assigned (FIT_NO_ASSIGNED_LINES)', () => {
  const { species, masses } = setup('12C16O');

  it('fewer lines than a band needs: the count and the minimum', () => {
    const e = refusal(() =>
      assignAndFit(
        [2147, 2151, 2155].map((position) => ({ position })),
        species,
        masses,
      ),
    );
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(e.message).toBe(
      '3 line(s) were sent without assignments: a band needs at least 4 lines to be recognised and assigned automatically; send more lines, or assign them',
    );
    expect(e.details).toEqual({ lines: 3, minLinesPerBand: 4 });
    // minLinesPerBand 6: five lines (R(0)–R(2), P(1), P(2)) are too few.
    const six = refusal(() =>
      assignAndFit(
        band('1-0', 2).map((l) => ({ position: l.position })),
        species,
        masses,
        { minLinesPerBand: 6 },
      ),
    );
    expect(six.details).toEqual({ lines: 5, minLinesPerBand: 6 });
  });

  it('no band of the species in the window (CO has none at 5000 cm⁻¹: 2-0 at 4260, 3-0 at 6350)', () => {
    const e = refusal(() =>
      assignAndFit(
        [5000, 5001, 5002, 5003, 5004].map((position) => ({ position })),
        species,
        masses,
      ),
    );
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    // The window is the lines' range widened by 1 cm⁻¹ each side.
    expect(e.message).toBe(
      'nothing matches the declared species: no band of 12C-16O is predicted between 4999.0 and 5005.0 cm-1, where the lines lie',
    );
    expect(e.details).toEqual({ window: [4999, 5005] });
  });

  it('positions of the CO fundamental sent in µm as if cm⁻¹: the hint with 10⁴/x', () => {
    const e = refusal(() =>
      assignAndFit(
        [4.6, 4.65, 4.7, 4.75, 4.8].map((position) => ({ position })),
        species,
        masses,
      ),
    );
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    // Window 3.6–5.8; 10⁴ / 5.8 = 1724.1, 10⁴ / 3.6 = 2777.8.
    expect(e.message).toBe(
      'nothing matches the declared species 12C-16O between 3.60 and 5.80 cm-1; read as wavelengths in µm the lines would lie at 1724.1–2777.8 cm-1: if they are, send "unit": "um"',
    );
    expect(e.details).toMatchObject({ suggestedUnit: 'um' });
    expect((e.details as { window: number[] }).window[0]).toBeCloseTo(3.6, 12);
    expect((e.details as { window: number[] }).window[1]).toBeCloseTo(5.8, 12);
  });

  it('given lines only, where the declared species has no band: NO_BAND_IN_WINDOW, and the given lines are fitted', () => {
    // Given H35Cl 1-0 lines of a rigid rotor with B = 10.44 cm⁻¹ (near H35Cl's B_0, from memory) about an invented
    // origin of 1000 cm⁻¹: 12C16O, declared, has no line between 936 and 1085 cm⁻¹ (its 1-0 P branch ends near
    // 1500 cm⁻¹ at J″ = 150, its pure rotation below 600 cm⁻¹).
    const co = parseSpecies('12C16O');
    const hcl = parseSpecies('H35Cl');
    const masses = new Map([
      [co.formula, reducedMass(co)],
      [hcl.formula, reducedMass(hcl)],
    ]);
    const B = 10.44;
    const given = (branch: 'P' | 'R', j: number) => ({
      position: 1000 + (branch === 'R' ? 2 * B * (j + 1) : -2 * B * j),
      assignment: { species: hcl.formula, band: { upper: 1, lower: 0 }, branch, j, source: 'given' as const },
    });
    const peaks = [
      given('R', 0),
      given('R', 1),
      given('R', 2),
      given('R', 3),
      given('P', 1),
      given('P', 2),
      given('P', 3),
    ];
    const r = assignAndFit(peaks, [{ iso: co, abundance: 1 }], masses);
    // Window: 1000 − 6B − 1 = 936.36 to 1000 + 8B + 1 = 1084.52.
    expect(r.warnings).toEqual([
      { code: 'NO_BAND_IN_WINDOW', message: 'no band of 12C-16O is predicted between 936.4 and 1084.5 cm-1' },
    ]);
    expect(r.bands).toEqual([]);
    expect(r.unexplained).toEqual([]);
    expect(r.calibration).toBeUndefined();
    expect(r.fit.result.lines.filter((l) => l.status === 'fitted')).toHaveLength(7);
  });

  it('a calibration 0.8 cm⁻¹ off with maxOffset 0.5: found beyond it, and a maxOffset that reaches it suggested', () => {
    const lines = band('1-0', 10);
    const e = refusal(() =>
      assignAndFit(
        lines.map((l) => ({ position: l.position + 0.8 })),
        species,
        masses,
      ),
    );
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    // The strong seeds are J″ ≤ 4: P(1)–P(4), R(0)–R(4) = 9, all found at +0.8; ⌈(0.8 + 0.05) × 10⌉ / 10 = 0.9.
    expect(e.message).toBe(
      'nothing matches the declared species 12C-16O within ±0.5 cm-1 ("options.maxOffset"), but at offset +0.800 cm-1 its band 12C-16O 1-0 finds 9 of its 9 strongest predicted lines: if the calibration is that far off, send a larger "options.maxOffset" (e.g. 0.9)',
    );
    const d = e.details as { species: string; offsetFound: number; suggestedMaxOffset: number };
    expect(d.species).toBe(CO);
    // Library positions against the database: within 1e-3 cm⁻¹ at J″ ≤ 4 (tolerance stated here).
    expect(Math.abs(d.offsetFound - 0.8)).toBeLessThan(1e-3);
    expect(d.suggestedMaxOffset).toBe(0.9);
    // With maxOffset 1 the same list is assigned, every line as published, at offset 0.8.
    const r = assignAndFit(
      lines.map((l) => ({ position: l.position + 0.8 })),
      species,
      masses,
      { maxOffset: 1 },
    );
    expect(expectPublishedLabels(r, lines)).toBe(lines.length);
    expect(Math.abs((r.bands[0]?.offsets?.[0]?.offset ?? 0) - 0.8)).toBeLessThan(1e-3);
  });
  it('two real lines among spurious ones: the best band finds only 2 of its 9 strong lines at any offset', () => {
    // Peaks on 1-0 R(0) and R(1), and two midway between P(5)/P(6) and R(5)/R(6) (≈ 1.9 cm⁻¹ from any line, beyond
    // even the 1.7 cm⁻¹ = 0.45 × 2B searched past maxOffset).
    const at = (b: string, j: number) => band('1-0', 10).find((l) => l.branch === b && l.j === j)?.position as number;
    const e = refusal(() =>
      assignAndFit(
        [at('R', 0), at('R', 1), (at('P', 5) + at('P', 6)) / 2, (at('R', 5) + at('R', 6)) / 2].map((position) => ({
          position,
        })),
        species,
        masses,
      ),
    );
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(e.message).toBe(
      'nothing matches the declared species 12C-16O: its best band in the window, 12C-16O 1-0, finds only 2 of its 9 strongest predicted lines at any offset within ±0.5 cm-1, and a band needs 4',
    );
    expect(e.details).toEqual({ species: CO });
  });

  it('lines where CO has only weak lines (1850 cm⁻¹, the 1-0 P branch near J″ = 75): no strong line there', () => {
    const e = refusal(() =>
      assignAndFit(
        [1850, 1851.3, 1852.7, 1854.1].map((position) => ({ position })),
        species,
        masses,
      ),
    );
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(e.message).toBe(
      'nothing matches the declared species 12C-16O: none of its bands has a strong line predicted where the lines lie',
    );
  });
});

describe('real CO lines assigned back to their published labels', () => {
  it('the fundamental P(1)–P(12), R(0)–R(12) shifted by +0.02 cm⁻¹, without σ: every line, the offset and the calibration', () => {
    const { species, masses } = setup('12C16O');
    const lines = band('1-0', 12);
    const r = assignAndFit(
      lines.map((l) => ({ position: l.position + 0.02 })),
      species,
      masses,
    );
    expect(expectPublishedLabels(r, lines)).toBe(25);
    expect(r.fit.result.lines.every((l) => l.status === 'fitted')).toBe(true);
    expect(r.unexplained).toEqual([]);
    expect(r.warnings).toEqual([]);
    expect(r.bands).toHaveLength(1);
    const b = r.bands[0];
    // Predicted: the strong lines of 1-0 inside the window P(12) − 1 … R(12) + 1, the 25 sent.
    expect(b).toMatchObject({ species: CO, band: '1-0', predicted: 25, matched: 25 });
    expect(b?.offsets).toHaveLength(1);
    expect(b?.offsets?.[0]?.own).toBe(false);
    expect(b?.offsets?.[0]?.source).toBeUndefined();
    // Offset and calibration: 0.02 within 1e-3 cm⁻¹ (library against database, stated here).
    expect(Math.abs((b?.offsets?.[0]?.offset ?? 0) - 0.02)).toBeLessThan(1e-3);
    const cal = r.calibration;
    expect(Math.abs((cal?.offset.value ?? 0) - 0.02)).toBeLessThan(1e-3);
    expect(cal?.lines).toBe(25);
    expect(cal?.reference).toBe('reference-library positions of 12C-16O');
    // The lines span about 93 cm⁻¹ (P(12) near 2096.7 to R(12) near 2190.0), over 1 % of the centre: a scale is given.
    expect(cal?.scale).toBeDefined();
  });

  it('a list without its low-J lines (J″ 12–30 only): the gap pass assigns every line', () => {
    const { species, masses } = setup('12C16O');
    const lines = band('1-0', 30, 12);
    const r = assignAndFit(
      lines.map((l) => ({ position: l.position })),
      species,
      masses,
    );
    expect(expectPublishedLabels(r, lines)).toBe(38);
    expect(r.unexplained).toEqual([]);
  });

  it('pure rotation R(0)–R(20) with σ: every line', () => {
    const { species, masses } = setup('12C16O');
    const lines = band('0-0', 20);
    const r = assignAndFit(
      lines.map((l) => ({ position: l.position, uncertainty: l.uncertainty })),
      species,
      masses,
    );
    expect(expectPublishedLabels(r, lines)).toBe(21);
    expect(r.bands.map((b) => [b.band, b.matched])).toEqual([['0-0', 21]]);
  });

  it('the hot band 2-1 (below the seed floor at 296 K) with the fundamental, with intensities: every line', () => {
    const { species, masses } = setup('12C16O');
    const lines = [...band('1-0', 15), ...band('2-1', 12)];
    const r = assignAndFit(
      lines.map((l) => ({ position: l.position, intensity: intensity(l) })),
      species,
      masses,
    );
    expect(expectPublishedLabels(r, lines)).toBe(31 + 25);
    expect(r.bands.map((b) => [b.band, b.matched])).toEqual([
      ['1-0', 31],
      ['2-1', 25],
    ]);
    // 2-1 seeded in the second pass: no offset vote of its own to report.
    expect(r.bands[1]?.offsets).toBeUndefined();
    expect(r.warnings).toEqual([]);
  });

  it('given labels for J″ ≤ 2 anchor the band; the rest is assigned and counted with them', () => {
    const { species, masses } = setup('12C16O');
    const lines = band('1-0', 10);
    const peaks: PeakInput[] = lines.map((l) => ({
      position: l.position,
      ...(l.j <= 2
        ? {
            assignment: {
              species: CO,
              band: { upper: 1, lower: 0 },
              branch: l.branch,
              j: l.j,
              source: 'given' as const,
            },
          }
        : {}),
    }));
    const r = assignAndFit(peaks, species, masses);
    expect(expectPublishedLabels(r, lines)).toBe(21);
    // The given lines keep their source, the others are automatic.
    r.lines.forEach((x, i) => {
      expect(x.assignment?.source, `line ${i}`).toBe((lines[i]?.j ?? 0) <= 2 ? 'given' : 'auto');
    });
    expect(r.bands[0]?.matched).toBe(21);
  });

  it('two instruments with offsets +0.02 and −0.1: each source its own offset, every line labelled', () => {
    const { species, masses } = setup('12C16O');
    const lines = band('1-0', 10);
    const twice = lines.flatMap((l) => [l, l]);
    const r = assignAndFit(
      lines.flatMap((l) => [
        { position: l.position + 0.02, source: 'a' },
        { position: l.position - 0.1, source: 'b' },
      ]),
      species,
      masses,
    );
    expect(expectPublishedLabels(r, twice)).toBe(42);
    const o = r.bands[0]?.offsets ?? [];
    expect(o.map((x) => [x.source, x.own])).toEqual([
      ['a', false],
      ['b', false],
    ]);
    expect(Math.abs((o[0]?.offset ?? 0) - 0.02)).toBeLessThan(1e-3);
    expect(Math.abs((o[1]?.offset ?? 0) + 0.1)).toBeLessThan(1e-3);
  });
});

describe('warnings and notes of a run', () => {
  it('a repeated row and a spurious line: LINES_UNEXPLAINED naming the repeat, and the competition noted', () => {
    const { species, masses } = setup('12C16O');
    const lines = band('1-0', 8); // P(1)–P(8), R(0)–R(8): 17 lines
    const copy = lines[3] as CoDatabaseLine; // P(4)
    const peaks = [
      ...lines.map((l) => ({ position: l.position })),
      { position: copy.position, intensity: 5 },
      { position: 2000 },
    ];
    const r = assignAndFit(peaks, species, masses);
    expect(expectPublishedLabels(r, [...lines, undefined, undefined])).toBe(17);
    expect(r.unexplained).toEqual([17, 18]);
    expect(r.warnings).toEqual([
      {
        code: 'LINES_UNEXPLAINED',
        message:
          '2 line(s) are explained by no band of 12C-16O; they stay unassigned and out of the fit; 1 of them repeat the position of an earlier line (a duplicated row?): lines 17',
        lines: [17, 18],
      },
    ]);
    expect(r.notes.get(17)).toBe(
      `competed with line 3 for 12C-16O 1-0 ${copy.branch}(${copy.j}); residual and intensity decided for line 3`,
    );
    expect(r.notes.has(18)).toBe(false);
  });

  it('a line 0.012 cm⁻¹ off its place (a blend): withdrawn with a note naming its label, left unexplained', () => {
    const { species, masses } = setup('12C16O');
    const lines = band('1-0', 15);
    const k = lines.findIndex((l) => l.branch === 'R' && l.j === 7);
    for (const sigma of [undefined, 0.001]) {
      const r = assignAndFit(
        lines.map((l, i) => ({
          position: l.position + (i === k ? 0.012 : 0),
          ...(sigma !== undefined ? { uncertainty: sigma } : {}),
        })),
        species,
        masses,
      );
      expect(expectPublishedLabels(r, lines)).toBe(30);
      expect(r.unexplained).toEqual([k]);
      expect(r.notes.get(k)?.startsWith('automatic assignment to 12C-16O 1-0 R(7) withdrawn: ')).toBe(true);
      expect(r.warnings).toEqual([
        {
          code: 'LINES_UNEXPLAINED',
          message: '1 line(s) are explained by no band of 12C-16O; they stay unassigned and out of the fit',
          lines: [k],
        },
      ]);
    }
  });

  it('an overtone 0.8 cm⁻¹ below (maxOffset 0.5) and a band with only given lines: BAND_NOT_FOUND says which', () => {
    const { species, masses } = setup('12C16O');
    const fundamental = band('1-0', 12);
    const overtone = band('2-0', 12);
    const r = assignAndFit(
      [...fundamental.map((l) => ({ position: l.position })), ...overtone.map((l) => ({ position: l.position - 0.8 }))],
      species,
      masses,
    );
    expect(expectPublishedLabels(r, fundamental)).toBe(25);
    expect(r.unexplained).toEqual(overtone.map((_, k) => 25 + k));
    const w = r.warnings.find((x) => x.message.startsWith('12C-16O band 2-0'));
    expect(w?.code).toBe('BAND_NOT_FOUND');
    expect(w?.message).toMatch(
      /^12C-16O band 2-0: 9 strong lines are predicted in the window but none was matched; its best offset is -0\.79\d cm-1, which matches 9 of them \(beyond the ±0\.5 cm-1 searched: send a larger "maxOffset"\)$/,
    );
    // Two given 2-0 lines (P(4), R(5)) and no free line there: only 2 matched, no best offset to tell.
    const at = (br: 'P' | 'R', j: number) => overtone.find((l) => l.branch === br && l.j === j)?.position as number;
    const g = assignAndFit(
      [
        ...fundamental.map((l) => ({ position: l.position })),
        ...(
          [
            ['P', 4],
            ['R', 5],
          ] as const
        ).map(([branch, j]) => ({
          position: at(branch, j),
          assignment: { species: CO, band: { upper: 2, lower: 0 }, branch, j, source: 'given' as const },
        })),
      ],
      species,
      masses,
    );
    expect(g.warnings).toEqual([
      {
        code: 'BAND_NOT_FOUND',
        message:
          '12C-16O band 2-0: 9 strong lines are predicted in the window but only 2 were matched (the band is absent, too weak, or shifted further)',
      },
    ]);
    expect(g.bands.find((b) => b.band === '2-0')).toMatchObject({ matched: 2 });
    expect(g.bands.find((b) => b.band === '2-0')?.bestOffset).toBeUndefined();
    // Four given 2-0 lines (P(3), P(4), R(4), R(5)): as many as a band needs, no warning.
    const four = assignAndFit(
      [
        ...fundamental.map((l) => ({ position: l.position })),
        ...(
          [
            ['P', 3],
            ['P', 4],
            ['R', 4],
            ['R', 5],
          ] as const
        ).map(([branch, j]) => ({
          position: at(branch, j),
          assignment: { species: CO, band: { upper: 2, lower: 0 }, branch, j, source: 'given' as const },
        })),
      ],
      species,
      masses,
    );
    expect(four.warnings).toEqual([]);
    expect(four.bands.find((b) => b.band === '2-0')).toMatchObject({ matched: 4 });
  });

  it('CO as its natural mixture with only 12C16O lines: the rare isotopologues named as not found', () => {
    const { species, masses } = setup('CO');
    const lines = band('1-0', 20);
    const r = assignAndFit(
      lines.map((l) => ({ position: l.position - 0.03 })),
      species,
      masses,
    );
    expect(expectPublishedLabels(r, lines)).toBe(41);
    expect(r.bands.map((b) => [b.species, b.matched])).toEqual([
      [CO, 41],
      ['13C-16O', 0],
      ['12C-18O', 0],
    ]);
    // Their strong seeds (J″ ≤ 4: P(1)–P(4), R(0)–R(4), all inside 2062–2215 cm⁻¹ with the 13C16O and 12C18O
    // origins near 2096 and 2092 cm⁻¹, from memory) are 9 each.
    expect(r.warnings.map((w) => w.code)).toEqual(['BAND_NOT_FOUND', 'BAND_NOT_FOUND']);
    for (const [w, name] of [
      [r.warnings[0], '13C-16O'],
      [r.warnings[1], '12C-18O'],
    ] as const) {
      // Fewer than 4 matches at the best offset: no advice on maxOffset, whatever that offset.
      expect(w?.message).toMatch(
        new RegExp(
          `^${name} band 1-0: 9 strong lines are predicted in the window but none was matched; its best offset is [+-]\\d\\.\\d{3} cm-1, which matches [0-3] of them \\(the band is absent, too weak, or shifted further\\)$`,
        ),
      );
    }
    expect(r.bands[1]?.bestOffset).toBeDefined();
    expect(r.bands[1]?.offsets).toBeUndefined();
  });

  it('a hot band 1000× too strong: its lines left out for their intensity, with notes and BAND_NOT_FOUND saying why', () => {
    const { species, masses } = setup('12C16O');
    const fundamental = band('1-0', 15); // 31 lines, indices 0–30
    const hot = band('2-1', 12); // 25 lines, indices 31–55
    const r = assignAndFit(
      [
        ...fundamental.map((l) => ({ position: l.position, intensity: intensity(l) })),
        ...hot.map((l) => ({ position: l.position, intensity: 1000 * intensity(l) })),
      ],
      species,
      masses,
    );
    expect(expectPublishedLabels(r, fundamental)).toBe(31);
    const hotIdx = hot.map((_, k) => 31 + k);
    expect(r.unexplained).toEqual(hotIdx);
    expect(r.warnings.map((w) => w.code)).toEqual(['LINES_LEFT_OUT_FOR_INTENSITY', 'BAND_NOT_FOUND']);
    expect(r.warnings[0]).toEqual({
      code: 'LINES_LEFT_OUT_FOR_INTENSITY',
      message:
        '25 line(s) match a predicted band by position but were left out for their intensity (its observed-to-predicted intensity ratio strays more than ×20 from the main band\'s): if the intensities of different scans were normalised separately, label the lines with "source"',
      lines: hotIdx,
    });
    expect(r.warnings[1]?.message).toMatch(
      /^12C-16O band 2-1: 9 strong lines are predicted in the window but none was matched; its best offset is \+0\.00\d cm-1, which matches 9 of them \(within the ±0\.5 cm-1 searched, yet refused: its lines' observed-to-predicted intensity ratio strays more than ×20 from that of the best-established band, so it was taken for a coincidence \(are the intensities real\?\), or their peaks went to lines of another band\)$/,
    );
    // Each hot line's note names its own published label and the ratio, ≈ ×1000 (3 digits).
    hot.forEach((l, k) => {
      const note = r.notes.get(31 + k) ?? '';
      expect(
        note.startsWith(`left out for its intensity: its position matches 12C-16O 2-1 ${l.branch}(${l.j}) (+0.00`),
      ).toBe(true);
      expect(note).toMatch(
        /its intensity is ×(999|1\.00e\+3) the one expected on the main band's scale \(more than ×20 either way\), so it was taken for a coincidence$/,
      );
    });
    expect(r.bands[1]).toMatchObject({ band: '2-1', matched: 0, bestOffset: { matches: 9 } });
  });

  it('the same hot band 1000× too strong, all lines 0.3 cm⁻¹ high in one named scan; lines without or with zero intensity get no note', () => {
    const { species, masses } = setup('12C16O');
    const fundamental = band('1-0', 15);
    const hot = band('2-1', 12);
    const r = assignAndFit(
      [
        ...fundamental.map((l) => ({ position: l.position + 0.3, intensity: intensity(l), source: 'x' })),
        ...hot.map((l, k) => ({
          position: l.position + 0.3,
          source: 'x',
          ...(k === 0 ? {} : { intensity: k === 1 ? 0 : 1000 * intensity(l) }),
        })),
      ],
      species,
      masses,
    );
    expect(expectPublishedLabels(r, fundamental)).toBe(31);
    expect(r.notes.has(31)).toBe(false);
    expect(r.notes.has(32)).toBe(false);
    hot.forEach((l, k) => {
      if (k < 2) return;
      const note = r.notes.get(31 + k) ?? '';
      // The distance printed is from the reference shifted by the voted offset (≈ +0.3): a few 1e-3 cm⁻¹.
      expect(
        note.startsWith(`left out for its intensity: its position matches 12C-16O 2-1 ${l.branch}(${l.j}) (+0.00`),
        note,
      ).toBe(true);
      expect(note).toContain(`the one expected on the main band's scale of source "x" (more than ×20 either way)`);
    });
  });

  it('ten and eleven repeated rows: the warning lists at most ten, then "…"', () => {
    const { species, masses } = setup('12C16O');
    const lines = band('1-0', 8); // 17 lines
    const copies = lines.slice(0, 11).map((l) => ({ position: l.position }));
    const r = assignAndFit([...lines.map((l) => ({ position: l.position })), ...copies], species, masses);
    const w = r.warnings.find((x) => x.code === 'LINES_UNEXPLAINED');
    expect(w?.message).toBe(
      '11 line(s) are explained by no band of 12C-16O; they stay unassigned and out of the fit; 11 of them repeat the position of an earlier line (a duplicated row?): lines 17, 18, 19, 20, 21, 22, 23, 24, 25, 26, …',
    );
    // Exactly ten: all listed, no "…".
    const ten = assignAndFit(
      [...lines.map((l) => ({ position: l.position })), ...copies.slice(0, 10)],
      species,
      masses,
    );
    expect(ten.warnings.find((x) => x.code === 'LINES_UNEXPLAINED')?.message).toBe(
      '10 line(s) are explained by no band of 12C-16O; they stay unassigned and out of the fit; 10 of them repeat the position of an earlier line (a duplicated row?): lines 17, 18, 19, 20, 21, 22, 23, 24, 25, 26',
    );
  });

  it('CO as its natural mixture, fundamental J″ ≤ 10: 13C16O has only 4 strong lines in the window, too few to be called not found', () => {
    // Window P(10) − 1 ≈ 2102.3 to R(10) + 1 ≈ 2191.1: of 13C16O 1-0 (origin ≈ 2096.1, B ≈ 1.84, from memory) only
    // R(1)–R(4) of its J″ ≤ 4 lines fall inside, fewer than 2 × 4.
    const { species, masses } = setup('CO');
    const lines = band('1-0', 10);
    const r = assignAndFit(
      lines.map((l) => ({ position: l.position })),
      species,
      masses,
    );
    expect(expectPublishedLabels(r, lines)).toBe(21);
    expect(r.warnings.filter((w) => w.code === 'BAND_NOT_FOUND' && w.message.startsWith('13C-16O'))).toEqual([]);
    expect(r.bands.find((b) => b.species === '13C-16O')).toMatchObject({ matched: 0 });
    expect(r.bands.find((b) => b.species === '13C-16O')?.bestOffset).toBeUndefined();
  });

  it("an overtone on the fundamental's intensity scale, kept for its positions: INTENSITY_SCALE_DIFFERS ×100", () => {
    // The library guesses the 2-0 band 10⁻² as strong as 1-0 (common practice, src/assign/intensity.ts); sent on
    // one scale, its observed/predicted ratio is 100× the fundamental's.
    const { species, masses } = setup('12C16O');
    const lines = [...band('1-0', 12), ...band('2-0', 12)];
    const r = assignAndFit(
      lines.map((l) => ({ position: l.position, intensity: intensity(l) })),
      species,
      masses,
    );
    expect(expectPublishedLabels(r, lines)).toBe(50);
    expect(r.warnings).toEqual([
      {
        code: 'INTENSITY_SCALE_DIFFERS',
        message:
          'band 12C-16O 2-0 was assigned by its positions, but its observed-to-predicted intensity ratio is ×100 that of the main band (more than ×20): were its intensities normalised separately? Label the lines of each scan with "source" so that intensities are compared only within a scan',
      },
    ]);
    // Labelled as two sources, each band is the main band of its own scan: no warning.
    const split = assignAndFit(
      lines.map((l) => ({ position: l.position, intensity: intensity(l), source: l.band })),
      species,
      masses,
    );
    expect(expectPublishedLabels(split, lines)).toBe(50);
    expect(split.warnings).toEqual([]);
    // One named scan: the warning names it.
    const named = assignAndFit(
      lines.map((l) => ({ position: l.position, intensity: intensity(l), source: 'scan' })),
      species,
      masses,
    );
    expect(named.warnings).toHaveLength(1);
    expect(
      named.warnings[0]?.message.startsWith('band 12C-16O 2-0 of source "scan" was assigned by its positions, but'),
    ).toBe(true);
  });
});

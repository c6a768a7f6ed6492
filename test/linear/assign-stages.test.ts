import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  assignLinearLines,
  identifyLinearSpecies,
  type LinearIdentification,
  linearChecks,
  mergeIdentifications,
} from '../../src/linear/assign.js';
import { thrown } from '../helpers/thrown.js';

/**
 * Fast checks of the stages of the automatic assignment of linear molecules on real, small lists: the 17 HITRAN
 * positions of OCS ν1 10⁰0–00⁰0 (HITRAN sample records, ../shared/fixtures/linear-reference.json) and the 116 lines
 * of the CO2 laser bands (Witteman table, same file). The right numbering is the HITRAN / Witteman label of each
 * line; nothing below takes an expected value from the code. A few hundred ms per assignment, so that a mutation
 * run of assign.ts can afford them.
 */
const DATA = JSON.parse(
  readFileSync(new URL('../fixtures/linear-reference/linear-reference.json', import.meta.url), 'utf8'),
) as { line_tables: Record<string, { transition: string; 'wavenumber_cm-1': number }[]> };
const OCS_TABLE = DATA.line_tables['OCS 16O12C32S nu1 band 10^0 0 - 00^0 0 (HITRAN)'] ?? [];
const OCS_LABELS = OCS_TABLE.map((x) => /([PR])\((\d+)\)/.exec(x.transition)?.slice(1).join('') ?? '?');
/** OCS ν1 positions shifted by an instrument offset, with optional extra lines. */
const ocs = (shift: number, extra: number[] = []) => [
  ...OCS_TABLE.map((x) => ({ position: x['wavenumber_cm-1'] + shift })),
  ...extra.map((p) => ({ position: p + shift })),
];
const labels = (r: ReturnType<typeof assignLinearLines>) =>
  r.lines.map((l) => (l.assignment ? `${l.assignment.branch}${l.assignment.j}` : '-'));
// 2B″ of OCS: 2 × 0.2028567535 cm⁻¹ (NIST triatomic / Reinartz & Dymanus 1974, via the note) = 0.4057 cm⁻¹.
const SPACING = 2 * 0.2028567535;

describe('refusals', () => {
  it('empty list, bad position, bad σ and a species without reference constants, with code, message, details', () => {
    const empty = thrown(() => assignLinearLines('OCS', []));
    expect(empty.code).toBe('INPUT_INVALID');
    expect(empty.message).toBe('the line list is empty');
    for (const bad of [0, -2, Number.NaN, Number.POSITIVE_INFINITY]) {
      const e = thrown(() => assignLinearLines('OCS', [{ position: 858 }, { position: bad }]));
      expect(e.code).toBe('INPUT_INVALID');
      expect(e.message).toBe(`line 1: position ${bad} must be positive and finite`);
      expect(e.details).toEqual({ line: 1 });
    }
    for (const bad of [0, -1e-3, Number.NaN, Number.POSITIVE_INFINITY]) {
      const e = thrown(() => assignLinearLines('OCS', [{ position: 858, uncertainty: bad }]));
      expect(e.code).toBe('INPUT_INVALID');
      expect(e.message).toBe(`line 0: uncertainty ${bad} must be positive`);
      expect(e.details).toEqual({ line: 0 });
    }
    const cs2 = thrown(() => assignLinearLines('CS2', [{ position: 1535 }]));
    expect(cs2.code).toBe('SPECIES_NOT_IN_LIBRARY');
    expect(cs2.details).toEqual({ species: '32S-12C-32S' });
    expect(cs2.message).toMatch(/^32S-12C-32S has no reference constants in the linear library \(16O-12C-16O, /);
  });
});

describe('OCS ν1 (17 HITRAN lines)', () => {
  it('shifted by +0.15 cm⁻¹ with one foreign line: every line numbered as HITRAN, offset, band, fit, checks', () => {
    // 855.0 + 0.15 lies 0.2 cm⁻¹ from the nearest ν1 line (P(10) at 854.9 + 0.15): no band explains it.
    const peaks = ocs(0.15, [855.0]);
    const r = assignLinearLines('OCS', peaks);
    expect(r.species).toBe('16O-12C-32S');
    expect(labels(r)).toEqual([...OCS_LABELS, '-']);
    // The offset: 0.15 within 1e-4 (HITRAN positions to 1e-6, the vote refined by the fit of 17 lines).
    expect(Math.abs(r.offset.value - 0.15)).toBeLessThan(1e-4);
    expect(r.offset.unit).toBe('cm-1');
    // At most an eighth of the line spacing.
    expect(r.offset.uncertainty).toBeLessThanOrEqual(SPACING / 8);
    for (const l of r.lines.slice(0, 17)) {
      expect(l.status).toBe('assigned');
      expect(l.band).toBe('10⁰0–00⁰0');
      expect(l.assignment?.upper).toMatchObject({ v: [1, 0, 0], l: 0 });
      expect(l.assignment?.lower).toMatchObject({ v: [0, 0, 0], l: 0 });
      expect(l.assignment?.parity).toBe('e');
      // Predicted from the fit (offset included): within 1e-5 cm⁻¹ of the position, and residual = position − predicted.
      expect(Math.abs(l.residual ?? 1)).toBeLessThan(1e-5);
      expect((l.predicted ?? 0) + (l.residual ?? 0)).toBeCloseTo(l.position, 9);
    }
    expect(r.lines[17]).toEqual({ index: 17, position: 855.15, status: 'unassigned' });
    // 1 of 18 lines unexplained, by count (no intensities).
    expect(r.unexplainedFraction).toBeCloseTo(1 / 18, 12);
    const band = r.bands.find((b) => b.label === '10⁰0–00⁰0');
    expect(band?.kind).toBe('parallel');
    expect(band?.assigned).toBe(17);
    expect(band?.jRange).toEqual([0, 30]);
    // Predicted: every P(J) and R(J) of the band in [lo, hi] = [846.66 + 0.15 − 1, 870.56 + 0.15 + 1]: more than
    // the 17 sent, fewer than 2 × 61.
    expect(band?.predicted).toBeGreaterThan(17);
    expect(band?.predicted).toBeLessThan(122);
    expect(r.fit?.statistics.fitted).toBe(17);
    // Numbering: B″ of 00⁰0 against the library (0.2028567424, the note's fit; NIST 0.2028567535): ratio within
    // 1e-6 of 1.
    expect(r.numbering).toHaveLength(1);
    const n = r.numbering[0];
    expect(n?.level).toBe('00⁰0');
    expect(n?.ok).toBe(true);
    expect(Math.abs((n?.ratio ?? 0) - 1)).toBeLessThan(1e-6);
    expect(Math.abs((n?.referenceB ?? 0) - 0.2028567535)).toBeLessThan(2e-8);
    expect(n?.ratio).toBeCloseTo((n?.fittedB.value ?? 0) / (n?.referenceB ?? 1), 14);
    expect(r.warnings).toEqual([]);

    const checks = linearChecks(peaks, r, []);
    expect(checks.map((c) => c.id)).toEqual(['identity', 'calibration', 'unexplained-lines']);
    const [identity, calibration, unexplained] = checks;
    expect(identity?.status).toBe('pass');
    expect(identity?.message).toBe('the lines are those of carbonyl sulfide (16O12C32S)');
    expect(identity?.measured.bestMatch).toBeNull();
    expect(identity?.measured.bestScore).toBe(0);
    expect(identity?.limit).toEqual({ relativeB: 1e-3, bestScore: 0.5 });
    // Calibration: the 0.15 cm⁻¹ offset (limit 0.05, DEFAULT_TOLERANCES) fails; measured within 3e-5 (HITRAN
    // uncertainty code 5 means 1e-5..1e-4 per line; the library's constants are a refit of other HITRAN records).
    expect(calibration?.status).toBe('fail');
    const off = calibration?.measured.offset as { value: number; uncertainty: number };
    expect(Math.abs(off.value - 0.15)).toBeLessThan(3e-5);
    expect(calibration?.measured.lines).toBe(17);
    expect(calibration?.measured.leftOutRecalled).toBe(0);
    expect(calibration?.measured.standard).toBe('16O-12C-32S');
    // A pure offset: the scale (ppm) is zero within 3σ and determined (σ far below 20/3 ppm).
    const scale = calibration?.measured.scalePpm as { value: number; uncertainty: number };
    expect(Math.abs(scale.value)).toBeLessThan(3 * scale.uncertainty + 1e-9);
    expect(scale.uncertainty).toBeLessThan(20 / 3);
    // The weighted centre lies within the lines sent.
    expect(calibration?.measured.centre).toBeGreaterThan(846.8);
    expect(calibration?.measured.centre).toBeLessThan(870.8);
    expect(calibration?.message).toMatch(
      /^offset 0\.1(4999|500\d) ± 0\.0000\d cm-1 at 8[56]\d\.\d\d cm-1 against carbonyl sulfide \(16O12C32S\) from 17 lines$/,
    );
    expect(calibration?.limit).toEqual({ offset: 0.05, scalePpm: 20 });
    // Unexplained: 1 of 18 = 5.6 % > 5 %: fail; at a 12 % limit it passes, at a 10 % limit (half = 5 %) it warns.
    expect(unexplained?.status).toBe('fail');
    expect(unexplained?.measured).toEqual({ fraction: 1 / 18, lines: 1, unassigned: [17] });
    expect(unexplained?.message).toBe('1 of 18 lines (5.6 %) explained by no band of 16O-12C-32S');
    expect(linearChecks(peaks, r, [], { unexplainedFraction: 0.12 })[2]?.status).toBe('pass');
    expect(linearChecks(peaks, r, [], { unexplainedFraction: 0.1 })[2]?.status).toBe('warn');
    // The calibration limit raised to 0.2 cm⁻¹: pass.
    expect(linearChecks(peaks, r, [], { calibrationOffset: 0.2 })[1]?.status).toBe('pass');

    // Identity against a ranking: another molecule scoring ≥ 0.5 first fails it, below 0.5 or an isotopologue of
    // the same molecule does not.
    const other = (species: string, score: number): LinearIdentification => ({
      species,
      name: 'hydrogen cyanide (H12C14N)',
      score,
      matched: 10,
      predicted: 20,
      offset: 0,
    });
    const fail = linearChecks(peaks, r, [other('1H-12C-14N', 0.6)])[0];
    expect(fail?.status).toBe('fail');
    expect(fail?.message).toBe('the lines match hydrogen cyanide (H12C14N) (score 0.60) better than 16O-12C-32S');
    expect(fail?.measured.bestMatch).toBe('1H-12C-14N');
    expect(fail?.measured.bestScore).toBe(0.6);
    expect(linearChecks(peaks, r, [other('1H-12C-14N', 0.49)])[0]?.status).toBe('pass');
    expect(linearChecks(peaks, r, [other('16O-13C-32S', 0.9)])[0]?.status).toBe('pass');
    // A B″ off by more than identityB warns, by more than three times it fails: limits set around the measured
    // relative difference relB = |ratio − 1| (< 1e-6 here).
    const relB = Math.abs((n?.ratio ?? 0) - 1);
    expect(identity?.measured.relativeB).toBeCloseTo(relB, 15);
    const warn = linearChecks(peaks, r, [], { identityB: relB / 2 })[0];
    expect(warn?.status).toBe('warn');
    expect(warn?.message).toBe(`fitted B of 00⁰0 differs from the library's by ${(relB * 100).toFixed(3)} %`);
    expect(linearChecks(peaks, r, [], { identityB: relB / 4 })[0]?.status).toBe('fail');
  });

  it('intensities: all equal is a placeholder (ignored, said so); real ones weigh the unexplained share', () => {
    const flat = assignLinearLines(
      'OCS',
      ocs(0, [855.0]).map((p) => ({ ...p, intensity: 1 })),
    );
    expect(flat.warnings.some((w) => w.startsWith('intensities ignored: '))).toBe(true);
    // Placeholder intensities weigh nothing: the share is counted in lines, 1 of 18.
    expect(flat.unexplainedFraction).toBeCloseTo(1 / 18, 12);
    // Real intensities (the foreign line 0.3, the band's lines 1 + J/100): the share by intensity.
    const peaks = ocs(0, [855.0]).map((p, i) => ({
      ...p,
      intensity: i < 17 ? 1 + Number(OCS_LABELS[i]?.slice(1)) / 100 : 0.3,
    }));
    const r = assignLinearLines('OCS', peaks);
    expect(r.warnings).toEqual([]);
    const total = peaks.reduce((s, p) => s + p.intensity, 0);
    expect(r.unexplainedFraction).toBeCloseTo(0.3 / total, 12);
    expect(labels(r)).toEqual([...OCS_LABELS, '-']);
  });

  it('a numbering one spacing off is moved; one beyond the range searched leaves every line unassigned', () => {
    // 0.15 + one spacing with maxOffset 0.5: the vote finds 0.15 (one line off), the check fails on B″, and the
    // neighbouring numbering (one spacing further, within maxOffset + spacing/2) passes.
    const moved = assignLinearLines('OCS', ocs(0.15 + SPACING), { maxOffset: 0.5 });
    expect(labels(moved)).toEqual(OCS_LABELS);
    // The offset reported is the vote's plus one spacing: within 0.01 of the truth (the vote's bin).
    expect(Math.abs(moved.offset.value - (0.15 + SPACING))).toBeLessThan(0.01);
    expect(moved.warnings).toEqual([
      `numbering moved by the band's line spacing (offset ${moved.offset.value.toFixed(4)} cm-1)`,
    ]);
    // Three spacings off with maxOffset 0.5: no numbering within reach passes.
    const far = assignLinearLines('OCS', ocs(0.15 + 3 * SPACING), { maxOffset: 0.5 });
    expect(far.lines.every((l) => l.status === 'unassigned' && l.assignment === undefined)).toBe(true);
    expect(far.fit).toBeUndefined();
    expect(far.unexplainedFraction).toBe(1);
    expect(far.bands.every((b) => b.assigned === 0 && b.jRange === undefined)).toBe(true);
    expect(far.warnings[0]).toBe(
      "no numbering within ±0.5 cm-1 passes the check of the lower level's B against the library: lines left unassigned (a larger offset needs options.maxOffset)",
    );
    // The numbering that failed is still reported, so identity fails on its B″ (a few lines off: B″ off by
    // parts in 10³, beyond 3 × identityB = 3e-3).
    expect(far.numbering[0]?.ok).toBe(false);
    const id = linearChecks(ocs(0.15 + 3 * SPACING), far, [])[0];
    expect(id?.status).toBe('fail');
    expect(id?.message).toMatch(/^fitted B of 00⁰0 differs from the library's by \d\.\d{3} %$/);
  });

  it('a list where no band of the species falls: every line unassigned, a warning, identity fails, no calibration', () => {
    const peaks = [3000, 3001.3, 3002.9, 3004.1].map((position) => ({ position }));
    const r = assignLinearLines('OCS', peaks);
    expect(r.warnings).toEqual(['no band of 16O-12C-32S in the library falls in 2999.0–3005.1 cm-1']);
    expect(r.lines.every((l) => l.status === 'unassigned')).toBe(true);
    expect(r.numbering).toEqual([]);
    expect(r.fit).toBeUndefined();
    expect(r.offset.value).toBe(0);
    expect(r.unexplainedFraction).toBe(1);
    const [identity, calibration, unexplained] = linearChecks(peaks, r, []);
    expect(identity).toEqual({
      id: 'identity',
      status: 'fail',
      measured: { species: '16O-12C-32S', assigned: 0 },
      limit: { relativeB: 1e-3 },
      message: 'no line was assigned to carbonyl sulfide (16O12C32S)',
    });
    expect(calibration?.status).toBe('not-evaluated');
    expect(calibration?.message).toBe('fewer than 3 assigned lines with reference positions');
    expect(calibration?.measured).toEqual({ lines: 0, leftOutRecalled: 0 });
    expect(unexplained?.status).toBe('fail');
    expect(unexplained?.message).toBe('4 of 4 lines (100.0 %) explained by no band of 16O-12C-32S');
  });
});

describe('CO2 laser bands and identification', () => {
  it('the 116 Witteman lines (00⁰1–10⁰0_I and _II) are numbered as the table, and CO2 ranks first', () => {
    const table =
      DATA.line_tables['12C16O2 laser bands 00011-10001 (10 um) and 00011-10002 (9 um): Witteman table'] ?? [];
    const peaks = table.map((x) => ({ position: x['wavenumber_cm-1'] }));
    const r = assignLinearLines('CO2', peaks);
    table.forEach((x, i) => {
      const m = /^(10|9)([PR])\((\d+)\)$/.exec(x.transition) as RegExpExecArray;
      const l = r.lines[i];
      expect(l?.assignment?.branch).toBe(m[2]);
      expect(l?.assignment?.j).toBe(Number(m[3]));
      expect(l?.assignment?.lower.r).toBe(m[1] === '10' ? 1 : 2);
    });
    // 58 lines per band (the table), J″ 2..58 even only (00⁰1's odd J are missing in 12C16O2: spin statistics).
    const bands = r.bands.filter((b) => b.assigned > 0);
    expect(bands.map((b) => [b.label, b.assigned])).toEqual([
      ['00⁰1–10⁰0_I', 58],
      ['00⁰1–10⁰0_II', 58],
    ]);
    expect(bands.every((b) => b.kind === 'parallel')).toBe(true);
    expect(r.numbering.map((n) => n.ok)).toEqual([true, true]);
    const ranking = identifyLinearSpecies(peaks);
    expect(ranking[0]?.species).toBe('16O-12C-16O');
    expect(ranking[0]?.score).toBeGreaterThan(0.9);
    // At most 60 predictions (the 60 strongest) and the offset near zero (the table is a published one).
    expect(ranking[0]?.predicted).toBeLessThanOrEqual(60);
    expect(Math.abs(ranking[0]?.offset ?? 1)).toBeLessThan(0.01);
    // Ranked best first.
    for (let i = 1; i < ranking.length; i++) {
      expect(ranking[i]?.score).toBeLessThanOrEqual(ranking[i - 1]?.score ?? 0);
    }
    expect(identifyLinearSpecies([])).toEqual([]);
  });

  it('mergeIdentifications sorts the diatomic and linear rankings together, best first', () => {
    const x = (species: string, score: number): LinearIdentification => ({
      species,
      name: species,
      score,
      matched: 0,
      predicted: 0,
      offset: 0,
    });
    const merged = mergeIdentifications([x('12C-16O', 0.7), x('1H-35Cl', 0.2)], [x('16O-12C-16O', 0.9), x('OCS', 0.4)]);
    expect(merged.map((m) => m.species)).toEqual(['16O-12C-16O', '12C-16O', 'OCS', '1H-35Cl']);
  });
});

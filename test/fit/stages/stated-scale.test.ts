import { describe, expect, it } from 'vitest';
import { selectLevelModel } from '../../../src/fit/level-selection.js';
import { rescaleStatedUncertainties } from '../../../src/fit/stated-scale.js';
import type { LineInput } from '../../../src/fit/types.js';
import type { Observation } from '../../../src/models/linear-model.js';
import { CO_12_16, independentLines } from '../../helpers/independent-lines.js';
import { observationsOf } from './observations-of.js';

// Stage 1c on its own: groups of lines whose stated σ disagree with their scatter and with the other lines, on
// lines of the independent generator (¹²C¹⁶O, Huber & Herzberg constants from memory). Computed inside `it`.

const FIT = { maxOrder: 5, termSignificance: 0.01 };

/** CO 1-0 and 3-0 (true scatter s1) and 2-0 (s2), J″ ≤ 25, every line stated at σ = 0.001 cm⁻¹; optional source labels. */
function stated(s1: number, s2: number, source?: (i: number) => string | undefined) {
  const list = independentLines({
    molecule: CO_12_16,
    bands: [
      { upper: 1, lower: 0, jMax: 25, sigma: s1 },
      { upper: 2, lower: 0, jMax: 25, sigma: s2 },
      { upper: 3, lower: 0, jMax: 25, sigma: s1 },
    ],
    withUncertainties: false,
    seed: 51,
  });
  const input: LineInput[] = list.lines.map((l, i) => {
    const s = source?.(i);
    return { position: l.position, uncertainty: 0.001, ...(s === undefined ? {} : { source: s }) };
  });
  const obs: Observation[] = observationsOf(list).map((o) => ({ ...o, weight: 1 / 0.001 ** 2 }));
  return { input, obs, first: selectLevelModel(obs, 5, 'a-posteriori', 0.01) };
}

describe('rescaleStatedUncertainties', () => {
  it('2-0 scattered ten times its stated σ: every group is measured against the others and takes its own scale', () => {
    // Each group is compared with all other lines pooled; with 2-0 among them, 1-0 and 3-0 stand out too (their
    // scatter is far below the pool's), so all three take their own scale: ≈ 1, ≈ 10, ≈ 1. No line is left for
    // the pooled rest, whose scale is then 1.
    const { input, obs, first } = stated(0.001, 0.01);
    const r = rescaleStatedUncertainties(input, obs, FIT, first);
    expect(r.groups.map((g) => [g.group, g.lines])).toEqual([
      ['12C-16O 1-0, σ = 0.00100 cm-1', 51],
      ['12C-16O 2-0, σ = 0.00100 cm-1', 51],
      ['12C-16O 3-0, σ = 0.00100 cm-1', 51],
    ]);
    const [f1, f2, f3] = r.groups.map((g) => g.factor) as [number, number, number];
    // 51 lines each: the rms scale is known to about 10 %; 30 % is three of those (stated tolerance).
    expect(Math.abs(f1 - 1)).toBeLessThan(0.3);
    expect(Math.abs(f2 / 10 - 1)).toBeLessThan(0.3);
    expect(Math.abs(f3 - 1)).toBeLessThan(0.3);
    // A σ stated otherwise is another group, not seen: the pooled scale of the rest, 1 here.
    expect(r.factorFor('12C-16O', '2-0', 0.002)).toBe(1);
    for (const o of r.observations) {
      const f = [f1, f2, f3][o.upperV - 1] as number;
      expect(r.factorFor('12C-16O', `${o.upperV}-0`, 0.001)).toBe(f);
      expect(o.weight).toBeCloseTo(1e6 / f ** 2, 3);
    }
    expect(r.warnings).toEqual([
      {
        code: 'UNCERTAINTY_RESCALED',
        message: `the stated uncertainties of some groups of lines disagree with their scatter and with the other lines (F test, p < 0.001); the σ of each such group were multiplied by its own scale (rms of residual/σ, gross errors out) and those of the other lines by their pooled scale 1.0, so that every line is weighed and judged against the scatter of its own group: ${r.groups.map((g) => `${g.group} × ${g.factor.toPrecision(2)} (51 lines)`).join(', ')}`,
      },
    ]);
  });

  it('lines that name their source are grouped by source, whatever their band and σ', () => {
    // Sources: 1-0 split in two, 3-0 split in two (all right), 2-0 ten times its σ.
    const { input, obs, first } = stated(0.001, 0.01, (i) =>
      i < 25 ? 'A1' : i < 51 ? 'A2' : i < 102 ? 'bad' : i < 127 ? 'C1' : 'C2',
    );
    const r = rescaleStatedUncertainties(input, obs, FIT, first);
    expect(r.groups.map((g) => [g.group, g.lines])).toEqual([
      ['A1', 25],
      ['A2', 26],
      ['bad', 51],
      ['C1', 25],
      ['C2', 26],
    ]);
    const bad = r.groups.find((g) => g.group === 'bad');
    expect(Math.abs((bad?.factor as number) / 10 - 1)).toBeLessThan(0.3);
    expect(r.factorFor('12C-16O', '2-0', 0.001, 'bad')).toBe(bad?.factor);
    for (const s of ['A1', 'A2', 'C1', 'C2'])
      expect(Math.abs(r.factorFor('12C-16O', '1-0', 0.001, s) - 1), s).toBeLessThan(0.3);
  });

  it('one source stating one σ for two bands, one of them scattered ten times it: the bands are told apart', () => {
    // One instrument (source "lab") sends 1-0 and 2-0 at one stated σ; 3-0 comes from another. Judged as one group,
    // "lab" would take a scale between 1 and 10 and its 1-0 lines would be weighed as if they scattered like 2-0.
    const { input, obs, first } = stated(0.001, 0.01, (i) => (i < 102 ? 'lab' : 'other'));
    const r = rescaleStatedUncertainties(input, obs, FIT, first);
    const f10 = r.factorFor('12C-16O', '1-0', 0.001, 'lab');
    const f20 = r.factorFor('12C-16O', '2-0', 0.001, 'lab');
    expect(Math.abs(f20 / 10 - 1), `2-0 × ${f20}`).toBeLessThan(0.3);
    expect(Math.abs(f10 - 1), `1-0 × ${f10}`).toBeLessThan(0.3);
    expect(r.groups.map((g) => g.group)).toContain('lab: 12C-16O 2-0, σ = 0.00100 cm-1');
    // A source name holding the keys' separator is named whole.
    const piped = stated(0.001, 0.01, (i) => (i < 102 ? 'lab|2' : 'other|x'));
    const rp = rescaleStatedUncertainties(piped.input, piped.obs, FIT, piped.first);
    expect(rp.groups.map((g) => g.group)).toContain('lab|2: 12C-16O 2-0, σ = 0.00100 cm-1');
    expect(rp.factorFor('12C-16O', '2-0', 0.001, 'lab|2')).toBe(r.factorFor('12C-16O', '2-0', 0.001, 'lab'));
    // A source stating one band and σ keeps its name as the group's.
    expect(Math.abs(r.factorFor('12C-16O', '3-0', 0.001, 'other') - 1)).toBeLessThan(0.3);
  });

  it('one source stating a σ per line: its lines are judged as one group', () => {
    // σ differing from line to line (a peak fit's), 2-0 ten times too small: no band and σ has lines enough to be
    // judged alone, so the source's lines form one group, as when sources were judged whole.
    const { input, obs } = stated(0.001, 0.01, (i) => (i >= 51 && i < 102 ? 'bad' : 'good'));
    const perLine = input.map((l, i) => ({ ...l, uncertainty: 0.001 * (1 + 0.013 * (i % 20)) }));
    const w = obs.map((o) => ({ ...o, weight: 1 / (perLine[o.index]?.uncertainty as number) ** 2 }));
    const r = rescaleStatedUncertainties(perLine, w, FIT, selectLevelModel(w, 5, 'a-posteriori', 0.01));
    expect(r.groups.map((g) => [g.group, g.lines])).toContainEqual(['bad', 51]);
    const bad = r.factorFor('12C-16O', '2-0', perLine[60]?.uncertainty as number, 'bad');
    expect(Math.abs(bad / 10 - 1)).toBeLessThan(0.3);
  });

  it('a gross error (0.05 cm⁻¹, 50σ) in a good band stays out of its scale', () => {
    const { input, obs } = stated(0.001, 0.01);
    const bad = obs.map((o) => (o.index === 12 ? { ...o, position: o.position + 0.05 } : o));
    const r = rescaleStatedUncertainties(input, bad, FIT, selectLevelModel(bad, 5, 'a-posteriori', 0.01));
    // Were it counted, 1-0's rms scale would be about √(1 + 50²/51) ≈ 7.
    expect(Math.abs(r.factorFor('12C-16O', '1-0', 0.001) - 1)).toBeLessThan(0.3);
    expect(Math.abs(r.factorFor('12C-16O', '2-0', 0.001) / 10 - 1)).toBeLessThan(0.3);
  });

  it('groups that agree, or fewer than 20 lines with σ, are left exactly as they were', () => {
    const agree = stated(0.001, 0.0012);
    const r = rescaleStatedUncertainties(agree.input, agree.obs, FIT, agree.first);
    expect(r.observations).toBe(agree.obs);
    expect(r.groups).toEqual([]);
    expect(r.warnings).toEqual([]);
    expect(r.factorFor('12C-16O', '2-0', 0.001)).toBe(1);
    // 19 lines with σ (the rest without): too few to compare groups.
    const { input, obs, first } = stated(0.001, 0.01);
    const few = input.map((l, i) => (i < 10 || (i >= 51 && i < 60) ? l : { position: l.position }));
    expect(few.filter((l) => l.uncertainty !== undefined)).toHaveLength(19);
    const n = rescaleStatedUncertainties(few, obs, FIT, first);
    expect(n.observations).toBe(obs);
    expect(n.groups).toEqual([]);
  });
});

import { describe, expect, it } from 'vitest';
import { reducedChiSquare, studentisedResiduals } from '../../../src/fit/engine.js';
import { reportLevels } from '../../../src/fit/level-report.js';
import { predictWithVariance, selectLevelModel } from '../../../src/fit/level-selection.js';
import { readLines } from '../../../src/fit/observations.js';
import type { LineInput } from '../../../src/fit/types.js';
import { CO_12_16, independentLines } from '../../helpers/independent-lines.js';

// Stage 4 on its own: the level fit reported line by line, band by band and level by level, on lines of the
// independent generator (¹²C¹⁶O, Huber & Herzberg constants from memory). Reduced mass of ¹²C¹⁶O from AME2020
// masses (12 u exactly, 15.994914619 u): 6.856208638 u. Computed inside `it` (mutation testing).

const MU = new Map([['12C-16O', { value: 6.856208638, uncertainty: 1e-9 }]]);

function setting() {
  const list = independentLines({
    molecule: CO_12_16,
    bands: [
      { upper: 1, lower: 0, jMax: 20 },
      { upper: 2, lower: 0, jMax: 20, jMin: 2 },
      { upper: 2, lower: 1, jMax: 15 },
    ],
    sigma: 0.001,
    seed: 81,
  });
  const input: LineInput[] = list.lines.map((l, i) => ({ ...l, ...(i === 5 ? { intensity: 0.25 } : {}) }));
  // An unassigned line with an intensity, at the end.
  input.push({ position: 2000.5, intensity: 0.75 });
  const { observations, transitions } = readLines(input, MU);
  const rejected = new Map([[10, 'studentised residual 9.9 exceeds 4.00']]);
  const kept = observations.filter((o) => !rejected.has(o.index));
  const sel = selectLevelModel(kept, 5, 'a-posteriori', 0.01);
  return { input, observations, transitions, rejected, sel };
}

describe('reportLevels', () => {
  it('lines: fitted with calculated = observed − residual, rejected with reason and prediction, unassigned echoed', () => {
    const { input, observations, transitions, rejected, sel } = setting();
    const r = reportLevels(input, observations, transitions, rejected, sel.fit, MU);
    expect(r.lines).toHaveLength(input.length);
    const t = studentisedResiduals(sel.fit);
    for (const [k, o] of sel.fit.observations.entries()) {
      const l = r.lines[o.index];
      expect(l?.status).toBe('fitted');
      expect(l?.residual).toBe(sel.fit.residuals[k]);
      expect(l?.calculated).toBe(o.position - (sel.fit.residuals[k] as number));
      expect(l?.studentisedResidual).toBe(t[k]);
    }
    expect(r.lines[5]?.intensity).toBe(0.25);
    expect(r.lines[5]?.assignment).toEqual({ band: '1-0', branch: 'P', j: 6, species: '12C-16O', source: 'given' });
    const rej = r.lines[10];
    const ob10 = observations.find((o) => o.index === 10) as (typeof observations)[0];
    const pred = predictWithVariance(sel.fit, ob10);
    // A rejected line's studentised residual: against the final fit, which left it out (e / √(s²/w + var)); the
    // rejection here is made up, the line is clean, so it is small.
    const t10 =
      (ob10.position - (pred?.value as number)) /
      Math.sqrt((reducedChiSquare(sel.fit) as number) / ob10.weight + (pred?.variance as number));
    expect(Math.abs(t10)).toBeLessThan(4);
    expect(rej).toEqual({
      index: 10,
      position: input[10]?.position,
      assignment: rej?.assignment,
      status: 'rejected',
      // the final figure no longer exceeds the threshold: the one at rejection stays, and the final one is added
      reason: `studentised residual 9.9 exceeds 4.00 when rejected (${t10.toFixed(2)} against the final fit)`,
      calculated: pred?.value,
      residual: (input[10]?.position as number) - (pred?.value as number),
      studentisedResidual: t10,
    });
    expect(r.lines.at(-1)).toEqual({
      index: input.length - 1,
      position: 2000.5,
      intensity: 0.75,
      status: 'unassigned',
    });
  });

  it('bands: lines, J″ range and origin T_v′ − T_v″ with the covariance of the two', () => {
    const { input, observations, transitions, rejected, sel } = setting();
    const r = reportLevels(input, observations, transitions, rejected, sel.fit, MU);
    const f = sel.fit;
    const p = f.model.parameters.length;
    const idx = (name: string) => f.model.parameters.findIndex((q) => q.name === name);
    const cov = (a: number, b: number) => f.covariance[a * p + b] as number;
    const t1 = idx('T_1-T_0');
    const t2 = idx('T_2-T_0');
    expect(r.bands.map((b) => [b.band, b.lines, b.jRange])).toEqual([
      ['1-0', 40, [0, 20]],
      ['2-0', 38, [2, 20]],
      ['2-1', 31, [0, 15]],
    ]);
    const [b10, b20, b21] = r.bands;
    expect(b10?.origin?.value).toBe(f.values[t1]);
    expect(b10?.origin?.uncertainty).toBeCloseTo(Math.sqrt(cov(t1, t1)), 15);
    expect(b20?.origin?.value).toBe(f.values[t2]);
    expect(b21?.origin?.value).toBeCloseTo((f.values[t2] as number) - (f.values[t1] as number), 10);
    expect(b21?.origin?.uncertainty).toBeCloseTo(Math.sqrt(cov(t2, t2) + cov(t1, t1) - 2 * cov(t1, t2)), 15);
    // The hot band's origin against the generator's term values (4σ + rounding, common practice).
    const g = (v: number) => {
      const u = v + 0.5;
      return 2169.81358 * u - 13.28831 * u * u + 0.010511 * u ** 3;
    };
    expect(Math.abs((b21?.origin?.value as number) - (g(2) - g(1)))).toBeLessThan(
      4 * (b21?.origin?.uncertainty as number) + 1e-3,
    );
  });

  it('levels: term value relative to v = 0, B_v and D_v, r_v from B_v and μ; constrained terms left out', () => {
    const { input, observations, transitions, rejected, sel } = setting();
    const r = reportLevels(input, observations, transitions, rejected, sel.fit, MU);
    expect(r.levels.map((l) => l.v)).toEqual([0, 1, 2]);
    expect(r.levels[0]?.term).toBeUndefined();
    expect(r.levels[1]?.term?.relativeTo).toBe(0);
    expect(r.levelTerms).toEqual([0, 1, 2].map((v) => ({ species: '12C-16O', v, terms: ['B', 'D'] })));
    // r_0 = √(K/(μB_0)), K = h/(8π²c) = 16.857629 u Å² cm⁻¹ (CODATA 2018 values of h, c, u; from memory):
    // B_0 ≈ 1.9225 cm⁻¹ gives r_0 ≈ 1.1309 Å.
    const b0 = r.levels[0]?.B.value as number;
    expect(r.levels[0]?.r?.value).toBeCloseTo(Math.sqrt(16.857629 / (6.856208638 * b0)), 6);
    expect(r.levels[0]?.r?.unit).toBe('angstrom');
    expect(r.quantityOf('12C-16O|D|1')).toEqual(r.levels[1]?.D);
    expect(r.quantityOf('12C-16O|H|1')).toBeUndefined();
    expect(r.quantityOf('12C-16O|B|0')?.unit).toBe('cm-1');
    expect(r.parameters.every((q) => q.species === '12C-16O' && q.unit === 'cm-1')).toBe(true);
    expect(Object.keys(r.lines[6] as object)).not.toContain('intensity');
    expect(r.bands.every((b) => b.origin?.unit === 'cm-1')).toBe(true);
    expect(r.parameters.map((q) => q.name)).toEqual(r.names);
    expect(r.covariance).toHaveLength(r.names.length);
    for (const [i, row] of r.correlation.entries()) expect(row[i]).toBeCloseTo(1, 14);
    const c = reportLevels(input, observations, transitions, rejected, sel.fit, MU, new Set(['12C-16O|D|2']));
    expect(c.levelTerms[2]?.terms).toEqual(['B']);
    expect(c.levels[2]?.D).toBeUndefined();
    expect(c.levels[1]?.D).toBeDefined();
    expect(r.warnings).toEqual([]);
  });

  it('a B_v that is not positive has no bond length and is named in a warning', () => {
    const { input, observations, transitions, rejected, sel } = setting();
    const values = Float64Array.from(sel.fit.values);
    const iB1 = sel.fit.model.parameters.findIndex((q) => q.name === 'B_1');
    values[iB1] = -1.5;
    const r = reportLevels(input, observations, transitions, rejected, { ...sel.fit, values }, MU);
    expect(r.levels[1]?.r).toBeUndefined();
    expect(r.warnings).toEqual([
      {
        code: 'NON_PHYSICAL_CONSTANT',
        message: '12C-16O: B_1 = -1.5 cm-1 is not positive; check the assignment or the unit',
      },
    ]);
  });

  it('a rejected line still beyond its threshold is reported with the final figure; other reasons stay as given', () => {
    const { input, observations, transitions, sel } = setting();
    // Line 10 moved by +0.05 cm⁻¹ (50σ of the 0.001 cm⁻¹ noise): against the fit that left it out, t = e/√(s²/w +
    // var), worked out here from the prediction.
    const moved = observations.map((o) => (o.index === 10 ? { ...o, position: o.position + 0.05 } : o));
    const ob10 = moved.find((o) => o.index === 10) as (typeof moved)[0];
    const pred = predictWithVariance(sel.fit, ob10);
    const t10 =
      (ob10.position - (pred?.value as number)) /
      Math.sqrt((reducedChiSquare(sel.fit) as number) / ob10.weight + (pred?.variance as number));
    expect(t10).toBeGreaterThan(10);
    const reasonOf = (reason: string) =>
      reportLevels(input, moved, transitions, new Map([[10, reason]]), sel.fit, MU).lines[10]?.reason;
    // A threshold of two digits before the point (10.00): the final figure replaces the one at rejection.
    expect(reasonOf('studentised residual 12.5 exceeds 10.00')).toBe(
      `studentised residual ${t10.toFixed(2)} exceeds 10.00`,
    );
    expect(reasonOf('studentised residual 9.9 exceeds 4.00')).toBe(
      `studentised residual ${t10.toFixed(2)} exceeds 4.00`,
    );
    // Exactly at the threshold (written with every digit, so that it reads back as t itself) is not beyond it: the
    // figure at rejection stays and the final one is added.
    expect(reasonOf(`studentised residual 99 exceeds ${String(t10)}`)).toBe(
      `studentised residual 99 exceeds ${String(t10)} when rejected (${t10.toFixed(2)} against the final fit)`,
    );
    // Reasons of another form (text before or after the figure, or another rule) are left as they are.
    for (const other of [
      'taken out by hand',
      'note: studentised residual 9.9 exceeds 4.00',
      'studentised residual 9.9 exceeds 4.00 in round 2',
    ])
      expect(reasonOf(other)).toBe(other);
  });
});

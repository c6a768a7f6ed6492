import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../../src/errors.js';
import { fitLineListDetailed, type LineInput } from '../../../src/fit/fit-lines.js';
import { CO_12_16, independentLines } from '../../helpers/independent-lines.js';

// The pipeline's own glue (src/fit/fit-lines.ts) on lines of the independent generator (¹²C¹⁶O, Huber & Herzberg
// constants from memory): statistics, the mode kept or changed, the constraint warning, and the predictions and
// line σ the assignment loop asks of a fit. Computed inside `it` (mutation testing).

const MU = new Map([['12C-16O', { value: 6.856208638, uncertainty: 1e-9 }]]);
const co = (o: Partial<Parameters<typeof independentLines>[0]> = {}) =>
  independentLines({
    molecule: CO_12_16,
    bands: [
      { upper: 1, lower: 0, jMax: 20 },
      { upper: 2, lower: 0, jMax: 20 },
    ],
    sigma: 0.001,
    seed: 91,
    ...o,
  }).lines as LineInput[];

describe('fitLineListDetailed', () => {
  it('statistics count the lines, the rejected one and the unassigned one, of the model the term test kept', () => {
    const lines = co();
    lines[7] = { ...(lines[7] as LineInput), position: (lines[7] as LineInput).position + 0.05 };
    lines.push({ position: 2222.2 });
    // A mass for a species the list does not hold is not reported.
    const masses = new Map([...MU, ['13C-16O', { value: 7.17241, uncertainty: 1e-9 }]]);
    const { result, scale } = fitLineListDetailed(lines, masses);
    expect(result.warnings.map((w) => w.code)).not.toContain('UNCERTAINTY_MODE_CHANGED');
    expect(result.warnings.map((w) => w.code)).not.toContain('MASS_REDUCED_NEEDS_ISOTOPOLOGUES');
    expect(result.scatter).toBeUndefined();
    // Dunham constraints are listed with the level ones.
    expect(result.model.constraints.some((c) => c.parameter.startsWith('Y'))).toBe(true);
    expect(result.crossChecks.every((c) => c.species === '12C-16O')).toBe(true);
    expect(result.equilibrium.map((e) => e.species)).toEqual(['12C-16O']);
    const s = result.statistics;
    expect(s).toMatchObject({ lines: 83, assigned: 82, fitted: 81, rejected: 1, unassigned: 1 });
    expect(s.degreesOfFreedom).toBe(81 - s.parameters);
    expect(s.uncertaintyMode).toBe('a-posteriori');
    expect(s.reducedChiSquare).toBe(scale);
    expect(s.conditionNumber).toBeGreaterThan(1);
    // Read when the statistics are (a getter): serialised and copied as the number it is.
    expect(JSON.parse(JSON.stringify(s)).conditionNumber).toBe(s.conditionNumber);
    expect(structuredClone(s).conditionNumber).toBe(s.conditionNumber);
    expect(result.warnings.find((w) => w.code === 'LINES_REJECTED')).toEqual({
      code: 'LINES_REJECTED',
      message: '1 line(s) were rejected as outliers and kept out of the fit',
      lines: [7],
    });
    expect(result.model.selection).toBe(
      'centrifugal and Dunham terms added while an F test gives p < 0.01; the next term beyond them constrained by a prior',
    );
    expect(result.species).toEqual([
      { formula: '12C-16O', reducedMass: { value: 6.856208638, uncertainty: 1e-9, unit: 'u' } },
    ]);
  });

  it('the constraint warning lists each prior with its value and the bases (level index written _v)', () => {
    const { result } = fitLineListDetailed(co(), MU, { maxCentrifugalOrder: 2.7 });
    // maxCentrifugalOrder 2.7 → 2 (floored): D fitted, H constrained in every level.
    expect(result.model.levelTerms.map((t) => t.terms)).toEqual([
      ['B', 'D'],
      ['B', 'D'],
      ['B', 'D'],
    ]);
    const w = result.warnings.find((x) => x.code === 'TERMS_CONSTRAINED' && x.message.startsWith('centrifugal'));
    const level = result.model.constraints.filter((c) => c.parameter.startsWith('H_'));
    expect(level.map((c) => c.parameter)).toEqual(['H_0', 'H_1', 'H_2']);
    const list = level.map(
      (c) => `${c.parameter} = ${c.prior.value.toExponential(2)} ± ${c.prior.uncertainty.toExponential(2)} cm-1`,
    );
    expect(w?.message).toBe(
      `centrifugal terms the lines cannot determine (term test p ≥ 0.01) are constrained, their uncertainty carried into the covariance: ${list.join(', ')} (${level[0]?.basis.replace(/_\d+/g, '_v')})`,
    );
    expect(w?.message).toContain('(H_v ≈ H_e ≈');
  });

  it('absolute mode without any σ is turned a-posteriori and says so', () => {
    const { result } = fitLineListDetailed(co({ withUncertainties: false }), MU, { uncertaintyMode: 'absolute' });
    expect(result.statistics.uncertaintyMode).toBe('a-posteriori');
    expect(result.warnings.filter((w) => w.code === 'UNCERTAINTY_MODE_CHANGED').map((w) => w.message)).toEqual([
      'absolute uncertainties were asked for but no line has an uncertainty: the covariance is scaled a posteriori',
    ]);
  });

  it('no degrees of freedom left: absolute with σ given (and said), refused without σ', () => {
    // R(0), R(1), P(1) of 1-0: three lines for T, B″, B′.
    const three = co({ bands: [{ upper: 1, lower: 0, jMax: 1 }] });
    expect(three).toHaveLength(3);
    const { result } = fitLineListDetailed(three, MU);
    expect(result.statistics.uncertaintyMode).toBe('absolute');
    expect(result.statistics.degreesOfFreedom).toBe(0);
    expect(result.warnings.filter((w) => w.code === 'UNCERTAINTY_MODE_CHANGED').map((w) => w.message)).toEqual([
      'no degrees of freedom are left to scale the covariance a posteriori: the line uncertainties are taken as absolute',
    ]);
    expect(result.model.selection).toContain('while a χ²-difference test gives p < 0.01');
    const bare = three.map(({ uncertainty: _, ...l }) => l);
    let e: unknown;
    try {
      fitLineListDetailed(bare, MU);
    } catch (x) {
      e = x;
    }
    expect(e).toBeInstanceOf(ScienceError);
    expect((e as ScienceError).code).toBe('FIT_TOO_FEW_LINES');
    expect((e as ScienceError).message).toBe(
      '3 line(s) exactly determine the 3 parameters, leaving nothing to estimate their uncertainties: add lines or give line uncertainties with uncertaintyMode "absolute"',
    );
    expect((e as ScienceError).details).toEqual({ lines: 3, parameters: 3 });
  });

  it('levelsOnly skips Dunham and combination differences; a mass-reduced fit needs two isotopologues', () => {
    const only = fitLineListDetailed(co(), MU, { levelsOnly: true, massReducedDunham: true }).result;
    expect([only.dunham, only.equilibrium, only.combinationDifferences, only.crossChecks]).toEqual([[], [], [], []]);
    expect(only.massReducedDunham).toBeUndefined();
    expect(only.warnings.map((w) => w.code)).not.toContain('MASS_REDUCED_NEEDS_ISOTOPOLOGUES');
    expect(only.warnings.every((w) => typeof w.code === 'string')).toBe(true);
    const full = fitLineListDetailed(co(), MU, { massReducedDunham: true }).result;
    expect(full.dunham).toHaveLength(1);
    expect(full.combinationDifferences.length).toBe(4);
    expect(full.warnings.find((w) => w.code === 'MASS_REDUCED_NEEDS_ISOTOPOLOGUES')?.message).toBe(
      'a mass-reduced Dunham fit needs lines of two or more isotopologues',
    );
  });

  it('predict: a transition between fitted, connected levels, against the generator within 4σ; others undefined', () => {
    const d = fitLineListDetailed(co(), MU);
    const t = { species: '12C-16O', band: { upper: 2, lower: 1 }, branch: 'R' as const, j: 10 };
    const p = d.predict(t);
    // 2-1 R(10) from the generator's own term values (none of these lines was fitted).
    const truth = independentLines({
      molecule: CO_12_16,
      bands: [{ upper: 2, lower: 1, jMin: 10, jMax: 10, branches: ['R'] }],
      seed: 1,
    }).truth[0]?.exact as number;
    expect(Math.abs((p?.value as number) - truth)).toBeLessThan(4 * Math.sqrt(p?.variance as number));
    expect(p?.variance).toBeGreaterThan(0);
    expect(d.predict({ ...t, band: { upper: 3, lower: 0 } })).toBeUndefined();
    expect(d.predict({ ...t, species: '13C-16O' })).toBeUndefined();
  });

  it('lineSigma: the line’s own σ or the scatter estimated for it, times √s² in a-posteriori mode, 1 in absolute', () => {
    const t = { species: '12C-16O', band: { upper: 1, lower: 0 }, branch: 'P' as const, j: 3 };
    const post = fitLineListDetailed(co({ reportedSigmaFactor: 3 }), MU);
    expect(post.scale).toBeLessThan(0.3);
    expect(post.lineSigma(t, { uncertainty: 0.004 })).toBeCloseTo(0.004 * Math.sqrt(post.scale), 15);
    const abs = fitLineListDetailed(co({ reportedSigmaFactor: 3 }), MU, { uncertaintyMode: 'absolute' });
    expect(abs.lineSigma(t, { uncertainty: 0.004 })).toBe(0.004);
    const none = fitLineListDetailed(co({ withUncertainties: false }), MU);
    const est = none.result.scatter?.find((g) => g.group === '12C-16O 1-0')?.sigma as number;
    expect(none.lineSigma(t)).toBeCloseTo(est * Math.sqrt(none.scale), 15);
    // 0.001 cm⁻¹ of scatter estimated within 30 % (51 lines; stated tolerance).
    expect(Math.abs(est / 0.001 - 1)).toBeLessThan(0.3);
  });
  it('two rejected lines are listed in index order; maxCentrifugalOrder 1.5 keeps B only, Kratzer D constrained', () => {
    const lines = co();
    lines[30] = { ...(lines[30] as LineInput), position: (lines[30] as LineInput).position + 0.08 };
    lines[7] = { ...(lines[7] as LineInput), position: (lines[7] as LineInput).position + 0.04 };
    const r = fitLineListDetailed(lines, MU).result;
    expect(r.warnings.find((w) => w.code === 'LINES_REJECTED')?.lines).toEqual([7, 30]);
    // A species the library lacks (the CO lines relabelled), fitted to B only.
    const xx = co().map((l) => ({
      ...l,
      assignment: { ...(l.assignment as NonNullable<LineInput['assignment']>), species: 'XX' },
    }));
    const b = fitLineListDetailed(xx, new Map([['XX', MU.get('12C-16O') as { value: number; uncertainty: number }]]), {
      maxCentrifugalOrder: 1.5,
    }).result;
    expect(b.model.levelTerms.map((t) => t.terms)).toEqual([['B'], ['B'], ['B']]);
    const w = b.warnings.find((x) => x.code === 'TERMS_CONSTRAINED' && x.message.startsWith('centrifugal'));
    expect(w?.message).toMatch(
      / \(Kratzer D ≈ 4B³\/ω_e² with B_v and ω_e ≈ the fitted vibrational interval, ± 50 %\)$/,
    );
    const none = fitLineListDetailed(co(), MU).result;
    expect(none.warnings.map((x) => x.code)).not.toContain('LINES_REJECTED');
  });

  it('stated σ that disagree by band are rescaled in a-posteriori mode only, and the line σ carries the factor', () => {
    // 1-0 and 3-0 scattered as stated (0.001), 2-0 ten times more, all stated 0.001.
    const lines = independentLines({
      molecule: CO_12_16,
      bands: [
        { upper: 1, lower: 0, jMax: 25, sigma: 0.001 },
        { upper: 2, lower: 0, jMax: 25, sigma: 0.01 },
        { upper: 3, lower: 0, jMax: 25, sigma: 0.001 },
      ],
      withUncertainties: false,
      seed: 51,
    }).lines.map((l) => ({ ...l, uncertainty: 0.001 })) as LineInput[];
    const post = fitLineListDetailed(lines, MU);
    expect(post.result.warnings.map((w) => w.code)).toContain('UNCERTAINTY_RESCALED');
    const t = { species: '12C-16O', band: { upper: 2, lower: 0 }, branch: 'R' as const, j: 3 };
    const f = post.lineSigma(t, { uncertainty: 0.001 }) / (0.001 * Math.sqrt(post.scale));
    // The factor of 2-0 is about 10 (30 %, as in the stage's own test).
    expect(Math.abs(f / 10 - 1)).toBeLessThan(0.3);
    const abs = fitLineListDetailed(lines, MU, { uncertaintyMode: 'absolute' });
    expect(abs.result.warnings.map((w) => w.code)).not.toContain('UNCERTAINTY_RESCALED');
  });

  it('without σ the scatter groups and their warning are reported', () => {
    const r = fitLineListDetailed(co({ withUncertainties: false }), MU).result;
    expect(r.scatter?.map((g) => g.group)).toEqual(['12C-16O 1-0', '12C-16O 2-0']);
    expect(r.warnings[0]?.code).toBe('UNCERTAINTY_ESTIMATED');
    // a-posteriori was asked for: nothing to change.
    expect(r.warnings.map((w) => w.code)).not.toContain('UNCERTAINTY_MODE_CHANGED');
  });

  it('predict refuses a band between levels the lines never connect (v = 3 seen in pure rotation only)', () => {
    const lines = [
      ...co(),
      ...(independentLines({ molecule: CO_12_16, bands: [{ upper: 3, lower: 3, jMax: 8 }], sigma: 1e-4, seed: 3 })
        .lines as LineInput[]),
    ];
    const d = fitLineListDetailed(lines, MU);
    expect(d.predict({ species: '12C-16O', band: { upper: 3, lower: 3 }, branch: 'R', j: 2 })).toBeDefined();
    expect(d.predict({ species: '12C-16O', band: { upper: 3, lower: 0 }, branch: 'R', j: 2 })).toBeUndefined();
  });
});

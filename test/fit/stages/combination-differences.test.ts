import { describe, expect, it } from 'vitest';
import { fitCombinationDifferences } from '../../../src/fit/combination-differences.js';
import type { Observation } from '../../../src/models/linear-model.js';
import { CO_12_16, levelConstants, termValue } from '../../helpers/independent-lines.js';
import { generated } from './observations-of.js';

// Combination differences (Herzberg, Spectra of Diatomic Molecules, §III.2) of lines from the independent
// generator (its own term values: Huber & Herzberg constants of ¹²C¹⁶O from memory, with γ_e, β_e, H_e): Δ₂F″(J)
// = R(J−1) − P(J+1) = F″(J+1) − F″(J−1) and Δ₂F′(J) = R(J) − P(J) = F′(J+1) − F′(J−1), written out here from
// the generator's term values. Computed inside `it` (mutation testing).

const c = CO_12_16.constants;
const F = (v: number, j: number) => termValue(c, v, j) - termValue(c, v, 0);

describe('combination differences of one band, noise-free', () => {
  it('Δ₂F″ and Δ₂F′ of CO 1-0 (J ≤ 30) give B, D, H of v = 0 and v = 1 with the order asked for', () => {
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 30 }], seed: 1 });
    const out = fitCombinationDifferences(obs, () => 3, 'absolute');
    expect(out.map((x) => [x.fit.kind, x.fit.v, x.fit.band, x.fit.species])).toEqual([
      ['lower', 0, '1-0', '12C-16O'],
      ['upper', 1, '1-0', '12C-16O'],
    ]);
    for (const { fit } of out) {
      const want = levelConstants(c, fit.v);
      // The model is exact (the generator's term values are B x − D x² + H x³): rounding of the positions only.
      expect(Math.abs(fit.B.value - want.B) / want.B, 'B').toBeLessThan(1e-9);
      expect(Math.abs((fit.D?.value as number) - want.D) / want.D, 'D').toBeLessThan(1e-6);
      expect(Math.abs((fit.H?.value as number) - want.H) / want.H, 'H').toBeLessThan(1e-3);
      expect(fit.L).toBeUndefined();
      expect(fit.B.unit).toBe('cm-1');
      expect(fit.rms).toBeLessThan(1e-9);
      // Δ₂F″(J) for J = 1…29 (R(J−1) and P(J+1) both exist), Δ₂F′(J) for J = 1…30.
      const js = fit.points.map((p) => p.j);
      const last = fit.kind === 'lower' ? 29 : 30;
      expect(js).toEqual(Array.from({ length: last }, (_, i) => i + 1));
      expect(fit.degreesOfFreedom).toBe(last - 3);
      for (const p of fit.points) {
        expect(Math.abs(p.value - (F(fit.v, p.j + 1) - F(fit.v, p.j - 1))), `Δ₂F(${p.j})`).toBeLessThan(1e-9);
        // Lines without σ weigh 1: a difference of two of them has variance 2 (absolute mode: s² = 1).
        expect(p.uncertainty).toBeCloseTo(Math.SQRT2, 12);
        expect(Math.abs(p.residual)).toBeLessThan(1e-9);
      }
    }
  });

  it('the order is capped by the level order asked for, by M (5) and by two degrees of freedom', () => {
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 30 }], seed: 1 });
    const one = fitCombinationDifferences(obs, () => 1, 'absolute')[0]?.fit;
    expect(one?.D).toBeUndefined();
    expect(one?.degreesOfFreedom).toBe(29 - 1);
    const two = fitCombinationDifferences(obs, (_s, v) => (v === 0 ? 2 : 4), 'absolute');
    expect(two[0]?.fit.D).toBeDefined();
    expect(two[0]?.fit.H).toBeUndefined();
    expect(two[1]?.fit.L).toBeDefined();
    expect(two[1]?.fit.M).toBeUndefined();
    const many = fitCombinationDifferences(obs, () => 9, 'absolute');
    expect(many[0]?.fit.M).toBeDefined();
    expect(many[0]?.fit.degreesOfFreedom).toBe(29 - 5);
    // Four lines of the band, J″ ≤ 1: Δ₂F″ at J = 1 only (no fit), Δ₂F′ at J = 1 only: nothing to fit.
    const few = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 1 }], seed: 1 }).obs;
    expect(fitCombinationDifferences(few, () => 3, 'absolute')).toEqual([]);
    // J″ ≤ 3: three Δ₂F″ points (J = 1, 2) … keep two degrees of freedom: order 1 at three points, none at two.
    const three = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 3 }], seed: 1 }).obs;
    const r3 = fitCombinationDifferences(three, () => 3, 'absolute');
    expect(r3.map((x) => [x.fit.kind, x.fit.points.length, x.fit.degreesOfFreedom, x.fit.D === undefined])).toEqual([
      ['upper', 3, 2, true],
    ]);
  });

  it('the lines in any order give the same fits, points ascending in J', () => {
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 15 }], sigma: 0.002, seed: 5 });
    const a = fitCombinationDifferences(obs, () => 2, 'absolute');
    // R lines first, each branch from high J down.
    const scrambled = [...obs].sort((x, y) => y.upperJ - y.lowerJ - (x.upperJ - x.lowerJ) || y.lowerJ - x.lowerJ);
    const b = fitCombinationDifferences(scrambled, () => 2, 'absolute');
    expect(b).toEqual(a);
    for (const { fit } of b) {
      const js = fit.points.map((p) => p.j);
      expect(js).toEqual([...js].sort((x, y) => x - y));
    }
  });

  it('pure rotation lines and bands of other species are kept apart', () => {
    const { obs } = generated({
      molecule: CO_12_16,
      bands: [
        { upper: 0, lower: 0, jMax: 20 },
        { upper: 2, lower: 0, jMax: 20 },
      ],
      seed: 2,
    });
    const other: Observation[] = obs
      .filter((o) => o.upperV === 2)
      .map((o) => ({ ...o, species: '13C-16O', index: o.index + 1000, position: o.position - 100 }));
    const out = fitCombinationDifferences([...obs, ...other], () => 2, 'absolute');
    expect(out.map((x) => `${x.fit.species} ${x.fit.band} ${x.fit.kind}`)).toEqual([
      '12C-16O 2-0 lower',
      '12C-16O 2-0 upper',
      '13C-16O 2-0 lower',
      '13C-16O 2-0 upper',
    ]);
  });
});

describe('combination differences with noise: weights, repeated lines and the two modes', () => {
  it('repeats of a line enter as their weighted mean, with variance 1/Σw', () => {
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 20 }], seed: 3 });
    const r4 = obs.find((o) => o.upperJ === 5 && o.lowerJ === 4) as Observation;
    const p6 = obs.find((o) => o.upperJ === 5 && o.lowerJ === 6) as Observation;
    // R(4) measured twice more: +0.03 with weight 4 and −0.01 with weight 2 (the generator's copy weighs 1).
    const extra: Observation[] = [
      { ...r4, index: 900, position: r4.position + 0.03, weight: 4 },
      { ...r4, index: 901, position: r4.position - 0.01, weight: 2 },
    ];
    const out = fitCombinationDifferences([...obs, ...extra], () => 2, 'absolute');
    const lower = out.find((x) => x.fit.kind === 'lower')?.fit;
    const pt = lower?.points.find((p) => p.j === 5);
    const meanR4 = (r4.position * 1 + (r4.position + 0.03) * 4 + (r4.position - 0.01) * 2) / 7;
    expect(pt?.value).toBeCloseTo(meanR4 - p6.position, 10);
    expect(pt?.uncertainty).toBeCloseTo(Math.sqrt(1 / 7 + 1), 12);
  });

  it('σ = 0.002 cm⁻¹: a-posteriori σ(B) = √(χ²/ν) × the stated one; absolute mode keeps the stated one', () => {
    const { obs } = generated({
      molecule: CO_12_16,
      bands: [{ upper: 2, lower: 0, jMax: 25 }],
      sigma: 0.002,
      seed: 4,
    });
    const abs = fitCombinationDifferences(obs, () => 3, 'absolute');
    const post = fitCombinationDifferences(obs, () => 3, 'a-posteriori');
    for (const [i, a] of abs.entries()) {
      const b = post[i] as (typeof post)[number];
      expect(b.fit.B.value).toBe(a.fit.B.value);
      expect(a.statedUncertaintyOfB).toBe(a.fit.B.uncertainty);
      expect(b.statedUncertaintyOfB).toBe(a.statedUncertaintyOfB);
      // χ²/ν from the residuals and the points' variances (2σ² each, σ = 0.002).
      const chi = a.fit.points.reduce((s, p) => s + p.residual ** 2 / (2 * 0.002 ** 2), 0);
      const s2 = chi / a.fit.degreesOfFreedom;
      expect(b.fit.B.uncertainty).toBeCloseTo(a.fit.B.uncertainty * Math.sqrt(s2), 14);
      expect(b.fit.points[0]?.uncertainty).toBeCloseTo(0.002 * Math.SQRT2 * Math.sqrt(s2), 14);
      expect(a.fit.points[0]?.uncertainty).toBeCloseTo(0.002 * Math.SQRT2, 14);
      // rms of the residuals (unweighted), and B within 4σ of the generator's B_v (common practice).
      const rms = Math.sqrt(a.fit.points.reduce((s, p) => s + p.residual ** 2, 0) / a.fit.points.length);
      expect(a.fit.rms).toBeCloseTo(rms, 14);
      expect(Math.abs(a.fit.B.value - levelConstants(c, a.fit.v).B)).toBeLessThan(4 * a.fit.B.uncertainty);
      expect(a.fit.B.uncertainty).toBeGreaterThan(1e-6);
    }
  });
});

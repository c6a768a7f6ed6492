import { describe, expect, it } from 'vitest';
import { predictWithVariance, rankError, selectLevelModel } from '../../../src/fit/level-selection.js';
import type { Observation } from '../../../src/models/linear-model.js';
import { CO_12_16, levelConstants, termValue } from '../../helpers/independent-lines.js';
import { thrown } from '../../helpers/thrown.js';
import { generated } from './observations-of.js';

// Stage 2 on its own, on lines of the independent generator (Huber & Herzberg constants of ¹²C¹⁶O, from memory,
// with γ_e, β_e, H_e; see test/helpers/independent-lines.ts). Computed inside `it` (mutation testing).

const c = CO_12_16.constants;
const fittedValue = (fit: ReturnType<typeof selectLevelModel>['fit'], name: string) => {
  const i = fit.model.parameters.findIndex((p) => p.name === name);
  expect(i, name).toBeGreaterThanOrEqual(0);
  const p = fit.model.parameters.length;
  return { value: fit.values[i] as number, sigma: Math.sqrt(fit.covariance[i * p + i] as number) };
};

describe('selectLevelModel: the centrifugal order of each level', () => {
  it('H_e = 0 and σ = 0.001 cm⁻¹: D is found in every level and H in none; B_v, D_v, T within 4σ', () => {
    const { obs } = generated({
      molecule: CO_12_16,
      override: { H_e: 0 },
      bands: [
        { upper: 1, lower: 0, jMax: 30 },
        { upper: 2, lower: 0, jMax: 30 },
      ],
      sigma: 0.001,
      seed: 7,
    });
    const sel = selectLevelModel(obs, 5, 'a-posteriori', 0.01);
    expect([...sel.orders]).toEqual([
      ['12C-16O|0', 2],
      ['12C-16O|1', 2],
      ['12C-16O|2', 2],
    ]);
    expect(sel.fit.model.parameters.map((p) => p.name)).toEqual([
      'T_1-T_0',
      'T_2-T_0',
      'B_0',
      'D_0',
      'B_1',
      'D_1',
      'B_2',
      'D_2',
    ]);
    for (const v of [0, 1, 2]) {
      const want = levelConstants({ ...c, H_e: { value: 0, source: 'test' } }, v);
      const b = fittedValue(sel.fit, `B_${v}`);
      const d = fittedValue(sel.fit, `D_${v}`);
      expect(Math.abs(b.value - want.B), `B_${v}`).toBeLessThan(4 * b.sigma);
      expect(Math.abs(d.value - want.D), `D_${v}`).toBeLessThan(4 * d.sigma);
    }
    const t1 = fittedValue(sel.fit, 'T_1-T_0');
    expect(Math.abs(t1.value - (termValue(c, 1, 0) - termValue(c, 0, 0)))).toBeLessThan(4 * t1.sigma);
    // The chosen model is solved once more with leverages (one per line, summing to the number of parameters).
    expect(sel.fit.leverages).toHaveLength(obs.length);
    expect(sel.fit.leverages.reduce((a, h) => a + h, 0)).toBeCloseTo(8, 8);
    expect(sel.fit.degreesOfFreedom).toBe(obs.length - 8);
  });

  it('published H_e with σ = 1e-4 cm⁻¹ and J″ ≤ 40 needs H in every level; the cap maxOrder holds', () => {
    const { obs } = generated({
      molecule: CO_12_16,
      bands: [
        { upper: 1, lower: 0, jMax: 40 },
        { upper: 2, lower: 0, jMax: 40 },
      ],
      sigma: 1e-4,
      seed: 8,
    });
    expect([...selectLevelModel(obs, 5, 'a-posteriori', 0.01).orders.values()]).toEqual([3, 3, 3]);
    expect([...selectLevelModel(obs, 2, 'a-posteriori', 0.01).orders.values()]).toEqual([2, 2, 2]);
    const b = selectLevelModel(obs, 1, 'a-posteriori', 0.01);
    expect([...b.orders.values()]).toEqual([1, 1, 1]);
    expect(b.fit.model.parameters).toHaveLength(5);
  });

  it('a level seen at 3 distinct J cannot take D (it needs order + 2 = 4); at 4 it can', () => {
    const mk = (jMax: number) =>
      generated({
        molecule: CO_12_16,
        bands: [
          { upper: 1, lower: 0, jMax: 25 },
          // 2-0 with J″ ≤ jMax: J′ = 0…jMax + 1 and J″ = 0…jMax.
          { upper: 2, lower: 0, jMax },
        ],
        sigma: 1e-5,
        seed: 9,
      }).obs;
    // jMax 1: R(0), R(1), P(1) reach J′ = 1, 2, 0: three distinct J in v = 2.
    expect(selectLevelModel(mk(1), 5, 'a-posteriori', 0.01).orders.get('12C-16O|2')).toBe(1);
    // jMax 2 adds R(2), P(2): J′ = 0…3, four distinct; D_2 x² ≈ 9e-4 cm⁻¹ at J′ = 3, far above σ.
    expect(selectLevelModel(mk(2), 5, 'a-posteriori', 0.01).orders.get('12C-16O|2')).toBe(2);
  });

  it('a higher order that would leave no degree of freedom is not tried, however much the lines want it', () => {
    // R(0…3) and P(2) of 1-0 at σ = 1e-5: five lines, J″ 0–3 and J′ 1–4 (four distinct each). D would make five
    // parameters for five lines; in absolute mode Δχ² alone would accept it (χ² of B alone is about 300 on 2 degrees of freedom).
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 3 }], sigma: 1e-5, seed: 13 });
    const five = obs.filter((o) => o.upperJ === o.lowerJ + 1 || o.lowerJ === 2);
    expect(five).toHaveLength(5);
    const sel = selectLevelModel(five, 5, 'absolute', 0.01);
    expect([...sel.orders.values()]).toEqual([1, 1]);
    expect(sel.fit.degreesOfFreedom).toBe(2);
  });

  it('absolute mode keeps the covariance unscaled; a-posteriori scales it by χ²/ν', () => {
    const { obs } = generated({
      molecule: CO_12_16,
      bands: [{ upper: 1, lower: 0, jMax: 20 }],
      sigma: 0.002,
      reportedSigmaFactor: 3,
      seed: 10,
    });
    const abs = selectLevelModel(obs, 5, 'absolute', 0.01);
    const post = selectLevelModel(obs, 5, 'a-posteriori', 0.01);
    const s2 = post.fit.chiSquare / post.fit.degreesOfFreedom;
    // σ stated 3× too large: s² ≈ 1/9 (0.03–0.3 over seeds, common practice for ν ≈ 36).
    expect(s2).toBeGreaterThan(0.03);
    expect(s2).toBeLessThan(0.3);
    expect([...abs.orders]).toEqual([...post.orders]);
    const p = abs.fit.model.parameters.length;
    for (let i = 0; i < p; i++)
      expect(post.fit.covariance[i * p + i]).toBeCloseTo((abs.fit.covariance[i * p + i] as number) * s2, 20);
  });
});

describe('selectLevelModel: lists that cannot be fitted', () => {
  it('two lines of a band cannot determine T, B″ and B′: FIT_TOO_FEW_LINES names them', () => {
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 1 }], seed: 1 });
    const e = thrown(() => selectLevelModel(obs.slice(0, 2), 5, 'a-posteriori', 0.01));
    expect(e.code).toBe('FIT_TOO_FEW_LINES');
    expect(e.message).toBe(
      '2 assigned line(s) cannot determine the 3 parameters the bands need at the least (T_1-T_0, B_0, B_1)',
    );
    expect(e.details).toEqual({ lines: 2, parameters: 3 });
  });

  it('exactly as many lines as parameters is fitted (no degrees of freedom), one fewer is refused', () => {
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 1 }], seed: 1 });
    expect(obs).toHaveLength(3);
    const sel = selectLevelModel(obs, 5, 'absolute', 0.01);
    expect(sel.fit.degreesOfFreedom).toBe(0);
    expect([...sel.orders.values()]).toEqual([1, 1]);
  });

  it('one line measured four times: FIT_RANK_DEFICIENT with the groups that cannot be told apart', () => {
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 3 }], seed: 1 });
    const r3 = obs.find((o) => o.lowerJ === 3 && o.upperJ === 4) as Observation;
    const same = [0, 1, 2, 3].map((k) => ({ ...r3, index: k, position: r3.position + k * 1e-3 }));
    const e = thrown(() => selectLevelModel(same, 5, 'a-posteriori', 0.01));
    expect(e.code).toBe('FIT_RANK_DEFICIENT');
    expect(e.message).toMatch(/^the level model cannot be determined from these lines: .+ cannot be told apart$/);
    const groups = e.details.groups as string[][];
    expect(groups.length).toBe(2);
    expect(new Set((e.details.parameters as string[]).sort())).toEqual(new Set(['B_0', 'B_1', 'T_1-T_0']));
  });

  it('rankError joins the parameters of a group with " / " and the groups with "; "', () => {
    const p = (name: string) => ({ key: name, name, unit: 'cm-1', kind: 'B' as const });
    const e = rankError(
      {
        rankDeficient: true,
        groups: [
          [p('a'), p('b')],
          [p('c'), p('a')],
        ],
      },
      'thing',
    );
    expect(e.message).toBe('the thing cannot be determined from these lines: a / b; c / a cannot be told apart');
    expect(e.details).toEqual({
      parameters: ['a', 'b', 'c'],
      groups: [
        ['a', 'b'],
        ['c', 'a'],
      ],
    });
  });
});

describe('predictWithVariance', () => {
  it('value Σ gᵢxᵢ and variance gᵀCg over all parameters; undefined for a level the fit does not hold', () => {
    const { obs } = generated({
      molecule: CO_12_16,
      bands: [
        { upper: 1, lower: 0, jMax: 20 },
        { upper: 2, lower: 0, jMax: 20 },
      ],
      sigma: 0.003,
      seed: 12,
    });
    const { fit } = selectLevelModel(obs, 5, 'a-posteriori', 0.01);
    const params = fit.model.parameters;
    const p = params.length;
    // R(30) of 2-0 (beyond the lines) and P(3) of 1-0, by the full sums written out here.
    for (const o of [
      { ...(obs[0] as Observation), upperV: 2, upperJ: 31, lowerJ: 30 },
      { ...(obs[0] as Observation), upperV: 1, upperJ: 2, lowerJ: 3 },
    ]) {
      const g = params.map((q) => fit.model.coefficient(q, o));
      let value = 0;
      let variance = 0;
      for (let i = 0; i < p; i++) {
        value += (g[i] as number) * (fit.values[i] as number);
        for (let j = 0; j < p; j++)
          variance += (g[i] as number) * (fit.covariance[i * p + j] as number) * (g[j] as number);
      }
      const r = predictWithVariance(fit, o);
      expect(r?.value).toBeCloseTo(value, 8);
      expect(Math.abs((r?.variance as number) - variance)).toBeLessThan(1e-9 * variance);
      expect(r?.variance).toBeGreaterThan(0);
      // Against the generator's own term values (no offset): within 4σ of the prediction (σ ≈ 1e-3 cm⁻¹ at R(30)).
      const truth = termValue(c, o.upperV, o.upperJ) - termValue(c, o.lowerV, o.lowerJ);
      expect(Math.abs((r?.value as number) - truth)).toBeLessThan(4 * Math.sqrt(r?.variance as number) + 4 * 0.003);
    }
    expect(predictWithVariance(fit, { ...(obs[0] as Observation), species: '13C-16O' })).toBeUndefined();
  });
});

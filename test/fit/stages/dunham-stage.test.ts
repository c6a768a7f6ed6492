import { describe, expect, it } from 'vitest';
import { dunhamTermPlan, fitDunhamForSpecies, formatValue } from '../../../src/fit/dunham-stage.js';
import { selectLevelModel } from '../../../src/fit/level-selection.js';
import type { Warning } from '../../../src/fit/types.js';
import { CO_12_16, type IndependentListOptions } from '../../helpers/independent-lines.js';
import { generated } from './observations-of.js';

// Stage 5 on its own, on lines of the independent generator (¹²C¹⁶O, Huber & Herzberg constants from memory, with
// ω_e y_e, γ_e, β_e, H_e). Computed inside `it` (mutation testing).

const HH = { omega_e: 2169.81358, omega_e_x_e: 13.28831, B_e: 1.93128087, alpha_e: 0.01750441 };
const term = (k: number, l: number) => ({ k, l });

function stage(bands: IndependentListOptions['bands'], sigma = 0.001, species?: string) {
  const { obs: raw } = generated({ molecule: CO_12_16, bands, sigma, seed: 71 });
  const obs = species ? raw.map((o) => ({ ...o, species })) : raw;
  const s = species ?? '12C-16O';
  const sel = selectLevelModel(obs, 5, 'a-posteriori', 0.01);
  const warnings: Warning[] = [];
  const r = fitDunhamForSpecies(s, obs, 'a-posteriori', 0.01, sel.orders, warnings);
  return { obs, sel, warnings, r };
}

describe('formatValue', () => {
  it('exponent form below 1e-3 and from 1e5, three digits between', () => {
    expect(formatValue(0)).toBe('0');
    expect(formatValue(0.001)).toBe('0.00100');
    expect(formatValue(-0.000999)).toBe('-9.99e-4');
    expect(formatValue(6.12147e-6)).toBe('6.12e-6');
    expect(formatValue(2169.81358)).toBe('2.17e+3');
    expect(formatValue(99949)).toBe('9.99e+4');
    expect(formatValue(100000)).toBe('1.00e+5');
    expect(formatValue(-0.0105)).toBe('-0.0105');
  });
});

describe('dunhamTermPlan', () => {
  it('bands 1-0 and 2-0 fitted to D: base Y10, Y20, Y01, Y11, Y02; candidates Y21, Y12, Y22', () => {
    const { obs, sel } = stage([
      { upper: 1, lower: 0, jMax: 20 },
      { upper: 2, lower: 0, jMax: 20 },
    ]);
    const orders = new Map([...sel.orders].map(([k]) => [k, 2]));
    const plan = dunhamTermPlan(obs, orders, '12C-16O');
    expect(plan.base).toEqual([term(1, 0), term(2, 0), term(0, 1), term(1, 1), term(0, 2)]);
    expect(plan.candidates).toEqual([term(2, 1), term(1, 2), term(2, 2)]);
    expect([plan.nLevels, plan.nVib, plan.levels]).toEqual([3, 2, [0, 1, 2]]);
    // Fitted to B only: no Y02 in the base, candidates Y21 only (l ≤ 1).
    const b = dunhamTermPlan(obs, new Map(), '12C-16O');
    expect(b.base).toEqual([term(1, 0), term(2, 0), term(0, 1), term(1, 1)]);
    expect(b.candidates).toEqual([term(2, 1)]);
  });

  it('five bands to H: Y10…Y40 in the base (at most four), candidates up to k = 3 and l = 3', () => {
    const { obs } = stage([1, 2, 3, 4, 5].map((u) => ({ upper: u, lower: 0, jMax: 10 })));
    const orders = new Map([0, 1, 2, 3, 4, 5].map((v) => [`12C-16O|${v}`, 3]));
    const plan = dunhamTermPlan(obs, orders, '12C-16O');
    expect(plan.nVib).toBe(5);
    expect(plan.base.filter((t) => t.l === 0)).toEqual([term(1, 0), term(2, 0), term(3, 0), term(4, 0)]);
    expect(plan.candidates).toEqual([
      term(2, 1),
      term(3, 1),
      term(1, 2),
      term(2, 2),
      term(3, 2),
      term(0, 3),
      term(1, 3),
      term(2, 3),
      term(3, 3),
    ]);
  });

  it('pure rotation in v = 0 and v = 1 (two unconnected levels): no vibrational term', () => {
    const { obs } = stage([
      { upper: 0, lower: 0, jMax: 10 },
      { upper: 1, lower: 1, jMax: 10 },
    ]);
    const plan = dunhamTermPlan(obs, new Map(), '12C-16O');
    expect([plan.nLevels, plan.nVib]).toEqual([2, 0]);
    expect(plan.base).toEqual([term(0, 1), term(1, 1)]);
  });
});

describe('fitDunhamForSpecies', () => {
  it('1-0, 2-0, 3-0: ω_e, ω_e x_e, B_e, α_e of Huber & Herzberg within 4σ; constrained terms reported', () => {
    const { r, warnings } = stage([
      { upper: 1, lower: 0, jMax: 30 },
      { upper: 2, lower: 0, jMax: 30 },
      { upper: 3, lower: 0, jMax: 30 },
    ]);
    const par = new Map(r?.report.parameters.map((p) => [p.name, p]));
    for (const [name, want] of [
      ['Y10', HH.omega_e],
      ['Y20', -HH.omega_e_x_e],
      ['Y01', HH.B_e],
      ['Y11', -HH.alpha_e],
    ] as const) {
      const p = par.get(name);
      expect(Math.abs((p?.value as number) - want), name).toBeLessThan(4 * (p?.uncertainty as number));
    }
    expect(r?.report.species).toBe('12C-16O');
    expect(r?.report.terms).toEqual(r?.report.covariance.parameters);
    const constrained = r?.report.constrained ?? [];
    // Each constrained term is named in a TERMS_CONSTRAINED warning with its prior written by formatValue.
    const tc = warnings.filter((w) => w.code === 'TERMS_CONSTRAINED');
    expect(tc).toHaveLength(constrained.length);
    for (const [i, c] of constrained.entries()) {
      expect(tc[i]?.message).toContain(
        `(${c.parameter}), which the lines cannot determine and which is constrained to ${formatValue(c.prior.value)} ± ${formatValue(c.prior.uncertainty)} cm-1 (${c.basis})`,
      );
    }
    // The equilibrium set holds the determined terms only, with their covariance.
    const keys = r?.set.keys ?? [];
    for (const c of constrained) expect(keys).not.toContain(c.parameter.slice(1).split('').join(','));
    expect(r?.set.values).toHaveLength(keys.length);
    expect(r?.set.covariance).toHaveLength(keys.length ** 2);
    const i01 = keys.indexOf('0,1');
    expect(r?.set.values[i01]).toBe(par.get('Y01')?.value);
    expect(Math.sqrt(r?.set.covariance[i01 * keys.length + i01] as number)).toBeCloseTo(
      par.get('Y01')?.uncertainty as number,
      15,
    );
  });

  it('one band: Y10 named ΔG_1/2, and the warnings say why ω_e and γ_e are out of reach', () => {
    const { r, warnings } = stage([{ upper: 1, lower: 0, jMax: 25 }]);
    expect(r?.report.parameters[0]?.name).toBe('ΔG_1/2');
    expect(r?.report.terms[0]).toBe('ΔG_1/2');
    expect(warnings.map((w) => w.code)).toContain('VIBRATION_NEEDS_TWO_INTERVALS');
    expect(warnings.find((w) => w.code === 'VIBRATION_NEEDS_TWO_INTERVALS')?.message).toBe(
      '12C-16O: ω_e and ω_e x_e need two or more vibrational intervals (e.g. a fundamental and an overtone); the band origin is ΔG, not ω_e',
    );
    // ΔG_1/2 = ω_e − 2ω_e x_e + … (Huber & Herzberg: 2143.27 cm⁻¹ with ω_e y_e) within 4σ.
    const dg = r?.report.parameters[0];
    expect(Math.abs((dg?.value as number) - 2143.271)).toBeLessThan(4 * (dg?.uncertainty as number) + 0.002);
    const two = stage([{ upper: 2, lower: 0, jMax: 25 }]);
    expect(two.r?.report.parameters[0]?.name).toBe('ΔG(0→2)/2');
  });

  it('lines of one level: no Dunham fit, and the warning says so', () => {
    const { r, warnings } = stage([{ upper: 0, lower: 0, jMax: 20 }], 1e-5);
    expect(r).toBeUndefined();
    expect(warnings).toEqual([
      {
        code: 'EQUILIBRIUM_NEEDS_TWO_LEVELS',
        message:
          '12C-16O: lines of one vibrational level give B_v, D_v of that level only; B_e and α_e need two or more levels',
      },
    ]);
  });
});

import { describe, expect, it } from 'vitest';
import { MHZ_PER_WAVENUMBER } from '../../../src/constants/codata-2018.js';
import { selectLevelModel } from '../../../src/fit/level-selection.js';
import {
  constrainLevelModel,
  dunhamPriors,
  HIGH_ORDER_PRIOR_FACTOR,
  hFromRelation,
  kratzerD,
  RELATION_PRIOR_FRACTION,
  SCALE_PRIOR_FACTOR,
} from '../../../src/fit/truncation.js';
import type { Observation } from '../../../src/models/linear-model.js';
import { CO_12_16 } from '../../helpers/independent-lines.js';
import { generated } from './observations-of.js';

// Stage 3b on its own: priors for the next term of a truncated model. Outside values: ¹²C¹⁶O constants of Huber &
// Herzberg (1979), from memory (shared/REFERENCE-DATA.md §3); H_0 = 171.68 mHz of Gendriesch et al., A&A 497, 927
// (2009), Table 2 (shared fixture). Computed inside `it` (mutation testing).

const HH = { omega_e: 2169.81358, omega_e_x_e: 13.28831, omega_e_y_e: 0.010511, B_e: 1.93128087, alpha_e: 0.01750441 };
const D_E = 6.12147e-6;

describe('the relations behind the priors, against published CO constants', () => {
  it('Kratzer 4B_e³/ω_e² gives D_e of CO within 0.1 % (Huber & Herzberg 6.12147e-6 cm⁻¹)', () => {
    const d = kratzerD(HH.B_e, HH.omega_e);
    expect(d).toBeCloseTo((4 * HH.B_e ** 3) / HH.omega_e ** 2, 18);
    expect(Math.abs(d / D_E - 1)).toBeLessThan(1e-3);
  });
  it('2D_e(12B_e² − α_e ω_e)/(3ω_e²) gives H of CO within 5 % of H_0 = 171.68 mHz (Gendriesch et al. 2009)', () => {
    const h = hFromRelation(D_E, HH.B_e, HH.alpha_e, HH.omega_e);
    // 171.68 mHz = 171.68e-9 MHz.
    const h0 = 171.68e-9 / MHZ_PER_WAVENUMBER;
    expect(Math.abs(h / h0 - 1)).toBeLessThan(0.05);
    expect(h).toBeCloseTo((2 * D_E * (12 * HH.B_e ** 2 - HH.alpha_e * HH.omega_e)) / (3 * HH.omega_e ** 2), 22);
  });
});

describe('the β_e relation against published CO level constants', () => {
  it('β_e from the relation and Huber & Herzberg is within its prior σ of D_1 − D_0 (Gendriesch et al. 2009)', () => {
    // D_0 = 183.50489, D_1 = 183.4903 kHz (Gendriesch et al., A&A 497, 927 (2009), Table 2, shared fixture).
    const beta = (183.4903 - 183.50489) / 1e3 / MHZ_PER_WAVENUMBER;
    const first = (8 * HH.omega_e_x_e) / HH.omega_e;
    const bracket = first - (5 * HH.alpha_e) / HH.B_e - (HH.alpha_e ** 2 * HH.omega_e) / (24 * HH.B_e ** 3);
    const sigma = D_E * Math.max(Math.abs(bracket) / 2, 0.05 * first);
    expect(Math.abs(D_E * bracket - beta)).toBeLessThan(sigma);
    // The relation's sign is right for CO, and the bracket cancels to under 1 % of its first term.
    expect(Math.sign(D_E * bracket)).toBe(Math.sign(beta));
    expect(Math.abs(bracket / first)).toBeLessThan(0.01);
  });
});

describe('dunhamPriors', () => {
  const values = new Map([
    ['1,0', HH.omega_e],
    ['2,0', -HH.omega_e_x_e],
    ['0,1', HH.B_e],
    ['1,1', -HH.alpha_e],
    ['0,2', -D_E],
  ]);
  const terms = [...values.keys()].map((k) => {
    const [a, b] = k.split(',').map(Number) as [number, number];
    return { k: a, l: b };
  });

  it('CO with Y10, Y20, Y01, Y11, Y02: Y30 from the library, Y21 a scale prior, Y12 and Y03 from relations', () => {
    const p = dunhamPriors('12C-16O', terms, values);
    expect(p.map((x) => x.key)).toEqual(['12C-16O|Y|3,0', '12C-16O|Y|2,1', '12C-16O|Y|1,2', '12C-16O|Y|0,3']);
    const kappa = HH.B_e / HH.omega_e;
    const [y30, y21, y12, y03] = p;
    expect(y30?.value).toBe(HH.omega_e_y_e);
    expect(y30?.sigma).toBeCloseTo(RELATION_PRIOR_FRACTION * HH.omega_e_y_e, 15);
    expect(y30?.basis).toBe('ω_e y_e of the reference library, ± 50 %');
    expect(y21?.value).toBe(0);
    expect(y21?.sigma).toBeCloseTo(SCALE_PRIOR_FACTOR * kappa * HH.alpha_e, 15);
    expect(y21?.basis).toBe('not determined by the lines: 0 ± 5 (B_e/ω_e) |Y11| (Dunham ordering)');
    // β_e = D_e (8 ω_e x_e/ω_e − 5 α_e/B_e − α_e² ω_e/(24 B_e³)), Y12 = −β_e; σ = D_e max(|bracket|/2, 0.05 · 8 ω_e x_e/ω_e).
    const first = (8 * HH.omega_e_x_e) / HH.omega_e;
    const bracket = first - (5 * HH.alpha_e) / HH.B_e - (HH.alpha_e ** 2 * HH.omega_e) / (24 * HH.B_e ** 3);
    expect(y12?.value).toBeCloseTo(-D_E * bracket, 22);
    expect(y12?.sigma).toBeCloseTo(D_E * Math.max(Math.abs(bracket) / 2, 0.05 * first), 22);
    expect(y12?.basis).toBe('β_e ≈ D_e(8ω_e x_e/ω_e − 5α_e/B_e − α_e²ω_e/(24B_e³)), σ on the bracket');
    const h = hFromRelation(D_E, HH.B_e, HH.alpha_e, HH.omega_e);
    expect(y03?.value).toBeCloseTo(h, 25);
    expect(y03?.sigma).toBeCloseTo(0.5 * h, 25);
    expect(y03?.term).toEqual({ k: 0, l: 3 });
    expect([RELATION_PRIOR_FRACTION, SCALE_PRIOR_FACTOR]).toEqual([0.5, 5]);
  });

  it('terms already fitted, or without the term below, get no prior', () => {
    const more = [...terms, { k: 3, l: 0 }, { k: 2, l: 1 }, { k: 1, l: 2 }, { k: 0, l: 3 }, { k: 0, l: 4 }];
    expect(dunhamPriors('12C-16O', more, values)).toEqual([]);
    // Only Y10 and Y01: no Y30 (needs Y20), no Y21 (needs Y11); Y02 from the library's D_e; no Y03 (needs Y02).
    const two = dunhamPriors(
      '12C-16O',
      [
        { k: 1, l: 0 },
        { k: 0, l: 1 },
      ],
      values,
    );
    expect(two.map((x) => [x.key, x.value, x.basis])).toEqual([
      ['12C-16O|Y|0,2', -D_E, 'D_e of the reference library, ± 50 %'],
    ]);
    expect(two[0]?.sigma).toBeCloseTo(0.5 * D_E, 20);
  });

  it('a species the library does not hold: Kratzer for Y02, scale priors from the fitted Y10 and Y01', () => {
    const two = dunhamPriors(
      '24Mg-16O',
      [
        { k: 1, l: 0 },
        { k: 0, l: 1 },
      ],
      values,
    );
    expect(two.map((x) => x.basis)).toEqual(['Kratzer D_e ≈ 4B_e³/ω_e², ± 50 %']);
    expect(two[0]?.value).toBeCloseTo(-kratzerD(HH.B_e, HH.omega_e), 20);
    const all = dunhamPriors('24Mg-16O', terms, values);
    expect(all.map((x) => x.key.split('|')[2])).toEqual(['3,0', '2,1', '1,2', '0,3']);
    expect(all[0]?.sigma).toBeCloseTo(SCALE_PRIOR_FACTOR * (HH.B_e / HH.omega_e) * HH.omega_e_x_e, 12);
    // Without Y10 or a library ω_e there is no κ and no ω_e: no scale prior and no H relation can be formed.
    const noOmega = new Map([...values].filter(([k]) => k !== '1,0'));
    const t = terms.filter((x) => !(x.k === 1 && x.l === 0));
    expect(dunhamPriors('24Mg-16O', t, noOmega)).toEqual([]);
    // The library's ω_e stands in for a missing Y10 (CO): κ from it.
    const co = dunhamPriors('12C-16O', t, noOmega);
    expect(co.map((x) => x.key.split('|')[2])).toEqual(['3,0', '2,1', '1,2', '0,3']);
    expect(co[1]?.sigma).toBeCloseTo(SCALE_PRIOR_FACTOR * (HH.B_e / HH.omega_e) * HH.alpha_e, 12);
  });
});

describe('constrainLevelModel', () => {
  const list = (jMax: number, sigma: number, species?: string): Observation[] => {
    const { obs } = generated({
      molecule: CO_12_16,
      bands: [
        { upper: 1, lower: 0, jMax },
        { upper: 2, lower: 0, jMax },
      ],
      sigma,
      seed: 61,
    });
    return species ? obs.map((o) => ({ ...o, species })) : obs;
  };
  const named = (sel: ReturnType<typeof selectLevelModel>, name: string) => {
    const i = sel.fit.model.parameters.findIndex((p) => p.name === name);
    return sel.fit.values[i] as number;
  };

  it('levels fitted to B take D from the library (± 50 %), solved as priors; the orders stay', () => {
    const sel = selectLevelModel(list(20, 0.01), 1, 'a-posteriori', 0.01);
    const r = constrainLevelModel(sel, 'a-posteriori');
    expect(r.constraints.map((c) => [c.parameter, c.key, c.species, c.basis])).toEqual(
      [0, 1, 2].map((v) => [`D_${v}`, `12C-16O|D|${v}`, '12C-16O', 'D_e of the reference library, ± 50 %']),
    );
    for (const c of r.constraints) {
      expect(c.prior.value).toBe(D_E);
      expect(c.prior.uncertainty).toBeCloseTo(0.5 * D_E, 20);
    }
    expect(r.level.orders).toBe(sel.orders);
    expect(r.level.fit.model.parameters.map((p) => p.name)).toEqual([
      'T_1-T_0',
      'T_2-T_0',
      'B_0',
      'D_0',
      'B_1',
      'D_1',
      'B_2',
      'D_2',
    ]);
    // The lines (J″ ≤ 20, σ 0.01) do determine D: the constrained D_0 lies within 4 % of D_e, far inside the prior.
    const i = r.level.fit.model.parameters.findIndex((p) => p.name === 'D_0');
    expect(Math.abs((r.level.fit.values[i] as number) / D_E - 1)).toBeLessThan(0.04);
  });

  it('levels fitted to D take H from the library constants by the Dunham relation', () => {
    const sel = selectLevelModel(list(20, 0.01), 2, 'a-posteriori', 0.01);
    expect([...sel.orders.values()]).toEqual([2, 2, 2]);
    const r = constrainLevelModel(sel, 'a-posteriori');
    expect(r.constraints.map((c) => c.parameter)).toEqual(['H_0', 'H_1', 'H_2']);
    // The library's own D_e, B_e, α_e, ω_e (¹²C¹⁶O: Huber & Herzberg values).
    const h = hFromRelation(D_E, HH.B_e, HH.alpha_e, HH.omega_e);
    for (const c of r.constraints) {
      expect(c.prior.value / h).toBeCloseTo(1, 6);
      expect(c.prior.uncertainty / (0.5 * h)).toBeCloseTo(1, 6);
      expect(c.basis).toBe(
        'H_v ≈ H_e ≈ 2D_e(12B_e² − α_e ω_e)/(3ω_e²) (Dunham relation) from the reference library, ± 50 %',
      );
    }
  });

  it('a species the library does not hold: Kratzer D from the fitted interval, then H from the fitted B_v, D_v', () => {
    const one = selectLevelModel(list(20, 0.01, 'XX'), 1, 'a-posteriori', 0.01);
    const r1 = constrainLevelModel(one, 'a-posteriori');
    const omega = named(one, 'T_1-T_0');
    expect(r1.constraints.map((c) => c.basis)).toEqual(
      [0, 1, 2].map((v) => `Kratzer D ≈ 4B³/ω_e² with B_${v} and ω_e ≈ the fitted vibrational interval, ± 50 %`),
    );
    expect(r1.constraints[1]?.prior.value).toBeCloseTo(kratzerD(named(one, 'B_1'), omega), 18);
    const two = selectLevelModel(list(20, 0.01, 'XX'), 2, 'a-posteriori', 0.01);
    const r2 = constrainLevelModel(two, 'a-posteriori');
    const B0 = named(two, 'B_0');
    const D0 = named(two, 'D_0');
    const alpha = B0 - named(two, 'B_1');
    // ω_e from the larger interval per quantum: (T_2 − T_0)/2 < T_1 − T_0, so T_1 − T_0.
    const h = hFromRelation(D0, B0, alpha, named(two, 'T_1-T_0'));
    expect(r2.constraints.map((c) => c.parameter)).toEqual(['H_0', 'H_1', 'H_2']);
    expect(r2.constraints[0]?.prior.value).toBeCloseTo(h, 22);
    expect(r2.constraints[0]?.prior.uncertainty).toBeCloseTo(0.5 * Math.abs(h), 22);
    expect(r2.constraints[0]?.basis).toBe(
      'H_v ≈ H_e ≈ 2D(12B² − α_e ω_e)/(3ω_e²) (Dunham relation) with the fitted B_0, D_0, α_e from the fitted B_v, ± 50 % and ω_e ≈ the fitted vibrational interval',
    );
  });

  it("CO levels fitted to H take Dunham's L_e from the library constants: −3.61e-17 cm⁻¹ (P = 2.349 by hand)", () => {
    const sel = selectLevelModel(list(45, 1e-4), 3, 'a-posteriori', 0.01);
    expect([...sel.orders.values()]).toEqual([3, 3, 3]);
    const r = constrainLevelModel(sel, 'absolute');
    expect(r.constraints.map((c) => c.parameter)).toEqual(['L_0', 'L_1', 'L_2']);
    // L_e = −16B_e⁷P/ω_e⁶, P = 9a1² + 36a1 − 4a2 + 52, a1 = −1 − α_e ω_e/(6B_e²), a2 = −2ω_e x_e/(3B_e) + 5a1²/4,
    // worked out here with the Huber & Herzberg constants: a1 = −2.6972, a2 = 4.507, P = 2.349, L_e = −3.61e-17,
    // within 3 % of −3.65e-17 from a fit of the real CO database pure-rotation lines to x⁵ (test/fit/high-order-priors).
    const a1 = -1 - (HH.alpha_e * HH.omega_e) / (6 * HH.B_e ** 2);
    const a2 = (-2 * HH.omega_e_x_e) / (3 * HH.B_e) + (5 * a1 * a1) / 4;
    const P = 9 * a1 * a1 + 36 * a1 - 4 * a2 + 52;
    expect(P).toBeCloseTo(2.349, 3);
    const unit = (16 * HH.B_e ** 7) / HH.omega_e ** 6;
    for (const c of r.constraints) {
      expect(c.prior.value / (-unit * P)).toBeCloseTo(1, 6);
      expect(Math.abs(c.prior.value / -3.65e-17 - 1)).toBeLessThan(0.03);
      // σ stated on P: max(½|P|, 1).
      expect(c.prior.uncertainty / (unit * Math.max(0.5 * P, 1))).toBeCloseTo(1, 6);
      expect(c.basis).toBe(
        `L_v ≈ L_e = −16B_e⁷P/ω_e⁶, P = 9a1² + 36a1 − 4a2 + 52 = ${P.toPrecision(3)} (Dunham's a1 from α_e of the library, a2 from ω_e x_e of the library; ω_e from the reference library), σ_P = ${Math.max(0.5 * P, 1).toPrecision(2)}`,
      );
    }
    const full = { fit: sel.fit, orders: new Map([...sel.orders].map(([k]) => [k, 5])) };
    expect(constrainLevelModel(full, 'absolute')).toEqual({ level: full, constraints: [] });
  });

  it('a species the library lacks, levels 0–2 fitted to H: L from the fitted B_v, α_e and the Morse a2', () => {
    const xx = list(45, 1e-4, 'XX');
    const sel = selectLevelModel(xx, 3, 'a-posteriori', 0.01);
    expect([...sel.orders.values()]).toEqual([3, 3, 3]);
    const r = constrainLevelModel(sel, 'absolute');
    expect(r.constraints.map((c) => c.parameter)).toEqual(['L_0', 'L_1', 'L_2']);
    // ω_e ≈ the larger interval per quantum (T_1 − T_0); α_e from B_v − B_{v+1} (the top level: B_{v−1} − B_v);
    // a1 = −1 − α_e ω_e/(6B_v²), a2 = 7a1²/12 (Morse), P = 9a1² + 36a1 − 4a2 + 52, σ_P = max(|P|, 2).
    const omega = named(sel, 'T_1-T_0');
    const B = [0, 1, 2].map((v) => named(sel, `B_${v}`)) as [number, number, number];
    const alphas = [B[0] - B[1], B[1] - B[2], B[1] - B[2]] as number[];
    for (const [v, c] of r.constraints.entries()) {
      const b = B[v] as number;
      const a1 = -1 - ((alphas[v] as number) * omega) / (6 * b * b);
      const a2 = (7 * a1 * a1) / 12;
      const P = 9 * a1 * a1 + 36 * a1 - 4 * a2 + 52;
      const unit = (16 * b ** 7) / omega ** 6;
      expect(c.prior.value / (-unit * P), c.parameter).toBeCloseTo(1, 9);
      expect(c.prior.uncertainty / (unit * Math.max(Math.abs(P), 2)), c.parameter).toBeCloseTo(1, 9);
      expect(c.basis).toBe(
        `L_v ≈ L_e = −16B_e⁷P/ω_e⁶, P = 9a1² + 36a1 − 4a2 + 52 = ${P.toPrecision(3)} (Dunham's a1 from α_e of the fitted B_v, a2 from the Morse form 7a1²/12; ω_e ≈ the fitted vibrational interval), σ_P = ${Math.max(Math.abs(P), 2).toPrecision(2)}`,
      );
    }
    // Close to CO's own L_e (−3.6e-17 cm⁻¹; the lines are CO's): the Morse a2 and the fitted ω moves it by < 60 %.
    expect(Math.abs((r.constraints[0]?.prior.value as number) / -3.6e-17 - 1)).toBeLessThan(0.6);
  });

  it('without α_e (not in the library, no neighbouring level) L = 0 ± 10 (B_v/ω_e)² max(|H_v|, σ_H); M likewise', () => {
    // Band 2-0 of a species the library lacks: levels 0 and 2, so no α_e from adjacent levels; ω_e ≈ (T_2 − T_0)/2.
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 2, lower: 0, jMax: 45 }], sigma: 1e-4, seed: 62 });
    const xx = obs.map((o) => ({ ...o, species: 'XX' }));
    const sel = selectLevelModel(xx, 3, 'a-posteriori', 0.01);
    expect([...sel.orders.values()]).toEqual([3, 3]);
    const r = constrainLevelModel(sel, 'absolute');
    expect(r.constraints.map((c) => c.parameter)).toEqual(['L_0', 'L_2']);
    const p = sel.fit.model.parameters.length;
    const omega = named(sel, 'T_2-T_0') / 2;
    for (const c of r.constraints) {
      const v = Number(c.parameter.slice(2));
      const i = sel.fit.model.parameters.findIndex((q) => q.name === `H_${v}`);
      const size = Math.max(Math.abs(sel.fit.values[i] as number), Math.sqrt(sel.fit.covariance[i * p + i] as number));
      const kappa = named(sel, `B_${v}`) / omega;
      expect(c.prior.value).toBe(0);
      expect(c.prior.uncertainty / (HIGH_ORDER_PRIOR_FACTOR * kappa ** 2 * size)).toBeCloseTo(1, 12);
      expect(c.basis).toBe(
        'not determined by the lines: 0 ± 10 (B_v/ω_e)² |H_v| (Dunham ordering, ω_e ≈ the fitted vibrational interval)',
      );
    }
  });
});

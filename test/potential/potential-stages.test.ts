import { describe, expect, it } from 'vitest';
import { ROTATIONAL_FACTOR } from '../../src/constants/codata-2018.js';
import { solveRadialLevels } from '../../src/potential/numerov.js';
import { type PotentialInput, ROUND_TRIP_GOALS } from '../../src/potential/potential-curve.js';
import { compareLevels, refineRkrCurve, solveOnRkrCurve } from '../../src/potential/refine.js';
import { rkrCurveModel } from '../../src/potential/rkr-curve.js';
import { Bv, C, curves, G, SERIES, Y00 } from '../helpers/invented-oscillator.js';

// Fast stage tests of the Numerov check and the refinement (potential-curve.ts, refine.ts): few levels and, where
// the function takes it, a grid of 600 points instead of 6000, so that each case costs milliseconds to a few tenths
// of a second. All computed inside `it`.

// The invented oscillator (constants, Y00, curves) is in test/helpers/invented-oscillator.ts.

describe('compareLevels by hand', () => {
  it('intervals against G(v) − G(0), B against B(v), the shift E₀ − G₀ and the worst of each', () => {
    const grid = { from: 1, to: 2, step: 0.1, points: 11 };
    // E₀ = G(0) + 1, E₁ = G(1) + 1 + 0.03, E₂ = G(2) + 1 − 0.05; B off by +1e-4, −3e-4, +2e-4 relative.
    const solved = [
      { v: 0, energy: G(0) + 1, rotational: Bv(0) * (1 + 1e-4) },
      { v: 1, energy: G(1) + 1.03, rotational: Bv(1) * (1 - 3e-4) },
      { v: 2, energy: G(2) + 0.95, rotational: Bv(2) * (1 + 2e-4) },
    ];
    const c = compareLevels(SERIES, grid, solved);
    expect(c.grid).toBe(grid);
    expect(c.zeroPointShift).toBeCloseTo(1, 9);
    expect(c.levels.map((l) => l.v)).toEqual([0, 1, 2]);
    expect(c.levels.map((l) => l.energy)).toEqual(solved.map((s) => s.energy));
    expect(c.levels.map((l) => l.B)).toEqual(solved.map((s) => s.rotational));
    const ie = c.levels.map((l) => l.intervalError);
    expect(ie[0]).toBe(0);
    expect(ie[1]).toBeCloseTo(0.03, 9);
    expect(ie[2]).toBeCloseTo(-0.05, 9);
    const re = c.levels.map((l) => l.rotationalRelativeError);
    expect(re[0]).toBeCloseTo(1e-4, 12);
    expect(re[1]).toBeCloseTo(-3e-4, 12);
    expect(re[2]).toBeCloseTo(2e-4, 12);
    expect(c.worstIntervalError).toBeCloseTo(0.05, 9);
    expect(c.worstRotationalRelativeError).toBeCloseTo(3e-4, 12);
  });
});

describe('the Numerov solve on the RKR curve', () => {
  it('the grid reaches a quarter of the well width inside and half of it outside the points at vTop', () => {
    const s = solveOnRkrCurve(SERIES, C, 4, 2, 600);
    if (!s) throw new Error('no curve');
    const w = s.model.outer - s.model.inner;
    expect(s.grid.from).toBeCloseTo(s.model.inner - 0.25 * w, 12);
    expect(s.grid.to).toBeCloseTo(s.model.outer + 0.5 * w, 12);
    expect(s.grid.points).toBe(600);
    expect(s.grid.step).toBeCloseTo((s.grid.to - s.grid.from) / 599, 15);
    expect(s.levels.length).toBe(2);
    // The levels lie within 0.2 cm⁻¹ of G(v) + Y00 (first order misses the interval by ≈ 0.06).
    s.levels.forEach((l) => {
      expect(Math.abs(l.energy - (G(l.v) + Y00))).toBeLessThan(0.2);
    });
    // A curve that is not single-valued gives no solve: B(v) = 2 + 3x doubles by v = 1.
    expect(solveOnRkrCurve({ g: [2000, -10], b: [2, 3] }, C, 4, 2, 600)).toBeUndefined();
  });

  it('a narrow well on a wide-inner grid: the grid starts at no less than a fifth of the inner point', () => {
    // A shallow well (ω = 40, ω_e x_e = 2: dissociation near G = 200 cm⁻¹) filled to v = 7 (G = 187.5) with
    // B = 2 (r_e ≈ 2.9 Å): the outer point runs out to ≈ 12.7 Å, the inner one in to ≈ 0.7 Å, so inner − w/4 < 0.
    const wide = { g: [40, -2], b: [2, -0.01] };
    const s = solveOnRkrCurve(wide, C, 7, 1, 600);
    if (!s) throw new Error('no curve');
    const w = s.model.outer - s.model.inner;
    expect(s.model.inner - 0.25 * w).toBeLessThan(0.2 * s.model.inner);
    expect(s.grid.from).toBeCloseTo(0.2 * s.model.inner, 12);
  });
});

describe('refineRkrCurve on 600 points', () => {
  it('gives back G(v) − G(0) within 0.01 cm⁻¹ and B(v) within 1e-4, checked on its own curve with another grid', () => {
    const r = refineRkrCurve({ series: SERIES, hbar2Over2mu: C, vMax: 2, vTop: 5, points: 600 });
    if (!r) throw new Error('no refinement');
    expect(r.start).toBe('identity');
    expect(r.rounds.length).toBeGreaterThanOrEqual(2);
    expect(r.solves).toBe(r.rounds.length);
    // The first round is the first-order curve (interval error ≈ 0.13 cm⁻¹ at v = 2); the kept one within goals.
    expect((r.rounds[0] as { worstIntervalError: number }).worstIntervalError).toBeGreaterThan(0.05);
    expect(r.check.worstIntervalError).toBeLessThan(ROUND_TRIP_GOALS.interval);
    expect(r.check.worstRotationalRelativeError).toBeLessThan(ROUND_TRIP_GOALS.rotationalRelative);
    // Independent check: the RKR curve of the corrected series solved here on 1500 points.
    const model = rkrCurveModel(r.series, C, 5);
    if (!model) throw new Error('no model');
    const w = model.outer - model.inner;
    const from = model.inner - 0.25 * w;
    const to = model.outer + 0.5 * w;
    const levels = solveRadialLevels(model.potential, C, { from, to, step: (to - from) / 1499 }, 3);
    const e0 = (levels[0] as { energy: number }).energy;
    levels.forEach((l) => {
      expect(Math.abs(l.energy - e0 - (G(l.v) - G(0)))).toBeLessThan(0.01);
      expect(Math.abs(l.rotational / Bv(l.v) - 1)).toBeLessThan(1e-4);
    });
    // Dunham's Y00 is what is left above G(0) (higher orders: ±0.005 cm⁻¹; measured 1.0539 against 1.0556).
    expect(Math.abs(r.check.zeroPointShift - Y00)).toBeLessThan(0.005);
    // The turning points of each level lie on the refined curve at E_v (1e-6 cm⁻¹ of 1000–5000), r₋ < r₊.
    expect(r.levels.map((l) => l.v)).toEqual([0, 1, 2]);
    for (const l of r.levels) {
      expect(l.rMin).toBeLessThan(l.rMax);
      expect(Math.abs(model.potential(l.rMin) - l.energy)).toBeLessThan(1e-6 * l.energy);
      expect(Math.abs(model.potential(l.rMax) - l.energy)).toBeLessThan(1e-6 * l.energy);
      expect(l.energy).toBe((r.check.levels[l.v] as { energy: number }).energy);
    }
  });

  it('with one round the identity run cannot reach the goals: damped Gauss–Newton takes over and does', () => {
    const r = refineRkrCurve({ series: SERIES, hbar2Over2mu: C, vMax: 2, vTop: 5, points: 600, maxRounds: 1 });
    if (!r) throw new Error('no refinement');
    expect(r.start).toBe('finite-difference');
    // The Newton run's rounds: its first-order start and one step.
    expect(r.rounds.length).toBe(2);
    expect((r.rounds[0] as { worstIntervalError: number }).worstIntervalError).toBeGreaterThan(0.05);
    expect(r.check.worstIntervalError).toBeLessThan(ROUND_TRIP_GOALS.interval);
    // Solves: 1 of the identity run, then 1 + one per parameter (ΔG to x², ΔB to x²: 5) + at least 1 trial step.
    expect(r.solves).toBeGreaterThanOrEqual(8);
    expect(r.solves).toBeLessThanOrEqual(4 * (5 + 2) + 1);
    // The corrected series carries the corrections: G to degree 2, B to degree 2.
    expect(r.series.g.length).toBe(2);
    expect(r.series.b.length).toBe(3);
  });

  it('a target whose curve is not single-valued gives no refinement', () => {
    expect(
      refineRkrCurve({ series: { g: [2000, -10], b: [2, 3] }, hbar2Over2mu: C, vMax: 1, vTop: 4, points: 600 }),
    ).toBe(undefined);
  });
});

describe('potentialCurves without the check: series, mass and the finiteness guards', () => {
  const fast = (over: Partial<PotentialInput> = {}) => curves({ vMax: 4, vData: 4, verify: false, ...over });
  const diag = (s: readonly number[]) => {
    const m = new Float64Array(s.length * s.length);
    s.forEach((v, i) => {
      m[i * s.length + i] = v;
    });
    return m;
  };
  const refusal = (over: Partial<PotentialInput>) => {
    try {
      fast(over);
    } catch (e) {
      return e as { code: string; message: string; details: unknown };
    }
    throw new Error('expected a refusal');
  };

  it('missing middle terms count as 0: G = 2000x + 0.5x³ without ω_e x_e, B = 2 + 1e-3 x² without α_e (1e-9)', () => {
    const r = fast({
      coefficients: [
        { k: 1, l: 0, value: 2000 },
        { k: 3, l: 0, value: 0.5 },
        { k: 0, l: 1, value: 2 },
        { k: 2, l: 1, value: 1e-3 },
        { k: 0, l: 2, value: -6e-6 }, // an l = 2 term after B_e: not part of B(v)
      ],
      covariance: new Float64Array(25),
    });
    for (const l of r.levels) {
      const x = l.v + 0.5;
      expect(Math.abs(l.energy.value - (2000 * x + 0.5 * x ** 3))).toBeLessThan(1e-9);
      expect(Math.abs(l.B.value - (2 + 1e-3 * x * x))).toBeLessThan(1e-12);
    }
  });

  it('C = ħ²/2μ: μ = 2 u halves C and shrinks every turning point by √2 (r ∝ √C for the same G and B; 1e-12)', () => {
    const one = fast();
    const two = fast({ reducedMass: { value: 2, uncertainty: 0 } });
    expect(two.hbar2Over2mu).toBe(ROTATIONAL_FACTOR / 2);
    two.levels.forEach((l, v) => {
      const o = one.levels[v];
      if (!o) throw new Error('no level');
      expect(Math.abs(l.rMin.value * Math.SQRT2 - o.rMin.value)).toBeLessThan(1e-12);
      expect(Math.abs(l.rMax.value * Math.SQRT2 - o.rMax.value)).toBeLessThan(1e-12);
    });
  });

  it('an infinite σ of E or of B refuses the levels, with vMax in the details', () => {
    // An infinite var(Y20) makes σ(G) infinite; var(Y11) = 1e308 makes σ²(B) = x² · 1e308 overflow from x = 1.5.
    const message = 'the constants give turning points that are not finite numbers';
    for (const cov of [diag([0, Number.POSITIVE_INFINITY, 0, 0]), diag([0, 0, 0, 1e308])]) {
      const e = refusal({ covariance: cov });
      expect([e.code, e.message]).toEqual(['POTENTIAL_CONSTANTS_INVALID', message]);
      expect(e.details).toEqual({ vMax: 4 });
    }
  });

  it('vMax out of range is refused with vMax in the details', () => {
    expect(refusal({ vMax: 101 }).details).toEqual({ vMax: 101 });
  });
});

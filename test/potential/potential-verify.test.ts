import { describe, expect, it } from 'vitest';
import { CHECK_MARGIN, numerovCheck } from '../../src/potential/potential-curve.js';
import { BASE, Bv, C, curves, G, SERIES, Y00 } from '../helpers/invented-oscillator.js';

// The Numerov check and the refinement as potentialCurves runs them (6000-point grids, few levels: a few tenths of
// a second each), kept apart from potential-stages.test.ts so that a mutation run of the other stages need not pay
// for them. All computed inside `it`.

// The invented oscillator (constants, Y00, curves) is in test/helpers/invented-oscillator.ts.

describe('numerovCheck on 6000 points', () => {
  it('numerovCheck: levels 0…vMax on the curve to vTop, the shift ≈ Y00 and the first-order interval error', () => {
    const check = numerovCheck(SERIES, C, 1, 4);
    if (!check) throw new Error('no check');
    expect(check.vTop).toBe(4);
    expect(check.grid.points).toBe(6000);
    expect(check.levels.map((l) => l.v)).toEqual([0, 1]);
    // First order leaves the shift within 0.05 of Y00 and the interval within 0.1 cm⁻¹ (measured 1.087 and 0.063).
    expect(Math.abs(check.zeroPointShift - Y00)).toBeLessThan(0.05);
    expect(check.worstIntervalError).toBeGreaterThan(0.01);
    expect(check.worstIntervalError).toBeLessThan(0.1);
    expect(numerovCheck({ g: [2000, -10], b: [2, 3] }, C, 1, 4)).toBeUndefined();
  });
});

describe('potentialCurves with the Numerov check and the refinement', () => {
  it('verification from vMax + 3 and a refinement within the goals: no warning beyond the range notes', () => {
    const r = curves();
    expect(CHECK_MARGIN).toBe(3);
    const v = r.verification;
    if (!v) throw new Error('no verification');
    expect(v.vTop).toBe(1 + CHECK_MARGIN);
    expect(v.levels.length).toBe(2);
    expect(Math.abs(v.zeroPointShift - Y00)).toBeLessThan(0.05);
    const f = r.refined;
    if (!f) throw new Error('no refinement');
    expect(f.vTop).toBe(4);
    expect(f.withinGoals).toBe(true);
    expect(f.worstIntervalError).toBeLessThan(0.01);
    expect(f.worstRotationalRelativeError).toBeLessThan(1e-4);
    expect(f.grid.points).toBe(6000);
    expect(Math.abs(f.zeroPointShift - Y00)).toBeLessThan(0.005);
    expect(f.start).toBe('identity');
    expect(f.solves).toBeGreaterThan(1);
    expect(f.rounds.length).toBe(f.solves);
    expect(f.levels.map((l) => l.v)).toEqual([0, 1]);
    f.levels.forEach((l, i) => {
      const fo = r.levels[i];
      if (!fo) throw new Error('no level');
      // E_v = G_v − G_0 + E_0 of the refined curve: G_v + Y00 within 0.01.
      expect(Math.abs(l.energy.value - (G(l.v) + f.zeroPointShift))).toBeLessThan(0.01);
      expect(l.energy.uncertainty).toBe(fo.energy.uncertainty);
      expect(l.rMin.uncertainty).toBe(fo.rMin.uncertainty);
      expect(l.rMax.uncertainty).toBe(fo.rMax.uncertainty);
      expect([l.energy.unit, l.rMin.unit, l.rMax.unit]).toEqual(['cm-1', 'angstrom', 'angstrom']);
      // The refined turning points move by < 1e-3 Å from first order (measured ≤ 1.1e-4).
      expect(Math.abs(l.rMin.value - fo.rMin.value)).toBeLessThan(1e-3);
      expect(Math.abs(l.rMax.value - fo.rMax.value)).toBeLessThan(1e-3);
      expect(l.rMin.value).not.toBe(fo.rMin.value);
      expect(Math.abs(l.B / Bv(l.v) - 1)).toBeLessThan(1e-4);
      expect(l.intervalError).toBe((f.levels[i] as { intervalError: number }).intervalError);
    });
    expect(r.warnings.map((w) => w.code)).toEqual([]);
  });

  it('refine: false keeps the check only; verify: false drops both (refine follows verify by default)', () => {
    const checkOnly = curves({ refine: false });
    expect(checkOnly.verification).toBeDefined();
    expect(checkOnly.refined).toBeUndefined();
    const none = curves({ verify: false });
    expect(none.verification).toBeUndefined();
    expect(none.refined).toBeUndefined();
    const refineWithoutCheck = curves({ verify: false, refine: true });
    expect(refineWithoutCheck.refined).toBeUndefined();
    expect(refineWithoutCheck.warnings.map((w) => w.code)).toEqual([]);
  });

  it('vTop steps down by halves from vMax + 3 until G(v) is increasing up to it (ω_e x_e = 100: dG/dv = 0 at v = 9.5)', () => {
    // dG/dv = 2000 − 200x vanishes at x = 10 (v = 9.5): vTop = 11, 10.5, 10, 9.5 are refused, 9 is the first kept.
    const steep = BASE.map((c) => (c.k === 2 && c.l === 0 ? { ...c, value: -100 } : c));
    const r = curves({ coefficients: steep, vMax: 8, vData: 8, refine: false });
    expect(r.verification?.vTop).toBe(9);
    expect(r.verification?.levels.length).toBe(9);
  });

  it('a curve that is not single-valued: no check, no refinement, and the warning says why', () => {
    // B(v) = 2 + 3x keeps G(v) increasing and B(v) positive but makes the turning points cross by v = 1.
    const crossing = BASE.map((c) => (c.k === 1 && c.l === 1 ? { ...c, value: 3 } : c));
    const r = curves({ coefficients: crossing, vMax: 2, vData: 2 });
    expect(r.verification).toBeUndefined();
    expect(r.refined).toBeUndefined();
    expect(r.warnings).toContainEqual({
      code: 'POTENTIAL_NOT_VERIFIED',
      message: 'the RKR curve is not single-valued on each side of the minimum; the Numerov check was skipped',
    });
    expect(r.warnings.filter((w) => w.code === 'POTENTIAL_NOT_REFINED')).toEqual([]);
  });
});

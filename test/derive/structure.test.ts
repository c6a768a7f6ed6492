import { describe, expect, it } from 'vitest';
import { crossChecks, type DunhamSet, equilibriumFromDunham } from '../../src/derive/equilibrium.js';
import { propagate, subCovariance } from '../../src/derive/quantity.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';

// Fast checks of what src/derive reports and leaves out, written against the mutants that survived the first
// mutation run (test/MUTANTS.md). Values: Huber & Herzberg H35Cl constants (from memory + secondary copy), with
// hand-derived expectations (DER) stated beside each.
const MU = reducedMass(parseSpecies('1H-35Cl'));
const set = (keys: string[], values: number[], variances?: number[]): DunhamSet => {
  const p = keys.length;
  const cov = new Array<number>(p * p).fill(0);
  (variances ?? []).forEach((v, i) => {
    cov[i * p + i] = v;
  });
  return { keys, values, covariance: cov };
};

describe('equilibrium constants present only when their coefficients were fitted', () => {
  it('B_e and α_e without Y20: no ω_e, no ω_e x_e, no higher terms', () => {
    const eq = equilibriumFromDunham(set(['1,0', '0,1', '1,1'], [2886, 10.59, -0.307]), MU);
    expect(Object.keys(eq).sort()).toEqual(['B_e', 'alpha_e', 'r_e']);
  });

  it('ω_e and ω_e x_e without Y11: no B_e, no α_e, no r_e', () => {
    const eq = equilibriumFromDunham(set(['1,0', '2,0', '0,1'], [2990, -52.8, 10.59]), MU);
    expect(Object.keys(eq).sort()).toEqual(['omega_e', 'omega_e_x_e']);
  });

  it('a non-positive B_e has no bond length (and no r_e key)', () => {
    const eq = equilibriumFromDunham(set(['0,1', '1,1'], [-1, -0.3]), MU);
    expect(Object.keys(eq).sort()).toEqual(['B_e', 'alpha_e']);
  });

  it('every constant is in cm-1 with the σ of its diagonal covariance element; r_e in angstrom', () => {
    const eq = equilibriumFromDunham(
      set(['1,0', '2,0', '0,1', '1,1', '0,2'], [2990, -52.8, 10.59, -0.307, -5.3e-4], [4e-4, 1e-4, 1e-8, 4e-10, 1e-14]),
      MU,
    );
    expect(eq.omega_e).toEqual({ value: 2990, uncertainty: 0.02, unit: 'cm-1' });
    expect(eq.D_e).toEqual({ value: 5.3e-4, uncertainty: 1e-7, unit: 'cm-1' });
    expect(eq.B_e?.unit).toBe('cm-1');
    expect(eq.r_e?.unit).toBe('angstrom');
  });
});

describe('cross-checks: which, with what, and never a number that is not one', () => {
  // Computed inside each test (not when the file is collected), so that mutation testing sees the code run.
  const full = () =>
    set(['1,0', '2,0', '3,0', '0,1', '1,1', '0,2'], [2990.9463, -52.8186, 0.2243, 10.593416, -0.307181, -5.3194e-4]);
  const eqOf = () => equilibriumFromDunham(full(), MU);
  const checksOf = () => crossChecks(full(), eqOf(), MU);

  it('lists Kratzer, Pekeris, Morse well depth, D_0 and a, each an approximation with a formula and a unit', () => {
    const checks = checksOf();
    expect(checks.map((c) => c.id)).toEqual([
      'kratzer-D_e',
      'pekeris-alpha_e',
      'morse-well-depth',
      'morse-D_0',
      'morse-a',
    ]);
    for (const c of checks) {
      expect(c.approximation).toBe(true);
      expect(c.description.length, c.id).toBeGreaterThan(10);
      expect(c.formula, c.id).toMatch(/[≈=]/);
    }
    expect(checks.map((c) => c.value.unit)).toEqual(['cm-1', 'cm-1', 'cm-1', 'cm-1', 'angstrom-1']);
  });

  it('Kratzer and Pekeris carry the fitted D_e and α_e beside them', () => {
    const checks = checksOf();
    const eqFull = eqOf();
    expect(checks[0]?.fitted).toEqual(eqFull.D_e);
    expect(checks[1]?.fitted).toEqual(eqFull.alpha_e);
    const noD = set(['1,0', '2,0', '0,1', '1,1'], [2990.9463, -52.8186, 10.593416, -0.307181]);
    expect(crossChecks(noD, equilibriumFromDunham(noD, MU), MU)[0]?.fitted).toBeUndefined();
  });

  it('D_0 = ω_e²/(4ω_e x_e) − (ω_e/2 − ω_e x_e/4 + ω_e y_e/8), with ω_e y_e when fitted (DER), to 1e-9 relative', () => {
    const we = 2990.9463;
    const wexe = 52.8186;
    const weye = 0.2243;
    const checks = checksOf();
    const d0 = checks.find((c) => c.id === 'morse-D_0')?.value.value as number;
    expect(Math.abs(d0 / ((we * we) / (4 * wexe) - (we / 2 - wexe / 4 + weye / 8)) - 1)).toBeLessThan(1e-9);
  });

  it('without Y20 there is neither ω_e nor any cross-check', () => {
    const s = set(['1,0', '0,1', '1,1'], [2886, 10.59, -0.307]);
    expect(crossChecks(s, equilibriumFromDunham(s, MU), MU)).toEqual([]);
  });

  it('a positive Y20 (no Morse well) drops Pekeris and every Morse relation instead of a negative depth', () => {
    const s = set(['1,0', '2,0', '0,1', '1,1'], [2990, 52.8, 10.59, -0.307]);
    const ids = crossChecks(s, equilibriumFromDunham(s, MU), MU).map((c) => c.id);
    expect(ids).toEqual(['kratzer-D_e']);
  });

  it('a check whose uncertainty is not a number is dropped', () => {
    // NaN variance of Y01: Kratzer and Pekeris (which use B_e) have finite values but NaN uncertainties.
    const s = set(['1,0', '2,0', '0,1', '1,1'], [2990, -52.8, 10.59, -0.307], [0, 0, Number.NaN, 0]);
    const ids = crossChecks(s, equilibriumFromDunham(s, MU), MU).map((c) => c.id);
    expect(ids).toEqual(['morse-well-depth', 'morse-D_0', 'morse-a']);
  });
});

describe('first-order propagation: step sizes that keep their precision', () => {
  it('uses a step proportional to σ: f = x + 10⁶ at x = 0 with σ = 0.01 gives σ_f = 0.01 (1e-4 relative)', () => {
    // A step of 1e-12 would vanish against 10⁶ in double precision and give σ_f = 0.
    expect(Math.abs(propagate((x) => (x[0] as number) + 1e6, [0], [1e-4]) / 0.01 - 1)).toBeLessThan(1e-4);
  });

  it('an exactly known input at zero does not turn the result into NaN', () => {
    const s = propagate((x) => (x[0] as number) * 3 + (x[1] as number) * 2, [0, 1], [0, 0, 0, 1e-4]);
    expect(Math.abs(s / 0.02 - 1)).toBeLessThan(1e-9);
  });

  it('subCovariance picks rows and columns in the order asked', () => {
    const cov = [1, 2, 3, 4, 5, 6, 7, 8, 9];
    expect(Array.from(subCovariance(cov, 3, [2, 0]))).toEqual([9, 7, 3, 1]);
  });
});

import { describe, expect, it } from 'vitest';
import { type FitResult, fitLineList, type LineInput } from '../../../src/fit/fit-lines.js';
import { parseSpecies } from '../../../src/species/parse.js';
import { reducedMass } from '../../../src/species/reduced-mass.js';
import { CO_12_16, independentLines } from '../../helpers/independent-lines.js';

// The rule of fit-lines.ts (MIN_DOF_TO_SCALE_DOWN = 10) on single CO 1-0 lists of the independent generator (its own
// term values of Huber & Herzberg's constants with H_e): a-posteriori mode, every σ stated, 0 < ν < 10 and
// χ²/ν < 1 keep the stated σ as absolute; at ν = 10 the scale goes both ways. Checked by properties of weighted least
// squares that do not depend on the code: stated σ taken as absolute make σ(B) grow with them, the a-posteriori
// scale makes σ(B) independent of a common factor on them, and a kept fit is the fit in absolute mode. Fast: one or two fits of 11–13 lines per
// test, computed inside `it` (the 200-trial pulls are in test/fit/few-dof-scale.test.ts).

const SPECIES = '12C-16O';
const masses = new Map([[SPECIES, reducedMass(parseSpecies(SPECIES))]]);

/** P(1…jMax), R(0…jMax) of CO 1-0, noise σ = 0.002 cm⁻¹ (seed 7001), stated σ = factor × 0.002. */
const list = (jMax: number, factor: number): LineInput[] =>
  independentLines({
    molecule: CO_12_16,
    bands: [{ upper: 1, lower: 0, jMax }],
    sigma: 0.002,
    reportedSigmaFactor: factor,
    seed: 7001,
  }).lines as LineInput[];
const fitList = (lines: LineInput[], mode: 'a-posteriori' | 'absolute' = 'a-posteriori') =>
  fitLineList(lines, masses, { levelsOnly: true, uncertaintyMode: mode });
const sigmaB0 = (r: FitResult): number => {
  const b = r.levels.find((l) => l.v === 0)?.B;
  if (!b) throw new Error('no B_0');
  return b.uncertainty;
};
const modeChange = (r: FitResult) => r.warnings.filter((w) => w.code === 'UNCERTAINTY_MODE_CHANGED');

describe('few degrees of freedom: stated σ kept, not scaled down', () => {
  it('ν = 8 (11 lines), σ stated 3× too large: taken as absolute, σ(B₀) follows the stated σ (×10 → ×9 to ×10)', () => {
    const r3 = fitList(list(5, 3));
    expect(r3.statistics.degreesOfFreedom).toBe(8);
    expect(r3.statistics.uncertaintyMode).toBe('absolute');
    const rc = r3.statistics.reducedChiSquare as number;
    // σ 3× too large: χ²/ν about 1/9 (a χ² on 8 degrees of freedom / 8 / 9).
    expect(rc).toBeGreaterThan(0.01);
    expect(rc).toBeLessThan(1);
    expect(modeChange(r3).map((w) => w.message)).toEqual([
      `χ²/ν = ${rc.toFixed(2)} on 8 degree(s) of freedom: too few to show that the stated line uncertainties are too large, so they are taken as absolute instead of being scaled down by √(χ²/ν) = ${Math.sqrt(rc).toPrecision(2)}`,
    ]);
    // The stated σ were kept on purpose: no advice to scale a posteriori beside it (CHI_SQUARE_LOW is for σ the
    // caller asked to be taken as absolute).
    expect(r3.warnings.map((w) => w.code)).not.toContain('CHI_SQUARE_LOW');
    const r30 = fitList(list(5, 30));
    expect(r30.statistics.uncertaintyMode).toBe('absolute');
    // Not scaled down: ten times the stated σ give about ten times σ(B₀) (a little less, 9.55 here: the priors on
    // the centrifugal terms the lines cannot determine carry σ of their own); scaled a posteriori it would be 1×.
    expect(sigmaB0(r30) / sigmaB0(r3)).toBeGreaterThan(9);
    expect(sigmaB0(r30) / sigmaB0(r3)).toBeLessThanOrEqual(10);
    // χ²/ν below 0.01 is written in exponent form.
    const rc30 = r30.statistics.reducedChiSquare as number;
    expect(rc30).toBeLessThan(0.01);
    expect(modeChange(r30)[0]?.message).toMatch(
      new RegExp(`^χ²/ν = ${rc30.toExponential(1).replace('+', '\\+')} on 8 degree\\(s\\) of freedom: too few`),
    );
  });

  it('ν = 10 (13 lines): scaled a posteriori both ways, so σ(B₀) does not depend on a common factor (1e-9)', () => {
    const r3 = fitList(list(6, 3));
    const r30 = fitList(list(6, 30));
    expect(r3.statistics.degreesOfFreedom).toBe(10);
    expect(r3.statistics.uncertaintyMode).toBe('a-posteriori');
    expect(r30.statistics.uncertaintyMode).toBe('a-posteriori');
    expect(modeChange(r3)).toEqual([]);
    expect(sigmaB0(r30) / sigmaB0(r3)).toBeCloseTo(1, 9);
  });

  it('one line without σ: the rule needs every σ stated, so nothing is kept as absolute', () => {
    const lines = list(5, 3).map((l, i) => (i === 4 ? { position: l.position, assignment: l.assignment } : l));
    const r = fitList(lines);
    expect(r.statistics.uncertaintyMode).toBe('a-posteriori');
    expect(modeChange(r)).toEqual([]);
  });

  it('absolute mode asked for: no change of mode to report, σ(B₀) as stated (the same as the kept a-posteriori fit)', () => {
    const abs = fitList(list(5, 3), 'absolute');
    expect(abs.statistics.uncertaintyMode).toBe('absolute');
    expect(modeChange(abs)).toEqual([]);
    // χ²/ν ≈ 0.066 on 8 degrees of freedom, χ² ≈ 0.53: P(χ² ≤ 0.53) ≈ (x/2)⁴e^(−x/2)/4! ≈ 1.6e-4 (the first term of
    // the lower-tail series, by hand), below the 0.001 of CHI_SQUARE_LOW: σ asked to be absolute look overstated.
    expect(abs.warnings.map((w) => w.code)).toContain('CHI_SQUARE_LOW');
    expect(sigmaB0(abs) / sigmaB0(fitList(list(5, 3)))).toBeCloseTo(1, 9);
  });

  it('ν = 8, σ stated 3× too small (χ²/ν ≈ 9 > 1): scaled up a posteriori, nothing kept', () => {
    const r = fitList(list(5, 1 / 3));
    expect(r.statistics.degreesOfFreedom).toBe(8);
    expect(r.statistics.reducedChiSquare as number).toBeGreaterThan(1);
    expect(r.statistics.uncertaintyMode).toBe('a-posteriori');
    expect(modeChange(r)).toEqual([]);
  });
});

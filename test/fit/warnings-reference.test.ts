import { describe, expect, it } from 'vitest';
import type { SolvedModel } from '../../src/fit/engine.js';
import type { Warning } from '../../src/fit/types.js';
import { absoluteScaleWarnings, checkRepeats, qualityWarnings } from '../../src/fit/warnings.js';
import type { Observation } from '../../src/models/linear-model.js';

// The warnings about a fit as a whole at their stated levels: P(χ²) < 0.001 for repeated lines and for χ² in
// absolute mode (SciPy 1.17.1 scipy.stats.chi2: the 0.001 points are 10.828 on 1 degree of freedom, 102.17 (upper)
// and 33.18 (lower) on 62), ν < 3, κ > 1e10, |ρ| > 0.999. Fits are stand-ins carrying only what the checks read.

function line(index: number, position: number, sigma: number, branch: 'P' | 'R' = 'R', j = 3): Observation {
  return {
    index,
    species: '12C-16O',
    upperV: 1,
    lowerV: 0,
    upperJ: branch === 'R' ? j + 1 : j - 1,
    lowerJ: j,
    position,
    weight: 1 / sigma ** 2,
  };
}
const fitOf = (o: Partial<SolvedModel>) =>
  ({ observations: [], chiSquare: 0, degreesOfFreedom: 10, conditionNumber: 10, ...o }) as unknown as SolvedModel;

describe('repeated measurements', () => {
  it('two of R(3) at ±√(10.9/2) σ: χ² = 10.9 on 1 degree of freedom, p = 0.00096 < 0.001, flagged with both lines', () => {
    const d = Math.sqrt(10.9 / 2) * 0.01;
    const obs = [line(4, 2158.3 + d, 0.01), line(0, 2150.9, 0.01, 'R', 1), line(9, 2158.3 - d, 0.01)];
    const w: Warning[] = [];
    checkRepeats(fitOf({ observations: obs }), true, w);
    expect(w.length).toBe(1);
    expect(w[0]?.code).toBe('REPEATS_DISAGREE');
    expect(w[0]?.lines).toEqual([4, 9]);
    expect(w[0]?.message).toBe(
      '2 measurements of 12C-16O 1-0 R(3) disagree beyond their uncertainties (χ² = 10.9 on 1 degrees of freedom)',
    );
  });

  it('χ² = 10.7 (p = 0.00107) is not flagged; nor is a single line', () => {
    const d = Math.sqrt(10.7 / 2) * 0.01;
    const w: Warning[] = [];
    checkRepeats(fitOf({ observations: [line(0, 2158.3 + d, 0.01), line(1, 2158.3 - d, 0.01)] }), true, w);
    checkRepeats(fitOf({ observations: [line(0, 2158.3 + 1, 0.01)] }), true, w);
    expect(w).toEqual([]);
  });

  it('without given σ the spread is judged against the fit scatter s² = χ²/ν; P lines are labelled P', () => {
    // Raw χ² of the pair 21.8: against s² = 2 it is 10.9 (flagged), against s² = 3 it is 7.3 (not).
    const d = Math.sqrt(21.8 / 2);
    const obs = [line(0, 2135.5 + d, 1, 'P', 2), line(1, 2135.5 - d, 1, 'P', 2)];
    const flagged: Warning[] = [];
    checkRepeats(fitOf({ observations: obs, chiSquare: 20, degreesOfFreedom: 10 }), false, flagged);
    expect(flagged.map((x) => x.message)).toEqual([
      '2 measurements of 12C-16O 1-0 P(2) disagree beyond their uncertainties (χ² = 10.9 on 1 degrees of freedom)',
    ]);
    const calm: Warning[] = [];
    checkRepeats(fitOf({ observations: obs, chiSquare: 30, degreesOfFreedom: 10 }), false, calm);
    expect(calm).toEqual([]);
    // Given σ, or no degrees of freedom left: the σ are taken as they are (χ² = 21.8).
    const given: Warning[] = [];
    checkRepeats(fitOf({ observations: obs, chiSquare: 30, degreesOfFreedom: 0 }), false, given);
    expect(given[0]?.message).toContain('(χ² = 21.8 on 1 degrees of freedom)');
  });

  it('lines of different species, bands or J are not repeats of each other', () => {
    const a = line(0, 2158.3, 0.001);
    const w: Warning[] = [];
    checkRepeats(
      fitOf({
        observations: [
          a,
          { ...a, index: 1, species: '13C-16O', position: 2160 },
          { ...a, index: 2, upperV: 2, position: 2170 },
          { ...a, index: 3, lowerV: 1, position: 2180 },
          { ...a, index: 4, upperJ: 5, position: 2190 },
          { ...a, index: 5, lowerJ: 2, position: 2200 },
        ],
      }),
      true,
      w,
    );
    expect(w).toEqual([]);
  });
});

describe('quality of the fit as a whole', () => {
  it('ν = 2 is few degrees of freedom, ν = 3 is not', () => {
    const w: Warning[] = [];
    qualityWarnings(fitOf({ degreesOfFreedom: 2 }), [], [], w);
    qualityWarnings(fitOf({ degreesOfFreedom: 3 }), [], [], w);
    expect(w.map((x) => x.code)).toEqual(['FEW_DEGREES_OF_FREEDOM']);
    expect(w[0]?.message).toMatch(/^only 2 degree\(s\) of freedom/);
  });

  it('κ = 2e10 is ill-conditioned, κ = 1e10 is not', () => {
    const w: Warning[] = [];
    qualityWarnings(fitOf({ conditionNumber: 2e10 }), [], [], w);
    qualityWarnings(fitOf({ conditionNumber: 1e10 }), [], [], w);
    expect(w).toEqual([{ code: 'ILL_CONDITIONED', message: 'the scaled design has condition number 2.00e+10' }]);
  });

  it('|ρ| above 0.999 (either sign) is named once per pair; 0.999 itself is not', () => {
    const corr = [
      [1, 0.9995, 0.999, -0.99991],
      [0.9995, 1, 0.2, 0],
      [0.999, 0.2, 1, 0],
      [-0.99991, 0, 0, 1],
    ];
    const w: Warning[] = [];
    qualityWarnings(fitOf({}), corr, ['B_0', 'B_1', 'D_0', 'T_1-T_0'], w);
    expect(w.map((x) => x.code)).toEqual(['STRONG_CORRELATION', 'STRONG_CORRELATION']);
    expect(w[0]?.message).toMatch(/^B_0 and B_1 are correlated with ρ = 0\.99950/);
    expect(w[1]?.message).toMatch(/^B_0 and T_1-T_0 are correlated with ρ = -0\.99991/);
  });
});

describe('χ² in absolute mode', () => {
  it('χ²/ν = 3.5 on 62 (p = 4.5e-19) is too high; 217 and 100 are judged by the upper 0.001 point 102.17', () => {
    const w: Warning[] = [];
    absoluteScaleWarnings(fitOf({ chiSquare: 217, degreesOfFreedom: 62 }), 'absolute', w);
    expect(w.map((x) => x.code)).toEqual(['CHI_SQUARE_HIGH']);
    expect(w[0]?.message).toContain('χ²/ν = 3.50 on 62 degrees of freedom (p = 4.5e-19)');
    expect(w[0]?.message).toContain('√(χ²/ν) = 1.87');
    const none: Warning[] = [];
    absoluteScaleWarnings(fitOf({ chiSquare: 100, degreesOfFreedom: 62 }), 'absolute', none);
    absoluteScaleWarnings(fitOf({ chiSquare: 103, degreesOfFreedom: 62 }), 'a-posteriori', none);
    absoluteScaleWarnings(fitOf({ chiSquare: 5, degreesOfFreedom: 0 }), 'absolute', none);
    expect(none).toEqual([]);
    absoluteScaleWarnings(fitOf({ chiSquare: 103, degreesOfFreedom: 62 }), 'absolute', none);
    expect(none.map((x) => x.code)).toEqual(['CHI_SQUARE_HIGH']);
  });

  it('χ² = 30 on 62 (P(χ² ≤ 30) = 2.0e-4) is too low; 36 (0.0033) is not', () => {
    const w: Warning[] = [];
    absoluteScaleWarnings(fitOf({ chiSquare: 30, degreesOfFreedom: 62 }), 'absolute', w);
    absoluteScaleWarnings(fitOf({ chiSquare: 36, degreesOfFreedom: 62 }), 'absolute', w);
    expect(w.map((x) => x.code)).toEqual(['CHI_SQUARE_LOW']);
    expect(w[0]?.message).toContain('χ²/ν = 0.48 on 62 degrees of freedom (p = 2.0e-4 for so small a value)');
    expect(w[0]?.message).toContain('look overstated, by about 1/√(χ²/ν) = 1.4, and the reported uncertainties');
  });

  it('χ² = 0.5 on 62: χ²/ν below 0.01 in exponent form, P(χ² ≤ 0.5) = 2.1e-53 (SciPy 1.17 chi2.cdf), factor 11', () => {
    const w: Warning[] = [];
    absoluteScaleWarnings(fitOf({ chiSquare: 0.5, degreesOfFreedom: 62 }), 'absolute', w);
    expect(w).toEqual([
      {
        code: 'CHI_SQUARE_LOW',
        message:
          'χ²/ν = 8.1e-3 on 62 degrees of freedom (p = 2.1e-53 for so small a value) with absolute uncertainties: the line uncertainties look overstated, by about 1/√(χ²/ν) = 11, and the reported uncertainties, which are not rescaled, are as large as the caller\'s σ make them (too large by about that factor if the model is complete); consider uncertaintyMode "a-posteriori"',
      },
    ]);
  });
});

import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import type { PeakInput } from '../../src/assign/assign-lines.js';
import { guardBandedStatus } from '../../src/qa/calibration.js';
import { runChecks } from '../../src/qa/checks.js';
import { parseSpecies } from '../../src/species/parse.js';
import { HCL_1_35, independentLines } from '../helpers/independent-lines.js';

// A stated uncertainty column far larger than the lines' scatter must not turn a calibration failure into a pass.
// Lines from the independent generator (H³⁵Cl, Huber & Herzberg constants with the higher terms, from memory).

describe('guard-banded decision when the offset is known less well than the limit', () => {
  it.each([
    // x, u, L → status, worked out from the rule: pass |x| ≤ L, or |x| ≤ 2.576u while u ≤ L; fail |x| > L + 2u.
    [0.06, 0.05, 0.05, 'pass'], // u = L: 0.06 ≤ 0.1288, not different from zero
    [0.06, 0.0501, 0.05, 'warn'], // u > L: inconclusive, no longer a pass
    [0.3, 0.165, 0.05, 'warn'], // six times the limit, inside L + 2u = 0.38
    [0.39, 0.165, 0.05, 'fail'],
    [0.04, 0.165, 0.05, 'pass'], // within the limit passes whatever u
  ] as const)('x = %f, u = %f, L = %f → %s', (x, u, limit, status) => {
    expect(guardBandedStatus(x, u, limit)).toBe(status);
  });
});

function shiftedHcl(shift: number, stated: number, jMax: number, seed: number): PeakInput[] {
  const { lines } = independentLines({
    molecule: HCL_1_35,
    bands: [{ upper: 1, lower: 0, jMax }],
    sigma: 0.003,
    seed,
    withUncertainties: false,
    unassigned: true,
    temperature: 296,
  });
  return (lines as PeakInput[]).map((l) => ({ ...l, position: l.position + shift, uncertainty: stated }));
}

describe('an offset of 0.30 cm⁻¹ (six times the 0.05 default) with σ stated 0.5 for a scatter of 0.003', () => {
  it('21 lines (ν ≥ 10): the fit’s scale shrinks the stated σ, the offset is measured to ~0.001 and fails', () => {
    const peaks = shiftedHcl(0.3, 0.5, 10, 11);
    const r = runChecks(peaks, parseSpecies('1H-35Cl'), analyseLineList(peaks, parseSpecies('1H-35Cl')));
    const cal = r.checks.find((c) => c.id === 'calibration');
    const offset = cal?.measured.offset as { value: number; uncertainty: number };
    // 0.003/√21 ≈ 7e-4 from the scatter, plus the library's carried terms and its own σ (30 units in the last digit
    // of each constant, src/qa/library-uncertainty.ts: the HCl 1-0 origin ± 0.019, measured): below 0.03, still far
    // inside the 0.30 shift, which fails; the shift within 4σ + 0.005 (the library's own origin error).
    expect(offset.uncertainty).toBeLessThan(0.03);
    expect(Math.abs(offset.value - 0.3)).toBeLessThan(4 * offset.uncertainty + 0.005);
    expect(cal?.status).toBe('fail');
    expect(r.verdict).toBe('fail');
  });

  it('5 lines (ν < 10, the stated σ kept): the offset is not determined to the limit, so it warns as inconclusive', () => {
    const peaks = shiftedHcl(0.3, 0.5, 2, 12);
    expect(peaks.length).toBe(5);
    const iso = parseSpecies('1H-35Cl');
    const analysis = analyseLineList(peaks, iso);
    const r = runChecks(peaks, iso, analysis);
    const cal = r.checks.find((c) => c.id === 'calibration');
    const offset = cal?.measured.offset as { value: number; uncertainty: number };
    expect(offset.uncertainty).toBeGreaterThan(0.05);
    expect(cal?.status).toBe('warn');
    expect(cal?.message).toContain('(inconclusive: the lines determine the offset only to ±');
    expect(cal?.message).toContain('more than the limit itself; check the stated uncertainties)');
  });
});

import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import type { PeakInput } from '../../src/assign/assign-lines.js';
import { guardBandedStatus } from '../../src/qa/calibration.js';
import { runChecks } from '../../src/qa/checks.js';
import { parseSpecies } from '../../src/species/parse.js';
import {
  type BandRequest,
  CO_12_16,
  HCL_1_35,
  independentLines,
  type MoleculeConstants,
} from '../helpers/independent-lines.js';

/**
 * QA verdicts on clean peak lists without uncertainties (positions and intensities only, no assignments), generated
 * from full published constant sets by the independent generator. Goal (issue 11): ≥ 95 % pass; here at least
 * 29 of 30 per molecule. The library lacks γ_e, β_e, H_e, ω_e z_e, so its predicted positions are off by up to
 * 0.5 cm⁻¹ (HCl R(11)): the calibration must carry that, not call it an instrument offset.
 * Measured once over 200 lists each (seeds 20001–20200, same generator and settings, 2026-12-02): CO 200 of 200
 * pass; H³⁵Cl 198 of 200 pass, 1 warns, 1 fails (99 %). Kept at 30 here for the suite's time.
 */
function verdicts(molecule: MoleculeConstants, bands: BandRequest[], sigma: number, trials: number) {
  const iso = parseSpecies(molecule.formula);
  const out: string[] = [];
  let last: ReturnType<typeof runChecks> | undefined;
  for (let seed = 1; seed <= trials; seed++) {
    const { lines } = independentLines({
      molecule,
      bands,
      sigma,
      seed,
      withUncertainties: false,
      unassigned: true,
      temperature: 296,
    });
    const peaks = lines as PeakInput[];
    last = runChecks(peaks, iso, analyseLineList(peaks, iso));
    out.push(last.verdict);
  }
  return { verdicts: out, last: last as ReturnType<typeof runChecks> };
}

describe('clean lists without uncertainties pass QA', () => {
  it('CO fundamental (σ = 0.002 cm-1, J″ ≤ 25): at least 29 of 30 pass; a scale is judged only when determined', () => {
    const { verdicts: v, last } = verdicts(CO_12_16, [{ upper: 1, lower: 0, jMax: 25 }], 0.002, 30);
    expect(v.filter((x) => x === 'pass').length).toBeGreaterThanOrEqual(29);
    const cal = last.checks.find((c) => c.id === 'calibration');
    const scale = cal?.measured.scale as { uncertainty: number } | undefined;
    if (scale) expect(scale.uncertainty).toBeLessThanOrEqual(20 / 3);
    else expect(cal?.measured.scaleUncertaintyIfFitted as number).toBeGreaterThan(20 / 3);
  });

  it('H³⁵Cl fundamental (σ = 0.003 cm-1, J″ ≤ 11): at least 29 of 30 pass, the library terms carried', () => {
    const { verdicts: v, last } = verdicts(HCL_1_35, [{ upper: 1, lower: 0, jMax: 11 }], 0.003, 30);
    expect(v.filter((x) => x === 'pass').length).toBeGreaterThanOrEqual(29);
    const cal = last.checks.find((c) => c.id === 'calibration');
    expect(cal?.measured.libraryTermsCarried).toContain('γ_e');
  });

  it('a 40 ppm scale error of a three-band CO scan (1-0, 2-0, 3-0) still fails', () => {
    const iso = parseSpecies(CO_12_16.formula);
    const { lines } = independentLines({
      molecule: CO_12_16,
      bands: [1, 2, 3].map((u) => ({ upper: u, lower: 0, jMax: 20 })),
      sigma: 0.002,
      seed: 4,
      withUncertainties: false,
      unassigned: true,
      temperature: 296,
    });
    const peaks = lines.map((l) => ({ ...l, position: l.position * (1 + 40e-6) })) as PeakInput[];
    const cal = runChecks(peaks, iso, analyseLineList(peaks, iso)).checks.find((c) => c.id === 'calibration');
    expect(cal?.status).toBe('fail');
  });
});

describe('guard-banded decision rule (JCGM 106:2012 style, guard band 2u)', () => {
  it('passes within the limit, warns beyond it by less than 2u, fails beyond it by more', () => {
    expect(guardBandedStatus(0.049, 0.1, 0.05)).toBe('pass');
    expect(guardBandedStatus(-0.06, 0.01, 0.05)).toBe('warn');
    expect(guardBandedStatus(0.0701, 0.01, 0.05)).toBe('fail');
    expect(guardBandedStatus(0.069, 0.01, 0.05)).toBe('warn');
  });
});

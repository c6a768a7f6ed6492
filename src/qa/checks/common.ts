/** What every QA check shares: the check and its status, the tolerance profile, the verdict of a report. */

import type { Analysis } from '../../assign/analyse.js';
import type { Isotopologue } from '../../species/parse.js';

export type CheckStatus = 'pass' | 'warn' | 'fail' | 'not-evaluated';
export type CheckId =
  | 'identity'
  | 'calibration'
  | 'unexplained-lines'
  | 'isotope-ratio'
  | 'temperature'
  | 'fit-quality';

export interface Check {
  readonly id: CheckId;
  readonly status: CheckStatus;
  readonly measured: Readonly<Record<string, unknown>>;
  readonly limit: Readonly<Record<string, unknown>>;
  readonly message: string;
}

/**
 * Tolerance profile of a QA check. The defaults are starting points, not standards: each lab sends its own.
 * Every default says where it comes from.
 */
export interface Tolerances {
  /** Fitted band origin against the reference, cm⁻¹. Default 0.5: reference constants of the library reproduce
   * measured origins to a few hundredths, and instrument offsets up to a few tenths are the calibration check's
   * business (common practice). Rule: warn beyond the limit, fail beyond three times it (the library's own origin
   * uncertainty, a few hundredths, is far inside the limit, so no separate guard band). */
  readonly identityOrigin: number;
  /** Fitted B″ against the reference, relative. Default 1e-3: B from Huber & Herzberg is good to 1e-5, and a scale
   * error of tens of ppm moves B by as much; a wrong molecule is off by far more (common practice). Rule: as for
   * identityOrigin (warn beyond, fail beyond three times). */
  readonly identityB: number;
  /** |offset| at the band centre, cm⁻¹. Default 0.05, a typical FTIR wavenumber-accuracy figure at 0.5 cm⁻¹
   * resolution (common practice). Decision rule (guard band 2u, after JCGM 106:2012): pass |x| ≤ limit or |x| ≤
   * 2.576u (not different from zero at the stated false-alarm rate of 1 %); warn when beyond the limit by less than
   * 2u; fail when beyond it by more. u includes the library's prediction uncertainty. */
  readonly calibrationOffset: number;
  /** |scale error|, ppm. Default 20 (common practice for FTIR and laser wavemeters). Judged only when the lines
   * determine the scale to a third of this limit (one band alone rarely does: the scale is then nearly degenerate
   * with the offset); same guard-banded rule as the offset. */
  readonly calibrationScalePpm: number;
  /** Share of intensity (or of lines, without intensities) no band explains: fail above this, warn above half of
   * it. Default 0.05 (common practice: a few per cent of noise peaks is normal in a peak list). A count, not an
   * estimate: no guard band. */
  readonly unexplainedFraction: number;
  /** |measured/natural − 1| of minor-isotopologue intensity ratios: warn above. Default 0.15 (natural variation is
   * a few per cent; line intensities of a peak list are rarely better than 5–10 %, common practice). Never fails
   * (an enriched sample is not a faulty one). */
  readonly isotopeRatio: number;
  /** Expected rotational temperature and its tolerance, K. Default none: the temperature is reported only. Rule:
   * the guard-banded one of the calibration (pass within the tolerance or when the deviation is within 2.576u,
   * warn beyond it by less than 2u, fail beyond it by more), u the Boltzmann-plot uncertainty. */
  readonly temperature?: { readonly expected: number; readonly tolerance: number };
  /** Largest reduced χ² when line uncertainties are given. Default 3 (common practice). Judged only when the
   * uncertainties were given (an estimated scatter makes χ²/ν ≈ 1 by construction); fail above. */
  readonly maxReducedChiSquare: number;
  /** Largest share of lines rejected as outliers. Default 0.05 (common practice). A count: fail above. */
  readonly maxRejectedFraction: number;
  /** Smallest share of the predicted strong lines (≥ 10 % of the strongest) that must be found. Default 0.9. A
   * count: warn below. */
  readonly minCompleteness: number;
}

export const DEFAULT_TOLERANCES: Tolerances = {
  identityOrigin: 0.5,
  identityB: 1e-3,
  calibrationOffset: 0.05,
  calibrationScalePpm: 20,
  unexplainedFraction: 0.05,
  isotopeRatio: 0.15,
  maxReducedChiSquare: 3,
  maxRejectedFraction: 0.05,
  minCompleteness: 0.9,
};

export interface CheckReport {
  readonly verdict: 'pass' | 'warn' | 'fail';
  readonly checks: readonly Check[];
}

export const RANK: Record<CheckStatus, number> = { 'not-evaluated': 0, pass: 1, warn: 2, fail: 3 };

export function verdictOf(checks: readonly Check[]): 'pass' | 'warn' | 'fail' {
  let worst: CheckStatus = 'pass';
  for (const c of checks) if (RANK[c.status] > RANK[worst]) worst = c.status;
  return worst === 'not-evaluated' ? 'pass' : worst;
}

/** A molecule key: elements, with the hydrogen isotope kept (DCl is not HCl). */
export function moleculeKey(iso: Isotopologue): string {
  return iso.atoms.map((a) => (a.element.symbol === 'H' ? `${a.isotope.massNumber}H` : a.element.symbol)).join('-');
}

export const notEvaluated = (id: CheckId, message: string): Check => ({
  id,
  status: 'not-evaluated',
  measured: {},
  limit: {},
  message,
});

/** The main species' band with an origin and the most lines. */
export function mainBand(analysis: Analysis, species: string | undefined) {
  return analysis.result.bands.filter((b) => b.species === species && b.origin).sort((a, b) => b.lines - a.lines)[0];
}

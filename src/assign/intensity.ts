import { SECOND_RADIATION_CM_K } from '../constants/codata-2018.js';
import type { Band, Branch } from '../models/transitions.js';

/**
 * Relative absorption intensity of a ¹Σ–¹Σ line (Bernath, Spectra of Atoms and Molecules, §6.5; SCIENCE.md §5):
 * I ∝ ν S exp(−c₂E″/T) (1 − exp(−c₂ν/T)), with Hönl–London factors S = J″+1 (R) and J″ (P). The partition
 * function is common to all lines of one species and cancels in relative intensities.
 */
export function honlLondon(branch: Branch, j: number): number {
  return branch === 'R' ? j + 1 : branch === 'P' ? j : 0;
}

export function relativeIntensity(
  nu: number,
  branch: Branch,
  j: number,
  lowerEnergy: number,
  temperature: number,
): number {
  const c2T = SECOND_RADIATION_CM_K / temperature;
  return nu * honlLondon(branch, j) * Math.exp(-c2T * lowerEnergy) * -Math.expm1(-c2T * nu);
}

/**
 * Rough relative strength of a band's transition moment, for ranking candidate lines only (never for results):
 * each further quantum of Δv costs about two orders of magnitude, and a Δv = 1 band from level v is about v+1
 * times the fundamental (harmonic-oscillator matrix elements). Common practice as an order-of-magnitude guide.
 */
export function bandStrengthGuess(band: Band): number {
  const dv = band.upper - band.lower;
  if (dv === 0) return 1;
  return 10 ** (-2 * (dv - 1)) * (dv === 1 ? band.lower + 1 : 1);
}

/**
 * Intensities that carry no information about which line is which, the one rule for every path that weighs lines by
 * intensity (diatomic and linear assignment, identification, QA checks): every line sent with one, and either
 *  - all equal (a placeholder such as 0, 1 or 100), or, over six lines or more, all within a factor 1.2 of each
 *    other; or
 *  - over ten lines or more, all but a few odd ones (at most one line in 50, at least one) so: one line marked 100
 *    in a list of 1s, or one 0 among 100s, is a placeholder list with a slip, not a Boltzmann envelope.
 * A band at any temperature this service assumes spans far more than that between its strong lines near the
 * envelope's maximum and its weak high-J lines, so such a spread says nothing an envelope could use, and weighing
 * by it misleads: one line at 100 among 1s carries half the intensity of a 100-line list. Returns why, or undefined
 * when the intensities may be used.
 */
export function uninformativeIntensities(peaks: readonly { intensity?: number }[]): string | undefined {
  const n = peaks.length;
  // Sorted as a typed array: numerically without a comparator (several times faster for a few hundred lines).
  const values = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = (peaks[i] as { intensity?: number }).intensity;
    if (x === undefined) return undefined;
    values[i] = x;
  }
  if (n < 2) return undefined;
  values.sort();
  const odd = n >= FLAT_WITH_ODD_MIN_LINES ? Math.max(1, Math.floor(n * FLAT_ODD_SHARE)) : 0;
  for (let skip = 0; skip <= odd; skip++) {
    // The n − skip consecutive values (in sorted order) with the smallest spread, `skip` odd lines left out.
    let best: { lo: number; hi: number } | undefined;
    for (let k = 0; k <= skip; k++) {
      const lo = values[k] as number;
      const hi = values[k + n - skip - 1] as number;
      if (!best || spread(lo, hi) < spread(best.lo, best.hi)) best = { lo, hi };
    }
    const { lo, hi } = best as { lo: number; hi: number };
    const but = skip === 0 ? '' : ` but ${skip}`;
    const all = skip === 0 ? 'every line carries' : `every line${but} carries`;
    if (hi === lo) return `${all} the same intensity (${hi})`;
    if (n - skip >= FLAT_MIN_LINES && lo > 0 && hi / lo <= FLAT_RATIO)
      return `all${but} of the ${n} intensities lie within a factor ${(hi / lo).toFixed(3)} of each other (≤ ${FLAT_RATIO}), far less than a band's Boltzmann envelope spans`;
  }
  return undefined;
}

/** Strongest over weakest of a run of intensities (infinite when the weakest is 0 and they differ). */
function spread(lo: number, hi: number): number {
  if (hi === lo) return 1;
  return lo > 0 ? hi / lo : Number.POSITIVE_INFINITY;
}

/** Below this spread (strongest over weakest) over at least FLAT_MIN_LINES lines, intensities are ignored. */
const FLAT_RATIO = 1.2;
const FLAT_MIN_LINES = 6;
/** Lists this long may carry odd lines (FLAT_ODD_SHARE of them, at least one) beside a flat rest. */
const FLAT_WITH_ODD_MIN_LINES = 10;
const FLAT_ODD_SHARE = 0.02;

/** The peaks without their intensities when these say nothing (uninformativeIntensities), and why. */
export function withoutUninformativeIntensities<T extends { intensity?: number }>(
  peaks: readonly T[],
): { peaks: readonly T[]; why?: string } {
  const why = uninformativeIntensities(peaks);
  if (!why) return { peaks };
  return { peaks: peaks.map(({ intensity: _i, ...p }) => p as T), why };
}

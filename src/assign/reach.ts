import { libraryUncertainties } from '../qa/library-uncertainty.js';
import { constantsFor } from '../species/library.js';
import { parseSpecies } from '../species/parse.js';
import { incompleteBeta } from '../stats/distributions.js';
import type { CandidateLine } from './candidates.js';

/**
 * A reference whose higher vibrational terms are missing or poor places an overtone's origin farther off than any
 * instrument's calibration. The library's H19F (ω_e, ω_e x_e, ω_e y_e; no ω_e z_e) gives the band origins 1-0
 * 3961.485, 2-0 7751.310, 3-0 11374.875 cm⁻¹; the real ones (HITRAN, from memory) are 3961.4229, 7750.7945,
 * 11372.7891: 0.06, 0.52 and 2.09 cm⁻¹ off, the last two beyond the ±0.5 cm⁻¹ offset window, so a list of 3-0
 * lines was refused and 2-0 lost most of its lines. A band that finds too few of its strong lines at the source's
 * offset and at its own within the window may search farther, as far as its reference origin is uncertain:
 * ORIGIN_SIGMAS × σ of the origin from the library's σ of Y_k0 (src/qa/library-uncertainty.ts), and never as far
 * as half the distance between two of its own strong lines (a shift that far would renumber them). CO's library
 * origins are known to 0.005 cm⁻¹ (σ of 3-0): no CO band ever searches beyond the window.
 */

/** How many σ of the reference origin a band's own offset may reach. */
export const ORIGIN_SIGMAS = 3;
/** The reach stays below this share of the smallest distance between two of the band's strong lines. */
const SPACING_SHARE = 0.45;

const SIGMAS = new Map<string, ReadonlyMap<string, number> | undefined>();

/** σ of the library's Y_k0 (cm⁻¹, "k,0" → σ) of a species, looked up once. */
function sigmasOf(formula: string): ReadonlyMap<string, number> | undefined {
  if (!SIGMAS.has(formula)) {
    const entry = constantsFor(parseSpecies(formula));
    SIGMAS.set(formula, entry ? libraryUncertainties(entry) : undefined);
  }
  return SIGMAS.get(formula);
}

/**
 * σ of the reference origin of band v′-v″ (cm⁻¹): Σ_k σ(Y_k0)² [(v′ + ½)^k − (v″ + ½)^k]², the terms taken as
 * independent; undefined for a species outside the library.
 */
export function originSigma(formula: string, upper: number, lower: number): number | undefined {
  const sigma = sigmasOf(formula);
  if (!sigma) return undefined;
  let s2 = 0;
  for (const [key, s] of sigma) {
    const [k, l] = key.split(',').map(Number) as [number, number];
    if (l !== 0) continue;
    s2 += (s * ((upper + 0.5) ** k - (lower + 0.5) ** k)) ** 2;
  }
  return Math.sqrt(s2);
}

/**
 * How far a band's own offset may be searched (cm⁻¹), given the strong lines it votes with: ORIGIN_SIGMAS × the
 * origin's σ, below SPACING_SHARE of the smallest distance between two of those lines; maxOffset when that is less.
 */
export function offsetReach(top: readonly CandidateLine[], maxOffset: number): number {
  const first = top[0];
  if (!first) return maxOffset;
  const sigma = originSigma(first.species, first.band.upper, first.band.lower);
  if (sigma === undefined) return maxOffset;
  const xs = top.map((c) => c.position).sort((a, b) => a - b);
  let gap = Number.POSITIVE_INFINITY;
  for (let i = 1; i < xs.length; i++) {
    const d = (xs[i] as number) - (xs[i - 1] as number);
    if (d > 0) gap = Math.min(gap, d);
  }
  if (!Number.isFinite(gap)) return maxOffset;
  return Math.max(maxOffset, Math.min(ORIGIN_SIGMAS * sigma, SPACING_SHARE * gap));
}

/**
 * A farther placement is kept only when chance would give as many matches with probability below this (the
 * Bonferroni bound overstates it). Held-out sweep, 240 seeds: 1e-3 left an H19F 2-0 + 3-0 list of two instruments
 * without its hot bands (3-1 at 4 of 9 lines: 0.004), 1e-2 kept them.
 */
export const FARTHER_CHANCE = 1e-2;

/**
 * The probability that chance alone puts `matches` or more of `lines` strong lines within `tolerance` of a peak at
 * some placement among `trials`: peaks at `density` per cm⁻¹ fall within ±tolerance of a line with p = 1 −
 * exp(−2 tolerance density), the count is binomial, P(X ≥ m) = I_p(m, n − m + 1), and any of the trials may win
 * (Bonferroni: the tail × trials, at most 1). A wider reach and a drift try more placements, so need more matches.
 */
export function chanceOfPlacement(
  matches: number,
  lines: number,
  tolerance: number,
  density: number,
  trials: number,
): number {
  if (matches <= 0) return 1;
  if (matches > lines) return 0;
  const p = -Math.expm1(-2 * tolerance * density);
  return Math.min(1, incompleteBeta(p, matches, lines - matches + 1) * Math.max(1, trials));
}

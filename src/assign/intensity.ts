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

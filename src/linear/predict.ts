import { ScienceError } from '../errors.js';
import type { Branch } from '../models/transitions.js';
import { honlLondonComponent } from './intensity.js';
import type { LinearSpecies } from './species.js';
import { termValue } from './terms.js';
import { bandTransitions } from './transitions.js';
import { bandLabel, type LinearLevel, type LinearLevelConstants, levelKey, type Parity } from './types.js';

/** Constants of one level, with the level they belong to. */
export interface LevelConstantsEntry {
  readonly level: LinearLevel;
  readonly constants: LinearLevelConstants;
}

export interface PredictedLinearLine {
  readonly upper: LinearLevel;
  readonly lower: LinearLevel;
  readonly band: string;
  readonly branch: Branch;
  readonly j: number;
  readonly upperJ: number;
  readonly lowerParity: Parity;
  readonly upperParity: Parity;
  /** cm⁻¹. */
  readonly position: number;
  /** E″ above the lowest level given (J = l of the lowest G), cm⁻¹, for Boltzmann factors. */
  readonly lowerEnergy: number;
  /** Hönl–London factor of the line (see honlLondon). */
  readonly honlLondon: number;
}

/**
 * Hönl–London factor of one line (one parity component), J = J″: intensity.ts#honlLondonComponent, the one
 * normalisation of this module family (3j symbols, the branches of one J″ summing to 2J″+1, half per component when
 * both levels have l ≥ 1). Nuclear-spin weights are not included.
 */
export function honlLondon(lowerL: number, upperL: number, branch: Branch, J: number): number {
  return honlLondonComponent(branch, lowerL, upperL, J);
}

/**
 * Line positions of the bands of a linear polyatomic from level constants: ν = F_v′(J′, p′) − F_v″(J″, p″) with the
 * term values and e/f convention of terms.ts, over every line the selection rules and spin statistics of
 * transitions.ts allow, J″ ≤ jMax. Throws INPUT_INVALID when a band's level has no constants. Sorted by position.
 */
export function predictLinearBands(
  species: LinearSpecies,
  levels: readonly LevelConstantsEntry[],
  bands: readonly { readonly upper: LinearLevel; readonly lower: LinearLevel }[],
  jMax: number,
): PredictedLinearLine[] {
  const byKey = new Map(levels.map((e) => [levelKey(e.level), e]));
  const zero = Math.min(...levels.map((e) => termValue(e.constants, e.level.l, e.level.l, 'e')));
  const out: PredictedLinearLine[] = [];
  for (const band of bands) {
    const up = byKey.get(levelKey(band.upper));
    const lo = byKey.get(levelKey(band.lower));
    for (const [name, entry, level] of [
      ['upper', up, band.upper],
      ['lower', lo, band.lower],
    ] as const) {
      if (!entry) {
        throw new ScienceError(
          'INPUT_INVALID',
          `band ${bandLabel(band.upper, band.lower)}: no constants for its ${name} level ${levelKey(level)}`,
          { level },
        );
      }
    }
    const cu = (up as LevelConstantsEntry).constants;
    const cl = (lo as LevelConstantsEntry).constants;
    const label = bandLabel(band.upper, band.lower);
    for (const t of bandTransitions(species, band.upper, band.lower, jMax)) {
      const el = termValue(cl, band.lower.l, t.j, t.lowerParity);
      const eu = termValue(cu, band.upper.l, t.upperJ, t.upperParity);
      out.push({
        upper: band.upper,
        lower: band.lower,
        band: label,
        branch: t.branch,
        j: t.j,
        upperJ: t.upperJ,
        lowerParity: t.lowerParity,
        upperParity: t.upperParity,
        position: eu - el,
        lowerEnergy: el - zero,
        honlLondon: honlLondon(band.lower.l, band.upper.l, t.branch, t.j),
      });
    }
  }
  return out.sort((a, b) => a.position - b.position);
}

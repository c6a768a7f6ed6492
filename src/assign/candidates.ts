import { SECOND_RADIATION_CM_K } from '../constants/codata-2018.js';
import { compileDunham } from '../models/dunham.js';
import { type Band, type Branch, upperJ } from '../models/transitions.js';
import { constantsFor, dunhamFromEntry } from '../species/library.js';
import { elementsOnly, type Isotopologue, isotopologueMixture, parseSpecies } from '../species/parse.js';
import { bandStrengthGuess, relativeIntensity } from './intensity.js';

/** A line the reference constants predict, with a rough relative intensity for ranking. */
export interface CandidateLine {
  readonly species: string;
  readonly band: Band;
  readonly branch: Branch;
  readonly j: number;
  readonly position: number;
  readonly lowerEnergy: number;
  /** Relative intensity across all candidates (abundance × band strength guess × Boltzmann × Hönl–London). */
  readonly intensity: number;
}

export interface CandidateOptions {
  /** Temperature of the gas in K, for Boltzmann weights of hot bands and high J. Default 296. */
  readonly temperature?: number;
  /** Lowest isotopologue abundance considered. Default 1e-3. */
  readonly minAbundance?: number;
  /** Lines weaker than this fraction of the strongest candidate in the window are not predicted. Default 1e-4. */
  readonly minRelativeIntensity?: number;
  /** Highest lower level of a hot band. Default 4. */
  readonly maxLowerV?: number;
  /** Highest Δv of an overtone. Default 4. */
  readonly maxDeltaV?: number;
  /** Highest J″ predicted. Default 80. */
  readonly maxJ?: number;
}

/**
 * The isotopologues a declared species stands for (every one above minAbundance): an atom named with its mass number
 * (or D) is fixed, a bare one is its natural mixture, so "H35Cl" is one isotopologue, "HCl" the natural mixture and
 * "DCl" 2H-35Cl with 2H-37Cl (it was 2H-35Cl alone, which left every 2H-37Cl line of a DCl sample unassigned).
 */
export function isotopologuesMeant(
  species: Isotopologue,
  minAbundance: number,
): { iso: Isotopologue; abundance: number }[] {
  if (species.atoms.every((a) => a.explicitIsotope)) return [{ iso: species, abundance: 1 }];
  return isotopologueMixture(species).filter((x) => x.abundance >= minAbundance);
}

/**
 * Every line of every plausible band (fundamental, overtones, hot bands weighted by the Boltzmann population of
 * their lower level) and isotopologue that falls in [lo, hi], predicted from the reference library.
 */
export function candidateLines(
  species: readonly { iso: Isotopologue; abundance: number }[],
  lo: number,
  hi: number,
  options: CandidateOptions = {},
): CandidateLine[] {
  const out: CandidateLine[] = [];
  for (const { iso, abundance } of species) {
    const entry = constantsFor(iso);
    if (entry) out.push(...isotopologueCandidates(iso.formula, dunhamFromEntry(entry), abundance, lo, hi, options));
  }
  let max = 0;
  for (const c of out) max = Math.max(max, c.intensity);
  const floor = (options.minRelativeIntensity ?? 1e-4) * max;
  return out
    .filter((c) => c.intensity >= floor && c.intensity > 0)
    .map((c) => ({ ...c, intensity: c.intensity / max }));
}

/** The lines of one isotopologue's plausible bands in [lo, hi], intensities not yet normalised. */
function isotopologueCandidates(
  formula: string,
  y: ReadonlyMap<string, number>,
  abundance: number,
  lo: number,
  hi: number,
  options: CandidateOptions,
): CandidateLine[] {
  const T = options.temperature ?? 296;
  const maxJ = options.maxJ ?? 80;
  const energy = compileDunham(y);
  const e00 = energy(0, 0);
  const rising = new Map<number, number>();
  const risingOf = (v: number) => {
    let r = rising.get(v);
    if (r === undefined) {
      r = risingUpTo(energy, v);
      rising.set(v, r);
    }
    return r;
  };
  const out: CandidateLine[] = [];
  for (let lower = 0; lower <= (options.maxLowerV ?? 4); lower++) {
    const population = Math.exp((-SECOND_RADIATION_CM_K / T) * (energy(lower, 0) - e00));
    if (population < 1e-6) break;
    for (let dv = 0; dv <= (options.maxDeltaV ?? 4); dv++) {
      const band = { upper: lower + dv, lower };
      const strength = bandStrengthGuess(band) * abundance;
      // Beyond the J where a level's energy polynomial stops rising, its predictions are artefacts of the
      // truncated expansion (hydrides reach it near J ≈ 100): no line is predicted past the first such J.
      const jTop = Math.min(maxJ, risingOf(lower), risingOf(lower + dv) - 1);
      // The band's lines as predictBand gives them (P then R; pure rotation R only), kept when in the window.
      for (const branch of band.upper === band.lower ? (['R'] as const) : (['P', 'R'] as const)) {
        for (let j = branch === 'P' ? 1 : 0; j <= jTop; j++) {
          const el = energy(band.lower, j);
          const position = energy(band.upper, upperJ({ branch, j })) - el;
          if (position < lo || position > hi) continue;
          const lowerEnergy = el - e00;
          const intensity = strength * relativeIntensity(position, branch, j, lowerEnergy, T);
          out.push({ species: formula, band, branch, j, position, lowerEnergy, intensity });
        }
      }
    }
  }
  return out;
}

/** The highest J up to which E(v, J) rises with J (at most 400). */
function risingUpTo(energy: (v: number, j: number) => number, v: number): number {
  let prev = energy(v, 0);
  for (let j = 1; j <= 400; j++) {
    const e = energy(v, j);
    if (!(e > prev)) return j - 1;
    prev = e;
  }
  return 400;
}

/** Natural abundance of every isotopologue of the molecule a formula belongs to, by normalised formula. */
export function naturalAbundances(formula: string): Map<string, number> {
  return new Map(isotopologuesMeant(elementsOnly(parseSpecies(formula)), 0).map((x) => [x.iso.formula, x.abundance]));
}

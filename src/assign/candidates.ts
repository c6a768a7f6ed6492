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
    if (!entry) continue;
    for (const c of isotopologueCandidates(iso.formula, dunhamFromEntry(entry), abundance, lo, hi, options))
      out.push(c);
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
  // Levels are tabulated to ⌊maxJ⌋ + 2 only: whether a level rises past ⌊maxJ⌋ + 1 is all jTop below needs to know.
  const top = maxJ < TABLE_J ? Math.max(0, Math.floor(maxJ)) + 1 : TABLE_J;
  const levels = levelEnergies(compileDunham(y), top);
  const e00 = levels.of(0)[0] as number;
  const out: CandidateLine[] = [];
  for (let lower = 0; lower <= (options.maxLowerV ?? 4); lower++) {
    const el = levels.of(lower);
    const population = Math.exp((-SECOND_RADIATION_CM_K / T) * ((el[0] as number) - e00));
    if (population < 1e-6) break;
    for (let dv = 0; dv <= (options.maxDeltaV ?? 4); dv++) {
      const band = { upper: lower + dv, lower };
      const strength = bandStrengthGuess(band) * abundance;
      // Beyond the J where a level's energy polynomial stops rising, its predictions are artefacts of the
      // truncated expansion (hydrides reach it near J ≈ 100): no line is predicted past the first such J.
      const jTop = Math.min(maxJ, levels.risingUpTo(lower), levels.risingUpTo(lower + dv) - 1);
      const eu = levels.of(band.upper);
      // The band's lines as predictBand gives them (P then R; pure rotation R only), kept when in the window.
      for (const branch of band.upper === band.lower ? (['R'] as const) : (['P', 'R'] as const)) {
        for (let j = branch === 'P' ? 1 : 0; j <= jTop; j++) {
          const position = (eu[upperJ({ branch, j })] as number) - (el[j] as number);
          if (position < lo || position > hi) continue;
          const lowerEnergy = (el[j] as number) - e00;
          const intensity = strength * relativeIntensity(position, branch, j, lowerEnergy, T);
          out.push({ species: formula, band, branch, j, position, lowerEnergy, intensity });
        }
      }
    }
  }
  return out;
}

/** Highest J whose energy is tabulated (and highest J up to which a level may be found rising). */
const TABLE_J = 400;

/**
 * The energies E(v, J), J = 0 … top + 1, of each level asked for (each evaluated once, where every band and branch
 * through the level would evaluate it again), and the highest J up to which E(v, J) rises with J (at most top).
 */
function levelEnergies(
  energy: (v: number, j: number) => number,
  top: number,
): {
  of: (v: number) => Float64Array;
  risingUpTo: (v: number) => number;
} {
  const tables = new Map<number, Float64Array>();
  const of = (v: number) => {
    let t = tables.get(v);
    if (!t) {
      t = new Float64Array(top + 2);
      for (let j = 0; j <= top + 1; j++) t[j] = energy(v, j);
      tables.set(v, t);
    }
    return t;
  };
  const rising = new Map<number, number>();
  const risingUpTo = (v: number) => {
    let r = rising.get(v);
    if (r === undefined) {
      const t = of(v);
      r = top;
      for (let j = 1; j <= top; j++) {
        if (!((t[j] as number) > (t[j - 1] as number))) {
          r = j - 1;
          break;
        }
      }
      rising.set(v, r);
    }
    return r;
  };
  return { of, risingUpTo };
}

/** Natural abundance of every isotopologue of the molecule a formula belongs to, by normalised formula. */
export function naturalAbundances(formula: string): Map<string, number> {
  return new Map(isotopologuesMeant(elementsOnly(parseSpecies(formula)), 0).map((x) => [x.iso.formula, x.abundance]));
}

import type { Analysis } from '../../assign/analyse.js';
import type { PeakInput } from '../../assign/assign-lines.js';
import { naturalAbundances } from '../../assign/candidates.js';
import { relativeIntensity } from '../../assign/intensity.js';
import { compileDunham } from '../../models/dunham.js';
import type { Branch } from '../../models/transitions.js';
import { constantsFor, dunhamFromEntry } from '../../species/library.js';
import { parseSpecies } from '../../species/parse.js';
import { plusMinus } from '../plus-minus.js';
import { type Check, type CheckStatus, notEvaluated, type Tolerances } from './common.js';

/** The isotope-ratio check: minor-isotopologue intensities against natural abundances. */

/** One isotopologue's line of a transition (band, branch, J″), with the intensity sent. */
interface TransitionLine {
  readonly species: string;
  readonly intensity: number;
  readonly position: number;
  readonly branch: Branch;
  readonly j: number;
  readonly band: string;
}

/** A minor isotopologue's intensity relative to the main one's, over its natural relative abundance. */
interface RatioToNatural {
  readonly species: string;
  readonly measured: number;
  readonly uncertainty: number;
  readonly pairs: number;
  readonly expected: number;
}

export function isotopeCheck(
  peaks: readonly PeakInput[],
  analysis: Analysis,
  T: number,
  tol: Tolerances,
  noIntensities: string,
): Check {
  const limit = { relative: tol.isotopeRatio };
  const species = analysis.assignment.species;
  if (species.length < 2) return notEvaluated('isotope-ratio', 'only one isotopologue was assigned against');
  if (!peaks.every((p) => p.intensity !== undefined)) return notEvaluated('isotope-ratio', noIntensities);
  const main = species[0] as string;
  const natural = naturalAbundances(main);
  const byTransition = fittedLinesByTransition(peaks, analysis);
  const ratios = species
    .slice(1)
    .map((minor) => ratioToNatural(main, minor, byTransition, natural, T))
    .filter((r): r is RatioToNatural => r !== undefined);
  if (ratios.length === 0)
    return notEvaluated('isotope-ratio', 'fewer than three transitions were assigned in both isotopologues');
  const worst = Math.max(...ratios.map((x) => Math.abs(x.measured - 1)));
  const status: CheckStatus = worst > tol.isotopeRatio ? 'warn' : 'pass';
  return {
    id: 'isotope-ratio',
    status,
    measured: {
      ratios: ratios.map((x) => ({
        species: x.species,
        relativeToNatural: { value: x.measured, uncertainty: x.uncertainty, unit: '1' },
        naturalAbundance: natural.get(x.species) ?? null,
        pairs: x.pairs,
        ...abundanceRatio(main, x, natural),
      })),
    },
    limit,
    message: ratios
      .map(
        (x) =>
          `${x.species}: ${describeAbundanceRatio(main, x, natural)}${plusMinus(x.measured, x.uncertainty, 3)} of the natural abundance ratio (${x.pairs} line pairs)`,
      )
      .join('; ')
      .concat(status === 'warn' ? ' — isotopic composition differs from natural (enriched or depleted sample?)' : ''),
  };
}

/** The fitted lines by transition ("band|branch|J″"), each isotopologue's line with the intensity sent. */
function fittedLinesByTransition(peaks: readonly PeakInput[], analysis: Analysis): Map<string, TransitionLine[]> {
  const byTransition = new Map<string, TransitionLine[]>();
  for (const l of analysis.result.lines) {
    const a = l.assignment;
    if (l.status !== 'fitted' || !a) continue;
    const key = `${a.band}|${a.branch}|${a.j}`;
    const list = byTransition.get(key) ?? [];
    list.push({
      species: a.species,
      intensity: peaks[l.index]?.intensity as number,
      position: l.position,
      branch: a.branch,
      j: a.j,
      band: a.band,
    });
    byTransition.set(key, list);
  }
  return byTransition;
}

/** Energy above (v = 0, J = 0) from the library's constants of an isotopologue. */
function libraryEnergy(species: string): (v: number, j: number) => number {
  const e = compileDunham(dunhamFromEntry(constantsFor(parseSpecies(species)) ?? (undefined as never)));
  return (v: number, j: number) => e(v, j) - e(0, 0);
}

/**
 * The minor isotopologue's intensity factor relative to natural: the geometric mean over the transitions assigned
 * in both of (I_minor/I_main) / (predicted minor/main at T, natural abundances), with σ = factor·sd(ln)/√pairs;
 * undefined with fewer than three pairs.
 */
function ratioToNatural(
  main: string,
  minor: string,
  byTransition: ReadonlyMap<string, readonly TransitionLine[]>,
  natural: ReadonlyMap<string, number>,
  T: number,
): RatioToNatural | undefined {
  const logs: number[] = [];
  const eMain = libraryEnergy(main);
  const eMinor = libraryEnergy(minor);
  for (const list of byTransition.values()) {
    const a = list.find((x) => x.species === main);
    const b = list.find((x) => x.species === minor);
    if (!a || !b || !(a.intensity > 0) || !(b.intensity > 0)) continue;
    const lo = Number(a.band.split('-')[1]);
    const predA = (natural.get(main) ?? 1) * relativeIntensity(a.position, a.branch, a.j, eMain(lo, a.j), T);
    const predB = (natural.get(minor) ?? 0) * relativeIntensity(b.position, b.branch, b.j, eMinor(lo, b.j), T);
    if (!(predA > 0 && predB > 0)) continue;
    logs.push(Math.log(b.intensity / a.intensity / (predB / predA)));
  }
  if (logs.length < 3) return undefined;
  const mean = logs.reduce((s, x) => s + x, 0) / logs.length;
  const sd = Math.sqrt(logs.reduce((s, x) => s + (x - mean) ** 2, 0) / (logs.length - 1));
  const factor = Math.exp(mean);
  return {
    species: minor,
    measured: factor,
    uncertainty: (factor * sd) / Math.sqrt(logs.length),
    pairs: logs.length,
    expected: 1,
  };
}

/**
 * The measured abundance ratio main/minor (as a mass spectrometrist quotes it, e.g. H³⁵Cl/H³⁷Cl ≈ 3.13 for natural
 * chlorine): the natural ratio divided by the measured minor-to-main factor relative to natural; its σ is that
 * factor's relative σ (the natural abundances' own uncertainty, ~1e-3 relative for Cl (CIAAW), is left out).
 */
function abundanceRatio(
  main: string,
  x: { species: string; measured: number; uncertainty: number },
  natural: ReadonlyMap<string, number>,
): { abundanceRatio?: { ratio: string; value: number; uncertainty: number; natural: number; unit: '1' } } {
  const a = natural.get(main);
  const b = natural.get(x.species);
  if (!(a && b && x.measured > 0)) return {};
  const value = a / b / x.measured;
  return {
    abundanceRatio: {
      ratio: `${main}/${x.species}`,
      value,
      uncertainty: (value * x.uncertainty) / x.measured,
      natural: a / b,
      unit: '1',
    },
  };
}

function describeAbundanceRatio(
  main: string,
  x: { species: string; measured: number; uncertainty: number },
  natural: ReadonlyMap<string, number>,
): string {
  const r = abundanceRatio(main, x, natural).abundanceRatio;
  if (!r) return '';
  const digits = r.value >= 100 ? 1 : 3;
  return `${r.ratio} = ${plusMinus(r.value, r.uncertainty, digits)} (natural ${r.natural.toFixed(digits)}), `;
}

import { floatsFrom } from '../linalg/small-arrays.js';
import type { Observation } from '../models/linear-model.js';
import { transitionLabel } from '../models/transitions.js';
import { plusMinus } from '../qa/plus-minus.js';
import { chiSquareCdf, chiSquareSurvival } from '../stats/distributions.js';
import { reducedChiSquare, type SolvedModel, type UncertaintyMode } from './engine.js';
import { estimateSourceOffsets, type SourceOffset, type SourceOffsets } from './source-offsets.js';
import type { Warning } from './types.js';

/* Stage 7: warnings about the fit as a whole (repeated lines that disagree, few degrees of freedom, conditioning,
 * strong correlations). */

/** Repeated measurements of one transition: weighted together, flagged when they disagree beyond their scatter. */
export function checkRepeats(fit: SolvedModel, uncertaintiesGiven: boolean, warnings: Warning[]): void {
  const groups = repeatGroups(fit.observations);
  // Against the caller's uncertainties when there are any; otherwise against the scatter of the whole fit.
  const s2 = uncertaintiesGiven || fit.degreesOfFreedom <= 0 ? 1 : Math.max(reducedChiSquare(fit) ?? 1, 1e-300);
  for (const g of groups) {
    if (g.length < 2) continue;
    let sw = 0;
    let swx = 0;
    for (const o of g) {
      sw += o.weight;
      swx += o.weight * o.position;
    }
    const m = swx / sw;
    let chi = 0;
    for (const o of g) chi += (o.weight * (o.position - m) ** 2) / s2;
    const pValue = chiSquareSurvival(chi, g.length - 1);
    if (pValue < 1e-3) {
      const o = g[0] as Observation;
      const label = transitionLabel({
        species: o.species,
        band: { upper: o.upperV, lower: o.lowerV },
        branch: o.upperJ > o.lowerJ ? 'R' : 'P',
        j: o.lowerJ,
      });
      warnings.push({
        code: 'REPEATS_DISAGREE',
        message: `${g.length} measurements of ${label} disagree beyond their uncertainties (χ² = ${chi.toFixed(1)} on ${g.length - 1} degrees of freedom)`,
        lines: g.map((x) => x.index),
      });
    }
  }
}

/**
 * Lines sent twice: the same transition at the same position (a duplicated row, which counts twice in the fit and
 * narrows every uncertainty), and the same transition claimed by lines at different positions of which the fit
 * rejected some (named as a double claim, not only as an outlier). Over every line read, kept or rejected.
 */
export function checkDuplicates(
  observations: readonly Observation[],
  rejected: ReadonlyMap<number, string>,
  warnings: Warning[],
): void {
  // The lines that repeat an earlier one, and the first few as "12 (= 3)" for the message.
  const copies: string[] = [];
  const copyLines: number[] = [];
  for (const g of repeatGroups(observations)) {
    if (g.length < 2) continue;
    const distinct = distinctLines(g, copies, copyLines);
    if (distinct.length > 1 && distinct.some((o) => rejected.has(o.index))) {
      const fmt = (o: Observation) =>
        `line ${o.index} at ${o.position.toFixed(4)} cm-1${rejected.has(o.index) ? ' (rejected)' : ''}`;
      warnings.push({
        code: 'TRANSITION_CLAIMED_TWICE',
        message: `${distinct.length} lines claim ${labelOf(g[0] as Observation)} at different positions: ${distinct.map(fmt).join(', ')}; check the assignment of the rejected one`,
        lines: distinct.map((o) => o.index),
      });
    }
  }
  if (copyLines.length > 0)
    warnings.push({
      code: 'LINES_DUPLICATED',
      message: `${copyLines.length} line(s) repeat an earlier line's assignment and position (a duplicated row?) and count twice in the fit: lines ${copies.slice(0, SHOWN_COPIES).join(', ')}${copyLines.length > SHOWN_COPIES ? ', …' : ''}`,
      lines: copyLines,
    });
}

/** Repeated lines named in the LINES_DUPLICATED message (all of them are in its `lines`). */
const SHOWN_COPIES = 10;

/**
 * The lines of one transition that do not repeat an earlier one's position (within 1e-9 of it, relative), in the
 * order met; each line that does is added to `copyLines`, and named as "12 (= 3)" in `copies` while fewer than
 * SHOWN_COPIES are. With the positions sorted, only lines in a run whose neighbouring gaps are all within 2e-9
 * (relative) can repeat one another (two lines within 1e-9 of each other are never split by a wider gap): a line
 * outside every run is distinct at once, and each run keeps its own sorted index.
 */
function distinctLines(g: readonly Observation[], copies: string[], copyLines: number[]): readonly Observation[] {
  const runs = closeRuns(floatsFrom(g, (o) => o.position).sort());
  if (runs.length === 0) return g;
  const perRun: (DistinctPositions | undefined)[] = [];
  const distinct: Observation[] = [];
  for (let r = 0; r < g.length; r++) {
    const o = g[r] as Observation;
    const run = runOf(runs, o.position);
    if (run < 0) {
      distinct.push(o);
      continue;
    }
    let seen = perRun[run];
    if (!seen) {
      seen = new DistinctPositions();
      perRun[run] = seen;
    }
    const first = seen.firstNear(o.position);
    if (first < 0) {
      seen.add(o.position, r);
      distinct.push(o);
    } else {
      if (copies.length < SHOWN_COPIES) copies.push(`${o.index} (= ${(g[first] as Observation).index})`);
      copyLines.push(o.index);
    }
  }
  return distinct;
}

/** The runs of two or more sorted positions whose neighbouring gaps are within 2e-9 (relative), as [lo, hi] pairs. */
function closeRuns(sorted: Float64Array): number[] {
  const runs: number[] = [];
  let start = 0;
  for (let k = 1; k <= sorted.length; k++) {
    if (k < sorted.length) {
      const lo = sorted[k - 1] as number;
      const hi = sorted[k] as number;
      if (hi - lo <= 2e-9 * Math.max(Math.abs(lo), Math.abs(hi))) continue;
    }
    if (k - start > 1) runs.push(sorted[start] as number, sorted[k - 1] as number);
    start = k;
  }
  return runs;
}

/** The number of the run (of `closeRuns`) that holds x, or −1. */
function runOf(runs: readonly number[], x: number): number {
  let lo = 0;
  let hi = runs.length / 2;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((runs[2 * mid + 1] as number) < x) lo = mid + 1;
    else hi = mid;
  }
  return lo < runs.length / 2 && (runs[2 * lo] as number) <= x ? lo : -1;
}

/**
 * Positions of distinct lines, each with its rank in the order met, kept sorted: the earliest one within 1e-9
 * (relative) of a new position is found by binary search, not by a scan of all of them.
 */
class DistinctPositions {
  /** Positions ascending, and each one's rank in the order met. */
  private readonly sorted: number[] = [];
  private readonly rank: number[] = [];

  /** The rank of the earliest line whose position is within 1e-9 · |x| of x, or −1. */
  firstNear(x: number): number {
    const tol = 1e-9 * Math.abs(x);
    // The search window is twice the tolerance wide on each side (rounding of x ± tol can never hide a match);
    // the test itself is the exact one.
    let best = -1;
    for (let k = this.lowerBound(x - 2 * tol); k < this.sorted.length; k++) {
      const y = this.sorted[k] as number;
      if (y > x + 2 * tol) break;
      const r = this.rank[k] as number;
      if (Math.abs(y - x) <= tol && (best < 0 || r < best)) best = r;
    }
    return best;
  }

  add(x: number, rank: number): void {
    const k = this.lowerBound(x);
    this.sorted.splice(k, 0, x);
    this.rank.splice(k, 0, rank);
  }

  /** First index whose position is ≥ x. */
  private lowerBound(x: number): number {
    let lo = 0;
    let hi = this.sorted.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if ((this.sorted[mid] as number) < x) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  }
}

/**
 * Lines from two or more sources (the line's `source`). Each source's mean residual against the joint fit is listed
 * (SD/√n), but a fit absorbs much of a shift between instruments into the origins, and what is left spreads over
 * every source: the source named is the one whose relative offset (`estimateSourceOffsets`: the offset against the
 * reference source that the shared levels determine) lies more than 3σ from zero. A source whose bands share no
 * level with another source's cannot be compared: `SOURCE_OFFSET_UNIDENTIFIABLE` names it and its bands.
 */
export function checkSourceOffsets(
  sources: readonly (string | undefined)[],
  lines: readonly { readonly index: number; readonly status: string; readonly residual?: number }[],
  warnings: Warning[],
  level?: { readonly fit: SolvedModel; readonly mode: UncertaintyMode },
): SourceOffsets | undefined {
  const stats = meanResidualsBySource(sources, lines);
  if (stats.length < 2) return undefined;
  const offsets = level ? estimateSourceOffsets(level.fit, sources, level.mode) : undefined;
  if (!offsets) return undefined;
  // Most significant first: a large shift of one source leaks a little into the others' estimates (the level model
  // was chosen with the shift in the lines), so the first named is the one shifted, the rest are noted after it.
  const z = (x: SourceOffset) => Math.abs((x.offset as number) / (x.uncertainty as number));
  const off = offsets.offsets
    .filter((x) => x.offset !== undefined && x.uncertainty !== undefined && Math.abs(x.offset) > 3 * x.uncertainty)
    .sort((a, b) => z(b) - z(a));
  for (const x of offsets.unidentified) {
    warnings.push({
      code: 'SOURCE_OFFSET_UNIDENTIFIABLE',
      message: `band${x.bands.length === 1 ? '' : 's'} ${x.bands.join(', ')} of source ${x.source} cannot be compared with the lines of another source (no shared level or loop of bands): an offset of ${x.source} cannot be told from a change of ${x.bands.length === 1 ? 'its origin' : 'their origins'}, which ${x.bands.length === 1 ? 'is' : 'are'} only as good as the calibration of ${x.source}`,
      lines: stats.find((s) => s.source === x.source)?.lines ?? [],
    });
  }
  if (off.length === 0) return offsets;
  const fmt = (x: (typeof stats)[number]) =>
    `${x.source} ${x.mean >= 0 ? '+' : ''}${Number.isFinite(x.se) && x.se > 0 ? plusMinus(x.mean, x.se, 4) : x.mean.toFixed(4)} cm-1 (${x.n} lines)`;
  const rel = (x: SourceOffset) =>
    `${x.source} ${(x.offset as number) >= 0 ? '+' : ''}${plusMinus(x.offset as number, x.uncertainty as number, 4)} cm-1`;
  const also =
    off.length > 1
      ? ` (and, less far, ${off
          .slice(1)
          .map((x) => x.source)
          .join(', ')})`
      : '';
  const against =
    offsets.reference === undefined
      ? 'offset of each source that the level model determines'
      : `offset against ${offsets.reference} (the reference: most weight) on the levels the sources share`;
  warnings.push({
    code: 'SOURCE_MEAN_RESIDUALS',
    message: `mean residual per source: ${stats.map(fmt).join(', ')}; ${against}: ${off.map(rel).join(', ')}; ${(off[0] as SourceOffset).source} lies off zero beyond 3 standard errors${also}: a calibration offset between instruments?`,
    lines: off.slice(0, 1).flatMap((x) => stats.find((s) => s.source === x.source)?.lines ?? []),
  });
  return offsets;
}

function meanResidualsBySource(
  sources: readonly (string | undefined)[],
  lines: readonly { readonly index: number; readonly status: string; readonly residual?: number }[],
) {
  const bySource = new Map<string, { index: number; residual: number }[]>();
  for (const l of lines) {
    const s = sources[l.index];
    if (s === undefined || l.status !== 'fitted' || l.residual === undefined) continue;
    const g = bySource.get(s) ?? [];
    g.push({ index: l.index, residual: l.residual });
    bySource.set(s, g);
  }
  return [...bySource].map(([source, g]) => {
    const n = g.length;
    const mean = g.reduce((a, x) => a + x.residual, 0) / n;
    const sd = n > 1 ? Math.sqrt(g.reduce((a, x) => a + (x.residual - mean) ** 2, 0) / (n - 1)) : Number.NaN;
    return { source, n, mean, se: sd / Math.sqrt(n), lines: g.map((x) => x.index) };
  });
}

const labelOf = (o: Observation) =>
  transitionLabel({
    species: o.species,
    band: { upper: o.upperV, lower: o.lowerV },
    branch: o.upperJ > o.lowerJ ? 'R' : o.upperJ < o.lowerJ ? 'P' : 'Q',
    j: o.lowerJ,
  });

export function qualityWarnings(
  fit: SolvedModel,
  corr: readonly (readonly number[])[],
  names: readonly string[],
  warnings: Warning[],
  mode: 'a-posteriori' | 'absolute' = 'a-posteriori',
): void {
  if (fit.degreesOfFreedom < 3) {
    warnings.push({
      code: 'FEW_DEGREES_OF_FREEDOM',
      message:
        mode === 'absolute'
          ? `only ${fit.degreesOfFreedom} degree(s) of freedom: χ² can hardly test the stated uncertainties or the model`
          : `only ${fit.degreesOfFreedom} degree(s) of freedom: the a-posteriori uncertainties are themselves very uncertain`,
    });
  }
  if (fit.conditionNumber > 1e10) {
    warnings.push({
      code: 'ILL_CONDITIONED',
      message: `the scaled design has condition number ${fit.conditionNumber.toExponential(2)}`,
    });
  }
  for (let i = 0; i < names.length; i++) {
    for (let j = i + 1; j < names.length; j++) {
      const r = corr[i]?.[j] as number;
      if (Math.abs(r) > 0.999) {
        warnings.push({
          code: 'STRONG_CORRELATION',
          message: `${names[i]} and ${names[j]} are correlated with ρ = ${r.toFixed(5)}: use the covariance, not the separate uncertainties`,
        });
      }
    }
  }
}

/** p-value below which χ² of a fit with absolute uncertainties is called inconsistent with them (either tail). */
export const CHI_SQUARE_CONSISTENCY = 1e-3;

/**
 * With absolute uncertainties the covariance is not rescaled, so it is only as good as the caller's σ: warn when
 * χ² is improbable for its degrees of freedom (P(χ²_ν ≥ χ²) < 0.001: uncertainties understated or the model
 * misses something, e.g. χ²/ν = 3.5 on 62 degrees of freedom, p ≈ 1e-19; or P(χ²_ν ≤ χ²) < 0.001: overstated).
 */
export function absoluteScaleWarnings(fit: SolvedModel, mode: 'a-posteriori' | 'absolute', warnings: Warning[]): void {
  const nu = fit.degreesOfFreedom;
  if (mode !== 'absolute' || nu <= 0) return;
  const upper = chiSquareSurvival(fit.chiSquare, nu);
  const r = fit.chiSquare / nu;
  if (upper < CHI_SQUARE_CONSISTENCY) {
    warnings.push({
      code: 'CHI_SQUARE_HIGH',
      message: `χ²/ν = ${r.toFixed(2)} on ${nu} degrees of freedom (p = ${upper.toExponential(1)}) with absolute uncertainties: the line uncertainties understate the scatter or the model misses a term, and the reported uncertainties, which are not rescaled, are too small by about √(χ²/ν) = ${Math.sqrt(r).toFixed(2)}; consider uncertaintyMode "a-posteriori"`,
    });
    return;
  }
  // The lower tail computed directly: 1 − upper is 0 for χ² far below ν, and the message would say p = 0.
  const lower = chiSquareCdf(fit.chiSquare, nu);
  if (lower < CHI_SQUARE_CONSISTENCY) {
    warnings.push({
      code: 'CHI_SQUARE_LOW',
      message: `χ²/ν = ${r < 0.01 ? r.toExponential(1) : r.toFixed(2)} on ${nu} degrees of freedom (p = ${lower.toExponential(1)} for so small a value) with absolute uncertainties: the line uncertainties look overstated, by about 1/√(χ²/ν) = ${(1 / Math.sqrt(r)).toPrecision(2)}, and the reported uncertainties, which are not rescaled, are as large as the caller's σ make them (too large by about that factor if the model is complete); consider uncertaintyMode "a-posteriori"`,
    });
  }
}

/**
 * Observations grouped by transition (species, v′, v″, J′, J″), groups in the order first met. Keyed by a number
 * within each species (v < 1024, J ≤ MAX_J < 1024): a string key per observation cost more than the grouping.
 */
function repeatGroups(observations: readonly Observation[]): Observation[][] {
  const bySpecies = new Map<string, Map<number, Observation[]>>();
  const groups: Observation[][] = [];
  for (const o of observations) {
    let m = bySpecies.get(o.species);
    if (!m) {
      m = new Map();
      bySpecies.set(o.species, m);
    }
    const key = ((o.upperV * 1024 + o.lowerV) * 1024 + o.upperJ) * 1024 + o.lowerJ;
    let g = m.get(key);
    if (!g) {
      g = [];
      m.set(key, g);
      groups.push(g);
    }
    g.push(o);
  }
  return groups;
}

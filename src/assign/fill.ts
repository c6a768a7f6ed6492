import type { DetailedFit } from '../fit/types.js';
import { floatsFrom } from '../linalg/small-arrays.js';
import {
  type AssignContext,
  candidateKey,
  fittedPosition,
  type ResidualStatistics,
  residualStatistics,
} from './assign-lines.js';
import type { CandidateLine } from './candidates.js';
import { lowerBound, type ObservedPeak } from './match.js';

/**
 * The last stage of an automatic assignment: lines the final fit itself places on a free line, unambiguously, that
 * the rounds left out. A round proposes from the fit before it and judges competitions and bans one round at a
 * time; a strong line in the middle of a well-fitted band could stay out after a neighbour's competition was
 * decided (held-out seed 82: H⁷⁹Br and H⁸¹Br 1-0 R(10), between fitted R(9) and R(11), left unassigned). Here the
 * fit of everything assigned is asked once more, for every candidate of a band it fitted in that source:
 * - its prediction lies within FILL_SIGMAS √(noise² + var) of exactly one free line of the source, where the noise
 *   is what the rounds judge the band by in that source (residualStatistics: the larger of the fit's line σ and the
 *   band's own robust scatter, or its σ factor times the typical line σ) and var the model's variance;
 * - the model has not run out there (its σ at most the noise: within the J the band's lines span, or just past);
 * - no other candidate of a fitted band is predicted as near that line by the same rule (a blend or a doublet is
 *   left to the rounds), and the transition is not already assigned in that source.
 * Returns those lines (line → candidate), or undefined when there are none.
 */
export function linesTheFitPlaces(
  ctx: AssignContext,
  fit: DetailedFit,
  auto: ReadonlyMap<number, CandidateLine>,
): Map<number, CandidateLine> | undefined {
  const stats = residualStatistics(ctx, fit, auto);
  const fitted = fittedBandsBySource(ctx, auto);
  const taken = new Set<string>();
  for (const [i, c] of auto) taken.add(`${ctx.sourceNumbers[i]}#${candidateKey(c)}`);
  const added = new Map<number, CandidateLine>();
  ctx.sources.forEach((name, s) => {
    const free = (ctx.freeByPosition.get(name) ?? []).filter((p) => !auto.has(p.index));
    if (free.length === 0) return;
    const placed = placements(ctx, fit, stats, fitted, s, free);
    // How many candidates reach each free line: only a line exactly one candidate reaches is taken.
    const reachers = new Map<number, number>();
    for (const peaks of placed.values()) for (const k of peaks) reachers.set(k, (reachers.get(k) ?? 0) + 1);
    for (const [ci, peaks] of placed) {
      const k = peaks[0] as number;
      const c = ctx.cands[ci] as CandidateLine;
      if (peaks.length !== 1 || reachers.get(k) !== 1 || taken.has(`${s}#${candidateKey(c)}`)) continue;
      const peak = free[k] as ObservedPeak;
      added.set(peak.index, c);
      taken.add(`${s}#${candidateKey(c)}`);
    }
  });
  return added.size > 0 ? added : undefined;
}

/**
 * The bands with at least FILL_MIN_LINES lines assigned in a source, keyed band × sources + source by number (as
 * residualGroups keys them).
 */
function fittedBandsBySource(ctx: AssignContext, auto: ReadonlyMap<number, CandidateLine>): Set<number> {
  const nSources = ctx.sources.length;
  const count = new Map<number, number>();
  for (const [i, c] of auto) {
    const k = (ctx.candBand[ctx.candIndex.get(c) as number] as number) * nSources + (ctx.sourceNumbers[i] as number);
    count.set(k, (count.get(k) ?? 0) + 1);
  }
  const least = Math.max(ctx.minLines, FILL_MIN_LINES);
  return new Set([...count].filter(([, n]) => n >= least).map(([k]) => k));
}

/** For every candidate of a fitted band of source s (not given), the free lines (by their number in `free`) it reaches. */
function placements(
  ctx: AssignContext,
  fit: DetailedFit,
  stats: ResidualStatistics,
  fitted: ReadonlySet<number>,
  s: number,
  free: readonly ObservedPeak[],
): Map<number, number[]> {
  const positions = floatsFrom(free, (p) => p.position);
  const out = new Map<number, number[]>();
  for (let ci = 0; ci < ctx.cands.length; ci++) {
    const band = ctx.candBand[ci] as number;
    if (ctx.candGiven[ci] === 1 || !fitted.has(band * ctx.sources.length + s)) continue;
    const pred = fittedPosition(ctx, fit, ci);
    if (!pred) continue;
    const st = stats.of(band, s);
    const noise = Math.max(st.scatter, st.sigmaFactor * (ctx.typicalSigma ?? 0));
    const model = Math.sqrt(pred.variance);
    if (!(noise > 0) || model > noise) continue;
    const centre = pred.value + st.shift;
    const tol = FILL_SIGMAS * Math.hypot(noise, model);
    const reached: number[] = [];
    for (let k = lowerBound(positions, centre - tol); k < free.length; k++) {
      if ((positions[k] as number) > centre + tol) break;
      reached.push(k);
    }
    if (reached.length > 0) out.set(ci, reached);
  }
  return out;
}

/** How many standard deviations of the prediction a line may lie from it (common practice for a 3σ window). */
const FILL_SIGMAS = 3;
/** A band fills only where it has this many lines of its own in the source (its scatter is then its own). */
const FILL_MIN_LINES = 8;

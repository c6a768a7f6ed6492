/**
 * One-to-one matching of predicted to observed lines within per-prediction tolerances: every admissible pair is
 * scored by (Δ/tol)² + 2 ln tol (the negative log-likelihood of a Gaussian of width tol, so that of two
 * predictions that explain a peak equally well in units of their tolerances the sharper one takes it), and pairs are
 * taken greedily by ascending cost (a close, fast approximation of the minimum-cost
 * matching when tolerances are small against the line spacing). Where two peaks compete for one prediction,
 * or two predictions for one peak, the losers are recorded so that the response can say why.
 */

import { floats } from '../linalg/small-arrays.js';

export interface Prediction {
  readonly key: string;
  readonly position: number;
  readonly tolerance: number;
  /** Expected intensity on the observed scale, when known. */
  readonly intensity?: number;
  /** Largest tolerated ratio of observed to expected intensity (either way). Default 8. */
  readonly intensityRatioLimit?: number;
  /**
   * For peaks that carry their own σ: the tolerance is then √(model² + (perSigma·σ)²) instead of `tolerance`
   * (which holds the scatter estimated for peaks without σ).
   */
  readonly withSigma?: { readonly model: number; readonly perSigma: number };
  /** 0 (default) is matched before 1: a fitted model's prediction takes a peak before a reference prediction. */
  readonly tier?: number;
}

export interface ObservedPeak {
  readonly index: number;
  readonly position: number;
  readonly intensity?: number;
  /** The peak's own standard uncertainty, when sent. */
  readonly sigma?: number;
}

export interface Match {
  readonly prediction: Prediction;
  readonly peak: ObservedPeak;
  readonly residual: number;
}

export interface Competition {
  /** The peak that lost. */
  readonly peak: number;
  /** The peak that won the same prediction. */
  readonly winner: number;
  readonly prediction: string;
}

/** Largest tolerated ratio between observed and expected intensity when both are known (common practice: ×8). */
const INTENSITY_RATIO_LIMIT = 8;

export function matchLines(
  predictions: readonly Prediction[],
  peaks: readonly ObservedPeak[],
): { matches: Match[]; competitions: Competition[] } {
  const sorted = [...peaks].sort((a, b) => a.position - b.position);
  const pairs = admissiblePairs(predictions, sorted);
  // A stable sort of the pairs' numbers by cost: ties keep the order in which the pairs were found.
  const order: number[] = [];
  for (let n = 0; n < pairs.costs.length; n++) order.push(n);
  order.sort((a, b) => (pairs.costs[a] as number) - (pairs.costs[b] as number));
  return takeGreedily(predictions, sorted, pairs, order);
}

/** Admissible pairs as parallel lists (cost, peak by its number in `sorted`, prediction): no object per pair. */
interface Pairs {
  readonly costs: number[];
  readonly peakOf: number[];
  readonly predOf: number[];
}

/** Every pair of a prediction and a peak (sorted by position) within the tolerance and intensity limits, scored. */
function admissiblePairs(predictions: readonly Prediction[], sorted: readonly ObservedPeak[]): Pairs {
  // Filled by a plain loop: Float64Array.from with a mapping function is several times slower here.
  const pos = floats(sorted.length);
  for (let i = 0; i < sorted.length; i++) pos[i] = (sorted[i] as ObservedPeak).position;
  const pairs: Pairs = { costs: [], peakOf: [], predOf: [] };
  let maxSigma = 0;
  for (const p of sorted) if (p.sigma !== undefined && p.sigma > maxSigma) maxSigma = p.sigma;
  predictions.forEach((pr, ki) => {
    const reach = pr.withSigma
      ? Math.max(pr.tolerance, Math.hypot(pr.withSigma.model, pr.withSigma.perSigma * maxSigma))
      : pr.tolerance;
    const lo = lowerBound(pos, pr.position - reach);
    for (let i = lo; i < pos.length && (pos[i] as number) <= pr.position + reach; i++) {
      const c = pairCost(pr, sorted[i] as ObservedPeak);
      if (c === undefined) continue;
      pairs.costs.push(c);
      pairs.peakOf.push(i);
      pairs.predOf.push(ki);
    }
  });
  return pairs;
}

/**
 * The cost of matching a peak to a prediction, undefined when the peak lies beyond the tolerance or its intensity
 * strays beyond the limit: the negative log-likelihood of a Gaussian, so that a vague prediction (a long
 * extrapolation) does not take a peak from a sharp one that explains it as well in units of its own tolerance.
 */
function pairCost(pr: Prediction, pk: ObservedPeak): number | undefined {
  const tol = toleranceFor(pr, pk);
  const r = (pk.position - pr.position) / tol;
  if (Math.abs(r) > 1) return undefined;
  let c = r * r + 2 * Math.log(tol) + 100 * (pr.tier ?? 0);
  if (pr.intensity !== undefined && pk.intensity !== undefined && pr.intensity > 0) {
    if (!(pk.intensity > 0)) return undefined;
    const lr = Math.log(pk.intensity / pr.intensity);
    if (Math.abs(lr) > Math.log(pr.intensityRatioLimit ?? INTENSITY_RATIO_LIMIT)) return undefined;
    c += 0.5 * lr * lr;
  }
  return c;
}

/**
 * The pairs taken in the given order, each peak and prediction once; a peak that finds its prediction taken lost a
 * competition, reported unless the peak was matched elsewhere.
 */
function takeGreedily(
  predictions: readonly Prediction[],
  sorted: readonly ObservedPeak[],
  { peakOf, predOf }: Pairs,
  order: readonly number[],
): { matches: Match[]; competitions: Competition[] } {
  // Which peak took each prediction (−1: none yet), and whether each peak is taken: by number, no maps.
  const peakTaken = new Uint8Array(sorted.length);
  const winnerOf = new Int32Array(predictions.length).fill(-1);
  const matches: Match[] = [];
  const competitions: Competition[] = [];
  for (const n of order) {
    const pi = peakOf[n] as number;
    const ki = predOf[n] as number;
    if (peakTaken[pi] === 1) continue;
    const pk = sorted[pi] as ObservedPeak;
    const pr = predictions[ki] as Prediction;
    const winner = winnerOf[ki] as number;
    if (winner >= 0) {
      competitions.push({ peak: pk.index, winner: (sorted[winner] as ObservedPeak).index, prediction: pr.key });
      continue;
    }
    peakTaken[pi] = 1;
    winnerOf[ki] = pi;
    matches.push({ prediction: pr, peak: pk, residual: pk.position - pr.position });
  }
  // A competition whose loser was matched elsewhere is no competition worth reporting.
  const matchedPeaks = new Set(matches.map((m) => m.peak.index));
  return { matches, competitions: competitions.filter((c) => !matchedPeaks.has(c.peak)) };
}

/** The tolerance of one prediction for one peak: the peak's own σ counts when both carry the information. */
export function toleranceFor(pr: Prediction, pk: ObservedPeak): number {
  return pr.withSigma && pk.sigma !== undefined
    ? Math.hypot(pr.withSigma.model, pr.withSigma.perSigma * pk.sigma)
    : pr.tolerance;
}

export function lowerBound(a: Float64Array, x: number): number {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if ((a[mid] as number) < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

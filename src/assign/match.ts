/**
 * One-to-one matching of predicted to observed lines within per-prediction tolerances: every admissible pair is
 * scored, and pairs are taken greedily by ascending cost (a close, fast approximation of the minimum-cost
 * matching when tolerances are small against the line spacing). Where two peaks compete for one prediction,
 * or two predictions for one peak, the losers are recorded so that the response can say why.
 */

export interface Prediction {
  readonly key: string;
  readonly position: number;
  readonly tolerance: number;
  /** Expected intensity on the observed scale, when known. */
  readonly intensity?: number;
}

export interface ObservedPeak {
  readonly index: number;
  readonly position: number;
  readonly intensity?: number;
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
  const pos = Float64Array.from(sorted, (p) => p.position);
  const pairs: { cost: number; pi: number; ki: number }[] = [];
  predictions.forEach((pr, ki) => {
    const lo = lowerBound(pos, pr.position - pr.tolerance);
    for (let i = lo; i < pos.length && (pos[i] as number) <= pr.position + pr.tolerance; i++) {
      const pk = sorted[i] as ObservedPeak;
      const r = (pk.position - pr.position) / pr.tolerance;
      let cost = r * r;
      if (pr.intensity !== undefined && pk.intensity !== undefined && pr.intensity > 0) {
        if (!(pk.intensity > 0)) continue;
        const lr = Math.log(pk.intensity / pr.intensity);
        if (Math.abs(lr) > Math.log(INTENSITY_RATIO_LIMIT)) continue;
        cost += 0.5 * lr * lr;
      }
      pairs.push({ cost, pi: i, ki });
    }
  });
  pairs.sort((a, b) => a.cost - b.cost);
  const usedPeak = new Map<number, number>();
  const usedPred = new Map<number, number>();
  const matches: Match[] = [];
  const competitions: Competition[] = [];
  for (const p of pairs) {
    const pk = sorted[p.pi] as ObservedPeak;
    const pr = predictions[p.ki] as Prediction;
    if (usedPeak.has(p.pi)) continue;
    const winner = usedPred.get(p.ki);
    if (winner !== undefined) {
      competitions.push({ peak: pk.index, winner: (sorted[winner] as ObservedPeak).index, prediction: pr.key });
      continue;
    }
    usedPeak.set(p.pi, p.ki);
    usedPred.set(p.ki, p.pi);
    matches.push({ prediction: pr, peak: pk, residual: pk.position - pr.position });
  }
  // A competition whose loser was matched elsewhere is no competition worth reporting.
  const matchedPeaks = new Set(matches.map((m) => m.peak.index));
  return { matches, competitions: competitions.filter((c) => !matchedPeaks.has(c.peak)) };
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

import { copyFloats } from '../linalg/small-arrays.js';
import { lowerBound } from './match.js';

export interface OffsetEstimate {
  /** Observed − predicted, cm⁻¹. */
  readonly offset: number;
  /** Robust spread (1.4826 × MAD) of the differences that voted for it. */
  readonly spread: number;
  /** Weighted votes in the winning window, and in the runner-up window away from it. */
  readonly votes: number;
  readonly runnerUpVotes: number;
}

/**
 * The instrument's wavenumber offset against predictions, by voting: every difference observed − predicted within
 * ±maxOffset between a strong predicted line and a peak casts a vote weighted by √(predicted intensity); the
 * window of the given width with the most weight wins and its median is the estimate. Spurious peaks spread their
 * votes evenly, true lines pile theirs up.
 */
export function estimateOffset(
  predicted: readonly { position: number; intensity: number }[],
  observed: readonly number[],
  maxOffset: number,
  window: number,
): OffsetEstimate | undefined {
  const obs = copyFloats(observed).sort();
  const diffs: { d: number; w: number }[] = [];
  for (const p of predicted) {
    const lo = lowerBound(obs, p.position - maxOffset);
    for (let i = lo; i < obs.length && (obs[i] as number) <= p.position + maxOffset; i++) {
      diffs.push({ d: (obs[i] as number) - p.position, w: Math.sqrt(p.intensity) });
    }
  }
  if (diffs.length === 0) return undefined;
  diffs.sort((a, b) => a.d - b.d);
  const best = bestWindow(diffs, window);
  const inWin = diffs.slice(best.start, best.end + 1).map((x) => x.d);
  const offset = median(inWin);
  const spread = 1.4826 * median(inWin.map((d) => Math.abs(d - offset)));
  // Runner-up: the best window among the votes at least two windows away from the winner.
  const rest = diffs.filter((x) => Math.abs(x.d - offset) >= 2 * window);
  const runnerUpVotes = rest.length > 0 ? bestWindow(rest, window).w : 0;
  return { offset, spread, votes: best.w, runnerUpVotes };
}

/** The window of the given width over sorted differences that holds the largest total weight. */
function bestWindow(
  diffs: readonly { d: number; w: number }[],
  window: number,
): { start: number; end: number; w: number } {
  let best = { start: 0, end: 0, w: -1 };
  let j = 0;
  let sum = 0;
  for (let i = 0; i < diffs.length; i++) {
    const di = diffs[i] as { d: number; w: number };
    sum += di.w;
    while (di.d - (diffs[j] as { d: number }).d > window) {
      sum -= (diffs[j] as { w: number }).w;
      j++;
    }
    if (sum > best.w) best = { start: j, end: i, w: sum };
  }
  return best;
}

export function median(xs: readonly number[]): number {
  if (xs.length === 0) return Number.NaN;
  // A typed copy sorts numerically without a comparator (several times faster for a few hundred values).
  const s = copyFloats(xs).sort();
  const m = s.length >> 1;
  return s.length % 2 ? (s[m] as number) : 0.5 * ((s[m - 1] as number) + (s[m] as number));
}

/**
 * How many predictions, shifted by the offset, have a peak within the tolerance; with `claimed` (sorted positions),
 * only peaks farther than `claimTol` from every claimed position count.
 */
export function countNear(
  preds: readonly { position: number }[],
  sorted: Float64Array,
  offset: number,
  tol: number,
  claimed?: Float64Array,
  claimTol = 0,
): number {
  let n = 0;
  for (const p of preds) {
    const hi = p.position + offset + tol;
    for (let i = lowerBound(sorted, p.position + offset - tol); i < sorted.length && (sorted[i] as number) <= hi; i++) {
      if (claimed && isNear(claimed, sorted[i] as number, claimTol)) continue;
      n++;
      break;
    }
  }
  return n;
}

/** Whether a sorted array holds a value within tol of x. */
export function isNear(sorted: Float64Array, x: number, tol: number): boolean {
  const i = lowerBound(sorted, x - tol);
  return i < sorted.length && (sorted[i] as number) <= x + tol;
}

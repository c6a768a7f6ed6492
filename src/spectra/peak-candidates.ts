/**
 * Candidate peaks (local maxima of the absorbance above the baseline, above a threshold) and their grouping into
 * windows fitted together. Shoulders of blends are found later, in the fit residuals.
 */

export interface Candidates {
  /** Sample index of each candidate, increasing. */
  readonly index: number[];
  /** Half width at half height, in samples (at least 1). */
  readonly halfWidth: number[];
}

/** A run of overlapping candidates and the window of samples their fit uses. */
export interface CandidateGroup {
  readonly members: number[];
  readonly halfWidths: number[];
  /** The widest member's half width, in samples. */
  readonly widest: number;
  /** First and last sample of the window (inclusive). */
  readonly lo: number;
  readonly hi: number;
}

/** Half width of the line at sample i from its half-height crossings, in samples, searched at most 200 out. */
function halfWidthAt(r: Float64Array, i: number): number {
  const h = (r[i] as number) / 2;
  const n = r.length;
  let lo = i;
  while (lo > 0 && (r[lo] as number) > h && i - lo < 200) lo--;
  let hi = i;
  while (hi < n - 1 && (r[hi] as number) > h && hi - i < 200) hi++;
  return Math.max(1, 0.5 * (hi - lo));
}

/**
 * Local maxima of r at or above the threshold; noise splits a line's top, so within one half width only the highest
 * counts. With a prominence, a maximum must also rise that far above the lowest point between it and the nearest
 * higher maximum on either side (its topographic prominence): noise makes local maxima on a line's wings, which
 * stand less than a few noise σ above the dip beside them.
 */
export function findCandidates(r: Float64Array, threshold: number, prominence = 0): Candidates {
  const index: number[] = [];
  let lastHalfWidth = 0;
  for (let i = 1; i < r.length - 1; i++) {
    const v = r[i] as number;
    if (!(v >= threshold && v >= (r[i - 1] as number) && v > (r[i + 1] as number))) continue;
    const last = index[index.length - 1];
    if (last !== undefined && i - last <= lastHalfWidth) {
      if (v > (r[last] as number)) {
        index[index.length - 1] = i;
        lastHalfWidth = halfWidthAt(r, i);
      }
      continue;
    }
    index.push(i);
    lastHalfWidth = halfWidthAt(r, i);
  }
  const kept = prominence > 0 ? prominentOnly(r, index, prominence) : index;
  return { index: kept, halfWidth: kept.map((i) => halfWidthAt(r, i)) };
}

/** The maxima (sample indices, increasing) whose topographic prominence among them reaches `prominence`. */
function prominentOnly(r: Float64Array, index: readonly number[], prominence: number): number[] {
  // dips[k]: the lowest r between maxima k and k + 1.
  const dips = index.slice(0, -1).map((a, k) => {
    let low = Number.POSITIVE_INFINITY;
    for (let i = a; i <= (index[k + 1] as number); i++) low = Math.min(low, r[i] as number);
    return low;
  });
  const col = (k: number, dir: -1 | 1): number => {
    const top = r[index[k] as number] as number;
    let low = Number.POSITIVE_INFINITY;
    for (let j = k + dir; j >= 0 && j < index.length; j += dir) {
      low = Math.min(low, dips[dir < 0 ? j : j - 1] as number);
      if (top - low >= prominence) return low;
      if ((r[index[j] as number] as number) > top) return low;
    }
    return Number.NEGATIVE_INFINITY;
  };
  return index.filter((i, k) => (r[i] as number) - Math.max(col(k, -1), col(k, 1)) >= prominence);
}

/**
 * Candidates closer than 3 half widths form one group. The window reaches 4 half widths (of the widest member)
 * out, but never past half-way to the next candidate outside the group.
 */
export function groupCandidates(c: Candidates, points: number): CandidateGroup[] {
  const { index, halfWidth } = c;
  const groups: CandidateGroup[] = [];
  for (let g = 0; g < index.length; ) {
    let e = g;
    while (
      e + 1 < index.length &&
      (index[e + 1] as number) - (index[e] as number) < 3 * Math.max(halfWidth[e] as number, halfWidth[e + 1] as number)
    )
      e++;
    const members = index.slice(g, e + 1);
    const halfWidths = halfWidth.slice(g, e + 1);
    const widest = Math.max(...halfWidths);
    const prev = g > 0 ? (index[g - 1] as number) : Number.NEGATIVE_INFINITY;
    const next = e + 1 < index.length ? (index[e + 1] as number) : Number.POSITIVE_INFINITY;
    const first = members[0] as number;
    const last = members[members.length - 1] as number;
    groups.push({
      members,
      halfWidths,
      widest,
      lo: Math.max(0, Math.floor(first - 4 * widest), Math.ceil(0.5 * (prev + first))),
      hi: Math.min(points - 1, Math.ceil(last + 4 * widest), Math.floor(0.5 * (last + next))),
    });
    g = e + 1;
  }
  return groups;
}

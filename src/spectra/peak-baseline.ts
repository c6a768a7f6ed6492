import { ScienceError } from '../errors.js';
import { selectInPlace } from '../stats/robust.js';

/**
 * The first stages of the peak finder: the spectrum as increasing x with absorbance, the absorbance above a
 * piecewise-linear baseline, and a first noise estimate. Quantiles are taken by selection (no sort) and at the
 * order statistic ⌊q(n − 1)⌋, so the levels are sample values.
 */

export interface AbsorbanceSpectrum {
  /** Strictly increasing. */
  readonly x: Float64Array;
  /** Absorbance at each x. */
  readonly absorbance: Float64Array;
  /** Median sampling step. */
  readonly step: number;
}

/** The order statistic ⌊q(n − 1)⌋ of `values[from..to)`, found by selection in `scratch` (values untouched). */
export function lowerQuantile(values: Float64Array, q: number, scratch: Float64Array, from = 0, to = values.length) {
  const len = to - from;
  const work = scratch.subarray(0, len);
  work.set(values.subarray(from, to));
  const k = Math.min(len - 1, Math.max(0, Math.floor(q * (len - 1))));
  return selectInPlace(work, k);
}

/** Checks the points, orders x upwards and turns transmittance (fraction or percent) into absorbance. */
export function toAbsorbance(
  xIn: ArrayLike<number>,
  yIn: ArrayLike<number>,
  yUnit: 'absorbance' | 'transmittance' | undefined,
): AbsorbanceSpectrum {
  const n = xIn.length;
  if (n !== yIn.length) throw new ScienceError('INPUT_INVALID', `x has ${n} points but y has ${yIn.length}`, {});
  if (n < 7) throw new ScienceError('INPUT_INVALID', `a spectrum needs at least 7 points, not ${n}`, {});
  // One pass checks each point, keeps the largest y and copies the points in increasing x order.
  const reversed = (xIn[n - 1] as number) < (xIn[0] as number);
  const x = new Float64Array(n);
  const absorbance = new Float64Array(n);
  let maxY = Number.NEGATIVE_INFINITY;
  for (let i = 0; i < n; i++) {
    const xi = xIn[i] as number;
    const yi = yIn[i] as number;
    if (!Number.isFinite(xi) || !Number.isFinite(yi)) {
      throw new ScienceError('INPUT_INVALID', `point ${i} is not a finite number`, { point: i });
    }
    if (yi > maxY) maxY = yi;
    const k = reversed ? n - 1 - i : i;
    x[k] = xi;
    absorbance[k] = yi;
  }
  if (yUnit === 'transmittance') {
    const percent = maxY > 1.5;
    for (let i = 0; i < n; i++) {
      const t = absorbance[i] as number;
      absorbance[i] = -Math.log10(Math.max(percent ? t / 100 : t, 1e-6));
    }
  }
  const steps = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) {
    if (!((x[i] as number) > (x[i - 1] as number))) {
      throw new ScienceError(
        'INPUT_INVALID',
        `x must be strictly monotonic; it is not at point ${reversed ? n - 1 - i : i}`,
        { point: i },
      );
    }
    steps[i - 1] = (x[i] as number) - (x[i - 1] as number);
  }
  return { x, absorbance, step: selectInPlace(steps, Math.floor(0.5 * (steps.length - 1))) };
}

/**
 * Full width at half maximum, in points, of the strongest feature (its half-height crossings on either side above
 * the spectrum's lowest value): the baseline segments must be many line widths long, or the 20th percentile of a
 * segment sits on a line's own wings (a finely sampled pressure-broadened spectrum: 40 points per FWHM).
 */
export function strongestWidthInPoints(a: Float64Array): number {
  const n = a.length;
  let top = 0;
  let low = Number.POSITIVE_INFINITY;
  for (let i = 0; i < n; i++) {
    if ((a[i] as number) > (a[top] as number)) top = i;
    low = Math.min(low, a[i] as number);
  }
  const half = low + 0.5 * ((a[top] as number) - low);
  let left = top;
  while (left > 0 && (a[left] as number) > half) left--;
  let right = top;
  while (right < n - 1 && (a[right] as number) > half) right++;
  return right - left;
}

/**
 * Absorbance above the baseline: the 20th percentile of segments of max(64, n/100, 12 × the strongest feature's
 * FWHM) points (at most a quarter of the spectrum), joined by straight lines between the segment centres (flat
 * beyond the outer centres' line).
 */
export function aboveBaseline(s: AbsorbanceSpectrum): Float64Array {
  const { x, absorbance: a } = s;
  const n = x.length;
  const byWidth = Math.min(12 * strongestWidthInPoints(a), Math.floor(n / 4));
  const seg = Math.max(64, Math.round(n / 100), byWidth);
  const scratch = new Float64Array(seg);
  const centres: number[] = [];
  const levels: number[] = [];
  for (let from = 0; from < n; from += seg) {
    const to = Math.min(n, from + seg);
    centres.push(0.5 * ((x[from] as number) + (x[to - 1] as number)));
    levels.push(lowerQuantile(a, 0.2, scratch, from, to));
  }
  const r = new Float64Array(n);
  let ci = 0;
  for (let i = 0; i < n; i++) {
    const xi = x[i] as number;
    while (ci + 1 < centres.length - 1 && (centres[ci + 1] as number) < xi) ci++;
    let base = levels[0] as number;
    if (centres.length > 1) {
      const x0 = centres[ci] as number;
      const t = (xi - x0) / ((centres[ci + 1] as number) - x0);
      base = (levels[ci] as number) + t * ((levels[ci + 1] as number) - (levels[ci] as number));
    }
    r[i] = (a[i] as number) - base;
  }
  return r;
}

/**
 * First noise estimate: 1.4826 · MAD of first differences / √2 in segments of 32 points, the 25th percentile of
 * the segments (lines raise the others). The final figure comes from the fit residuals. Each segment's differences
 * are sorted once (insertion sort: 32 values); the MAD is then read off by walking out from the median, since the
 * absolute deviations on either side of it are already in order.
 */
export function firstNoiseEstimate(r: Float64Array): number {
  const m = r.length - 1;
  const d = new Float64Array(32);
  const segNoise = new Float64Array(Math.max(0, Math.floor((m - 8) / 32) + 1));
  let count = 0;
  for (let s0 = 0; s0 + 8 <= m; s0 += 32) {
    const len = Math.min(m, s0 + 32) - s0;
    for (let i = 0; i < len; i++) d[i] = (r[s0 + i + 1] as number) - (r[s0 + i] as number);
    sortPrefix(d, len);
    const half = Math.floor(0.5 * (len - 1));
    segNoise[count++] = (1.4826 * kthDeviationFromSorted(d, len, half)) / Math.SQRT2;
  }
  if (count === 0) return 1e-12;
  return Math.max(lowerQuantile(segNoise, 0.25, new Float64Array(count), 0, count), 1e-12);
}

/** Sorts a[0..len) upwards in place (insertion sort, for the short segments of the noise estimate). */
export function sortPrefix(a: Float64Array, len: number): void {
  for (let i = 1; i < len; i++) {
    const v = a[i] as number;
    let j = i - 1;
    while (j >= 0 && (a[j] as number) > v) {
      a[j + 1] = a[j] as number;
      j--;
    }
    a[j + 1] = v;
  }
}

/**
 * The k-th smallest (0-based) of |d[i] − d[k]| over sorted d[0..len), d[k] being the median when k = ⌊(len − 1)/2⌋:
 * the deviations below the median grow going down from k and those above it going up from k + 1, so the two runs
 * are merged from the median outwards. med − d[i] is exactly |d[i] − med| in floating point.
 */
export function kthDeviationFromSorted(d: Float64Array, len: number, k: number): number {
  const med = d[k] as number;
  let down = k;
  let up = k + 1;
  let v = 0;
  for (let c = 0; c <= k; c++) {
    const below = down >= 0 ? med - (d[down] as number) : Number.POSITIVE_INFINITY;
    const above = up < len ? (d[up] as number) - med : Number.POSITIVE_INFINITY;
    if (below <= above) {
      v = below;
      down--;
    } else {
      v = above;
      up++;
    }
  }
  return v;
}

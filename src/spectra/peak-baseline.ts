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
  let maxY = Number.NEGATIVE_INFINITY;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(xIn[i] as number) || !Number.isFinite(yIn[i] as number)) {
      throw new ScienceError('INPUT_INVALID', `point ${i} is not a finite number`, { point: i });
    }
    maxY = Math.max(maxY, yIn[i] as number);
  }
  const reversed = (xIn[n - 1] as number) < (xIn[0] as number);
  const transmittance = yUnit === 'transmittance';
  const percent = transmittance && maxY > 1.5;
  const x = new Float64Array(n);
  const absorbance = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const k = reversed ? n - 1 - i : i;
    x[i] = xIn[k] as number;
    const y = yIn[k] as number;
    absorbance[i] = transmittance ? -Math.log10(Math.max(percent ? y / 100 : y, 1e-6)) : y;
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
 * the segments (lines raise the others). The final figure comes from the fit residuals.
 */
export function firstNoiseEstimate(r: Float64Array): number {
  const m = r.length - 1;
  const full = new Float64Array(32);
  const work = new Float64Array(32);
  const segNoise: number[] = [];
  for (let s0 = 0; s0 + 8 <= m; s0 += 32) {
    const len = Math.min(m, s0 + 32) - s0;
    // Full segments reuse two arrays of 32; the short last one gets its own (no views made per segment).
    const diffs = len === 32 ? full : new Float64Array(len);
    const scratch = len === 32 ? work : new Float64Array(len);
    for (let i = 0; i < len; i++) diffs[i] = (r[s0 + i + 1] as number) - (r[s0 + i] as number);
    const half = Math.floor(0.5 * (len - 1));
    scratch.set(diffs);
    const med = selectInPlace(scratch, half);
    for (let i = 0; i < len; i++) scratch[i] = Math.abs((diffs[i] as number) - med);
    segNoise.push((1.4826 * selectInPlace(scratch, half)) / Math.SQRT2);
  }
  if (segNoise.length === 0) return 1e-12;
  const all = Float64Array.from(segNoise);
  return Math.max(lowerQuantile(all, 0.25, new Float64Array(all.length)), 1e-12);
}

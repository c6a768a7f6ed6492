/**
 * Robust location and scale by selection (no full sort): the median, any quantile (linear interpolation between
 * order statistics, the "type 7" rule of Hyndman & Fan, Am. Stat. 50, 361 (1996)), and the normal-consistent
 * median absolute deviation (1.4826 · MAD, Rousseeuw & Croux, J. Am. Stat. Assoc. 88, 1273 (1993)).
 * Shared by the fit (scatter of lists without uncertainties), the assignment (tolerances) and the peak finder.
 */

import { copyFloats, floats } from '../linalg/small-arrays.js';

/** Normal-consistency factor of the MAD: 1 / Φ⁻¹(3/4). */
export const MAD_TO_SIGMA = 1.482602218505602;

/** The k-th smallest value (0-based) of `a`, which is reordered in place (Hoare's quickselect, median-of-three). */
export function selectInPlace(a: Float64Array | number[], k: number): number {
  let lo = 0;
  let hi = a.length - 1;
  while (hi > lo) {
    const mid = (lo + hi) >>> 1;
    const pivot = medianOfThree(a[lo] as number, a[mid] as number, a[hi] as number);
    let i = lo;
    let j = hi;
    while (i <= j) {
      while ((a[i] as number) < pivot) i++;
      while ((a[j] as number) > pivot) j--;
      if (i <= j) {
        const t = a[i] as number;
        a[i] = a[j] as number;
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k] as number;
  }
  return a[k] as number;
}

function medianOfThree(x: number, y: number, z: number): number {
  return Math.max(Math.min(x, y), Math.min(Math.max(x, y), z));
}

/** The q-quantile (0 ≤ q ≤ 1) of the values, type-7 interpolation; NaN for an empty input. Does not modify it. */
export function quantile(values: ArrayLike<number>, q: number): number {
  const n = values.length;
  if (n === 0) return Number.NaN;
  const a = copyFloats(values);
  const h = (n - 1) * Math.min(1, Math.max(0, q));
  const lo = Math.floor(h);
  const vLo = selectInPlace(a, lo);
  if (h === lo) return vLo;
  // The next order statistic is the smallest value above position lo after selection.
  let vHi = Number.POSITIVE_INFINITY;
  for (let i = lo + 1; i < n; i++) if ((a[i] as number) < vHi) vHi = a[i] as number;
  return vLo + (h - lo) * (vHi - vLo);
}

/** The median; NaN for an empty input. */
export function median(values: ArrayLike<number>): number {
  return quantile(values, 0.5);
}

/** Normal-consistent robust standard deviation 1.4826 · median |x − median(x)|; NaN for an empty input. */
export function robustSigma(values: ArrayLike<number>): number {
  const m = median(values);
  const dev = floats(values.length);
  for (let i = 0; i < values.length; i++) dev[i] = Math.abs((values[i] as number) - m);
  return MAD_TO_SIGMA * median(dev);
}

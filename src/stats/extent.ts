/**
 * The smallest and largest of a list of numbers, by a loop. `Math.min(...values)` passes every value as an argument
 * of one call, and past about 10⁵ of them (a line list of 100 000 lines) the call overflows the stack: RangeError.
 * An empty list gives lo = +∞, hi = −∞, as Math.min() and Math.max() do.
 */
export function extentOf(values: Iterable<number>): { lo: number; hi: number } {
  let lo = Number.POSITIVE_INFINITY;
  let hi = Number.NEGATIVE_INFINITY;
  for (const v of values) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return { lo, hi };
}

/** hi − lo of the values (−∞ for an empty list, as Math.max() − Math.min() gives). */
export function spanOf(values: Iterable<number>): number {
  const { lo, hi } = extentOf(values);
  return hi - lo;
}

import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { ScienceError } from '../../src/errors.js';
import { parseSpecies } from '../../src/species/parse.js';
import { extentOf, spanOf } from '../../src/stats/extent.js';

/**
 * Lists longer than about 10⁵ lines. The assignment took the window of a list as Math.min(...positions): one call
 * with every position as an argument, which overflows the stack (RangeError, a 500 from the service or a crash of
 * the CLI) past about 1.2·10⁵ of them on the main thread; the same for the round's competitions pushed with a
 * spread (a 100 000-line list of evenly spaced positions overflowed there). MAX_LINES can be raised to 10⁷.
 */
describe('very long line lists', () => {
  it('extentOf and spanOf take 300 000 values (Math.min(...values) overflows) and agree with a reduction', () => {
    const values = Array.from({ length: 300_000 }, (_, i) => Math.sin(i) * 1000 + i * 1e-3);
    expect(() => Math.min(...values)).toThrow(RangeError);
    const lo = values.reduce((a, b) => Math.min(a, b), Number.POSITIVE_INFINITY);
    const hi = values.reduce((a, b) => Math.max(a, b), Number.NEGATIVE_INFINITY);
    expect(extentOf(values)).toEqual({ lo, hi });
    expect(spanOf(new Set(values))).toBe(hi - lo);
    expect(extentOf([])).toEqual({ lo: Number.POSITIVE_INFINITY, hi: Number.NEGATIVE_INFINITY });
  });

  it('130 000 bare lines where CO has no band are refused with a ScienceError (a 4xx), not a stack overflow', () => {
    const lines = Array.from({ length: 130_000 }, (_, i) => ({ position: 5000 + i * 0.003 }));
    let error: unknown;
    try {
      analyseLineList(lines, parseSpecies('CO'));
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(ScienceError);
    expect((error as ScienceError).code).toBe('FIT_NO_ASSIGNED_LINES');
  });
});

import { describe, expect, it } from 'vitest';
import { uninformativeIntensities, withoutUninformativeIntensities } from '../../src/assign/intensity.js';

// The one rule for intensities that say nothing about which line is which (src/assign/intensity.ts), checked on
// hand-made lists whose spreads are worked out below. The thresholds are the rule's stated ones (common practice,
// not published): 1.2 as the largest strongest/weakest ratio over 6 lines or more; over 10 lines or more, up to
// one line in 50 (at least one) may be odd. Each case is computed inside `it`.

const of = (xs: readonly number[]) => xs.map((intensity) => ({ intensity }));
const repeat = (x: number, n: number) => Array.from({ length: n }, () => x);
const FAR_LESS = "far less than a band's Boltzmann envelope spans";

describe('intensities that carry no information', () => {
  it('all equal: a placeholder from two lines on, whatever the value (0, 1, 100)', () => {
    expect(uninformativeIntensities(of([1, 1]))).toBe('every line carries the same intensity (1)');
    expect(uninformativeIntensities(of(repeat(0, 7)))).toBe('every line carries the same intensity (0)');
    expect(uninformativeIntensities(of(repeat(100, 30)))).toBe('every line carries the same intensity (100)');
    // Unsorted input is sorted first: 3, 3 after a different line is no longer "all equal".
    expect(uninformativeIntensities(of([3, 2]))).toBeUndefined();
  });

  it('one line, none, or any line without an intensity: the intensities may be used', () => {
    expect(uninformativeIntensities([])).toBeUndefined();
    expect(uninformativeIntensities(of([5]))).toBeUndefined();
    expect(uninformativeIntensities([{ intensity: 1 }, {}, { intensity: 1 }])).toBeUndefined();
    expect(uninformativeIntensities([{}, { intensity: 1 }, { intensity: 1 }])).toBeUndefined();
    expect(uninformativeIntensities([...of(repeat(1, 20)), {}])).toBeUndefined();
  });

  it('within a factor 1.2 over six lines or more: 100 … 119 is flat (1.190), 100 … 121 is not', () => {
    // Sorted: weakest 100, strongest 119 → 119/100 = 1.190 (three decimals as the message prints them).
    expect(uninformativeIntensities(of([108, 100, 119, 104, 112, 116]))).toBe(
      `all of the 6 intensities lie within a factor 1.190 of each other (≤ 1.2), ${FAR_LESS}`,
    );
    // Exactly 1.2 still counts (≤): 100 and 120 are exact in binary, 120/100 = 1.2 to the last bit.
    expect(uninformativeIntensities(of([100, 105, 110, 115, 118, 120]))).toMatch(/within a factor 1\.200 /);
    // 121/100 = 1.21 > 1.2.
    expect(uninformativeIntensities(of([100, 105, 110, 115, 118, 121]))).toBeUndefined();
    // Five lines are too few for the ratio rule, however flat.
    expect(uninformativeIntensities(of([100, 104, 108, 112, 119]))).toBeUndefined();
    // A zero weakest line is not "within a factor" of anything.
    expect(uninformativeIntensities(of([0, 1, 1, 1, 1, 1.1]))).toBeUndefined();
  });

  it('one odd line among ten: "every line but 1"; among nine it counts, and the list is informative', () => {
    const tenOnes = [...repeat(1, 9), 100];
    expect(uninformativeIntensities(of(tenOnes))).toBe('every line but 1 carries the same intensity (1)');
    // One 0 among 100s: the odd line is the weakest, the flat run the upper nine.
    expect(uninformativeIntensities(of([100, 100, 100, 0, 100, 100, 100, 100, 100, 100]))).toBe(
      'every line but 1 carries the same intensity (100)',
    );
    expect(uninformativeIntensities(of([...repeat(1, 8), 100]))).toBeUndefined();
    // A flat run within 1.08 (100 … 108) beside one odd line: 9 of 10 within a factor 1.080.
    expect(uninformativeIntensities(of([100, 101, 102, 103, 104, 105, 106, 107, 108, 1000]))).toBe(
      `all but 1 of the 10 intensities lie within a factor 1.080 of each other (≤ 1.2), ${FAR_LESS}`,
    );
    // The run left after the odd line must itself hold six lines: not an issue at ten, but at ten with the
    // odd line at the low end the run is the upper nine (0.5 then 100 … 108).
    expect(uninformativeIntensities(of([0.5, 100, 101, 102, 103, 104, 105, 106, 107, 108]))).toMatch(
      /^all but 1 of the 10 intensities lie within a factor 1\.080 /,
    );
  });

  it('odd lines allowed: one in 50, at least one (50 lines: 1; 100: 2; 149: 2; 150: 3)', () => {
    // 2 odd among 100 (floor(100 × 0.02) = 2): a placeholder list with two slips.
    expect(uninformativeIntensities(of([...repeat(1, 98), 50, 100]))).toBe(
      'every line but 2 carries the same intensity (1)',
    );
    // 3 odd among 100 is more than allowed.
    expect(uninformativeIntensities(of([...repeat(1, 97), 30, 50, 100]))).toBeUndefined();
    // 2 odd among 50 (floor(1) = 1) is more than allowed; 1 odd among 50 is fine.
    expect(uninformativeIntensities(of([...repeat(1, 48), 50, 100]))).toBeUndefined();
    expect(uninformativeIntensities(of([...repeat(1, 49), 100]))).toBe(
      'every line but 1 carries the same intensity (1)',
    );
    // 149 lines: floor(2.98) = 2, so three odd ones are refused; 150 lines: floor(3) = 3 allowed.
    expect(uninformativeIntensities(of([...repeat(1, 146), 30, 50, 100]))).toBeUndefined();
    expect(uninformativeIntensities(of([...repeat(1, 147), 30, 50, 100]))).toBe(
      'every line but 3 carries the same intensity (1)',
    );
    // One weak and one strong odd line around a flat run: the run is found between them (skip 2, k = 1).
    expect(uninformativeIntensities(of([0, ...repeat(7, 98), 1000]))).toBe(
      'every line but 2 carries the same intensity (7)',
    );
  });

  it('the smallest spread is chosen among the runs: 2 then 5 × 9 is "every line but 1" at 5, not 2 … 5', () => {
    // skip 1: run k = 0 is 2 … 5 (2.5), run k = 1 is 5 … 5 (1): the second wins.
    expect(uninformativeIntensities(of([2, ...repeat(5, 9)]))).toBe('every line but 1 carries the same intensity (5)');
    // With a zero weakest line the run 0 … 5 has an infinite spread; the flat run 5 … 5.01 is chosen.
    expect(uninformativeIntensities(of([0, 5, 5, 5, 5, 5, 5, 5, 5, 5.01]))).toBe(
      `all but 1 of the 10 intensities lie within a factor 1.002 of each other (≤ 1.2), ${FAR_LESS}`,
    );
    // Negative values (a baseline taken off): no factor is spread, so −5 … 1 is no flat run; among ten, the nine
    // equal ones beside the odd −5 are a placeholder, and −1 beside five 1s is no flat list.
    expect(uninformativeIntensities(of([-5, ...repeat(1, 9)]))).toBe('every line but 1 carries the same intensity (1)');
    expect(uninformativeIntensities(of([-1, 1, 1, 1, 1, 1]))).toBeUndefined();
    // An informative envelope: a Boltzmann-like spread over 20 lines (ratio ≫ 1.2) says nothing is wrong.
    const envelope = Array.from({ length: 20 }, (_, j) => (2 * j + 1) * Math.exp(-0.02 * j * (j + 1)));
    expect(uninformativeIntensities(of(envelope))).toBeUndefined();
  });

  it('withoutUninformativeIntensities drops only the intensities, keeps the rest, and says why', () => {
    const flat = [
      { position: 2000, intensity: 1, uncertainty: 0.001 },
      { position: 2001, intensity: 1, source: 'a' },
    ];
    const r = withoutUninformativeIntensities(flat);
    expect(r.why).toBe('every line carries the same intensity (1)');
    expect(r.peaks).toEqual([
      { position: 2000, uncertainty: 0.001 },
      { position: 2001, source: 'a' },
    ]);
    for (const p of r.peaks) expect('intensity' in p).toBe(false);
    // Informative: the same array back, no reason.
    const used = [
      { position: 2000, intensity: 1 },
      { position: 2001, intensity: 3 },
    ];
    const u = withoutUninformativeIntensities(used);
    expect(u.peaks).toBe(used);
    expect(u.why).toBeUndefined();
    expect('why' in u).toBe(false);
  });
});

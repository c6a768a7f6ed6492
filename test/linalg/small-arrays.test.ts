import { describe, expect, it } from 'vitest';
import { copyFloats, copyInts, floats, ints, mapFloats, mapInts } from '../../src/linalg/small-arrays.js';

// The slab allocator must behave like the typed-array constructors it replaces: fresh, zeroed, independent arrays.

describe('small arrays from shared slabs', () => {
  it('never overlap: 5 000 arrays of mixed kinds and lengths (several slabs) keep what was written into each', () => {
    let s = 7;
    const next = () => {
      s = (s * 1103515245 + 12345) % 2147483648;
      return s;
    };
    const made: { a: Float64Array | Int32Array; tag: number }[] = [];
    for (let k = 0; k < 5000; k++) {
      const n = next() % 300;
      const a = k % 3 === 0 ? ints(n) : floats(n);
      expect(a.length).toBe(n);
      expect(a.every((x) => x === 0)).toBe(true);
      a.fill(k + 1);
      made.push({ a, tag: k + 1 });
    }
    for (const { a, tag } of made) expect(a.every((x) => x === tag)).toBe(true);
    // A slab's start is where a view lands after a new slab was begun: at least one array starts at offset 0 of a
    // later slab (the case a view taken on the previous slab's start would have broken).
    const buffers = new Set(made.map(({ a }) => a.buffer));
    expect(buffers.size).toBeGreaterThan(3);
  });

  it('lengths the constructor treats specially go to it: NaN gives an empty array, negative lengths throw', () => {
    expect(floats(Number.NaN).length).toBe(0);
    expect(ints(Number.NaN).length).toBe(0);
    expect(() => floats(-1)).toThrow(RangeError);
    expect(() => ints(-1)).toThrow(RangeError);
    expect(floats(2.5).length).toBe(new Float64Array(2.5).length);
    // Whatever was asked, later arrays still do not overlap earlier ones.
    const a = floats(4).fill(1);
    const b = floats(4).fill(2);
    expect(Array.from(a)).toEqual([1, 1, 1, 1]);
    expect(Array.from(b)).toEqual([2, 2, 2, 2]);
  });

  it('long arrays get their own buffer; copies and maps hold the values given', () => {
    const big = floats(5000);
    expect(big.buffer.byteLength).toBe(5000 * 8);
    expect(ints(5000).buffer.byteLength).toBe(5000 * 4);
    const src = Float64Array.of(1.5, -0, Number.NaN, 1e308);
    const c = copyFloats(src);
    expect(Object.is(c[1], -0)).toBe(true);
    expect(Number.isNaN(c[2])).toBe(true);
    expect(c[3]).toBe(1e308);
    src[0] = 9;
    expect(c[0]).toBe(1.5);
    expect(Array.from(copyInts([3, -4, 2 ** 31]))).toEqual([3, -4, -(2 ** 31)]);
    expect(Array.from(mapFloats(['a', 'bb'], (x, i) => x.length + i / 10))).toEqual([1, 2.1]);
    expect(Array.from(mapInts([5, 6], (x, i) => x * i))).toEqual([0, 6]);
  });
});

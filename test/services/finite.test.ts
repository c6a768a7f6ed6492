import { describe, expect, it } from 'vitest';
import { assertFinite, NonFiniteResult } from '../../services/usecases/finite.js';

describe('assertFinite', () => {
  it('names the path of the first non-finite number', () => {
    const r = {
      lines: [
        { j: 1, relativeIntensity: 0.5 },
        { j: 2, relativeIntensity: Number.NaN },
      ],
      rms: 1,
    };
    expect(() => assertFinite(r)).toThrow(NonFiniteResult);
    try {
      assertFinite(r);
    } catch (e) {
      expect((e as NonFiniteResult).quantity).toBe('lines/1/relativeIntensity');
      expect((e as NonFiniteResult).value).toBe('NaN');
    }
    expect(() => assertFinite({ a: { b: [1, 2, Number.NEGATIVE_INFINITY] } })).toThrow(/a\/b\/2 is -Infinity/);
  });
  it('passes finite results through unchanged, strings and nulls included', () => {
    const r = { a: [1, 2.5, -3e300], b: 'NaN as text', c: null, d: { e: true } };
    expect(assertFinite(r)).toBe(r);
  });
});

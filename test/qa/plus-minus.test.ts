import { describe, expect, it } from 'vitest';
import { decimalsForTwoDigits, plusMinus } from '../../src/qa/plus-minus.js';

describe('plusMinus: value ± uncertainty in check messages', () => {
  it('shows a small uncertainty with two significant digits instead of rounding it to zero', () => {
    // a calibration offset of the real CO database list was printed "-0.0002 ± 0.0000 cm-1"
    expect(plusMinus(-0.000213, 0.0000123, 4)).toBe('-0.000213 ± 0.000012');
    expect(plusMinus(-0.2, 0.0312, 1)).toBe('-0.200 ± 0.031');
  });
  it('keeps the minimum decimals when the uncertainty is large', () => {
    expect(plusMinus(294.83, 2.79, 1)).toBe('294.8 ± 2.8');
    expect(plusMinus(0.0123, 0.0456, 4)).toBe('0.0123 ± 0.0456');
  });
  it('falls back to the minimum decimals for a zero or non-finite uncertainty, and caps at 12', () => {
    expect(decimalsForTwoDigits(0, 3)).toBe(3);
    expect(decimalsForTwoDigits(Number.NaN, 2)).toBe(2);
    expect(decimalsForTwoDigits(1e-20, 0)).toBe(12);
    expect(decimalsForTwoDigits(0.00099, 0)).toBe(5);
    expect(decimalsForTwoDigits(0.001, 0)).toBe(4);
  });
});

import { describe, expect, it } from 'vitest';
import { decimalsFor, prose, quantity, unitText } from '../../services/report/format.js';

/**
 * How numbers are printed in reports. The rule (GUM, JCGM 100:2008 §7.2.6: an uncertainty to at most two significant
 * digits, the value rounded to the same digit) is applied exactly, so these expectations are exact strings.
 */
describe('report number formatting', () => {
  it('rounds the value to the second significant digit of its uncertainty', () => {
    expect(quantity({ value: 2885.977_412_3, uncertainty: 0.001_137, unit: 'cm-1' })).toBe('2885.9774 ± 0.0011 cm⁻¹');
    expect(quantity({ value: 10.593_498_12, uncertainty: 0.000_055_2, unit: 'cm-1' })).toBe(
      '10.593498 ± 0.000055 cm⁻¹',
    );
    expect(quantity({ value: 294.83, uncertainty: 2.79, unit: 'K' })).toBe('294.8 ± 2.8 K');
    expect(quantity({ value: 42_991.2, uncertainty: 33, unit: 'cm-1' })).toBe('42991 ± 33 cm⁻¹');
  });
  it('gives very small values a shared power of ten', () => {
    expect(quantity({ value: 5.324_71e-4, uncertainty: 2.47e-7, unit: 'cm-1' })).toBe('(5.3247 ± 0.0025) × 10⁻⁴ cm⁻¹');
  });
  it('says when a value has no uncertainty instead of printing a false ± 0', () => {
    expect(quantity({ value: 1.274_55, uncertainty: 0, unit: 'angstrom' })).toBe('1.27455 Å (no uncertainty)');
    expect(quantity({ value: 1.274_55, uncertainty: null, unit: 'angstrom' })).toBe('1.27455 Å (no uncertainty)');
  });
  it('typesets units and shortens raw floats in prose', () => {
    expect(unitText('angstrom-1')).toBe('Å⁻¹');
    expect(unitText('cm-1')).toBe('cm⁻¹');
    expect(prose('B_1 = 10.136212345678 cm-1 is odd')).toBe('B_1 = 10.1362 cm⁻¹ is odd');
    expect(decimalsFor(0.002)).toBe(4);
    expect(decimalsFor(0.0015)).toBe(4);
    expect(decimalsFor(25)).toBe(0);
  });
});

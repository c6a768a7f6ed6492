import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { fromWavenumber, type PositionUnit, toWavenumber } from '../../src/units.js';
import { thrown } from '../helpers/thrown.js';

/**
 * Position units against hand values. 1 cm⁻¹ = c · 1 cm⁻¹ = 29 979.2458 MHz exactly (c = 299 792 458 m/s, SI
 * definition). A vacuum wavelength λ inverts: ν̃ = 10⁴/λ[µm] = 10⁷/λ[nm], and to first order
 * σ_ν̃ = |dν̃/dλ| σ_λ = 10⁴ σ_λ/λ² = ν̃ σ_λ/λ (the same for λ in nm with 10⁷).
 * The ¹²C¹⁶O J = 1 ← 0 line: 3.845033 cm⁻¹ (HITRAN2020, test/fixtures/co-database-lines) and 115 271.2018 MHz
 * (laboratory microwave value, from memory).
 */

describe('to wavenumber', () => {
  it('cm⁻¹ passes through, σ kept, and no σ key when none is given', () => {
    expect(toWavenumber(2143.27, 'cm-1', 0.001)).toEqual({ value: 2143.27, uncertainty: 0.001 });
    expect(toWavenumber(2143.27, 'cm-1')).toEqual({ value: 2143.27 });
    expect('uncertainty' in toWavenumber(2143.27, 'cm-1')).toBe(false);
  });

  it('MHz, GHz and THz by c exactly: CO J = 1 ← 0 at 115 271.2018 MHz is 3.845033 cm⁻¹ (HITRAN) to 1e-6', () => {
    const mhz = toWavenumber(115271.2018, 'MHz', 0.0005);
    expect(mhz.value).toBeCloseTo(115271.2018 / 29979.2458, 12);
    expect(Math.abs(mhz.value - 3.845033)).toBeLessThan(1e-6);
    expect(mhz.uncertainty).toBeCloseTo(0.0005 / 29979.2458, 15);
    const ghz = toWavenumber(115.2712018, 'GHz', 5e-7);
    expect(ghz.value).toBeCloseTo(115271.2018 / 29979.2458, 12);
    expect(ghz.uncertainty).toBeCloseTo(0.0005 / 29979.2458, 15);
    const thz = toWavenumber(0.1152712018, 'THz', 5e-10);
    expect(thz.value).toBeCloseTo(115271.2018 / 29979.2458, 12);
    expect(thz.uncertainty).toBeCloseTo(0.0005 / 29979.2458, 15);
    expect(toWavenumber(1, 'MHz')).toEqual({ value: 1 / 29979.2458 });
  });

  it('µm and nm invert, with σ_ν̃ = ν̃ σ_λ/λ: 4.6 µm ± 1e-4 µm is 2173.9130435 ± 0.047258979 cm⁻¹', () => {
    // 10⁴/4.6 = 2173.913043478…; 10⁴ · 1e-4/4.6² = 1/21.16 = 0.047258979206…
    const um = toWavenumber(4.6, 'um', 1e-4);
    expect(um.value).toBeCloseTo(2173.913043478, 9);
    expect(um.uncertainty).toBeCloseTo(0.04725897920604915, 12);
    const nm = toWavenumber(4600, 'nm', 0.1);
    expect(nm.value).toBeCloseTo(2173.913043478, 9);
    expect(nm.uncertainty).toBeCloseTo(0.04725897920604915, 12);
    // σ grows as 1/λ²: the same σ_λ at half the wavelength gives four times the σ in wavenumber.
    expect(toWavenumber(2.3, 'um', 1e-4).uncertainty).toBeCloseTo(4 * 0.04725897920604915, 12);
    expect(toWavenumber(4.6, 'um')).toEqual({ value: 10000 / 4.6 });
  });

  it('refuses a position that is not a positive finite number, and an unknown unit', () => {
    for (const v of [0, -1, Number.NaN, Number.POSITIVE_INFINITY]) {
      const e = thrown(() => toWavenumber(v, 'cm-1'));
      expect(e.code).toBe('INPUT_INVALID');
      expect(e.message).toBe(`position ${v} cm-1 must be a positive finite number`);
      expect(e.details).toEqual({ value: v });
    }
    const e = thrown(() => toWavenumber(1, 'furlong' as PositionUnit));
    expect(e.code).toBe('UNIT_INVALID');
    expect(e.message).toBe('unit "furlong" is not one of cm-1, MHz, GHz, THz, um, nm');
    expect(e.details).toEqual({ unit: 'furlong' });
  });
});

describe('from wavenumber (predictions in the caller’s unit)', () => {
  it('cm⁻¹ passes through; frequencies multiply by 29 979.2458 MHz per cm⁻¹ (σ alike)', () => {
    expect(fromWavenumber(2143.27, 'cm-1', 0.001)).toEqual({ value: 2143.27, uncertainty: 0.001 });
    expect(fromWavenumber(2143.27, 'cm-1')).toEqual({ value: 2143.27 });
    expect('uncertainty' in fromWavenumber(2143.27, 'cm-1')).toBe(false);
    const mhz = fromWavenumber(3.845033, 'MHz', 1e-6);
    expect(mhz.value).toBeCloseTo(3.845033 * 29979.2458, 6);
    expect(mhz.uncertainty).toBeCloseTo(1e-6 * 29979.2458, 12);
    expect(fromWavenumber(3.845033, 'GHz').value).toBeCloseTo((3.845033 * 29979.2458) / 1e3, 9);
    expect(fromWavenumber(3.845033, 'THz').value).toBeCloseTo((3.845033 * 29979.2458) / 1e6, 12);
    expect('uncertainty' in fromWavenumber(3.845033, 'GHz')).toBe(false);
  });

  it('µm and nm: 2173.9130435 ± 0.047258979 cm⁻¹ is 4.6 ± 1e-4 µm and 4600 ± 0.1 nm (σ_λ = λ σ_ν̃/ν̃)', () => {
    const nu = 10000 / 4.6;
    const um = fromWavenumber(nu, 'um', 0.04725897920604915);
    expect(um.value).toBeCloseTo(4.6, 12);
    expect(um.uncertainty).toBeCloseTo(1e-4, 12);
    const nm = fromWavenumber(nu, 'nm', 0.04725897920604915);
    expect(nm.value).toBeCloseTo(4600, 9);
    expect(nm.uncertainty).toBeCloseTo(0.1, 9);
    expect(fromWavenumber(nu, 'nm')).toEqual({ value: 1e7 / nu });
  });
});

describe("the science layer's error", () => {
  it('carries its name, code, message and details (empty when none are given)', () => {
    const e = new ScienceError('UNIT_INVALID', 'no such unit');
    expect(e).toBeInstanceOf(Error);
    expect(e.name).toBe('ScienceError');
    expect(e.code).toBe('UNIT_INVALID');
    expect(e.message).toBe('no such unit');
    expect(e.details).toEqual({});
    expect(new ScienceError('INPUT_INVALID', 'x', { point: 3 }).details).toEqual({ point: 3 });
  });
});

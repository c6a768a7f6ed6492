import { describe, expect, it } from 'vitest';
import { MHZ_PER_WAVENUMBER, ROTATIONAL_FACTOR, SECOND_RADIATION_CM_K } from '../../src/constants/codata-2018.js';

describe('CODATA 2018 derived factors', () => {
  it('K = h/(8π²c u) = 16.8576292 cm⁻¹ u Å² (REFERENCE-DATA §1a, derived from CODATA 2018), to 1e-9 relative', () => {
    expect(Math.abs(ROTATIONAL_FACTOR / 16.857629192 - 1)).toBeLessThan(1e-9);
  });
  it('1 cm⁻¹ = 29 979.2458 MHz exactly (c = 299 792 458 m/s, SI)', () => {
    expect(MHZ_PER_WAVENUMBER).toBeCloseTo(29979.2458, 9);
  });
  it('c₂ = hc/k = 1.438776877 cm K (CODATA 2018, exact), to 1e-12 relative', () => {
    expect(Math.abs(SECOND_RADIATION_CM_K / 1.438776877504 - 1)).toBeLessThan(1e-12);
  });
});

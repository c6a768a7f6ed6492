import { describe, expect, it } from 'vitest';
import { BOB_DELTA, halfLastDigit, LAST_DIGIT_UNITS, libraryUncertainties } from '../../src/qa/library-uncertainty.js';
import { constantsFor } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';

// The σ the calibration check gives the library's own constants (src/qa/library-uncertainty.ts), worked out here by
// hand from the rule: LAST_DIGIT_UNITS (30) units in the last quoted digit, at most the value; mass-scaled entries
// the parent's σ scaled as the value and, in quadrature, BOB_DELTA (0.5) · m_e Σ|1/M − 1/M_parent| of the value.
// Masses: ¹²C 12 u exactly, ¹³C 13.00335483507 u, ¹⁶O 15.99491461957 u (AME2020); m_e 5.48579909065e-4 u
// (CODATA 2018).

const entry = (formula: string) => {
  const e = constantsFor(parseSpecies(formula));
  if (!e) throw new Error(`no library entry for ${formula}`);
  return e;
};

describe('half a unit in the last quoted digit', () => {
  it.each([
    [2169.81358, 5e-6],
    [6.12147e-6, 5e-12],
    [0.9, 0.05],
    [-0.0122, 5e-5],
    [1.93128087, 5e-9],
  ])('%f → %f', (x, half) => {
    expect(Math.abs(halfLastDigit(x) / half - 1)).toBeLessThan(1e-9);
  });
});

describe('σ of the library constants', () => {
  it('¹²C¹⁶O (tabulated): 30 units in the last digit of each, keyed as Dunham terms', () => {
    expect([LAST_DIGIT_UNITS, BOB_DELTA]).toEqual([30, 0.5]);
    const s = libraryUncertainties(entry('12C-16O'));
    const want: [string, number][] = [
      ['1,0', 30e-5], // ω_e 2169.81358
      ['2,0', 30e-5], // ω_e x_e 13.28831
      ['3,0', 30e-6], // ω_e y_e 0.010511
      ['0,1', 30e-8], // B_e 1.93128087
      ['1,1', 30e-8], // α_e 0.01750441
      ['0,2', 30e-11], // D_e 6.12147e-6
    ];
    expect([...s.keys()].sort()).toEqual(want.map(([k]) => k).sort());
    for (const [k, sigma] of want) expect(Math.abs((s.get(k) as number) / sigma - 1), k).toBeLessThan(1e-9);
  });

  it('a value quoted to one digit is capped at itself (¹H¹⁹F ω_e y_e 0.9: 30 × 0.1 = 3 → 0.9)', () => {
    expect(libraryUncertainties(entry('1H-19F')).get('3,0')).toBeCloseTo(0.9, 12);
  });

  it('¹³C¹⁶O (mass-scaled from ¹²C¹⁶O): the parent σ scaled, with the Born–Oppenheimer term in quadrature', () => {
    const co13 = entry('13C-16O');
    const s = libraryUncertainties(co13);
    const me = 5.48579909065e-4;
    const bob = 0.5 * me * Math.abs(1 / 13.00335483507 - 1 / 12);
    const omega13 = co13.constants.omega_e?.value as number;
    const B13 = co13.constants.B_e?.value as number;
    // ω_e scales as ρ, B_e as ρ²: the parent σ times value/parent value.
    const wantOmega = Math.hypot(30e-5 * (omega13 / 2169.81358), bob * omega13);
    const wantB = Math.hypot(30e-8 * (B13 / 1.93128087), bob * B13);
    expect(Math.abs((s.get('1,0') as number) / wantOmega - 1)).toBeLessThan(1e-6);
    expect(Math.abs((s.get('0,1') as number) / wantB - 1)).toBeLessThan(1e-6);
    // The breakdown term dominates ω_e here: 0.5 · m_e · 6.4e-3 u⁻¹ · 2121 cm⁻¹ ≈ 3.7e-3 cm⁻¹.
    expect(s.get('1,0') as number).toBeGreaterThan(3e-3);
  });
});

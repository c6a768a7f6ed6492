import { describe, expect, it } from 'vitest';
import { ELEMENTS, mostAbundantIsotope } from '../../src/constants/atomic-masses.js';
import {
  ATOMIC_MASS_CONSTANT,
  ATOMIC_MASS_CONSTANT_UNCERTAINTY,
  BOLTZMANN_K,
  MHZ_PER_WAVENUMBER,
  PLANCK_H,
  ROTATIONAL_FACTOR,
  ROTATIONAL_FACTOR_UNCERTAINTY,
  SECOND_RADIATION_CM_K,
  SPEED_OF_LIGHT,
} from '../../src/constants/codata-2018.js';
import { bondLength } from '../../src/derive/bond-length.js';
import { quantity } from '../../src/derive/quantity.js';
import { type ConstantName, libraryEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';

// Every module-level constant of src/constants and every library value, held against its published value.
// Sources: shared/REFERENCE-DATA.md (READ = read in the source or a faithful copy; MEM = from memory; MEM+2 = from
// memory and corroborated by a secondary copy; DER = computed there from read values).

describe('CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021); REFERENCE-DATA §1, READ)', () => {
  it('h, c and k_B carry their exact SI values', () => {
    expect(PLANCK_H).toBe(6.62607015e-34);
    expect(SPEED_OF_LIGHT).toBe(299792458);
    expect(BOLTZMANN_K).toBe(1.380649e-23);
  });

  it('m_u = 1.660 539 066 60(50) × 10⁻²⁷ kg, value and uncertainty to the published digits', () => {
    expect(ATOMIC_MASS_CONSTANT).toBe(1.6605390666e-27);
    expect(ATOMIC_MASS_CONSTANT_UNCERTAINTY).toBe(5.0e-37);
  });

  it('K = h/(8π²c m_u) = 16.857 629 191 64 cm⁻¹ u Å² (CODATA 2018 values, 30-digit decimal arithmetic) to 1e-12', () => {
    // Computed here with Python's decimal module at 30 digits from h, c, m_u above (REFERENCE-DATA §1a rounds it to
    // 16.8576292). Double-precision arithmetic agrees to about 1e-15 relative; 1e-12 leaves room for the order of
    // operations and fails on any change of a digit of m_u.
    expect(Math.abs(ROTATIONAL_FACTOR / 16.85762919164018 - 1)).toBeLessThan(1e-12);
    // σ(K) = K σ(m_u)/m_u = 5.1e-9 (REFERENCE-DATA §1a, two digits).
    expect(ROTATIONAL_FACTOR_UNCERTAINTY).toBeGreaterThan(5.05e-9);
    expect(ROTATIONAL_FACTOR_UNCERTAINTY).toBeLessThan(5.15e-9);
  });

  it('1 cm⁻¹ = 29 979.2458 MHz and c₂ = 1.438 776 877 504 cm K (exact; REFERENCE-DATA §1a, DER)', () => {
    expect(Math.abs(MHZ_PER_WAVENUMBER - 29979.2458)).toBeLessThan(1e-9);
    expect(Math.abs(SECOND_RADIATION_CM_K - 1.438776877504)).toBeLessThan(1e-12);
  });
});

/** AME2020 (Wang et al., Chin. Phys. C 45, 030003 (2021)): REFERENCE-DATA §2a, READ in four conversions. */
const AME2020: [string, number, number, number, number][] = [
  // element, A, mass (u), standard uncertainty (u), tolerance on the mass: half a unit of the 11th decimal, the digits
  // AME2020 prints (micro-u to 5 decimals); the conversions read carry a 12th decimal the table may round away
  ['H', 1, 1.007825031898, 1.4e-11, 5e-12],
  ['H', 2, 2.014101777844, 1.5e-11, 5e-12],
  ['C', 12, 12, 0, 0],
  ['C', 13, 13.003354835336, 2.5e-10, 5e-12],
  ['N', 14, 14.003074004251, 2.4e-10, 5e-12],
  ['N', 15, 15.000108898266, 6.2e-10, 5e-12],
  ['O', 16, 15.994914619257, 3.2e-10, 5e-12],
  ['O', 17, 16.999131755953, 6.9e-10, 5e-12],
  ['O', 18, 17.999159612136, 6.9e-10, 5e-12],
  ['F', 19, 18.99840316207, 8.8e-10, 5e-12], // copies carry 11 decimals (full, from memory: 18.998403162067)
  ['S', 32, 31.97207117354, 1.41e-9, 5e-12],
  ['S', 34, 33.967867011, 4.7e-8, 5e-10],
  ['Cl', 35, 34.968852694, 3.8e-8, 5e-10],
  ['Cl', 37, 36.965902573, 5.5e-8, 5e-10],
  ['Br', 79, 78.918337574, 1.074e-6, 5e-10],
  ['Br', 81, 80.916288197, 1.049e-6, 5e-10],
  ['I', 127, 126.904472592, 3.887e-6, 5e-10],
];

/**
 * Representative isotopic compositions (IUPAC 2009 via NIST AWIC; REFERENCE-DATA §2b, READ) with their stated
 * uncertainties. The table now carries CIAAW 2013 best measurements (tested against that source by the mass-table
 * tests); the two evaluations must agree within the older one's uncertainty.
 */
const CIAAW: [string, number, number, number][] = [
  ['H', 1, 0.999885, 7e-5],
  ['H', 2, 0.000115, 7e-5],
  ['C', 12, 0.9893, 8e-4],
  ['C', 13, 0.0107, 8e-4],
  ['N', 14, 0.99636, 2e-4],
  ['N', 15, 0.00364, 2e-4],
  ['O', 16, 0.99757, 1.6e-4],
  ['O', 17, 0.00038, 1e-5],
  ['O', 18, 0.00205, 1.4e-4],
  ['F', 19, 1, 0],
  ['S', 32, 0.9499, 2.6e-3],
  ['S', 34, 0.0425, 2.4e-3],
  ['Cl', 35, 0.7576, 1e-3],
  ['Cl', 37, 0.2424, 1e-3],
  ['Br', 79, 0.5069, 7e-4],
  ['Br', 81, 0.4931, 7e-4],
  ['I', 127, 1, 0],
];

const isotope = (symbol: string, a: number) => ELEMENTS[symbol]?.isotopes.find((i) => i.massNumber === a);

describe('AME2020 atomic masses (REFERENCE-DATA §2a, READ)', () => {
  it.each(AME2020)('%s-%i = %f u, σ = %f u', (symbol, a, mass, sigma, tol) => {
    const i = isotope(symbol, a);
    expect(i, `${a}${symbol}`).toBeDefined();
    expect(Math.abs((i?.mass as number) - mass)).toBeLessThanOrEqual(tol);
    // AME2020 prints three digits of the uncertainty, the conversions two or three: agree within 5 %.
    if (sigma === 0) expect(i?.massUncertainty).toBe(0);
    else expect(Math.abs((i?.massUncertainty as number) / sigma - 1)).toBeLessThan(0.05);
  });
});

describe('isotopic compositions against IUPAC 2009 / NIST AWIC (REFERENCE-DATA §2b, READ)', () => {
  it.each(CIAAW)('%s-%i: %f ± %f', (symbol, a, x, u) => {
    expect(Math.abs((isotope(symbol, a)?.abundance as number) - x)).toBeLessThanOrEqual(u + 1e-12);
  });

  it('the most abundant isotope is what a bare symbol means', () => {
    const most = (s: string) => mostAbundantIsotope(ELEMENTS[s] as never).massNumber;
    expect(['H', 'C', 'N', 'O', 'S', 'Cl', 'Br'].map(most)).toEqual([1, 12, 14, 16, 32, 35, 79]);
  });

  it('the compositions of H, C, N, O, Cl and Br sum to 1 (within 1e-9)', () => {
    for (const s of ['H', 'C', 'N', 'O', 'Cl', 'Br']) {
      const sum = (ELEMENTS[s]?.isotopes ?? []).reduce((acc, i) => acc + i.abundance, 0);
      expect(Math.abs(sum - 1), s).toBeLessThan(1e-9);
    }
  });
});

/**
 * Library constants against Huber & Herzberg (1979) as tabulated in the NIST Chemistry WebBook
 * (REFERENCE-DATA §3, MEM+2 unless marked MEM). Exact to the digits recalled.
 */
const HH: [string, ConstantName, number][] = [
  ['12C-16O', 'omega_e', 2169.81358],
  ['12C-16O', 'omega_e_x_e', 13.28831],
  ['12C-16O', 'omega_e_y_e', 0.010511], // MEM
  ['12C-16O', 'B_e', 1.93128087],
  ['12C-16O', 'alpha_e', 0.01750441],
  ['12C-16O', 'D_e', 6.12147e-6],
  ['12C-16O', 'r_e', 1.128323],
  ['1H-35Cl', 'omega_e', 2990.9463],
  ['1H-35Cl', 'omega_e_x_e', 52.8186],
  ['1H-35Cl', 'omega_e_y_e', 0.2243], // MEM
  ['1H-35Cl', 'omega_e_z_e', -0.0122], // MEM, low confidence
  ['1H-35Cl', 'B_e', 10.593416],
  ['1H-35Cl', 'alpha_e', 0.307181],
  ['1H-35Cl', 'D_e', 5.3194e-4],
  ['1H-35Cl', 'r_e', 1.27455], // MEM
  ['2H-35Cl', 'omega_e', 2145.163],
  ['2H-35Cl', 'omega_e_x_e', 27.1825],
  ['2H-35Cl', 'B_e', 5.448794],
  ['2H-35Cl', 'alpha_e', 0.113291],
  ['2H-35Cl', 'r_e', 1.27458], // MEM
  ['1H-79Br', 'omega_e', 2648.975],
  ['1H-79Br', 'omega_e_x_e', 45.2175],
  ['1H-79Br', 'B_e', 8.46488],
  ['1H-79Br', 'alpha_e', 0.23328],
  ['1H-79Br', 'D_e', 3.4584e-4], // MEM
  ['1H-79Br', 'r_e', 1.41444],
  ['1H-19F', 'omega_e', 4138.32],
  ['1H-19F', 'omega_e_x_e', 89.88],
  ['1H-19F', 'B_e', 20.9557],
  ['1H-19F', 'alpha_e', 0.798],
  ['1H-19F', 'D_e', 2.151e-3], // MEM
  ['1H-19F', 'r_e', 0.916808],
  ['2H-19F', 'omega_e', 2998.192], // MEM, low confidence
  ['2H-19F', 'B_e', 11.00985], // MEM, low confidence
  ['1H-127I', 'omega_e', 2309.014], // MEM
  ['1H-127I', 'omega_e_x_e', 39.6435], // MEM
  ['1H-127I', 'r_e', 1.60916],
];

describe('library constants against Huber & Herzberg (REFERENCE-DATA §3)', () => {
  it.each(HH)('%s %s = %f', (formula, name, value) => {
    const c = libraryEntry(formula)?.constants[name];
    expect(c, `${formula} ${name}`).toBeDefined();
    expect(c?.value).toBe(value);
    expect(c?.source).toMatch(/Huber/);
  });

  it('HI B_e is the value implied by r_e = 1.60916 Å (REFERENCE-DATA §5d: 6.511 cm⁻¹, DER), marked derived', () => {
    const b = libraryEntry('HI')?.constants.B_e;
    expect(b?.provenance).toBe('derived');
    expect(Math.abs((b?.value as number) - 6.511009)).toBeLessThan(1e-3);
  });

  it.each([
    // molecule, r_e from the tabulated B_e with AME2020 μ and CODATA 2018 K (REFERENCE-DATA §5d, DER)
    ['CO', 1.128323],
    ['HCl', 1.274552],
    ['DCl', 1.274581],
    ['HF', 0.916809],
  ])('B_e of %s gives r_e = %f Å (§5d) within 1e-6 Å', (s, re) => {
    const e = libraryEntry(s);
    const r = bondLength(quantity(e?.constants.B_e?.value as number, 0, 'cm-1'), reducedMass(parseSpecies(s)));
    expect(Math.abs((r?.value as number) - re)).toBeLessThan(1e-6);
  });

  it.each([
    // isotopologue, parent, B_e × μ_parent/μ (REFERENCE-DATA §2c reduced masses; first-order mass scaling, DER)
    ['13C-16O', 1.93128087 * (6.8562086379 / 7.1724125014)],
    ['12C-18O', 1.93128087 * (6.8562086379 / 7.1998655342)],
    ['1H-37Cl', 10.593416 * (0.9795925391 / 0.9810772945)],
    ['1H-81Br', 8.46488 * (0.9951169115 / 0.9954268349)],
  ])('derived %s B_e = %f (mass-scaled, 1e-9 relative), marked derived', (formula, b) => {
    const c = libraryEntry(formula)?.constants.B_e;
    expect(c?.provenance).toBe('derived');
    expect(Math.abs((c?.value as number) / b - 1)).toBeLessThan(1e-9);
  });

  it('derived 13C16O ω_e scales with ρ, α_e with ρ³ and D_e with ρ⁴ (Born–Oppenheimer, DER), 1e-9 relative', () => {
    const rho = Math.sqrt(6.8562086379 / 7.1724125014);
    const c = libraryEntry('13C-16O')?.constants;
    expect(Math.abs((c?.omega_e?.value as number) / (2169.81358 * rho) - 1)).toBeLessThan(1e-9);
    expect(Math.abs((c?.omega_e_x_e?.value as number) / (13.28831 * rho ** 2) - 1)).toBeLessThan(1e-9);
    expect(Math.abs((c?.alpha_e?.value as number) / (0.01750441 * rho ** 3) - 1)).toBeLessThan(1e-9);
    expect(Math.abs((c?.D_e?.value as number) / (6.12147e-6 * rho ** 4) - 1)).toBeLessThan(1e-9);
    expect(c?.r_e?.value).toBe(1.128323);
  });
});

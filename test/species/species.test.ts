import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { isotopologuesOf, naturalAbundance, parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';

describe('species strings', () => {
  it.each([
    ['CO', '12C-16O'],
    ['12C16O', '12C-16O'],
    ['13C-16O', '13C-16O'],
    ['HCl', '1H-35Cl'],
    ['H35Cl', '1H-35Cl'],
    ['H37Cl', '1H-37Cl'],
    ['D35Cl', '2H-35Cl'],
    ['DCl', '2H-35Cl'],
    ['1H-79Br', '1H-79Br'],
    ['HBr', '1H-79Br'],
    ['HF', '1H-19F'],
    ['HI', '1H-127I'],
  ])('%s normalises to %s', (input, formula) => {
    expect(parseSpecies(input).formula).toBe(formula);
  });

  it.each([
    ['Xx', 'SPECIES_UNKNOWN_ELEMENT'],
    ['H36Cl', 'SPECIES_UNKNOWN_ISOTOPE'],
    ['CO2', 'SPECIES_INVALID'],
    ['HHCl', 'SPECIES_NOT_DIATOMIC'],
    ['', 'SPECIES_INVALID'],
    ['3D35Cl', 'SPECIES_INVALID'],
    ['h cl', 'SPECIES_INVALID'],
  ])('%s is refused with %s', (input, code) => {
    try {
      parseSpecies(input);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ScienceError);
      expect((e as ScienceError).code).toBe(code);
    }
  });

  it('lists both chlorine isotopologues of HCl with abundances summing to that of ¹H (CIAAW 2013, 0.99984426)', () => {
    const all = isotopologuesOf(parseSpecies('HCl')).filter((i) => i.atoms[0].isotope.massNumber === 1);
    const sum = all.reduce((s, i) => s + naturalAbundance(i), 0);
    expect(sum).toBeCloseTo(0.99984426, 9);
  });
});

// Reduced masses: REFERENCE-DATA.md §2c, computed from AME2020 atomic masses; tolerance 1e-9 u. Their standard
// uncertainties by propagation of the AME2020 mass uncertainties (REFERENCE-DATA §2a):
// σ_μ = √(((m₂/M)² σ₁)² + ((m₁/M)² σ₂)²), within 5 % (the table may carry a third digit of each σ).
const AME_SIGMA: Record<string, [number, number]> = {
  // isotope: [mass (u), σ (u)], AME2020 (REFERENCE-DATA §2a)
  '1H': [1.007825031898, 1.4e-11],
  '2H': [2.014101777844, 1.5e-11],
  '12C': [12, 0],
  '13C': [13.003354835336, 2.5e-10],
  '16O': [15.994914619257, 3.2e-10],
  '18O': [17.999159612136, 6.9e-10],
  '19F': [18.99840316207, 8.8e-10],
  '35Cl': [34.968852694, 3.8e-8],
  '37Cl': [36.965902573, 5.5e-8],
  '79Br': [78.918337574, 1.074e-6],
  '81Br': [80.916288197, 1.049e-6],
  '127I': [126.904472592, 3.887e-6],
};
function propagatedSigma(a: string, b: string): number {
  const [m1, s1] = AME_SIGMA[a] as [number, number];
  const [m2, s2] = AME_SIGMA[b] as [number, number];
  const total = m1 + m2;
  return Math.hypot((m2 / total) ** 2 * s1, (m1 / total) ** 2 * s2);
}

describe('reduced masses from AME2020', () => {
  it.each([
    ['12C16O', 6.8562086379, '12C', '16O'],
    ['13C16O', 7.1724125014, '13C', '16O'],
    ['12C18O', 7.1998655342, '12C', '18O'],
    ['H35Cl', 0.9795925391, '1H', '35Cl'],
    ['H37Cl', 0.9810772945, '1H', '37Cl'],
    ['D35Cl', 1.9044132462, '2H', '35Cl'],
    ['H79Br', 0.9951169115, '1H', '79Br'],
    ['H81Br', 0.9954268349, '1H', '81Br'],
    ['HF', 0.9570552773, '1H', '19F'],
    ['DF', 1.8210450251, '2H', '19F'],
    ['HI', 0.9998843466, '1H', '127I'],
  ])('μ(%s) = %f u, σ_μ by AME2020 propagation', (s, mu, a, b) => {
    const m = reducedMass(parseSpecies(s));
    expect(Math.abs(m.value - mu)).toBeLessThan(1e-9);
    expect(Math.abs(m.uncertainty / propagatedSigma(a, b) - 1)).toBeLessThan(0.05);
  });
});

describe('any diatomic can be named (every element in the mass table)', () => {
  it.each([
    ['7Li1H', '7Li-1H'],
    ['LiH', '7Li-1H'],
    ['6LiH', '6Li-1H'],
    ['NaCl', '23Na-35Cl'],
    ['23Na35Cl', '23Na-35Cl'],
    ['Na37Cl', '23Na-37Cl'],
    ['SiO', '28Si-16O'],
    ['KBr', '39K-79Br'],
    ['40K35Cl', '40K-35Cl'],
    ['CS', '12C-32S'],
    ['AlF', '27Al-19F'],
    ['D35Cl', '2H-35Cl'],
    ['2H35Cl', '2H-35Cl'],
    ['HT', '1H-3H'],
    ['CO', '12C-16O'],
    ['14C16O', '14C-16O'],
    ['HCl', '1H-35Cl'],
    ['87RbH', '87Rb-1H'],
    ['232Th16O', '232Th-16O'],
    ['UO', '238U-16O'],
    ['TcO', '99Tc-16O'],
    ['BiH', '209Bi-1H'],
  ])('%s normalises to %s', (input, formula) => {
    expect(parseSpecies(input).formula).toBe(formula);
  });

  // Symbols are case-sensitive: a capital starts an atom, a lower-case letter belongs to the capital before it.
  it.each([
    ['CO', ['C', 'O']],
    ['CoH', ['Co', 'H']],
    ['HF', ['H', 'F']],
    ['HfO', ['Hf', 'O']],
    ['CS', ['C', 'S']],
    ['CsI', ['Cs', 'I']],
    ['NaCl', ['Na', 'Cl']],
    ['BrCl', ['Br', 'Cl']],
    ['BCl', ['B', 'Cl']],
    ['SiO', ['Si', 'O']],
    ['ScO', ['Sc', 'O']],
    ['SnO', ['Sn', 'O']],
    ['NO', ['N', 'O']],
    ['NiO', ['Ni', 'O']],
    ['AlF', ['Al', 'F']],
    ['DyO', ['Dy', 'O']],
    ['TlH', ['Tl', 'H']],
  ])('%s reads as %j', (input, symbols) => {
    expect(parseSpecies(input).atoms.map((a) => a.element.symbol)).toEqual(symbols);
  });

  it.each([
    ['Cs', 'SPECIES_NOT_DIATOMIC'],
    ['SIO', 'SPECIES_NOT_DIATOMIC'],
    ['NACL', 'SPECIES_UNKNOWN_ELEMENT'],
    ['nacl', 'SPECIES_INVALID'],
    ['8Li1H', 'SPECIES_UNKNOWN_ISOTOPE'],
    ['12O16O', 'SPECIES_UNKNOWN_ISOTOPE'],
    ['AtH', 'SPECIES_UNKNOWN_ELEMENT'],
    ['2T35Cl', 'SPECIES_INVALID'],
  ])('%s is refused with %s', (input, code) => {
    expect(() => parseSpecies(input)).toThrow(ScienceError);
    try {
      parseSpecies(input);
    } catch (e) {
      expect((e as ScienceError).code).toBe(code);
    }
  });

  it('one-case input is refused with a hint that symbols are case-sensitive', () => {
    expect(() => parseSpecies('NACL')).toThrow(/case-sensitive/);
    expect(() => parseSpecies('nacl')).toThrow(/case-sensitive/);
    expect(() => parseSpecies('8Li1H')).toThrow(/6Li, 7Li/);
  });

  it('natural isotopologues of KBr: 39K/40K/41K × 79Br/81Br, abundances from CIAAW 2013 summing to 1', () => {
    const all = isotopologuesOf(parseSpecies('KBr'));
    expect(all.map((i) => i.formula).sort()).toEqual(
      ['39K-79Br', '39K-81Br', '40K-79Br', '40K-81Br', '41K-79Br', '41K-81Br'].sort(),
    );
    const sum = all.reduce((s, i) => s + naturalAbundance(i), 0);
    // K sums to 0.9999997, Br to 1 exactly in Meija et al. 2016 Table 1; tolerance 1e-6.
    expect(Math.abs(sum - 1)).toBeLessThan(1e-6);
    const main = all.find((i) => i.formula === '39K-79Br') as (typeof all)[number];
    expect(naturalAbundance(main)).toBeCloseTo(0.932581 * 0.50686, 12);
  });

  it('radioactive nuclides without a natural composition are named but have no natural abundance (3H, 14C)', () => {
    expect(naturalAbundance(parseSpecies('HT'))).toBe(0);
    expect(naturalAbundance(parseSpecies('14C16O'))).toBe(0);
    expect(isotopologuesOf(parseSpecies('CO')).map((i) => i.formula)).not.toContain('14C-16O');
  });
});

// Reduced masses μ = m₁m₂/(m₁+m₂) computed by hand (Python, 40-digit decimals) from AME2020 atomic masses
// (mass_1.mas20): 7Li 7.01600343426, 1H 1.007825031898, 23Na 22.98976928195, 35Cl 34.968852694, 32S 31.97207117354,
// 28Si 27.97692653442, 16O 15.99491461926, 39K 38.96370648482, 79Br 78.918337574, 27Al 26.981538408,
// 19F 18.99840316207 u. Tolerance 1e-9 u.
describe('reduced masses of species outside the reference library, from AME2020', () => {
  it.each([
    ['7Li1H', 0.881238166388],
    ['23Na35Cl', 13.870686156464],
    ['12C32S', 8.725194057117],
    ['28Si16O', 10.176707171833],
    ['39K79Br', 26.084981525846],
    ['27Al19F', 11.148473162518],
  ])('μ(%s) = %f u', (s, mu) => {
    const m = reducedMass(parseSpecies(s));
    expect(Math.abs(m.value - mu)).toBeLessThan(1e-9);
    expect(m.uncertainty).toBeGreaterThan(0);
    expect(m.uncertainty).toBeLessThan(1e-6);
  });
});

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

  it('lists both chlorine isotopologues of HCl with abundances summing to that of ¹H (CIAAW via NIST)', () => {
    const all = isotopologuesOf(parseSpecies('HCl')).filter((i) => i.atoms[0].isotope.massNumber === 1);
    const sum = all.reduce((s, i) => s + naturalAbundance(i), 0);
    expect(sum).toBeCloseTo(0.999885, 9);
  });
});

// Reduced masses: REFERENCE-DATA.md §2c, computed from AME2020 atomic masses; tolerance 1e-9 u.
describe('reduced masses from AME2020', () => {
  it.each([
    ['12C16O', 6.8562086379],
    ['13C16O', 7.1724125014],
    ['12C18O', 7.1998655342],
    ['H35Cl', 0.9795925391],
    ['H37Cl', 0.9810772945],
    ['D35Cl', 1.9044132462],
    ['H79Br', 0.9951169115],
    ['H81Br', 0.9954268349],
    ['HF', 0.9570552773],
    ['DF', 1.8210450251],
    ['HI', 0.9998843466],
  ])('μ(%s) = %f u', (s, mu) => {
    const m = reducedMass(parseSpecies(s));
    expect(Math.abs(m.value - mu)).toBeLessThan(1e-9);
    expect(m.uncertainty).toBeGreaterThanOrEqual(0);
    expect(m.uncertainty).toBeLessThan(1e-6);
  });
});

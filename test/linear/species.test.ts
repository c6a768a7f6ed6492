import { describe, expect, it } from 'vitest';
import { isLinearSpeciesString, parseLinearSpecies } from '../../src/linear/species.js';
import { hasMissingLevels } from '../../src/linear/spin-statistics.js';
import { parseSpecies } from '../../src/species/parse.js';

describe('linear species strings', () => {
  it.each([
    ['16O-12C-16O', '16O-12C-16O'],
    ['CO2', '16O-12C-16O'],
    ['13CO2', '16O-13C-16O'],
    ['C18O2', '18O-12C-18O'],
    ['16O-12C-18O', '16O-12C-18O'],
    ['N2O', '14N-14N-16O'],
    ['15N2O', '15N-15N-16O'],
    ['14N-14N-16O', '14N-14N-16O'],
    ['OCS', '16O-12C-32S'],
    ['16O-12C-32S', '16O-12C-32S'],
    ['HCN', '1H-12C-14N'],
    ['H13CN', '1H-13C-14N'],
    ['DCN', '2H-12C-14N'],
    ['1H-12C-14N', '1H-12C-14N'],
    ['C2H2', '1H-12C-12C-1H'],
    ['13C2H2', '1H-13C-13C-1H'],
    ['1H-12C-12C-1H', '1H-12C-12C-1H'],
    ['O-C-O', '16O-12C-16O'],
  ])('%s is %s', (input, formula) => {
    expect(isLinearSpeciesString(input)).toBe(true);
    expect(parseLinearSpecies(input).formula).toBe(formula);
  });

  it('tells a count (digit after a symbol, everyday formulas only) from a mass number (digit before)', () => {
    // "C2H2": 2 after C and H are counts; "13C2H2": 13 before C is a mass number.
    expect(parseLinearSpecies('13C2H2').atoms.map((a) => a.isotope.massNumber)).toEqual([1, 13, 13, 1]);
    // In a chain a digit after a symbol is refused.
    expect(() => parseLinearSpecies('O2-C-O')).toThrow(/mass number/);
  });

  it('leaves diatomic strings to the diatomic parser, unchanged', () => {
    for (const s of ['12C16O', '13C-16O', 'H35Cl', 'CO', 'HCl', '1H-79Br'])
      expect(isLinearSpeciesString(s)).toBe(false);
    expect(parseSpecies('13C-16O').formula).toBe('13C-16O');
    // The diatomic parser still refuses "CO2" (as before); the services route it to the linear parser.
    expect(() => parseSpecies('CO2')).toThrow();
  });

  it('refuses unknown atoms, isotopes, short and long chains and mixed isotopes in a formula', () => {
    expect(() => parseLinearSpecies('16O-12C-16Q')).toThrow(
      expect.objectContaining({ code: 'SPECIES_UNKNOWN_ELEMENT' }),
    );
    expect(() => parseLinearSpecies('16O-99C-16O')).toThrow(
      expect.objectContaining({ code: 'SPECIES_UNKNOWN_ISOTOPE' }),
    );
    expect(() => parseLinearSpecies('O-C-O-C-O')).toThrow(/3 or 4 atoms/);
    expect(() => parseLinearSpecies('16O')).toThrow(expect.objectContaining({ code: 'SPECIES_INVALID' }));
    expect(() => parseLinearSpecies('CO3')).toThrow(/formulas/);
  });

  it('masses from AME2020 and the missing-level rule', () => {
    // 12C16O2: 12 + 2 × 15.994 914 619 26 u = 43.989 829 239 u (AME2020, 16O mass; 12C exact).
    expect(parseLinearSpecies('CO2').mass.value).toBeCloseTo(43.98982924, 7);
    expect(hasMissingLevels(parseLinearSpecies('CO2'))).toBe(true);
    expect(hasMissingLevels(parseLinearSpecies('13CO2'))).toBe(true);
    // 16O-12C-18O has no centre of symmetry; 12C2H2 has I = 1/2 protons (weights 3:1, no missing levels).
    expect(hasMissingLevels(parseLinearSpecies('16O-12C-18O'))).toBe(false);
    expect(hasMissingLevels(parseLinearSpecies('C2H2'))).toBe(false);
    expect(parseLinearSpecies('C2H2').modes).toBe(5);
  });
});

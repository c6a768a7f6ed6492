import { describe, expect, it } from 'vitest';
import {
  hasZeroNuclearSpin,
  isLinearSpeciesString,
  LINEAR_FORMULAS,
  linearAbundance,
  parseLinearSpecies,
} from '../../src/linear/species.js';
import {
  allowedJ,
  branchJStep,
  exchangeStatistics,
  exchangeSymmetry,
  hasMissingLevels,
  isGerade,
  levelExists,
  levelSpinWeight,
  speciesStatistics,
} from '../../src/linear/spin-statistics.js';
import { thrown } from '../helpers/thrown.js';

/**
 * Species strings and nuclear-spin statistics against values worked out by hand in the comments: spin weights
 * from counting symmetric and antisymmetric spin functions of each pair of equivalent nuclei, (2I+1)(I+1) and
 * (2I+1)I (any spectroscopy text; from memory), nuclear spins of NUBASE2020 (1H ½, 2H 1, 12C 0, 13C ½, 16O 0,
 * from memory), the even-even rule (I = 0 when Z and N are even), g/u of the modes of CO2 (ν2, ν3 u) and C2H2
 * (ν3, ν5 u), and CIAAW 2013 best measurements of isotopic abundances (12C 0.988922, 13C 0.011078, 16O 0.99762,
 * from memory).
 */

describe('species strings', () => {
  it('what counts as a linear species string', () => {
    expect(isLinearSpeciesString('')).toBe(false);
    expect(isLinearSpeciesString('   ')).toBe(false);
    expect(isLinearSpeciesString(' CO2 ')).toBe(true);
    expect(isLinearSpeciesString(`${'16O-'.repeat(15)}16O`)).toBe(false); // 63 characters > 60
    expect(isLinearSpeciesString('12C-16O')).toBe(false);
    expect(isLinearSpeciesString('16O-12C-16O')).toBe(true);
    expect(isLinearSpeciesString('CH4')).toBe(false);
    expect(isLinearSpeciesString('DCN')).toBe(true);
    expect(isLinearSpeciesString('TCN')).toBe(true);
    expect(LINEAR_FORMULAS).toEqual(['CO2', 'N2O', 'OCS', 'HCN', 'C2H2', 'CS2']);
  });

  it('refusals carry their code, message and details', () => {
    const empty = thrown(() => parseLinearSpecies('  '));
    expect(empty.code).toBe('SPECIES_INVALID');
    expect(empty.message).toBe('species "" is empty or too long');
    expect(empty.details).toEqual({ species: '' });
    const long = 'O-'.repeat(40);
    const tooLong = thrown(() => parseLinearSpecies(long));
    expect(tooLong.details).toEqual({ species: long.slice(0, 60) });
    const two = thrown(() => parseLinearSpecies('16O-12C-'));
    expect(two.code).toBe('SPECIES_INVALID');
    const five = thrown(() => parseLinearSpecies('O-C-C-C-O'));
    expect(five.message).toBe('species "O-C-C-C-O" has 5 atoms: linear chains of 3 or 4 atoms are supported');
    expect(five.details).toEqual({ species: 'O-C-C-C-O', atoms: 5 });
    const count = thrown(() => parseLinearSpecies('16O-C2-16O'));
    expect(count.details).toEqual({ species: '16O-C2-16O', at: 'C2' });
    expect(count.message).toMatch(/^species "16O-C2-16O" cannot be read at "C2": /);
    const unknown = thrown(() => parseLinearSpecies('CH4'));
    expect(unknown.details).toEqual({ species: 'CH4', formulas: LINEAR_FORMULAS });
    expect(unknown.message).toBe(
      `species "CH4" is neither a '-' chain of atoms nor one of the formulas ${LINEAR_FORMULAS.join(', ')}`,
    );
  });

  it('modes, centre of symmetry, mass and its uncertainty (AME2020), abundance (CIAAW)', () => {
    const co2 = parseLinearSpecies('CO2');
    expect(co2.modes).toBe(3);
    expect(co2.centrosymmetric).toBe(true);
    expect(parseLinearSpecies('16O-12C-18O').centrosymmetric).toBe(false);
    expect(parseLinearSpecies('OCS').centrosymmetric).toBe(false);
    // Same element, other isotope at the ends: no centre of symmetry.
    expect(parseLinearSpecies('1H-12C-12C-2H').centrosymmetric).toBe(false);
    expect(parseLinearSpecies('1H-12C-13C-1H').centrosymmetric).toBe(false);
    const c2h2 = parseLinearSpecies('C2H2');
    expect(c2h2.modes).toBe(5);
    expect(c2h2.centrosymmetric).toBe(true);
    // 2 × 1.00782503223 + 2 × 12 = 26.01565006446 u (AME2020, from memory).
    expect(c2h2.mass.value).toBeCloseTo(26.01565006, 7);
    // σ: 12C exact, 1H to about 1e-11 u: positive and below 1e-9.
    expect(c2h2.mass.uncertainty).toBeGreaterThan(0);
    expect(c2h2.mass.uncertainty).toBeLessThan(1e-9);
    // 18O-12C-18O: 2 × 17.99915961 + 12 = 47.99831922 u (AME2020, from memory).
    expect(parseLinearSpecies('C18O2').mass.value).toBeCloseTo(47.99831922, 6);
    // Abundance of 12C16O2: 0.988922 × 0.99762² = 0.98422 (CIAAW 2013 best measurements); 2e-5 (16O recalled to
    // five digits).
    expect(Math.abs(linearAbundance(co2) - 0.988922 * 0.99762 ** 2)).toBeLessThan(2e-5);
    // 13C16O2: 0.011078 × 0.99762² = 0.011025; 1e-6.
    expect(Math.abs(linearAbundance(parseLinearSpecies('13CO2')) - 0.011078 * 0.99762 ** 2)).toBeLessThan(1e-6);
  });

  it('the even-even rule for nuclear spin zero', () => {
    const atoms = parseLinearSpecies('1H-12C-14N').atoms;
    expect(atoms.map(hasZeroNuclearSpin)).toEqual([false, true, false]); // 1H (1,0), 12C (6,6), 14N (7,7)
    const o = parseLinearSpecies('16O-13C-18O').atoms;
    expect(o.map(hasZeroNuclearSpin)).toEqual([true, false, true]); // 16O (8,8), 13C (6,7), 18O (8,10)
    const d = parseLinearSpecies('DCN').atoms[0];
    expect(d && hasZeroNuclearSpin(d)).toBe(false); // 2H (1,1): both odd
  });
});

describe('nuclear-spin statistics', () => {
  it('pair weights: 1H₂ pair 3:1 (fermions), 2H₂ pair 6:3 (bosons), 16O pair 1:0', () => {
    // C2H2 (1H…1H, 12C…12C): one fermion pair → the total must be antisymmetric: s-levels weigh 1, a-levels 3.
    expect(exchangeStatistics(['1H', '12C', '12C', '1H'])).toEqual({
      kind: 'exchange',
      symmetricWeight: 1,
      antisymmetricWeight: 3,
      uModes: [3, 5],
    });
    // C2D2: bosons, (2I+1)(I+1) = 6 symmetric, (2I+1)I = 3 antisymmetric spin functions.
    expect(exchangeStatistics(['2H', '12C', '12C', '2H'])).toEqual({
      kind: 'exchange',
      symmetricWeight: 6,
      antisymmetricWeight: 3,
      uModes: [3, 5],
    });
    // 13C2H2: two fermion pairs (1H, 13C): total symmetric required; 1H pair (3, 1) × 13C pair (3, 1):
    // symmetric 3·3 + 1·1 = 10, antisymmetric 3·1 + 1·3 = 6.
    expect(exchangeStatistics(['1H', '13C', '13C', '1H'])).toEqual({
      kind: 'exchange',
      symmetricWeight: 10,
      antisymmetricWeight: 6,
      uModes: [3, 5],
    });
    expect(exchangeStatistics(['16O', '12C', '16O'])).toEqual({
      kind: 'exchange',
      symmetricWeight: 1,
      antisymmetricWeight: 0,
      uModes: [2, 3],
    });
    expect(exchangeStatistics(['16O', '12C'])).toEqual({ kind: 'none' });
    const five = thrown(() => exchangeStatistics(['16O', '12C', '12C', '12C', '16O']));
    expect(five.code).toBe('INPUT_INVALID');
    expect(five.details).toEqual({ atoms: 5 });
    const unknown = thrown(() => exchangeStatistics(['7Li', '12C', '7Li']));
    expect(unknown.details).toEqual({ nuclide: '7Li' });
    expect(unknown.message).toBe('no nuclear spin tabulated for 7Li');
  });

  it('g/u of CO2 and C2H2 levels; exchange symmetry', () => {
    expect(isGerade({ v: [1, 0, 0], l: 0 }, [2, 3])).toBe(true);
    expect(isGerade({ v: [0, 1, 0], l: 1 }, [2, 3])).toBe(false);
    expect(isGerade({ v: [0, 0, 1], l: 0 }, [2, 3])).toBe(false);
    expect(isGerade({ v: [0, 1, 1], l: 1 }, [2, 3])).toBe(true);
    expect(isGerade({ v: [0, 0, 1, 0, 0], l: 0 }, [3, 5])).toBe(false);
    expect(isGerade({ v: [0, 0, 0, 1, 0], l: 1 }, [3, 5])).toBe(true);
    expect(isGerade({ v: [0, 0, 0, 0, 1], l: 1 }, [3, 5])).toBe(false);
    // Σg⁺ J even e: + parity, gerade → s; J odd e: − → a; Σu⁺ J odd e: − with u → s.
    expect(exchangeSymmetry({ v: [0, 0, 0], l: 0 }, 2, 'e', [2, 3])).toBe('s');
    expect(exchangeSymmetry({ v: [0, 0, 0], l: 0 }, 3, 'e', [2, 3])).toBe('a');
    expect(exchangeSymmetry({ v: [0, 0, 1], l: 0 }, 3, 'e', [2, 3])).toBe('s');
  });

  it('levels that exist: non-integer J, J below l, f of a Σ level, and which J are allowed', () => {
    const none = { kind: 'none' } as const;
    const co2 = exchangeStatistics(['16O', '12C', '16O']);
    const hcnLevel = { v: [0, 1, 0], l: 1 };
    expect(levelSpinWeight(none, hcnLevel, 2.5, 'e')).toBe(0);
    expect(levelSpinWeight(none, hcnLevel, 0, 'e')).toBe(0);
    expect(levelSpinWeight(none, hcnLevel, 1, 'f')).toBe(1);
    expect(levelSpinWeight(none, { v: [0, 0, 0], l: 0 }, 1, 'f')).toBe(0);
    expect(levelExists(none, { v: [0, 0, 0], l: 0 }, 0, 'e')).toBe(true);
    // CO2: ground state even J, 00⁰1 odd J; 01¹0 e odd J and f even J (Σg⁺, Σu⁺, Πu: note §2).
    expect(allowedJ(co2, { v: [0, 0, 0], l: 0 }, 'e')).toBe('even');
    expect(allowedJ(co2, { v: [0, 0, 1], l: 0 }, 'e')).toBe('odd');
    expect(allowedJ(co2, { v: [0, 1, 0], l: 1 }, 'e')).toBe('odd');
    expect(allowedJ(co2, { v: [0, 1, 0], l: 1 }, 'f')).toBe('even');
    expect(allowedJ(co2, { v: [0, 0, 0], l: 0 }, 'f')).toBe('none');
    expect(allowedJ(none, { v: [0, 0, 0], l: 0 }, 'e')).toBe('all');
    // Starting at J = max(l, 2): a level with l = 3 checks J = 4 and 3 (HCN 03³0 e: all).
    expect(allowedJ(none, { v: [0, 3, 0], l: 3 }, 'e')).toBe('all');
    expect(allowedJ(co2, { v: [0, 3, 0], l: 3 }, 'e')).toBe('odd');
    // Branch steps: 2 when every other lower level is missing in both components, else 1.
    expect(branchJStep(co2, { v: [0, 0, 0], l: 0 })).toBe(2);
    expect(branchJStep(co2, { v: [0, 1, 0], l: 1 })).toBe(2);
    expect(branchJStep(none, { v: [0, 1, 0], l: 1 })).toBe(1);
    expect(branchJStep(none, { v: [0, 0, 0], l: 0 })).toBe(1);
  });

  it('species statistics: tabulated spins, the even-even rule for the rest, missing levels', () => {
    const co2 = parseLinearSpecies('CO2');
    expect(speciesStatistics(co2)).toBe(speciesStatistics(co2));
    expect(hasMissingLevels(co2)).toBe(true);
    expect(hasMissingLevels(parseLinearSpecies('C2H2'))).toBe(false);
    expect(hasMissingLevels(parseLinearSpecies('OCS'))).toBe(false);
    expect(hasMissingLevels(parseLinearSpecies('C2D2'))).toBe(false);
    // 28Si is not in the spin table but is even-even (14, 14): I = 0, so 28Si-12C-28Si behaves as 16O-12C-16O.
    const sis = speciesStatistics(parseLinearSpecies('28Si-12C-28Si'));
    expect(sis).toEqual({ kind: 'exchange', symmetricWeight: 1, antisymmetricWeight: 0, uModes: [2, 3] });
    // 35Cl (17, 18) is neither tabulated nor even-even.
    const cl = thrown(() => speciesStatistics(parseLinearSpecies('35Cl-12C-35Cl')));
    expect(cl.details).toEqual({ nuclide: '35Cl' });
  });
});

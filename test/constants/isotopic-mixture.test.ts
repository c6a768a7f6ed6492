import { describe, expect, it } from 'vitest';
import {
  ELEMENTS,
  type ElementData,
  fractionInMixture,
  hasNaturalComposition,
  isotopicMixture,
  mostAbundantIsotope,
} from '../../src/constants/atomic-masses.js';

// What a bare symbol and a sample of an element mean. Most abundant isotopes: CIAAW, Isotopic compositions of the
// elements 2013 (Meija et al., Pure Appl. Chem. 88, 293 (2016)), from memory; laboratory isotopes of the elements
// without a natural composition as documented in src/constants/atomic-masses.ts.

const el = (s: string) => ELEMENTS[s] as ElementData;
const iso = (s: string, a: number) => el(s).isotopes.find((i) => i.massNumber === a) as ElementData['isotopes'][number];

describe('isotopes of the elements', () => {
  it.each([
    ['Li', 7],
    ['B', 11],
    ['Fe', 56],
    ['Sn', 120],
    ['Hg', 202],
    ['Pb', 208],
    ['Cl', 35],
    ['Tc', 99],
    ['Po', 210],
    ['Rn', 222],
    ['Ra', 226],
  ])('a bare %s means mass number %i', (s, a) => {
    expect(mostAbundantIsotope(el(s)).massNumber).toBe(a);
  });

  it('natural composition: C and Sn have one, Tc and Ra do not', () => {
    expect([hasNaturalComposition(el('C')), hasNaturalComposition(el('Sn'))]).toEqual([true, true]);
    expect([hasNaturalComposition(el('Tc')), hasNaturalComposition(el('Ra'))]).toEqual([false, false]);
  });

  it('a sample of carbon is 12C and 13C in their CIAAW fractions; 14C (in the table, abundance 0) is not in it', () => {
    const c = isotopicMixture(el('C'));
    expect(c.map((m) => [m.isotope.massNumber, m.fraction])).toEqual([
      [12, iso('C', 12).abundance],
      [13, iso('C', 13).abundance],
    ]);
    // CIAAW 2013 13C amount fraction 0.0107(8) (interval value, from memory): the table's best measurement lies in it.
    expect(Math.abs((c[1]?.fraction as number) - 0.0107)).toBeLessThan(8e-4);
    expect(c[0]?.isotope).toBe(iso('C', 12));
    expect(fractionInMixture(el('C'), iso('C', 13))).toBe(iso('C', 13).abundance);
    expect(fractionInMixture(el('C'), iso('C', 14))).toBe(0);
    expect(isotopicMixture(el('Sn'))).toHaveLength(10);
  });

  it('a sample of technetium is 99Tc alone: fraction 1 for it, 0 for 98Tc', () => {
    expect(fractionInMixture(el('Tc'), iso('Tc', 99))).toBe(1);
    expect(fractionInMixture(el('Tc'), iso('Tc', 98))).toBe(0);
  });
});

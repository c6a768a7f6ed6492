/**
 * Atomic masses from the Atomic Mass Evaluation 2020 (M. Wang et al., Chin. Phys. C 45, 030003 (2021)), in u,
 * with their standard uncertainties, and the representative isotopic compositions (amount fractions) of
 * IUPAC/CIAAW as tabulated by NIST "Atomic Weights and Isotopic Compositions". Values were taken from
 * independent conversions of the AME2020 mass table, which agree with each other to the digits shown.
 */

export interface IsotopeData {
  /** Mass number A. */
  readonly massNumber: number;
  /** Atomic mass in u (AME2020). */
  readonly mass: number;
  /** Standard uncertainty of the mass in u (AME2020). */
  readonly massUncertainty: number;
  /** Representative isotopic composition, amount fraction (IUPAC/CIAAW via NIST); 0 when not natural. */
  readonly abundance: number;
}

export interface ElementData {
  readonly symbol: string;
  readonly name: string;
  readonly isotopes: readonly IsotopeData[];
}

const iso = (massNumber: number, mass: number, massUncertainty: number, abundance: number): IsotopeData => ({
  massNumber,
  mass,
  massUncertainty,
  abundance,
});

/** The elements the reference library needs; extend with new rows from AME2020 and CIAAW. */
export const ELEMENTS: Readonly<Record<string, ElementData>> = {
  H: {
    symbol: 'H',
    name: 'hydrogen',
    isotopes: [iso(1, 1.007825031898, 1.4e-11, 0.999885), iso(2, 2.014101777844, 1.5e-11, 0.000115)],
  },
  C: {
    symbol: 'C',
    name: 'carbon',
    isotopes: [iso(12, 12.0, 0, 0.9893), iso(13, 13.003354835336, 2.5e-10, 0.0107)],
  },
  N: {
    symbol: 'N',
    name: 'nitrogen',
    isotopes: [iso(14, 14.003074004251, 2.4e-10, 0.99636), iso(15, 15.000108898266, 6.2e-10, 0.00364)],
  },
  O: {
    symbol: 'O',
    name: 'oxygen',
    isotopes: [
      iso(16, 15.994914619257, 3.2e-10, 0.99757),
      iso(17, 16.999131755953, 6.9e-10, 0.00038),
      iso(18, 17.999159612136, 6.9e-10, 0.00205),
    ],
  },
  F: { symbol: 'F', name: 'fluorine', isotopes: [iso(19, 18.99840316207, 8.8e-10, 1)] },
  S: {
    symbol: 'S',
    name: 'sulfur',
    isotopes: [iso(32, 31.97207117354, 1.41e-9, 0.9499), iso(34, 33.967867011, 4.7e-8, 0.0425)],
  },
  Cl: {
    symbol: 'Cl',
    name: 'chlorine',
    isotopes: [iso(35, 34.968852694, 3.8e-8, 0.7576), iso(37, 36.965902573, 5.5e-8, 0.2424)],
  },
  Br: {
    symbol: 'Br',
    name: 'bromine',
    isotopes: [iso(79, 78.918337574, 1.074e-6, 0.5069), iso(81, 80.916288197, 1.049e-6, 0.4931)],
  },
  I: { symbol: 'I', name: 'iodine', isotopes: [iso(127, 126.904472592, 3.887e-6, 1)] },
};

/** The most abundant isotope of an element (what a bare symbol means in a species string). */
export function mostAbundantIsotope(element: ElementData): IsotopeData {
  let best = element.isotopes[0] as IsotopeData;
  for (const i of element.isotopes) if (i.abundance > best.abundance) best = i;
  return best;
}

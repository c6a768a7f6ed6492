/**
 * Atomic masses and isotopic compositions of the elements Z = 1..92, built from the generated table
 * `nuclides.generated.ts` (see its header and scripts/generate-nuclides.mjs for the sources):
 * - masses: AME2020 (M. Wang et al., Chinese Phys. C 45, 030003 (2021); W.J. Huang et al., ibid. 030002), in u, with
 *   their standard uncertainties, for every nuclide with a natural isotopic composition and a few long-lived ones
 *   laboratories meet (3H, 14C, 99Tc, 147Pm, 210Po, 222Rn, 226Ra, ...);
 * - isotopic compositions: CIAAW, "Isotopic compositions of the elements 2013" (J. Meija et al., Pure Appl. Chem. 88,
 *   293 (2016)), Table 1, best measurement from a single terrestrial source (amount fractions), with uncertainties.
 * Elements without a stable isotope or a natural composition here (Tc, Pm, Po, Rn, Ra) have abundance 0 on every
 * isotope; a bare symbol then means the isotope named in `WITHOUT_NATURAL_COMPOSITION`. At, Fr and Ac are absent.
 */
import { ELEMENT_NAMES, NUCLIDE_ROWS } from './nuclides.generated.js';

export interface IsotopeData {
  /** Mass number A. */
  readonly massNumber: number;
  /** Atomic mass in u (AME2020). */
  readonly mass: number;
  /** Standard uncertainty of the mass in u (AME2020). */
  readonly massUncertainty: number;
  /** Isotopic composition, amount fraction (CIAAW 2013); 0 when the nuclide has no natural composition. */
  readonly abundance: number;
  /** Standard uncertainty of the amount fraction (CIAAW 2013); 0 where none is given. */
  readonly abundanceUncertainty: number;
}

export interface ElementData {
  readonly atomicNumber: number;
  readonly symbol: string;
  readonly name: string;
  /** In order of mass number. */
  readonly isotopes: readonly IsotopeData[];
}

/**
 * The isotope a bare symbol means for an element without a natural isotopic composition: the one laboratories
 * handle (99Tc and 147Pm from fission, 210Po, 222Rn and 226Ra from the uranium series).
 */
const WITHOUT_NATURAL_COMPOSITION: Readonly<Record<string, number>> = { Tc: 99, Pm: 147, Po: 210, Rn: 222, Ra: 226 };

function buildElements(): Readonly<Record<string, ElementData>> {
  const byZ = new Map<number, IsotopeData[]>();
  for (const [z, massNumber, mass, massUncertainty, abundance, abundanceUncertainty] of NUCLIDE_ROWS) {
    const list = byZ.get(z) ?? [];
    list.push({ massNumber, mass, massUncertainty, abundance, abundanceUncertainty });
    byZ.set(z, list);
  }
  const out: Record<string, ElementData> = {};
  for (const [atomicNumber, symbol, name] of ELEMENT_NAMES) {
    const isotopes = byZ.get(atomicNumber);
    if (!isotopes) continue;
    out[symbol] = Object.freeze({ atomicNumber, symbol, name, isotopes: Object.freeze(isotopes) });
  }
  return Object.freeze(out);
}

/** Every element with at least one nuclide in the table, by symbol (case-sensitive: "Co" is cobalt). */
export const ELEMENTS: Readonly<Record<string, ElementData>> = buildElements();

/** The element with this symbol, or undefined (never an inherited property of the record). */
export function elementBySymbol(symbol: string): ElementData | undefined {
  return Object.hasOwn(ELEMENTS, symbol) ? ELEMENTS[symbol] : undefined;
}

/** True when the element has a natural isotopic composition in the table. */
export function hasNaturalComposition(element: ElementData): boolean {
  return element.isotopes.some((i) => i.abundance > 0);
}

/**
 * The isotope a bare symbol means in a species string: the most abundant one, or for an element without a natural
 * composition the one in `WITHOUT_NATURAL_COMPOSITION`.
 */
export function mostAbundantIsotope(element: ElementData): IsotopeData {
  if (!hasNaturalComposition(element)) {
    const a = WITHOUT_NATURAL_COMPOSITION[element.symbol];
    return element.isotopes.find((i) => i.massNumber === a) ?? (element.isotopes[0] as IsotopeData);
  }
  let best = element.isotopes[0] as IsotopeData;
  for (const i of element.isotopes) if (i.abundance > best.abundance) best = i;
  return best;
}

/**
 * What a sample of the element is made of: its natural isotopes with their amount fractions, or, for an element
 * without a natural composition, the isotope a bare symbol means, with fraction 1.
 */
export function isotopicMixture(element: ElementData): readonly { isotope: IsotopeData; fraction: number }[] {
  if (!hasNaturalComposition(element)) return [{ isotope: mostAbundantIsotope(element), fraction: 1 }];
  return element.isotopes.filter((i) => i.abundance > 0).map((isotope) => ({ isotope, fraction: isotope.abundance }));
}

/** Amount fraction of one isotope in a sample of its element, as `isotopicMixture` defines the sample. */
export function fractionInMixture(element: ElementData, isotope: IsotopeData): number {
  return isotopicMixture(element).find((m) => m.isotope.massNumber === isotope.massNumber)?.fraction ?? 0;
}

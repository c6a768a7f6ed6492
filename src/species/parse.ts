import {
  ELEMENTS,
  type ElementData,
  elementBySymbol,
  fractionInMixture,
  type IsotopeData,
  isotopicMixture,
  mostAbundantIsotope,
} from '../constants/atomic-masses.js';
import { ScienceError } from '../errors.js';

/** One atom of a molecule: its element and the isotope meant. */
export interface Atom {
  readonly element: ElementData;
  readonly isotope: IsotopeData;
  /** True when the species string named the mass number (or used D); false when the default was taken. */
  readonly explicitIsotope: boolean;
}

export interface Isotopologue {
  /** Normalised form: mass numbers always written, atoms joined by '-', e.g. "1H-35Cl". */
  readonly formula: string;
  readonly atoms: readonly [Atom, Atom];
}

/** Longest accepted species string; protects the tokenizer from absurd input. */
const MAX_SPECIES_LENGTH = 40;
const TOKEN = /^(\d{1,3})?-?([A-Z][a-z]?)/;

/**
 * Parse a species string of the contract: element symbols in order, each optionally preceded by its mass number
 * ("12C16O", "13C-16O", "H35Cl", "D35Cl", "1H-79Br", "7Li1H", "23Na35Cl"). Symbols are case-sensitive, so a capital
 * letter always starts a new atom and a lower-case letter belongs to the capital before it: "NaCl" is Na + Cl,
 * "CO" is C + O while "Co" is cobalt, "HF" is H + F while "Hf" is hafnium. Digits before a symbol are its mass
 * number, never a count of atoms. A bare symbol means the most abundant isotope (CIAAW 2013); "D" is ²H and "T" is
 * ³H. Only diatomic molecules are accepted so far.
 */
export function parseSpecies(input: string): Isotopologue {
  const known = parsed.get(input);
  if (known) return known;
  const iso = readSpecies(input);
  // Bounded: a stream of distinct strings (hostile or not) cannot grow it past PARSED_KEPT entries.
  if (parsed.size >= PARSED_KEPT) parsed.clear();
  parsed.set(input, iso);
  return iso;
}

/**
 * Species already parsed, by the string as given: a request names its species once but several stages ask for the
 * isotopologue (the declared species, each given assignment, the masses), and the next request names the same few.
 * The values are frozen, so sharing them is safe.
 */
const parsed = new Map<string, Isotopologue>();
const PARSED_KEPT = 256;

function readSpecies(input: string): Isotopologue {
  const text = input.trim();
  if (text.length === 0 || text.length > MAX_SPECIES_LENGTH) {
    throw new ScienceError('SPECIES_INVALID', `species "${input.slice(0, MAX_SPECIES_LENGTH)}" is empty or too long`, {
      species: input.slice(0, MAX_SPECIES_LENGTH),
    });
  }
  const atoms: Atom[] = [];
  let rest = text;
  while (rest.length > 0) {
    if (rest.startsWith('-') && atoms.length > 0) rest = rest.slice(1);
    const m = TOKEN.exec(rest);
    if (!m) {
      throw new ScienceError(
        'SPECIES_INVALID',
        `species "${text}" cannot be read at "${rest}": expected an element symbol, optionally preceded by a mass number${caseHint(text)}`,
        { species: text, at: rest },
      );
    }
    const [whole, massText, symbolText] = m as unknown as [string, string | undefined, string];
    atoms.push(resolveAtom(symbolText, massText, text));
    rest = rest.slice(whole.length);
  }
  if (atoms.length !== 2) {
    throw new ScienceError(
      'SPECIES_NOT_DIATOMIC',
      `species "${text}" has ${atoms.length} atom(s); only diatomic molecules are supported`,
      { species: text, atoms: atoms.length },
    );
  }
  const pair = Object.freeze([Object.freeze(atoms[0]), Object.freeze(atoms[1])]) as readonly [Atom, Atom];
  return Object.freeze({ formula: formatFormula(pair), atoms: pair });
}

export function resolveAtom(symbol: string, massText: string | undefined, species: string): Atom {
  if (symbol === 'D' || symbol === 'T') {
    const massNumber = symbol === 'D' ? 2 : 3;
    if (massText !== undefined && Number(massText) !== massNumber) {
      throw new ScienceError('SPECIES_INVALID', `"${massText}${symbol}" in "${species}" contradicts itself`, {
        species,
        atom: `${massText}${symbol}`,
      });
    }
    return resolveAtom('H', String(massNumber), species);
  }
  const element = elementBySymbol(symbol);
  if (!element) {
    throw new ScienceError(
      'SPECIES_UNKNOWN_ELEMENT',
      `element "${symbol}" in "${species}" is not in the mass table${caseHint(species)}`,
      { species, element: symbol, known: Object.keys(ELEMENTS) },
    );
  }
  if (massText === undefined) {
    return { element, isotope: mostAbundantIsotope(element), explicitIsotope: false };
  }
  const massNumber = Number(massText);
  const isotope = element.isotopes.find((i) => i.massNumber === massNumber);
  if (!isotope) {
    throw new ScienceError(
      'SPECIES_UNKNOWN_ISOTOPE',
      `isotope ${massNumber}${symbol} in "${species}" is not in the mass table (known: ${element.isotopes
        .map((i) => `${i.massNumber}${symbol}`)
        .join(', ')})`,
      { species, isotope: `${massNumber}${symbol}` },
    );
  }
  return { element, isotope, explicitIsotope: true };
}

/** A hint for species written in one case ("NACL", "nacl"), whose symbols cannot be read. */
function caseHint(species: string): string {
  const letters = species.replace(/[^A-Za-z]/g, '');
  if (letters.length > 1 && (letters === letters.toUpperCase() || letters === letters.toLowerCase())) {
    return ' (element symbols are case-sensitive: write "NaCl", "SiO", "CS", not "NACL")';
  }
  return '';
}

export function formatFormula(atoms: readonly Atom[]): string {
  return atoms.map((a) => `${a.isotope.massNumber}${a.element.symbol}`).join('-');
}

/**
 * Every isotopologue of the same elements in a natural sample: the isotopes of each element's natural composition
 * (for an element without one, the isotope its bare symbol means).
 */
export function isotopologuesOf(species: Isotopologue): Isotopologue[] {
  const [a, b] = species.atoms;
  const out: Isotopologue[] = [];
  for (const { isotope: ia } of isotopicMixture(a.element)) {
    for (const { isotope: ib } of isotopicMixture(b.element)) {
      const atoms: [Atom, Atom] = [
        { element: a.element, isotope: ia, explicitIsotope: true },
        { element: b.element, isotope: ib, explicitIsotope: true },
      ];
      out.push({ formula: formatFormula(atoms), atoms });
    }
  }
  return out;
}

/** Natural abundance of the isotopologue: the product of its atoms' isotopic amount fractions (CIAAW 2013). */
export function naturalAbundance(species: Isotopologue): number {
  const [a, b] = species.atoms;
  return fractionInMixture(a.element, a.isotope) * fractionInMixture(b.element, b.isotope);
}

/**
 * The isotopologues a species string stands for, with their share of the sample: an atom written with its mass
 * number (or as D, T) is that isotope in every molecule, an atom written bare is its element's natural mixture. So
 * "HCl" is 1H-35Cl and 1H-37Cl at 0.758 : 0.242 (with 2H-35Cl, 2H-37Cl at about 1e-4), "DCl" is 2H-35Cl and 2H-37Cl
 * at 0.758 : 0.242, and "H35Cl" is 1H-35Cl alone. Most abundant first.
 */
export function isotopologueMixture(species: Isotopologue): { iso: Isotopologue; abundance: number }[] {
  const choices = (atom: Atom) =>
    atom.explicitIsotope
      ? [{ atom: { ...atom, explicitIsotope: true }, fraction: 1 }]
      : isotopicMixture(atom.element).map(({ isotope, fraction }) => ({
          atom: { element: atom.element, isotope, explicitIsotope: true },
          fraction,
        }));
  const out: { iso: Isotopologue; abundance: number }[] = [];
  for (const a of choices(species.atoms[0])) {
    for (const b of choices(species.atoms[1])) {
      const atoms: [Atom, Atom] = [a.atom, b.atom];
      out.push({ iso: { formula: formatFormula(atoms), atoms }, abundance: a.fraction * b.fraction });
    }
  }
  return out.sort((x, y) => y.abundance - x.abundance);
}

/**
 * The same molecule with only its enriched atoms named: an isotope that is not its element's most abundant one
 * stays (the 2H of 2H-35Cl), the others become their natural mixture (its 35Cl), so the library's DCl entry stands
 * for a deuterated sample of natural chlorine and not for HCl.
 */
export function enrichedAtomsOnly(species: Isotopologue): Isotopologue {
  const keep = (a: Atom): Atom => ({
    ...a,
    explicitIsotope: a.isotope.massNumber !== mostAbundantIsotope(a.element).massNumber,
  });
  return { ...species, atoms: [keep(species.atoms[0]), keep(species.atoms[1])] };
}

/** The same molecule with no isotope named: what "HCl" means as opposed to "H35Cl" (the natural mixture). */
export function elementsOnly(species: Isotopologue): Isotopologue {
  return {
    ...species,
    atoms: [
      { ...species.atoms[0], explicitIsotope: false },
      { ...species.atoms[1], explicitIsotope: false },
    ],
  };
}

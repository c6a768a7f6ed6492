import { fractionInMixture } from '../constants/atomic-masses.js';
import { ScienceError } from '../errors.js';
import { type Atom, resolveAtom } from '../species/parse.js';

/**
 * Species strings of linear polyatomic molecules.
 *
 * Two forms are read:
 * - a **chain**: the atoms in order along the axis, joined by '-', each optionally preceded by its mass number:
 *   "16O-12C-16O", "14N-14N-16O", "16O-12C-32S", "1H-12C-14N", "1H-12C-12C-1H", "16O-12C-18O", "D-12C-14N".
 *   Digits here always come BEFORE a symbol and are its mass number.
 * - an **everyday formula** of a known molecule: "CO2", "N2O", "OCS", "HCN", "C2H2", where a digit AFTER a symbol
 *   is a count of atoms. A mass number written before a symbol of such a formula names the isotope of every atom of
 *   that element: "13CO2" is 16O-13C-16O, "C18O2" is 18O-12C-18O, "H13CN" is 1H-13C-14N, "15N2O" is 15N-15N-16O,
 *   "DCN" is 2H-12C-14N, "13C2H2" is 1H-13C-13C-1H. Symbols without a mass number take the most abundant isotope.
 *   A count is one digit right after a symbol and not followed by another digit; a run of two or more digits
 *   is the mass number of the symbol after it ("C18O2": C, then 18O twice). Mixed isotopologues (16O-12C-18O,
 *   14N-15N-16O) are written as chains.
 * The normalised formula (echoed in responses) is always the chain with every mass number. A string of two atoms is
 * not read here: diatomic species keep their own parser (src/species/parse.ts).
 */

export interface LinearSpecies {
  /** Chain with mass numbers, e.g. "16O-12C-16O". */
  readonly formula: string;
  readonly atoms: readonly Atom[];
  /** Vibrational quanta of a level: 3 for triatomics, 5 for tetratomics. */
  readonly modes: 3 | 5;
  /** The chain reads the same both ways with the same isotopes (a centre of symmetry: g/u states). */
  readonly centrosymmetric: boolean;
  /** Molecular mass, u (AME2020), with its standard uncertainty. */
  readonly mass: { readonly value: number; readonly uncertainty: number };
}

/** The everyday formulas and their atom order along the axis. */
const FORMULAS: Readonly<Record<string, readonly string[]>> = {
  CO2: ['O', 'C', 'O'],
  N2O: ['N', 'N', 'O'],
  OCS: ['O', 'C', 'S'],
  HCN: ['H', 'C', 'N'],
  C2H2: ['H', 'C', 'C', 'H'],
  CS2: ['S', 'C', 'S'],
};

/** The everyday formulas accepted, for documentation and error messages. */
export const LINEAR_FORMULAS: readonly string[] = Object.keys(FORMULAS);

const MAX_LENGTH = 60;
const CHAIN_ATOM = /^(\d{1,3})?([A-Z][a-z]?)$/;
const FORMULA_TOKEN = /^(\d{1,3})?([A-Z][a-z]?)(\d(?!\d))?/;

/**
 * True when the string is meant as a linear polyatomic: a '-' chain of 3 or more atoms or an everyday formula of
 * the table above (with or without mass numbers). Anything else goes to the diatomic parser unchanged.
 */
export function isLinearSpeciesString(input: string): boolean {
  const text = input.trim();
  if (text.length === 0 || text.length > MAX_LENGTH) return false;
  if (text.includes('-')) return text.split('-').length >= 3;
  return formulaSkeleton(text) !== undefined;
}

/** Parses a chain or an everyday formula (see above). Throws SPECIES_* errors with the offending part. */
export function parseLinearSpecies(input: string): LinearSpecies {
  const text = input.trim();
  if (text.length === 0 || text.length > MAX_LENGTH) {
    throw new ScienceError('SPECIES_INVALID', `species "${text.slice(0, MAX_LENGTH)}" is empty or too long`, {
      species: text.slice(0, MAX_LENGTH),
    });
  }
  const atoms = text.includes('-') ? chainAtoms(text) : formulaAtoms(text);
  if (atoms.length < 3) {
    throw new ScienceError(
      'SPECIES_INVALID',
      `species "${text}" has ${atoms.length} atom(s): a linear polyatomic chain has 3 or 4 atoms (a diatomic is written without a third atom, e.g. "12C-16O")`,
      { species: text, atoms: atoms.length },
    );
  }
  if (atoms.length > 4) {
    throw new ScienceError(
      'SPECIES_INVALID',
      `species "${text}" has ${atoms.length} atoms: linear chains of 3 or 4 atoms are supported`,
      { species: text, atoms: atoms.length },
    );
  }
  return linearSpeciesOf(atoms);
}

function linearSpeciesOf(atoms: readonly Atom[]): LinearSpecies {
  const n = atoms.length;
  let centrosymmetric = true;
  for (let i = 0; i < n; i++) {
    const a = atoms[i] as Atom;
    const b = atoms[n - 1 - i] as Atom;
    if (a.element.symbol !== b.element.symbol || a.isotope.massNumber !== b.isotope.massNumber) centrosymmetric = false;
  }
  let mass = 0;
  let variance = 0;
  for (const a of atoms) {
    mass += a.isotope.mass;
    variance += a.isotope.massUncertainty ** 2;
  }
  return {
    formula: atoms.map((a) => `${a.isotope.massNumber}${a.element.symbol}`).join('-'),
    atoms,
    modes: n === 3 ? 3 : 5,
    centrosymmetric,
    mass: { value: mass, uncertainty: Math.sqrt(variance) },
  };
}

function chainAtoms(text: string): Atom[] {
  return text.split('-').map((part) => {
    const m = CHAIN_ATOM.exec(part);
    if (!m) {
      throw new ScienceError(
        'SPECIES_INVALID',
        `species "${text}" cannot be read at "${part}": each atom of a chain is an element symbol, optionally preceded by its mass number (e.g. "16O-12C-16O"); a digit after a symbol (a count) belongs only in the everyday formulas ${LINEAR_FORMULAS.join(', ')}`,
        { species: text, at: part },
      );
    }
    return resolveAtom(m[2] as string, m[1], text);
  });
}

interface FormulaToken {
  readonly mass: string | undefined;
  readonly symbol: string;
  readonly count: number;
}

function formulaTokens(text: string): FormulaToken[] | undefined {
  const out: FormulaToken[] = [];
  let rest = text;
  while (rest.length > 0) {
    const m = FORMULA_TOKEN.exec(rest);
    if (!m) return undefined;
    out.push({ mass: m[1], symbol: m[2] as string, count: m[3] === undefined ? 1 : Number(m[3]) });
    rest = rest.slice((m[0] as string).length);
  }
  return out;
}

/** The everyday formula a string spells once mass numbers are dropped and D/T read as H, or undefined. */
function formulaSkeleton(text: string): string | undefined {
  const tokens = formulaTokens(text);
  if (!tokens) return undefined;
  const skeleton = tokens
    .map((t) => `${t.symbol === 'D' || t.symbol === 'T' ? 'H' : t.symbol}${t.count > 1 ? t.count : ''}`)
    .join('');
  return FORMULAS[skeleton] !== undefined ? skeleton : undefined;
}

function formulaAtoms(text: string): Atom[] {
  const skeleton = formulaSkeleton(text);
  if (skeleton === undefined) {
    throw new ScienceError(
      'SPECIES_INVALID',
      `species "${text}" is neither a '-' chain of atoms nor one of the formulas ${LINEAR_FORMULAS.join(', ')}`,
      { species: text, formulas: LINEAR_FORMULAS },
    );
  }
  const isotopeOf = new Map<string, Atom>();
  for (const t of formulaTokens(text) as FormulaToken[]) {
    const atom = resolveAtom(t.symbol, t.mass, text);
    const key = atom.element.symbol;
    const seen = isotopeOf.get(key);
    if (seen && seen.isotope.massNumber !== atom.isotope.massNumber) {
      throw new ScienceError(
        'SPECIES_INVALID',
        `species "${text}" names two isotopes of ${key}: write a mixed isotopologue as a chain, e.g. "16O-12C-18O"`,
        { species: text },
      );
    }
    if (!seen || atom.explicitIsotope) isotopeOf.set(key, atom);
  }
  return (FORMULAS[skeleton] as readonly string[]).map((symbol) => isotopeOf.get(symbol) as Atom);
}

/**
 * Nuclear spin zero by the shell-model rule that every even-even nucleus (Z and N even) has I = 0 in its ground
 * state (e.g. Krane, Introductory Nuclear Physics, §5.1): 12C, 16O, 18O, 32S, 34S.
 */
export function hasZeroNuclearSpin(atom: Atom): boolean {
  const z = atom.element.atomicNumber;
  const n = atom.isotope.massNumber - z;
  return z % 2 === 0 && n % 2 === 0;
}

/** Natural abundance of the isotopologue: product of its atoms' amount fractions (CIAAW 2013). */
export function linearAbundance(species: LinearSpecies): number {
  return species.atoms.reduce((p, a) => p * fractionInMixture(a.element, a.isotope), 1);
}

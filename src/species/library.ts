import { type Isotopologue, parseSpecies } from './parse.js';
import { reducedMass } from './reduced-mass.js';

/**
 * The built-in reference library: ground-state (X ¹Σ⁺) constants of the diatomics labs most often record, each
 * value with its source (table and edition) and, in words, how far it was checked against that table: checked digit
 * for digit against a copy of the WebBook row, corroborated by a secondary copy, or recalled (low confidence).
 * Isotopologue entries not tabulated here are derived by Born–Oppenheimer mass scaling from a parent and say so.
 */

export type Provenance = 'published' | 'derived' | 'low-confidence';

/**
 * Edition of the library's values and sources; change it with any value. Responses report it together with a digest
 * of the whole library (services/provenance.ts), so that an edit is visible even if this is forgotten.
 */
export const LIBRARY_EDITION = '2026.12.2';

export interface LibraryValue {
  readonly value: number;
  readonly unit: 'cm-1' | 'angstrom';
  readonly source: string;
  readonly provenance: Provenance;
  readonly note?: string;
}

export type ConstantName =
  | 'omega_e'
  | 'omega_e_x_e'
  | 'omega_e_y_e'
  | 'omega_e_z_e'
  | 'B_e'
  | 'alpha_e'
  | 'D_e'
  | 'r_e';

export interface LibraryEntry {
  /** Normalised formula, e.g. "1H-35Cl". */
  readonly formula: string;
  readonly name: string;
  readonly state: string;
  readonly constants: Readonly<Partial<Record<ConstantName, LibraryValue>>>;
  /** For derived entries: the parent the constants were scaled from. */
  readonly derivedFrom?: string;
  readonly hazard: string;
}

/**
 * Sources. Every value below is from one table; what differs is how far this project has checked it against that
 * table, which each source string says in words (an auditor reads the string, not this comment).
 */
const HH =
  'K. P. Huber and G. Herzberg, Molecular Spectra and Molecular Structure IV. Constants of Diatomic Molecules ' +
  "(Van Nostrand Reinhold, New York, 1979), the X 1Σ+ row of the molecule's table, as reproduced in the NIST " +
  'Chemistry WebBook (NIST Standard Reference Database 69), "Constants of diatomic molecules"';
/** The same digits were read in a copy of the WebBook row (a data ledger of another open project, read 2026-12-02). */
const HH_CHECKED = `${HH}. Checked digit for digit against a copy of the WebBook row`;
const HH_MEM2 = `${HH}. Agrees with a secondary copy of the table; the primary table itself was not read`;
const HH_MEM = `${HH}. Low confidence: no copy of the table was read for this value, which was recalled; its last digits may be wrong`;

const v = (
  value: number,
  source: string,
  provenance: Provenance = 'published',
  note?: string,
  unit: 'cm-1' | 'angstrom' = 'cm-1',
): LibraryValue => ({
  value,
  unit,
  source,
  provenance,
  ...(note ? { note } : {}),
});

const HAZARD_CO = 'carbon monoxide is toxic';
const HAZARD_HX = 'corrosive and toxic';

const PARENTS: LibraryEntry[] = [
  {
    formula: '12C-16O',
    name: 'carbon monoxide',
    state: 'X 1Σ+',
    hazard: HAZARD_CO,
    constants: {
      omega_e: v(2169.81358, HH_CHECKED),
      omega_e_x_e: v(13.28831, HH_CHECKED),
      omega_e_y_e: v(0.010511, HH_MEM, 'low-confidence'),
      B_e: v(1.93128087, HH_CHECKED),
      alpha_e: v(0.01750441, HH_CHECKED),
      D_e: v(6.12147e-6, HH_MEM2),
      r_e: v(1.128323, HH_MEM2, 'published', undefined, 'angstrom'),
    },
  },
  {
    formula: '1H-35Cl',
    name: 'hydrogen chloride',
    state: 'X 1Σ+',
    hazard: `hydrogen chloride is ${HAZARD_HX}`,
    constants: {
      omega_e: v(2990.9463, HH_CHECKED),
      omega_e_x_e: v(52.8186, HH_CHECKED),
      omega_e_y_e: v(0.2243, HH_MEM, 'low-confidence'),
      omega_e_z_e: v(
        -0.0122,
        HH_MEM,
        'low-confidence',
        'with it G(1) − G(0) = 2885.977 cm-1, the measured band origin (recalled); without it 2886.038',
      ),
      B_e: v(10.593416, HH_CHECKED),
      alpha_e: v(0.307181, HH_CHECKED),
      D_e: v(5.3194e-4, HH_CHECKED),
      r_e: v(
        1.27455,
        HH_MEM,
        'low-confidence',
        'consistent with B_e and the AME2020 reduced mass through B_e μ r_e² = 16.857629 u Å² cm-1 (1.274552 Å)',
        'angstrom',
      ),
    },
  },
  {
    formula: '2H-35Cl',
    name: 'deuterium chloride',
    state: 'X 1Σ+',
    hazard: `deuterium chloride is ${HAZARD_HX}`,
    constants: {
      omega_e: v(2145.163, HH_MEM2),
      omega_e_x_e: v(27.1825, HH_MEM2),
      omega_e_y_e: v(0.08649, HH_MEM, 'low-confidence'),
      B_e: v(5.448794, HH_MEM2),
      alpha_e: v(0.113291, HH_MEM2),
      D_e: v(1.3976e-4, HH_MEM, 'low-confidence'),
      r_e: v(
        1.27458,
        HH_MEM,
        'low-confidence',
        'consistent with B_e and the AME2020 reduced mass through B_e μ r_e² = 16.857629 u Å² cm-1',
        'angstrom',
      ),
    },
  },
  {
    formula: '1H-79Br',
    name: 'hydrogen bromide',
    state: 'X 1Σ+',
    hazard: `hydrogen bromide is ${HAZARD_HX}`,
    constants: {
      omega_e: v(2648.975, HH_MEM2),
      omega_e_x_e: v(45.2175, HH_MEM2),
      omega_e_y_e: v(-0.0029, HH_MEM, 'low-confidence'),
      B_e: v(
        8.46488,
        HH_MEM2,
        'low-confidence',
        'as recalled, B_e and r_e are consistent only with the reduced mass of 1H-81Br; the pairing is unverified at the 3e-4 level',
      ),
      alpha_e: v(0.23328, HH_MEM2),
      D_e: v(3.4584e-4, HH_MEM, 'low-confidence', 'Kratzer 4B_e³/ω_e² gives 3.458e-4 cm-1, which agrees'),
      r_e: v(1.41444, HH_MEM2, 'low-confidence', 'see the note on B_e', 'angstrom'),
    },
  },
  {
    formula: '1H-19F',
    name: 'hydrogen fluoride',
    state: 'X 1Σ+',
    hazard: `hydrogen fluoride is ${HAZARD_HX} and acutely dangerous`,
    constants: {
      omega_e: v(4138.32, HH_MEM2),
      omega_e_x_e: v(89.88, HH_MEM2),
      omega_e_y_e: v(0.9, HH_MEM, 'low-confidence'),
      B_e: v(20.9557, HH_MEM2),
      alpha_e: v(0.798, HH_MEM2),
      D_e: v(2.151e-3, HH_MEM, 'low-confidence', 'Kratzer 4B_e³/ω_e² gives 2.149e-3 cm-1, which agrees'),
      r_e: v(0.916808, HH_MEM2, 'published', undefined, 'angstrom'),
    },
  },
  {
    formula: '2H-19F',
    name: 'deuterium fluoride',
    state: 'X 1Σ+',
    hazard: `deuterium fluoride is ${HAZARD_HX} and acutely dangerous`,
    constants: {
      omega_e: v(
        2998.192,
        HH_MEM,
        'low-confidence',
        'no copy of any DF value was found; mass scaling of HF gives 3000.08 cm-1 (Born–Oppenheimer, first order)',
      ),
      omega_e_x_e: v(45.761, HH_MEM, 'low-confidence'),
      B_e: v(11.00985, HH_MEM, 'low-confidence', 'mass scaling of HF gives 11.0133 cm-1'),
      alpha_e: v(0.2931, HH_MEM, 'low-confidence'),
      D_e: v(5.94e-4, HH_MEM, 'low-confidence'),
      r_e: v(0.91694, HH_MEM, 'low-confidence', undefined, 'angstrom'),
    },
  },
  {
    formula: '1H-127I',
    name: 'hydrogen iodide',
    state: 'X 1Σ+',
    hazard: `hydrogen iodide is ${HAZARD_HX}`,
    constants: {
      omega_e: v(2309.014, HH_MEM, 'low-confidence'),
      omega_e_x_e: v(39.6435, HH_MEM, 'low-confidence'),
      B_e: v(
        6.511,
        'derived here from r_e = 1.60916 Å (Huber & Herzberg 1979, Van Nostrand Reinhold, HI table, X 1Σ+ row; recalled) through B_e = K/(μ r_e²), CODATA 2018 and AME2020',
        'derived',
        'the recalled tabulated B_e, 6.4263 cm-1, is inconsistent with r_e and D_e and matches B_0 instead',
      ),
      alpha_e: v(0.1689, HH_MEM, 'low-confidence'),
      D_e: v(2.069e-4, HH_MEM, 'low-confidence'),
      r_e: v(1.60916, HH_MEM2, 'published', undefined, 'angstrom'),
    },
  },
];

/** Isotopologues derived by mass scaling: [formula, parent]. */
const DERIVED: [string, string][] = [
  ['13C-16O', '12C-16O'],
  ['12C-18O', '12C-16O'],
  ['1H-37Cl', '1H-35Cl'],
  ['1H-81Br', '1H-79Br'],
];

/** Power of ρ = √(μ_parent/μ) each constant scales with (first-order Born–Oppenheimer; Dunham's Y_kl ∝ μ^−(k/2+l)). */
const SCALING: Record<ConstantName, number> = {
  omega_e: 1,
  omega_e_x_e: 2,
  omega_e_y_e: 3,
  omega_e_z_e: 4,
  B_e: 2,
  alpha_e: 3,
  D_e: 4,
  r_e: 0,
};

function derive(formula: string, parent: LibraryEntry): LibraryEntry {
  const iso = parseSpecies(formula);
  const rho = Math.sqrt(reducedMass(parseSpecies(parent.formula)).value / reducedMass(iso).value);
  const constants: Partial<Record<ConstantName, LibraryValue>> = {};
  for (const [name, c] of Object.entries(parent.constants) as [ConstantName, LibraryValue][]) {
    constants[name] = {
      value: c.value * rho ** SCALING[name],
      unit: c.unit,
      source: `derived here from ${parent.formula} by Born–Oppenheimer mass scaling (ρ = ${rho.toFixed(9)}); parent value: ${c.source}`,
      provenance: 'derived',
      ...(c.note ? { note: c.note } : {}),
    };
  }
  return {
    formula: iso.formula,
    name: parent.name,
    state: parent.state,
    constants,
    derivedFrom: parent.formula,
    hazard: parent.hazard,
  };
}

const BY_FORMULA = new Map<string, LibraryEntry>();
for (const e of PARENTS) BY_FORMULA.set(e.formula, e);
for (const [f, parent] of DERIVED)
  BY_FORMULA.set(parseSpecies(f).formula, derive(f, BY_FORMULA.get(parent) as LibraryEntry));

export function libraryEntries(): LibraryEntry[] {
  return [...BY_FORMULA.values()];
}

export function libraryEntry(species: Isotopologue | string): LibraryEntry | undefined {
  const formula = typeof species === 'string' ? parseSpecies(species).formula : species.formula;
  return BY_FORMULA.get(formula);
}

/**
 * Constants of any isotopologue of a library molecule: the entry itself, or a mass-scaled copy of the entry of
 * an isotopologue of the same elements (the most abundant one first).
 */
export function constantsFor(species: Isotopologue): LibraryEntry | undefined {
  const direct = BY_FORMULA.get(species.formula);
  if (direct) return direct;
  const [a, b] = species.atoms;
  // Of the entries of the same elements, the one sharing most isotopes (2H-37Cl from 2H-35Cl, not from 1H-35Cl:
  // the smaller the mass change, the smaller the Born–Oppenheimer breakdown the scaling ignores).
  let parent: LibraryEntry | undefined;
  let shared = -1;
  for (const e of PARENTS) {
    const [pa, pb] = parseSpecies(e.formula).atoms;
    if (pa.element.symbol !== a.element.symbol || pb.element.symbol !== b.element.symbol) continue;
    const n =
      Number(pa.isotope.massNumber === a.isotope.massNumber) + Number(pb.isotope.massNumber === b.isotope.massNumber);
    if (n > shared) {
      parent = e;
      shared = n;
    }
  }
  return parent ? derive(species.formula, parent) : undefined;
}

/** Dunham coefficients ("k,l" → Y_kl) from an entry's customary constants. */
export function dunhamFromEntry(e: LibraryEntry): Map<string, number> {
  const c = e.constants;
  const y = new Map<string, number>();
  const put = (k: number, l: number, x: LibraryValue | undefined, sign: number) => {
    if (x) y.set(`${k},${l}`, sign * x.value);
  };
  put(1, 0, c.omega_e, 1);
  put(2, 0, c.omega_e_x_e, -1);
  put(3, 0, c.omega_e_y_e, 1);
  put(4, 0, c.omega_e_z_e, 1);
  put(0, 1, c.B_e, 1);
  put(1, 1, c.alpha_e, -1);
  put(0, 2, c.D_e, -1);
  return y;
}

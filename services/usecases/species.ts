import { ScienceError } from '../../src/errors.js';
import {
  LINEAR_REFERENCE,
  LINEAR_SOURCES,
  type ReferenceSpecies,
  type ReferenceValue,
} from '../../src/linear/reference.js';
import { isLinearSpeciesString, linearAbundance, parseLinearSpecies } from '../../src/linear/species.js';
import { levelLabel } from '../../src/linear/types.js';
import { type LibraryEntry, libraryEntries, libraryEntry } from '../../src/species/library.js';
import { naturalAbundance, parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { SAFETY_NOTICE } from '../notice.js';

function present(e: LibraryEntry) {
  const iso = parseSpecies(e.formula);
  const mu = reducedMass(iso);
  return {
    formula: e.formula,
    name: e.name,
    state: e.state,
    reducedMass: { value: mu.value, uncertainty: mu.uncertainty, unit: 'u' as const },
    naturalAbundance: naturalAbundance(iso),
    ...(e.derivedFrom ? { derivedFrom: e.derivedFrom } : {}),
    hazard: e.hazard,
    constants: { ...e.constants } as Record<
      string,
      NonNullable<LibraryEntry['constants'][keyof LibraryEntry['constants']]>
    >,
  };
}

/** A value of the linear library as a quantity with its source; no published uncertainty → null, never 0. */
function linearValue(x: ReferenceValue) {
  return {
    value: x.value,
    uncertainty: x.uncertainty ?? null,
    unit: 'cm-1' as const,
    status: x.status,
    source: x.source,
    ...(x.note ? { note: x.note } : {}),
  };
}

/** An entry of the linear polyatomic library (src/linear/reference.ts): the chain, its levels and their sources. */
function presentLinear(e: ReferenceSpecies) {
  const sp = parseLinearSpecies(e.formula);
  const used = new Set<string>();
  const cited = (x: ReferenceValue) => {
    for (const key of x.source.split('+')) used.add(key);
    return linearValue(x);
  };
  const levels = e.levels.map((l) => ({
    v: [...l.v],
    l: l.l,
    ...(l.r !== undefined ? { rank: l.r } : {}),
    label: levelLabel(l),
    databaseLabel: l.databaseLabel,
    name: l.name,
    G: cited(l.G),
    B: cited(l.B),
    D: cited(l.D),
    ...(l.H ? { H: cited(l.H) } : {}),
    ...(l.q ? { q: cited(l.q) } : {}),
    ...(l.qJ ? { qJ: cited(l.qJ) } : {}),
    ...(l.note ? { note: l.note } : {}),
  }));
  const otherModes = (e.otherModes ?? []).map((m) => ({ mode: m.mode, centre: cited(m.centre) }));
  const sources = Object.fromEntries(
    [...used].filter((k) => LINEAR_SOURCES[k]).map((k) => [k, { ...(LINEAR_SOURCES[k] as object) }]),
  ) as Record<string, { cite: string; address: string }>;
  return {
    formula: sp.formula,
    aliases: [...e.aliases],
    name: e.name,
    kind: 'linear' as const,
    mass: { value: sp.mass.value, uncertainty: sp.mass.uncertainty, unit: 'u' as const },
    naturalAbundance: linearAbundance(sp),
    modes: [...e.modes],
    hazard: e.hazard,
    levels,
    ...(otherModes.length > 0 ? { otherModes } : {}),
    sources,
  };
}

/** The linear library entry of a chain, read either way along the axis. */
function linearEntry(chain: string): ReferenceSpecies | undefined {
  return LINEAR_REFERENCE.find((e) => e.formula === chain || [...e.chain].reverse().join('-') === chain);
}

export function listSpecies() {
  return {
    species: libraryEntries().map(present),
    linear: LINEAR_REFERENCE.map(presentLinear),
    notice: SAFETY_NOTICE,
  };
}

/**
 * GET /v1/species/{formula}: a diatomic entry, or a linear polyatomic entry for chains and everyday formulas, with
 * the safety notice every result carries.
 */
export function getSpecies(formula: string) {
  const entry = isLinearSpeciesString(formula) ? getLinearSpecies(formula) : getDiatomicSpecies(formula);
  return { ...entry, notice: SAFETY_NOTICE };
}

export function getLinearSpecies(formula: string) {
  const sp = parseLinearSpecies(formula);
  const e = linearEntry(sp.formula);
  if (!e) {
    throw new ScienceError('SPECIES_NOT_IN_LIBRARY', `${sp.formula} is not in the linear reference library`, {
      species: sp.formula,
      known: LINEAR_REFERENCE.map((x) => x.formula),
    });
  }
  return presentLinear(e);
}

/** GraphQL `species`: diatomic entries only; a linear species is pointed to `linearSpecies`. */
export function getDiatomicSpeciesEntry(formula: string) {
  if (isLinearSpeciesString(formula)) {
    throw new ScienceError(
      'INPUT_INVALID',
      `"${formula}" is a linear polyatomic species: ask the query linearSpecies(formula: "${formula}")`,
      { species: formula },
    );
  }
  return getDiatomicSpecies(formula);
}

function getDiatomicSpecies(formula: string) {
  const iso = parseSpecies(formula);
  const e = libraryEntry(iso);
  if (!e) {
    throw new ScienceError('SPECIES_NOT_IN_LIBRARY', `${iso.formula} is not in the reference library`, {
      species: iso.formula,
      known: libraryEntries().map((x) => x.formula),
    });
  }
  return present(e);
}

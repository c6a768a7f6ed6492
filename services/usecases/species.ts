import { ScienceError } from '../../src/errors.js';
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

export function listSpecies() {
  return { species: libraryEntries().map(present), notice: SAFETY_NOTICE };
}

export function getSpecies(formula: string) {
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

import { ScienceError } from '../errors.js';
import type { Observation } from '../models/linear-model.js';
import { type Transition, upperJ, validateTransition } from '../models/transitions.js';
import type { MassValue } from '../species/reduced-mass.js';
import type { LineInput } from './types.js';

export interface ReadLines {
  /** The assigned lines, in input order, with provisional weights (1/σ² when σ is given, else 1). */
  readonly observations: readonly Observation[];
  /** Assignment of each assigned input line, by index (undefined for an unassigned one). */
  readonly transitions: AssignmentsByLine;
}

/** The assignment of the input line at an index: the line's own, read from the input (nothing is copied). */
export interface AssignmentsByLine {
  get(index: number): (Transition & { readonly source: 'given' | 'auto' }) | undefined;
}

/**
 * Stage 1a: check every line (position and uncertainty positive and finite, assignment valid, species with a
 * mass) and turn the assigned ones into observations. Throws INPUT_INVALID / SPECIES_INVALID with the line index,
 * and FIT_NO_ASSIGNED_LINES when nothing is assigned.
 */
export function readLines(input: readonly LineInput[], masses: ReadonlyMap<string, MassValue>): ReadLines {
  for (let i = 0; i < input.length; i++) {
    const l = input[i] as LineInput;
    if (l.uncertainty !== undefined && !(l.uncertainty > 0 && Number.isFinite(l.uncertainty))) {
      throw new ScienceError('INPUT_INVALID', `line ${i}: uncertainty ${l.uncertainty} must be positive and finite`, {
        line: i,
        uncertainty: l.uncertainty,
      });
    }
  }
  const observations: Observation[] = [];
  for (let index = 0; index < input.length; index++) {
    const l = input[index] as LineInput;
    if (!(l.position > 0) || !Number.isFinite(l.position)) {
      throw new ScienceError('INPUT_INVALID', `line ${index}: position ${l.position} must be positive and finite`, {
        line: index,
      });
    }
    const a = l.assignment;
    if (!a) continue;
    try {
      validateTransition(a);
    } catch (e) {
      if (e instanceof ScienceError) {
        throw new ScienceError(e.code, `line ${index}: ${e.message}`, { ...e.details, line: index });
      }
      throw e;
    }
    if (!masses.has(a.species)) {
      throw new ScienceError('SPECIES_INVALID', `line ${index}: species ${a.species} has no mass`, { line: index });
    }
    const sigma = l.uncertainty ?? 1;
    observations.push({
      index,
      species: a.species,
      upperV: a.band.upper,
      lowerV: a.band.lower,
      upperJ: upperJ(a),
      lowerJ: a.j,
      position: l.position,
      weight: 1 / (sigma * sigma),
    });
  }
  if (observations.length === 0) {
    throw new ScienceError('FIT_NO_ASSIGNED_LINES', 'no line carries an assignment, so there is nothing to fit', {
      lines: input.length,
    });
  }
  // Every line with an assignment was checked above, so a line's assignment is the one the fit uses (a map of
  // them, filled line by line, cost as much as the observations themselves on a 5 000-line list).
  return { observations, transitions: { get: (index) => input[index]?.assignment } };
}

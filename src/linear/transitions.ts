import { ScienceError } from '../errors.js';
import type { Branch } from '../models/transitions.js';
import type { LinearSpecies } from './species.js';
import { isGerade as isGeradeIn, levelSpinWeight, speciesStatistics } from './spin-statistics.js';
import { bandLabel, checkLevel, type LinearLevel, levelKey, type Parity, parityComponents } from './types.js';

/**
 * Selection rules of linear polyatomic molecules (Herzberg, Infrared and Raman Spectra, ch. IV.3; e/f rules of
 * Brown et al. 1975):
 * - ΔJ = 0, ±1; J ≥ l in both levels;
 * - total parity changes: P and R lines join e↔e and f↔f, Q lines e↔f;
 * - Δl = 0 (parallel band) or ±1 (perpendicular band); larger |Δl| is forbidden in the dipole approximation;
 * - Σ⁺ levels (l = 0) have only e components, so a Σ–Σ band has no Q branch while a Π–Σ band's Q branch reaches the
 *   f component of the Π level;
 * - in centrosymmetric chains whose exchanged nuclei have I = 0 (12C16O2) half the levels are missing: in a g
 *   vibrational state e levels have even J and f levels odd J, in a u state the reverse (the rule every 626 level
 *   of the HITRAN sample obeys, reference note §2); which levels exist comes from spin-statistics.ts (one rule for
 *   the whole module family), and in every centrosymmetric chain a band must join g and u (dipole).
 */

export interface LinearAssignment {
  readonly upper: LinearLevel;
  readonly lower: LinearLevel;
  readonly branch: Branch;
  /** Lower-state J″. */
  readonly j: number;
  /** Parity of the lower level; needed only when both levels have l ≥ 1 (otherwise it follows from the rules). */
  readonly parity?: Parity;
}

/** An assignment with everything the rules imply. */
export interface LinearTransition extends LinearAssignment {
  readonly upperJ: number;
  readonly lowerParity: Parity;
  readonly upperParity: Parity;
}

export const MAX_LINEAR_J = 300;

export type BandKind = 'parallel' | 'perpendicular';

/** Parallel (Δl = 0) or perpendicular (|Δl| = 1); throws ASSIGNMENT_INVALID for |Δl| > 1. */
export function bandKind(upper: LinearLevel, lower: LinearLevel): BandKind {
  const dl = Math.abs(upper.l - lower.l);
  if (dl === 0) return 'parallel';
  if (dl === 1) return 'perpendicular';
  throw new ScienceError(
    'ASSIGNMENT_INVALID',
    `band ${bandLabel(upper, lower)} changes l by ${dl}: only Δl = 0 (parallel) and Δl = ±1 (perpendicular) bands are allowed`,
    { upper, lower },
  );
}

/**
 * Whether the rotational level (J, parity) of a vibrational level exists in this species: J ≥ l, a component the
 * level has, and a nuclear-spin weight above zero (spin-statistics.ts, the one rule for missing levels).
 */
export function levelExists(species: LinearSpecies, level: LinearLevel, J: number, parity: Parity): boolean {
  if (J < level.l) return false;
  if (!parityComponents(level.l).includes(parity)) return false;
  return levelSpinWeight(speciesStatistics(species), level, J, parity) > 0;
}

function deltaJ(branch: Branch): number {
  return branch === 'R' ? 1 : branch === 'P' ? -1 : 0;
}

function otherParity(p: Parity): Parity {
  return p === 'e' ? 'f' : 'e';
}

/**
 * Checks an assignment against the rules above and fills in J′ and both parities. Throws ASSIGNMENT_INVALID with
 * the reason (a level that does not exist in this species, a parity the rules forbid, a missing parity, …).
 */
export function resolveTransition(species: LinearSpecies, a: LinearAssignment): LinearTransition {
  const label = `${a.branch}(${a.j}) of band ${safeLabel(a)}`;
  const fail = (why: string): never => {
    throw new ScienceError('ASSIGNMENT_INVALID', `${label}: ${why}`, {
      upper: a.upper,
      lower: a.lower,
      branch: a.branch,
      j: a.j,
    });
  };
  for (const [name, level] of [
    ['upper', a.upper],
    ['lower', a.lower],
  ] as const) {
    if (level.v.length !== species.modes) {
      fail(`the ${name} level has ${level.v.length} quanta; ${species.formula} has ${species.modes} modes`);
    }
    try {
      checkLevel(level);
    } catch (e) {
      if (e instanceof ScienceError) fail(e.message);
      throw e;
    }
  }
  if (!Number.isInteger(a.j) || a.j < 0 || a.j > MAX_LINEAR_J) fail(`J″ must be a whole number 0..${MAX_LINEAR_J}`);
  try {
    bandKind(a.upper, a.lower);
  } catch (e) {
    if (e instanceof ScienceError) fail(e.message);
    throw e;
  }
  const same = levelKey(a.upper) === levelKey(a.lower);
  if (same && a.branch === 'P') fail('lines within one vibrational level are written as R (J″+1 ← J″) or Q (e↔f)');
  const upperJ = a.j + deltaJ(a.branch);
  if (a.j < a.lower.l) fail(`J″ = ${a.j} is below l″ = ${a.lower.l}: the level does not exist`);
  if (upperJ < a.upper.l) fail(`J′ = ${upperJ} is below l′ = ${a.upper.l}: the level does not exist`);
  const lowerParity = lowerParityOf(a, fail);
  const upperParity = a.branch === 'Q' ? otherParity(lowerParity) : lowerParity;
  if (!parityComponents(a.upper.l).includes(upperParity)) {
    fail(`the upper Σ level has only e components, which a ${a.branch} line from ${lowerParity} cannot reach`);
  }
  if (!levelExists(species, a.lower, a.j, lowerParity)) {
    fail(`the lower level J = ${a.j} (${lowerParity}) is missing in ${species.formula} (nuclear-spin statistics)`);
  }
  if (!levelExists(species, a.upper, upperJ, upperParity)) {
    fail(`the upper level J = ${upperJ} (${upperParity}) is missing in ${species.formula} (nuclear-spin statistics)`);
  }
  return { ...a, upperJ, lowerParity, upperParity };
}

function lowerParityOf(a: LinearAssignment, fail: (why: string) => never): Parity {
  if (a.lower.l === 0) {
    if (a.parity === 'f') fail('a Σ lower level has only e components');
    return 'e';
  }
  if (a.upper.l === 0) {
    const implied: Parity = a.branch === 'Q' ? 'f' : 'e';
    if (a.parity !== undefined && a.parity !== implied) {
      fail(`a ${a.branch} line to a Σ upper level starts from the ${implied} component, not ${a.parity}`);
    }
    return implied;
  }
  if (a.parity === undefined) {
    fail('both levels have l ≥ 1: give the parity ("e" or "f") of the lower level');
  }
  return a.parity as Parity;
}

function safeLabel(a: LinearAssignment): string {
  try {
    return bandLabel(a.upper, a.lower);
  } catch {
    return `[${a.upper.v.join(',')}]–[${a.lower.v.join(',')}]`;
  }
}

/** Every line a band has up to J″ = jMax under the rules above (levels missing by spin statistics left out). */
export function bandTransitions(
  species: LinearSpecies,
  upper: LinearLevel,
  lower: LinearLevel,
  jMax: number,
): LinearTransition[] {
  bandKind(upper, lower);
  const stats = speciesStatistics(species);
  if (stats.kind === 'exchange' && isGeradeIn(upper, stats.uModes) === isGeradeIn(lower, stats.uModes)) {
    throw new ScienceError(
      'ASSIGNMENT_INVALID',
      `band ${bandLabel(upper, lower)} joins two ${isGeradeIn(upper, stats.uModes) ? 'g' : 'u'} states of ${species.formula}: it has no dipole (infrared) lines`,
      { upper, lower },
    );
  }
  const same = levelKey(upper) === levelKey(lower);
  const out: LinearTransition[] = [];
  const branches: Branch[] = same ? ['Q', 'R'] : ['P', 'Q', 'R'];
  for (const branch of branches) {
    for (const lowerParity of parityComponents(lower.l)) {
      for (let j = lower.l; j <= jMax; j++) {
        const upperJ = j + deltaJ(branch);
        const upperParity = branch === 'Q' ? otherParity(lowerParity) : lowerParity;
        if (same && branch === 'Q' && lowerParity === 'f') continue; // e→f and f→e are one line at ±ν; keep e→f
        if (upperJ < upper.l || !parityComponents(upper.l).includes(upperParity)) continue;
        if (!levelExists(species, lower, j, lowerParity) || !levelExists(species, upper, upperJ, upperParity)) continue;
        out.push({ upper, lower, branch, j, parity: lowerParity, upperJ, lowerParity, upperParity });
      }
    }
  }
  return out;
}

import { ScienceError } from '../errors.js';

export type Branch = 'P' | 'Q' | 'R';

/** A band v′–v″ (upper–lower). */
export interface Band {
  readonly upper: number;
  readonly lower: number;
}

/** One rovibrational transition of a ¹Σ–¹Σ band, identified by its lower-state J (J″). */
export interface Transition {
  readonly species: string;
  readonly band: Band;
  readonly branch: Branch;
  /** Lower-state J″. */
  readonly j: number;
}

/** Highest vibrational quantum number and J accepted; far beyond any diatomic band a lab records. */
export const MAX_V = 60;
export const MAX_J = 400;

const BAND = /^\s*(\d{1,2})\s*-\s*(\d{1,2})\s*$/;

export function parseBand(text: string): Band {
  const m = BAND.exec(text);
  if (!m) {
    throw new ScienceError('ASSIGNMENT_INVALID', `band "${text}" is not of the form "v'-v''" (e.g. "1-0")`, {
      band: text,
    });
  }
  return { upper: Number(m[1]), lower: Number(m[2]) };
}

export function formatBand(b: Band): string {
  return `${b.upper}-${b.lower}`;
}

/** Upper-state J′ of a transition: R adds one, P takes one away, Q keeps J. */
export function upperJ(t: Pick<Transition, 'branch' | 'j'>): number {
  return t.branch === 'R' ? t.j + 1 : t.branch === 'P' ? t.j - 1 : t.j;
}

/**
 * Check that a transition can exist in a ¹Σ–¹Σ spectrum: v′ ≥ v″, ΔJ = ±1 (no Q branch), J′ ≥ 0, and a pure
 * rotational "band" 0-0 style (v′ = v″) only in absorption, R(J″). Throws ASSIGNMENT_INVALID naming the fault.
 */
export function validateTransition(t: Transition): void {
  // The label is written only for a fault (every line of every fit passes here).
  if (!Number.isInteger(t.j) || t.j < 0) invalidTransition(t, 'J″ must be a whole number ≥ 0');
  if (t.j > MAX_J) invalidTransition(t, `J″ above ${MAX_J} is not supported`);
  if (t.band.upper > MAX_V || t.band.lower > MAX_V) invalidTransition(t, `v above ${MAX_V} is not supported`);
  if (t.band.upper < t.band.lower)
    invalidTransition(t, "the upper level v′ must not lie below the lower level v″ (write bands as v'-v'')");
  if (t.branch === 'Q') invalidTransition(t, 'ΔJ = 0 is forbidden in a ¹Σ–¹Σ band: there is no Q branch');
  if (t.branch === 'P' && t.j < 1) invalidTransition(t, 'P(0) does not exist: J′ would be −1');
  if (t.band.upper === t.band.lower && t.branch !== 'R')
    invalidTransition(t, 'pure rotational lines are R lines (J″+1 ← J″)');
}

function invalidTransition(t: Transition, why: string): never {
  throw new ScienceError('ASSIGNMENT_INVALID', `${t.branch}(${t.j}) of band ${formatBand(t.band)}: ${why}`, {
    band: formatBand(t.band),
    branch: t.branch,
    j: t.j,
  });
}

export function transitionKey(t: Transition): string {
  return `${t.species}|${formatBand(t.band)}|${t.branch}|${t.j}`;
}

export function transitionLabel(t: Transition): string {
  return `${t.species} ${formatBand(t.band)} ${t.branch}(${t.j})`;
}

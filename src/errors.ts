/**
 * Errors raised by the science layer. Each carries a stable `code` that the network face maps to one RFC 9457
 * problem type and to a GraphQL `extensions.code`, and a `details` object naming the offending value.
 * Soft problems never throw: they are warnings in the result.
 */
export type ScienceErrorCode =
  | 'SPECIES_INVALID'
  | 'SPECIES_UNKNOWN_ELEMENT'
  | 'SPECIES_UNKNOWN_ISOTOPE'
  | 'SPECIES_NOT_DIATOMIC'
  | 'SPECIES_NOT_IN_LIBRARY'
  | 'SPECIES_UNIDENTIFIED'
  | 'ASSIGNMENT_INVALID'
  | 'UNIT_INVALID'
  | 'FIT_TOO_FEW_LINES'
  | 'FIT_RANK_DEFICIENT'
  | 'FIT_NO_ASSIGNED_LINES'
  | 'NUMBERING_AMBIGUOUS'
  | 'INPUT_INVALID'
  | 'POTENTIAL_UNDETERMINED'
  | 'POTENTIAL_LEVELS_NOT_INCREASING'
  | 'POTENTIAL_CONSTANTS_INVALID'
  | 'POTENTIAL_EXTRAPOLATION_TOO_FAR';

export class ScienceError extends Error {
  readonly code: ScienceErrorCode;
  readonly details: Readonly<Record<string, unknown>>;

  constructor(code: ScienceErrorCode, message: string, details: Record<string, unknown> = {}) {
    super(message);
    this.name = 'ScienceError';
    this.code = code;
    this.details = details;
  }
}

/** What f returns, or undefined when the science refuses (a ScienceError); other errors are thrown. */
export function orUndefined<T>(f: () => T): T | undefined {
  try {
    return f();
  } catch (e) {
    if (e instanceof ScienceError) return undefined;
    throw e;
  }
}

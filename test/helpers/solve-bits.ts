import type { LeastSquaresResult } from '../../src/linalg/least-squares.js';

/**
 * Every figure of a least-squares result as plain numbers, for comparing two solves bit for bit with toEqual; with
 * `later`, also the leverages and condition number the result computes afterwards from its own factors.
 */
export function solveBits(r: LeastSquaresResult, options: { later?: boolean } = {}) {
  return {
    rank: r.rank,
    coefficients: Array.from(r.coefficients),
    covariance: Array.from(r.covariance),
    residuals: Array.from(r.residuals),
    chiSquare: r.chiSquare,
    leverages: r.leverages ? Array.from(r.leverages) : undefined,
    conditionNumber: r.conditionNumber,
    ...(options.later && r.later
      ? { later: { leverages: Array.from(r.later.leverages()), condition: r.later.conditionNumber() } }
      : {}),
  };
}

import { chiSquareSurvival } from '../stats/distributions.js';
import { nestedFTest, type SolvedModel, type UncertaintyMode } from './engine.js';

/**
 * p-value of the terms that `big` adds to `small` (a small value says the data support them).
 *
 * - a-posteriori: the nested F test, F = ((χ²_small − χ²_big)/q) / (χ²_big/ν_big), because the scale of the
 *   uncertainties is itself estimated from the residuals;
 * - absolute: the caller vouches for the scale, so Δχ² = χ²_small − χ²_big is χ² distributed with q degrees of
 *   freedom under the smaller model (Wilks' theorem; for linear least squares with Gaussian errors it is exact,
 *   e.g. Bevington & Robinson, Data Reduction and Error Analysis, 3rd ed., §11.4). The F test would spend
 *   degrees of freedom estimating a scale that is known, and refuse terms the data determine.
 */
export function termTest(small: SolvedModel, big: SolvedModel, mode: UncertaintyMode): number {
  if (mode !== 'absolute') return nestedFTest(small, big);
  const q = small.degreesOfFreedom - big.degreesOfFreedom;
  if (q <= 0) return 1;
  return chiSquareSurvival(Math.max(small.chiSquare - big.chiSquare, 0), q);
}

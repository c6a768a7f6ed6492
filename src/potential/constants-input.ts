import { ScienceError } from '../errors.js';
import { CONSTANT_TO_DUNHAM, type ConstantsInput, type PredictionConstant } from '../qa/predictions.js';
import type { DunhamCoefficient } from './potential-curve.js';

/**
 * Customary constants (ω_e, ω_e x_e, …, B_e, α_e, γ_e) as Dunham coefficients with their covariance: Y_kl = s·c
 * with s = ±1 (Y20 = −ω_e x_e, Y11 = −α_e; SCIENCE.md §1), so Σ_Y[i][j] = s_i s_j Σ_c[i][j]. Only the terms that
 * shape the potential (l = 0 and l = 1) are kept. The covariance, when given, overrides separate uncertainties.
 */
export function dunhamFromConstants(input: ConstantsInput): {
  coefficients: DunhamCoefficient[];
  covariance: Float64Array;
  names: PredictionConstant[];
} {
  const names = (Object.keys(CONSTANT_TO_DUNHAM) as PredictionConstant[]).filter(
    (n) => input.values[n] !== undefined && CONSTANT_TO_DUNHAM[n].l <= 1,
  );
  const p = names.length;
  const coefficients = names.map((n) => {
    const d = CONSTANT_TO_DUNHAM[n];
    return { k: d.k, l: d.l, value: d.sign * (input.values[n]?.value as number) };
  });
  const covariance = new Float64Array(p * p);
  const sign = names.map((n) => CONSTANT_TO_DUNHAM[n].sign);
  if (input.covariance) {
    const { names: cn, matrix } = input.covariance;
    if (matrix.length !== cn.length || matrix.some((row) => row.length !== cn.length)) {
      throw new ScienceError('INPUT_INVALID', 'the covariance matrix must be square, one row and column per name', {
        names: cn,
      });
    }
    const unknown = cn.filter((n) => input.values[n] === undefined);
    if (unknown.length > 0) {
      throw new ScienceError('INPUT_INVALID', 'the covariance names constants that are not given', { unknown });
    }
    cn.forEach((a, i) => {
      const ia = names.indexOf(a);
      if (ia < 0) return; // a constant that does not shape the potential (D_e, β_e, H_e)
      cn.forEach((b, j) => {
        const ib = names.indexOf(b);
        if (ib < 0) return;
        const v = matrix[i]?.[j] as number;
        const w = matrix[j]?.[i] as number;
        if (!Number.isFinite(v) || Math.abs(v - w) > 1e-9 * Math.max(Math.abs(v), Math.abs(w), 1e-300)) {
          throw new ScienceError('INPUT_INVALID', 'the covariance matrix must be finite and symmetric', {
            at: [a, b],
          });
        }
        if (i === j && v < 0) {
          throw new ScienceError('INPUT_INVALID', `the variance of ${a} is negative`, { name: a, variance: v });
        }
        covariance[ia * p + ib] = (sign[ia] as number) * (sign[ib] as number) * v;
      });
    });
  } else {
    names.forEach((n, i) => {
      const u = input.values[n]?.uncertainty ?? 0;
      covariance[i * p + i] = u * u;
    });
  }
  return { coefficients, covariance, names };
}

/**
 * The standard uncertainty a tabulated value carries from its printed digits alone: a value printed to d decimals
 * lies within half a unit of its last digit, uniformly (GUM, JCGM 100:2008, F.2.2.1: u = δ/√12 for a resolution
 * δ = 10^−d). The digits are read from the shortest decimal form of the number, so a trailing zero that was printed
 * is not seen and δ comes out ten times larger (the conservative side). A lower bound of the value's uncertainty:
 * it says nothing of how well the table's authors determined the constant.
 */
export function printedDigitsUncertainty(value: number): number {
  if (!Number.isFinite(value) || value === 0) return 0;
  const text = Math.abs(value).toExponential(); // shortest round-trip digits, e.g. "2.9909463e+3"
  const [mantissa, exponent] = text.split('e') as [string, string];
  const decimals = (mantissa.split('.')[1] ?? '').length - Number(exponent);
  return 10 ** -decimals / Math.sqrt(12);
}

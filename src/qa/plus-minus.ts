/**
 * "value ± uncertainty" for check messages: the uncertainty to two significant digits and the value to the same
 * decimal place, never fewer decimals than `minDecimals` (so a 0.000012 cm⁻¹ uncertainty is not printed as 0.0000).
 */
export function plusMinus(value: number, uncertainty: number, minDecimals: number): string {
  const decimals = decimalsForTwoDigits(uncertainty, minDecimals);
  return `${value.toFixed(decimals)} ± ${uncertainty.toFixed(decimals)}`;
}

/** Decimal places that show `uncertainty` with two significant digits, at least `minDecimals`, at most 12. */
export function decimalsForTwoDigits(uncertainty: number, minDecimals: number): number {
  if (!Number.isFinite(uncertainty) || uncertainty <= 0) return minDecimals;
  const twoDigits = 1 - Math.floor(Math.log10(uncertainty));
  return Math.min(12, Math.max(minDecimals, twoDigits));
}

/**
 * Vibrational energies and rotational constants as continuous functions of x = v + ½, from the Dunham
 * coefficients (J. L. Dunham, Phys. Rev. 41, 721 (1932)): G(x) = Σ_{k≥1} Y_k0 x^k (above the potential minimum,
 * Y00 left out) and B(x) = Σ_{k≥0} Y_k1 x^k. RKR needs them for every real v ≥ −½.
 */
export interface VibrationalSeries {
  /** Y10, Y20, Y30 … (index k − 1), cm⁻¹. */
  readonly g: readonly number[];
  /** Y01, Y11, Y21 … (index k), cm⁻¹. */
  readonly b: readonly number[];
}

/** G at x = v + ½, cm⁻¹ above the minimum. */
export function vibrationalEnergy(s: VibrationalSeries, x: number): number {
  let sum = 0;
  for (let k = s.g.length; k >= 1; k--) sum = (sum + (s.g[k - 1] as number)) * x;
  return sum;
}

/** dG/dv at x = v + ½, cm⁻¹. */
export function vibrationalSlope(s: VibrationalSeries, x: number): number {
  let sum = 0;
  for (let k = s.g.length; k >= 1; k--) sum = sum * x + k * (s.g[k - 1] as number);
  return sum;
}

/** B at x = v + ½, cm⁻¹. */
export function rotationalConstant(s: VibrationalSeries, x: number): number {
  let sum = 0;
  for (let k = s.b.length - 1; k >= 0; k--) sum = sum * x + (s.b[k] as number);
  return sum;
}

/**
 * [G(x) − G(x(1 − u²))] / u², computed without cancellation: 1 − (1 − u²)^k = u² Σ_{j<k} (1 − u²)^j. This is
 * what is left under the square root of the RKR integrands once the substitution v′ = v − (v + ½)u² has taken the
 * 1/√(G(v) − G(v′)) singularity out.
 */
export function energyGapOverU2(s: VibrationalSeries, x: number, u: number): number {
  const w = 1 - u * u;
  let sum = 0;
  let xk = 1;
  let q = 0; // Σ_{j<k} w^j
  let wj = 1;
  for (let k = 1; k <= s.g.length; k++) {
    xk *= x;
    q += wj;
    wj *= w;
    sum += (s.g[k - 1] as number) * xk * q;
  }
  return sum;
}

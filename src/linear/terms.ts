import type { LinearLevelConstants, Parity } from './types.js';

/**
 * Rotational term values of a vibrational level of a linear polyatomic molecule (Herzberg, Infrared and Raman
 * Spectra, ch. IV.1; Brown et al. 1975 for e/f), in cm⁻¹:
 *
 *   F_v(J) = G_v + B_v y − D_v y² + H_v y³ ∓ ½ (q_v x + q_J,v x²),   x = J(J+1),  y = x − l²,  J ≥ l,
 *
 * with the upper sign (−) for e and the lower (+) for f, for l ≥ 1 only (Σ levels have no doubling term). So
 * E(f) − E(e) = q_v J(J+1) + q_J,v [J(J+1)]² and q_v > 0 when the f component lies above the e one, as the HITRAN e/f labels
 * place it for the 01¹0 levels of HCN, N2O, OCS and CO2 (reference note, §2). q_v is the FULL splitting
 * coefficient; tables that print half of it (NIST Triatomic N2O q(010)) must be doubled before use.
 * G_v is the term of the B[J(J+1) − l²] form: the lowest level (J = l) of a Π state lies at G_v + B_v·0 ∓ q/2·2,
 * and the "band centre" of the B·J(J+1) form that other sources quote is G_v − B_v l² (HCN 01¹0: 713.4576 vs
 * 711.9796 cm⁻¹).
 */

/** y = J(J+1) − l², the rotational variable of a level with vibrational angular momentum l. */
export function rotationalVariable(l: number, J: number): number {
  return J * (J + 1) - l * l;
}

/** Sign of the l-doubling term: −1 for e, +1 for f (so E(f) − E(e) = q J(J+1)). */
export function paritySign(parity: Parity): -1 | 1 {
  return parity === 'e' ? -1 : 1;
}

/** F_v(J) of the formula above, cm⁻¹. The q term is applied only for l ≥ 1. */
export function termValue(c: LinearLevelConstants, l: number, J: number, parity: Parity): number {
  const y = rotationalVariable(l, J);
  let f = c.G + c.B * y - c.D * y * y + (c.H ?? 0) * y * y * y;
  if (l >= 1) {
    const x = J * (J + 1);
    f += paritySign(parity) * 0.5 * ((c.q ?? 0) * x + (c.qJ ?? 0) * x * x);
  }
  return f;
}

/**
 * The constant term of the same level written as a power series in J(J+1) per parity (the form that fits of
 * level energies per parity use, and the "band centre" many sources quote): expanding y = J(J+1) − l² gives
 * G = G_v − B_v l² − D_v l⁴ − H_v l⁶ (HCN 01¹0: G_v = 713.4613, G = 711.9796 cm⁻¹).
 */
export function powerSeriesOrigin(c: LinearLevelConstants, l: number): number {
  const l2 = l * l;
  return c.G - c.B * l2 - c.D * l2 * l2 - (c.H ?? 0) * l2 * l2 * l2;
}

/** Inverse of powerSeriesOrigin: G_v from the power-series constant G and the level's B, D, H. */
export function termOriginFromPowerSeries(G: number, c: Omit<LinearLevelConstants, 'G'>, l: number): number {
  const l2 = l * l;
  return G + c.B * l2 + c.D * l2 * l2 + (c.H ?? 0) * l2 * l2 * l2;
}

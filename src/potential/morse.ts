/**
 * The Morse oscillator V(r) = D_e (1 − e^{−a(r − r_e)})² (P. M. Morse, Phys. Rev. 34, 57 (1929)). Its exact
 * levels are G(v) = ω_e(v + ½) − ω_e x_e(v + ½)² with ω_e = 2a√(C D_e) and ω_e x_e = a² C (C = ħ²/2μ), hence
 * D_e = ω_e²/(4 ω_e x_e) and a = √(ω_e x_e / C); the equilibrium distance is r_e = √(C / B_e).
 */
export interface MorseParameters {
  /** Well depth, cm⁻¹. */
  readonly depth: number;
  /** Range parameter a, Å⁻¹. */
  readonly range: number;
  /** Equilibrium distance, Å. */
  readonly equilibrium: number;
}

/** Morse parameters from ω_e, ω_e x_e, B_e (cm⁻¹) and C = ħ²/2μ (cm⁻¹ Å²). */
export function morseFromConstants(omega: number, omegaX: number, bE: number, C: number): MorseParameters {
  return { depth: (omega * omega) / (4 * omegaX), range: Math.sqrt(omegaX / C), equilibrium: Math.sqrt(C / bE) };
}

export function morseEnergy(m: MorseParameters, r: number): number {
  const y = 1 - Math.exp(-m.range * (r - m.equilibrium));
  return m.depth * y * y;
}

/**
 * The classical turning points of a Morse potential at energy E < D_e, solved from V(r) = E:
 * 1 − e^{−a(r − r_e)} = ±√(E/D_e), so r± = r_e − ln(1 ∓ √(E/D_e)) / a (outer with the minus sign).
 */
export function morseTurningPoints(m: MorseParameters, energy: number): { rMin: number; rMax: number } {
  const s = Math.sqrt(energy / m.depth);
  return {
    rMin: m.equilibrium - Math.log(1 + s) / m.range,
    rMax: m.equilibrium - Math.log(1 - s) / m.range,
  };
}

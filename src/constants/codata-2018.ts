/**
 * Fundamental constants, CODATA 2018 (E. Tiesinga, P. J. Mohr, D. B. Newell, B. N. Taylor,
 * Rev. Mod. Phys. 93, 025010 (2021)). h, c and k_B are exact since the 2019 SI redefinition;
 * the atomic mass constant is measured.
 */

/** Planck constant, J s (exact). */
export const PLANCK_H = 6.62607015e-34;
/** Speed of light in vacuum, m s⁻¹ (exact). */
export const SPEED_OF_LIGHT = 299_792_458;
/** Boltzmann constant, J K⁻¹ (exact). */
export const BOLTZMANN_K = 1.380649e-23;
/** Atomic mass constant m_u = 1 u, kg, and its standard uncertainty. */
export const ATOMIC_MASS_CONSTANT = 1.6605390666e-27;
export const ATOMIC_MASS_CONSTANT_UNCERTAINTY = 5.0e-37;

/** 1 cm⁻¹ expressed in MHz: c × 100 m⁻¹ / 10⁶ (exact). */
export const MHZ_PER_WAVENUMBER = (SPEED_OF_LIGHT * 100) / 1e6;

/** Second radiation constant c₂ = hc/k_B in cm K (exact). */
export const SECOND_RADIATION_CM_K = ((PLANCK_H * SPEED_OF_LIGHT) / BOLTZMANN_K) * 100;

/**
 * The rotational-constant factor K = B·μ·r² = h / (8π² c m_u), in cm⁻¹ u Å².
 * The 1e20 turns m⁻² into Å⁻² and the 1/100 turns m⁻¹ into cm⁻¹.
 */
export const ROTATIONAL_FACTOR = ((PLANCK_H / (8 * Math.PI ** 2 * SPEED_OF_LIGHT * ATOMIC_MASS_CONSTANT)) * 1e20) / 100;
/** Standard uncertainty of K: only m_u is uncertain, and K ∝ 1/m_u. */
export const ROTATIONAL_FACTOR_UNCERTAINTY =
  (ROTATIONAL_FACTOR * ATOMIC_MASS_CONSTANT_UNCERTAINTY) / ATOMIC_MASS_CONSTANT;

import type { MoleculeConstants } from './independent-lines.js';

/**
 * Ground states X ¹Σ⁺ of species the reference library does not hold, for numbering from structure alone. Values
 * from Huber & Herzberg, Constants of Diatomic Molecules (1979), FROM MEMORY (the higher terms γ_e, β_e, H_e are
 * recalled magnitudes only, or estimates where marked).
 */
const HH = 'Huber & Herzberg (1979), from memory';
const c = (value: number, source = HH) => ({ value, source });

export const CS: MoleculeConstants = {
  formula: '12C-32S',
  constants: {
    omega_e: c(1285.08),
    omega_e_x_e: c(6.46),
    omega_e_y_e: c(0),
    B_e: c(0.8200436),
    alpha_e: c(0.0059182),
    gamma_e: c(-1.3e-6, 'magnitude from memory'),
    // D_0 from the rest frequencies of CS J = 1–0, 2–1, 3–2 (48 990.955, 97 980.953, 146 969.026 MHz, from memory):
    // ν = 2B(J+1) − 4D(J+1)³ gives D_0 = 39.9 kHz = 1.331e-6 cm⁻¹, within 0.3 % of Kratzer's 4B_e³/ω_e².
    D_e: c(1.331e-6, 'from the recalled CS rotational rest frequencies'),
    beta_e: c(-2e-9, 'magnitude from memory'),
    H_e: c(1e-13, 'order of magnitude, estimate'),
  },
};
export const SIO: MoleculeConstants = {
  formula: '28Si-16O',
  constants: {
    omega_e: c(1241.55),
    omega_e_x_e: c(5.966),
    omega_e_y_e: c(0),
    B_e: c(0.7267512),
    alpha_e: c(0.0050379),
    gamma_e: c(-3e-6, 'magnitude from memory'),
    D_e: c(9.92e-7),
    beta_e: c(-1e-9, 'magnitude from memory'),
    H_e: c(1e-13, 'order of magnitude, estimate'),
  },
};
export const LIH: MoleculeConstants = {
  formula: '7Li-1H',
  constants: {
    omega_e: c(1405.65),
    omega_e_x_e: c(23.2),
    omega_e_y_e: c(0.16, 'magnitude from memory'),
    B_e: c(7.5131),
    alpha_e: c(0.2132),
    gamma_e: c(1.6e-3, 'magnitude from memory'),
    D_e: c(8.617e-4),
    beta_e: c(-1e-5, 'magnitude from memory'),
    H_e: c(8e-8, 'order of magnitude, estimate'),
  },
};
export const NACL: MoleculeConstants = {
  formula: '23Na-35Cl',
  constants: {
    omega_e: c(366.0),
    omega_e_x_e: c(2.0),
    omega_e_y_e: c(0),
    B_e: c(0.218063),
    alpha_e: c(0.0016248),
    gamma_e: c(2e-6, 'magnitude from memory'),
    D_e: c(3.12e-7),
    beta_e: c(0),
    H_e: c(0),
  },
};

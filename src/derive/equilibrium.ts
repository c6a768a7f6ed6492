import { ATOMIC_MASS_CONSTANT, PLANCK_H, SPEED_OF_LIGHT } from '../constants/codata-2018.js';
import type { MassValue } from '../species/reduced-mass.js';
import { bondLength } from './bond-length.js';
import { propagate, type Quantity, quantity, subCovariance } from './quantity.js';

/** Dunham coefficients of one isotopologue with their covariance, indexed by "k,l". */
export interface DunhamSet {
  readonly keys: readonly string[];
  readonly values: readonly number[];
  /** Row-major covariance in the order of keys. */
  readonly covariance: ArrayLike<number>;
}

export interface EquilibriumConstants {
  omega_e?: Quantity;
  omega_e_x_e?: Quantity;
  omega_e_y_e?: Quantity;
  B_e?: Quantity;
  alpha_e?: Quantity;
  gamma_e?: Quantity;
  D_e?: Quantity;
  beta_e?: Quantity;
  H_e?: Quantity;
  r_e?: Quantity;
}

/**
 * Customary constants from Dunham coefficients (Dunham 1932; Herzberg's notation): ω_e = Y10, ω_e x_e = −Y20,
 * ω_e y_e = Y30, B_e = Y01, α_e = −Y11, γ_e = Y21, D_e = −Y02, β_e = −Y12, H_e = Y03. (The small Dunham
 * corrections that distinguish Y10 from ω_e, of order B_e²/ω_e, are below the precision of these fits and are not
 * applied; Y01 − B_e is of the same order.) A member is present only when its coefficient was fitted.
 */
export function equilibriumFromDunham(set: DunhamSet, mu: MassValue): EquilibriumConstants {
  const idx = (k: number, l: number) => set.keys.indexOf(`${k},${l}`);
  const get = (k: number, l: number, sign: number): Quantity | undefined => {
    const i = idx(k, l);
    if (i < 0) return undefined;
    const p = set.keys.length;
    return quantity(sign * (set.values[i] as number), Math.sqrt(set.covariance[i * p + i] as number), 'cm-1');
  };
  const out: EquilibriumConstants = {};
  const has = (k: number, l: number) => idx(k, l) >= 0;
  if (has(1, 0) && has(2, 0)) {
    out.omega_e = get(1, 0, 1);
    out.omega_e_x_e = get(2, 0, -1);
    if (has(3, 0)) out.omega_e_y_e = get(3, 0, 1);
  }
  if (has(0, 1) && has(1, 1)) {
    out.B_e = get(0, 1, 1);
    out.alpha_e = get(1, 1, -1);
    if (has(2, 1)) out.gamma_e = get(2, 1, 1);
    if (has(0, 2)) out.D_e = get(0, 2, -1);
    if (has(1, 2)) out.beta_e = get(1, 2, -1);
    if (has(0, 3)) out.H_e = get(0, 3, 1);
    const r = bondLength(out.B_e as Quantity, mu);
    if (r) out.r_e = r;
  }
  return out;
}

export interface CrossCheck {
  readonly id: string;
  readonly description: string;
  readonly formula: string;
  readonly value: Quantity;
  /** The fitted counterpart, where the fit determined one. */
  readonly fitted?: Quantity;
  readonly approximation: true;
}

/**
 * Approximate relations between the constants, reported as cross-checks, never as results: Kratzer
 * D_e ≈ 4B_e³/ω_e²; Pekeris α_e ≈ 6√(ω_e x_e B_e³)/ω_e − 6B_e²/ω_e (C. L. Pekeris, Phys. Rev. 45, 98 (1934));
 * the Morse well depth D_e ≈ ω_e²/(4ω_e x_e), D_0 ≈ D_e − G(0), and the Morse range parameter
 * a = ω_e √(2π²cμ/(D_e h)) (P. M. Morse, Phys. Rev. 34, 57 (1929)). Uncertainties propagate the fitted covariance.
 */
export function crossChecks(set: DunhamSet, eq: EquilibriumConstants, mu: MassValue): CrossCheck[] {
  const out = [...kratzerCheck(set, eq), ...pekerisCheck(set, eq), ...morseChecks(set, eq, mu)];
  // An approximation that does not apply to these numbers (a square root of a negative) is left out.
  return out.filter((c) => Number.isFinite(c.value.value) && Number.isFinite(c.value.uncertainty));
}

/** Some Dunham coefficients with their covariance block; undefined when one was not fitted. */
function pickCoefficients(set: DunhamSet, keys: readonly string[]) {
  const idx = keys.map((k) => set.keys.indexOf(k));
  if (idx.some((i) => i < 0)) return undefined;
  return { x: idx.map((i) => set.values[i] as number), cov: subCovariance(set.covariance, set.keys.length, idx) };
}

// Variables of the relations below are the Dunham coefficients themselves: Y10 = ω_e, Y20 = −ω_e x_e, Y01 = B_e,
// Y30 = ω_e y_e.

/** Kratzer: D_e ≈ 4B_e³/ω_e². */
function kratzerCheck(set: DunhamSet, eq: EquilibriumConstants): CrossCheck[] {
  const kr = pickCoefficients(set, ['1,0', '0,1']);
  if (!kr || !eq.omega_e || !eq.B_e) return [];
  const f = (x: readonly number[]) => (4 * (x[1] as number) ** 3) / (x[0] as number) ** 2;
  return [
    {
      id: 'kratzer-D_e',
      description: 'centrifugal distortion constant from the Kratzer relation',
      formula: 'D_e ≈ 4 B_e³ / ω_e²',
      value: quantity(f(kr.x), propagate(f, kr.x, kr.cov), 'cm-1'),
      ...(eq.D_e ? { fitted: eq.D_e } : {}),
      approximation: true,
    },
  ];
}

/** Pekeris: α_e ≈ 6√(ω_e x_e B_e³)/ω_e − 6B_e²/ω_e. */
function pekerisCheck(set: DunhamSet, eq: EquilibriumConstants): CrossCheck[] {
  const pk = pickCoefficients(set, ['1,0', '2,0', '0,1']);
  if (!pk || !eq.alpha_e) return [];
  const f = (x: readonly number[]) => {
    const [we, y20, be] = x as [number, number, number];
    return (6 * Math.sqrt(-y20 * be ** 3)) / we - (6 * be * be) / we;
  };
  return [
    {
      id: 'pekeris-alpha_e',
      description: 'vibration–rotation constant from the Pekeris relation (Morse potential)',
      formula: 'α_e ≈ 6 √(ω_e x_e B_e³) / ω_e − 6 B_e² / ω_e',
      value: quantity(f(pk.x), propagate(f, pk.x, pk.cov), 'cm-1'),
      fitted: eq.alpha_e,
      approximation: true,
    },
  ];
}

/** The Morse well depth, D_0 and the range parameter a. */
function morseChecks(set: DunhamSet, eq: EquilibriumConstants, mu: MassValue): CrossCheck[] {
  const mw = pickCoefficients(set, ['1,0', '2,0']);
  // A Morse well exists only for ω_e x_e > 0 (Y20 < 0); with Y20 ≥ 0 the relations would give a depth ≤ 0 or ∞.
  if (!mw || !eq.omega_e || !((mw.x[1] as number) < 0)) return [];
  const well = (x: readonly number[]) => (x[0] as number) ** 2 / (4 * -(x[1] as number));
  const g0 = (x: readonly number[]) => (x[0] as number) / 2 + (x[1] as number) / 4 + ((x[2] ?? 0) as number) / 8;
  const base = pickCoefficients(set, ['1,0', '2,0', '3,0']) ?? mw;
  const d0 = (x: readonly number[]) => well(x) - g0(x);
  const muKg = mu.value * ATOMIC_MASS_CONSTANT;
  const a = (x: readonly number[]) => {
    const we = (x[0] as number) * 100; // m⁻¹
    const depth = well(x) * 100 * PLANCK_H * SPEED_OF_LIGHT; // J
    return 2 * Math.PI * SPEED_OF_LIGHT * we * Math.sqrt(muKg / (2 * depth)) * 1e-10; // Å⁻¹
  };
  return [
    {
      id: 'morse-well-depth',
      description: 'dissociation energy from the minimum (Morse, Birge–Sponer limit)',
      formula: 'D_e ≈ ω_e² / (4 ω_e x_e)',
      value: quantity(well(mw.x), propagate(well, mw.x, mw.cov), 'cm-1'),
      approximation: true,
    },
    {
      id: 'morse-D_0',
      description: 'dissociation energy from v = 0 (Morse well depth less the zero-point energy G(0))',
      formula: 'D_0 ≈ ω_e² / (4 ω_e x_e) − G(0), G(0) = ω_e/2 − ω_e x_e/4 + ω_e y_e/8',
      value: quantity(d0(base.x), propagate(d0, base.x, base.cov), 'cm-1'),
      approximation: true,
    },
    {
      id: 'morse-a',
      description: 'Morse range parameter',
      formula: 'a = ω_e √(2π² c μ / (D_e h))',
      value: quantity(a(mw.x), propagate(a, mw.x, mw.cov), 'angstrom-1'),
      approximation: true,
    },
  ];
}

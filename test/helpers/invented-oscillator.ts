import { ROTATIONAL_FACTOR } from '../../src/constants/codata-2018.js';
import { type DunhamCoefficient, type PotentialInput, potentialCurves } from '../../src/potential/potential-curve.js';

// The constants are invented (not a molecule): G(v) = 2000x − 10x², B(v) = 2 − 0.02x with x = v + ½, μ = 1 u, so
// C = ħ²/2μ = ROTATIONAL_FACTOR cm⁻¹ Å² (CODATA 2018): a light, hydride-like oscillator whose first-order RKR curve
// misses its intervals by ≈ 0.1 cm⁻¹, so that the refinement has something to do.
export const SERIES = { g: [2000, -10], b: [2, -0.02] };
export const C = ROTATIONAL_FACTOR;
export const G = (v: number) => 2000 * (v + 0.5) - 10 * (v + 0.5) ** 2;
export const Bv = (v: number) => 2 - 0.02 * (v + 0.5);
export const BASE: DunhamCoefficient[] = [
  { k: 1, l: 0, value: 2000 },
  { k: 2, l: 0, value: -10 },
  { k: 0, l: 1, value: 2 },
  { k: 1, l: 1, value: -0.02 },
];
// Dunham's Y00 = B_e/4 + α_e ω_e/(12 B_e) + α_e² ω_e²/(144 B_e³) − ω_e x_e/4 (J. L. Dunham, Phys. Rev. 41, 721
// (1932), from memory) = 0.5 + 40/24 + 1600/1152 − 2.5 = 1.05556 cm⁻¹: the v-independent shift of the quantum
// levels from G(v), left out of the Dunham G(v).
export const Y00 = 0.5 + 40 / 24 + 1600 / 1152 - 2.5;

export const curves = (over: Partial<PotentialInput> = {}) =>
  potentialCurves({
    coefficients: BASE,
    covariance: new Float64Array(16),
    reducedMass: { value: 1, uncertainty: 0 },
    vMax: 1,
    vData: 1,
    ...over,
  });

import { gaussLegendreUnit } from './gauss-legendre.js';
import { energyGapOverU2, rotationalConstant, type VibrationalSeries, vibrationalEnergy } from './vibrational-terms.js';

/**
 * First-order RKR turning points (R. Rydberg, Z. Phys. 73, 376 (1932); O. Klein, Z. Phys. 76, 226 (1932);
 * A. L. G. Rees, Proc. Phys. Soc. 59, 998 (1947)):
 *   f(v) = (r₊ − r₋)/2 = √C ∫_{−½}^{v} dv′ / √(G(v) − G(v′)),
 *   g(v) = (1/r₋ − 1/r₊)/2 = (1/√C) ∫_{−½}^{v} B(v′) dv′ / √(G(v) − G(v′)),
 *   r± = √(f² + f/g) ± f,
 * with C = ħ²/2μ in cm⁻¹ Å². The substitution v′ = v − (v + ½)u² turns dv′/√(G(v) − G(v′)) into
 * 2(v + ½) du / √([G(v) − G(v′)]/u²), whose denominator stays finite at u = 0 (it tends to (v + ½) dG/dv), so
 * Gauss–Legendre in u ∈ [0, 1] converges quickly (the integrand is smooth; no endpoint treatment is needed).
 */
export interface RkrInput {
  readonly series: VibrationalSeries;
  /** ħ²/2μ in cm⁻¹ Å² (ROTATIONAL_FACTOR / μ[u]). */
  readonly hbar2Over2mu: number;
  /** B as a function of x = v + ½ when it is not the polynomial of `series` (tests of analytic cases). */
  readonly rotational?: (x: number) => number;
  /** Gauss–Legendre points in u. Default 64. */
  readonly quadraturePoints?: number;
}

export interface TurningPoints {
  readonly v: number;
  /** G(v) above the minimum, cm⁻¹. */
  readonly energy: number;
  /** Inner turning point r₋, Å. */
  readonly rMin: number;
  /** Outer turning point r₊, Å. */
  readonly rMax: number;
  /** The Klein integrals f (Å) and g (Å⁻¹). */
  readonly f: number;
  readonly g: number;
}

export function rkrTurningPoints(input: RkrInput, v: number): TurningPoints {
  const x = v + 0.5;
  const C = input.hbar2Over2mu;
  const rot = input.rotational ?? ((y: number) => rotationalConstant(input.series, y));
  if (x <= 0) {
    const re = Math.sqrt(C / rot(0));
    return { v, energy: 0, rMin: re, rMax: re, f: 0, g: 0 };
  }
  const { nodes, weights } = gaussLegendreUnit(input.quadraturePoints ?? 64);
  let fi = 0;
  let gi = 0;
  for (let i = 0; i < nodes.length; i++) {
    const u = nodes[i] as number;
    const w = weights[i] as number;
    const gap = energyGapOverU2(input.series, x, u);
    const common = (w * 2 * x) / Math.sqrt(gap);
    fi += common;
    gi += common * rot(x * (1 - u * u));
  }
  const f = Math.sqrt(C) * fi;
  const g = gi / Math.sqrt(C);
  const root = Math.sqrt(f * f + f / g);
  return { v, energy: vibrationalEnergy(input.series, x), rMin: root - f, rMax: root + f, f, g };
}

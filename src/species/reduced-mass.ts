import type { Isotopologue } from './parse.js';

export interface MassValue {
  readonly value: number;
  readonly uncertainty: number;
}

/**
 * Reduced mass μ = m₁m₂/(m₁+m₂) of a diatomic from its atomic masses (AME2020, in u), with the uncertainty
 * propagated from both masses: ∂μ/∂m₁ = (m₂/(m₁+m₂))², likewise for m₂. Atomic (not nuclear) masses are the
 * convention of the Dunham constants tabulated by Huber & Herzberg.
 */
export function reducedMass(species: Isotopologue): MassValue {
  const [a, b] = species.atoms;
  const m1 = a.isotope.mass;
  const m2 = b.isotope.mass;
  const total = m1 + m2;
  const d1 = (m2 / total) ** 2;
  const d2 = (m1 / total) ** 2;
  return {
    value: (m1 * m2) / total,
    uncertainty: Math.hypot(d1 * a.isotope.massUncertainty, d2 * b.isotope.massUncertainty),
  };
}

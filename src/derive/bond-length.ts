import { ROTATIONAL_FACTOR, ROTATIONAL_FACTOR_UNCERTAINTY } from '../constants/codata-2018.js';
import type { MassValue } from '../species/reduced-mass.js';
import { type Quantity, quantity } from './quantity.js';

/**
 * Bond length from a rotational constant: B·μ·r² = h/(8π²c u) = K (16.857 629 cm⁻¹ u Å² with CODATA 2018), so
 * r = √(K/(μB)). From B_e this is r_e; from B_v it is the effective, vibrationally averaged r_v. The relative
 * uncertainty is half the quadrature sum of those of B, μ and K.
 */
export function bondLength(b: Quantity, mu: MassValue): Quantity | undefined {
  // A non-positive rotational constant (nonsense data or a wrong assignment) has no bond length.
  if (!(b.value > 0)) return undefined;
  const r = Math.sqrt(ROTATIONAL_FACTOR / (mu.value * b.value));
  const rel =
    0.5 *
    Math.hypot(b.uncertainty / b.value, mu.uncertainty / mu.value, ROTATIONAL_FACTOR_UNCERTAINTY / ROTATIONAL_FACTOR);
  return quantity(r, r * rel, 'angstrom');
}

/**
 * The bench's one unassigned scan: CO at 1500 K, bands 1-0, 2-1 and 3-2, 25 % spurious and 10 % lost lines,
 * offset 0.1 cm⁻¹ and 20 ppm scale, σ 0.002 cm⁻¹ (seed 3). Shared by the in-process and the throughput benches so
 * that both time the same 432-peak list.
 */
import { syntheticScan } from '../test/helpers/scans.js';

export function hotCoScan(): ReturnType<typeof syntheticScan> {
  return syntheticScan({
    isotopologues: [{ species: 'CO', abundance: 1 }],
    bands: [
      { upper: 1, lower: 0, strength: 1 },
      { upper: 2, lower: 1, strength: 2 },
      { upper: 3, lower: 2, strength: 3 },
    ],
    temperature: 1500,
    offset: 0.1,
    scalePpm: 20,
    sigma: 0.002,
    missing: 0.1,
    spurious: 0.25,
    detection: 3e-4,
    seed: 3,
  });
}

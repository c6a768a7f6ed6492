import { chiSquareSurvival } from './distributions.js';

/** Two-sided standard normal tail P(|Z| > z), as the χ² tail with one degree of freedom at z². */
export function normalTwoSided(z: number): number {
  return chiSquareSurvival(z * z, 1);
}

const quantiles = new Map<number, number>();

/** The z with P(|Z| > z) = p, by bisection (monotone, 0 < p < 1); remembered, since fits ask for few p. */
export function normalTwoSidedQuantile(p: number): number {
  const hit = quantiles.get(p);
  if (hit !== undefined) return hit;
  const z = bisectQuantile(p);
  if (quantiles.size < 10_000) quantiles.set(p, z);
  return z;
}

function bisectQuantile(p: number): number {
  let lo = 0;
  let hi = 40;
  for (let i = 0; i < 100; i++) {
    const mid = 0.5 * (lo + hi);
    if (normalTwoSided(mid) > p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

import { SECOND_RADIATION_CM_K } from '../constants/codata-2018.js';
import { type Quantity, quantity } from '../derive/quantity.js';
import { solveLeastSquares } from '../linalg/least-squares.js';
import type { Branch } from '../models/transitions.js';
import { spanOf } from '../stats/extent.js';

export interface BoltzmannPoint {
  readonly position: number;
  readonly intensity: number;
  readonly branch: Branch;
  readonly j: number;
  /** Lower-state rotational energy E″ in cm⁻¹. */
  readonly lowerEnergy: number;
}

export interface BoltzmannPlot {
  readonly temperature: Quantity;
  readonly points: readonly { x: number; y: number; residual: number }[];
  readonly slope: number;
  readonly intercept: number;
}

/**
 * Rotational temperature from a Boltzmann plot (SCIENCE.md §5): ln(I / (ν S (1 − e^(−c₂ν/T)))) against E″ is a
 * straight line of slope −c₂/T, with Hönl–London factors S = J″+1 (R) and J″ (P). The stimulated-emission factor
 * depends on T itself, so the fit is iterated (it converges in a few steps; the factor is near 1 in the mid-IR).
 * Intensities are taken as equally uncertain in relative terms, so ln I carries equal weights.
 */
export function boltzmannTemperature(points: readonly BoltzmannPoint[]): BoltzmannPlot | undefined {
  const pts = points.filter((p) => p.intensity > 0 && (p.branch === 'R' ? p.j + 1 : p.j) > 0);
  const n = pts.length;
  if (n < 4) return undefined;
  const xs = pts.map((p) => p.lowerEnergy);
  if (spanOf(xs) <= 0) return undefined;
  let T = 296;
  let result: BoltzmannPlot | undefined;
  for (let iter = 0; iter < 20; iter++) {
    const y = Float64Array.from(pts, (p) => {
      const s = p.branch === 'R' ? p.j + 1 : p.j;
      return Math.log(p.intensity / (p.position * s * -Math.expm1((-SECOND_RADIATION_CM_K * p.position) / T)));
    });
    const design = new Float64Array(n * 2);
    pts.forEach((p, i) => {
      design[i] = 1;
      design[n + i] = p.lowerEnergy;
    });
    const r = solveLeastSquares({ rows: n, cols: 2, design, observations: y });
    if (r.rankDeficient) return undefined;
    const slope = r.coefficients[1] as number;
    if (!(slope < 0)) return undefined;
    const s2 = r.chiSquare / (n - 2);
    const sigmaSlope = Math.sqrt(s2 * (r.covariance[3] as number));
    const next = -SECOND_RADIATION_CM_K / slope;
    result = {
      temperature: quantity(next, (next * next * sigmaSlope) / SECOND_RADIATION_CM_K, 'K'),
      points: pts.map((p, i) => ({ x: p.lowerEnergy, y: y[i] as number, residual: r.residuals[i] as number })),
      slope,
      intercept: r.coefficients[0] as number,
    };
    if (Math.abs(next - T) < 1e-6 * T) break;
    T = next;
  }
  return result;
}

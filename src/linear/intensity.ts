import { SECOND_RADIATION_CM_K } from '../constants/codata-2018.js';
import { type Quantity, quantity } from '../derive/quantity.js';
import { solveLeastSquares } from '../linalg/least-squares.js';
import { spanOf } from '../stats/extent.js';

/**
 * Line intensities of linear polyatomic molecules: Hönl–London factors for parallel (Δl = 0) and perpendicular
 * (Δl = ±1) bands, Boltzmann populations with nuclear-spin weights, and a Boltzmann-plot rotational temperature.
 *
 * Hönl–London factors are computed from the Wigner 3j symbol (Hansson & Watson, J. Mol. Spectrosc. 233, 169
 * (2005), with the vibrational angular momentum l in place of Λ):
 *
 *   S(J′, l′ ← J″, l″) = (2J′+1)(2J″+1) · ( J′  1  J″ ; −l′  l′−l″  l″ )²
 *
 * normalised so that the branches from one J″ sum to 2J″+1. For a Σ–Σ band this is J″+1 (R) and J″ (P), as for
 * diatomics (SCIENCE.md §5); for Σ→Π, (J″+2)/2, (2J″+1)/2, (J″−1)/2 for R, Q, P. When both levels have l ≥ 1,
 * each branch is made of two parity components (e–e and f–f for P and R, e–f and f–e for Q), each carrying half.
 * The 3j symbol is evaluated with Racah's closed formula in log-factorials (Edmonds, Angular Momentum in Quantum
 * Mechanics, eq. 3.7.3).
 */

export type LinearBranch = 'P' | 'Q' | 'R';

const LOG_FACTORIAL: number[] = [0];
function logFactorial(n: number): number {
  for (let k = LOG_FACTORIAL.length; k <= n; k++) LOG_FACTORIAL.push((LOG_FACTORIAL[k - 1] as number) + Math.log(k));
  return LOG_FACTORIAL[n] as number;
}

/** Wigner 3j symbol (j1 j2 j3; m1 m2 m3) for integer arguments (Racah's formula). */
export function wigner3j(j1: number, j2: number, j3: number, m1: number, m2: number, m3: number): number {
  if (m1 + m2 + m3 !== 0) return 0;
  if (j3 < Math.abs(j1 - j2) || j3 > j1 + j2) return 0;
  if (Math.abs(m1) > j1 || Math.abs(m2) > j2 || Math.abs(m3) > j3) return 0;
  const triangle =
    logFactorial(j1 + j2 - j3) +
    logFactorial(j1 - j2 + j3) +
    logFactorial(-j1 + j2 + j3) -
    logFactorial(j1 + j2 + j3 + 1);
  const pre =
    0.5 *
    (triangle +
      logFactorial(j1 + m1) +
      logFactorial(j1 - m1) +
      logFactorial(j2 + m2) +
      logFactorial(j2 - m2) +
      logFactorial(j3 + m3) +
      logFactorial(j3 - m3));
  const kMin = Math.max(0, j2 - j3 - m1, j1 - j3 + m2);
  const kMax = Math.min(j1 + j2 - j3, j1 - m1, j2 + m2);
  let sum = 0;
  for (let k = kMin; k <= kMax; k++) {
    const den =
      logFactorial(k) +
      logFactorial(j1 + j2 - j3 - k) +
      logFactorial(j1 - m1 - k) +
      logFactorial(j2 + m2 - k) +
      logFactorial(j3 - j2 + m1 + k) +
      logFactorial(j3 - j1 - m2 + k);
    sum += (k % 2 === 0 ? 1 : -1) * Math.exp(pre - den);
  }
  const phase = (j1 - j2 - m3) % 2 === 0 ? 1 : -1;
  return phase * sum;
}

/** Upper J of a branch from the lower J″. */
export function upperJ(branch: LinearBranch, lowerJ: number): number {
  return branch === 'R' ? lowerJ + 1 : branch === 'P' ? lowerJ - 1 : lowerJ;
}

/**
 * Hönl–London factor of a whole branch line (both parity components together) for lower |l″|, upper |l′| and
 * lower J″; 0 where the line does not exist (J < l, |Δl| > 1, Q in a Σ–Σ band).
 */
export function honlLondonLinear(branch: LinearBranch, lowerL: number, upperL: number, lowerJ: number): number {
  const dl = upperL - lowerL;
  if (Math.abs(dl) > 1) return 0;
  const Jp = upperJ(branch, lowerJ);
  if (lowerJ < lowerL || Jp < upperL || Jp < 0) return 0;
  const w = wigner3j(Jp, 1, lowerJ, -upperL, dl, lowerL);
  const s = (2 * Jp + 1) * (2 * lowerJ + 1) * w * w;
  return s < 1e-12 ? 0 : s;
}

/** Factor of ONE parity component of a line: half the branch factor when both levels have l ≥ 1. */
export function honlLondonComponent(branch: LinearBranch, lowerL: number, upperL: number, lowerJ: number): number {
  const s = honlLondonLinear(branch, lowerL, upperL, lowerJ);
  return lowerL >= 1 && upperL >= 1 ? s / 2 : s;
}

/** exp(−c₂E/T): Boltzmann factor of a level at term value E (cm⁻¹, from the lowest level) and temperature T (K). */
export function boltzmannFactor(energy: number, temperature: number): number {
  return Math.exp((-SECOND_RADIATION_CM_K * energy) / temperature);
}

/** One line for intensity purposes. */
export interface LinearIntensityLine {
  /** Line position, cm⁻¹. */
  readonly position: number;
  readonly branch: LinearBranch;
  /** J″. */
  readonly j: number;
  readonly lowerL: number;
  readonly upperL: number;
  /** Absolute lower term value E″ (vibrational + rotational, from the ground level's J = 0), cm⁻¹. */
  readonly lowerEnergy: number;
  /** Nuclear-spin weight of the lower level (spin-statistics.ts); 0 when the level does not exist. */
  readonly spinWeight: number;
}

/**
 * Relative absorption intensity at temperature T: g_ns S exp(−c₂E″/T) ν (1 − exp(−c₂ν/T)), S the Hönl–London
 * factor of one parity component (SCIENCE.md §5; the partition function and the band strength are common factors).
 */
export function relativeIntensity(line: LinearIntensityLine, temperature: number): number {
  const s = honlLondonComponent(line.branch, line.lowerL, line.upperL, line.j);
  const nu = Math.abs(line.position);
  return (
    line.spinWeight *
    s *
    boltzmannFactor(line.lowerEnergy, temperature) *
    nu *
    -Math.expm1((-SECOND_RADIATION_CM_K * nu) / temperature)
  );
}

export interface LinearBoltzmannPoint extends LinearIntensityLine {
  readonly intensity: number;
}

export interface LinearBoltzmannPlot {
  readonly temperature: Quantity;
  readonly points: readonly { readonly x: number; readonly y: number; readonly residual: number }[];
  readonly slope: number;
  readonly intercept: number;
  /** Lines used (positive intensity, S > 0, g_ns > 0). */
  readonly used: number;
}

/**
 * Rotational temperature from a Boltzmann plot of lines of one or more bands of a linear molecule:
 * ln(I / (g_ns S ν (1 − e^(−c₂ν/T)))) against E″ is a straight line of slope −c₂/T. The nuclear-spin weight is
 * divided out, so the 1:3 alternation of C2H2 does not bend the plot, and the stimulated-emission factor is
 * iterated as in src/qa/temperature.ts. ln I carries equal weights (intensities equally uncertain in relative
 * terms). The uncertainty is the a-posteriori standard error of the slope carried to T (σ_T = T² σ_slope / c₂).
 * Returns undefined with fewer than 4 usable lines, no spread in E″ or a slope that is not negative.
 */
export function linearBoltzmannTemperature(points: readonly LinearBoltzmannPoint[]): LinearBoltzmannPlot | undefined {
  const pts = points.filter(
    (p) =>
      p.intensity > 0 &&
      p.spinWeight > 0 &&
      Number.isFinite(p.lowerEnergy) &&
      honlLondonComponent(p.branch, p.lowerL, p.upperL, p.j) > 0,
  );
  const n = pts.length;
  if (n < 4) return undefined;
  const xs = pts.map((p) => p.lowerEnergy);
  if (spanOf(xs) <= 0) return undefined;
  const s = pts.map((p) => honlLondonComponent(p.branch, p.lowerL, p.upperL, p.j) * p.spinWeight);
  let T = 296;
  let result: LinearBoltzmannPlot | undefined;
  for (let iter = 0; iter < 30; iter++) {
    const y = Float64Array.from(pts, (p, i) => {
      const nu = Math.abs(p.position);
      return Math.log(p.intensity / (nu * (s[i] as number) * -Math.expm1((-SECOND_RADIATION_CM_K * nu) / T)));
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
    const s2 = n > 2 ? r.chiSquare / (n - 2) : 0;
    const sigmaSlope = Math.sqrt(s2 * (r.covariance[3] as number));
    const next = -SECOND_RADIATION_CM_K / slope;
    result = {
      temperature: quantity(next, (next * next * sigmaSlope) / SECOND_RADIATION_CM_K, 'K'),
      points: pts.map((p, i) => ({ x: p.lowerEnergy, y: y[i] as number, residual: r.residuals[i] as number })),
      slope,
      intercept: r.coefficients[0] as number,
      used: n,
    };
    if (Math.abs(next - T) < 1e-9 * T) break;
    T = next;
  }
  return result;
}

import type { CandidateLine } from './candidates.js';
import { countNear, estimateOffset } from './offset.js';

/**
 * A reference that lacks the higher rotation–vibration terms (γ_e above all) places an overtone's lines off by an
 * amount that grows with J: its B_v drift as (v + ½)² (the γ_e term of B_v = B_e − α_e(v + ½) + γ_e(v + ½)²).
 * Generated H19F with γ_e 5.4e-3 cm⁻¹ puts 2-0 R(4) 1.04 cm⁻¹ and 3-0 R(4) 2.0 cm⁻¹ from a library without it,
 * while R(0) is off by 0.07 and 0.13: no single offset holds four of the band's strongest lines, and the band was
 * never found. A band that finds too few lines at one offset may therefore vote for an offset together with a
 * drift coefficient g, its reference positions moved by g[(v′ + ½)² J′(J′ + 1) − (v″ + ½)² J″(J″ + 1)].
 */

/** The J-dependent factor of the drift at a candidate: (v′ + ½)² J′(J′ + 1) − (v″ + ½)² J″(J″ + 1). */
export function driftFactor(c: Pick<CandidateLine, 'band' | 'branch' | 'j'>): number {
  const jUp = c.branch === 'R' ? c.j + 1 : c.branch === 'P' ? c.j - 1 : c.j;
  const up = c.band.upper + 0.5;
  const low = c.band.lower + 0.5;
  return up * up * jUp * (jUp + 1) - low * low * c.j * (c.j + 1);
}

/** Where a reference position moves under a placement: its offset, plus its drift when it has one. */
export function shiftAt(o: { readonly offset: number; readonly drift?: number }, c: CandidateLine): number {
  return o.drift === undefined ? o.offset : o.offset + o.drift * driftFactor(c);
}

/**
 * Largest drift coefficient searched for a species whose reference lacks γ_e: half of α_e²/B_e. Rule of thumb from
 * published γ_e of the light hydrides, recalled (from memory): HF 5.4e-3, HCl 1.7e-3, HBr 9.6e-4 cm⁻¹, 0.15–0.19 of
 * their α_e²/B_e; CO's 5.5e-7 is far below it. A reference with γ_e drifts by far less: none is searched.
 */
export function driftLimit(y: ReadonlyMap<string, number> | undefined): number {
  if (!y || y.has('2,1')) return 0;
  const b = y.get('0,1');
  const a = y.get('1,1');
  return b !== undefined && a !== undefined && b > 0 ? (0.5 * a * a) / b : 0;
}

/** The drift grid's step moves no strong line by more than this (a third of the offset vote's window), cm⁻¹. */
const DRIFT_STEP_MOVE = 0.02;
/** At most this many drift coefficients are tried each way per band and source. */
const MAX_DRIFT_STEPS = 200;

export interface DriftedVote {
  readonly offset: number;
  readonly drift: number;
  readonly tolerance: number;
  /** Strong lines matched at that offset and drift, on peaks no other band claims. */
  readonly matches: number;
}

/**
 * The offset and drift under which a band's strong lines (`top`) find the most free peaks (`sorted`, ascending),
 * counting only peaks farther than `claimTol` from every position in `claimed` (other bands' lines), drift within
 * ±maxDrift; ties go to the smaller drift.
 */
export function driftedVote(
  top: readonly CandidateLine[],
  observed: readonly number[],
  sorted: Float64Array,
  maxOffset: number,
  maxDrift: number,
  claimed: Float64Array,
  claimTol: number,
): DriftedVote | undefined {
  const factors = top.map(driftFactor);
  const largest = factors.reduce((m, f) => Math.max(m, Math.abs(f)), 0);
  if (largest === 0 || !(maxDrift > 0)) return undefined;
  const step = Math.max(DRIFT_STEP_MOVE / largest, maxDrift / MAX_DRIFT_STEPS);
  const steps = Math.floor(maxDrift / step);
  let best: DriftedVote | undefined;
  for (let k = 0; k <= 2 * steps; k++) {
    // 0, +1, −1, +2, −2, …: the smaller drift wins a tie
    const g = (k % 2 ? (k + 1) / 2 : -k / 2) * step;
    const moved = top.map((c, i) => ({ position: c.position + g * (factors[i] as number), intensity: c.intensity }));
    const est = estimateOffset(moved, observed, maxOffset, 0.06);
    if (!est) continue;
    const tolerance = Math.min(Math.max(4 * est.spread, 0.03), 0.3);
    const matches = countNear(moved, sorted, est.offset, tolerance, claimed, claimTol);
    if (!best || matches > best.matches) best = { offset: est.offset, drift: g, tolerance, matches };
  }
  return best;
}

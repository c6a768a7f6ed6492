import { type Quantity, quantity } from '../derive/quantity.js';
import { isRankDeficient, rmsResidual, solveModel } from '../fit/engine.js';
import type { LinearModel, Observation, Parameter } from '../models/linear-model.js';
import type { LinearSpecies } from './species.js';
import type { LinearTransition } from './transitions.js';
import { bandLabel, levelKey, levelLabel } from './types.js';

/**
 * Lower-state combination differences of Σ lower levels (Herzberg, Infrared and Raman Spectra, ch. IV.3):
 * R(J−1) and P(J+1) of one band share the upper level J (both reach its e component), so
 *
 *   Δ₂F″(J) = R(J−1) − P(J+1) = F″(J+1) − F″(J−1) = B″(4J + 2) − D″[(J+1)²(J+2)² − (J−1)²J²] + H″[…³]
 *
 * depends on the lower level alone and gives B″, D″ (and H″) with no upper-state model. Fitted independently of
 * the full fit and compared with it: a disagreement points at a wrong J numbering or a perturbed upper level.
 * (In 12C16O2 only odd J occur in the pairs: R(even) and P(even) share an odd upper J.)
 */

export interface LinearCombinationDifferences {
  readonly band: string;
  readonly level: string;
  readonly kind: 'lower';
  readonly points: readonly { j: number; value: number; uncertainty: number; residual: number }[];
  readonly B: Quantity;
  readonly D?: Quantity;
  readonly rms: number;
  readonly degreesOfFreedom: number;
  /** B of the same level from the full fit. */
  readonly fitted: Quantity;
  /** |B_cd − B_fit| in combined standard uncertainties. */
  readonly deviation: number;
}

interface Pair {
  readonly j: number;
  readonly value: number;
  readonly sigma: number | undefined;
}

const y = (J: number) => J * (J + 1);
function coefficient(kind: 'B' | 'D' | 'H', J: number): number {
  const a = y(J + 1);
  const b = y(J - 1);
  if (kind === 'B') return a - b;
  if (kind === 'D') return -(a * a - b * b);
  return a * a * a - b * b * b;
}

type InputLine = { readonly position: number; readonly uncertainty?: number };
type LevelConstants = { readonly key: string; readonly B: Quantity; readonly D?: Quantity };
type BandLines = { r: Map<number, number>; p: Map<number, number>; t: LinearTransition };

/** Accepted R and P lines of each band whose lower level has l = 0, keyed by band, in first-seen order. */
function collectBands(
  transitions: ReadonlyMap<number, LinearTransition>,
  rejected: ReadonlyMap<number, string>,
): Map<string, BandLines> {
  const bands = new Map<string, BandLines>();
  for (const [i, t] of transitions) {
    if (rejected.has(i) || t.lower.l !== 0 || levelKey(t.upper) === levelKey(t.lower)) continue;
    const k = `${levelKey(t.upper)}>${levelKey(t.lower)}`;
    const entry = bands.get(k) ?? bands.set(k, { r: new Map(), p: new Map(), t }).get(k);
    if (!entry) continue;
    if (t.branch === 'R') entry.r.set(t.j, i);
    if (t.branch === 'P') entry.p.set(t.j, i);
  }
  return bands;
}

/** R(J−1) − P(J+1) differences sharing the lower level J, sorted by J. */
function lowerStatePairs(band: BandLines, input: readonly InputLine[]): Pair[] {
  const pairs: Pair[] = [];
  for (const [jr, ir] of band.r) {
    const ip = band.p.get(jr + 2);
    if (ip === undefined) continue;
    const a = input[ir] as { position: number; uncertainty?: number };
    const b = input[ip] as { position: number; uncertainty?: number };
    const sigma =
      a.uncertainty !== undefined && b.uncertainty !== undefined ? Math.hypot(a.uncertainty, b.uncertainty) : undefined;
    pairs.push({ j: jr + 1, value: a.position - b.position, sigma });
  }
  return pairs;
}

/** Fit B″ (and D″ when known and there are enough pairs) to one band's differences; undefined when rank deficient. */
function fitLowerDifferences(
  species: LinearSpecies,
  t: LinearTransition,
  pairs: Pair[],
  full: LevelConstants,
): LinearCombinationDifferences | undefined {
  const fullB = full.B;
  pairs.sort((x, z) => x.j - z.j);
  const obs: Observation[] = pairs.map((x, i) => ({
    index: i,
    species: species.formula,
    upperV: 0,
    lowerV: 0,
    upperJ: x.j,
    lowerJ: x.j,
    position: x.value,
    weight: x.sigma !== undefined ? 1 / (x.sigma * x.sigma) : 1,
  }));
  const kinds: ('B' | 'D' | 'H')[] = full.D !== undefined && pairs.length >= 5 ? ['B', 'D'] : ['B'];
  const parameters: Parameter[] = kinds.map((k) => ({ key: k, name: `${k}″`, unit: 'cm-1', kind: k }));
  const model: LinearModel = { parameters, coefficient: (q, o) => coefficient(q.kind as 'B', o.lowerJ) };
  const fit = solveModel(model, obs, 'a-posteriori', false);
  if (isRankDeficient(fit)) return undefined;
  const n = kinds.length;
  const qAt = (i: number) => quantity(fit.values[i] as number, Math.sqrt(fit.covariance[i * n + i] as number), 'cm-1');
  const B = qAt(0);
  const points = pairs.map((x, i) => ({
    j: x.j,
    value: x.value,
    uncertainty: x.sigma ?? Math.sqrt(fit.degreesOfFreedom > 0 ? fit.chiSquare / fit.degreesOfFreedom : 0),
    residual: fit.residuals[i] as number,
  }));
  return {
    band: bandLabel(t.upper, t.lower),
    level: levelLabel(t.lower),
    kind: 'lower',
    points,
    B,
    ...(n > 1 ? { D: qAt(1) } : {}),
    rms: rmsResidual(fit),
    degreesOfFreedom: fit.degreesOfFreedom,
    fitted: fullB,
    deviation: Math.abs(B.value - fullB.value) / Math.hypot(B.uncertainty, fullB.uncertainty),
  };
}

export function linearCombinationDifferences(
  species: LinearSpecies,
  input: readonly InputLine[],
  transitions: ReadonlyMap<number, LinearTransition>,
  rejected: ReadonlyMap<number, string>,
  levels: readonly LevelConstants[],
): LinearCombinationDifferences[] {
  const out: LinearCombinationDifferences[] = [];
  for (const band of collectBands(transitions, rejected).values()) {
    const pairs = lowerStatePairs(band, input);
    const full = levels.find((l) => l.key === levelKey(band.t.lower));
    if (pairs.length < 4 || !full?.B) continue;
    const result = fitLowerDifferences(species, band.t, pairs, full);
    if (result) out.push(result);
  }
  return out;
}

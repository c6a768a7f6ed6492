import { ScienceError } from '../errors.js';
import type { Observation } from '../models/linear-model.js';
import { normalTwoSidedQuantile } from '../stats/normal.js';
import { reducedChiSquare, studentisedResiduals, type UncertaintyMode } from './engine.js';
import { type LevelSelection, predictWithVariance, selectLevelModel } from './level-selection.js';

export interface OutlierOptions {
  readonly maxOrder: number;
  readonly mode: UncertaintyMode;
  readonly termSignificance: number;
  /** Studentised-residual threshold; 0 turns rejection off. */
  readonly rejectionThreshold: number;
  /** Most lines that may be rejected, as a fraction of the assigned lines. */
  readonly maxRejectedFraction: number;
}

/** What stage 3 leaves: the lines kept, the reason for each rejected line, and the level model fitted to the rest. */
export interface OutlierResult {
  readonly kept: readonly Observation[];
  readonly rejected: ReadonlyMap<number, string>;
  readonly level: LevelSelection;
}

/**
 * Stage 3: reject lines whose externally studentised residual exceeds the threshold (at most 10 % of the kept lines
 * per round, the worst first, refitting and reselecting the model each round), then re-admit rejected lines that the
 * final model predicts within the threshold (a guard against swamping). The threshold is raised to a
 * Bonferroni-style floor Φ⁻¹(1 − 0.125/n): with many lines a fixed threshold would reject good lines by chance alone.
 */
export function rejectOutliers(
  observations: readonly Observation[],
  initial: LevelSelection,
  o: OutlierOptions,
  /** How to refit the kept lines (default: the diatomic level model of selectLevelModel). */
  refit?: (obs: readonly Observation[]) => LevelSelection,
): OutlierResult {
  let kept = observations;
  let level = initial;
  const rejected = new Map<number, string>();
  if (o.rejectionThreshold <= 0) return { kept, rejected, level };
  const reselect =
    refit ?? ((obs: readonly Observation[]) => selectLevelModel(obs, o.maxOrder, o.mode, o.termSignificance));
  const budget = Math.floor(o.maxRejectedFraction * observations.length);
  const threshold = Math.max(o.rejectionThreshold, normalTwoSidedQuantile(0.25 / observations.length));
  for (let iter = 0; iter < 12 && rejected.size < budget; iter++) {
    const t = studentisedResiduals(level.fit);
    const candidates: number[] = [];
    for (let i = 0; i < t.length; i++) if (Math.abs(t[i] as number) > threshold) candidates.push(i);
    if (candidates.length === 0) break;
    candidates.sort((a, b) => Math.abs(t[b] as number) - Math.abs(t[a] as number));
    const take = candidates.slice(0, Math.max(1, Math.min(budget - rejected.size, Math.ceil(0.1 * kept.length))));
    const drop = new Set(take.map((i) => (kept[i] as Observation).index));
    for (const i of take) {
      const ob = kept[i] as Observation;
      rejected.set(ob.index, rejectionReason(t[i] as number, threshold));
    }
    const next = kept.filter((x) => !drop.has(x.index));
    if (next.length <= level.fit.model.parameters.length + 1) {
      for (const i of drop) rejected.delete(i);
      break;
    }
    const refitted = refitUnlessUndetermined(reselect, next);
    if (!refitted) {
      for (const i of drop) rejected.delete(i);
      break;
    }
    kept = next;
    level = refitted;
  }
  if (rejected.size > 0) {
    const s2 = reducedChiSquare(level.fit) ?? 1;
    const back: Observation[] = [];
    for (const ob of observations) {
      if (!rejected.has(ob.index)) continue;
      const pred = predictWithVariance(level.fit, ob);
      if (pred === undefined) continue;
      const z = (ob.position - pred.value) / Math.sqrt(s2 / ob.weight + pred.variance);
      if (Math.abs(z) <= threshold) back.push(ob);
    }
    if (back.length > 0) {
      for (const ob of back) rejected.delete(ob.index);
      const ids = new Set(back.map((x) => x.index));
      kept = observations.filter((x) => ids.has(x.index) || !rejected.has(x.index));
      level = reselect(kept);
    }
  }
  return { kept, rejected, level };
}

/**
 * "studentised residual −4.05 exceeds 4.00": residual and threshold with two decimals, or as many more as it takes
 * for the printed residual to lie beyond the printed threshold (−4.0 beside 4.00 read as false).
 */
export function rejectionReason(t: number, threshold: number): string {
  let d = 2;
  while (d < 8 && !(Math.abs(Number(t.toFixed(d))) > Number(threshold.toFixed(d)))) d++;
  return `studentised residual ${t.toFixed(d)} exceeds ${threshold.toFixed(d)}`;
}

/**
 * The refit without a round's worst lines, or undefined when dropping them leaves some parameter undetermined (a
 * level that only they reached in its J, or a band they alone tied to the rest): such a line is not judged an
 * outlier, since nothing else measures what it measures. Held-out seed 200 (H¹⁹F 1-0 and 2-0 without σ): the
 * fundamental's four first lines reach v = 1 at J′ 0–2 only, too few for D_1; fitted without it they stood 20σ off,
 * the rejection took three and the level could no longer be fitted, and the whole band was dropped.
 */
function refitUnlessUndetermined(
  reselect: (obs: readonly Observation[]) => LevelSelection,
  obs: readonly Observation[],
): LevelSelection | undefined {
  try {
    return reselect(obs);
  } catch (e) {
    if (e instanceof ScienceError && e.code === 'FIT_RANK_DEFICIENT') return undefined;
    throw e;
  }
}

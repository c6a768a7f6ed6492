import { ScienceError } from '../errors.js';
import { levelModel, levelParameters, levelStructure } from '../models/level-model.js';
import type { Observation, Parameter } from '../models/linear-model.js';
import {
  isRankDeficient,
  type RankDeficiency,
  reducedChiSquare,
  type SolvedModel,
  solveModel,
  type UncertaintyMode,
  withLeverages,
} from './engine.js';
import { termTest } from './term-test.js';

/** The chosen level model, solved with leverages, and the centrifugal order of each level ("species|v"). */
export interface LevelSelection {
  readonly fit: SolvedModel;
  readonly orders: Map<string, number>;
}

export function rankError(def: RankDeficiency, what: string): ScienceError {
  const groups = def.groups.map((g) => g.map((x) => x.name));
  return new ScienceError(
    'FIT_RANK_DEFICIENT',
    `the ${what} cannot be determined from these lines: ${groups.map((g) => g.join(' / ')).join('; ')} cannot be told apart`,
    { parameters: [...new Set(groups.flat())], groups },
  );
}

/**
 * Distinct J values that touch each level, which bound the rotational terms the level can support; keyed
 * "species|v" in the order the levels are first met. Counted with numeric keys (J ≤ MAX_J < 1024): a string key per
 * observation cost more than the rest of this function.
 */
function distinctJ(obs: readonly Observation[]): Map<string, number> {
  const seen = new Map<string, Map<number, Set<number>>>();
  const order: [string, Set<number>][] = [];
  const add = (s: string, v: number, j: number) => {
    let bySpecies = seen.get(s);
    if (!bySpecies) {
      bySpecies = new Map();
      seen.set(s, bySpecies);
    }
    let set = bySpecies.get(v);
    if (!set) {
      set = new Set();
      bySpecies.set(v, set);
      order.push([`${s}|${v}`, set]);
    }
    set.add(j);
  };
  for (const o of obs) {
    add(o.species, o.upperV, o.upperJ);
    add(o.species, o.lowerV, o.lowerJ);
  }
  return new Map(order.map(([k, set]) => [k, set.size]));
}

/**
 * Stage 2 (and again after each round of outlier rejection): start from T and B for every level; add D, then H,
 * then L to the levels with enough distinct J while the term test (`termTest`: the nested F test, or the χ²
 * difference when the uncertainties are absolute) finds the added group significant.
 */
export function selectLevelModel(
  obs: readonly Observation[],
  maxOrder: number,
  mode: UncertaintyMode,
  alpha: number,
): LevelSelection {
  const structure = levelStructure(obs);
  const orders = new Map<string, number>();
  for (const s of structure.species)
    for (const v of structure.levels.get(s) as readonly number[]) orders.set(`${s}|${v}`, 1);
  const baseParams = levelParameters(structure, orders);
  if (obs.length < baseParams.length) {
    throw new ScienceError(
      'FIT_TOO_FEW_LINES',
      `${obs.length} assigned line(s) cannot determine the ${baseParams.length} parameters the bands need at the least (${baseParams.map((x) => x.name).join(', ')})`,
      { lines: obs.length, parameters: baseParams.length },
    );
  }
  const first = solveModel(levelModel(baseParams), obs, mode, false);
  if (isRankDeficient(first)) throw rankError(first, 'level model');
  let current: SolvedModel = first;
  const nj = distinctJ(obs);
  for (let next = 2; next <= maxOrder; next++) {
    const eligible = [...orders].filter(([k, o]) => o === next - 1 && (nj.get(k) ?? 0) >= next + 2).map(([k]) => k);
    if (eligible.length === 0) break;
    const trial = new Map(orders);
    for (const k of eligible) trial.set(k, next);
    const params = levelParameters(structure, trial);
    if (params.length >= obs.length) break;
    const t = solveModel(levelModel(params), obs, mode, false);
    if (isRankDeficient(t)) break;
    if (termTest(current, t, mode) >= alpha) break;
    current = t;
    for (const k of eligible) orders.set(k, next);
  }
  // The chosen model with leverages for the studentised residuals (from its own solve's factors).
  const completed = withLeverages(current);
  if (completed) return { fit: completed, orders };
  const final = solveModel(current.model, obs, mode, true);
  return { fit: isRankDeficient(final) ? current : final, orders };
}

/** Scratch for predictWithVariance: the numbers and coefficients of a line's non-zero parameters (grown on demand). */
let nzScratch = new Int32Array(32);
let gScratch = new Float64Array(32);

/** Position and variance (from the covariance) of an observation predicted by a solved model. */
export function predictWithVariance(fit: SolvedModel, o: Observation): { value: number; variance: number } | undefined {
  const params = fit.model.parameters;
  const p = params.length;
  if (nzScratch.length < p) {
    nzScratch = new Int32Array(p);
    gScratch = new Float64Array(p);
  }
  const nz = nzScratch;
  const g = gScratch;
  // Only the parameters of the line's two levels have a coefficient: the sums run over those, in the order of the
  // full sums (the terms left out are zeros, so the bits are the same); a model that knows them lists them.
  let m = 0;
  const only = fit.model.parametersOf?.(o);
  const n = only ? only.length : p;
  for (let a = 0; a < n; a++) {
    const i = only ? (only[a] as number) : a;
    const c = fit.model.coefficient(params[i] as Parameter, o);
    if (c !== 0) {
      nz[m] = i;
      g[m] = c;
      m++;
    }
  }
  // A line of a level the fit no longer holds (all its lines rejected) has no prediction.
  if (m === 0 && p > 0) return undefined;
  let value = 0;
  let variance = 0;
  const values = fit.values;
  const cov = fit.covariance;
  for (let a = 0; a < m; a++) {
    const i = nz[a] as number;
    const gi = g[a] as number;
    value += gi * (values[i] as number);
    const row = i * p;
    for (let b = 0; b < m; b++) variance += gi * (cov[row + (nz[b] as number)] as number) * (g[b] as number);
  }
  return { value, variance: Math.max(variance, 0) };
}

/**
 * Studentised residual of a line the fit left out (a rejected line): e / √(s²/w + var(prediction)), with s² the
 * fit's χ²/ν — the statistic rejection and re-admission judge by (outliers.ts), so a rejected line's record carries
 * the same kind of figure as a fitted line's. Undefined where the fit has no prediction for the line.
 */
export function excludedStudentisedResidual(fit: SolvedModel, o: Observation): number | undefined {
  const pred = predictWithVariance(fit, o);
  if (pred === undefined) return undefined;
  const s2 = reducedChiSquare(fit) ?? 1;
  const scale = Math.sqrt(s2 / o.weight + pred.variance);
  return scale > 0 ? (o.position - pred.value) / scale : undefined;
}

import {
  type LeastSquaresResult,
  mergesRows,
  solveGroupedLeastSquares,
  solveLeastSquares,
} from '../linalg/least-squares.js';
import { copyFloats, floats, ints } from '../linalg/small-arrays.js';
import { transitionGroups } from '../models/level-states.js';
import {
  designColumns,
  distinctTransitions,
  type LinearModel,
  type Observation,
  type Parameter,
} from '../models/linear-model.js';
import { fDistributionSurvival } from '../stats/distributions.js';

/**
 * How the covariance is scaled: by s² = χ²/(n−p) (a-posteriori, the usual default when line uncertainties are
 * relative or unknown) or by 1 when the caller vouches for its uncertainties as absolute.
 */
export type UncertaintyMode = 'a-posteriori' | 'absolute';

export interface SolvedModel {
  readonly model: LinearModel;
  readonly observations: readonly Observation[];
  readonly values: Float64Array;
  /** Covariance of the values, scaled according to the mode (row-major p × p). */
  readonly covariance: Float64Array;
  readonly residuals: Float64Array;
  /** Diagonal of the hat matrix; empty when the fit was solved without it. */
  readonly leverages: Float64Array;
  readonly chiSquare: number;
  readonly degreesOfFreedom: number;
  /** NaN where it was not computed (trial fits, fits with priors). */
  readonly conditionNumber: number;
}

export interface RankDeficiency {
  readonly rankDeficient: true;
  /** Groups of parameters the data cannot tell apart. */
  readonly groups: readonly (readonly Parameter[])[];
}

/** Positions and weights as typed arrays (a plain loop: Float64Array.from with a map function is many times slower). */
function positionsOf(obs: readonly Observation[]): Float64Array {
  const out = floats(obs.length);
  for (let i = 0; i < obs.length; i++) out[i] = (obs[i] as Observation).position;
  return out;
}

function weightsOf(obs: readonly Observation[]): Float64Array {
  const out = floats(obs.length);
  for (let i = 0; i < obs.length; i++) out[i] = (obs[i] as Observation).weight;
  return out;
}

/**
 * Positions and weights of an observation array, made once per array (never changed once built, as the columns
 * shared in linear-model.ts assume): every trial model of a term selection solves over the same array. The solver
 * does not modify them; nothing else is handed them.
 */
const vectors = new WeakMap<readonly Observation[], { positions: Float64Array; weights: Float64Array }>();

function vectorsOf(obs: readonly Observation[]): { positions: Float64Array; weights: Float64Array } {
  let v = vectors.get(obs);
  if (!v || v.positions.length !== obs.length) {
    v = { positions: positionsOf(obs), weights: weightsOf(obs) };
    vectors.set(obs, v);
  }
  return v;
}

/**
 * The kernel's solve of a model over observations. Where the kernel would merge repeated rows anyway (`mergesRows`)
 * and the model's rows depend on the transition only, the design is built over the distinct transitions and handed
 * over with each line's transition: the same answers, without building, hashing and comparing every row.
 */
function solveLines(
  model: LinearModel,
  observations: readonly Observation[],
  leverage: boolean,
  conditionNumber: boolean,
): LeastSquaresResult {
  const n = observations.length;
  const p = model.parameters.length;
  const { positions, weights } = vectorsOf(observations);
  if (model.rowsByTransition) {
    const { group, firstRow } = transitionGroups(observations);
    if (mergesRows(n, p, firstRow.length)) {
      const distinct = designColumns(model, distinctTransitions(observations));
      const count = firstRow.length;
      return solveGroupedLeastSquares({
        rows: n,
        cols: p,
        distinct,
        group,
        count,
        observations: positions,
        weights,
        leverage,
        conditionNumber,
      });
    }
  }
  const design = designColumns(model, observations);
  return solveLeastSquares({ rows: n, cols: p, design, observations: positions, weights, leverage, conditionNumber });
}

export function solveModel(
  model: LinearModel,
  observations: readonly Observation[],
  mode: UncertaintyMode,
  /** Compute the leverages (needed for studentised residuals only). Default true. */
  withLeverage = true,
): SolvedModel | RankDeficiency {
  const n = observations.length;
  const p = model.parameters.length;
  if (p === 0) {
    const residuals = positionsOf(observations);
    let chi = 0;
    observations.forEach((o, i) => {
      chi += o.weight * (residuals[i] as number) ** 2;
    });
    return {
      model,
      observations,
      values: floats(0),
      covariance: floats(0),
      residuals,
      leverages: floats(n),
      chiSquare: chi,
      degreesOfFreedom: n,
      conditionNumber: 1,
    };
  }
  if (n < p) {
    return { rankDeficient: true, groups: [model.parameters.slice()] };
  }
  // Trial fits of term selection need neither leverages nor the condition number.
  const r = solveLines(model, observations, withLeverage, withLeverage);
  if (r.rankDeficient) {
    return {
      rankDeficient: true,
      groups: r.dependencies.map((g) => g.map((j) => model.parameters[j] as Parameter)),
    };
  }
  const dof = n - p;
  const s2 = mode === 'absolute' ? 1 : dof > 0 ? r.chiSquare / dof : Number.NaN;
  // The solver's covariance is this solve's own array: scaled in place.
  const covariance = scaled(r.covariance, s2);
  const solved: SolvedModel = {
    model,
    observations,
    values: r.coefficients,
    covariance,
    residuals: r.residuals,
    leverages: r.leverages ?? floats(0),
    chiSquare: r.chiSquare,
    degreesOfFreedom: dof,
    conditionNumber: r.conditionNumber,
  };
  if (!withLeverage && r.later) completions.set(solved, r.later);
  return solved;
}

function scaled(m: Float64Array, s: number): Float64Array {
  for (let i = 0; i < m.length; i++) m[i] = (m[i] as number) * s;
  return m;
}

/** What a trial fit (solved without leverages) needs to become a full one, kept as long as the fit itself. */
const completions = new WeakMap<SolvedModel, NonNullable<LeastSquaresResult['later']>>();

/**
 * A fit solved without leverages (a trial of term selection) completed with its leverages and condition number,
 * computed from the factors of its own solve: the same figures as solving the chosen model again with
 * `withLeverage`, without the second factorisation. Undefined for a fit that cannot be completed so.
 */
export function withLeverages(fit: SolvedModel): SolvedModel | undefined {
  const later = completions.get(fit);
  if (!later) return undefined;
  // The condition number (one-sided Jacobi sweeps over R, a third of a large level solve) is computed when first
  // read: every outlier round selects a model, and only the last selection's condition number is reported.
  let kappa: number | undefined;
  return Object.defineProperty({ ...fit, leverages: later.leverages() }, 'conditionNumber', {
    enumerable: true,
    get: () => {
      kappa ??= later.conditionNumber();
      return kappa;
    },
  });
}

export function isRankDeficient(x: SolvedModel | RankDeficiency): x is RankDeficiency {
  return (x as RankDeficiency).rankDeficient === true;
}

/**
 * Externally studentised residuals tᵢ = eᵢ√wᵢ / (s₍ᵢ₎ √(1 − hᵢᵢ)), with s₍ᵢ₎ the scale of the fit without line i
 * (Belsley, Kuh & Welsch, Regression Diagnostics, 1980, §2.1). Deleting the line from its own scale estimate keeps
 * one gross error from masking itself.
 */
export function studentisedResiduals(fit: SolvedModel): Float64Array {
  const n = fit.observations.length;
  const out = floats(n);
  const dof = fit.degreesOfFreedom;
  if (dof < 2 || fit.leverages.length !== n) return out.fill(0);
  for (let i = 0; i < n; i++) {
    const w = (fit.observations[i] as Observation).weight;
    const e2 = w * (fit.residuals[i] as number) ** 2;
    const h = Math.min(fit.leverages[i] as number, 1 - 1e-12);
    const s2i = Math.max((fit.chiSquare - e2 / (1 - h)) / (dof - 1), 1e-300);
    out[i] = ((fit.residuals[i] as number) * Math.sqrt(w)) / Math.sqrt(s2i * (1 - h));
  }
  return out;
}

/**
 * Nested-model F test for q added parameters: F = ((χ²_small − χ²_big)/q) / (χ²_big/ν_big). Returns the p-value;
 * a small value says the data support the extra parameters.
 */
export function nestedFTest(small: SolvedModel, big: SolvedModel): number {
  const q = small.degreesOfFreedom - big.degreesOfFreedom;
  if (q <= 0 || big.degreesOfFreedom <= 0) return 1;
  const num = (small.chiSquare - big.chiSquare) / q;
  const den = big.chiSquare / big.degreesOfFreedom;
  if (!(den > 0)) return num > 0 ? 0 : 1;
  return fDistributionSurvival(num / den, q, big.degreesOfFreedom);
}

/** χ²/(n−p), or null when no degrees of freedom are left. */
export function reducedChiSquare(fit: SolvedModel): number | null {
  return fit.degreesOfFreedom > 0 ? fit.chiSquare / fit.degreesOfFreedom : null;
}

export function rmsResidual(fit: SolvedModel): number {
  const n = fit.residuals.length;
  if (n === 0) return 0;
  let s = 0;
  for (const r of fit.residuals) s += r * r;
  return Math.sqrt(s / n);
}

/** Row-major p × p correlation matrix from a covariance. */
export function correlationOf(cov: Float64Array, p: number): Float64Array {
  const out = floats(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) {
      const d = Math.sqrt((cov[i * p + i] as number) * (cov[j * p + j] as number));
      out[i * p + j] = d > 0 ? (cov[i * p + j] as number) / d : i === j ? 1 : 0;
    }
  }
  return out;
}

/** A row-major p × p matrix as rows (for reports; plain loops: Array.from of typed subarrays was 4 % of a fit). */
export function toRows(m: Float64Array, p: number): number[][] {
  const rows: number[][] = [];
  for (let i = 0; i < p; i++) {
    const row: number[] = [];
    for (let j = 0; j < p; j++) row.push(m[i * p + j] as number);
    rows.push(row);
  }
  return rows;
}

/**
 * The prior-augmented solve of a model whose rows depend on the transition only: over the distinct transitions and
 * the prior rows (each its own group, after the lines' groups, as the kernel would number them) where the kernel
 * merges, else over every row.
 */
function solveWithPriorsByTransition(
  model: LinearModel,
  observations: readonly Observation[],
  at: readonly number[],
  settings: Omit<Parameters<typeof solveLeastSquares>[0], 'design' | 'rows'>,
): LeastSquaresResult {
  const n = observations.length;
  const m = at.length;
  const p = model.parameters.length;
  const lines = transitionGroups(observations);
  const count = lines.firstRow.length + m;
  if (!mergesRows(n + m, p, count)) {
    return solveLeastSquares({
      ...settings,
      rows: n + m,
      design: withPriorRows(designColumns(model, observations), n, p, at),
    });
  }
  const group = ints(n + m);
  group.set(lines.group);
  for (let k = 0; k < m; k++) group[n + k] = count - m + k;
  const distinct = withPriorRows(designColumns(model, distinctTransitions(observations)), count - m, p, at);
  return solveGroupedLeastSquares({ ...settings, rows: n + m, distinct, group, count });
}

/** A design of `n` rows (given by its columns) with one row per prior below it, 1 in the prior's column (`at`). */
function withPriorRows(base: readonly Float64Array[], n: number, p: number, at: readonly number[]): Float64Array {
  const rows = n + at.length;
  const design = floats(rows * p);
  for (let j = 0; j < p; j++) design.set(base[j] as Float64Array, j * rows);
  at.forEach((j, k) => {
    design[j * rows + n + k] = 1;
  });
  return design;
}

/** A prior on one parameter: a pseudo-observation p_k = value ± sigma. */
export interface Prior {
  /** Key of the parameter in the model. */
  readonly key: string;
  readonly value: number;
  /** Standard uncertainty of the prior, in the parameter's unit. */
  readonly sigma: number;
}

/**
 * Augmented weighted least squares: the lines plus one pseudo-observation row per prior (coefficient 1 on its
 * parameter), so that a constrained parameter's uncertainty flows into the covariance of everything it correlates
 * with (SCIENCE.md §9 (a); e.g. Bevington & Robinson §7.2 on a priori constraints). `priorScale` is the s² the
 * covariance will be multiplied by in a-posteriori mode (the reduced χ² of the unconstrained fit): the prior rows
 * are weighted s²/σ², so that after scaling each prior still counts with its own σ. The result describes the
 * lines only (observations, residuals, leverages); χ² includes the prior rows and the degrees of freedom count
 * them, n + m − p.
 */
export function solveModelWithPriors(
  model: LinearModel,
  observations: readonly Observation[],
  priors: readonly Prior[],
  mode: UncertaintyMode,
  priorScale = 1,
  /** Compute the lines' leverages (for studentised residuals). Default true; the Dunham fits do not use them. */
  withLeverage = true,
): SolvedModel | RankDeficiency {
  const n = observations.length;
  const m = priors.length;
  const p = model.parameters.length;
  const rows = n + m;
  if (rows < p) return { rankDeficient: true, groups: [model.parameters.slice()] };
  const y = floats(rows);
  const w = floats(rows);
  const { positions, weights } = vectorsOf(observations);
  y.set(positions);
  w.set(weights);
  const s2prior = mode === 'absolute' ? 1 : priorScale;
  const at = priors.map((pr, k) => {
    const j = model.parameters.findIndex((q) => q.key === pr.key);
    if (j < 0) throw new Error(`prior on ${pr.key}, which the model does not hold`);
    y[n + k] = pr.value;
    w[n + k] = s2prior / (pr.sigma * pr.sigma);
    return j;
  });
  // The condition number of a constrained fit is never reported (the statistics describe the selected model).
  const settings = { cols: p, observations: y, weights: w, leverage: withLeverage, conditionNumber: false };
  const r = model.rowsByTransition
    ? solveWithPriorsByTransition(model, observations, at, settings)
    : solveLeastSquares({ ...settings, rows, design: withPriorRows(designColumns(model, observations), n, p, at) });
  if (r.rankDeficient) {
    return {
      rankDeficient: true,
      groups: r.dependencies.map((g) => g.map((j) => model.parameters[j] as Parameter)),
    };
  }
  const dof = rows - p;
  const s2 = mode === 'absolute' ? 1 : dof > 0 ? r.chiSquare / dof : Number.NaN;
  return {
    model,
    observations,
    values: r.coefficients,
    covariance: scaled(r.covariance, s2),
    residuals: copyFloats(r.residuals.subarray(0, n)),
    leverages: r.leverages ? copyFloats(r.leverages.subarray(0, n)) : floats(0),
    chiSquare: r.chiSquare,
    degreesOfFreedom: dof,
    conditionNumber: r.conditionNumber,
  };
}

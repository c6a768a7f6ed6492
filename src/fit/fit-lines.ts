import { bondLength } from '../derive/bond-length.js';
import {
  type CrossCheck,
  crossChecks,
  type EquilibriumConstants,
  equilibriumFromDunham,
} from '../derive/equilibrium.js';
import { type Quantity, quantity } from '../derive/quantity.js';
import { ScienceError } from '../errors.js';
import { type DunhamTerm, dunhamModel, dunhamParameters, massReducedParameters } from '../models/dunham.js';
import { levelModel, levelParameters, levelStructure } from '../models/level-model.js';
import type { LinearModel, Observation } from '../models/linear-model.js';
import {
  type Branch,
  formatBand,
  type Transition,
  transitionLabel,
  upperJ,
  validateTransition,
} from '../models/transitions.js';
import type { MassValue } from '../species/reduced-mass.js';
import { chiSquareSurvival } from '../stats/distributions.js';
import { normalTwoSidedQuantile } from '../stats/normal.js';
import { type CombinationDifferenceFit, fitCombinationDifferences } from './combination-differences.js';
import {
  correlationOf,
  isRankDeficient,
  nestedFTest,
  type RankDeficiency,
  reducedChiSquare,
  rmsResidual,
  type SolvedModel,
  solveModel,
  studentisedResiduals,
  type UncertaintyMode,
} from './engine.js';

export interface LineInput {
  /** Position in cm⁻¹. */
  readonly position: number;
  /** Standard uncertainty in cm⁻¹. */
  readonly uncertainty?: number;
  readonly intensity?: number;
  readonly assignment?: Transition & { readonly source: 'given' | 'auto' };
}

export interface FitOptions {
  /** Default 'a-posteriori'. */
  readonly uncertaintyMode?: UncertaintyMode;
  /** Studentised-residual threshold for rejecting a line; 0 turns rejection off. Default 4. */
  readonly rejectionThreshold?: number;
  /** Most lines that may be rejected, as a fraction of the assigned lines. Default 0.2. */
  readonly maxRejectedFraction?: number;
  /** p-value below which an added term counts as supported by the data (F test). Default 0.01. */
  readonly termSignificance?: number;
  /** Highest centrifugal term of the level model: 1 = B, 2 = D, 3 = H, 4 = L. Default 4. */
  readonly maxCentrifugalOrder?: number;
  /** Also fit one mass-reduced Dunham model (U_kl) across isotopologues. Default false. */
  readonly massReducedDunham?: boolean;
  /**
   * Fit the level model only, skipping Dunham, combination differences and cross-checks (for the inner loop of
   * automatic assignment). Default false.
   */
  readonly levelsOnly?: boolean;
}

export interface Warning {
  readonly code: string;
  readonly message: string;
  readonly lines?: readonly number[];
}

export type LineStatus = 'fitted' | 'rejected' | 'unassigned';

export interface LineOutcome {
  readonly index: number;
  readonly position: number;
  /** The intensity sent with the line, echoed. */
  readonly intensity?: number;
  readonly assignment?: {
    readonly band: string;
    readonly branch: Branch;
    readonly j: number;
    readonly species: string;
    readonly source: 'given' | 'auto';
  };
  readonly calculated?: number;
  readonly residual?: number;
  readonly studentisedResidual?: number;
  readonly status: LineStatus;
  readonly reason?: string;
}

export interface NamedQuantity extends Quantity {
  readonly name: string;
  readonly species?: string;
}

export interface Statistics {
  readonly lines: number;
  readonly assigned: number;
  readonly fitted: number;
  readonly rejected: number;
  readonly unassigned: number;
  readonly parameters: number;
  readonly degreesOfFreedom: number;
  readonly rms: number;
  readonly reducedChiSquare: number | null;
  readonly conditionNumber: number | null;
  readonly uncertaintyMode: UncertaintyMode;
}

export interface DunhamFit {
  readonly species: string;
  readonly parameters: readonly NamedQuantity[];
  readonly covariance: { readonly parameters: readonly string[]; readonly matrix: readonly (readonly number[])[] };
  readonly statistics: {
    readonly degreesOfFreedom: number;
    readonly rms: number;
    readonly reducedChiSquare: number | null;
  };
  readonly terms: readonly string[];
}

export interface FitResult {
  readonly species: readonly { readonly formula: string; readonly reducedMass: Quantity }[];
  readonly lines: readonly LineOutcome[];
  readonly bands: readonly {
    readonly species: string;
    readonly band: string;
    readonly origin?: Quantity;
    readonly lines: number;
    readonly jRange: readonly [number, number];
  }[];
  readonly levels: readonly {
    readonly species: string;
    readonly v: number;
    readonly term?: Quantity & { readonly relativeTo: number };
    readonly B: Quantity;
    readonly D?: Quantity;
    readonly H?: Quantity;
    readonly L?: Quantity;
    readonly r?: Quantity;
  }[];
  readonly equilibrium: readonly ({ readonly species: string } & EquilibriumConstants)[];
  readonly parameters: readonly NamedQuantity[];
  readonly covariance: { readonly parameters: readonly string[]; readonly matrix: readonly (readonly number[])[] };
  readonly correlation: { readonly parameters: readonly string[]; readonly matrix: readonly (readonly number[])[] };
  readonly statistics: Statistics;
  readonly model: {
    readonly levelTerms: readonly { readonly species: string; readonly v: number; readonly terms: readonly string[] }[];
    readonly selection: string;
  };
  readonly dunham: readonly DunhamFit[];
  readonly massReducedDunham?: DunhamFit & { readonly species: 'all' };
  readonly combinationDifferences: readonly (CombinationDifferenceFit & {
    readonly fitted: Quantity;
    readonly deviation: number;
  })[];
  readonly crossChecks: readonly ({ readonly species: string } & CrossCheck)[];
  readonly warnings: readonly Warning[];
}

const DEFAULTS = {
  uncertaintyMode: 'a-posteriori' as UncertaintyMode,
  rejectionThreshold: 4,
  maxRejectedFraction: 0.2,
  termSignificance: 0.01,
  maxCentrifugalOrder: 4,
  massReducedDunham: false,
  levelsOnly: false,
};

/**
 * Fit an assigned line list: the level model (band origins, B_v, D_v, … with the centrifugal order the data
 * support), outlier rejection by externally studentised residuals, a Dunham fit per isotopologue for the
 * equilibrium constants, combination differences as an independent check, and the usual cross-checks.
 */
export function fitLineList(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  options: FitOptions = {},
): FitResult {
  return fitLineListDetailed(input, masses, options).result;
}

/** What the automatic assignment needs besides the result: predictions of the fitted level model. */
export interface DetailedFit {
  readonly result: FitResult;
  /**
   * Position and variance of a transition predicted by the fitted level model, when both its levels were fitted
   * (and, for a vibrational band, lie in one connected set of levels); otherwise undefined.
   */
  predict(t: Transition): { value: number; variance: number } | undefined;
  /** s² = χ²/(n−p) of the level fit (1 when undefined). */
  readonly scale: number;
}

export function fitLineListDetailed(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  options: FitOptions = {},
): DetailedFit {
  const opt = { ...DEFAULTS, ...options };
  const warnings: Warning[] = [];
  let mode = opt.uncertaintyMode;

  // Weights: 1/σ². Lines without an uncertainty take the median of the given ones (or 1 when none are given).
  const given = input.filter((l) => l.uncertainty !== undefined).map((l) => l.uncertainty as number);
  for (const [i, l] of input.entries()) {
    if (l.uncertainty !== undefined && !(l.uncertainty > 0 && Number.isFinite(l.uncertainty))) {
      throw new ScienceError('INPUT_INVALID', `line ${i}: uncertainty ${l.uncertainty} must be positive and finite`, {
        line: i,
        uncertainty: l.uncertainty,
      });
    }
  }
  const fallbackSigma = given.length > 0 ? median(given) : 1;
  if (given.length > 0 && given.length < input.length) {
    warnings.push({
      code: 'UNCERTAINTY_FILLED',
      message: `${input.length - given.length} line(s) had no uncertainty and were given the median of the others, ${fallbackSigma} cm-1`,
    });
  }
  if (given.length === 0 && mode === 'absolute') {
    mode = 'a-posteriori';
    warnings.push({
      code: 'UNCERTAINTY_MODE_CHANGED',
      message:
        'absolute uncertainties were asked for but no line has an uncertainty: the covariance is scaled a posteriori',
    });
  }

  const observations: Observation[] = [];
  const transitions = new Map<number, Transition & { readonly source: 'given' | 'auto' }>();
  input.forEach((l, index) => {
    if (!(l.position > 0) || !Number.isFinite(l.position)) {
      throw new ScienceError('INPUT_INVALID', `line ${index}: position ${l.position} must be positive and finite`, {
        line: index,
      });
    }
    const a = l.assignment;
    if (!a) return;
    try {
      validateTransition(a);
    } catch (e) {
      if (e instanceof ScienceError) {
        throw new ScienceError(e.code, `line ${index}: ${e.message}`, { ...e.details, line: index });
      }
      throw e;
    }
    if (!masses.has(a.species)) {
      throw new ScienceError('SPECIES_INVALID', `line ${index}: species ${a.species} has no mass`, { line: index });
    }
    transitions.set(index, a);
    const sigma = l.uncertainty ?? fallbackSigma;
    observations.push({
      index,
      species: a.species,
      upperV: a.band.upper,
      lowerV: a.band.lower,
      upperJ: upperJ(a),
      lowerJ: a.j,
      position: l.position,
      weight: 1 / (sigma * sigma),
    });
  });
  if (observations.length === 0) {
    throw new ScienceError('FIT_NO_ASSIGNED_LINES', 'no line carries an assignment, so there is nothing to fit', {
      lines: input.length,
    });
  }

  // Level fit with term selection and outlier rejection.
  const maxOrder = Math.max(1, Math.min(4, Math.floor(opt.maxCentrifugalOrder)));
  let kept = observations;
  const rejected = new Map<number, string>();
  let level = selectLevelModel(kept, maxOrder, mode, opt.termSignificance);
  if (opt.rejectionThreshold > 0) {
    const budget = Math.floor(opt.maxRejectedFraction * observations.length);
    // Bonferroni-style floor: with many lines, a fixed threshold would reject good lines by chance alone.
    const threshold = Math.max(opt.rejectionThreshold, normalTwoSidedQuantile(0.25 / observations.length));
    for (let iter = 0; iter < 12 && rejected.size < budget; iter++) {
      const t = studentisedResiduals(level.fit);
      const candidates = [...t.keys()].filter((i) => Math.abs(t[i] as number) > threshold);
      if (candidates.length === 0) break;
      candidates.sort((a, b) => Math.abs(t[b] as number) - Math.abs(t[a] as number));
      const take = candidates.slice(0, Math.max(1, Math.min(budget - rejected.size, Math.ceil(0.1 * kept.length))));
      const drop = new Set(take.map((i) => (kept[i] as Observation).index));
      for (const i of take) {
        const o = kept[i] as Observation;
        rejected.set(o.index, `studentised residual ${(t[i] as number).toFixed(1)} exceeds ${threshold.toFixed(2)}`);
      }
      const next = kept.filter((o) => !drop.has(o.index));
      if (next.length <= level.fit.model.parameters.length + 1) {
        for (const i of drop) rejected.delete(i);
        break;
      }
      kept = next;
      level = selectLevelModel(kept, maxOrder, mode, opt.termSignificance);
    }
    // Re-admit rejected lines that the final model predicts within the threshold (guards against swamping).
    if (rejected.size > 0) {
      const s2 = reducedChiSquare(level.fit) ?? 1;
      const back: Observation[] = [];
      for (const o of observations) {
        if (!rejected.has(o.index)) continue;
        const pred = predictWithVariance(level.fit, o);
        if (pred === undefined) continue;
        const z = (o.position - pred.value) / Math.sqrt(s2 / o.weight + pred.variance);
        if (Math.abs(z) <= threshold) back.push(o);
      }
      if (back.length > 0) {
        for (const o of back) rejected.delete(o.index);
        const ids = new Set(back.map((o) => o.index));
        kept = observations.filter((o) => ids.has(o.index) || !rejected.has(o.index));
        level = selectLevelModel(kept, maxOrder, mode, opt.termSignificance);
      }
    }
    if (rejected.size > 0) {
      warnings.push({
        code: 'LINES_REJECTED',
        message: `${rejected.size} line(s) were rejected as outliers and kept out of the fit`,
        lines: [...rejected.keys()].sort((a, b) => a - b),
      });
    }
  }
  if (level.fit.degreesOfFreedom === 0 && mode === 'a-posteriori') {
    // No residual degrees of freedom: the scatter cannot be estimated from the data themselves.
    if (given.length === 0) {
      throw new ScienceError(
        'FIT_TOO_FEW_LINES',
        `${level.fit.observations.length} line(s) exactly determine the ${level.fit.model.parameters.length} parameters, leaving nothing to estimate their uncertainties: add lines or give line uncertainties with uncertaintyMode "absolute"`,
        { lines: level.fit.observations.length, parameters: level.fit.model.parameters.length },
      );
    }
    mode = 'absolute';
    warnings.push({
      code: 'UNCERTAINTY_MODE_CHANGED',
      message:
        'no degrees of freedom are left to scale the covariance a posteriori: the line uncertainties are taken as absolute',
    });
    level = selectLevelModel(kept, maxOrder, mode, opt.termSignificance);
  }
  const fit = level.fit;
  const params = fit.model.parameters;
  const p = params.length;
  const paramIndex = new Map(params.map((q, i) => [q.key, i]));
  const sigmaOf = (i: number) => Math.sqrt(fit.covariance[i * p + i] as number);
  const q = (key: string): Quantity | undefined => {
    const i = paramIndex.get(key);
    return i === undefined ? undefined : quantity(fit.values[i] as number, sigmaOf(i), 'cm-1');
  };

  // Per-line outcome.
  const t = studentisedResiduals(fit);
  const keptPos = new Map(fit.observations.map((o, i) => [o.index, i]));
  const byIndex = new Map(observations.map((o) => [o.index, o]));
  const lines: LineOutcome[] = input.map((l, index) => {
    const a = transitions.get(index);
    const echo = l.intensity !== undefined ? { intensity: l.intensity } : {};
    if (!a) return { index, position: l.position, ...echo, status: 'unassigned' as const };
    const assignment = { band: formatBand(a.band), branch: a.branch, j: a.j, species: a.species, source: a.source };
    const ki = keptPos.get(index);
    if (ki !== undefined) {
      const residual = fit.residuals[ki] as number;
      return {
        index,
        position: l.position,
        ...echo,
        assignment,
        calculated: l.position - residual,
        residual,
        studentisedResidual: t[ki] as number,
        status: 'fitted' as const,
      };
    }
    const calculated = predictWithVariance(fit, byIndex.get(index) as Observation)?.value;
    const out: LineOutcome = {
      index,
      position: l.position,
      ...echo,
      assignment,
      status: 'rejected' as const,
      reason: rejected.get(index) ?? 'rejected',
    };
    return calculated === undefined ? out : { ...out, calculated, residual: l.position - calculated };
  });

  // Bands, levels.
  const structure = levelStructure(fit.observations);
  const bandStats = new Map<
    string,
    { species: string; band: string; upper: number; lower: number; n: number; jmin: number; jmax: number }
  >();
  for (const o of fit.observations) {
    const key = `${o.species}|${o.upperV}-${o.lowerV}`;
    const b = bandStats.get(key) ?? {
      species: o.species,
      band: `${o.upperV}-${o.lowerV}`,
      upper: o.upperV,
      lower: o.lowerV,
      n: 0,
      jmin: o.lowerJ,
      jmax: o.lowerJ,
    };
    b.n++;
    b.jmin = Math.min(b.jmin, o.lowerJ);
    b.jmax = Math.max(b.jmax, o.lowerJ);
    bandStats.set(key, b);
  }
  const bands = [...bandStats.values()].map((b) => {
    let origin: Quantity | undefined;
    if (b.upper !== b.lower) {
      // ν₀ = T_v′ − T_v″, with the covariance of the two term values.
      const iu = paramIndex.get(`${b.species}|T|${b.upper}`);
      const il = paramIndex.get(`${b.species}|T|${b.lower}`);
      const vu = iu === undefined ? 0 : (fit.values[iu] as number);
      const vl = il === undefined ? 0 : (fit.values[il] as number);
      let varSum = 0;
      if (iu !== undefined) varSum += fit.covariance[iu * p + iu] as number;
      if (il !== undefined) varSum += fit.covariance[il * p + il] as number;
      if (iu !== undefined && il !== undefined) varSum -= 2 * (fit.covariance[iu * p + il] as number);
      origin = quantity(vu - vl, Math.sqrt(Math.max(varSum, 0)), 'cm-1');
    }
    return {
      species: b.species,
      band: b.band,
      ...(origin ? { origin } : {}),
      lines: b.n,
      jRange: [b.jmin, b.jmax] as [number, number],
    };
  });

  const levels: FitResult['levels'][number][] = [];
  const levelTerms: { species: string; v: number; terms: string[] }[] = [];
  for (const s of structure.species) {
    const mu = masses.get(s) as MassValue;
    for (const v of structure.levels.get(s) as readonly number[]) {
      const B = q(`${s}|B|${v}`) as Quantity;
      const ref = structure.reference.get(s)?.get(v) as number;
      const T = q(`${s}|T|${v}`);
      const extra: Record<string, Quantity> = {};
      const terms: string[] = ['B'];
      for (const kind of ['D', 'H', 'L'] as const) {
        const x = q(`${s}|${kind}|${v}`);
        if (x) {
          extra[kind] = x;
          terms.push(kind);
        }
      }
      levelTerms.push({ species: s, v, terms });
      const r = bondLength(B, mu);
      levels.push({
        species: s,
        v,
        ...(T ? { term: { ...T, relativeTo: ref } } : {}),
        B,
        ...extra,
        ...(r ? { r } : {}),
      });
      if (!r) {
        warnings.push({
          code: 'NON_PHYSICAL_CONSTANT',
          message: `${s}: B_${v} = ${B.value} cm-1 is not positive; check the assignment or the unit`,
        });
      }
    }
  }

  const parameters: NamedQuantity[] = params.map((par, i) => ({
    name: par.name,
    value: fit.values[i] as number,
    uncertainty: sigmaOf(i),
    unit: par.unit,
    ...(par.species ? { species: par.species } : {}),
  }));
  const names = params.map((x) => x.name);
  const covMatrix = toRows(fit.covariance, p);
  const corrMatrix = toRows(correlationOf(fit.covariance, p), p);

  // Dunham fits per isotopologue and the equilibrium constants.
  const equilibrium: ({ species: string } & EquilibriumConstants)[] = [];
  const dunham: DunhamFit[] = [];
  const checks: ({ species: string } & CrossCheck)[] = [];
  for (const s of opt.levelsOnly ? [] : structure.species) {
    const obs = fit.observations.filter((o) => o.species === s);
    const d = fitDunhamForSpecies(s, obs, mode, opt.termSignificance, level.orders, warnings);
    if (!d) continue;
    dunham.push(d.report);
    const mu = masses.get(s) as MassValue;
    const eq = equilibriumFromDunham(d.set, mu);
    if (Object.keys(eq).length > 0) equilibrium.push({ species: s, ...eq });
    for (const c of crossChecks(d.set, eq, mu)) checks.push({ species: s, ...c });
  }

  let massReducedDunham: FitResult['massReducedDunham'];
  if (opt.massReducedDunham && !opt.levelsOnly) {
    if (structure.species.length < 2) {
      warnings.push({
        code: 'MASS_REDUCED_NEEDS_ISOTOPOLOGUES',
        message: 'a mass-reduced Dunham fit needs lines of two or more isotopologues',
      });
    } else {
      massReducedDunham = fitMassReduced(fit.observations, masses, mode, opt.termSignificance, level.orders, warnings);
    }
  }

  // Combination differences against the level fit.
  const orderOf = (s: string, v: number) => level.orders.get(`${s}|${v}`) ?? 1;
  const cds = (opt.levelsOnly ? [] : fitCombinationDifferences(fit.observations, orderOf, mode)).map((cd) => {
    const fitted = q(`${cd.species}|B|${cd.v}`) as Quantity;
    const deviation = Math.abs(cd.B.value - fitted.value) / Math.hypot(cd.B.uncertainty, fitted.uncertainty);
    if (deviation > 3) {
      warnings.push({
        code: 'COMBINATION_DIFFERENCES_DISAGREE',
        message: `${cd.species} band ${cd.band}: B_${cd.v} from ${cd.kind === 'lower' ? 'Δ₂F″' : 'Δ₂F′'} differs from the full fit by ${deviation.toFixed(1)}σ (an assignment error or a perturbation?)`,
      });
    }
    return { ...cd, fitted, deviation };
  });

  checkRepeats(fit, given.length > 0, warnings);
  qualityWarnings(fit, corrMatrix, names, warnings);

  const statistics: Statistics = {
    lines: input.length,
    assigned: observations.length,
    fitted: fit.observations.length,
    rejected: rejected.size,
    unassigned: input.length - observations.length,
    parameters: p,
    degreesOfFreedom: fit.degreesOfFreedom,
    rms: rmsResidual(fit),
    reducedChiSquare: reducedChiSquare(fit),
    conditionNumber: Number.isFinite(fit.conditionNumber) ? fit.conditionNumber : null,
    uncertaintyMode: mode,
  };

  const result: FitResult = {
    species: [...masses.entries()]
      .filter(([f]) => structure.species.includes(f))
      .map(([formula, m]) => ({ formula, reducedMass: quantity(m.value, m.uncertainty, 'u') })),
    lines,
    bands,
    levels,
    equilibrium,
    parameters,
    covariance: { parameters: names, matrix: covMatrix },
    correlation: { parameters: names, matrix: corrMatrix },
    statistics,
    model: {
      levelTerms,
      selection: `centrifugal and Dunham terms added while an F test gives p < ${opt.termSignificance}`,
    },
    dunham,
    ...(massReducedDunham ? { massReducedDunham } : {}),
    combinationDifferences: cds,
    crossChecks: checks,
    warnings,
  };
  const ref = structure.reference;
  return {
    result,
    scale: reducedChiSquare(fit) ?? 1,
    predict(tr: Transition) {
      const r = ref.get(tr.species);
      const ru = r?.get(tr.band.upper);
      const rl = r?.get(tr.band.lower);
      if (ru === undefined || rl === undefined || ru !== rl) return undefined;
      return predictWithVariance(fit, {
        index: -1,
        species: tr.species,
        upperV: tr.band.upper,
        lowerV: tr.band.lower,
        upperJ: upperJ(tr),
        lowerJ: tr.j,
        position: 0,
        weight: 1,
      });
    },
  };
}

interface LevelSelection {
  readonly fit: SolvedModel;
  readonly orders: Map<string, number>;
}

function rankError(def: RankDeficiency, what: string): ScienceError {
  const groups = def.groups.map((g) => g.map((x) => x.name));
  return new ScienceError(
    'FIT_RANK_DEFICIENT',
    `the ${what} cannot be determined from these lines: ${groups.map((g) => g.join(' / ')).join('; ')} cannot be told apart`,
    { parameters: [...new Set(groups.flat())], groups },
  );
}

/** Distinct J values that touch each level, which bound the rotational terms the level can support. */
function distinctJ(obs: readonly Observation[]): Map<string, number> {
  const sets = new Map<string, Set<number>>();
  const add = (s: string, v: number, j: number) => {
    const k = `${s}|${v}`;
    const set = sets.get(k) ?? new Set<number>();
    set.add(j);
    sets.set(k, set);
  };
  for (const o of obs) {
    add(o.species, o.upperV, o.upperJ);
    add(o.species, o.lowerV, o.lowerJ);
  }
  return new Map([...sets].map(([k, v]) => [k, v.size]));
}

/**
 * Start from T and B for every level; add D, then H, then L to the levels with enough distinct J while a nested
 * F test finds the added group significant.
 */
function selectLevelModel(
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
    if (nestedFTest(current, t) >= alpha) break;
    current = t;
    for (const k of eligible) orders.set(k, next);
  }
  // The chosen model once more, with leverages for the studentised residuals.
  const final = solveModel(current.model, obs, mode, true);
  return { fit: isRankDeficient(final) ? current : final, orders };
}

function predictWithVariance(fit: SolvedModel, o: Observation): { value: number; variance: number } | undefined {
  const params = fit.model.parameters;
  const p = params.length;
  const g = params.map((par) => fit.model.coefficient(par, o));
  // A line of a level the fit no longer holds (all its lines rejected) has no prediction.
  const touches = g.some((c) => c !== 0);
  if (!touches && p > 0) return undefined;
  let value = 0;
  let variance = 0;
  for (let i = 0; i < p; i++) {
    value += (g[i] as number) * (fit.values[i] as number);
    for (let j = 0; j < p; j++) variance += (g[i] as number) * (fit.covariance[i * p + j] as number) * (g[j] as number);
  }
  return { value, variance: Math.max(variance, 0) };
}

function toRows(m: Float64Array, p: number): number[][] {
  return Array.from({ length: p }, (_, i) => Array.from(m.subarray(i * p, i * p + p)));
}

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? (s[m] as number) : 0.5 * ((s[m - 1] as number) + (s[m] as number));
}

/** Dunham terms the level structure can determine, and the candidates the F test may add. */
function dunhamTermPlan(obs: readonly Observation[], orders: ReadonlyMap<string, number>, species: string) {
  const structure = levelStructure(obs);
  const vs = structure.levels.get(species) ?? [];
  const ref = structure.reference.get(species) as ReadonlyMap<number, number>;
  const nLevels = vs.length;
  const components = new Set(vs.map((v) => ref.get(v))).size;
  const nVib = nLevels - components;
  let maxOrder = 1;
  for (const v of vs) maxOrder = Math.max(maxOrder, orders.get(`${species}|${v}`) ?? 1);
  const base: DunhamTerm[] = [];
  for (let k = 1; k <= Math.min(nVib, 4); k++) base.push({ k, l: 0 });
  base.push({ k: 0, l: 1 });
  if (nLevels >= 2) base.push({ k: 1, l: 1 });
  if (maxOrder >= 2) base.push({ k: 0, l: 2 });
  const candidates: DunhamTerm[] = [];
  for (let l = 1; l <= Math.min(maxOrder, 4); l++) {
    for (let k = 0; k <= Math.min(nLevels - 1, 3); k++) {
      if (base.some((b) => b.k === k && b.l === l)) continue;
      candidates.push({ k, l });
    }
  }
  return { base, candidates, nLevels, nVib };
}

/**
 * Forward selection of Dunham terms: at each step, among the candidates whose lower-order neighbours are already
 * in (Y_{k−1,l} for k > 0, Y_{0,l−1} for k = 0), add the one with the smallest F-test p-value while p < alpha.
 */
function selectDunham(
  obs: readonly Observation[],
  base: DunhamTerm[],
  candidates: DunhamTerm[],
  mode: UncertaintyMode,
  alpha: number,
  build: (terms: readonly DunhamTerm[]) => LinearModel,
): { fit: SolvedModel; terms: DunhamTerm[] } | undefined {
  let terms = [...base];
  let fit = solveModel(build(terms), obs, mode, false);
  // Should the base be indeterminate (a structure the plan did not foresee), drop its highest terms until it is not.
  while (isRankDeficient(fit) && terms.length > 1) {
    terms = terms.slice(0, -1);
    fit = solveModel(build(terms), obs, mode, false);
  }
  if (isRankDeficient(fit)) return undefined;
  let current = fit;
  let pool = [...candidates];
  for (;;) {
    const ready = pool.filter((c) =>
      c.k > 0 ? terms.some((t) => t.k === c.k - 1 && t.l === c.l) : terms.some((t) => t.k === 0 && t.l === c.l - 1),
    );
    let best: { term: DunhamTerm; fit: SolvedModel; p: number } | undefined;
    for (const c of ready) {
      const trial = [...terms, c];
      if (trial.length >= obs.length) continue;
      const f = solveModel(build(trial), obs, mode, false);
      if (isRankDeficient(f)) continue;
      const pv = nestedFTest(current, f);
      if (!best || pv < best.p) best = { term: c, fit: f, p: pv };
    }
    if (!best || best.p >= alpha) break;
    terms = [...terms, best.term];
    current = best.fit;
    pool = pool.filter((c) => c !== best.term);
  }
  return { fit: current, terms };
}

function reportOf(species: string, fit: SolvedModel): DunhamFit {
  const p = fit.model.parameters.length;
  return {
    species,
    parameters: fit.model.parameters.map((par, i) => ({
      name: par.name,
      value: fit.values[i] as number,
      uncertainty: Math.sqrt(fit.covariance[i * p + i] as number),
      unit: par.unit,
      ...(par.species ? { species: par.species } : {}),
    })),
    covariance: { parameters: fit.model.parameters.map((x) => x.name), matrix: toRows(fit.covariance, p) },
    statistics: {
      degreesOfFreedom: fit.degreesOfFreedom,
      rms: rmsResidual(fit),
      reducedChiSquare: reducedChiSquare(fit),
    },
    terms: fit.model.parameters.map((x) => x.name),
  };
}

function fitDunhamForSpecies(
  species: string,
  obs: readonly Observation[],
  mode: UncertaintyMode,
  alpha: number,
  orders: ReadonlyMap<string, number>,
  warnings: Warning[],
) {
  const plan = dunhamTermPlan(obs, orders, species);
  if (plan.nLevels < 2) {
    warnings.push({
      code: 'EQUILIBRIUM_NEEDS_TWO_LEVELS',
      message: `${species}: lines of one vibrational level give B_v, D_v of that level only; B_e and α_e need two or more levels`,
    });
    return undefined;
  }
  const sel = selectDunham(obs, plan.base, plan.candidates, mode, alpha, (terms) =>
    dunhamModel(dunhamParameters(species, terms, false)),
  );
  if (!sel) return undefined;
  if (sel.fit.degreesOfFreedom === 0 && mode === 'a-posteriori') {
    warnings.push({
      code: 'EQUILIBRIUM_UNDETERMINED',
      message: `${species}: the Dunham fit has no degrees of freedom left, so its uncertainties cannot be estimated; equilibrium constants are omitted`,
    });
    return undefined;
  }
  const has = (k: number, l: number) => sel.terms.some((t) => t.k === k && t.l === l);
  if (plan.nVib < 2) {
    warnings.push({
      code: 'VIBRATION_NEEDS_TWO_INTERVALS',
      message: `${species}: ω_e and ω_e x_e need two or more vibrational intervals (e.g. a fundamental and an overtone); only the band origin is determined`,
    });
  } else if (!has(3, 0)) {
    warnings.push({
      code: 'HIGHER_TERMS_NEGLECTED',
      message: `${species}: ω_e and ω_e x_e from two vibrational intervals neglect ω_e y_e`,
    });
  }
  if (plan.nLevels === 2) {
    warnings.push({
      code: 'HIGHER_TERMS_NEGLECTED',
      message: `${species}: B_e and α_e from two vibrational levels (B_e = B_0 + α_e/2) neglect γ_e and higher terms`,
    });
  }
  if (has(0, 2) && !has(1, 2)) {
    warnings.push({
      code: 'HIGHER_TERMS_NEGLECTED',
      message: `${species}: D_e is taken as the same in every level (β_e not determined)`,
    });
  }
  const report = reportOf(species, sel.fit);
  const set = {
    keys: sel.terms.map((t) => `${t.k},${t.l}`),
    values: Array.from(sel.fit.values),
    covariance: sel.fit.covariance,
  };
  return { report, set };
}

function fitMassReduced(
  obs: readonly Observation[],
  masses: ReadonlyMap<string, MassValue>,
  mode: UncertaintyMode,
  alpha: number,
  orders: ReadonlyMap<string, number>,
  warnings: Warning[],
): (DunhamFit & { species: 'all' }) | undefined {
  // The richest isotopologue sets the plan; the F test decides the rest.
  const structure = levelStructure(obs);
  let best = structure.species[0] as string;
  for (const s of structure.species) {
    if ((structure.levels.get(s)?.length ?? 0) > (structure.levels.get(best)?.length ?? 0)) best = s;
  }
  const plan = dunhamTermPlan(obs, orders, best);
  const mu = new Map([...masses].map(([k, v]) => [k, v.value]));
  const sel = selectDunham(obs, plan.base, plan.candidates, mode, alpha, (terms) =>
    dunhamModel(massReducedParameters(terms), mu),
  );
  if (!sel) {
    warnings.push({
      code: 'MASS_REDUCED_INDETERMINATE',
      message: 'the mass-reduced Dunham model could not be determined from these lines',
    });
    return undefined;
  }
  if (sel.fit.degreesOfFreedom === 0 && mode === 'a-posteriori') {
    warnings.push({
      code: 'MASS_REDUCED_INDETERMINATE',
      message: 'the mass-reduced Dunham fit has no degrees of freedom left',
    });
    return undefined;
  }
  return { ...reportOf('all', sel.fit), species: 'all' };
}

/** Repeated measurements of one transition: weighted together, flagged when they disagree beyond their scatter. */
function checkRepeats(fit: SolvedModel, uncertaintiesGiven: boolean, warnings: Warning[]): void {
  const groups = new Map<string, Observation[]>();
  for (const o of fit.observations) {
    const key = `${o.species}|${o.upperV}|${o.lowerV}|${o.upperJ}|${o.lowerJ}`;
    const g = groups.get(key) ?? [];
    g.push(o);
    groups.set(key, g);
  }
  // Against the caller's uncertainties when there are any; otherwise against the scatter of the whole fit.
  const s2 = uncertaintiesGiven || fit.degreesOfFreedom <= 0 ? 1 : Math.max(reducedChiSquare(fit) ?? 1, 1e-300);
  for (const g of groups.values()) {
    if (g.length < 2) continue;
    let sw = 0;
    let swx = 0;
    for (const o of g) {
      sw += o.weight;
      swx += o.weight * o.position;
    }
    const m = swx / sw;
    let chi = 0;
    for (const o of g) chi += (o.weight * (o.position - m) ** 2) / s2;
    const pValue = chiSquareSurvival(chi, g.length - 1);
    if (pValue < 1e-3) {
      const o = g[0] as Observation;
      const label = transitionLabel({
        species: o.species,
        band: { upper: o.upperV, lower: o.lowerV },
        branch: o.upperJ > o.lowerJ ? 'R' : 'P',
        j: o.lowerJ,
      });
      warnings.push({
        code: 'REPEATS_DISAGREE',
        message: `${g.length} measurements of ${label} disagree beyond their uncertainties (χ² = ${chi.toFixed(1)} on ${g.length - 1} degrees of freedom)`,
        lines: g.map((x) => x.index),
      });
    }
  }
}

function qualityWarnings(
  fit: SolvedModel,
  corr: readonly (readonly number[])[],
  names: readonly string[],
  warnings: Warning[],
): void {
  if (fit.degreesOfFreedom < 3) {
    warnings.push({
      code: 'FEW_DEGREES_OF_FREEDOM',
      message: `only ${fit.degreesOfFreedom} degree(s) of freedom: the a-posteriori uncertainties are themselves very uncertain`,
    });
  }
  if (fit.conditionNumber > 1e10) {
    warnings.push({
      code: 'ILL_CONDITIONED',
      message: `the scaled design has condition number ${fit.conditionNumber.toExponential(2)}`,
    });
  }
  for (let i = 0; i < names.length; i++) {
    for (let j = i + 1; j < names.length; j++) {
      const r = corr[i]?.[j] as number;
      if (Math.abs(r) > 0.999) {
        warnings.push({
          code: 'STRONG_CORRELATION',
          message: `${names[i]} and ${names[j]} are correlated with ρ = ${r.toFixed(5)}: use the covariance, not the separate uncertainties`,
        });
      }
    }
  }
}

import { type Quantity, quantity } from '../derive/quantity.js';
import { ScienceError } from '../errors.js';
import {
  correlationOf,
  isRankDeficient,
  type Prior,
  reducedChiSquare,
  rmsResidual,
  type SolvedModel,
  solveModel,
  solveModelWithPriors,
  studentisedResiduals,
  toRows,
  type UncertaintyMode,
} from '../fit/engine.js';
import {
  excludedStudentisedResidual,
  type LevelSelection,
  predictWithVariance,
  rankError,
} from '../fit/level-selection.js';
import { rejectOutliers } from '../fit/outliers.js';
import { termTest } from '../fit/term-test.js';
import type { Statistics } from '../fit/types.js';
import { type ScatterGroup, weighLines } from '../fit/weights.js';
import type { LinearModel, Observation, Parameter } from '../models/linear-model.js';
import { extentOf } from '../stats/extent.js';
import { type LinearCombinationDifferences, linearCombinationDifferences } from './combination-differences.js';
import type { LinearSpecies } from './species.js';
import { paritySign, rotationalVariable } from './terms.js';
import { type LinearAssignment, type LinearTransition, resolveTransition } from './transitions.js';
import { bandLabel, type LinearLevel, levelKey, levelLabel, type Parity, parseLevelKey } from './types.js';

/**
 * The fit of assigned lines of linear polyatomic molecules, on the engine of src/fit/ (weighted least squares by
 * pivoted QR, nested F / χ² term test, externally studentised outlier rejection, covariance scaled a posteriori
 * or absolute, next term constrained by a prior). The level model per vibrational level, cm⁻¹ (terms.ts):
 *
 *   F_v(J) = T_v + B_v y − D_v y² + H_v y³ ∓ ½ (q_v x + q_J,v x²),  x = J(J+1),  y = x − l²,  e: −, f: +
 *
 * T_v = G_v − G_ref within each set of levels joined by the bands (the reference the lowest: the level that is
 * never an upper level, fewest quanta first). q_v is fitted for a level with l ≥ 1 when lines reach both of its
 * parity components, and q_J,v with D_v; with one component only, B_v is the effective B of that component
 * (warning).
 */

export interface LinearLineInput {
  /** cm⁻¹. */
  readonly position: number;
  /** Standard uncertainty, cm⁻¹. */
  readonly uncertainty?: number;
  readonly source?: string;
  readonly assignment?: LinearAssignment;
}

export interface LinearFitOptions {
  /** Default 'a-posteriori'. 'absolute' needs an uncertainty on every assigned line. */
  readonly uncertaintyMode?: UncertaintyMode;
  /** Default 4; 0 turns rejection off. */
  readonly rejectionThreshold?: number;
  /** Default 0.2. */
  readonly maxRejectedFraction?: number;
  /** Default 0.01. */
  readonly termSignificance?: number;
  /** Highest centrifugal term: 1 = B, 2 = D, 3 = H. Default 3. */
  readonly maxCentrifugalOrder?: number;
}

export const LINEAR_TERM_CONVENTION =
  'F_v(J) = G_v + B_v[J(J+1) − l²] − D_v[J(J+1) − l²]² + H_v[J(J+1) − l²]³ ∓ ½{q_v J(J+1) + q_J,v [J(J+1)]²} for l ≥ 1, upper sign (−) for e and lower (+) for f, so E(f) − E(e) = q_v J(J+1) + q_J,v [J(J+1)]² (q_v is the full splitting coefficient, positive when f lies above e); band origin ν₀ = G_v′ − G_v″ of this form (a source that writes B·J(J+1) quotes G_v − B_v l² − D_v l⁴ instead).';

interface LinearObservation extends Observation {
  readonly upperKey: string;
  readonly lowerKey: string;
  readonly upperL: number;
  readonly lowerL: number;
  readonly upperParity: Parity;
  readonly lowerParity: Parity;
}

type Kind = 'T' | 'B' | 'D' | 'H' | 'q' | 'qJ';
/** |H| / (D²/B) above which a fitted H is reported as implausible (the note's molecules: 0.2–0.7). */
const IMPLAUSIBLE_H_RATIO = 10;
const ORDER_KINDS: readonly Kind[] = ['B', 'D', 'H'];

interface LevelInfo {
  readonly key: string;
  readonly level: LinearLevel;
  readonly reference: string;
  readonly parities: ReadonlySet<Parity>;
  readonly distinctJ: number;
  /**
   * Whether any line gives the level's rotational ladder (a line to another level, or a change of J). A level seen
   * only through l-type transitions (Q lines e↔f within the level) carries q and q_J but no B, D, H.
   */
  readonly rotational: boolean;
}

function levelCoefficient(kind: Kind, key: string, level: LevelInfo, o: LinearObservation): number {
  let c = 0;
  const part = (isKey: string, l: number, J: number, parity: Parity, sign: number) => {
    if (isKey !== key) return;
    const y = rotationalVariable(l, J);
    switch (kind) {
      case 'T':
        c += sign;
        break;
      case 'B':
        c += sign * y;
        break;
      case 'D':
        c -= sign * y * y;
        break;
      case 'H':
        c += sign * y * y * y;
        break;
      case 'q':
        c += sign * paritySign(parity) * 0.5 * J * (J + 1);
        break;
      case 'qJ':
        c += sign * paritySign(parity) * 0.5 * (J * (J + 1)) ** 2;
        break;
    }
  };
  part(o.upperKey, o.upperL, o.upperJ, o.upperParity, 1);
  part(o.lowerKey, o.lowerL, o.lowerJ, o.lowerParity, -1);
  void level;
  return c;
}

function parameterName(kind: Kind, level: LinearLevel, reference: LinearLevel): string {
  const lab = levelLabel(level);
  return kind === 'T' ? `G(${lab})-G(${levelLabel(reference)})` : `${kind}(${lab})`;
}

function linearLevelModel(
  species: string,
  infos: ReadonlyMap<string, LevelInfo>,
  orders: ReadonlyMap<string, number>,
  extra: ReadonlyMap<string, Kind> = new Map(),
): LinearModel {
  const parameters: (Parameter & { readonly level: string; readonly lk: Kind })[] = [];
  const add = (kind: Kind, info: LevelInfo) =>
    parameters.push({
      key: `${species}|${kind}|${info.key}`,
      name: parameterName(kind, info.level, parseLevelKey(info.reference)),
      unit: 'cm-1',
      species,
      kind,
      level: info.key,
      lk: kind,
    });
  for (const info of infos.values()) {
    if (info.key !== info.reference) add('T', info);
    const order = orders.get(info.key) ?? 1;
    if (info.rotational) {
      for (let k = 0; k < order; k++) add(ORDER_KINDS[k] as Kind, info);
      const next = extra.get(info.key);
      if (next) add(next, info);
    }
    if (info.level.l >= 1 && info.parities.size === 2) {
      add('q', info);
      // The doubling's own centrifugal term enters with D (HCN 01¹0: q_J = D_e − D_f ≈ −8.8e-8 cm⁻¹, note §1.6).
      if (order >= 2) add('qJ', info);
    }
  }
  return {
    parameters,
    coefficient: (p, o) => {
      const q = p as (typeof parameters)[number];
      return levelCoefficient(q.lk, q.level, infos.get(q.level) as LevelInfo, o as LinearObservation);
    },
  };
}

/** Level identities, references of the connected sets, parity components and distinct J per level. */
function levelInfos(obs: readonly LinearObservation[]): Map<string, LevelInfo> {
  const parent = new Map<string, string>();
  const isUpper = new Set<string>();
  const parities = new Map<string, Set<Parity>>();
  const js = new Map<string, Set<number>>();
  const rotational = new Set<string>();
  const find = (k: string): string => {
    let r = k;
    while (parent.get(r) !== r) r = parent.get(r) as string;
    return r;
  };
  const touch = (k: string, p: Parity, J: number) => {
    if (!parent.has(k)) parent.set(k, k);
    (parities.get(k) ?? parities.set(k, new Set()).get(k))?.add(p);
    (js.get(k) ?? js.set(k, new Set()).get(k))?.add(J);
  };
  for (const o of obs) {
    touch(o.upperKey, o.upperParity, o.upperJ);
    touch(o.lowerKey, o.lowerParity, o.lowerJ);
    if (o.upperKey !== o.lowerKey) isUpper.add(o.upperKey);
    if (o.upperKey !== o.lowerKey || o.upperJ !== o.lowerJ) {
      rotational.add(o.upperKey);
      rotational.add(o.lowerKey);
    }
  }
  // Prefer as the root: never an upper level, then fewer quanta, then the key.
  const rank = (k: string) => {
    const lv = parseLevelKey(k);
    return [isUpper.has(k) ? 1 : 0, lv.v.reduce((s, x) => s + x, 0), k] as const;
  };
  const better = (a: string, b: string) => {
    const ra = rank(a);
    const rb = rank(b);
    for (let i = 0; i < 3; i++) if (ra[i] !== rb[i]) return (ra[i] as number | string) < (rb[i] as number | string);
    return false;
  };
  for (const o of obs) {
    const a = find(o.upperKey);
    const b = find(o.lowerKey);
    if (a === b) continue;
    if (better(a, b)) parent.set(b, a);
    else parent.set(a, b);
  }
  const out = new Map<string, LevelInfo>();
  const keys = [...parent.keys()].sort((a, b) => (better(a, b) ? -1 : better(b, a) ? 1 : 0));
  for (const k of keys) {
    out.set(k, {
      key: k,
      level: parseLevelKey(k),
      reference: find(k),
      parities: parities.get(k) as Set<Parity>,
      distinctJ: (js.get(k) as Set<number>).size,
      rotational: rotational.has(k),
    });
  }
  return out;
}

function selectLinearModel(
  species: string,
  obs: readonly LinearObservation[],
  maxOrder: number,
  mode: UncertaintyMode,
  alpha: number,
): LevelSelection & { readonly infos: Map<string, LevelInfo> } {
  const infos = levelInfos(obs);
  const orders = new Map<string, number>([...infos.keys()].map((k) => [k, 1]));
  const base = linearLevelModel(species, infos, orders);
  if (obs.length < base.parameters.length) {
    throw new ScienceError(
      'FIT_TOO_FEW_LINES',
      `${obs.length} assigned line(s) cannot determine the ${base.parameters.length} parameters the bands need at the least (${base.parameters.map((x) => x.name).join(', ')})`,
      { lines: obs.length, parameters: base.parameters.length },
    );
  }
  const first = solveModel(base, obs, mode, false);
  if (isRankDeficient(first)) throw rankError(first, 'level model');
  let current: SolvedModel = first;
  for (let next = 2; next <= maxOrder; next++) {
    const eligible = [...orders]
      .filter(([k, o]) => o === next - 1 && (infos.get(k)?.distinctJ ?? 0) >= next + 2)
      .map(([k]) => k);
    if (eligible.length === 0) break;
    const trial = new Map(orders);
    for (const k of eligible) trial.set(k, next);
    const model = linearLevelModel(species, infos, trial);
    if (model.parameters.length >= obs.length) break;
    const t = solveModel(model, obs, mode, false);
    if (isRankDeficient(t)) break;
    if (termTest(current, t, mode) >= alpha) break;
    current = t;
    for (const k of eligible) orders.set(k, next);
  }
  const final = solveModel(current.model, obs, mode, true);
  return { fit: isRankDeficient(final) ? current : final, orders, infos };
}

export interface LinearTermConstraint {
  readonly parameter: string;
  readonly key: string;
  readonly prior: Quantity;
  readonly basis: string;
}

/**
 * The next centrifugal term of each level carried with a prior (the engine's option (a), see DEVELOPERS.md
 * "Truncated models"): H_v next to a fitted D_v as 0 ± D_v²/B_v (common practice: |H| ~ D²/B from the Kratzer-type
 * ordering D ≈ 4B³/ω², H ≈ D(B/ω)²·O(1); H/(D²/B) is 0.35 for CO2 00⁰1, 0.22 for N2O 00⁰0, 0.32 for OCS 00⁰0,
 * 0.5 for HCN 00⁰0 and 0.66 for HCN 01¹0 f, reference note §1);
 * D_v next to B_v alone as the mean D of the levels that fitted one ± 50 % (D changes little between levels:
 * CO2 D varies by about 20 % over the levels of RY1981).
 */
function constrainNextTerms(
  species: string,
  obs: readonly LinearObservation[],
  selection: LevelSelection & { readonly infos: Map<string, LevelInfo> },
  mode: UncertaintyMode,
): { fit: SolvedModel; constraints: LinearTermConstraint[] } {
  const { fit, orders, infos } = selection;
  const value = (kind: Kind, key: string): number | undefined => {
    const i = fit.model.parameters.findIndex((p) => p.key === `${species}|${kind}|${key}`);
    return i < 0 ? undefined : (fit.values[i] as number);
  };
  const fittedD = [...orders].filter(([, o]) => o >= 2).map(([k]) => value('D', k) as number);
  const meanD = fittedD.length > 0 ? fittedD.reduce((s, x) => s + x, 0) / fittedD.length : undefined;
  const extra = new Map<string, Kind>();
  const priors: (Prior & { basis: string })[] = [];
  for (const [k, o] of orders) {
    if (!infos.get(k)?.rotational) continue;
    if (o === 2) {
      const B = value('B', k) as number;
      const D = value('D', k) as number;
      const sigma = (D * D) / Math.abs(B);
      if (sigma > 0 && Number.isFinite(sigma)) {
        extra.set(k, 'H');
        priors.push({ key: `${species}|H|${k}`, value: 0, sigma, basis: '0 ± D_v²/B_v (order of magnitude of H)' });
      }
    } else if (o === 1 && meanD !== undefined && meanD !== 0) {
      extra.set(k, 'D');
      priors.push({
        key: `${species}|D|${k}`,
        value: meanD,
        sigma: 0.5 * Math.abs(meanD),
        basis: 'mean D_v of the other levels ± 50 %',
      });
    }
  }
  if (priors.length === 0) return { fit, constraints: [] };
  const model = linearLevelModel(species, infos, orders, extra);
  const solved = solveModelWithPriors(model, obs, priors, mode, reducedChiSquare(fit) ?? 1);
  if (isRankDeficient(solved)) return { fit, constraints: [] };
  const names = new Map(model.parameters.map((p) => [p.key, p.name]));
  return {
    fit: solved,
    constraints: priors.map((p) => ({
      parameter: names.get(p.key) as string,
      key: p.key,
      prior: quantity(p.value, p.sigma, 'cm-1'),
      basis: p.basis,
    })),
  };
}

export interface LinearLineOutcome {
  readonly index: number;
  readonly position: number;
  readonly assignment?: LinearTransition & { readonly band: string };
  readonly calculated?: number;
  readonly residual?: number;
  readonly studentisedResidual?: number;
  readonly status: 'fitted' | 'rejected' | 'unassigned';
  readonly reason?: string;
}

export interface LinearLevelResult {
  readonly key: string;
  readonly v: readonly number[];
  readonly l: number;
  readonly label: string;
  /** G_v − G_ref of its connected set, absent for the reference. */
  readonly term?: Quantity & { readonly relativeTo: string };
  readonly B: Quantity;
  readonly D?: Quantity;
  readonly H?: Quantity;
  readonly q?: Quantity;
  readonly qJ?: Quantity;
  /** For an l ≥ 1 level seen in one parity component only: that component (B is then its effective B). */
  readonly parity?: Parity;
}

/** A level seen only through l-type transitions (Q lines e↔f within it): q and q_J, no rotational constants. */
export type LinearLTypeLevelResult = Omit<LinearLevelResult, 'B' | 'D' | 'H' | 'term' | 'parity'>;

export interface LinearBandResult {
  readonly upper: LinearLevel;
  readonly lower: LinearLevel;
  readonly label: string;
  readonly kind: 'parallel' | 'perpendicular';
  /** ν₀ = G_v′ − G_v″ (B[J(J+1) − l²] form). */
  readonly origin?: Quantity;
  readonly lines: number;
  readonly jRange: readonly [number, number];
}

export interface LinearFitResult {
  readonly species: { readonly formula: string; readonly mass: Quantity };
  readonly convention: string;
  readonly lines: readonly LinearLineOutcome[];
  readonly levels: readonly LinearLevelResult[];
  /** Levels reached only by l-type transitions (empty in the usual case). */
  readonly lTypeLevels: readonly LinearLTypeLevelResult[];
  readonly bands: readonly LinearBandResult[];
  readonly parameters: readonly (Quantity & { readonly name: string; readonly key: string })[];
  readonly covariance: { readonly parameters: readonly string[]; readonly matrix: readonly (readonly number[])[] };
  readonly correlation: { readonly parameters: readonly string[]; readonly matrix: readonly (readonly number[])[] };
  readonly statistics: Statistics;
  readonly model: {
    readonly levelTerms: readonly { readonly level: string; readonly terms: readonly string[] }[];
    readonly selection: string;
    readonly constraints: readonly LinearTermConstraint[];
  };
  readonly combinationDifferences: readonly LinearCombinationDifferences[];
  /** σ estimated from the residual scatter for lines sent without one (per source, else per band, else pooled). */
  readonly scatter?: readonly ScatterGroup[];
  readonly warnings: readonly { readonly code: string; readonly message: string; readonly lines?: readonly number[] }[];
}

/** Reads, checks and turns the assigned lines into observations (INPUT_INVALID / ASSIGNMENT_INVALID with the line). */
function readLinearLines(
  species: LinearSpecies,
  input: readonly LinearLineInput[],
  mode: UncertaintyMode,
): { obs: LinearObservation[]; transitions: Map<number, LinearTransition> } {
  const obs: LinearObservation[] = [];
  const transitions = new Map<number, LinearTransition>();
  input.forEach((l, index) => {
    checkLinearLine(l, index);
    if (!l.assignment) return;
    const t = lineTransition(species, l.assignment, index);
    if (mode === 'absolute' && l.uncertainty === undefined) {
      throw new ScienceError(
        'INPUT_INVALID',
        `line ${index} has no uncertainty: uncertaintyMode "absolute" needs one on every assigned line`,
        { line: index },
      );
    }
    transitions.set(index, t);
    obs.push(linearObservation(species, l, index, t));
  });
  if (obs.length === 0) {
    throw new ScienceError('FIT_NO_ASSIGNED_LINES', 'no line carries an assignment, so there is nothing to fit', {
      lines: input.length,
    });
  }
  return { obs, transitions };
}

/** INPUT_INVALID for a position that is not positive and finite, or an uncertainty given that is not positive. */
function checkLinearLine(l: LinearLineInput, index: number): void {
  if (!(l.position > 0) || !Number.isFinite(l.position)) {
    throw new ScienceError('INPUT_INVALID', `line ${index}: position ${l.position} must be positive and finite`, {
      line: index,
    });
  }
  if (l.uncertainty !== undefined && !(l.uncertainty > 0 && Number.isFinite(l.uncertainty))) {
    throw new ScienceError('INPUT_INVALID', `line ${index}: uncertainty ${l.uncertainty} must be positive`, {
      line: index,
    });
  }
}

/** The transition a line's assignment names; a refusal of it names the line. */
function lineTransition(species: LinearSpecies, assignment: LinearAssignment, index: number): LinearTransition {
  try {
    return resolveTransition(species, assignment);
  } catch (e) {
    if (e instanceof ScienceError) {
      throw new ScienceError(e.code, `line ${index}: ${e.message}`, { ...e.details, line: index });
    }
    throw e;
  }
}

/** The observation of an assigned line: its levels, J, parities and the weight 1/σ² (σ = 1 when none is given). */
function linearObservation(
  species: LinearSpecies,
  l: LinearLineInput,
  index: number,
  t: LinearTransition,
): LinearObservation {
  const sigma = l.uncertainty ?? 1;
  return {
    index,
    species: species.formula,
    upperV: 0,
    lowerV: 0,
    upperJ: t.upperJ,
    lowerJ: t.j,
    position: l.position,
    weight: 1 / (sigma * sigma),
    upperKey: levelKey(t.upper),
    lowerKey: levelKey(t.lower),
    upperL: t.upper.l,
    lowerL: t.lower.l,
    upperParity: t.upperParity,
    lowerParity: t.lowerParity,
  };
}

/**
 * Fits assigned lines of one linear species: read → term selection → outlier rejection → next terms constrained
 * → report (levels, band origins with their covariance, combination differences Δ₂F″ of Σ lower levels).
 */
export function fitLinearLines(
  species: LinearSpecies,
  input: readonly LinearLineInput[],
  options: LinearFitOptions = {},
): LinearFitResult {
  const mode = options.uncertaintyMode ?? 'a-posteriori';
  const maxOrder = Math.min(Math.max(options.maxCentrifugalOrder ?? 3, 1), 3);
  const alpha = options.termSignificance ?? 0.01;
  const read = readLinearLines(species, input, mode);
  const { transitions } = read;
  const s = species.formula;
  const select = (o: readonly Observation[]) =>
    selectLinearModel(s, o as readonly LinearObservation[], maxOrder, mode, alpha);
  // Lines without σ: σ from the residual scatter per source (else per band), as the diatomic fit does.
  const weighed = weighLines(
    input.map((l) => ({
      ...(l.uncertainty !== undefined ? { uncertainty: l.uncertainty } : {}),
      ...(l.source !== undefined ? { source: l.source } : {}),
    })),
    read.obs,
    { maxOrder, termSignificance: alpha },
    {
      refit: (o) => selectLinearModel(s, o as readonly LinearObservation[], maxOrder, 'a-posteriori', alpha),
      band: (o) => {
        const x = o as LinearObservation;
        return {
          key: `${s}|${x.upperKey}>${x.lowerKey}`,
          label: `${s} ${bandLabel(parseLevelKey(x.upperKey), parseLevelKey(x.lowerKey))}`,
        };
      },
    },
  );
  const obs = weighed.observations as readonly LinearObservation[];
  const initial = select(obs);
  const outl = rejectOutliers(
    obs,
    initial,
    {
      maxOrder,
      mode,
      termSignificance: alpha,
      rejectionThreshold: options.rejectionThreshold ?? 4,
      maxRejectedFraction: options.maxRejectedFraction ?? 0.2,
    },
    select,
  );
  const selection = outl.level as ReturnType<typeof select>;
  const kept = outl.kept as readonly LinearObservation[];
  const { fit, constraints } =
    maxOrder >= 2
      ? constrainNextTerms(s, kept, selection, mode)
      : { fit: selection.fit, constraints: [] as LinearTermConstraint[] };
  const report = reportLinearFit(species, input, obs, transitions, outl.rejected, fit, selection, constraints, mode);
  return {
    ...report,
    ...(weighed.groups.length > 0 ? { scatter: weighed.groups } : {}),
    warnings: [...weighed.warnings, ...report.warnings],
  };
}

type LinearWarning = LinearFitResult['warnings'][number];
/** A fitted parameter of the species as a quantity ("s|kind|level"), undefined when the model has none. */
type QuantityOf = (kind: Kind, key: string) => Quantity | undefined;

/**
 * The report, in stages: lines → l-type and rotational levels → warnings on implausible H → bands → combination
 * differences → statistics and the model's description. Warnings come in that order.
 */
function reportLinearFit(
  species: LinearSpecies,
  input: readonly LinearLineInput[],
  obs: readonly LinearObservation[],
  transitions: ReadonlyMap<number, LinearTransition>,
  rejected: ReadonlyMap<number, string>,
  fit: SolvedModel,
  selection: LevelSelection & { readonly infos: Map<string, LevelInfo> },
  constraints: readonly LinearTermConstraint[],
  mode: UncertaintyMode,
): LinearFitResult {
  const s = species.formula;
  const q = quantityLookup(s, fit);
  const warnings: LinearWarning[] = [];
  const lines = linearLineOutcomes(input, obs, transitions, rejected, fit);
  if (rejected.size > 0) {
    warnings.push({
      code: 'LINES_REJECTED',
      message: `${rejected.size} line(s) rejected as outliers (studentised residual)`,
      lines: [...rejected.keys()],
    });
  }
  const constrained = new Set(constraints.map((c) => c.key));
  const lTypeLevels = lTypeLevelsOf(selection.infos, q);
  const rotational = rotationalLevelsOf(s, selection.infos, q, constrained);
  const levels = rotational.levels;
  warnings.push(...rotational.warnings, ...implausibleHWarnings(levels));
  const bands = bandsOf(s, fit, selection.infos, obs, transitions);
  const combinationDifferences = linearCombinationDifferences(species, input, transitions, rejected, levels);
  warnings.push(...disagreeingDifferences(combinationDifferences));
  if (fit.degreesOfFreedom < 5) {
    warnings.push({
      code: 'FEW_DEGREES_OF_FREEDOM',
      message: `only ${fit.degreesOfFreedom} degrees of freedom`,
    });
  }
  return {
    species: { formula: s, mass: quantity(species.mass.value, species.mass.uncertainty, 'u') },
    convention: LINEAR_TERM_CONVENTION,
    lines,
    levels,
    lTypeLevels,
    bands,
    ...parametersAndCovariance(fit),
    statistics: linearStatistics(input.length, transitions.size, rejected.size, fit, mode),
    model: linearModelDescription(selection, fit, constraints, mode),
    combinationDifferences,
    warnings,
  };
}

function quantityLookup(s: string, fit: SolvedModel): QuantityOf {
  const p = fit.model.parameters.length;
  const index = new Map(fit.model.parameters.map((x, i) => [x.key, i]));
  return (kind, key) => {
    const i = index.get(`${s}|${kind}|${key}`);
    return i === undefined
      ? undefined
      : quantity(fit.values[i] as number, Math.sqrt(fit.covariance[i * p + i] as number), 'cm-1');
  };
}

/**
 * Every line in input order: unassigned, fitted (residual, studentised residual) or rejected (reason, and residual
 * and studentised residual against the final fit, which left it out).
 */
function linearLineOutcomes(
  input: readonly LinearLineInput[],
  obs: readonly LinearObservation[],
  transitions: ReadonlyMap<number, LinearTransition>,
  rejected: ReadonlyMap<number, string>,
  fit: SolvedModel,
): LinearLineOutcome[] {
  const t = studentisedResiduals(fit);
  const keptPos = new Map(fit.observations.map((o, i) => [o.index, i]));
  const byIndex = new Map(obs.map((o) => [o.index, o]));
  return input.map((l, i) => {
    const a = transitions.get(i);
    if (!a) return { index: i, position: l.position, status: 'unassigned' as const };
    const assignment = { ...a, band: bandLabel(a.upper, a.lower) };
    const k = keptPos.get(i);
    if (k !== undefined) {
      const residual = fit.residuals[k] as number;
      return {
        index: i,
        position: l.position,
        assignment,
        calculated: l.position - residual,
        residual,
        studentisedResidual: t[k] as number,
        status: 'fitted' as const,
      };
    }
    const ob = byIndex.get(i) as Observation;
    const calc = predictWithVariance(fit, ob)?.value;
    const tOut = calc !== undefined ? excludedStudentisedResidual(fit, ob) : undefined;
    return {
      index: i,
      position: l.position,
      assignment,
      ...(calc !== undefined ? { calculated: calc, residual: l.position - calc } : {}),
      ...(tOut !== undefined ? { studentisedResidual: tOut } : {}),
      status: 'rejected' as const,
      reason: rejected.get(i) ?? 'rejected',
    };
  });
}

/** The l-type doubling constants of the vibrational levels that carry no rotational constants of their own. */
function lTypeLevelsOf(infos: ReadonlyMap<string, LevelInfo>, q: QuantityOf): LinearLTypeLevelResult[] {
  return [...infos.values()]
    .filter((info) => !info.rotational)
    .map((info) => {
      const qv = q('q', info.key);
      const qJ = q('qJ', info.key);
      return {
        key: info.key,
        v: info.level.v,
        l: info.level.l,
        label: levelLabel(info.level),
        ...(qv ? { q: qv } : {}),
        ...(qJ ? { qJ } : {}),
      };
    });
}

/**
 * The rotational levels (term value, B, D and H unless constrained, q): with a warning for each l ≥ 1 level seen in
 * one parity component only (q undetermined, B that component's effective B).
 */
function rotationalLevelsOf(
  s: string,
  infos: ReadonlyMap<string, LevelInfo>,
  q: QuantityOf,
  constrained: ReadonlySet<string>,
): { levels: LinearLevelResult[]; warnings: LinearWarning[] } {
  const warnings: LinearWarning[] = [];
  const levels: LinearLevelResult[] = [...infos.values()]
    .filter((info) => info.rotational)
    .map((info) => {
      const k = info.key;
      const maybe = (kind: Kind) => (constrained.has(`${s}|${kind}|${k}`) ? undefined : q(kind, k));
      const term = q('T', k);
      const D = maybe('D');
      const H = maybe('H');
      const qv = q('q', k);
      const qJ = q('qJ', k);
      const oneParity = info.level.l >= 1 && info.parities.size === 1 ? [...info.parities][0] : undefined;
      if (oneParity) {
        warnings.push({
          code: 'L_DOUBLING_UNDETERMINED',
          message: `level ${levelLabel(info.level)} is seen only in its ${oneParity} component: q is not determined and B is that component's effective B`,
        });
      }
      return {
        key: k,
        v: info.level.v,
        l: info.level.l,
        label: levelLabel(info.level),
        ...(term ? { term: { ...term, relativeTo: info.reference } } : {}),
        B: q('B', k) as Quantity,
        ...(D ? { D } : {}),
        ...(H ? { H } : {}),
        ...(qv ? { q: qv } : {}),
        ...(qJ ? { qJ } : {}),
        ...(oneParity ? { parity: oneParity } : {}),
      };
    });
  return { levels, warnings };
}

/**
 * |H| ~ D²/B (common practice; 0.2–0.7 for the molecules of the reference note, §1). Far beyond it, the term test
 * kept H for structure the model lacks (perturbations, pressure shifts in certified centres, a wrong J).
 */
function implausibleHWarnings(levels: readonly LinearLevelResult[]): LinearWarning[] {
  const warnings: LinearWarning[] = [];
  for (const l of levels) {
    if (l.H && l.D && l.D.value !== 0) {
      const scale = (l.D.value * l.D.value) / Math.abs(l.B.value);
      const ratio = Math.abs(l.H.value) / scale;
      if (ratio > IMPLAUSIBLE_H_RATIO) {
        warnings.push({
          code: 'CENTRIFUGAL_TERM_IMPLAUSIBLE',
          message: `H of ${l.label} is ${ratio.toFixed(0)} × D²/B, far beyond centrifugal distortion (|H| ~ D²/B): the lines carry structure the level model lacks (a perturbation, pressure shifts, a misnumbered J), which H absorbs; B and D then hold it too`,
        });
      }
    }
  }
  return warnings;
}

/** A warning per level whose B from combination differences is more than 3 combined σ from the full fit's. */
function disagreeingDifferences(cds: readonly LinearCombinationDifferences[]): LinearWarning[] {
  return cds
    .filter((cd) => cd.deviation > 3)
    .map((cd) => ({
      code: 'COMBINATION_DIFFERENCES_DISAGREE',
      message: `B from the combination differences of ${cd.level} differs from the full fit by ${cd.deviation.toFixed(1)} combined σ`,
    }));
}

function parametersAndCovariance(fit: SolvedModel): Pick<LinearFitResult, 'parameters' | 'covariance' | 'correlation'> {
  const params = fit.model.parameters;
  const p = params.length;
  const names = params.map((x) => x.name);
  return {
    parameters: params.map((x, i) => ({
      name: x.name,
      key: x.key,
      ...quantity(fit.values[i] as number, Math.sqrt(fit.covariance[i * p + i] as number), 'cm-1'),
    })),
    covariance: { parameters: names, matrix: toRows(fit.covariance, p) },
    correlation: { parameters: names, matrix: toRows(correlationOf(fit.covariance, p), p) },
  };
}

function linearStatistics(
  lines: number,
  assigned: number,
  rejected: number,
  fit: SolvedModel,
  mode: UncertaintyMode,
): Statistics {
  return {
    lines,
    assigned,
    fitted: fit.observations.length,
    rejected,
    unassigned: lines - assigned,
    parameters: fit.model.parameters.length,
    degreesOfFreedom: fit.degreesOfFreedom,
    rms: rmsResidual(fit),
    reducedChiSquare: reducedChiSquare(fit),
    conditionNumber: Number.isFinite(fit.conditionNumber) ? fit.conditionNumber : null,
    uncertaintyMode: mode,
  };
}

function linearModelDescription(
  selection: { readonly infos: ReadonlyMap<string, LevelInfo> },
  fit: SolvedModel,
  constraints: readonly LinearTermConstraint[],
  mode: UncertaintyMode,
): LinearFitResult['model'] {
  const params = fit.model.parameters;
  return {
    levelTerms: [...selection.infos.keys()].map((k) => ({
      level: k,
      terms: params.filter((x) => (x as { level?: string }).level === k).map((x) => x.name),
    })),
    selection: `per level B, then D, then H while the ${mode === 'absolute' ? 'χ² difference' : 'nested F'} test keeps p < 0.01; q for l ≥ 1 levels seen in both parity components`,
    constraints,
  };
}

function bandsOf(
  s: string,
  fit: SolvedModel,
  infos: ReadonlyMap<string, LevelInfo>,
  obs: readonly LinearObservation[],
  transitions: ReadonlyMap<number, LinearTransition>,
): LinearBandResult[] {
  const params = fit.model.parameters;
  const p = params.length;
  const idx = (key: string) => params.findIndex((x) => x.key === `${s}|T|${key}`);
  const groups = new Map<string, LinearObservation[]>();
  for (const o of obs) {
    const k = `${o.upperKey}>${o.lowerKey}`;
    (groups.get(k) ?? groups.set(k, []).get(k))?.push(o);
  }
  return [...groups].map(([, members]) => {
    const first = members[0] as LinearObservation;
    const t = transitions.get(first.index) as LinearTransition;
    const iu = idx(first.upperKey);
    const il = idx(first.lowerKey);
    const sameSet = infos.get(first.upperKey)?.reference === infos.get(first.lowerKey)?.reference;
    let origin: Quantity | undefined;
    if (sameSet && first.upperKey !== first.lowerKey) {
      const vu = iu >= 0 ? (fit.values[iu] as number) : 0;
      const vl = il >= 0 ? (fit.values[il] as number) : 0;
      const c = (a: number, b: number) => (a >= 0 && b >= 0 ? (fit.covariance[a * p + b] as number) : 0);
      const variance = c(iu, iu) + c(il, il) - 2 * c(iu, il);
      origin = quantity(vu - vl, Math.sqrt(Math.max(variance, 0)), 'cm-1');
    }
    const js = members.map((m) => m.lowerJ);
    return {
      upper: t.upper,
      lower: t.lower,
      label: bandLabel(t.upper, t.lower),
      kind: t.upper.l === t.lower.l ? ('parallel' as const) : ('perpendicular' as const),
      ...(origin ? { origin } : {}),
      lines: members.length,
      jRange: [extentOf(js).lo, extentOf(js).hi] as const,
    };
  });
}

import { bondLength } from '../derive/bond-length.js';
import { type Quantity, quantity } from '../derive/quantity.js';
import { levelStructure } from '../models/level-model.js';
import type { Observation } from '../models/linear-model.js';
import { formatBand, type Transition } from '../models/transitions.js';
import type { MassValue } from '../species/reduced-mass.js';
import { BandTable } from './band-table.js';
import { correlationOf, type SolvedModel, studentisedResiduals, toRows } from './engine.js';
import { excludedStudentisedResidual, predictWithVariance } from './level-selection.js';
import type { AssignmentsByLine } from './observations.js';
import { rejectionReason } from './outliers.js';
import type { FitResult, LineInput, LineOutcome, NamedQuantity, Warning } from './types.js';

export interface LevelReport {
  readonly lines: LineOutcome[];
  readonly bands: FitResult['bands'][number][];
  readonly levels: FitResult['levels'][number][];
  readonly levelTerms: { species: string; v: number; terms: string[] }[];
  readonly parameters: NamedQuantity[];
  readonly names: string[];
  readonly covariance: number[][];
  readonly correlation: number[][];
  /** The level-model quantity of a parameter key ("species|B|v"), when fitted. */
  quantityOf(key: string): Quantity | undefined;
  readonly warnings: Warning[];
}

/**
 * Stage 4: what the level fit says, line by line (fitted, rejected with its reason, unassigned), band by band
 * (origin ν₀ = T_v′ − T_v″ with the covariance of the two term values) and level by level (B_v, D_v, … and the
 * effective bond length r_v), with the parameters, their covariance and correlation.
 */
export function reportLevels(
  input: readonly LineInput[],
  observations: readonly Observation[],
  transitions: AssignmentsByLine,
  rejected: ReadonlyMap<number, string>,
  fit: SolvedModel,
  masses: ReadonlyMap<string, MassValue>,
  /** Keys of constrained parameters: in the parameters and covariance, but not reported as level constants. */
  constrained: ReadonlySet<string> = new Set(),
): LevelReport {
  const params = fit.model.parameters;
  const p = params.length;
  const paramIndex = new Map(params.map((q, i) => [q.key, i]));
  const sigmaOf = (i: number) => Math.sqrt(fit.covariance[i * p + i] as number);
  const quantityOf = (key: string): Quantity | undefined => {
    const i = paramIndex.get(key);
    return i === undefined ? undefined : quantity(fit.values[i] as number, sigmaOf(i), 'cm-1');
  };
  const lines = lineOutcomes(input, observations, transitions, rejected, fit);
  const bands = bandOrigins(fit, paramIndex);
  const { levels, levelTerms, warnings } = levelConstants(fit, masses, constrained, quantityOf);
  const parameters: NamedQuantity[] = params.map((par, i) => ({
    name: par.name,
    value: fit.values[i] as number,
    uncertainty: sigmaOf(i),
    unit: par.unit,
    ...(par.species ? { species: par.species } : {}),
  }));
  return {
    lines,
    bands,
    levels,
    levelTerms,
    parameters,
    names: params.map((x) => x.name),
    covariance: toRows(fit.covariance, p),
    correlation: toRows(correlationOf(fit.covariance, p), p),
    quantityOf,
    warnings,
  };
}

/**
 * Every line in input order: unassigned, fitted (residual, studentised residual) or rejected (reason, residual and
 * studentised residual against the final fit, which left the line out).
 */
function lineOutcomes(
  input: readonly LineInput[],
  observations: readonly Observation[],
  transitions: AssignmentsByLine,
  rejected: ReadonlyMap<number, string>,
  fit: SolvedModel,
): LineOutcome[] {
  const t = studentisedResiduals(fit);
  const keptAt = keptPositions(fit.observations, input.length);
  const byIndex = observationsByLine(observations, input.length);
  const bandLabel = bandLabels();
  return input.map((l, index) => {
    // Built member by member (no spreads of optional parts: this runs for every line of every fit); the members
    // come in the order the answer has always had.
    const out: Writable<LineOutcome> = { index, position: l.position } as Writable<LineOutcome>;
    if (l.intensity !== undefined) out.intensity = l.intensity;
    const a = transitions.get(index);
    if (!a) {
      out.status = 'unassigned';
      return out;
    }
    out.assignment = { band: bandLabel(a.band), branch: a.branch, j: a.j, species: a.species, source: a.source };
    const ki = keptAt[index] as number;
    if (ki >= 0) {
      const residual = fit.residuals[ki] as number;
      out.calculated = l.position - residual;
      out.residual = residual;
      out.studentisedResidual = t[ki] as number;
      out.status = 'fitted';
      return out;
    }
    out.status = 'rejected';
    out.reason = rejected.get(index) ?? 'rejected';
    const ob = byIndex[index] as Observation;
    const calculated = predictWithVariance(fit, ob)?.value;
    if (calculated !== undefined) {
      out.calculated = calculated;
      out.residual = l.position - calculated;
      const t = excludedStudentisedResidual(fit, ob);
      if (t !== undefined) {
        out.studentisedResidual = t;
        out.reason = reasonWithFinalFigure(out.reason, t);
      }
    }
    return out;
  });
}

/** Each line's place among the kept observations of the fit, by line index (−1: not kept). */
function keptPositions(kept: readonly Observation[], lines: number): Int32Array {
  const at = new Int32Array(lines).fill(-1);
  for (let i = 0; i < kept.length; i++) at[(kept[i] as Observation).index] = i;
  return at;
}

/** The observation read from each line, by line index (undefined for an unassigned line). */
function observationsByLine(observations: readonly Observation[], lines: number): (Observation | undefined)[] {
  const at = new Array<Observation | undefined>(lines).fill(undefined);
  for (const o of observations) at[o.index] = o;
  return at;
}

/** formatBand, written once per band object (a list's lines share a few). */
function bandLabels(): (band: Transition['band']) => string {
  const known = new Map<Transition['band'], string>();
  return (band) => {
    let label = known.get(band);
    if (label === undefined) {
      label = formatBand(band);
      known.set(band, label);
    }
    return label;
  };
}

/**
 * A rejection reason printed with the line's own `studentisedResidual` (against the final fit) while that still
 * exceeds the threshold; otherwise the figure at rejection stays, and the final one is added.
 */
function reasonWithFinalFigure(reason: string, t: number): string {
  const m = /^studentised residual (\S+) exceeds (\d+\.\d+)$/.exec(reason);
  if (!m) return reason;
  const threshold = Number(m[2]);
  if (Math.abs(t) > threshold) return rejectionReason(t, threshold);
  return `${reason} when rejected (${t.toFixed(2)} against the final fit)`;
}

/** A result type with its members writable, for building it member by member. */
type Writable<T> = { -readonly [K in keyof T]: T[K] };

/** Per band: its fitted lines, J″ range and, for a vibrational band, the origin T_v′ − T_v″ with their covariance. */
function bandOrigins(fit: SolvedModel, paramIndex: ReadonlyMap<string, number>): FitResult['bands'][number][] {
  const p = fit.model.parameters.length;
  const bandStats = new BandTable((o) => ({
    species: o.species,
    band: `${o.upperV}-${o.lowerV}`,
    upper: o.upperV,
    lower: o.lowerV,
    n: 0,
    jmin: Number.POSITIVE_INFINITY,
    jmax: Number.NEGATIVE_INFINITY,
  }));
  for (const o of fit.observations) {
    const b = bandStats.of(o);
    b.n++;
    if (o.lowerJ < b.jmin) b.jmin = o.lowerJ;
    if (o.lowerJ > b.jmax) b.jmax = o.lowerJ;
  }
  return bandStats.inOrder.map((b) => {
    let origin: Quantity | undefined;
    if (b.upper !== b.lower) {
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
}

/** Per level: term value, B_v and the determined centrifugal terms (constrained ones left out), and r_v. */
function levelConstants(
  fit: SolvedModel,
  masses: ReadonlyMap<string, MassValue>,
  constrained: ReadonlySet<string>,
  quantityOf: (key: string) => Quantity | undefined,
): Pick<LevelReport, 'levels' | 'levelTerms' | 'warnings'> {
  const structure = levelStructure(fit.observations);
  const warnings: Warning[] = [];
  const levels: FitResult['levels'][number][] = [];
  const levelTerms: { species: string; v: number; terms: string[] }[] = [];
  for (const s of structure.species) {
    const mu = masses.get(s) as MassValue;
    for (const v of structure.levels.get(s) as readonly number[]) {
      const B = quantityOf(`${s}|B|${v}`) as Quantity;
      const ref = structure.reference.get(s)?.get(v) as number;
      const T = quantityOf(`${s}|T|${v}`);
      const extra: Record<string, Quantity> = {};
      const terms: string[] = ['B'];
      for (const kind of ['D', 'H', 'L', 'M'] as const) {
        if (constrained.has(`${s}|${kind}|${v}`)) continue;
        const x = quantityOf(`${s}|${kind}|${v}`);
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
  return { levels, levelTerms, warnings };
}

/**
 * A linear spectroscopic model: named parameters and, for each line, the coefficient of every parameter in the
 * line's predicted position. Level, Dunham and mass-reduced Dunham models all take this shape, so one design
 * builder, one solver and one term-selection procedure serve them all.
 */

export interface Parameter {
  /** Unique key inside a model, e.g. "1H-35Cl|B|0" or "1H-35Cl|Y|0,1". */
  readonly key: string;
  /** Display name, e.g. "B_0", "Y01", "T_1-T_0". Unique within one fit. */
  readonly name: string;
  readonly unit: string;
  readonly species?: string;
  /** Vibrational level for level-model parameters. */
  readonly v?: number;
  /** Level key of a linear-polyatomic level parameter ("0,1,0|1", see src/linear/types.ts#levelKey). */
  readonly level?: string;
  /** Dunham indices for Y_kl / U_kl. */
  readonly k?: number;
  readonly l?: number;
  /**
   * What the parameter is: term value, rotational or centrifugal constant, l-type doubling constant (linear
   * polyatomics), Dunham or mass-reduced coefficient.
   */
  readonly kind: 'T' | 'B' | 'D' | 'H' | 'L' | 'M' | 'q' | 'qJ' | 'Y' | 'U';
}

export interface Observation {
  /** Index of the line in the caller's list. */
  readonly index: number;
  readonly species: string;
  readonly upperV: number;
  readonly lowerV: number;
  readonly upperJ: number;
  readonly lowerJ: number;
  /** Position in cm⁻¹. */
  readonly position: number;
  /** Weight 1/σ² in cm². */
  readonly weight: number;
}

export interface LinearModel {
  readonly parameters: readonly Parameter[];
  /** Coefficient of parameter `p` in the position of observation `o`. */
  coefficient(p: Parameter, o: Observation): number;
  /**
   * Set when a parameter's column depends on nothing but this key and the observations' levels (not on the model
   * instance): trial models over the same observations then share the column instead of computing it again.
   */
  columnKey?(p: Parameter): string | undefined;
  /** The column of `p` over all observations at once, equal to `coefficient` row by row (a faster loop). */
  column?(p: Parameter, obs: readonly Observation[]): Float64Array;
  /**
   * True when a line's row depends on nothing but its transition (species, v′, v″, J′, J″): lines of the same
   * transition then have identical rows, and the solve builds and merges the distinct ones only.
   */
  readonly rowsByTransition?: boolean;
  /**
   * The numbers of the parameters whose coefficient in `o` may be non-zero, ascending (every other parameter's is
   * zero): a prediction then asks `coefficient` for these only.
   */
  parametersOf?(o: Observation): Int32Array;
}

import { floats } from '../linalg/small-arrays.js';
import { transitionGroups } from './level-states.js';

/**
 * Columns already computed, per observation array (which is never changed once built): every trial model of a
 * term selection, and the fits with priors, share them. Held weakly, so they go with the observations.
 */
const columns = new WeakMap<readonly Observation[], Map<string, Float64Array>>();

function columnsOf(obs: readonly Observation[]): Map<string, Float64Array> {
  let m = columns.get(obs);
  if (!m) {
    m = new Map();
    columns.set(obs, m);
  }
  return m;
}

/**
 * The observations with some weights changed (`weightOf` gives the new weight, or undefined to keep the observation
 * as it is), same levels in the same order: the new array shares the columns already computed for the old one.
 */
export function reweighted(
  obs: readonly Observation[],
  weightOf: (o: Observation) => number | undefined,
): Observation[] {
  const out = obs.map((o) => {
    const w = weightOf(o);
    return w === undefined ? o : { ...o, weight: w };
  });
  columns.set(out, columnsOf(obs));
  return out;
}

/** The first observation of each transition, in order (one per row of a design over distinct transitions). */
const distinct = new WeakMap<readonly Observation[], readonly Observation[]>();

export function distinctTransitions(obs: readonly Observation[]): readonly Observation[] {
  let d = distinct.get(obs);
  const { firstRow } = transitionGroups(obs);
  if (!d || d.length !== firstRow.length) {
    d = Array.from(firstRow, (i) => obs[i] as Observation);
    distinct.set(obs, d);
  }
  return d;
}

/**
 * The columns of a model's design over observations: a shared column as it is kept (not copied; nobody modifies
 * them), the others computed.
 */
export function designColumns(model: LinearModel, obs: readonly Observation[]): Float64Array[] {
  const shared = model.columnKey ? columnsOf(obs) : undefined;
  return model.parameters.map((p) => {
    const key = model.columnKey?.(p);
    const known = key !== undefined ? shared?.get(key) : undefined;
    if (known) return known;
    let col: Float64Array;
    if (model.column) col = model.column(p, obs);
    else {
      col = floats(obs.length);
      for (let i = 0; i < obs.length; i++) col[i] = model.coefficient(p, obs[i] as Observation);
    }
    if (key !== undefined) shared?.set(key, col);
    return col;
  });
}

/** Column-major design matrix of a model over observations (a fresh array). */
export function buildDesign(model: LinearModel, obs: readonly Observation[]): Float64Array {
  const n = obs.length;
  const a = floats(n * model.parameters.length);
  designColumns(model, obs).forEach((c, j) => {
    a.set(c, j * n);
  });
  return a;
}

export function predictPosition(model: LinearModel, values: ArrayLike<number>, o: Observation): number {
  let s = 0;
  model.parameters.forEach((p, j) => {
    s += model.coefficient(p, o) * (values[j] as number);
  });
  return s;
}

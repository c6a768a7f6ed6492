import { floats } from '../linalg/small-arrays.js';
import { levelStates, rotationalPowers } from './level-states.js';
import type { LinearModel, Observation, Parameter } from './linear-model.js';

/**
 * The band-by-band level model: E_v(J) = T_v + B_v x − D_v x² + H_v x³ + L_v x⁴ + M_v x⁵, x = J(J+1)
 * (Herzberg, Spectra of Diatomic Molecules, ch. III; M_v, the x⁵ term, is needed by pure-rotation lines to J ≈ 80
 * of CO). Only differences of T are observable: within each set of
 * levels connected by vibrational bands, the lowest level is the reference (T = 0) and the others carry
 * T_v − T_ref. A line's position is E_v′(J′) − E_v″(J″).
 */

/** Centrifugal order: 1 = B only, 2 = B, D; 3 = B, D, H; 4 = B, D, H, L; 5 = B, D, H, L, M. */
export type CentrifugalOrder = 1 | 2 | 3 | 4 | 5;
export const MAX_CENTRIFUGAL_ORDER = 5;
export const ROTATIONAL_KINDS = ['B', 'D', 'H', 'L', 'M'] as const;
/** Sign of each power of x in the term formula (+B x − D x² + H x³ + L x⁴ + M x⁵). */
export const CENTRIFUGAL_SIGN = [1, -1, 1, 1, 1] as const;

export interface LevelStructure {
  /** Species in order of first appearance. */
  readonly species: readonly string[];
  /** Vibrational levels seen per species, ascending. */
  readonly levels: ReadonlyMap<string, readonly number[]>;
  /** Reference level of each level's connected set, per species. */
  readonly reference: ReadonlyMap<string, ReadonlyMap<number, number>>;
}

/** Structures already found, per observation array (never changed once built; held weakly, like the columns). */
const structures = new WeakMap<readonly Observation[], LevelStructure>();

/** Species, levels and reference levels of a set of observations (found once per observation array). */
export function levelStructure(obs: readonly Observation[]): LevelStructure {
  let known = structures.get(obs);
  if (!known) {
    known = findLevelStructure(obs);
    structures.set(obs, known);
  }
  return known;
}

function findLevelStructure(obs: readonly Observation[]): LevelStructure {
  const species: string[] = [];
  const levelSets = new Map<string, Set<number>>();
  const parent = new Map<string, Map<number, number>>();
  const find = (m: Map<number, number>, v: number): number => {
    let r = v;
    while (m.get(r) !== r) r = m.get(r) as number;
    return r;
  };
  for (const o of obs) {
    if (!levelSets.has(o.species)) {
      species.push(o.species);
      levelSets.set(o.species, new Set());
      parent.set(o.species, new Map());
    }
    const set = levelSets.get(o.species) as Set<number>;
    const uf = parent.get(o.species) as Map<number, number>;
    for (const v of [o.upperV, o.lowerV]) {
      set.add(v);
      if (!uf.has(v)) uf.set(v, v);
    }
    const a = find(uf, o.upperV);
    const b = find(uf, o.lowerV);
    if (a !== b) uf.set(Math.max(a, b), Math.min(a, b));
  }
  const levels = new Map<string, number[]>();
  const reference = new Map<string, Map<number, number>>();
  for (const s of species) {
    const vs = [...(levelSets.get(s) as Set<number>)].sort((x, y) => x - y);
    levels.set(s, vs);
    const uf = parent.get(s) as Map<number, number>;
    const ref = new Map<number, number>();
    // Union by smaller root keeps the lowest level as the root of each set.
    for (const v of vs) ref.set(v, find(uf, v));
    reference.set(s, ref);
  }
  return { species, levels, reference };
}

function suffix(species: string, multi: boolean): string {
  return multi ? `(${species})` : '';
}

export function levelParameters(structure: LevelStructure, order: ReadonlyMap<string, number> | number): Parameter[] {
  const multi = structure.species.length > 1;
  const out: Parameter[] = [];
  for (const s of structure.species) {
    const vs = structure.levels.get(s) as readonly number[];
    const ref = structure.reference.get(s) as ReadonlyMap<number, number>;
    for (const v of vs) {
      const r = ref.get(v) as number;
      if (r !== v)
        out.push({
          key: `${s}|T|${v}`,
          name: `T_${v}-T_${r}${suffix(s, multi)}`,
          unit: 'cm-1',
          species: s,
          v,
          kind: 'T',
        });
    }
    for (const v of vs) {
      const ord = typeof order === 'number' ? order : (order.get(`${s}|${v}`) ?? 1);
      for (let l = 1; l <= ord; l++) {
        const kind = ROTATIONAL_KINDS[l - 1] as (typeof ROTATIONAL_KINDS)[number];
        out.push({
          key: `${s}|${kind}|${v}`,
          name: `${kind}_${v}${suffix(s, multi)}`,
          unit: 'cm-1',
          species: s,
          v,
          kind,
        });
      }
    }
  }
  return out;
}

const POWER: Record<string, number> = { B: 1, D: 2, H: 3, L: 4, M: 5 };

/** The map under `key` in `outer`, made empty on first use. */
function inner<K, V>(outer: Map<K, V>, key: K, make: () => V): V {
  let m = outer.get(key);
  if (m === undefined) {
    m = make();
    outer.set(key, m);
  }
  return m;
}

/**
 * For each species, upper and lower level: the numbers of the parameters of either level, ascending (the only ones
 * with a coefficient in a line between them). Built on first use, per transition's levels.
 */
function parametersByLevels(parameters: readonly Parameter[]): (o: Observation) => Int32Array {
  const byLevel = new Map<string, Map<number, number[]>>();
  parameters.forEach((p, i) => {
    inner(
      inner(byLevel, p.species as string, () => new Map<number, number[]>()),
      p.v as number,
      () => [],
    ).push(i);
  });
  const known = new Map<string, Map<number, Map<number, Int32Array>>>();
  return (o) => {
    const byLower = inner(
      inner(known, o.species, () => new Map()),
      o.upperV,
      () => new Map<number, Int32Array>(),
    );
    let out = byLower.get(o.lowerV);
    if (!out) {
      const levels = byLevel.get(o.species);
      const up = levels?.get(o.upperV) ?? [];
      const lo = o.lowerV === o.upperV ? [] : (levels?.get(o.lowerV) ?? []);
      out = Int32Array.from([...up, ...lo]).sort();
      byLower.set(o.lowerV, out);
    }
    return out;
  };
}

export function levelModel(parameters: readonly Parameter[]): LinearModel {
  let byLevels: ((o: Observation) => Int32Array) | undefined;
  return {
    parameters,
    parametersOf(o: Observation): Int32Array {
      byLevels ??= parametersByLevels(parameters);
      return byLevels(o);
    },
    coefficient(p: Parameter, o: Observation): number {
      if (p.species !== o.species) return 0;
      const up = o.upperV === p.v ? 1 : 0;
      const lo = o.lowerV === p.v ? 1 : 0;
      if (up === 0 && lo === 0) return 0;
      if (p.kind === 'T') return up - lo;
      const l = POWER[p.kind] as number;
      // up·x_u^l − lo·x_l^l with the power of a level the parameter is not on left out: x^l is finite and ≥ 0, so
      // 0·x^l is +0 and the difference has the same bits (a − 0 = a, 0 − b = 0 − b).
      const a = up === 0 ? 0 : (o.upperJ * (o.upperJ + 1)) ** l;
      const b = lo === 0 ? 0 : (o.lowerJ * (o.lowerJ + 1)) ** l;
      return (CENTRIFUGAL_SIGN[l - 1] as number) * (a - b);
    },
    // The parameter's own key (species, kind letter, level): no other model's shared key has a level kind letter.
    columnKey: (p) => p.key,
    rowsByTransition: true,
    column(p: Parameter, obs: readonly Observation[]): Float64Array {
      // The same operations as `coefficient`, with the power taken once per level state (levelStates).
      const out = floats(obs.length);
      const l = p.kind === 'T' ? 0 : (POWER[p.kind] as number);
      const sign = l > 0 ? (CENTRIFUGAL_SIGN[l - 1] as number) : 1;
      const st = levelStates(obs);
      // Per state: whether it is a state of the parameter's level (which implies its species), and x^l there.
      const on = new Uint8Array(st.count);
      for (let k = 0; k < st.count; k++) if (st.species[k] === p.species && st.v[k] === p.v) on[k] = 1;
      const power = rotationalPowers(st, l);
      for (let i = 0; i < obs.length; i++) {
        const u = st.upper[i] as number;
        const w = st.lower[i] as number;
        const up = on[u] as number;
        const lo = on[w] as number;
        if (up === 0 && lo === 0) continue;
        if (l === 0) {
          out[i] = up - lo;
          continue;
        }
        out[i] = sign * (up * (power[u] as number) - lo * (power[w] as number));
      }
      return out;
    },
  };
}

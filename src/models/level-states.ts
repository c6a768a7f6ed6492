import { copyInts, floats, ints } from '../linalg/small-arrays.js';
import type { Observation } from './linear-model.js';

/**
 * The level states (species, v, J) an observation array meets, numbered in order of first appearance, and each
 * observation's upper and lower state. A design column whose entries are differences of f(state) is then f at each
 * distinct state (a list of thousands of lines meets a few hundred states) and two look-ups per line: the values
 * are f's own, so the column has the same bits as f evaluated line by line. Found once per observation array (never
 * changed once built, as the shared columns of linear-model.ts assume), held weakly.
 */
export interface LevelStates {
  /** Number of distinct states. */
  readonly count: number;
  /** Species, v and J of each state. */
  readonly species: readonly string[];
  readonly v: Int32Array;
  readonly j: Int32Array;
  /** Upper and lower state of each observation. */
  readonly upper: Int32Array;
  readonly lower: Int32Array;
  /** [J(J+1)]^l and (v+½)^k per state, made on first use (index l or k). */
  readonly xPowers: Float64Array[];
  readonly vPowers: Float64Array[];
}

const known = new WeakMap<readonly Observation[], LevelStates>();

export function levelStates(obs: readonly Observation[]): LevelStates {
  let s = known.get(obs);
  if (!s || s.upper.length !== obs.length) {
    s = findStates(obs);
    known.set(obs, s);
  }
  return s;
}

function findStates(obs: readonly Observation[]): LevelStates {
  const n = obs.length;
  const upper = ints(n);
  const lower = ints(n);
  const species: string[] = [];
  const vs: number[] = [];
  const js: number[] = [];
  // species → v → state number by J (-1 where not met yet).
  const index = new Map<string, Map<number, Int32Array>>();
  const stateOf = (s: string, v: number, j: number): number => {
    let byV = index.get(s);
    if (!byV) {
      byV = new Map();
      index.set(s, byV);
    }
    let byJ = byV.get(v);
    if (!byJ || byJ.length <= j) {
      const grown = ints(Math.max(64, 2 * (j + 1))).fill(-1);
      if (byJ) grown.set(byJ);
      byJ = grown;
      byV.set(v, byJ);
    }
    let k = byJ[j] as number;
    if (k < 0) {
      k = species.length;
      species.push(s);
      vs.push(v);
      js.push(j);
      byJ[j] = k;
    }
    return k;
  };
  for (let i = 0; i < n; i++) {
    const o = obs[i] as Observation;
    upper[i] = stateOf(o.species, o.upperV, o.upperJ);
    lower[i] = stateOf(o.species, o.lowerV, o.lowerJ);
  }
  return {
    count: species.length,
    species,
    v: copyInts(vs),
    j: copyInts(js),
    upper,
    lower,
    xPowers: [],
    vPowers: [],
  };
}

/** [J(J+1)]^l of every state: the same operation as a column computed line by line, once per state. */
export function rotationalPowers(st: LevelStates, l: number): Float64Array {
  let out = st.xPowers[l];
  if (!out) {
    out = floats(st.count);
    for (let s = 0; s < st.count; s++) {
      const j = st.j[s] as number;
      out[s] = (j * (j + 1)) ** l;
    }
    st.xPowers[l] = out;
  }
  return out;
}

/** (v+½)^k of every state. */
export function vibrationalPowers(st: LevelStates, k: number): Float64Array {
  let out = st.vPowers[k];
  if (!out) {
    out = floats(st.count);
    for (let s = 0; s < st.count; s++) out[s] = ((st.v[s] as number) + 0.5) ** k;
    st.vPowers[k] = out;
  }
  return out;
}

/**
 * Observations grouped by transition (the same upper and lower state): each observation's group, numbered in order
 * of first appearance, and the first observation of each group. Every model of this project gives a line a design
 * row that depends on its transition only, so a group's rows are identical.
 */
export interface TransitionGroups {
  readonly group: Int32Array;
  readonly firstRow: Int32Array;
}

const groupsKnown = new WeakMap<readonly Observation[], TransitionGroups>();

export function transitionGroups(obs: readonly Observation[]): TransitionGroups {
  let g = groupsKnown.get(obs);
  if (!g || g.group.length !== obs.length) {
    const s = levelStates(obs);
    const group = ints(obs.length);
    const first: number[] = [];
    const byPair = new Map<number, number>();
    for (let i = 0; i < obs.length; i++) {
      const key = (s.upper[i] as number) * s.count + (s.lower[i] as number);
      let k = byPair.get(key);
      if (k === undefined) {
        k = first.length;
        first.push(i);
        byPair.set(key, k);
      }
      group[i] = k;
    }
    g = { group, firstRow: copyInts(first) };
    groupsKnown.set(obs, g);
  }
  return g;
}

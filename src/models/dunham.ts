import { floats, mapFloats, mapInts } from '../linalg/small-arrays.js';
import { levelStates, rotationalPowers, vibrationalPowers } from './level-states.js';
import type { LinearModel, Observation, Parameter } from './linear-model.js';

/**
 * The Dunham expansion E(v, J) = Σ_kl Y_kl (v+½)^k [J(J+1)]^l (J. L. Dunham, Phys. Rev. 41, 721 (1932)), and its
 * mass-reduced form Y_kl(i) = U_kl μᵢ^−(k/2+l) for several isotopologues in one fit (Born–Oppenheimer scaling;
 * J. K. G. Watson, J. Mol. Spectrosc. 80, 411 (1980)). Y00 cancels in every transition and is never fitted.
 */

export interface DunhamTerm {
  readonly k: number;
  readonly l: number;
}

export function dunhamName(prefix: 'Y' | 'U', t: DunhamTerm): string {
  return `${prefix}${t.k}${t.l}`;
}

/** Unit of U_kl: cm⁻¹ u^(k/2+l). */
export function massReducedUnit(t: DunhamTerm): string {
  const e = t.k / 2 + t.l;
  return `cm-1 u^${Number.isInteger(e) ? e : e.toFixed(1)}`;
}

export function dunhamParameters(species: string, terms: readonly DunhamTerm[], multi: boolean): Parameter[] {
  return terms.map((t) => ({
    key: `${species}|Y|${t.k},${t.l}`,
    name: `${dunhamName('Y', t)}${multi ? `(${species})` : ''}`,
    unit: 'cm-1',
    species,
    k: t.k,
    l: t.l,
    kind: 'Y' as const,
  }));
}

export function massReducedParameters(terms: readonly DunhamTerm[]): Parameter[] {
  return terms.map((t) => ({
    key: `U|${t.k},${t.l}`,
    name: dunhamName('U', t),
    unit: massReducedUnit(t),
    k: t.k,
    l: t.l,
    kind: 'U' as const,
  }));
}

/** (v+½)^k x^l for one level. */
export function dunhamBasis(k: number, l: number, v: number, j: number): number {
  return (v + 0.5) ** k * (j * (j + 1)) ** l;
}

export function dunhamModel(parameters: readonly Parameter[], reducedMass?: ReadonlyMap<string, number>): LinearModel {
  return {
    parameters,
    coefficient(p: Parameter, o: Observation): number {
      const k = p.k as number;
      const l = p.l as number;
      if (p.kind === 'Y' && p.species !== o.species) return 0;
      const c = dunhamBasis(k, l, o.upperV, o.upperJ) - dunhamBasis(k, l, o.lowerV, o.lowerJ);
      if (p.kind === 'U') {
        const mu = reducedMass?.get(o.species);
        if (mu === undefined) throw new Error(`no reduced mass for ${o.species}`);
        return c * mu ** -(k / 2 + l);
      }
      return c;
    },
    // A mass-reduced column depends on the reduced masses this model was given: not shared.
    // The parameter's own key ("species|Y|k,l"), apart from every level-model key by its kind letter.
    columnKey: (p) => (p.kind === 'Y' ? p.key : undefined),
    rowsByTransition: true,
    column(p: Parameter, obs: readonly Observation[]): Float64Array {
      // The same operations as `coefficient`, with the basis taken once per level state (levelStates).
      const out = floats(obs.length);
      const k = p.k as number;
      const l = p.l as number;
      const st = levelStates(obs);
      const basis = floats(st.count);
      // (v+½)^k · [J(J+1)]^l, the operations of dunhamBasis, from powers kept per state.
      const vk = vibrationalPowers(st, k);
      const xl = rotationalPowers(st, l);
      for (let s = 0; s < st.count; s++) basis[s] = (vk[s] as number) * (xl[s] as number);
      for (let i = 0; i < obs.length; i++) {
        const o = obs[i] as Observation;
        if (p.kind === 'Y' && p.species !== o.species) continue;
        const c = (basis[st.upper[i] as number] as number) - (basis[st.lower[i] as number] as number);
        if (p.kind === 'U') {
          const mu = reducedMass?.get(o.species);
          if (mu === undefined) throw new Error(`no reduced mass for ${o.species}`);
          out[i] = c * mu ** -(k / 2 + l);
        } else out[i] = c;
      }
      return out;
    },
  };
}

/** Term energy E(v, J) from Dunham coefficients ("k,l" → Y_kl), for prediction. */
export function dunhamEnergy(y: ReadonlyMap<string, number>, v: number, j: number): number {
  return compileDunham(y)(v, j);
}

/**
 * E(v, J) as a function of a snapshot of the coefficients, with their keys parsed once (prediction loops call it
 * thousands of times). Y_kl (v+½)^k is kept per v and [J(J+1)]^l computed once per power, so a call costs one
 * power per distinct l; the products and their sum are the same floating-point operations in the same order as
 * Σ Y_kl (v+½)^k [J(J+1)]^l term by term, hence the same bits.
 */
export function compileDunham(y: ReadonlyMap<string, number>): (v: number, j: number) => number {
  const terms = [...y].map(([key, value]) => {
    const [k, l] = key.split(',').map(Number) as [number, number];
    return { k, l, value };
  });
  const ls = mapInts(terms, (t) => t.l);
  const xp = floats(Math.max(0, ...ls) + 1);
  const perV = new Map<number, Float64Array>();
  const weights = (v: number): Float64Array => {
    let w = perV.get(v);
    if (!w) {
      const a = v + 0.5;
      w = mapFloats(terms, (t) => t.value * a ** t.k);
      perV.set(v, w);
    }
    return w;
  };
  const f = (v: number, j: number) => {
    const w = weights(v);
    const x = j * (j + 1);
    for (let l = 0; l < xp.length; l++) xp[l] = x ** l;
    let e = 0;
    for (let i = 0; i < w.length; i++) e += (w[i] as number) * (xp[ls[i] as number] as number);
    return e;
  };
  return f;
}

export const dunhamKey = (k: number, l: number): string => `${k},${l}`;

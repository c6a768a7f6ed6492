import type { Observation } from '../../../src/models/linear-model.js';
import {
  type IndependentList,
  type IndependentListOptions,
  independentLines,
} from '../../helpers/independent-lines.js';

/**
 * Observations for the stage functions of src/fit, built from the independent generator with this file's own J
 * bookkeeping (R: J′ = J″ + 1, P: J′ = J″ − 1), not through src/fit/observations.ts: the stages are tested on
 * their own. Weight 1/σ² with the line's σ, or `weightWithout` for lines sent without one.
 */
export function observationsOf(list: IndependentList, weightWithout = 1): Observation[] {
  const out: Observation[] = [];
  list.lines.forEach((l, index) => {
    const a = l.assignment;
    if (!a) return;
    const s = l.uncertainty;
    out.push({
      index,
      species: a.species,
      upperV: a.band.upper,
      lowerV: a.band.lower,
      upperJ: a.branch === 'R' ? a.j + 1 : a.branch === 'P' ? a.j - 1 : a.j,
      lowerJ: a.j,
      position: l.position,
      weight: s === undefined ? weightWithout : 1 / (s * s),
    });
  });
  return out;
}

export function generated(o: IndependentListOptions): { list: IndependentList; obs: Observation[] } {
  const list = independentLines(o);
  return { list, obs: observationsOf(list) };
}

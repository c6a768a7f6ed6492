import type { Observation } from '../models/linear-model.js';
import { transitionLabel } from '../models/transitions.js';
import { chiSquareSurvival } from '../stats/distributions.js';
import { reducedChiSquare, type SolvedModel } from './engine.js';
import type { Warning } from './types.js';

/* Stage 7: warnings about the fit as a whole (repeated lines that disagree, few degrees of freedom, conditioning,
 * strong correlations). */

/** Repeated measurements of one transition: weighted together, flagged when they disagree beyond their scatter. */
export function checkRepeats(fit: SolvedModel, uncertaintiesGiven: boolean, warnings: Warning[]): void {
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

export function qualityWarnings(
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

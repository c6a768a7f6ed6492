import type { Quantity } from '../derive/quantity.js';
import { type CombinationDifferenceFit, fitCombinationDifferences } from './combination-differences.js';
import type { SolvedModel, UncertaintyMode } from './engine.js';
import type { Warning } from './types.js';

export type CombinationCheck = CombinationDifferenceFit & { readonly fitted: Quantity; readonly deviation: number };

/**
 * Stage 6: combination differences Δ₂F″, Δ₂F′ of every vibrational band, fitted on their own at the centrifugal
 * order the main fit chose for the level, and B_v compared with the main fit's (a numbering error or a perturbation
 * shows as a difference of more than 3σ).
 */
export function combinationChecks(
  fit: SolvedModel,
  orders: ReadonlyMap<string, number>,
  mode: UncertaintyMode,
  quantityOf: (key: string) => Quantity | undefined,
): { checks: CombinationCheck[]; warnings: Warning[] } {
  const warnings: Warning[] = [];
  const orderOf = (s: string, v: number) => orders.get(`${s}|${v}`) ?? 1;
  const checks = fitCombinationDifferences(fit.observations, orderOf, mode).map((cd) => {
    const fitted = quantityOf(`${cd.species}|B|${cd.v}`) as Quantity;
    const deviation = Math.abs(cd.B.value - fitted.value) / Math.hypot(cd.B.uncertainty, fitted.uncertainty);
    if (deviation > 3) {
      warnings.push({
        code: 'COMBINATION_DIFFERENCES_DISAGREE',
        message: `${cd.species} band ${cd.band}: B_${cd.v} from ${cd.kind === 'lower' ? 'Δ₂F″' : 'Δ₂F′'} differs from the full fit by ${deviation.toFixed(1)}σ (an assignment error or a perturbation?)`,
      });
    }
    return { ...cd, fitted, deviation };
  });
  return { checks, warnings };
}

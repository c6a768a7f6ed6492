import type { Quantity } from '../derive/quantity.js';
import { type CombinationDifferenceFit, fitCombinationDifferences } from './combination-differences.js';
import type { SolvedModel, UncertaintyMode } from './engine.js';
import type { Warning } from './types.js';

export type CombinationCheck = CombinationDifferenceFit & { readonly fitted: Quantity; readonly deviation: number };

/**
 * Stage 6: combination differences Δ₂F″, Δ₂F′ of every vibrational band, fitted on their own at the centrifugal
 * order the main fit chose for the level, and B_v compared with the main fit's (a numbering error or a perturbation
 * shows as a difference of more than 3σ).
 *
 * The difference is judged with uncertainties no smaller than the lines' stated σ allow. In a-posteriori mode each
 * side is scaled by its own s² = χ²/ν, and when lines sit far inside their stated σ (positions computed from a
 * smooth model, as database lines are: s² of 1e-5 to 0.04 for the Δ₂F″ of real CO bands) the scaling treats small
 * systematic differences between bands — well inside the stated σ — as many σ: real CO database lines of the 2-0
 * band gave "differs by 4.4σ" although their Δ₂F″ agree with the pure-rotation lines within 1e-5 cm⁻¹ at σ =
 * 1e-5 to 1e-4 cm⁻¹. So the check takes each side's σ as the larger of the a-posteriori one and the one with s² = 1
 * (the caller's own σ, or the scatter estimated from the lines when none was given): an assignment alarm must be
 * significant under both. The correlation between the two estimates (the main fit uses the same lines) is left
 * out; with it the variance of the difference would be σ_cd² − σ_fit² rather than σ_cd² + σ_fit² (the main fit
 * being the efficient estimator), which changes the deviations of real CO by under 10 % (σ_fit ≪ σ_cd) but can
 * vanish when one band carries the level alone, so the sum is kept: it errs towards fewer alarms.
 */
export function combinationChecks(
  fit: SolvedModel,
  orders: ReadonlyMap<string, number>,
  mode: UncertaintyMode,
  quantityOf: (key: string) => Quantity | undefined,
  mainScale: number | null = null,
): { checks: CombinationCheck[]; warnings: Warning[] } {
  const warnings: Warning[] = [];
  const orderOf = (s: string, v: number) => orders.get(`${s}|${v}`) ?? 1;
  // The main fit's σ with s² = 1 is its a-posteriori σ divided by √s² (when s² < 1).
  const mainFloor =
    mode === 'a-posteriori' && mainScale !== null && mainScale > 0 && mainScale < 1 ? 1 / Math.sqrt(mainScale) : 1;
  const checks = fitCombinationDifferences(fit.observations, orderOf, mode).map(({ fit: cd, statedUncertaintyOfB }) => {
    const fitted = quantityOf(`${cd.species}|B|${cd.v}`) as Quantity;
    const sigmaCd = Math.max(cd.B.uncertainty, statedUncertaintyOfB);
    const sigmaFit = fitted.uncertainty * mainFloor;
    const deviation = Math.abs(cd.B.value - fitted.value) / Math.hypot(sigmaCd, sigmaFit);
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

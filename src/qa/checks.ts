import type { Analysis } from '../assign/analyse.js';
import type { PeakInput } from '../assign/assign-lines.js';
import { identifySpecies } from '../assign/identify.js';
import { withoutUninformativeIntensities } from '../assign/intensity.js';
import type { Isotopologue } from '../species/parse.js';
import { calibrationCheck } from './checks/calibration.js';
import {
  type Check,
  type CheckId,
  type CheckReport,
  DEFAULT_TOLERANCES,
  notEvaluated,
  type Tolerances,
  verdictOf,
} from './checks/common.js';
import { fitQualityCheck } from './checks/fit-quality.js';
import { identityCheck } from './checks/identity.js';
import { isotopeCheck } from './checks/isotope-ratio.js';
import { temperatureCheck } from './checks/temperature.js';
import { unexplainedCheck } from './checks/unexplained-lines.js';

/** The QA checks of a fitted line list, one file each under checks/; the shared types and the verdict in checks/common.ts. */
export {
  type Check,
  type CheckId,
  type CheckReport,
  type CheckStatus,
  DEFAULT_TOLERANCES,
  type Tolerances,
  verdictOf,
} from './checks/common.js';

/** When the fit itself could not be made: identity says why, with the best library matches; the rest cannot be evaluated. */
export function checksWithoutFit(
  peaks: readonly PeakInput[],
  declared: Isotopologue | undefined,
  reason: string,
): CheckReport {
  const ranking = identifySpecies(peaks);
  const best = ranking[0];
  const identity: Check = {
    id: 'identity',
    status: 'fail',
    measured: {
      declared: declared?.formula ?? null,
      bestMatch: best?.species ?? null,
      bestScore: best?.score ?? 0,
      // a runner-up that scores 0 (no better than chance) is not named
      runnerUp: ranking[1] && ranking[1].score > 0 ? ranking[1].species : null,
      runnerUpScore: ranking[1]?.score ?? 0,
    },
    limit: {},
    message: `no fit could be made (${reason})${best && best.score >= 0.5 ? `; the lines match ${best.name} (score ${best.score.toFixed(2)})` : ''}`,
  };
  const others: CheckId[] = ['calibration', 'unexplained-lines', 'isotope-ratio', 'temperature', 'fit-quality'];
  const checks = [identity, ...others.map((id) => notEvaluated(id, 'not evaluated: there is no fit'))];
  return { verdict: verdictOf(checks), checks };
}

export function runChecks(
  sent: readonly PeakInput[],
  declared: Isotopologue | undefined,
  analysis: Analysis,
  tolerances: Partial<Tolerances> = {},
): CheckReport {
  const tol = { ...DEFAULT_TOLERANCES, ...tolerances };
  const r = analysis.result;
  const main = analysis.assignment.species[0] ?? r.species[0]?.formula;
  // Placeholder intensities (the rule the assignment uses, src/assign/intensity.ts) weigh, rank and measure nothing.
  const { peaks: used, why } = withoutUninformativeIntensities(sent);
  const noIntensities = why ? `intensities ignored: ${why}` : 'the lines carry no intensities';
  const temperature = temperatureCheck(used, analysis, main, tol, noIntensities);
  const T = (temperature.measured.temperature as { value: number } | undefined)?.value ?? 296;
  const checks = [
    identityCheck(used, declared, analysis, main, tol),
    calibrationCheck(used, analysis, main, tol),
    unexplainedCheck(used, analysis, tol),
    isotopeCheck(used, analysis, T, tol, noIntensities),
    temperature,
    fitQualityCheck(used, analysis, T, tol),
  ];
  return { verdict: verdictOf(checks), checks };
}

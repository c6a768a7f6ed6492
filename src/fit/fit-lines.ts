import { crossChecks, equilibriumFromDunham } from '../derive/equilibrium.js';
import { quantity } from '../derive/quantity.js';
import { ScienceError } from '../errors.js';
import { levelStructure } from '../models/level-model.js';
import { formatBand, type Transition, upperJ } from '../models/transitions.js';
import type { MassValue } from '../species/reduced-mass.js';
import { combinationChecks } from './cross-checks.js';
import { fitDunhamForSpecies, fitMassReduced, formatValue } from './dunham-stage.js';
import { reducedChiSquare, rmsResidual, type UncertaintyMode } from './engine.js';
import { reportLevels } from './level-report.js';
import { predictWithVariance, selectLevelModel } from './level-selection.js';
import { readLines } from './observations.js';
import { rejectOutliers } from './outliers.js';
import { rescaleStatedUncertainties } from './stated-scale.js';
import { constrainLevelModel } from './truncation.js';
import type { DetailedFit, DunhamFit, FitOptions, FitResult, LineInput, Statistics, Warning } from './types.js';
import { absoluteScaleWarnings, checkRepeats, qualityWarnings } from './warnings.js';
import { weighLines } from './weights.js';

export type { TermConstraint } from './truncation.js';
export type {
  DetailedFit,
  DunhamFit,
  FitOptions,
  FitResult,
  LineInput,
  LineOutcome,
  LineStatus,
  NamedQuantity,
  Statistics,
  Warning,
} from './types.js';
export type { ScatterGroup } from './weights.js';

const DEFAULTS = {
  uncertaintyMode: 'a-posteriori' as UncertaintyMode,
  rejectionThreshold: 4,
  maxRejectedFraction: 0.2,
  termSignificance: 0.01,
  maxCentrifugalOrder: 4,
  massReducedDunham: false,
  levelsOnly: false,
};

/**
 * Fit an assigned line list: the level model (band origins, B_v, D_v, … with the centrifugal order the data
 * support), outlier rejection by externally studentised residuals, a Dunham fit per isotopologue for the
 * equilibrium constants, combination differences as an independent check, and the usual cross-checks.
 */
export function fitLineList(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  options: FitOptions = {},
): FitResult {
  return fitLineListDetailed(input, masses, options).result;
}

/**
 * The fit as stages, each in its own file with a typed result:
 *   1a readLines (observations.ts)       validate, build observations
 *   1b weighLines (weights.ts)           weights from the given σ or the robust scatter per band / source
 *   1c rescaleStatedUncertainties (stated-scale.ts)  a-posteriori: groups whose stated σ disagree get their own scale
 *   2  selectLevelModel (level-selection.ts)  centrifugal terms by the term test
 *   3  rejectOutliers (outliers.ts)      studentised residuals, re-admission
 *   4  reportLevels (level-report.ts)    lines, bands, levels, parameters, covariance
 *   5  fitDunhamForSpecies (dunham-stage.ts)  equilibrium constants and cross-checks
 *   6  combinationChecks (cross-checks.ts)    Δ₂F against the level fit
 *   7  checkRepeats, qualityWarnings (warnings.ts)
 */
export function fitLineListDetailed(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  options: FitOptions = {},
): DetailedFit {
  const opt = { ...DEFAULTS, ...options };
  const maxOrder = Math.max(1, Math.min(4, Math.floor(opt.maxCentrifugalOrder)));
  const alpha = opt.termSignificance;

  const read = readLines(input, masses);
  const weighted = weighLines(input, read.observations, { maxOrder, termSignificance: alpha });
  const warnings: Warning[] = [...weighted.warnings];
  const given = input.filter((l) => l.uncertainty !== undefined).length;
  let mode = opt.uncertaintyMode;
  if (given === 0 && mode === 'absolute') {
    mode = 'a-posteriori';
    warnings.push({
      code: 'UNCERTAINTY_MODE_CHANGED',
      message:
        'absolute uncertainties were asked for but no line has an uncertainty: the covariance is scaled a posteriori',
    });
  }
  const firstLevel = selectLevelModel(weighted.observations, maxOrder, mode, alpha);
  const stated =
    mode === 'a-posteriori'
      ? rescaleStatedUncertainties(input, weighted.observations, { maxOrder, termSignificance: alpha }, firstLevel)
      : undefined;
  if (stated) warnings.push(...stated.warnings);
  const observations = stated?.observations ?? weighted.observations;
  const initialLevel =
    observations === weighted.observations ? firstLevel : selectLevelModel(observations, maxOrder, mode, alpha);

  const outliers = rejectOutliers(observations, initialLevel, {
    maxOrder,
    mode,
    termSignificance: alpha,
    rejectionThreshold: opt.rejectionThreshold,
    maxRejectedFraction: opt.maxRejectedFraction,
  });
  const { rejected } = outliers;
  let level = outliers.level;
  if (rejected.size > 0) {
    warnings.push({
      code: 'LINES_REJECTED',
      message: `${rejected.size} line(s) were rejected as outliers and kept out of the fit`,
      lines: [...rejected.keys()].sort((a, b) => a - b),
    });
  }
  if (level.fit.degreesOfFreedom === 0 && mode === 'a-posteriori') {
    // No residual degrees of freedom: the scatter cannot be estimated from the data themselves.
    if (given === 0) {
      throw new ScienceError(
        'FIT_TOO_FEW_LINES',
        `${level.fit.observations.length} line(s) exactly determine the ${level.fit.model.parameters.length} parameters, leaving nothing to estimate their uncertainties: add lines or give line uncertainties with uncertaintyMode "absolute"`,
        { lines: level.fit.observations.length, parameters: level.fit.model.parameters.length },
      );
    }
    mode = 'absolute';
    warnings.push({
      code: 'UNCERTAINTY_MODE_CHANGED',
      message:
        'no degrees of freedom are left to scale the covariance a posteriori: the line uncertainties are taken as absolute',
    });
    level = selectLevelModel(outliers.kept, maxOrder, mode, alpha);
  }
  // The statistics describe the model the term test selected; the constrained terms change the covariance (and
  // the values they correlate with), not the verdict on how well the lines fit.
  const selected = level.fit;
  const truncation = constrainLevelModel(level, mode);
  level = truncation.level;
  if (truncation.constraints.length > 0) {
    warnings.push({
      code: 'TERMS_CONSTRAINED',
      message: `centrifugal terms the lines cannot determine (term test p ≥ ${alpha}) are constrained, their uncertainty carried into the covariance: ${truncation.constraints.map((c) => `${c.parameter} = ${formatValue(c.prior.value)} ± ${formatValue(c.prior.uncertainty)} cm-1`).join(', ')} (${[...new Set(truncation.constraints.map((c) => c.basis.replace(/_\d+/g, '_v')))].join('; ')})`,
    });
  }
  const fit = level.fit;

  const report = reportLevels(
    input,
    observations,
    read.transitions,
    rejected,
    fit,
    masses,
    new Set(truncation.constraints.map((c) => c.key)),
  );
  warnings.push(...report.warnings);
  const structure = levelStructure(fit.observations);

  const equilibrium: FitResult['equilibrium'][number][] = [];
  const dunham: DunhamFit[] = [];
  const checks: FitResult['crossChecks'][number][] = [];
  for (const s of opt.levelsOnly ? [] : structure.species) {
    const obs = fit.observations.filter((o) => o.species === s);
    const d = fitDunhamForSpecies(s, obs, mode, alpha, level.orders, warnings);
    if (!d) continue;
    dunham.push(d.report);
    const mu = masses.get(s) as MassValue;
    const eq = equilibriumFromDunham(d.set, mu);
    if (Object.keys(eq).length > 0) equilibrium.push({ species: s, ...eq });
    for (const c of crossChecks(d.set, eq, mu)) checks.push({ species: s, ...c });
  }

  let massReducedDunham: FitResult['massReducedDunham'];
  if (opt.massReducedDunham && !opt.levelsOnly) {
    if (structure.species.length < 2) {
      warnings.push({
        code: 'MASS_REDUCED_NEEDS_ISOTOPOLOGUES',
        message: 'a mass-reduced Dunham fit needs lines of two or more isotopologues',
      });
    } else {
      massReducedDunham = fitMassReduced(fit.observations, masses, mode, alpha, level.orders, warnings);
    }
  }

  const cds = opt.levelsOnly
    ? { checks: [], warnings: [] }
    : combinationChecks(fit, level.orders, mode, report.quantityOf);
  warnings.push(...cds.warnings);

  checkRepeats(selected, given > 0, warnings);
  absoluteScaleWarnings(selected, mode, warnings);
  qualityWarnings(selected, report.correlation, report.names, warnings);

  const statistics: Statistics = {
    lines: input.length,
    assigned: observations.length,
    fitted: selected.observations.length,
    rejected: rejected.size,
    unassigned: input.length - observations.length,
    parameters: selected.model.parameters.length,
    degreesOfFreedom: selected.degreesOfFreedom,
    rms: rmsResidual(selected),
    reducedChiSquare: reducedChiSquare(selected),
    conditionNumber: Number.isFinite(selected.conditionNumber) ? selected.conditionNumber : null,
    uncertaintyMode: mode,
  };

  const result: FitResult = {
    species: [...masses.entries()]
      .filter(([f]) => structure.species.includes(f))
      .map(([formula, m]) => ({ formula, reducedMass: quantity(m.value, m.uncertainty, 'u') })),
    lines: report.lines,
    bands: report.bands,
    levels: report.levels,
    equilibrium,
    parameters: report.parameters,
    covariance: { parameters: report.names, matrix: report.covariance },
    correlation: { parameters: report.names, matrix: report.correlation },
    statistics,
    model: {
      levelTerms: report.levelTerms,
      selection: `centrifugal and Dunham terms added while ${mode === 'absolute' ? 'a χ²-difference test' : 'an F test'} gives p < ${alpha}; the next term beyond them constrained by a prior`,
      constraints: [...truncation.constraints, ...dunham.flatMap((d) => d.constrained ?? [])],
    },
    dunham,
    ...(massReducedDunham ? { massReducedDunham } : {}),
    combinationDifferences: cds.checks,
    crossChecks: checks,
    ...(weighted.groups.length > 0 ? { scatter: weighted.groups } : {}),
    warnings,
  };
  const ref = structure.reference;
  const scale = mode === 'absolute' ? 1 : (reducedChiSquare(selected) ?? 1);
  return {
    result,
    scale: reducedChiSquare(selected) ?? 1,
    predict(tr: Transition) {
      const r = ref.get(tr.species);
      const ru = r?.get(tr.band.upper);
      const rl = r?.get(tr.band.lower);
      if (ru === undefined || rl === undefined || ru !== rl) return undefined;
      return predictWithVariance(fit, {
        index: -1,
        species: tr.species,
        upperV: tr.band.upper,
        lowerV: tr.band.lower,
        upperJ: upperJ(tr),
        lowerJ: tr.j,
        position: 0,
        weight: 1,
      });
    },
    lineSigma(tr, own) {
      const band = formatBand(tr.band);
      const sigma =
        own?.uncertainty !== undefined
          ? own.uncertainty * (stated?.factorFor(tr.species, band, own.uncertainty, own.source) ?? 1)
          : weighted.sigmaFor(tr.species, band, own?.source);
      return sigma * Math.sqrt(scale);
    },
  };
}

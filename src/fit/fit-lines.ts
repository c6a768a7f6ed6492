import { crossChecks, equilibriumFromDunham } from '../derive/equilibrium.js';
import { quantity } from '../derive/quantity.js';
import { ScienceError } from '../errors.js';
import { type LevelStructure, levelStructure, MAX_CENTRIFUGAL_ORDER } from '../models/level-model.js';
import type { Observation } from '../models/linear-model.js';
import { formatBand, type Transition, upperJ } from '../models/transitions.js';
import type { MassValue } from '../species/reduced-mass.js';
import { combinationChecks } from './cross-checks.js';
import { fitDunhamForSpecies, fitMassReduced, formatValue } from './dunham-stage.js';
import { reducedChiSquare, rmsResidual, type SolvedModel, type UncertaintyMode } from './engine.js';
import { reportLevels } from './level-report.js';
import { type LevelSelection, predictWithVariance, selectLevelModel } from './level-selection.js';
import { withScaleOffset } from './loop-offset.js';
import { readLines } from './observations.js';
import { rejectOutliers } from './outliers.js';
import {
  estimateRelativeOffsets,
  type RelativeOffsets,
  referenceVouched,
  withOffsetCovariance,
} from './source-offsets.js';
import { rescaleStatedUncertainties } from './stated-scale.js';
import { constrainLevelModel, type TermConstraint } from './truncation.js';
import type {
  DetailedFit,
  DunhamFit,
  FitOptions,
  FitResult,
  LineInput,
  SourceOffsetReport,
  Statistics,
  Warning,
} from './types.js';
import {
  absoluteScaleWarnings,
  checkDuplicates,
  checkRepeats,
  checkSourceOffsets,
  qualityWarnings,
} from './warnings.js';
import { type ScatterReuse, scatterOfFit, type WeightedLines, weighLines } from './weights.js';

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
  SourceOffsetReport,
  Statistics,
  Warning,
} from './types.js';
export type { ScatterGroup } from './weights.js';

const DEFAULTS = {
  uncertaintyMode: 'a-posteriori' as UncertaintyMode,
  rejectionThreshold: 4,
  maxRejectedFraction: 0.2,
  termSignificance: 0.01,
  maxCentrifugalOrder: MAX_CENTRIFUGAL_ORDER,
  massReducedDunham: false,
  levelsOnly: false,
  withoutChecks: false,
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
 * The fit as stages, each in its own file with a typed result, read top-down here:
 *   1a readLines (observations.ts)       validate, build observations
 *   1b weighLines (weights.ts)           weights from the given σ or the robust scatter per band / source
 *   1c rescaleStatedUncertainties (stated-scale.ts)  a-posteriori: groups whose stated σ disagree get their own scale
 *   2  selectLevelModel (level-selection.ts)  centrifugal terms by the term test
 *   3  rejectOutliers (outliers.ts)      studentised residuals, re-admission
 *   3b constrainLevelModel (truncation.ts)    the next term beyond the selected ones, as a prior
 *   4  reportLevels (level-report.ts)    lines, bands, levels, parameters, covariance
 *   5  fitDunhamForSpecies (dunham-stage.ts)  equilibrium constants and cross-checks
 *   6  combinationChecks (cross-checks.ts)    Δ₂F against the level fit
 *   7  checkRepeats, qualityWarnings (warnings.ts)
 *   8  with lines of two or more sources: their offsets against a reference source (source-offsets.ts), carried
 *      in the fit when one is flagged or the caller asks (carryOffsets: positions corrected, the stages run again,
 *      every covariance widened by the offsets'); with lines of one source whose bands fix the absolute scale (a
 *      loop of bands, a pure-rotation band): their common offset, the same way (loop-offset.ts)
 */
export function fitLineListDetailed(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  options: FitOptions = {},
): DetailedFit {
  const opt = { ...DEFAULTS, ...options };
  checkReferenceSource(input, opt.referenceSource);
  const first = fitPass(input, masses, opt);
  // The inner fits of automatic assignment carry one instrument's scale offset too (a loop of bands misfits by it).
  if (opt.withoutChecks) return oneInstrument(input, masses, opt, first);
  const offsets = estimateRelativeOffsets(first.selected, sourcesOf(input), first.mode, opt.referenceSource);
  if (!offsets) return oneInstrument(input, masses, opt, first);
  const flagged = offsets.largestZ > SOURCE_OFFSET_FLAG;
  const vouched =
    flagged &&
    opt.fitSourceOffsets === undefined &&
    referenceVouched(first.selected, sourcesOf(input), first.mode, offsets);
  const applied = (opt.fitSourceOffsets ?? vouched) && offsets.fitted.length > 0;
  const basis = offsetBasis(opt.fitSourceOffsets, flagged, vouched);
  if (!applied) {
    const sourceOffsets = sourceOffsetReport(offsets, false, basis);
    const notCarried = flagged && !vouched && opt.fitSourceOffsets === undefined ? [notCarriedWarning(offsets)] : [];
    const warnings = [...first.detailed.result.warnings, ...notCarried];
    return { ...first.detailed, result: { ...first.detailed.result, sourceOffsets, warnings } };
  }
  const carried = carryOffsets(input, masses, opt, offsets);
  const second = carried.pass;
  const delta = carried.delta;
  const r = second.detailed.result;
  // Lines per source as the last pass fitted them (the offsets were estimated on the pass before).
  const fitted = new Map<string, number>();
  for (const l of r.lines) {
    const src = input[l.index]?.source;
    if (l.status === 'fitted' && src !== undefined) fitted.set(src, (fitted.get(src) ?? 0) + 1);
  }
  const report = sourceOffsetReport(carried.offsets, true, basis, fitted);
  const isSourceWarning = (w: Warning) =>
    w.code === 'SOURCE_MEAN_RESIDUALS' || w.code === 'SOURCE_OFFSET_UNIDENTIFIABLE';
  const result: FitResult = {
    ...r,
    // Positions as sent; `calculated` includes the line's source offset, so position − calculated is the residual.
    lines: r.lines.map((l) =>
      delta(l.index) === 0
        ? l
        : {
            ...l,
            position: input[l.index]?.position as number,
            ...(l.calculated !== undefined ? { calculated: l.calculated + delta(l.index) } : {}),
          },
    ),
    sourceOffsets: report,
    warnings: [
      ...r.warnings.filter((w) => !isSourceWarning(w)),
      ...first.detailed.result.warnings.filter(isSourceWarning).map(saidBeforeCarrying),
    ],
  };
  return { ...second.detailed, result };
}

/**
 * SOURCE_MEAN_RESIDUALS of the pass that found the offsets, in an answer that carries them: its mean residuals are
 * of that pass (the answer's residuals no longer hold the offset, and the reference source's own mean, pulled off
 * zero by the shifted lines, is back near it), and its two figures for a source differ in kind (a mean residual
 * against a fit that absorbed part of the shift, and the offset on the shared levels): the message says so.
 */
function saidBeforeCarrying(w: Warning): Warning {
  if (w.code !== 'SOURCE_MEAN_RESIDUALS') return w;
  return {
    ...w,
    message: `${w.message} These figures are of the fit before the offset was carried: the offset on the shared levels (the second figure) is now carried in the fit (sourceOffsets, applied), and the residuals of this answer no longer hold it.`,
  };
}

/** Stage 8 without relative offsets: the scale offset of one instrument's lines (loop-offset.ts), if one source. */
function oneInstrument(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  opt: typeof DEFAULTS & FitOptions,
  first: Pass,
): DetailedFit {
  if (new Set(sourcesOf(input)).size > 1) return first.detailed;
  return withScaleOffset(input, first, SOURCE_OFFSET_FLAG, opt.fitSourceOffsets, (corrected, carried) =>
    fitPass(corrected, masses, opt, carried),
  );
}

/**
 * A round fit of automatic assignment over lines of two or more sources, with the sources' offsets carried: they are
 * estimated on a pass without outlier rejection (a band that closes the loop between instruments, such as 2-1 on one
 * against 2-0 on the other, disagrees with the other instrument by its offset, and a rejecting pass took its lines out
 * before the offset could be estimated), and the pass is repeated, with rejection, on the positions corrected by
 * them. The answer's `sourceOffsets` gives every source's correction; positions are as sent, `calculated` includes
 * the correction. Undefined when no offset is determined (the caller fits the round without). Estimated afresh in
 * every round: carried over from the last round and refined, they wandered with the assignment (measured on
 * held-out seeds 32 and 97: 732 and 253 lines right before, 74 and 82 so).
 */
export function fitRoundWithOffsets(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  options: FitOptions,
): DetailedFit | undefined {
  const opt = { ...DEFAULTS, ...options, withoutChecks: true };
  const loose = fitPass(input, masses, { ...opt, rejectionThreshold: 0 });
  const found = estimateRelativeOffsets(loose.selected, sourcesOf(input), loose.mode);
  if (!found || found.fitted.length === 0) return undefined;
  const total = new Map(found.fitted.map((src, i) => [src, found.values[i] as number]));
  const corrected = input.map((l) => {
    const d = l.source === undefined ? 0 : (total.get(l.source) ?? 0);
    return d === 0 ? l : { ...l, position: l.position - d };
  });
  return withRoundOffsets(fitPass(corrected, masses, opt).detailed, input, total);
}

/** A round fit of corrected positions, its lines given back their positions as sent (see fitRoundWithOffsets). */
function withRoundOffsets(
  d: DetailedFit,
  input: readonly LineInput[],
  total: ReadonlyMap<string, number>,
): DetailedFit {
  const delta = (i: number) => {
    const s = input[i]?.source;
    return s === undefined ? 0 : (total.get(s) ?? 0);
  };
  const sources = [...total.keys()].sort();
  const result: FitResult = {
    ...d.result,
    lines: d.result.lines.map((l) =>
      delta(l.index) === 0
        ? l
        : {
            ...l,
            position: input[l.index]?.position as number,
            ...(l.calculated !== undefined ? { calculated: l.calculated + delta(l.index) } : {}),
          },
    ),
    sourceOffsets: {
      reference: sources[0] ?? '',
      applied: true,
      basis: 'asked',
      sources: sources.map((source) => ({
        source,
        lines: input.filter((l) => l.source === source).length,
        offset: quantity(total.get(source) as number, 0, 'cm-1'),
      })),
    },
  };
  return { ...d, result };
}

/** Most passes of the fit with carried offsets (the first estimate is refined on the corrected lines). */
const MAX_OFFSET_PASSES = 3;

/**
 * The fit with the offsets carried: positions corrected by δ, covariances widened by Σ_δ. The offsets were
 * estimated on the uncorrected fit, whose outlier rejection and term selection saw the shifted lines; they are
 * estimated again on the corrected fit and the pass repeated until the change is below 1 % of σ_δ and Σ_δ is
 * the one carried to within 1 % (at most MAX_OFFSET_PASSES passes).
 */
function carryOffsets(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  opt: typeof DEFAULTS & FitOptions,
  start: RelativeOffsets,
): { pass: Pass; offsets: RelativeOffsets; delta: (line: number) => number } {
  let offsets = start;
  for (let k = 1; ; k++) {
    const shift = new Map(offsets.fitted.map((src, i) => [src, offsets.values[i] as number]));
    const delta = (i: number) => shift.get(input[i]?.source as string) ?? 0;
    const corrected = input.map((l, i) => (delta(i) === 0 ? l : { ...l, position: l.position - delta(i) }));
    const pass = fitPass(corrected, masses, opt, offsets);
    if (k >= MAX_OFFSET_PASSES) return { pass, offsets, delta };
    const again = estimateRelativeOffsets(pass.selected, sourcesOf(input), pass.mode, offsets.reference);
    const same =
      again?.fitted.length === offsets.fitted.length && again.fitted.every((s, i) => s === offsets.fitted[i]);
    if (!again || !same) return { pass, offsets, delta };
    const settled = again.values.every((v, i) => {
      const carriedVar = offsets.covariance[i]?.[i] as number;
      const newVar = again.covariance[i]?.[i] as number;
      return Math.abs(v) < 0.01 * Math.sqrt(newVar) && Math.abs(Math.sqrt(newVar / carriedVar) - 1) < 0.01;
    });
    if (settled) return { pass, offsets, delta };
    offsets = refined(offsets, again);
  }
}

/** The carried offsets plus the corrections found on the corrected lines, with the new covariance and line counts. */
function refined(carried: RelativeOffsets, again: RelativeOffsets): RelativeOffsets {
  const values = carried.values.map((v, i) => v + (again.values[i] as number));
  const at = new Map(again.fitted.map((s, i) => [s, values[i] as number]));
  return {
    ...again,
    values,
    sources: again.sources.map((s) => (at.has(s.source) ? { ...s, offset: at.get(s.source) } : s)),
    largestZ: Math.max(0, ...values.map((v, i) => Math.abs(v) / Math.sqrt(again.covariance[i]?.[i] as number))),
  };
}

/**
 * A source offset is carried in the fit when it lies beyond this many standard errors from zero (the same bar as
 * the SOURCE_MEAN_RESIDUALS warning), or when the caller asks. Measured on the real CO list split in two sources
 * (DEVELOPERS.md, "source offsets"): see there for what a missed offset and a freed one cost.
 */
export const SOURCE_OFFSET_FLAG = 3;

const sourcesOf = (input: readonly LineInput[]) => input.map((l) => l.source);

function offsetBasis(asked: boolean | undefined, flagged: boolean, vouched: boolean): SourceOffsetReport['basis'] {
  if (asked !== undefined) return asked ? 'asked' : 'not asked';
  if (!flagged) return 'not flagged';
  return vouched ? 'flagged' : 'flagged, reference unverified';
}

function notCarriedWarning(o: RelativeOffsets): Warning {
  return {
    code: 'SOURCE_OFFSET_NOT_CARRIED',
    message: `the offsets against ${o.reference} rest on a loop of bands (such as 2-0 against 1-0 + 2-1), which fixes a combination like δ(other) − 2δ(${o.reference}) and not ${o.reference}'s own calibration, so they were not carried in the fit and the band origins still hold them: send options.fitSourceOffsets true with options.referenceSource naming the calibrated source`,
  };
}

function checkReferenceSource(input: readonly LineInput[], reference: string | undefined): void {
  if (reference === undefined || input.some((l) => l.source === reference)) return;
  const known = [...new Set(input.flatMap((l) => (l.source !== undefined ? [l.source] : [])))].sort();
  throw new ScienceError(
    'INPUT_INVALID',
    `referenceSource "${reference}" is the source of no line (sources: ${known.length > 0 ? known.join(', ') : 'none'})`,
    { field: 'referenceSource', value: reference, sources: known },
  );
}

function sourceOffsetReport(
  o: RelativeOffsets,
  applied: boolean,
  basis: SourceOffsetReport['basis'],
  fitted?: ReadonlyMap<string, number>,
): SourceOffsetReport {
  return {
    reference: o.reference,
    applied,
    basis,
    sources: o.sources.map((s) => ({
      source: s.source,
      lines: fitted?.get(s.source) ?? s.lines,
      ...(s.offset !== undefined ? { offset: quantity(s.offset, s.uncertainty as number, 'cm-1') } : {}),
    })),
  };
}

interface Pass {
  readonly detailed: DetailedFit;
  /** The level fit the term test selected (before the next terms are constrained). */
  readonly selected: SolvedModel;
  readonly mode: UncertaintyMode;
}

/** One pass of the stages; with `carried`, the positions are corrected by those offsets and the covariances widened. */
function fitPass(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  opt: typeof DEFAULTS & FitOptions,
  carried?: Pick<RelativeOffsets, 'fitted' | 'covariance'> & {
    readonly sourceOf?: (line: number) => string | undefined;
  },
): Pass {
  const settings: FitSettings = {
    maxOrder: Math.max(1, Math.min(MAX_CENTRIFUGAL_ORDER, Math.floor(opt.maxCentrifugalOrder))),
    alpha: opt.termSignificance,
    screenGross: !opt.withoutChecks,
  };
  const prepared = prepareObservations(input, masses, opt.uncertaintyMode, settings, opt.reuseScatter);
  const { warnings } = prepared;
  const kept = selectAndReject(prepared, opt, settings);
  const truncation = constrainLevelModel(kept.level, kept.mode);
  if (truncation.constraints.length > 0 && !opt.withoutChecks)
    warnings.push(constrainedWarning(truncation.constraints, settings.alpha));
  const adjust = carried
    ? (f: SolvedModel) => withOffsetCovariance(f, kept.mode, carried.sourceOf ?? ((i) => input[i]?.source), carried)
    : undefined;
  const fit = adjust ? adjust(truncation.level.fit) : truncation.level.fit;
  const report = reportLevels(
    input,
    prepared.observations,
    prepared.read.transitions,
    kept.rejected,
    fit,
    masses,
    new Set(truncation.constraints.map((c) => c.key)),
  );
  warnings.push(...report.warnings);
  const structure = levelStructure(fit.observations);
  const derived = derivedStages(fit, structure.species, truncation.level.orders, masses, kept, report, opt, {
    alpha: settings.alpha,
    warnings,
    adjust,
  });
  warnings.push(...derived.combination.warnings);
  const selected = kept.level.fit;
  if (!opt.withoutChecks) listChecks(input, prepared, kept, report, warnings);
  const result = resultOf(
    input,
    masses,
    structure.species,
    prepared,
    kept,
    truncation.constraints,
    report,
    derived,
    settings,
  );
  const detailed = detailedFit(result, fit, structure.reference, selected, kept.mode, prepared, input);
  return { detailed, selected, mode: kept.mode };
}

type LevelReport = ReturnType<typeof reportLevels>;
type KeptLevels = ReturnType<typeof selectAndReject>;

/** Stage 7: the checks that only add warnings (repeats, duplicates, source offsets, the absolute scale, quality). */
function listChecks(
  input: readonly LineInput[],
  prepared: PreparedObservations,
  kept: KeptLevels,
  report: LevelReport,
  warnings: Warning[],
): void {
  const selected = kept.level.fit;
  checkRepeats(selected, prepared.given > 0, warnings);
  checkDuplicates(prepared.observations, kept.rejected, warnings);
  checkSourceOffsets(
    input.map((l) => l.source),
    report.lines,
    warnings,
    { fit: selected, mode: kept.mode },
  );
  // A mode turned absolute to keep the stated σ already says why; "consider a-posteriori" would contradict it.
  if (!kept.statedKept) absoluteScaleWarnings(selected, kept.mode, warnings);
  qualityWarnings(selected, report.correlation, report.names, warnings, kept.mode);
}

/** Stages 5 and 6: what is derived from the level fit (Dunham, mass-reduced Dunham, combination differences). */
interface DerivedStages {
  readonly dunham: ReturnType<typeof dunhamStage>;
  readonly massReducedDunham: FitResult['massReducedDunham'];
  readonly combination: ReturnType<typeof combinationChecks>;
}

function derivedStages(
  fit: SolvedModel,
  species: readonly string[],
  orders: LevelSelection['orders'],
  masses: ReadonlyMap<string, MassValue>,
  kept: KeptLevels,
  report: LevelReport,
  opt: Required<Pick<FitOptions, 'levelsOnly' | 'massReducedDunham'>>,
  {
    alpha,
    warnings,
    adjust,
  }: { readonly alpha: number; readonly warnings: Warning[]; readonly adjust?: (f: SolvedModel) => SolvedModel },
): DerivedStages {
  if (opt.levelsOnly) {
    return {
      dunham: { equilibrium: [], dunham: [], checks: [] },
      massReducedDunham: undefined,
      combination: { checks: [], warnings: [] },
    };
  }
  const dunham = dunhamStage(fit, species, orders, masses, kept.mode, alpha, warnings, adjust);
  const massReducedDunham = opt.massReducedDunham
    ? massReducedStage(fit, species, orders, masses, kept.mode, alpha, warnings, adjust)
    : undefined;
  const combination = combinationChecks(fit, orders, kept.mode, report.quantityOf, reducedChiSquare(kept.level.fit));
  return { dunham, massReducedDunham, combination };
}

/** The result as the service shapes it, from the stages' results. */
function resultOf(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  species: readonly string[],
  prepared: PreparedObservations,
  kept: KeptLevels,
  constraints: readonly TermConstraint[],
  report: LevelReport,
  { dunham, massReducedDunham, combination }: DerivedStages,
  { alpha }: FitSettings,
): FitResult {
  const { mode, rejected } = kept;
  const selected = kept.level.fit;
  return {
    species: [...masses.entries()]
      .filter(([f]) => species.includes(f))
      .map(([formula, m]) => ({ formula, reducedMass: quantity(m.value, m.uncertainty, 'u') })),
    lines: report.lines,
    bands: report.bands,
    levels: report.levels,
    equilibrium: dunham.equilibrium,
    parameters: report.parameters,
    covariance: { parameters: report.names, matrix: report.covariance },
    correlation: { parameters: report.names, matrix: report.correlation },
    statistics: statisticsOf(input.length, prepared.observations.length, selected, rejected.size, mode),
    model: {
      levelTerms: report.levelTerms,
      selection: `centrifugal and Dunham terms added while ${mode === 'absolute' ? 'a χ²-difference test' : 'an F test'} gives p < ${alpha}; the next term beyond them constrained by a prior`,
      constraints: [...constraints, ...dunham.dunham.flatMap((d) => d.constrained ?? [])],
    },
    dunham: dunham.dunham,
    ...(massReducedDunham ? { massReducedDunham } : {}),
    combinationDifferences: combination.checks,
    crossChecks: dunham.checks,
    ...(prepared.weighted.groups.length > 0 ? { scatter: prepared.weighted.groups } : {}),
    warnings: prepared.warnings,
  };
}

interface FitSettings {
  /** Highest centrifugal order (1 = B only … 5 = M). */
  readonly maxOrder: number;
  /** Significance of the term test. */
  readonly alpha: number;
  /**
   * Whether gross errors are screened out of the scale estimates (gross-errors.ts). Not in the automatic
   * assignment's round fits (`withoutChecks`): there a round's wrong pairs are the withdrawal's to find, and the
   * screen, judging them first, led an HBr scan to take 1H-81Br lines as 1H-79Br (held-out seed 41: 106 right,
   * 0 wrong without it in the rounds; 74 right, 18 wrong with it).
   */
  readonly screenGross: boolean;
}

/**
 * Stage 1: the observations and their weights (stated σ rescaled per group where they disagree), how many lines
 * carry a σ, the uncertainty mode that can be kept, and the level model first selected for them.
 */
interface PreparedObservations {
  readonly read: ReturnType<typeof readLines>;
  readonly weighted: WeightedLines;
  readonly stated: ReturnType<typeof rescaleStatedUncertainties> | undefined;
  readonly observations: readonly Observation[];
  readonly initialLevel: LevelSelection;
  /** Lines that came with an uncertainty. */
  readonly given: number;
  /** Every assigned line came with an uncertainty (none filled or estimated). */
  readonly allStated: boolean;
  readonly mode: UncertaintyMode;
  readonly warnings: Warning[];
}

function prepareObservations(
  input: readonly LineInput[],
  masses: ReadonlyMap<string, MassValue>,
  asked: UncertaintyMode,
  settings: FitSettings,
  reuseScatter?: ScatterReuse,
): PreparedObservations {
  const read = readLines(input, masses);
  const weighted = weighLines(
    input,
    read.observations,
    { maxOrder: settings.maxOrder, termSignificance: settings.alpha, screenGross: settings.screenGross },
    undefined,
    reuseScatter,
  );
  const warnings: Warning[] = [...weighted.warnings];
  const given = input.filter((l) => l.uncertainty !== undefined).length;
  let mode = asked;
  if (given === 0 && mode === 'absolute') {
    mode = 'a-posteriori';
    warnings.push({
      code: 'UNCERTAINTY_MODE_CHANGED',
      message:
        'absolute uncertainties were asked for but no line has an uncertainty: the covariance is scaled a posteriori',
    });
  }
  const { maxOrder, alpha, screenGross } = settings;
  const firstLevel = selectLevelModel(weighted.observations, maxOrder, mode, alpha);
  const stated =
    mode === 'a-posteriori'
      ? rescaleStatedUncertainties(
          input,
          weighted.observations,
          { maxOrder, termSignificance: alpha, screenGross, perLineGroups: screenGross },
          firstLevel,
        )
      : undefined;
  if (stated) warnings.push(...stated.warnings);
  const observations = stated?.observations ?? weighted.observations;
  const initialLevel =
    observations === weighted.observations ? firstLevel : selectLevelModel(observations, maxOrder, mode, alpha);
  const allStated = read.observations.every((o) => input[o.index]?.uncertainty !== undefined);
  return { read, weighted, stated, observations, initialLevel, given, allStated, mode, warnings };
}

/** Stages 2 and 3: the level model selected, outliers rejected; the mode turned absolute when no freedom is left. */
function selectAndReject(
  prepared: PreparedObservations,
  opt: { readonly rejectionThreshold: number; readonly maxRejectedFraction: number },
  settings: FitSettings,
): { level: LevelSelection; rejected: ReadonlyMap<number, string>; mode: UncertaintyMode; statedKept: boolean } {
  const { observations, warnings, given } = prepared;
  let mode = prepared.mode;
  let statedKept = false;
  const outliers = rejectOutliers(observations, prepared.initialLevel, {
    maxOrder: settings.maxOrder,
    mode,
    termSignificance: settings.alpha,
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
    level = selectLevelModel(outliers.kept, settings.maxOrder, mode, settings.alpha);
  } else if (mode === 'a-posteriori' && keepsStatedUncertainties(prepared, level.fit)) {
    const nu = level.fit.degreesOfFreedom;
    const r = level.fit.chiSquare / nu;
    mode = 'absolute';
    statedKept = true;
    warnings.push({
      code: 'UNCERTAINTY_MODE_CHANGED',
      message: `χ²/ν = ${r < 0.01 ? r.toExponential(1) : r.toFixed(2)} on ${nu} degree(s) of freedom: too few to show that the stated line uncertainties are too large, so they are taken as absolute instead of being scaled down by √(χ²/ν) = ${Math.sqrt(r).toPrecision(2)}`,
    });
    level = selectLevelModel(outliers.kept, settings.maxOrder, mode, settings.alpha);
  }
  return { level, rejected, mode, statedKept };
}

/**
 * Below this many degrees of freedom the a-posteriori scale does not shrink stated uncertainties. s² = χ²/ν has a
 * relative standard deviation of √(2/ν) (0.45 at ν = 10, 1.4 at ν = 1), and a small χ² on few lines more often
 * means that a few precise lines fix the parameters than that every σ is overstated (three CO rotation lines of
 * which one is 1 000 times less precise scaled σ(B_0) down 1 000-fold, putting the published value 47σ away). The
 * value 10 is our choice; above it the scale still goes both ways, so overstated σ of a long list are corrected.
 */
export const MIN_DOF_TO_SCALE_DOWN = 10;

/** a-posteriori, every fitted line's σ stated by the caller, 0 < ν < MIN_DOF_TO_SCALE_DOWN and χ²/ν < 1. */
function keepsStatedUncertainties(prepared: PreparedObservations, fit: SolvedModel): boolean {
  const nu = fit.degreesOfFreedom;
  if (nu <= 0 || nu >= MIN_DOF_TO_SCALE_DOWN || fit.chiSquare >= nu) return false;
  return prepared.allStated && prepared.observations === prepared.weighted.observations;
}

/** The statistics describe the model the term test selected, not the constrained one (which changes the covariance). */
function statisticsOf(
  lines: number,
  assigned: number,
  selected: SolvedModel,
  rejected: number,
  mode: UncertaintyMode,
): Statistics {
  // The condition number read when the statistics are (the fits of assignment rounds are never reported).
  const statistics = {
    lines,
    assigned,
    fitted: selected.observations.length,
    rejected,
    unassigned: lines - assigned,
    parameters: selected.model.parameters.length,
    degreesOfFreedom: selected.degreesOfFreedom,
    rms: rmsResidual(selected),
    reducedChiSquare: reducedChiSquare(selected),
    conditionNumber: null as number | null,
    uncertaintyMode: mode,
  };
  return Object.defineProperty(statistics, 'conditionNumber', {
    enumerable: true,
    get: () => (Number.isFinite(selected.conditionNumber) ? selected.conditionNumber : null),
  });
}

function constrainedWarning(constraints: readonly TermConstraint[], alpha: number): Warning {
  return {
    code: 'TERMS_CONSTRAINED',
    message: `centrifugal terms the lines cannot determine (term test p ≥ ${alpha}) are constrained, their uncertainty carried into the covariance: ${constraints.map((c) => `${c.parameter} = ${formatValue(c.prior.value)} ± ${formatValue(c.prior.uncertainty)} cm-1`).join(', ')} (${[...new Set(constraints.map((c) => c.basis.replace(/_\d+/g, '_v')))].join('; ')})`,
  };
}

/** Stage 5: per isotopologue, the Dunham fit, the equilibrium constants and their cross-checks. */
function dunhamStage(
  fit: SolvedModel,
  species: readonly string[],
  orders: LevelSelection['orders'],
  masses: ReadonlyMap<string, MassValue>,
  mode: UncertaintyMode,
  alpha: number,
  warnings: Warning[],
  adjust?: (f: SolvedModel) => SolvedModel,
): {
  equilibrium: FitResult['equilibrium'][number][];
  dunham: DunhamFit[];
  checks: FitResult['crossChecks'][number][];
} {
  const equilibrium: FitResult['equilibrium'][number][] = [];
  const dunham: DunhamFit[] = [];
  const checks: FitResult['crossChecks'][number][] = [];
  for (const s of species) {
    // One species: its lines are all of them (the same array keeps the structure and columns found for it).
    const obs = species.length === 1 ? fit.observations : fit.observations.filter((o) => o.species === s);
    const d = fitDunhamForSpecies(s, obs, mode, alpha, orders, warnings, adjust);
    if (!d) continue;
    dunham.push(d.report);
    const mu = masses.get(s) as MassValue;
    const eq = equilibriumFromDunham(d.set, mu);
    if (Object.keys(eq).length > 0) equilibrium.push({ species: s, ...eq });
    for (const c of crossChecks(d.set, eq, mu)) checks.push({ species: s, ...c });
  }
  return { equilibrium, dunham, checks };
}

/** The mass-reduced Dunham fit across isotopologues, when asked for and there are two or more. */
function massReducedStage(
  fit: SolvedModel,
  species: readonly string[],
  orders: LevelSelection['orders'],
  masses: ReadonlyMap<string, MassValue>,
  mode: UncertaintyMode,
  alpha: number,
  warnings: Warning[],
  adjust?: (f: SolvedModel) => SolvedModel,
): FitResult['massReducedDunham'] {
  if (species.length < 2) {
    warnings.push({
      code: 'MASS_REDUCED_NEEDS_ISOTOPOLOGUES',
      message: 'a mass-reduced Dunham fit needs lines of two or more isotopologues',
    });
    return undefined;
  }
  return fitMassReduced(fit.observations, masses, mode, alpha, orders, warnings, adjust);
}

/** The result with the predictions and line σ the assignment loop asks of it. */
function detailedFit(
  result: FitResult,
  fit: SolvedModel,
  ref: LevelStructure['reference'],
  selected: SolvedModel,
  mode: UncertaintyMode,
  { weighted, stated, observations }: PreparedObservations,
  input: readonly LineInput[],
): DetailedFit {
  const scale = mode === 'absolute' ? 1 : (reducedChiSquare(selected) ?? 1);
  // The line predict asks about, one object refilled per call (predictWithVariance keeps nothing of it).
  const asked: { -readonly [K in keyof Observation]: Observation[K] } = {
    index: -1,
    species: '',
    upperV: 0,
    lowerV: 0,
    upperJ: 0,
    lowerJ: 0,
    position: 0,
    weight: 1,
  };
  return {
    result,
    ...(weighted.estimate ? { scatterEstimate: weighted.estimate } : {}),
    scale: reducedChiSquare(selected) ?? 1,
    predict(tr: Transition) {
      const r = ref.get(tr.species);
      const ru = r?.get(tr.band.upper);
      const rl = r?.get(tr.band.lower);
      if (ru === undefined || rl === undefined || ru !== rl) return undefined;
      asked.species = tr.species;
      asked.upperV = tr.band.upper;
      asked.lowerV = tr.band.lower;
      asked.upperJ = upperJ(tr);
      asked.lowerJ = tr.j;
      return predictWithVariance(fit, asked);
    },
    scatterOfResiduals: () => scatterOfFit(input, observations, selected),
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

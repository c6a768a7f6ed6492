import type { Analysis } from '../assign/analyse.js';
import type { PeakInput } from '../assign/assign-lines.js';
import { candidateLines, naturalAbundances } from '../assign/candidates.js';
import { type IdentificationCandidate, identifyIsotopologues, identifySpecies } from '../assign/identify.js';
import { relativeIntensity, withoutUninformativeIntensities } from '../assign/intensity.js';
import { MIN_DOF_TO_SCALE_DOWN } from '../fit/fit-lines.js';
import { compileDunham } from '../models/dunham.js';
import type { Branch } from '../models/transitions.js';
import { constantsFor, dunhamFromEntry } from '../species/library.js';
import { type Isotopologue, parseSpecies } from '../species/parse.js';
import {
  type CalibrationPoint,
  calibrateAgainstLibrary,
  guardBandedStatus,
  type ReferenceCalibration,
} from './calibration.js';
import { plusMinus } from './plus-minus.js';
import { boltzmannTemperature } from './temperature.js';

export type CheckStatus = 'pass' | 'warn' | 'fail' | 'not-evaluated';
export type CheckId =
  | 'identity'
  | 'calibration'
  | 'unexplained-lines'
  | 'isotope-ratio'
  | 'temperature'
  | 'fit-quality';

export interface Check {
  readonly id: CheckId;
  readonly status: CheckStatus;
  readonly measured: Readonly<Record<string, unknown>>;
  readonly limit: Readonly<Record<string, unknown>>;
  readonly message: string;
}

/**
 * Tolerance profile of a QA check. The defaults are starting points, not standards: each lab sends its own.
 * Every default says where it comes from.
 */
export interface Tolerances {
  /** Fitted band origin against the reference, cm⁻¹. Default 0.5: reference constants of the library reproduce
   * measured origins to a few hundredths, and instrument offsets up to a few tenths are the calibration check's
   * business (common practice). Rule: warn beyond the limit, fail beyond three times it (the library's own origin
   * uncertainty, a few hundredths, is far inside the limit, so no separate guard band). */
  readonly identityOrigin: number;
  /** Fitted B″ against the reference, relative. Default 1e-3: B from Huber & Herzberg is good to 1e-5, and a scale
   * error of tens of ppm moves B by as much; a wrong molecule is off by far more (common practice). Rule: as for
   * identityOrigin (warn beyond, fail beyond three times). */
  readonly identityB: number;
  /** |offset| at the band centre, cm⁻¹. Default 0.05, a typical FTIR wavenumber-accuracy figure at 0.5 cm⁻¹
   * resolution (common practice). Decision rule (guard band 2u, after JCGM 106:2012): pass |x| ≤ limit or |x| ≤
   * 2.576u (not different from zero at the stated false-alarm rate of 1 %); warn when beyond the limit by less than
   * 2u; fail when beyond it by more. u includes the library's prediction uncertainty. */
  readonly calibrationOffset: number;
  /** |scale error|, ppm. Default 20 (common practice for FTIR and laser wavemeters). Judged only when the lines
   * determine the scale to a third of this limit (one band alone rarely does: the scale is then nearly degenerate
   * with the offset); same guard-banded rule as the offset. */
  readonly calibrationScalePpm: number;
  /** Share of intensity (or of lines, without intensities) no band explains: fail above this, warn above half of
   * it. Default 0.05 (common practice: a few per cent of noise peaks is normal in a peak list). A count, not an
   * estimate: no guard band. */
  readonly unexplainedFraction: number;
  /** |measured/natural − 1| of minor-isotopologue intensity ratios: warn above. Default 0.15 (natural variation is
   * a few per cent; line intensities of a peak list are rarely better than 5–10 %, common practice). Never fails
   * (an enriched sample is not a faulty one). */
  readonly isotopeRatio: number;
  /** Expected rotational temperature and its tolerance, K. Default none: the temperature is reported only. Rule:
   * the guard-banded one of the calibration (pass within the tolerance or when the deviation is within 2.576u,
   * warn beyond it by less than 2u, fail beyond it by more), u the Boltzmann-plot uncertainty. */
  readonly temperature?: { readonly expected: number; readonly tolerance: number };
  /** Largest reduced χ² when line uncertainties are given. Default 3 (common practice). Judged only when the
   * uncertainties were given (an estimated scatter makes χ²/ν ≈ 1 by construction); fail above. */
  readonly maxReducedChiSquare: number;
  /** Largest share of lines rejected as outliers. Default 0.05 (common practice). A count: fail above. */
  readonly maxRejectedFraction: number;
  /** Smallest share of the predicted strong lines (≥ 10 % of the strongest) that must be found. Default 0.9. A
   * count: warn below. */
  readonly minCompleteness: number;
}

export const DEFAULT_TOLERANCES: Tolerances = {
  identityOrigin: 0.5,
  identityB: 1e-3,
  calibrationOffset: 0.05,
  calibrationScalePpm: 20,
  unexplainedFraction: 0.05,
  isotopeRatio: 0.15,
  maxReducedChiSquare: 3,
  maxRejectedFraction: 0.05,
  minCompleteness: 0.9,
};

export interface CheckReport {
  readonly verdict: 'pass' | 'warn' | 'fail';
  readonly checks: readonly Check[];
}

const RANK: Record<CheckStatus, number> = { 'not-evaluated': 0, pass: 1, warn: 2, fail: 3 };

export function verdictOf(checks: readonly Check[]): 'pass' | 'warn' | 'fail' {
  let worst: CheckStatus = 'pass';
  for (const c of checks) if (RANK[c.status] > RANK[worst]) worst = c.status;
  return worst === 'not-evaluated' ? 'pass' : worst;
}

/** A molecule key: elements, with the hydrogen isotope kept (DCl is not HCl). */
function moleculeKey(iso: Isotopologue): string {
  return iso.atoms.map((a) => (a.element.symbol === 'H' ? `${a.isotope.massNumber}H` : a.element.symbol)).join('-');
}

const notEvaluated = (id: CheckId, message: string): Check => ({
  id,
  status: 'not-evaluated',
  measured: {},
  limit: {},
  message,
});

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
      runnerUp: ranking[1]?.species ?? null,
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

function mainBand(analysis: Analysis, species: string | undefined) {
  return analysis.result.bands.filter((b) => b.species === species && b.origin).sort((a, b) => b.lines - a.lines)[0];
}

function identityCheck(
  peaks: readonly PeakInput[],
  declared: Isotopologue | undefined,
  analysis: Analysis,
  main: string | undefined,
  tol: Tolerances,
): Check {
  const ranking: readonly IdentificationCandidate[] = analysis.assignment.identification ?? identifySpecies(peaks);
  const best = ranking[0];
  const limit = { origin: tol.identityOrigin, relativeB: tol.identityB };
  if (!main) return notEvaluated('identity', 'no species was fitted');
  const iso = parseSpecies(main);
  const entry = constantsFor(iso);
  // the runner-up is the best-ranked other molecule (an isotopologue of the fitted one is no rival)
  const runnerUp = ranking.find((c) => moleculeKey(parseSpecies(c.species)) !== moleculeKey(iso));
  const rivals = identityRivals(best, iso, main, analysis);
  const deviation = entry ? referenceDeviation(analysis, main, entry) : undefined;
  const reference = referenceVerdict(deviation, Boolean(entry), main, tol);
  const problems = reference.problem === undefined ? rivals : [...rivals, reference.problem];
  return {
    id: 'identity',
    status: rivals.length > 0 ? 'fail' : reference.status,
    measured: {
      declared: declared?.formula ?? null,
      fitted: main,
      bestMatch: best?.species ?? null,
      bestScore: best?.score ?? 0,
      runnerUp: runnerUp?.species ?? null,
      runnerUpScore: runnerUp?.score ?? 0,
      ...(deviation
        ? { band: deviation.band, originDeviation: deviation.dOrigin, relativeBDeviation: deviation.dB }
        : {}),
    },
    limit,
    message:
      problems.length === 0
        ? `${main} agrees with the reference library${inconclusiveRanking(best, iso) ?? (runnerUp ? `; runner-up ${runnerUp.species} (score ${runnerUp.score.toFixed(2)})` : '')}`
        : problems.join('; '),
  };
}

/**
 * What fails identity whatever the reference says: another molecule ranked first with a score that names it, or an
 * assignment no better than chance.
 */
function identityRivals(
  best: IdentificationCandidate | undefined,
  iso: Isotopologue,
  main: string,
  analysis: Analysis,
): string[] {
  const problems: string[] = [];
  if (best && best.score >= 0.5 && moleculeKey(parseSpecies(best.species)) !== moleculeKey(iso))
    problems.push(`the lines match ${best.name} (score ${best.score.toFixed(2)}) better than the declared ${main}`);
  const byChance = analysis.result.warnings.find((w) => w.code === 'ASSIGNMENT_NOT_BEYOND_CHANCE');
  if (byChance) problems.push(byChance.message);
  return problems;
}

/**
 * The fitted band against the library's: warn beyond the limits, fail beyond three times them; without reference
 * constants a warning that identity rests on the band structure only.
 */
function referenceVerdict(
  deviation: { dOrigin: number; dB: number } | undefined,
  hasReference: boolean,
  main: string,
  tol: Tolerances,
): { status: CheckStatus; problem?: string } {
  if (!deviation)
    return hasReference
      ? { status: 'pass' }
      : { status: 'warn', problem: `${main} has no reference constants: identity rests on the band structure only` };
  const { dOrigin, dB } = deviation;
  const off = `band origin off by ${dOrigin.toFixed(3)} cm-1 and B″ by ${(dB * 1e6).toFixed(0)} ppm from the reference`;
  if (Math.abs(dOrigin) > 3 * tol.identityOrigin || Math.abs(dB) > 3 * tol.identityB)
    return { status: 'fail', problem: off };
  if (Math.abs(dOrigin) > tol.identityOrigin || Math.abs(dB) > tol.identityB) return { status: 'warn', problem: off };
  return { status: 'pass' };
}

/**
 * The main band's origin and its lower level's B against the library's: origin − reference origin (cm⁻¹) and
 * B/B_ref − 1, B_ref = Y01 + Y11 (v″ + ½); undefined without a main band with an origin and its lower level.
 */
function referenceDeviation(
  analysis: Analysis,
  main: string,
  entry: NonNullable<ReturnType<typeof constantsFor>>,
): { band: string; dOrigin: number; dB: number } | undefined {
  const band = mainBand(analysis, main);
  const level = analysis.result.levels.find(
    (l) => l.species === main && l.v === (band ? Number(band.band.split('-')[1]) : 0),
  );
  if (!band?.origin || !level) return undefined;
  const y = dunhamFromEntry(entry);
  const e = compileDunham(y);
  const [u, l] = band.band.split('-').map(Number) as [number, number];
  const refOrigin = e(u, 0) - e(l, 0);
  const refB = (y.get('0,1') ?? 0) + (y.get('1,1') ?? 0) * (l + 0.5);
  return { band: band.band, dOrigin: band.origin.value - refOrigin, dB: level.B.value / refB - 1 };
}

/** A note when the ranking of the bare lines put another molecule first, though below the score that names it. */
function inconclusiveRanking(best: IdentificationCandidate | undefined, fitted: Isotopologue): string | undefined {
  if (!best || moleculeKey(parseSpecies(best.species)) === moleculeKey(fitted)) return undefined;
  return ` (the ranking of the lines alone put ${best.species} first with score ${best.score.toFixed(2)}, below the 0.5 that names a species: not conclusive, and the fit to ${fitted.formula} is what is judged)`;
}

function calibrationCheck(
  peaks: readonly PeakInput[],
  analysis: Analysis,
  main: string | undefined,
  tol: Tolerances,
): Check {
  const limit = { offset: tol.calibrationOffset, scalePpm: tol.calibrationScalePpm, guardBand: '2u (k = 2)' };
  if (!main) return notEvaluated('calibration', 'no species was fitted');
  const entry = constantsFor(parseSpecies(main));
  if (!entry) return notEvaluated('calibration', `${main} has no reference positions to calibrate against`);
  const c = calibrateAgainstLibrary(
    calibrationPoints(peaks, analysis, main),
    dunhamFromEntry(entry),
    `reference-library positions of ${main}`,
    tol.calibrationScalePpm,
  );
  if (!c) return notEvaluated('calibration', 'fewer than three fitted lines of the main species with J″ ≤ 20');
  const status = calibrationStatus(c, tol);
  return {
    id: 'calibration',
    status,
    measured: {
      offset: c.offset,
      ...(c.scale ? { scale: c.scale } : {}),
      ...(c.scaleUndetermined !== undefined ? { scaleUncertaintyIfFitted: c.scaleUndetermined } : {}),
      centre: c.centre,
      lines: c.lines,
      reference: c.reference,
      libraryTermsCarried: c.nuisance,
    },
    limit,
    message: calibrationMessage(c, status, tol),
  };
}

/**
 * Each line's σ as the fit used it: given (scaled by √(χ²/ν) in a-posteriori mode: up always, down only on
 * MIN_DOF_TO_SCALE_DOWN or more degrees of freedom, as the fit does, so that a stated σ 200 times the scatter
 * cannot hide an offset), or the scatter estimated for its band, or the rms of the fit.
 */
function fittedSigma(
  peaks: readonly PeakInput[],
  analysis: Analysis,
  main: string,
): (index: number, band: string) => number {
  const r = analysis.result;
  const st = r.statistics;
  const s2 = st.reducedChiSquare ?? 1;
  const inflate =
    st.uncertaintyMode === 'a-posteriori' && st.reducedChiSquare !== null && r.scatter === undefined
      ? Math.sqrt(st.degreesOfFreedom >= MIN_DOF_TO_SCALE_DOWN ? s2 : Math.max(1, s2))
      : 1;
  return (index, band) =>
    peaks[index]?.uncertainty !== undefined
      ? (peaks[index]?.uncertainty as number) * inflate
      : (r.scatter?.find((g) => g.group === `${main} ${band}`)?.sigma ??
        r.scatter?.find((g) => g.by === 'pooled')?.sigma ??
        Math.max(st.rms, 1e-9));
}

/** The fitted lines of the main species with J″ ≤ 20, as points to calibrate against the library. */
function calibrationPoints(peaks: readonly PeakInput[], analysis: Analysis, main: string): CalibrationPoint[] {
  const sigmaOf = fittedSigma(peaks, analysis, main);
  return analysis.result.lines.flatMap((l) => {
    const a = l.assignment;
    if (l.status !== 'fitted' || !a || a.species !== main || a.j > 20) return [];
    const [u, lo] = a.band.split('-').map(Number) as [number, number];
    const ju = a.branch === 'R' ? a.j + 1 : a.branch === 'P' ? a.j - 1 : a.j;
    return [{ observed: l.position, sigma: sigmaOf(l.index, a.band), upperV: u, upperJ: ju, lowerV: lo, lowerJ: a.j }];
  });
}

/** The worse of the guard-banded verdicts on the offset and, when judged, the scale. */
function calibrationStatus(c: ReferenceCalibration, tol: Tolerances): CheckStatus {
  const offsetStatus = guardBandedStatus(c.offset.value, c.offset.uncertainty, tol.calibrationOffset);
  const scaleStatus = c.scale ? guardBandedStatus(c.scale.value, c.scale.uncertainty, tol.calibrationScalePpm) : 'pass';
  return RANK[offsetStatus] >= RANK[scaleStatus] ? offsetStatus : scaleStatus;
}

function calibrationMessage(c: ReferenceCalibration, status: CheckStatus, tol: Tolerances): string {
  const beyondButNotSignificant =
    Math.abs(c.offset.value) > tol.calibrationOffset ||
    (c.scale !== undefined && Math.abs(c.scale.value) > tol.calibrationScalePpm);
  const found = `offset ${plusMinus(c.offset.value, c.offset.uncertainty, 4)} cm-1 at ${c.centre.toFixed(1)} cm-1 (the weighted centre of ${c.lines} lines, fitted against the library with its missing terms carried; fit.assignment.calibration is the assignment's search estimate, which leaves them out)${c.scale ? `, scale ${plusMinus(c.scale.value, c.scale.uncertainty, 1)} ppm` : ''}`;
  const scaleNote =
    c.scaleUndetermined !== undefined
      ? `; the scale is not determined by these lines (σ would be ${c.scaleUndetermined.toFixed(0)} ppm, more than a third of the ${tol.calibrationScalePpm} ppm limit) and is not judged`
      : '';
  const library = c.nuisance.length
    ? ` (library prediction uncertainty included: ${c.nuisance.join(', ')} missing from the library, carried with priors)`
    : '';
  return status === 'pass'
    ? `${found}: ${beyondButNotSignificant ? `beyond the limits (${tol.calibrationOffset} cm-1, ${tol.calibrationScalePpm} ppm) but not different from zero at the 1 % false-alarm level (|x| ≤ 2.576u): the lines cannot tell it from a calibrated scan` : 'within limits'}${library}${scaleNote}`
    : `${found} against limits ${tol.calibrationOffset} cm-1 and ${tol.calibrationScalePpm} ppm${status === 'fail' ? ' (beyond the limit by more than the 2σ guard band)' : c.offset.uncertainty > tol.calibrationOffset ? ` (inconclusive: the lines determine the offset only to ±${c.offset.uncertainty.toPrecision(2)} cm-1, more than the limit itself; check the stated uncertainties)` : ' (beyond the limit, but by less than the 2σ guard band: not significant)'}${library}${scaleNote}`;
}

function unexplainedCheck(peaks: readonly PeakInput[], analysis: Analysis, tol: Tolerances): Check {
  const idx = analysis.result.lines.filter((l) => l.status === 'unassigned').map((l) => l.index);
  // By intensity when every line has one and they sum to something (all 0 counted lines: the share was 0 then).
  const withI =
    peaks.every((p) => p.intensity !== undefined && p.intensity >= 0) && peaks.some((p) => (p.intensity as number) > 0);
  const total = withI ? peaks.reduce((s, p) => s + (p.intensity as number), 0) : peaks.length;
  const part = withI ? idx.reduce((s, i) => s + (peaks[i]?.intensity as number), 0) : idx.length;
  const fraction = total > 0 ? part / total : 0;
  const explainedBy =
    idx.length >= 5
      ? identifySpecies(idx.map((i) => peaks[i] as PeakInput))
          .filter((c) => c.score >= 0.3)
          .map((c) => ({ species: c.species, name: c.name, score: c.score }))
      : [];
  const isotopologues = explainedBy.length === 0 ? otherIsotopologues(peaks, idx, analysis) : [];
  explainedBy.push(...isotopologues);
  const byShare: CheckStatus =
    fraction > tol.unexplainedFraction ? 'fail' : fraction > tol.unexplainedFraction / 2 ? 'warn' : 'pass';
  const missed = bandsMissedAtTheirBestOffset(analysis, idx.length);
  const status: CheckStatus = missed.length > 0 && byShare === 'pass' ? 'warn' : byShare;
  return {
    id: 'unexplained-lines',
    status,
    measured: {
      count: idx.length,
      fraction,
      basis: withI ? 'intensity' : 'line count',
      positions: idx.map((i) => (peaks[i] as PeakInput).position),
      explainedBy,
      bandsNotMatched: missed,
    },
    limit: { fraction: tol.unexplainedFraction, linesMatchingAMissedBand: MISSED_BAND_LINES },
    message: `${idx.length} line(s), ${(fraction * 100).toFixed(1)} % of the ${withI ? 'intensity' : 'lines'}, are explained by no band${explainedBy.length ? `; they would fit ${explainedBy.map((c) => c.name).join(', ')} ${isotopologues.length > 0 ? `(another isotopologue than the one assigned against: declare the molecule, "${moleculeOf(analysis)}", to assign every isotopologue)` : '(a possible impurity)'}` : ''}${missed
      .map(
        (m) =>
          `; ${m.matches} of them would match ${m.species} band ${m.band} at its best offset ${m.offset >= 0 ? '+' : ''}${m.offset.toFixed(3)} cm-1, a band the library predicts in the window that was not found (see BAND_NOT_FOUND): a weak share of the intensity is no proof the lines are noise`,
      )
      .join('')}`,
  };
}

/**
 * Unexplained lines that another isotopologue of the assigned species explains on its own (a list declared as
 * 12C16O holding 13C16O lines): score ≥ 0.3 as identifySpecies scores molecules, isotopologues already assigned
 * against left out.
 */
function otherIsotopologues(
  peaks: readonly PeakInput[],
  idx: readonly number[],
  analysis: Analysis,
): { species: string; name: string; score: number }[] {
  const main = analysis.assignment.species[0];
  if (idx.length < 5 || !main) return [];
  const used = new Set(analysis.assignment.species);
  return identifyIsotopologues(
    idx.map((i) => peaks[i] as PeakInput),
    parseSpecies(main),
  )
    .filter((c) => c.score >= 0.3 && !used.has(c.species))
    .map((c) => ({ species: c.species, name: c.name, score: c.score }));
}

/** The assigned molecule with only D or T named ("CO" for 12C-16O, "DCl" for 2H-35Cl), as a caller would declare it. */
function moleculeOf(analysis: Analysis): string {
  const main = analysis.assignment.species[0];
  if (!main) return '';
  const symbol = (a: { element: { symbol: string }; isotope: { massNumber: number } }) =>
    a.element.symbol === 'H' && a.isotope.massNumber === 2
      ? 'D'
      : a.element.symbol === 'H' && a.isotope.massNumber === 3
        ? 'T'
        : a.element.symbol;
  return parseSpecies(main).atoms.map(symbol).join('');
}

/** Lines of a band the library predicts but the assignment did not find that make the unexplained-lines check warn. */
const MISSED_BAND_LINES = 4;

/**
 * Bands reported BAND_NOT_FOUND whose best offset (searched up to 4× maxOffset by the assignment) matches at least
 * MISSED_BAND_LINES of their strong predicted lines, with at least as many lines left unexplained: an overtone
 * carries a few per cent of the fundamental's intensity, so an intensity-weighted share alone passes it.
 */
function bandsMissedAtTheirBestOffset(analysis: Analysis, unexplained: number) {
  return analysis.assignment.bands.flatMap((b) =>
    b.bestOffset && b.matched < b.bestOffset.matches && Math.min(b.bestOffset.matches, unexplained) >= MISSED_BAND_LINES
      ? [{ species: b.species, band: b.band, offset: b.bestOffset.offset, matches: b.bestOffset.matches }]
      : [],
  );
}

/** One isotopologue's line of a transition (band, branch, J″), with the intensity sent. */
interface TransitionLine {
  readonly species: string;
  readonly intensity: number;
  readonly position: number;
  readonly branch: Branch;
  readonly j: number;
  readonly band: string;
}

/** A minor isotopologue's intensity relative to the main one's, over its natural relative abundance. */
interface RatioToNatural {
  readonly species: string;
  readonly measured: number;
  readonly uncertainty: number;
  readonly pairs: number;
  readonly expected: number;
}

function isotopeCheck(
  peaks: readonly PeakInput[],
  analysis: Analysis,
  T: number,
  tol: Tolerances,
  noIntensities: string,
): Check {
  const limit = { relative: tol.isotopeRatio };
  const species = analysis.assignment.species;
  if (species.length < 2) return notEvaluated('isotope-ratio', 'only one isotopologue was assigned against');
  if (!peaks.every((p) => p.intensity !== undefined)) return notEvaluated('isotope-ratio', noIntensities);
  const main = species[0] as string;
  const natural = naturalAbundances(main);
  const byTransition = fittedLinesByTransition(peaks, analysis);
  const ratios = species
    .slice(1)
    .map((minor) => ratioToNatural(main, minor, byTransition, natural, T))
    .filter((r): r is RatioToNatural => r !== undefined);
  if (ratios.length === 0)
    return notEvaluated('isotope-ratio', 'fewer than three transitions were assigned in both isotopologues');
  const worst = Math.max(...ratios.map((x) => Math.abs(x.measured - 1)));
  const status: CheckStatus = worst > tol.isotopeRatio ? 'warn' : 'pass';
  return {
    id: 'isotope-ratio',
    status,
    measured: {
      ratios: ratios.map((x) => ({
        species: x.species,
        relativeToNatural: { value: x.measured, uncertainty: x.uncertainty, unit: '1' },
        naturalAbundance: natural.get(x.species) ?? null,
        pairs: x.pairs,
        ...abundanceRatio(main, x, natural),
      })),
    },
    limit,
    message: ratios
      .map(
        (x) =>
          `${x.species}: ${describeAbundanceRatio(main, x, natural)}${plusMinus(x.measured, x.uncertainty, 3)} of the natural abundance ratio (${x.pairs} line pairs)`,
      )
      .join('; ')
      .concat(status === 'warn' ? ' — isotopic composition differs from natural (enriched or depleted sample?)' : ''),
  };
}

/** The fitted lines by transition ("band|branch|J″"), each isotopologue's line with the intensity sent. */
function fittedLinesByTransition(peaks: readonly PeakInput[], analysis: Analysis): Map<string, TransitionLine[]> {
  const byTransition = new Map<string, TransitionLine[]>();
  for (const l of analysis.result.lines) {
    const a = l.assignment;
    if (l.status !== 'fitted' || !a) continue;
    const key = `${a.band}|${a.branch}|${a.j}`;
    const list = byTransition.get(key) ?? [];
    list.push({
      species: a.species,
      intensity: peaks[l.index]?.intensity as number,
      position: l.position,
      branch: a.branch,
      j: a.j,
      band: a.band,
    });
    byTransition.set(key, list);
  }
  return byTransition;
}

/** Energy above (v = 0, J = 0) from the library's constants of an isotopologue. */
function libraryEnergy(species: string): (v: number, j: number) => number {
  const e = compileDunham(dunhamFromEntry(constantsFor(parseSpecies(species)) ?? (undefined as never)));
  return (v: number, j: number) => e(v, j) - e(0, 0);
}

/**
 * The minor isotopologue's intensity factor relative to natural: the geometric mean over the transitions assigned
 * in both of (I_minor/I_main) / (predicted minor/main at T, natural abundances), with σ = factor·sd(ln)/√pairs;
 * undefined with fewer than three pairs.
 */
function ratioToNatural(
  main: string,
  minor: string,
  byTransition: ReadonlyMap<string, readonly TransitionLine[]>,
  natural: ReadonlyMap<string, number>,
  T: number,
): RatioToNatural | undefined {
  const logs: number[] = [];
  const eMain = libraryEnergy(main);
  const eMinor = libraryEnergy(minor);
  for (const list of byTransition.values()) {
    const a = list.find((x) => x.species === main);
    const b = list.find((x) => x.species === minor);
    if (!a || !b || !(a.intensity > 0) || !(b.intensity > 0)) continue;
    const lo = Number(a.band.split('-')[1]);
    const predA = (natural.get(main) ?? 1) * relativeIntensity(a.position, a.branch, a.j, eMain(lo, a.j), T);
    const predB = (natural.get(minor) ?? 0) * relativeIntensity(b.position, b.branch, b.j, eMinor(lo, b.j), T);
    if (!(predA > 0 && predB > 0)) continue;
    logs.push(Math.log(b.intensity / a.intensity / (predB / predA)));
  }
  if (logs.length < 3) return undefined;
  const mean = logs.reduce((s, x) => s + x, 0) / logs.length;
  const sd = Math.sqrt(logs.reduce((s, x) => s + (x - mean) ** 2, 0) / (logs.length - 1));
  const factor = Math.exp(mean);
  return {
    species: minor,
    measured: factor,
    uncertainty: (factor * sd) / Math.sqrt(logs.length),
    pairs: logs.length,
    expected: 1,
  };
}

/**
 * The measured abundance ratio main/minor (as a mass spectrometrist quotes it, e.g. H³⁵Cl/H³⁷Cl ≈ 3.13 for natural
 * chlorine): the natural ratio divided by the measured minor-to-main factor relative to natural; its σ is that
 * factor's relative σ (the natural abundances' own uncertainty, ~1e-3 relative for Cl (CIAAW), is left out).
 */
function abundanceRatio(
  main: string,
  x: { species: string; measured: number; uncertainty: number },
  natural: ReadonlyMap<string, number>,
): { abundanceRatio?: { ratio: string; value: number; uncertainty: number; natural: number; unit: '1' } } {
  const a = natural.get(main);
  const b = natural.get(x.species);
  if (!(a && b && x.measured > 0)) return {};
  const value = a / b / x.measured;
  return {
    abundanceRatio: {
      ratio: `${main}/${x.species}`,
      value,
      uncertainty: (value * x.uncertainty) / x.measured,
      natural: a / b,
      unit: '1',
    },
  };
}

function describeAbundanceRatio(
  main: string,
  x: { species: string; measured: number; uncertainty: number },
  natural: ReadonlyMap<string, number>,
): string {
  const r = abundanceRatio(main, x, natural).abundanceRatio;
  if (!r) return '';
  const digits = r.value >= 100 ? 1 : 3;
  return `${r.ratio} = ${plusMinus(r.value, r.uncertainty, digits)} (natural ${r.natural.toFixed(digits)}), `;
}

function temperatureCheck(
  peaks: readonly PeakInput[],
  analysis: Analysis,
  main: string | undefined,
  tol: Tolerances,
  noIntensities: string,
): Check {
  const limit = tol.temperature ? { expected: tol.temperature.expected, tolerance: tol.temperature.tolerance } : {};
  if (!peaks.every((p) => p.intensity !== undefined)) return notEvaluated('temperature', noIntensities);
  const band = mainBand(analysis, main);
  if (!band) return notEvaluated('temperature', 'no vibrational band of the main species was fitted');
  const lowerV = Number(band.band.split('-')[1]);
  const level = analysis.result.levels.find((l) => l.species === main && l.v === lowerV);
  if (!level) return notEvaluated('temperature', 'the lower level was not fitted');
  const energy = (j: number) => {
    const x = j * (j + 1);
    return level.B.value * x - (level.D?.value ?? 0) * x * x + (level.H?.value ?? 0) * x ** 3;
  };
  const pts = analysis.result.lines.flatMap((l) => {
    const a = l.assignment;
    if (l.status !== 'fitted' || !a || a.species !== main || a.band !== band.band) return [];
    return [
      {
        position: l.position,
        intensity: peaks[l.index]?.intensity as number,
        branch: a.branch,
        j: a.j,
        lowerEnergy: energy(a.j),
      },
    ];
  });
  const plot = boltzmannTemperature(pts);
  if (!plot)
    return notEvaluated(
      'temperature',
      'the Boltzmann plot could not be made (too few lines, or intensities that do not fall with E″)',
    );
  const t = plot.temperature;
  let status: CheckStatus = 'pass';
  let message = `rotational temperature ${plusMinus(t.value, t.uncertainty, 1)} K from ${pts.length} lines of band ${band.band} (Boltzmann plot; Herman–Wallis effects neglected)`;
  if (tol.temperature) {
    const d = Math.abs(t.value - tol.temperature.expected);
    status = guardBandedStatus(d, t.uncertainty, tol.temperature.tolerance);
    message += `, expected ${tol.temperature.expected} ± ${tol.temperature.tolerance} K`;
  }
  return {
    id: 'temperature',
    status,
    measured: { temperature: t, band: band.band, lines: pts.length, points: plot.points },
    limit,
    message,
  };
}

function fitQualityCheck(peaks: readonly PeakInput[], analysis: Analysis, T: number, tol: Tolerances): Check {
  const r = analysis.result;
  const st = r.statistics;
  const uncertaintiesGiven = peaks.some((p) => p.uncertainty !== undefined);
  const rejectedFraction = st.assigned > 0 ? st.rejected / st.assigned : 0;
  const problems: string[] = [];
  let status: CheckStatus = 'pass';
  if (uncertaintiesGiven && st.reducedChiSquare !== null && st.reducedChiSquare > tol.maxReducedChiSquare) {
    status = 'fail';
    problems.push(`reduced χ² ${st.reducedChiSquare.toFixed(2)} exceeds ${tol.maxReducedChiSquare}`);
  }
  if (rejectedFraction > tol.maxRejectedFraction) {
    status = 'fail';
    problems.push(`${st.rejected} of ${st.assigned} lines rejected as outliers`);
  }
  // Completeness: the strong lines the reference predicts in the window, and which of them were found.
  const strong = strongLinesFound(peaks, analysis, T);
  const completeness = strong?.completeness ?? null;
  const missing = strong?.missing ?? [];
  if (strong && completeness !== null && completeness < tol.minCompleteness) {
    if (status === 'pass') status = 'warn';
    problems.push(`${missing.length} of ${strong.predicted} predicted strong lines are missing`);
  }
  return {
    id: 'fit-quality',
    status,
    measured: {
      reducedChiSquare: st.reducedChiSquare,
      rms: st.rms,
      rejected: st.rejected,
      rejectedFraction,
      completeness,
      missingStrongLines: missing,
    },
    limit: {
      maxReducedChiSquare: tol.maxReducedChiSquare,
      maxRejectedFraction: tol.maxRejectedFraction,
      minCompleteness: tol.minCompleteness,
    },
    message: problems.length
      ? problems.join('; ')
      : `rms ${st.rms.toExponential(2)} cm-1${st.reducedChiSquare !== null ? `, reduced χ² ${st.reducedChiSquare.toFixed(2)}` : ''}, ${st.rejected} outlier(s)${completeness !== null ? `, ${(completeness * 100).toFixed(0)} % of the strong lines found` : ''}`,
  };
}

/** A strong line the reference predicts in the window that no assigned line is. */
interface MissingLine {
  readonly species: string;
  readonly band: string;
  readonly branch: Branch;
  readonly j: number;
  readonly position: number;
}

/**
 * The strong lines (≥ 10 % of the strongest at T) the reference predicts within the span of the peaks, for the
 * isotopologues assigned against at their natural abundances, and those of them no line was assigned to; the
 * share found is null when none is predicted. Undefined unless the lines were assigned against the reference.
 */
function strongLinesFound(
  peaks: readonly PeakInput[],
  analysis: Analysis,
  T: number,
): { predicted: number; missing: MissingLine[]; completeness: number | null } | undefined {
  const species = analysis.assignment.species;
  if (analysis.assignment.method !== 'reference' || species.length === 0) return undefined;
  const positions = peaks.map((p) => p.position);
  const mixture = species.map((s) => ({ iso: parseSpecies(s), abundance: 1 }));
  const natural = naturalAbundances(species[0] as string);
  const weighted = mixture.map((m) => ({ iso: m.iso, abundance: natural.get(m.iso.formula) ?? 1 }));
  const strong = candidateLines(weighted, Math.min(...positions), Math.max(...positions), { temperature: T }).filter(
    (c) => c.intensity >= 0.1,
  );
  const found = new Set(
    analysis.result.lines
      .filter((l) => l.assignment)
      .map((l) => `${l.assignment?.species}|${l.assignment?.band}|${l.assignment?.branch}|${l.assignment?.j}`),
  );
  const missing: MissingLine[] = [];
  for (const c of strong) {
    const band = `${c.band.upper}-${c.band.lower}`;
    if (!found.has(`${c.species}|${band}|${c.branch}|${c.j}`))
      missing.push({ species: c.species, band, branch: c.branch, j: c.j, position: c.position });
  }
  return {
    predicted: strong.length,
    missing,
    completeness: strong.length > 0 ? 1 - missing.length / strong.length : null,
  };
}

import { identifySpecies } from '../../src/assign/identify.js';
import { uninformativeIntensities } from '../../src/assign/intensity.js';
import { ScienceError } from '../../src/errors.js';
import {
  assignLinearLines,
  identifyLinearSpecies,
  type LinearAssignedLine,
  type LinearAssignResult,
  linearChecks,
  mergeIdentifications,
} from '../../src/linear/assign.js';
import type { LinearLineInput } from '../../src/linear/fit.js';
import type { LinearAssignment } from '../../src/linear/transitions.js';
import { bandLabel, levelKey } from '../../src/linear/types.js';
import { type Tolerances, verdictOf } from '../../src/qa/checks.js';
import { toWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { CheckRequest, CheckResponse } from '../schemas/checks.js';
import type { FitRequest, FitResponse } from '../schemas/fit.js';
import { asLineRequest, assignmentFromWire, isLinearAssignment, runLinearFit } from './linear-fit.js';
import type { DeepReadonly } from './types.js';

/**
 * Automatic assignment for the linear fit use case: lines sent without an assignment are assigned against the
 * library's bands (src/linear/assign.ts) and the fit runs on the lines so assigned. Lines given with an assignment
 * keep it: with some given, the whole list is assigned (every line helps find the offset), then each given label
 * replaces the automatic one of its line, and an automatic label that repeats a given line's transition is
 * dropped (that line stays unassigned). A species without library constants leaves the unlabelled lines
 * unassigned when some labels are given (the fit uses those), and is a 404 when none are. Returns the lines with
 * assignments filled in and the indices assigned automatically.
 */
export function withAutomaticLinearAssignment(
  species: string,
  lines: readonly LinearLineInput[],
  intensities: readonly (number | undefined)[],
  options: { readonly temperature?: number; readonly maxOffset?: number },
): { lines: LinearLineInput[]; automatic: ReadonlySet<number>; result?: LinearAssignResult } {
  const given = lines.filter((l) => l.assignment !== undefined).length;
  if (given === lines.length) return { lines: [...lines], automatic: new Set() };
  let result: LinearAssignResult;
  try {
    result = assignLinearLines(
      species,
      lines.map((l, i) => ({
        position: l.position,
        ...(l.uncertainty !== undefined ? { uncertainty: l.uncertainty } : {}),
        ...(intensities[i] !== undefined ? { intensity: intensities[i] as number } : {}),
      })),
      {
        ...(options.temperature !== undefined ? { temperature: options.temperature } : {}),
        ...(options.maxOffset !== undefined ? { maxOffset: options.maxOffset } : {}),
      },
    );
  } catch (e) {
    if (given > 0 && e instanceof ScienceError && e.code === 'SPECIES_NOT_IN_LIBRARY') {
      return { lines: [...lines], automatic: new Set() };
    }
    throw e;
  }
  const merged = withGivenAssignments(result, lines);
  const automatic = new Set<number>();
  const out = lines.map((l, i) => {
    if (l.assignment) return { ...l };
    const a = merged.lines[i]?.assignment;
    if (!a) return { ...l };
    automatic.add(i);
    return { ...l, assignment: a };
  });
  return { lines: out, automatic, result: merged };
}

/** A transition's identity: both levels, branch, J″ and the lower component (e when not stated). */
function transitionKey(a: LinearAssignment): string {
  return `${levelKey(a.upper)}>${levelKey(a.lower)}|${a.branch}|${a.j}|${a.parity ?? 'e'}`;
}

/**
 * The automatic assignment with the caller's labels put back: a given line keeps its label, an automatic label
 * that repeats a given transition is dropped, and the unexplained share is recounted (by intensity when every line
 * has one, else by count, as src/linear/assign.ts counts it).
 */
export function withGivenAssignments(
  result: LinearAssignResult,
  sent: readonly { readonly position: number; readonly intensity?: number; readonly assignment?: LinearAssignment }[],
): LinearAssignResult {
  const givenKeys = new Set(sent.flatMap((l) => (l.assignment ? [transitionKey(l.assignment)] : [])));
  if (givenKeys.size === 0) return result;
  const lines: LinearAssignedLine[] = result.lines.map((l, i) => {
    const a = sent[i]?.assignment;
    if (a) {
      return {
        index: i,
        position: l.position,
        status: 'assigned',
        assignment: a,
        band: bandLabel(a.upper, a.lower),
      };
    }
    if (l.assignment && givenKeys.has(transitionKey(l.assignment))) {
      return { index: i, position: l.position, status: 'unassigned' };
    }
    return l;
  });
  const byIntensity =
    sent.every((l) => l.intensity !== undefined && l.intensity > 0) && !uninformativeIntensities(sent);
  const weight = (i: number) => (byIntensity ? (sent[i]?.intensity as number) : 1);
  const total = lines.reduce((t, l) => t + weight(l.index), 0);
  const left = lines.filter((l) => l.status === 'unassigned').reduce((t, l) => t + weight(l.index), 0);
  return { ...result, lines, unexplainedFraction: total > 0 ? left / total : 0 };
}

/**
 * POST /v1/checks (and GraphQL `check`) for a linear species: the list is assigned automatically (given assignments
 * are not used here), fitted by the linear fit use case, and judged by the identity, calibration and
 * unexplained-lines checks of src/linear/assign.ts. The identification ranking spans the diatomic and the linear
 * library. A fit that cannot be made leaves `fit: null` and the checks say why.
 */
export function runLinearCheck(sent: CheckRequest, applied: Tolerances): CheckResponse {
  const { req, spectrum } = asLineRequest(sent);
  const { tolerances: _tolerances, ...fitReq } = req;
  const unit = fitReq.unit ?? 'cm-1';
  const peaks = (fitReq.lines ?? []).map((l) => {
    const c = toWavenumber(l.position, unit, l.uncertainty);
    return {
      position: c.value,
      ...(c.uncertainty !== undefined ? { uncertainty: c.uncertainty } : {}),
      ...(l.intensity !== undefined ? { intensity: l.intensity } : {}),
    };
  });
  let fit: FitResponse | null = null;
  try {
    // Given assignments are kept (echoed as "given") and the other lines assigned (withAutomaticLinearAssignment).
    fit = runLinearFit(fitReq);
    if (spectrum) fit = { ...fit, spectrum };
  } catch (e) {
    if (!(e instanceof ScienceError) || !NO_FIT_CODES.has(e.code)) throw e;
  }
  const species = fit?.species[0]?.formula ?? (fitReq.species as string);
  // With several isotopologues the checks judge the first one's lines (the others are explained by their own).
  if (fit && fit.species.length > 1) return isotopologueCheck(fitReq, fit, species, peaks, applied);
  const automatic = assignLinearLines(species, peaks, {
    ...(fitReq.options?.temperature !== undefined ? { temperature: fitReq.options.temperature } : {}),
    ...(fitReq.options?.maxOffset !== undefined ? { maxOffset: fitReq.options.maxOffset } : {}),
  });
  // The checks judge the lines as labelled: the caller's labels where given, the automatic ones elsewhere.
  const result = withGivenAssignments(
    automatic,
    (fitReq.lines ?? []).map((l, i) => ({
      position: (peaks[i] as { position: number }).position,
      ...(l.intensity !== undefined ? { intensity: l.intensity } : {}),
      ...(isLinearAssignment(l.assignment) ? { assignment: assignmentFromWire(l.assignment) } : {}),
    })),
  );
  const ranking = mergeIdentifications(identifySpecies(peaks), identifyLinearSpecies(peaks));
  const checks = linearChecks(peaks, result, ranking, applied);
  const response: DeepReadonly<CheckResponse> = {
    verdict: verdictOf(checks),
    checks,
    tolerances: { ...applied },
    fit,
    notice: SAFETY_NOTICE,
  };
  return response as CheckResponse;
}

/**
 * Checks of a fit of several isotopologues: identity, calibration and unexplained-lines of the first species on
 * the lines the fit gave it (given labels as given), the other species' lines left to their own fits; indices in
 * `measured` are those of the request.
 */
function isotopologueCheck(
  fitReq: FitRequest,
  fit: FitResponse,
  species: string,
  peaks: readonly { position: number; uncertainty?: number; intensity?: number }[],
  applied: Tolerances,
): CheckResponse {
  const mine = fit.lines.filter((l) => l.assignment?.species === species).map((l) => l.index);
  const sub = mine.map((i) => peaks[i] as (typeof peaks)[number]);
  const automatic = assignLinearLines(species, sub, {
    ...(fitReq.options?.temperature !== undefined ? { temperature: fitReq.options.temperature } : {}),
    ...(fitReq.options?.maxOffset !== undefined ? { maxOffset: fitReq.options.maxOffset } : {}),
  });
  const sent = fitReq.lines ?? [];
  const result = withGivenAssignments(
    automatic,
    mine.map((i, k) => {
      const a = sent[i]?.assignment;
      return {
        position: (sub[k] as { position: number }).position,
        ...(sent[i]?.intensity !== undefined ? { intensity: sent[i]?.intensity as number } : {}),
        ...(isLinearAssignment(a) ? { assignment: assignmentFromWire(a) } : {}),
      };
    }),
  );
  const ranking = mergeIdentifications(identifySpecies(peaks), identifyLinearSpecies(peaks));
  const checks = linearChecks(sub, result, ranking, applied).map((c) => {
    const un = (c.measured as { unassigned?: number[] }).unassigned;
    return un ? { ...c, measured: { ...c.measured, unassigned: un.map((k) => mine[k] as number) } } : c;
  });
  const response: DeepReadonly<CheckResponse> = {
    verdict: verdictOf(checks),
    checks,
    tolerances: { ...applied },
    fit,
    notice: SAFETY_NOTICE,
  };
  return response as CheckResponse;
}

const NO_FIT_CODES = new Set(['FIT_NO_ASSIGNED_LINES', 'FIT_TOO_FEW_LINES', 'FIT_RANK_DEFICIENT']);

/**
 * The linear species an unassigned line list sent WITHOUT a species belongs to, when the diatomic library explained
 * none of it (called only after SPECIES_UNIDENTIFIED, so diatomic lists pay nothing): the best of the linear
 * library's ranking with a score ≥ 0.5 (the diatomic threshold), else undefined. A spectrum is ranked by its peaks
 * (found once: services/usecases/peaks.ts keeps them). Lists with assignments are left to the diatomic answer.
 */
export function identifiedLinearSpecies(sent: FitRequest): string | undefined {
  const peaks = undeclaredPeaks(sent);
  if (!peaks) return undefined;
  const best = identifyLinearSpecies(peaks, maxOffsetOf(sent))[0];
  return best && best.score >= 0.5 ? best.species : undefined;
}

/**
 * The linear species an unassigned list sent WITHOUT a species goes to before any diatomic is tried: the best of the
 * linear ranking when it scores ≥ 0.5 and explains the list far better than the best diatomic, that is, it scores at
 * least as high and matches at least LINEAR_MATCH_RATIO times as many lines (or the diatomic scores < 0.5). A dense
 * polyatomic band otherwise lets a diatomic with a handful of lines in the window score ≥ 0.5 by coincidence (an
 * N2O ν3 list was taken for HI: 2 of 4 HI lines matched against 60 of 60 N2O lines) and be refused as that diatomic.
 * The diatomic ranking is computed only when the linear one has a candidate, so diatomic lists pay one linear ranking.
 */
export function linearSpeciesFirst(sent: FitRequest): string | undefined {
  const peaks = undeclaredPeaks(sent);
  if (!peaks) return undefined;
  const options = maxOffsetOf(sent);
  const linear = identifyLinearSpecies(peaks, options)[0];
  if (!linear || linear.score < 0.5) return undefined;
  const diatomic = identifySpecies(peaks, options)[0];
  if (!diatomic || diatomic.score < 0.5) return linear.species;
  const farBetter = linear.score >= diatomic.score && linear.matched >= LINEAR_MATCH_RATIO * diatomic.matched;
  return farBetter ? linear.species : undefined;
}

/** How many times as many lines the linear candidate must match as the best diatomic to be preferred to it. */
const LINEAR_MATCH_RATIO = 3;

/** The request's offset window, for the rankings. */
function maxOffsetOf(sent: FitRequest): { maxOffset?: number } {
  return sent.options?.maxOffset !== undefined ? { maxOffset: sent.options.maxOffset } : {};
}

/** The peaks (cm⁻¹) of an unassigned list sent without a species; undefined for any other request. */
function undeclaredPeaks(sent: FitRequest): { position: number; intensity?: number }[] | undefined {
  if (sent.species !== undefined) return undefined;
  const { req } = asLineRequest(sent);
  if (!req.lines || req.lines.length === 0) return undefined;
  if (req.lines.some((l) => l.assignment !== undefined)) return undefined;
  const unit = req.unit ?? 'cm-1';
  return req.lines.map((l) => ({
    position: toWavenumber(l.position, unit, l.uncertainty).value,
    ...(l.intensity !== undefined ? { intensity: l.intensity } : {}),
  }));
}

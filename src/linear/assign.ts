import { identificationWindow } from '../assign/identify.js';
import { withoutUninformativeIntensities } from '../assign/intensity.js';
import { type Match, matchLines, type ObservedPeak } from '../assign/match.js';
import { estimateOffset, type OffsetEstimate } from '../assign/offset.js';
import { type Quantity, quantity } from '../derive/quantity.js';
import { ScienceError } from '../errors.js';
import { solveLeastSquares } from '../linalg/least-squares.js';
import { guardBandedStatus } from '../qa/calibration.js';
import { type Check, type CheckStatus, DEFAULT_TOLERANCES, type Tolerances } from '../qa/checks.js';
import { extentOf, spanOf } from '../stats/extent.js';
import { fitLinearLines, type LinearFitResult } from './fit.js';
import { relativeIntensity } from './intensity.js';
import { type LevelConstantsEntry, type PredictedLinearLine, predictLinearBands } from './predict.js';
import {
  LINEAR_REFERENCE,
  linearReference,
  type ReferenceBand,
  type ReferenceLevel,
  type ReferenceSpecies,
  referenceBands,
  referenceConstants,
} from './reference.js';
import { type LinearSpecies, parseLinearSpecies } from './species.js';
import { exchangeStatistics, levelSpinWeight } from './spin-statistics.js';
import { termValue } from './terms.js';
import type { LinearAssignment } from './transitions.js';
import { bandLabel, type LinearLevel, type LinearLevelConstants, levelKey } from './types.js';

/**
 * Automatic assignment of an unassigned line list of a declared (or identified) linear polyatomic species.
 *
 * What a practitioner does, in stages (SCIENCE.md §6):
 *  1. predict every line of the library's infrared bands of the species that falls in the list's range, with the
 *     selection rules and the nuclear-spin statistics (levels that do not exist give no line: a 12C16O2 ν3 list has
 *     only even J″, lines 4B apart; numbering it as a diatomic would double B) and relative intensities (Hönl–London
 *     × spin weight × Boltzmann at the stated temperature);
 *  2. estimate the instrument's wavenumber offset by voting (src/assign/offset.ts) within ±1.2 cm⁻¹ (or maxOffset);
 *     beyond half a line spacing a whole-line shift (a numbering slip) can win the vote, which stage 5 catches;
 *  3. match predictions to peaks one-to-one within a tolerance (src/assign/match.ts);
 *  4. fit the matched lines with the linear level fit, re-predict from the fitted constants and match again with
 *     a tolerance from the fit's scatter, three rounds, so that high-J lines the reference constants miss are found;
 *  5. verify the numbering: the lower level's fitted B must agree with the library's within 5 combined σ (at
 *     least 3e-4 relative) and the fit must scatter by less than a twentieth of the line spacing: a numbering that
 *     ignores missing levels gives 2B, one off by one line a B off by parts in 10³; when it fails, the
 *     neighbouring numberings (offset ± whole line spacings, within the range searched, default ±1.2 cm⁻¹) are
 *     tried and the one that passes with most lines kept; when none passes, every line is left unassigned (a
 *     numbering one spacing off is worse than none) with a warning naming maxOffset.
 * Lines no band explains stay unassigned and are reported, never forced into the fit.
 */

export interface LinearPeak {
  readonly position: number;
  readonly uncertainty?: number;
  readonly intensity?: number;
}

export interface LinearAssignOptions {
  /** Temperature for predicted intensities, K. Default 296 (room temperature, common practice for a gas cell). */
  readonly temperature?: number;
  /** Highest J″ predicted. Default 120 (room-temperature CO2 reaches J″ ≈ 100 at 1e-3 of the strongest line). */
  readonly jMax?: number;
  /** Largest offset searched, cm⁻¹. Default DEFAULT_MAX_OFFSET (1.2). */
  readonly maxOffset?: number;
  /** Predicted lines weaker than this share of the strongest are not sought. Default 1e-3. */
  readonly minRelativeIntensity?: number;
  /** Bands to look for; default every infrared band of the library for this species (reference.ts). */
  readonly bands?: readonly { readonly upper: LinearLevel; readonly lower: LinearLevel }[];
}

export interface LinearAssignedLine {
  readonly index: number;
  readonly position: number;
  readonly status: 'assigned' | 'unassigned';
  readonly assignment?: LinearAssignment;
  readonly band?: string;
  /** Position predicted by the last model (reference or fitted), offset included. */
  readonly predicted?: number;
  readonly residual?: number;
}

export interface LinearBandSummary {
  readonly label: string;
  readonly upper: LinearLevel;
  readonly lower: LinearLevel;
  readonly kind: 'parallel' | 'perpendicular';
  readonly predicted: number;
  readonly assigned: number;
  readonly jRange?: readonly [number, number];
}

export interface NumberingCheck {
  readonly level: string;
  readonly fittedB: Quantity;
  readonly referenceB: number;
  /** fitted / reference. */
  readonly ratio: number;
  readonly ok: boolean;
}

export interface LinearAssignResult {
  readonly species: string;
  readonly offset: Quantity;
  readonly lines: readonly LinearAssignedLine[];
  readonly bands: readonly LinearBandSummary[];
  readonly fit?: LinearFitResult;
  readonly numbering: readonly NumberingCheck[];
  /** Share of the list (by intensity when every line has one, else by count) left unassigned. */
  readonly unexplainedFraction: number;
  readonly warnings: readonly string[];
}

interface Candidate {
  readonly key: string;
  readonly line: PredictedLinearLine;
  readonly band: ReferenceBand | { upper: LinearLevel; lower: LinearLevel };
  position: number;
  readonly intensity: number;
  /** Standard uncertainty of the predicted position, cm⁻¹ (from the library's stated uncertainties). */
  sigma: number;
}

function referenceFor(species: LinearSpecies): ReferenceSpecies {
  const ref = linearReference(species.formula);
  if (!ref) {
    throw new ScienceError(
      'SPECIES_NOT_IN_LIBRARY',
      `${species.formula} has no reference constants in the linear library (${LINEAR_REFERENCE.map((s) => s.formula).join(', ')})`,
      { species: species.formula },
    );
  }
  return ref;
}

function levelEntries(ref: ReferenceSpecies): LevelConstantsEntry[] {
  return ref.levels.map((l) => ({
    level: { v: l.v, l: l.l, ...(l.r !== undefined ? { r: l.r } : {}) },
    constants: referenceConstants(l),
  }));
}

/** 1σ of a predicted position from the stated uncertainties of G, B, D of both levels (recalled: 1e-4 × value). */
function predictionSigma(up: ReferenceLevel, lo: ReferenceLevel, Jp: number, Jpp: number): number {
  const u = (v: { value: number; uncertainty?: number; status: string } | undefined, k: number) =>
    v ? (v.uncertainty ?? (v.status === 'recalled' ? 1e-4 * Math.abs(v.value) : 1e-6 * Math.abs(v.value))) * k : 0;
  const xp = Jp * (Jp + 1);
  const xpp = Jpp * (Jpp + 1);
  return Math.hypot(u(up.G, 1), u(lo.G, 1), u(up.B, xp), u(lo.B, xpp), u(up.D, xp * xp), u(lo.D, xpp * xpp));
}

/** Line spacing of a band near its origin, cm⁻¹: 2B″ × (2 when every other lower level is missing). */
function lineSpacing(ref: ReferenceSpecies, lower: ReferenceLevel): number {
  const stats = exchangeStatistics(ref.chain);
  const step =
    levelSpinWeight(stats, lower, lower.l + 1, 'e') === 0 || levelSpinWeight(stats, lower, lower.l, 'e') === 0 ? 2 : 1;
  return 2 * lower.B.value * (lower.l === 0 ? step : 1);
}

/** Predicted lines of the bands in [lo, hi] with intensities, keys and prediction uncertainties. */
function predictCandidates(
  species: LinearSpecies,
  ref: ReferenceSpecies,
  entries: readonly LevelConstantsEntry[],
  bands: readonly { upper: LinearLevel; lower: LinearLevel }[],
  lo: number,
  hi: number,
  o: Required<Pick<LinearAssignOptions, 'temperature' | 'jMax' | 'minRelativeIntensity'>>,
): Candidate[] {
  const stats = exchangeStatistics(ref.chain);
  const byKey = new Map(ref.levels.map((l) => [levelKey(l), l]));
  const lines = predictLinearBands(species, entries, bands, o.jMax).filter((l) => l.position >= lo && l.position <= hi);
  const raw = lines.map((line) => {
    const w = levelSpinWeight(stats, line.lower, line.j, line.lowerParity);
    const intensity = relativeIntensity(
      {
        position: line.position,
        branch: line.branch,
        j: line.j,
        lowerL: line.lower.l,
        upperL: line.upper.l,
        lowerEnergy: line.lowerEnergy,
        spinWeight: w,
      },
      o.temperature,
    );
    const up = byKey.get(levelKey(line.upper));
    const lw = byKey.get(levelKey(line.lower));
    const sigma = up && lw ? predictionSigma(up, lw, line.upperJ, line.j) : 0.01;
    return { line, intensity, sigma };
  });
  const top = Math.max(0, ...raw.map((r) => r.intensity));
  return raw
    .filter((r) => r.intensity > 0 && r.intensity >= o.minRelativeIntensity * top)
    .map((r) => ({
      key: `${levelKey(r.line.upper)}>${levelKey(r.line.lower)}|${r.line.branch}|${r.line.j}|${r.line.lowerParity}`,
      line: r.line,
      band: { upper: r.line.upper, lower: r.line.lower },
      position: r.line.position,
      intensity: r.intensity / top,
      sigma: r.sigma,
    }));
}

const DEFAULTS = { temperature: 296, jMax: 120, minRelativeIntensity: 1e-3 } as const;

/**
 * Largest instrument offset searched by default, cm⁻¹: labs see tenths of a cm⁻¹ up to about 1 cm⁻¹ on uncalibrated
 * benches (common practice). Beyond half a line spacing the vote can pick a shifted numbering; the numbering check
 * decides between the candidates a whole spacing apart.
 */
export const DEFAULT_MAX_OFFSET = 1.2;

function checkPeaks(peaks: readonly LinearPeak[]): void {
  if (peaks.length === 0) throw new ScienceError('INPUT_INVALID', 'the line list is empty', {});
  peaks.forEach((p, i) => {
    if (!(Number.isFinite(p.position) && p.position > 0)) {
      throw new ScienceError('INPUT_INVALID', `line ${i}: position ${p.position} must be positive and finite`, {
        line: i,
      });
    }
    if (p.uncertainty !== undefined && !(Number.isFinite(p.uncertainty) && p.uncertainty > 0)) {
      throw new ScienceError('INPUT_INVALID', `line ${i}: uncertainty ${p.uncertainty} must be positive`, { line: i });
    }
  });
}

/** Constants of the fitted levels (G put back on the library's scale through the set's reference level). */
function fittedEntries(ref: ReferenceSpecies, fit: LinearFitResult): Map<string, LinearLevelConstants> {
  const out = new Map<string, LinearLevelConstants>();
  const libG = new Map(ref.levels.map((l) => [levelKey(l), l.G.value]));
  const base = fit.levels.find((l) => !l.term);
  const baseG = base ? (libG.get(base.key) ?? 0) : 0;
  for (const l of fit.levels) {
    if (l.parity) continue; // one parity component only: its B is an effective one; keep the library's level
    out.set(l.key, {
      G: l.term ? baseG + l.term.value : baseG,
      B: l.B.value,
      D: l.D?.value ?? 0,
      ...(l.H ? { H: l.H.value } : {}),
      ...(l.q ? { q: l.q.value } : {}),
      ...(l.qJ ? { qJ: l.qJ.value } : {}),
    });
  }
  return out;
}

/** The linear level fit of the matched lines (every other line unassigned), or the ScienceError it raised. */
function fitMatched(
  species: LinearSpecies,
  peaks: readonly LinearPeak[],
  cands: readonly Candidate[],
  matches: readonly Match[],
): LinearFitResult | ScienceError {
  const byCand = new Map(cands.map((c) => [c.key, c]));
  const assigned = new Map<number, Candidate>();
  for (const m of matches) assigned.set(m.peak.index, byCand.get(m.prediction.key) as Candidate);
  try {
    return fitLinearLines(
      species,
      peaks.map((p, i) => {
        const c = assigned.get(i);
        return {
          position: p.position,
          ...(p.uncertainty !== undefined ? { uncertainty: p.uncertainty } : {}),
          ...(c
            ? {
                assignment: {
                  upper: c.line.upper,
                  lower: c.line.lower,
                  branch: c.line.branch,
                  j: c.line.j,
                  parity: c.line.lowerParity,
                },
              }
            : {}),
        };
      }),
    );
  } catch (e) {
    if (e instanceof ScienceError) return e;
    throw e;
  }
}

/**
 * Assigns an unassigned line list of a linear polyatomic species (stages in the module comment). Throws
 * SPECIES_NOT_IN_LIBRARY for a species without reference constants and INPUT_INVALID for a bad list.
 */
export function assignLinearLines(
  speciesInput: string,
  sent: readonly LinearPeak[],
  options: LinearAssignOptions = {},
): LinearAssignResult {
  checkPeaks(sent);
  const { ctx, cands, why } = assignmentSetting(speciesInput, sent, options);
  const warnings: string[] = why
    ? [`intensities ignored: ${why}, so they carry no information about which line is which (a placeholder?)`]
    : [];
  if (cands.length === 0)
    warnings.push(
      `no band of ${ctx.species.formula} in the library falls in ${ctx.lo.toFixed(1)}–${ctx.hi.toFixed(1)} cm-1`,
    );
  const maxOffset = options.maxOffset ?? DEFAULT_MAX_OFFSET;
  const vote = voteLinearOffset(ctx, cands, maxOffset);
  const first = attemptAssignment(ctx, vote.offset, vote.offsetSigma);
  if (first.numbering.every((n) => n.ok) || cands.length === 0)
    return withWarnings(first, [...warnings, ...uncheckedNumbering(first, maxOffset, ctx.spacing)]);
  return neighbourOrNone(ctx, first, vote, maxOffset, warnings);
}

/**
 * What every attempt shares: the species and its reference, the peaks (placeholder intensities dropped, the diatomic
 * path's rule, src/assign/intensity.ts) and their range widened by 1 cm⁻¹, the bands and the predictions in it, and
 * the line spacing of the densest band present; with why the intensities were dropped.
 */
function assignmentSetting(
  speciesInput: string,
  sent: readonly LinearPeak[],
  options: LinearAssignOptions,
): { ctx: Attempt; cands: Candidate[]; why: string | undefined } {
  const { peaks, why } = withoutUninformativeIntensities(sent);
  const species = parseLinearSpecies(speciesInput);
  const ref = referenceFor(species);
  const o = {
    temperature: options.temperature ?? DEFAULTS.temperature,
    jMax: options.jMax ?? DEFAULTS.jMax,
    minRelativeIntensity: options.minRelativeIntensity ?? DEFAULTS.minRelativeIntensity,
  };
  const positions = peaks.map((p) => p.position);
  const extent = extentOf(positions);
  const lo = extent.lo - 1;
  const hi = extent.hi + 1;
  const bands = options.bands ?? referenceBands(ref).map((b) => ({ upper: b.upper, lower: b.lower }));
  const libEntries = levelEntries(ref);
  const cands = predictCandidates(species, ref, libEntries, bands, lo, hi, o);
  const observed: ObservedPeak[] = peaks.map((p, index) => ({
    index,
    position: p.position,
    ...(p.intensity !== undefined ? { intensity: p.intensity } : {}),
    ...(p.uncertainty !== undefined ? { sigma: p.uncertainty } : {}),
  }));
  const present = new Set(cands.map((c) => `${levelKey(c.line.upper)}>${levelKey(c.line.lower)}`));
  const usedBands = bands.filter((b) => present.has(`${levelKey(b.upper)}>${levelKey(b.lower)}`));
  const spacing = densestSpacing(ref, usedBands);
  return { ctx: { species, ref, peaks, observed, libEntries, bands, usedBands, lo, hi, o, spacing }, cands, why };
}

/** The line spacing of the densest of the bands (at most 10 cm⁻¹; 1 for a band whose lower level is not listed). */
function densestSpacing(
  ref: ReferenceSpecies,
  usedBands: readonly { upper: LinearLevel; lower: LinearLevel }[],
): number {
  const byKey = new Map(ref.levels.map((l) => [levelKey(l), l]));
  return Math.min(
    ...usedBands.map((b) => {
      const lower = byKey.get(levelKey(b.lower));
      return lower ? lineSpacing(ref, lower) : 1;
    }),
    10,
  );
}

/** The offset voted by the 80 strongest predictions, and the σ the first matching allows it. */
interface OffsetVote {
  /** The voted offset (0 when nothing voted). */
  readonly offset: number;
  /** Its spread, at most maxOffset and an eighth of the line spacing. */
  readonly offsetSigma: number;
  readonly est: OffsetEstimate | undefined;
}

/** Offset by voting, searched within less than half the line spacing of the densest band. */
function voteLinearOffset(ctx: Attempt, cands: readonly Candidate[], maxOffset: number): OffsetVote {
  const { spacing } = ctx;
  const positions = ctx.peaks.map((p) => p.position);
  const strong = [...cands].sort((a, b) => b.intensity - a.intensity).slice(0, 80);
  const est = cands.length > 0 ? estimateOffset(strong, positions, maxOffset, Math.min(0.06, spacing / 8)) : undefined;
  const offsetSigma = Math.min(est?.spread ?? maxOffset, spacing / 8);
  return { offset: est?.offset ?? 0, offsetSigma, est };
}

/**
 * The first numbering failed its check: the neighbouring numbering that passes (warned when it moved, or when the
 * vote was ambiguous), else every line unassigned with a warning naming maxOffset.
 */
function neighbourOrNone(
  ctx: Attempt,
  first: LinearAssignResult,
  vote: OffsetVote,
  maxOffset: number,
  before: readonly string[],
): LinearAssignResult {
  const warnings = [...before];
  const best = bestNeighbourNumbering(ctx, first, vote.offset, vote.offsetSigma, maxOffset);
  if (!passes(best)) {
    // No numbering passes: an assignment that may be a whole line spacing off is worse than none.
    warnings.push(
      `no numbering within ±${maxOffset} cm-1 passes the check of the lower level's B against the library: lines left unassigned (a larger offset needs options.maxOffset)`,
    );
    return withWarnings(unassignedResult(first), warnings);
  }
  if (best !== first)
    warnings.push(`numbering moved by the band's line spacing (offset ${best.offset.value.toFixed(4)} cm-1)`);
  const { est } = vote;
  if (est && est.runnerUpVotes > 0.8 * est.votes && best === first) {
    warnings.push(
      `offset ambiguous: a second offset ${'≥'} 2 windows away gathered ${((100 * est.runnerUpVotes) / est.votes).toFixed(0)} % of the votes`,
    );
  }
  return withWarnings(best, warnings);
}

/** A numbering passes when it has levels checked and every one agrees with the library. */
const passes = (r: LinearAssignResult) => r.numbering.length > 0 && r.numbering.every((n) => n.ok);
const assignedCount = (r: LinearAssignResult) => r.lines.filter((l) => l.status === 'assigned').length;

/**
 * The numbering check failed: searched over more than half a line spacing, the vote can land a whole spacing (or
 * several) off, where a shifted numbering explains the lines almost as well. Tries the neighbouring numberings
 * within the range searched and keeps one that passes, with most lines (the first when none does better).
 */
function bestNeighbourNumbering(
  ctx: Attempt,
  first: LinearAssignResult,
  voted: number,
  offsetSigma: number,
  maxOffset: number,
): LinearAssignResult {
  let best = first;
  const { spacing } = ctx;
  for (let k = 1; k * spacing <= 2 * maxOffset + spacing; k++) {
    for (const sign of [1, -1]) {
      const off = voted + sign * k * spacing;
      if (Math.abs(off) > maxOffset + 0.5 * spacing) continue;
      const alt = attemptAssignment(ctx, off, offsetSigma);
      if ((passes(alt) && !passes(best)) || (passes(alt) === passes(best) && assignedCount(alt) > assignedCount(best)))
        best = alt;
    }
  }
  return best;
}

/**
 * A warning when lines were numbered but no level could be fitted to check the numbering against the library's B″
 * (fewer than four lines, or a fit that failed) while the offset was searched over more than half a line spacing:
 * the vote may then have landed whole spacings off (three OCS lines came back two lines off without a word).
 */
function uncheckedNumbering(r: LinearAssignResult, maxOffset: number, spacing: number): string[] {
  const n = r.lines.filter((l) => l.status === 'assigned').length;
  if (n === 0 || r.numbering.length > 0 || maxOffset <= 0.5 * spacing) return [];
  return [
    `numbering not checked: ${n} line(s) assigned but no level fitted to compare its B with the library (a fit needs at least four lines, and it may fail); searched within ±${maxOffset} cm-1, more than half the line spacing (${spacing.toPrecision(3)} cm-1), the numbering may be whole lines off: send more lines or a smaller options.maxOffset`,
  ];
}

/** The result with every line unassigned (the bands' predictions kept, nothing matched). */
function unassignedResult(r: LinearAssignResult): LinearAssignResult {
  const { fit: _fit, ...rest } = r;
  return {
    ...rest,
    lines: r.lines.map((l) => ({ index: l.index, position: l.position, status: 'unassigned' as const })),
    bands: r.bands.map(({ jRange: _j, ...b }) => ({ ...b, assigned: 0 })),
    unexplainedFraction: 1,
  };
}

function withWarnings(r: LinearAssignResult, extra: readonly string[]): LinearAssignResult {
  return { ...r, warnings: [...extra, ...r.warnings] };
}

interface Attempt {
  readonly species: LinearSpecies;
  readonly ref: ReferenceSpecies;
  readonly peaks: readonly LinearPeak[];
  readonly observed: readonly ObservedPeak[];
  readonly libEntries: readonly LevelConstantsEntry[];
  readonly bands: readonly { upper: LinearLevel; lower: LinearLevel }[];
  readonly usedBands: readonly { upper: LinearLevel; lower: LinearLevel }[];
  readonly lo: number;
  readonly hi: number;
  readonly o: Required<Pick<LinearAssignOptions, 'temperature' | 'jMax' | 'minRelativeIntensity'>>;
  readonly spacing: number;
}

/** Match, refine with the fit, and report, starting from one offset. */
function attemptAssignment(ctx: Attempt, offset: number, offsetSigma: number): LinearAssignResult {
  const { species, ref, peaks, observed, libEntries, bands, usedBands, lo, hi, o, spacing } = ctx;
  const warnings: string[] = [];
  let cands = predictCandidates(species, ref, libEntries, bands, lo, hi, o);
  const tolFor = (c: Candidate) => Math.min(Math.max(4 * offsetSigma, 3 * c.sigma, 0.005), spacing / 3);
  let shifted = (c: Candidate) => c.position + offset;
  let matches = matchLines(
    cands.map((c) => ({ key: c.key, position: shifted(c), tolerance: tolFor(c) })),
    observed,
  ).matches;
  let fit: LinearFitResult | undefined;
  let fittedKeys = '';
  const keysOf = (ms: typeof matches) =>
    ms
      .map((m) => `${m.peak.index}:${m.prediction.key}`)
      .sort()
      .join(',');
  const cappedSigma = observed.map((p) =>
    p.sigma !== undefined ? { ...p, sigma: Math.min(p.sigma, spacing / 12) } : p,
  );
  for (let round = 0; round < 4 && matches.length >= 4; round++) {
    const attempt = fitMatched(species, peaks, cands, matches);
    if (attempt instanceof ScienceError) {
      warnings.push(`fit of the matched lines failed (${attempt.code}): reference predictions kept`);
      break;
    }
    fit = attempt;
    fittedKeys = keysOf(matches);
    ({ cands, shifted, matches } = matchAgainstFit(ctx, fit, offset, offsetSigma, cappedSigma));
    if (keysOf(matches) === fittedKeys) break;
  }
  // The last round may have moved lines: the reported fit is that of the final assignment.
  if (fit && matches.length >= 4 && keysOf(matches) !== fittedKeys) {
    const attempt = fitMatched(species, peaks, cands, matches);
    if (!(attempt instanceof ScienceError)) fit = attempt;
  }
  return finish(
    species,
    ref,
    peaks,
    cands,
    matches,
    fit,
    usedBands,
    { offset, offsetSigma, maxRms: spacing / 20 },
    shifted,
    warnings,
  );
}

/**
 * One round of refinement: the candidates predicted again from the levels the fit determined (the library's for the
 * others), lines of fitted levels taken without the offset and within 4 × rms (growing beyond the J″ fitted), the
 * others as before, and the matching made again.
 */
function matchAgainstFit(
  ctx: Attempt,
  fit: LinearFitResult,
  offset: number,
  offsetSigma: number,
  cappedSigma: readonly ObservedPeak[],
): { cands: Candidate[]; shifted: (c: Candidate) => number; matches: ReturnType<typeof matchLines>['matches'] } {
  const { species, ref, libEntries, bands, lo, hi, o, spacing } = ctx;
  const fitted = fittedEntries(ref, fit);
  const entries = libEntries.map((e) => ({
    level: e.level,
    constants: fitted.get(levelKey(e.level)) ?? e.constants,
  }));
  const cands = predictCandidates(species, ref, entries, bands, lo, hi, o);
  const rms = Math.max(fit.statistics.rms, 1e-5);
  const jTop = new Map<string, number>();
  for (const b of fit.bands) jTop.set(`${levelKey(b.upper)}>${levelKey(b.lower)}`, b.jRange[1]);
  const bothFitted = (c: Candidate) => fitted.has(levelKey(c.line.upper)) && fitted.has(levelKey(c.line.lower));
  const shifted = (c: Candidate) => c.position + (bothFitted(c) ? 0 : offset);
  const tolFor = (c: Candidate) => {
    if (!bothFitted(c)) return Math.min(Math.max(4 * offsetSigma, 3 * c.sigma, 0.005), spacing / 3);
    const top = jTop.get(`${levelKey(c.line.upper)}>${levelKey(c.line.lower)}`) ?? 0;
    const beyond = Math.max(0, c.line.j - top);
    return Math.min(4 * rms * (1 + (beyond / 5) ** 2), spacing / 3);
  };
  // A line that carries its own σ (a peak finder's, a caller's) is also matched within 4 of them: the fit's rms
  // can be far below what the lines state (a profile fit's σ), and a line within its own σ is no stranger. Each σ
  // is capped at a twelfth of the line spacing so that 4σ stays within the spacing/3 of the other tolerances.
  const matches = matchLines(
    cands.map((c) => ({
      key: c.key,
      position: shifted(c),
      tolerance: tolFor(c),
      tier: bothFitted(c) ? 0 : 1,
      ...(bothFitted(c) ? { withSigma: { model: tolFor(c), perSigma: 4 } } : {}),
    })),
    cappedSigma,
  ).matches;
  return { cands, shifted, matches };
}

/** The result, in stages: lines as matched → band summaries → numbering checks against the library → share unexplained. */
function finish(
  species: LinearSpecies,
  ref: ReferenceSpecies,
  peaks: readonly LinearPeak[],
  cands: readonly Candidate[],
  matches: ReturnType<typeof matchLines>['matches'],
  fit: LinearFitResult | undefined,
  bands: readonly { upper: LinearLevel; lower: LinearLevel }[],
  off: { offset: number; offsetSigma: number; maxRms: number },
  shifted: (c: Candidate) => number,
  warnings: string[],
): LinearAssignResult {
  const lines = assignedLines(peaks, cands, matches, shifted);
  const numbering = fit ? numberingChecks(fit, ref, bands, off.maxRms) : [];
  if (fit) warnings.push(...numberingWarnings(fit, numbering, off.maxRms));
  return {
    species: species.formula,
    offset: quantity(off.offset, off.offsetSigma, 'cm-1'),
    lines,
    bands: bandSummaries(bands, lines, cands),
    ...(fit ? { fit } : {}),
    numbering,
    unexplainedFraction: unexplainedFraction(peaks, lines),
    warnings,
  };
}

/** Every peak in order: unassigned, or assigned with the matched candidate's transition, prediction and residual. */
function assignedLines(
  peaks: readonly LinearPeak[],
  cands: readonly Candidate[],
  matches: ReturnType<typeof matchLines>['matches'],
  shifted: (c: Candidate) => number,
): LinearAssignedLine[] {
  const byCand = new Map(cands.map((c) => [c.key, c]));
  const byPeak = new Map<number, { c: Candidate; residual: number }>();
  for (const m of matches)
    byPeak.set(m.peak.index, { c: byCand.get(m.prediction.key) as Candidate, residual: m.residual });
  return peaks.map((p, index) => {
    const hit = byPeak.get(index);
    if (!hit) return { index, position: p.position, status: 'unassigned' };
    const c = hit.c;
    return {
      index,
      position: p.position,
      status: 'assigned',
      assignment: {
        upper: c.line.upper,
        lower: c.line.lower,
        branch: c.line.branch,
        j: c.line.j,
        parity: c.line.lowerParity,
      },
      band: c.line.band,
      predicted: shifted(c),
      residual: p.position - shifted(c),
    };
  });
}

/** Per band: its kind, the lines predicted and assigned, and the J range assigned. */
function bandSummaries(
  bands: readonly { upper: LinearLevel; lower: LinearLevel }[],
  lines: readonly LinearAssignedLine[],
  cands: readonly Candidate[],
): LinearBandSummary[] {
  return bands.map((b) => {
    const key = `${levelKey(b.upper)}>${levelKey(b.lower)}`;
    const mine = lines.filter(
      (l) => l.assignment && `${levelKey(l.assignment.upper)}>${levelKey(l.assignment.lower)}` === key,
    );
    const js = mine.map((l) => l.assignment?.j as number);
    return {
      label: bandLabel(b.upper, b.lower),
      upper: b.upper,
      lower: b.lower,
      kind: b.upper.l === b.lower.l ? 'parallel' : 'perpendicular',
      predicted: cands.filter((c) => `${levelKey(c.line.upper)}>${levelKey(c.line.lower)}` === key).length,
      assigned: mine.length,
      ...(js.length > 0 ? { jRange: [extentOf(js).lo, extentOf(js).hi] as const } : {}),
    };
  });
}

/** The fitted B of each lower level the library knows against the library's, judged with the fit's scatter. */
function numberingChecks(
  fit: LinearFitResult,
  ref: ReferenceSpecies,
  bands: readonly { upper: LinearLevel; lower: LinearLevel }[],
  maxRms: number,
): NumberingCheck[] {
  const numbering: NumberingCheck[] = [];
  const lowerKeys = new Set(bands.map((b) => levelKey(b.lower)));
  for (const l of fit.levels) {
    if (!lowerKeys.has(l.key) || l.parity) continue;
    const r = ref.levels.find((x) => levelKey(x) === l.key);
    if (!r) continue;
    const ratio = l.B.value / r.B.value;
    // A numbering one line off moves B″ by a few parts in 10³ (OCS ν1: 3e-3; CO2 ν3: 1.6e-2) and by 2× when the
    // missing levels are ignored; the fit and a read library value agree to parts in 10⁵. Allowed: 5 combined σ
    // (a recalled value counts as 1e-4 relative), at least 3e-4.
    const refSigma = r.B.uncertainty ?? (r.B.status === 'recalled' ? 1e-4 : 1e-6) * r.B.value;
    const allowed = Math.max((5 * Math.hypot(l.B.uncertainty, refSigma)) / r.B.value, 3e-4);
    // A numbering whose fit scatters by more than a twentieth of the line spacing is no numbering at all (a
    // wrong one leaves residuals of a tenth of the spacing and more, with a B″ too vague to be rejected; a
    // right one fits to the noise): our rule, measured on CO2 ν3 shifted by 2.5 and 3 cm⁻¹ (rms 0.18, 0.24 cm⁻¹
    // against 9e-4 for the right numbering, spacing 1.56).
    numbering.push({
      level: l.label,
      fittedB: l.B,
      referenceB: r.B.value,
      ratio,
      ok: Math.abs(ratio - 1) <= allowed && fit.statistics.rms <= maxRms,
    });
  }
  return numbering;
}

function numberingWarnings(fit: LinearFitResult, numbering: readonly NumberingCheck[], maxRms: number): string[] {
  const warnings: string[] = [];
  if (fit.statistics.rms > maxRms) {
    warnings.push(
      `the fit of this numbering scatters by ${fit.statistics.rms.toPrecision(2)} cm-1, more than a twentieth of the line spacing`,
    );
  }
  for (const n of numbering) {
    if (!n.ok) warnings.push(`numbering suspect: fitted B of ${n.level} is ${n.ratio.toFixed(4)} × the library's`);
  }
  return warnings;
}

/** The share of the peaks left unassigned, by intensity when every peak has one, else by count. */
function unexplainedFraction(peaks: readonly LinearPeak[], lines: readonly LinearAssignedLine[]): number {
  const withIntensity = peaks.every((p) => p.intensity !== undefined && p.intensity > 0);
  const weight = (p: LinearPeak) => (withIntensity ? (p.intensity as number) : 1);
  const total = peaks.reduce((s, p) => s + weight(p), 0);
  const unexplained = lines
    .filter((l) => l.status === 'unassigned')
    .reduce((s, l) => s + weight(peaks[l.index] as LinearPeak), 0);
  return total > 0 ? unexplained / total : 0;
}

/** One species of the identification ranking (the same shape as src/assign/identify.ts gives diatomics). */
export interface LinearIdentification {
  readonly species: string;
  readonly name: string;
  readonly score: number;
  readonly matched: number;
  readonly predicted: number;
  readonly offset: number;
}

/**
 * Ranks the linear molecules of the library by how well their predicted strong lines (J″ ≤ 60, the 60 strongest in
 * the list's range, reference constants, 296 K) explain the strong observed lines, after each one's own offset
 * estimate; the score is that of src/assign/identify.ts (share of predicted intensity found × share of strong
 * observed lines explained, relative to half), scaled down when fewer than 10 lines are predicted in range.
 * Isotopologues other than the most abundant are tested as themselves.
 */
export function identifyLinearSpecies(
  peaks: readonly { position: number; intensity?: number }[],
  options: { readonly maxOffset?: number; readonly temperature?: number } = {},
): LinearIdentification[] {
  if (peaks.length === 0) return [];
  const { lo, hi, strongObserved } = identificationWindow(peaks);
  const out: LinearIdentification[] = [];
  for (const ref of LINEAR_REFERENCE) {
    const species = parseLinearSpecies(ref.formula);
    const bands = referenceBands(ref).map((b) => ({ upper: b.upper, lower: b.lower }));
    const cands = predictCandidates(species, ref, levelEntries(ref), bands, lo, hi, {
      temperature: options.temperature ?? 296,
      jMax: 60,
      minRelativeIntensity: 1e-3,
    })
      .sort((a, b) => b.intensity - a.intensity)
      .slice(0, 60);
    const base = { species: ref.formula, name: ref.name };
    if (cands.length < 3) {
      out.push({ ...base, score: 0, matched: 0, predicted: cands.length, offset: 0 });
      continue;
    }
    const spacing = Math.min(...ref.levels.map((l) => lineSpacing(ref, l)));
    const est = estimateOffset(
      cands,
      strongObserved.map((p) => p.position),
      options.maxOffset ?? DEFAULT_MAX_OFFSET,
      0.06,
    );
    const offset = est?.offset ?? 0;
    const tol = Math.min(Math.max(4 * (est?.spread ?? 0.05), 0.03), 0.3, spacing / 4);
    const { matches } = matchLines(
      cands.map((c) => ({ key: c.key, position: c.position + offset, tolerance: tol })),
      strongObserved,
    );
    const byKey = new Map(cands.map((c) => [c.key, c]));
    const predictedWeight = cands.reduce((s, c) => s + Math.sqrt(c.intensity), 0);
    const matchedWeight = matches.reduce(
      (s, m) => s + Math.sqrt((byKey.get(m.prediction.key) as Candidate).intensity),
      0,
    );
    const observedShare = matches.length / Math.min(strongObserved.length, cands.length);
    out.push({
      ...base,
      // A band edge with a handful of predicted lines in range cannot identify a molecule: fewer than 10
      // predictions scale the score down (one match of three would otherwise score like a whole band).
      score: (matchedWeight / predictedWeight) * Math.min(1, observedShare / 0.5) * Math.min(1, cands.length / 10),
      matched: matches.length,
      predicted: cands.length,
      offset,
    });
  }
  return out.sort((a, b) => b.score - a.score);
}

/** The molecule of a species string, mass numbers dropped ("16O-12C-16O" → "O-C-O"), for same-molecule tests. */
function molecule(formula: string): string {
  return formula
    .split('-')
    .map((a) => a.replace(/^\d+/, '').replace(/^D$/, 'H'))
    .join('-');
}

const RANK: Record<CheckStatus, number> = { 'not-evaluated': 0, pass: 1, warn: 2, fail: 3 };
const worse = (a: CheckStatus, b: CheckStatus): CheckStatus => (RANK[b] > RANK[a] ? b : a);

/**
 * QA checks of an assigned linear-molecule list, with the ids and decision rules of src/qa/checks.ts:
 *  - identity: the best-ranked molecule (diatomic ranking passed in, plus the linear one) must be the assigned one
 *    when it scores ≥ 0.5 (fail otherwise); the fitted lower-level B must agree with the library within
 *    identityB (warn beyond, fail beyond three times);
 *  - calibration: observed − reference position regressed on position (offset at the centre, scale in ppm), each
 *    line weighted by its own σ (or the fit's rms) combined with the library's prediction σ; the gases as
 *    wavenumber standards; guard-banded rule of src/qa/calibration.ts; lines whose prediction rests on recalled
 *    constants are left out (not-evaluated when none remain);
 *  - unexplained-lines: share of the list left unassigned (by intensity when given): fail above the limit, warn
 *    above half of it.
 */
export function linearChecks(
  peaks: readonly LinearPeak[],
  result: LinearAssignResult,
  ranking: readonly LinearIdentification[],
  tolerances: Partial<Tolerances> = {},
): Check[] {
  const tol = { ...DEFAULT_TOLERANCES, ...tolerances };
  const ref = linearReference(result.species) as ReferenceSpecies;
  return [identity(result, ref, ranking, tol), calibration(peaks, result, ref, tol), unexplainedCheck(result, tol)];
}

function identity(
  result: LinearAssignResult,
  ref: ReferenceSpecies,
  ranking: readonly LinearIdentification[],
  tol: Tolerances,
): Check {
  const best = ranking[0];
  let status: CheckStatus = 'pass';
  const problems: string[] = [];
  if (best && best.score >= 0.5 && molecule(best.species) !== molecule(result.species)) {
    status = 'fail';
    problems.push(`the lines match ${best.name} (score ${best.score.toFixed(2)}) better than ${result.species}`);
  }
  const n = result.numbering[0];
  const relB = n ? Math.abs(n.ratio - 1) : undefined;
  if (relB !== undefined) {
    if (relB > 3 * tol.identityB) status = worse(status, 'fail');
    else if (relB > tol.identityB) status = worse(status, 'warn');
    if (relB > tol.identityB)
      problems.push(`fitted B of ${n?.level} differs from the library's by ${(relB * 100).toFixed(3)} %`);
  }
  if (!n && result.lines.every((l) => l.status === 'unassigned')) {
    return {
      id: 'identity',
      status: 'fail',
      measured: { species: result.species, assigned: 0 },
      limit: { relativeB: tol.identityB },
      message: `no line was assigned to ${ref.name}`,
    };
  }
  return {
    id: 'identity',
    status,
    measured: {
      species: result.species,
      bestMatch: best?.species ?? null,
      bestScore: best?.score ?? 0,
      relativeB: relB ?? null,
    },
    limit: { relativeB: tol.identityB, bestScore: 0.5 },
    message: problems.length > 0 ? problems.join('; ') : `the lines are those of ${ref.name}`,
  };
}

/** The assigned lines' offset (and scale, with four lines or more over a span) against the library's positions. */
function calibration(
  peaks: readonly LinearPeak[],
  result: LinearAssignResult,
  ref: ReferenceSpecies,
  tol: Tolerances,
): Check {
  const { pts, recalled } = calibrationPoints(peaks, result, ref);
  const limit = { offset: tol.calibrationOffset, scalePpm: tol.calibrationScalePpm };
  if (pts.length < 3) {
    return {
      id: 'calibration',
      status: 'not-evaluated',
      measured: { lines: pts.length, leftOutRecalled: recalled },
      limit,
      message:
        recalled > 0
          ? `the reference constants of these bands are recalled, not read: no wavenumber calibration against them`
          : 'fewer than 3 assigned lines with reference positions',
    };
  }
  const f = offsetAndScale(pts);
  let status: CheckStatus = guardBandedStatus(f.offset, f.uOffset, tol.calibrationOffset);
  const measured: Record<string, unknown> = {
    offset: quantity(f.offset, f.uOffset, 'cm-1'),
    centre: f.centre,
    lines: pts.length,
    leftOutRecalled: recalled,
    standard: ref.formula,
  };
  if (f.scale) {
    const { value: scale, uncertainty: uScale } = f.scale;
    if (uScale <= tol.calibrationScalePpm / 3) {
      measured.scalePpm = quantity(scale, uScale, 'ppm');
      status = worse(status, guardBandedStatus(scale, uScale, tol.calibrationScalePpm));
    } else measured.scaleUndeterminedPpm = uScale;
  }
  return {
    id: 'calibration',
    status,
    measured,
    limit,
    message: `offset ${f.offset.toFixed(5)} ± ${f.uOffset.toFixed(5)} cm-1 at ${f.centre.toFixed(2)} cm-1 against ${ref.name} from ${pts.length} lines`,
  };
}

/** An assigned line against the library: its position, observed − reference, and the σ of that difference. */
interface CalibrationPoint {
  readonly nu: number;
  readonly d: number;
  readonly s: number;
}

/** The assigned lines whose levels the library states from read values (those with a recalled value are counted). */
function calibrationPoints(
  peaks: readonly LinearPeak[],
  result: LinearAssignResult,
  ref: ReferenceSpecies,
): { pts: CalibrationPoint[]; recalled: number } {
  const byKey = new Map(ref.levels.map((l) => [levelKey(l), l]));
  const rms = result.fit?.statistics.rms ?? 0;
  const pts: CalibrationPoint[] = [];
  let recalled = 0;
  for (const l of result.lines) {
    if (!l.assignment) continue;
    const up = byKey.get(levelKey(l.assignment.upper));
    const lo = byKey.get(levelKey(l.assignment.lower));
    if (!up || !lo) continue;
    const uses = [up.G, up.B, lo.G, lo.B];
    if (uses.some((v) => v.status === 'recalled')) {
      recalled++;
      continue;
    }
    const Jp =
      l.assignment.branch === 'R'
        ? l.assignment.j + 1
        : l.assignment.branch === 'P'
          ? l.assignment.j - 1
          : l.assignment.j;
    const pUp = l.assignment.branch === 'Q' ? (l.assignment.parity === 'f' ? 'e' : 'f') : (l.assignment.parity ?? 'e');
    const predicted =
      termValue(referenceConstants(up), up.l, Jp, pUp) -
      termValue(referenceConstants(lo), lo.l, l.assignment.j, l.assignment.parity ?? 'e');
    const sObs = peaks[l.index]?.uncertainty ?? Math.max(rms, 1e-5);
    pts.push({
      nu: l.position,
      d: l.position - predicted,
      s: Math.hypot(sObs, predictionSigma(up, lo, Jp, l.assignment.j)),
    });
  }
  return { pts, recalled };
}

/**
 * Weighted least squares of the differences on an offset at the weighted centre and, with four points or more over
 * a span, a scale in ppm; σ scaled a posteriori when the scatter exceeds the stated σ (never shrunk below them).
 */
function offsetAndScale(pts: readonly CalibrationPoint[]): {
  centre: number;
  offset: number;
  uOffset: number;
  scale?: { value: number; uncertainty: number };
} {
  const n = pts.length;
  const centre = pts.reduce((s, p) => s + p.nu / (p.s * p.s), 0) / pts.reduce((s, p) => s + 1 / (p.s * p.s), 0);
  const span = spanOf(pts.map((p) => p.nu));
  const useScale = span > 0 && n >= 4;
  const cols = useScale ? 2 : 1;
  const design = new Float64Array(n * cols);
  pts.forEach((p, i) => {
    design[i] = 1;
    // d = offset + s·(ν − c): the coefficient of (ν − c) is the relative scale s, reported × 1e6 in ppm.
    if (useScale) design[n + i] = p.nu - centre;
  });
  const fit = solveLeastSquares({
    rows: n,
    cols,
    design,
    observations: Float64Array.from(pts, (p) => p.d),
    weights: Float64Array.from(pts, (p) => 1 / (p.s * p.s)),
  });
  const s2 = Math.max(1, n > cols ? fit.chiSquare / (n - cols) : 1);
  return {
    centre,
    offset: fit.coefficients[0] as number,
    uOffset: Math.sqrt(s2 * (fit.covariance[0] as number)),
    ...(useScale
      ? {
          scale: {
            value: (fit.coefficients[1] as number) * 1e6,
            uncertainty: Math.sqrt(s2 * (fit.covariance[3] as number)) * 1e6,
          },
        }
      : {}),
  };
}

function unexplainedCheck(result: LinearAssignResult, tol: Tolerances): Check {
  const f = result.unexplainedFraction;
  const status: CheckStatus = f > tol.unexplainedFraction ? 'fail' : f > tol.unexplainedFraction / 2 ? 'warn' : 'pass';
  const n = result.lines.filter((l) => l.status === 'unassigned').length;
  return {
    id: 'unexplained-lines',
    status,
    measured: {
      fraction: f,
      lines: n,
      unassigned: result.lines.filter((l) => l.status === 'unassigned').map((l) => l.index),
    },
    limit: { fraction: tol.unexplainedFraction },
    message: `${n} of ${result.lines.length} lines (${(100 * f).toFixed(1)} %) explained by no band of ${result.species}`,
  };
}

/**
 * One ranking over the whole library: the diatomic candidates (src/assign/identify.ts, passed in so that this module
 * keeps to linear molecules) merged with the linear ones, best score first.
 */
export function mergeIdentifications(
  diatomic: readonly LinearIdentification[],
  linear: readonly LinearIdentification[],
): LinearIdentification[] {
  return [...diatomic, ...linear].sort((a, b) => b.score - a.score);
}

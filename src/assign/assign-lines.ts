import { type Quantity, quantity } from '../derive/quantity.js';
import { orUndefined, ScienceError } from '../errors.js';
import {
  type DetailedFit,
  type FitOptions,
  fitLineListDetailed,
  fitRoundWithOffsets,
  type LineInput,
  type LineOutcome,
  type Warning,
} from '../fit/fit-lines.js';
import type { ScatterEstimate } from '../fit/weights.js';
import { solveLeastSquares } from '../linalg/least-squares.js';
import { copyFloats, copyInts, floats, ints, mapFloats, mapInts } from '../linalg/small-arrays.js';
import { type Band, formatBand, type Transition, transitionKey, transitionLabel } from '../models/transitions.js';
import { constantsFor, dunhamFromEntry } from '../species/library.js';
import type { Isotopologue } from '../species/parse.js';
import type { MassValue } from '../species/reduced-mass.js';
import { extentOf, spanOf } from '../stats/extent.js';
import { median as robustMedian, robustSigma } from '../stats/robust.js';
import { type CandidateLine, type CandidateOptions, candidateLines } from './candidates.js';
import { driftedVote, driftFactor, driftLimit, shiftAt } from './drift.js';
import { linesTheFitPlaces } from './fill.js';
import { resolveLoneTwins, type TwinContext, twinCandidates } from './lone-twins.js';
import { type Competition, lowerBound, matchLines, type ObservedPeak, type Prediction, toleranceFor } from './match.js';
import { countNear, estimateOffset, isNear, median } from './offset.js';
import { chanceOfPlacement, FARTHER_CHANCE, offsetReach } from './reach.js';

export { countNear, isNear };

/**
 * Automatic assignment of a line list against the reference library (SCIENCE.md §6): predict every plausible band
 * and isotopologue in the observed window; estimate the instrument's offset by voting; match one-to-one within
 * tolerances; fit; re-predict from the fitted levels and grow outwards in J a few lines at a time; withdraw what
 * the fit rejects and bands too thin to be real; estimate offset and scale against the reference positions.
 * Lines that nothing explains stay unassigned and never enter the fit.
 */

export interface PeakInput {
  /** cm⁻¹. */
  readonly position: number;
  readonly uncertainty?: number;
  readonly intensity?: number;
  /** Label of the instrument or file the line came from; offsets are then found per source. */
  readonly source?: string;
  /** A given assignment anchors the automatic ones. */
  readonly assignment?: Transition & { readonly source: 'given' | 'auto' };
}

export interface AssignOptions extends CandidateOptions {
  /**
   * Largest instrument offset searched, cm⁻¹. Default 0.5. A band whose library origin is less certain may search
   * farther (src/assign/reach.ts).
   */
  readonly maxOffset?: number;
  /** Fewest automatically assigned lines a band needs to be kept. Default 4. */
  readonly minLinesPerBand?: number;
  readonly fit?: FitOptions;
  /**
   * Lines of two or more sources that do not all reach the same levels: carry the sources' offsets in the round fits
   * and place a band through another source's levels with the two sources' offset difference (tryFit,
   * crossSourceShift). Set by assignAndFit for its second attempt; default false.
   */
  readonly crossSources?: boolean;
  /**
   * Positions to put in place of the reference's for some candidates, by `candidateKey` (set by assignAndFit's
   * attempt through the fitted levels of the most abundant isotopologue, `withBorrowedLevels`).
   */
  readonly borrowed?: ReadonlyMap<string, number>;
  /**
   * Whether each round relabels lines held by one isotopologue whose twin transition (the other isotopologue's, a
   * splitting away) has no line, where the twin's peak is found (src/assign/lone-twins.ts). Set by assignAndFit's
   * second attempt for molecules whose isotopologues come in close pairs (`withTwinsJudged`).
   */
  readonly judgeTwins?: boolean;
}

export interface Calibration {
  /** Observed − reference at the band centre. */
  readonly offset: Quantity;
  /** Relative scale error (observed = reference × (1 + scale) + …), when the span allows. */
  readonly scale?: Quantity;
  readonly centre: number;
  readonly lines: number;
  readonly reference: string;
}

export interface BandSummary {
  readonly species: string;
  readonly band: string;
  readonly predicted: number;
  readonly matched: number;
  /** Offset (observed − reference, cm⁻¹) the band was first matched with, per source when lines carry one. */
  readonly offsets?: readonly { readonly source?: string; readonly offset: number; readonly own: boolean }[];
  /** For a band with strong predictions but too few matches: the best offset its own vote found, and its votes. */
  readonly bestOffset?: { readonly offset: number; readonly matches: number };
}

export interface AssignResult {
  readonly fit: DetailedFit;
  readonly lines: readonly LineInput[];
  /** Why a line is unassigned or how a competition was decided, by line index. */
  readonly notes: ReadonlyMap<number, string>;
  readonly calibration?: Calibration;
  readonly bands: readonly BandSummary[];
  readonly unexplained: readonly number[];
  readonly warnings: readonly Warning[];
  /**
   * Whether two isotopologues predict the same transitions within TWIN_SPLIT_LIMIT of each other, for at least
   * TWIN_SHARE of the candidates (H79Br/H81Br, H35Cl/H37Cl; not 13C16O/12C18O, 5 cm⁻¹ apart, nor CO's isotopologues
   * whose bands cross at a few high J), so that lone twins may be judged (withTwinsJudged).
   */
  readonly twinPairs?: boolean;
  /**
   * Lines the final fit of the rounds' assignment fitted, before the lines it places alone were added (fill.ts):
   * what attempts are compared by (`fittedByRounds`), so that the fill, which adds most to a fit that is already
   * good, never decides between two assignments.
   */
  readonly fittedByRounds?: number;
  /** The same attempt with the lines its final fit places alone added (see withPlacedLines); only the chosen one is. */
  readonly withPlacedLines?: () => AssignResult;
  /** How many warnings the attempt had when it was finished (those after are the caller's). */
  readonly warningsAtFinish?: number;
}

/** The lines an attempt's rounds fitted (the measure attempts are compared by). */
export const fittedByRounds = (r: AssignResult): number => r.fittedByRounds ?? r.fit.result.statistics.fitted;

type BandOf = { readonly species: string; readonly band: { readonly upper: number; readonly lower: number } };
/** "species|v′-v″", made once per candidate or given transition (the loop asks for it many times a round). */
const bandKeys = new WeakMap<BandOf, string>();
export const bandKey = (c: BandOf): string => {
  let k = bandKeys.get(c);
  if (k === undefined) {
    k = `${c.species}|${formatBand(c.band)}`;
    bandKeys.set(c, k);
  }
  return k;
};
/** Lines the reference constants predict reliably enough to start from, before any fit (J″ ≤ this). */
const START_J = 4;
/** How far past the highest matched J a fitted band may reach in one step (at least; as far as the reach beyond). */
const GROWTH_J = 3;
/** In the gap pass, the widest tolerance of a reference prediction past the low-J seeds, as a fraction of its band's line spacing. */
const WIDE_SPACING_FRACTION = 0.2;
/** Highest J″ a fitted band may grow to. */
const MAX_J = 150;
/** Half-width of a tolerance for a fitted band, in standard deviations of (prediction − observation). */
const K_FITTED = 5;
/** Below this many assigned lines, the inner fits of the assignment stop at D. */
const FEW_LINES = 30;
/**
 * Largest ratio of a fitted prediction's standard uncertainty to the scatter of the lines, beyond GROWTH_J past the
 * reach. At 4 (with growth up to the reach) the hot CO bench scan settles in 12 rounds instead of 15 (2, growth up
 * to half the reach) with the same assignment on 1 727 analysed lists; at 6 and 8 a few lists gained lines.
 */
const MAX_MODEL_TO_NOISE = 4;
/** The same in the gap pass, where the lines beyond a gap or in a sparse list are too few to grow a few at a time. */
const WIDE_MODEL_TO_NOISE = 10;
/**
 * The inner fits take their weights for lines without σ from the scatter the last round's fit left on its residuals
 * (DetailedFit.scatterOfResiduals: no extra fits) while each group (band or source) has changed by at most this
 * fraction of its lines since that fit and no group is new or crosses MIN_SCATTER_GROUP (weights.ts#ScatterReuse);
 * otherwise, and in the final fit, the scatter is estimated afresh.
 */
const SCATTER_REUSE_GROWTH = 0.5;
/** Lines of a band below which its scatter is pooled with all bands. */
const MIN_FOR_OWN_SCATTER = 8;
/**
 * A line this close to its fitted prediction, as a fraction of its band's line spacing, is no chance coincidence
 * whatever the scatter says (a random line lands that near once in about 10⁴ predictions): noise-free database
 * positions, whose bands bend by 1e-5 cm⁻¹ away from any smooth model where their sources change, keep their labels.
 */
const COINCIDENCE_FRACTION = 1e-4;

/**
 * The assignment as stages, top-down: prepare (window, candidates, seeds, free lines per source) → vote the offsets →
 * iterate (predict, match, prune, fit, withdraw) until the assignment settles → a second pass seeded through fitted
 * levels → notes on competitions → the final fit and the band summaries.
 */
export function assignAndFit(
  peaks: readonly PeakInput[],
  species: readonly { iso: Isotopologue; abundance: number }[],
  masses: ReadonlyMap<string, MassValue>,
  options: AssignOptions = {},
): AssignResult {
  const { plain, options: opts } = withTwinsJudged(peaks, species, masses, options);
  const crossed = levelsSeenByOneSource(plain.lines) ? withCrossedSources(plain, peaks, species, masses, opts) : plain;
  const first = withBorrowedLevels(crossed, peaks, species, masses, opts);
  const alignment = sourcesInterleaved(peaks) ? sourceAlignment(peaks, species, masses, opts) : undefined;
  if (!alignment) return first;
  // Sources interleaved line by line (sourcesInterleaved) whose voted offsets differ: assigned again
  // on lines moved by those offsets onto one source's scale (each line's own position kept for the final fit), kept
  // when that fits more lines. Without it the round fits mix lines a few tenths of a cm⁻¹ apart, and the scatter
  // they estimate from that swallows the H79Br/H81Br isotope shift (held-out seed 14: 7 lines right of 161). Not for
  // sources recorded in separate windows: on held-out seed 32 (HBr 2-0 and 3-0, at the default temperature before
  // its own was read) the aligned lines of the sparser source lost their bands (732 lines right → 299).
  return fittingMore(
    orUndefined(() => assignOnce(peaks, species, masses, { ...opts, crossSources: false }, alignment)),
    first,
  );
}

/**
 * Molecules whose isotopologues' lines come in close pairs (H⁷⁹Br/H⁸¹Br 0.4–1.1 cm⁻¹ apart, H³⁵Cl/H³⁷Cl 2 cm⁻¹;
 * AssignResult.twinPairs): the lines assigned once more with the rounds judging lone twins (lone-twins.ts), kept when that fits more lines. Not
 * made the only way: judged from the first round, lines held with a wrong J sit in the doublets of other transitions,
 * and relabelling their isotopologue sent one scan elsewhere (held-out seed 32: 632 of 752 clear lines right → 310);
 * judged only once the rounds had settled, the swapped lines of a band the other isotopologue had taken whole were too
 * few to hold it (seed 163 stayed at 125 of 318). When it wins, the later attempts (crossed sources, borrowed levels,
 * aligned sources) judge twins too.
 */
function withTwinsJudged(
  peaks: readonly PeakInput[],
  species: readonly { iso: Isotopologue; abundance: number }[],
  masses: ReadonlyMap<string, MassValue>,
  options: AssignOptions,
): { plain: AssignResult; options: AssignOptions } {
  const plain = assignOnce(peaks, species, masses, { ...options, crossSources: false });
  if (!plain.twinPairs) return { plain, options };
  const judging = { ...options, judgeTwins: true };
  const judged = orUndefined(() => assignOnce(peaks, species, masses, { ...judging, crossSources: false }));
  return judged && fittingMore(judged, plain) === judged ? { plain: judged, options: judging } : { plain, options };
}

/** "species|v′-v″|branch|J″" of a candidate or transition. */
export const candidateKey = (c: CandidateLine | Transition): string => `${bandKey(c)}|${c.branch}|${c.j}`;

/** Candidates with the positions `borrowed` gives in place of the reference's (the same objects where none). */
function withBorrowedPositions(
  cands: CandidateLine[],
  borrowed: ReadonlyMap<string, number> | undefined,
): CandidateLine[] {
  if (!borrowed || borrowed.size === 0) return cands;
  return cands.map((c) => {
    const p = borrowed.get(candidateKey(c));
    return p === undefined ? c : { ...c, position: p };
  });
}

/** Largest |ρ − 1| (ρ = √(μ_parent/μ)) for which a minor isotopologue borrows the parent's fitted corrections. */
const BORROW_MAX_RHO = 0.01;

/**
 * A band of a minor isotopologue that was not found (strong predictions, too few matches: `bestOffset`) while the
 * most abundant isotopologue's same band was fitted: the reference misplaces it by about what it misplaces the
 * parent's (a library without γ_e puts HBr 3-1 P(10) ~1 cm⁻¹ off, far beyond the seeds' tolerance; H⁷⁹Br 3-1 was
 * found through the fitted 3-0, H⁸¹Br 3-1 was not). The lines are assigned once more from better places: every
 * candidate the first fit predicts (both levels fitted) at that prediction, and each candidate of such a missing band
 * at its reference position plus the parent's fitted − reference difference for the same transition. Only for
 * isotopologues whose reduced masses differ by under 2 % from the parent's (|ρ − 1| < BORROW_MAX_RHO: the difference,
 * mostly the missing γ_e, β_e, H_e terms, scales by ρ^(k+2l), so by under 4 % of itself). Kept when it fits more lines
 * (held-out sweep, 240 scans: clear lines right 95.48 → 96.27 %, wrong 360 → 247;
 * seed 135 H81Br 3-0/3-1 found, 263 → 336 right).
 */
function withBorrowedLevels(
  held: AssignResult,
  peaks: readonly PeakInput[],
  species: readonly { iso: Isotopologue; abundance: number }[],
  masses: ReadonlyMap<string, MassValue>,
  options: AssignOptions,
): AssignResult {
  const parent = [...species].sort((a, b) => b.abundance - a.abundance)[0];
  if (!parent) return held;
  const muParent = masses.get(parent.iso.formula)?.value;
  const missing = new Set(
    held.bands
      .filter((b) => b.bestOffset && b.species !== parent.iso.formula)
      .filter((b) => {
        const mu = masses.get(b.species)?.value;
        return mu !== undefined && muParent !== undefined && Math.abs(Math.sqrt(muParent / mu) - 1) < BORROW_MAX_RHO;
      })
      .map((b) => `${b.species}|${b.band}`),
  );
  if (missing.size === 0) return held;
  const { lo, hi } = extentOf(peaks.map((p) => p.position));
  const cands = candidateLines(species, lo - 1, hi + 1, {
    ...options,
    minRelativeIntensity: 0,
    maxJ: options.maxJ ?? MAX_J,
  });
  const ofParent = new Map(
    cands.filter((c) => c.species === parent.iso.formula).map((c) => [`${formatBand(c.band)}|${c.branch}|${c.j}`, c]),
  );
  const borrowed = new Map<string, number>();
  for (const c of cands) {
    const own = held.fit.predict(c);
    if (own) {
      borrowed.set(candidateKey(c), own.value);
      continue;
    }
    if (!missing.has(bandKey(c))) continue;
    const twin = ofParent.get(`${formatBand(c.band)}|${c.branch}|${c.j}`);
    const fitted = twin ? held.fit.predict(twin) : undefined;
    if (twin && fitted) borrowed.set(candidateKey(c), c.position + (fitted.value - twin.position));
  }
  if (borrowed.size === 0) return held;
  return fittingMore(
    orUndefined(() => assignOnce(peaks, species, masses, { ...options, crossSources: false, borrowed })),
    held,
  );
}

/** The attempt when it was made and fits more lines than the assignment it is held against, else that one. */
function fittingMore(attempt: AssignResult | undefined, held: AssignResult): AssignResult {
  return attempt && fittedByRounds(attempt) > fittedByRounds(held) ? attempt : held;
}

/** Least share of a source's lines whose nearest line belongs to another source, for the sources to count as interleaved. */
const INTERLEAVED_SHARE = 0.2;

/**
 * Whether the sources' free lines are interleaved (a list split line by line between instruments, not one recorded
 * in some windows and the other in others): for every source, INTERLEAVED_SHARE or more of its lines have their
 * nearest free line in another source. On the held-out two-instrument scans the share of the sparser source is
 * 0.11–0.65 (median 0.45) split line by line, 0.00–0.17 in windows.
 */
export function sourcesInterleaved(peaks: readonly PeakInput[]): boolean {
  const free = peaks.filter((p) => !p.assignment).sort((a, b) => a.position - b.position);
  const tally = new Map<string, { mixed: number; lines: number }>();
  free.forEach((p, i) => {
    const left = free[i - 1];
    const right = free[i + 1];
    const nearest =
      left && right ? (p.position - left.position <= right.position - p.position ? left : right) : (left ?? right);
    const t = tally.get(p.source ?? '') ?? { mixed: 0, lines: 0 };
    t.lines++;
    if (nearest && (nearest.source ?? '') !== (p.source ?? '')) t.mixed++;
    tally.set(p.source ?? '', t);
  });
  return tally.size >= 2 && [...tally.values()].every((t) => t.mixed >= INTERLEAVED_SHARE * t.lines);
}

/**
 * Sources that reach different levels: assigned again with their offsets carried between them (tryFit,
 * crossSourceShift), kept when that fits more lines. Not the only way: on held-out hot two-instrument scans assigned
 * at the default temperature before their own is read, the carried offsets, estimated from a poor first assignment,
 * led it astray (seeds 32 and 140: 732 and 102 lines right, 6 and 26 so), and the temperature read from it with them.
 */
function withCrossedSources(
  plain: AssignResult,
  peaks: readonly PeakInput[],
  species: readonly { iso: Isotopologue; abundance: number }[],
  masses: ReadonlyMap<string, MassValue>,
  options: AssignOptions,
): AssignResult {
  return fittingMore(
    orUndefined(() => assignOnce(peaks, species, masses, { ...options, crossSources: true })),
    plain,
  );
}

/** Voted offsets of two sources differing by less than this (cm⁻¹) are not worth a second assignment. */
const ALIGN_MIN_DIFFERENCE = 0.01;

/**
 * Each source's voted offset less that of the source with the most free lines, when two or more sources' offsets
 * differ by ALIGN_MIN_DIFFERENCE or more; undefined otherwise (one source, or offsets alike).
 */
export function sourceAlignment(
  peaks: readonly PeakInput[],
  species: readonly { iso: Isotopologue; abundance: number }[],
  masses: ReadonlyMap<string, MassValue>,
  options: AssignOptions,
): Map<string, number> | undefined {
  if (new Set(peaks.flatMap((p) => (p.assignment ? [] : [p.source ?? '']))).size < 2) return undefined;
  const ctx = prepareAssignment(peaks, species, masses, options);
  if (ctx.inWindow === 0) return undefined;
  const votes = firstVotes(ctx);
  const largest = [...ctx.freeBySource].sort((a, b) => b[1].length - a[1].length)[0]?.[0] ?? '';
  const base = votes.bySource.get(largest)?.offset ?? 0;
  const out = new Map(ctx.sources.map((s) => [s, (votes.bySource.get(s)?.offset ?? base) - base]));
  return [...out.values()].some((d) => Math.abs(d) >= ALIGN_MIN_DIFFERENCE) ? out : undefined;
}

/** The peaks with each free line moved by its source's alignment (given assignments as sent). */
function alignedPeaks(peaks: readonly PeakInput[], alignment: ReadonlyMap<string, number>): PeakInput[] {
  return peaks.map((p) => {
    const d = p.assignment ? 0 : (alignment.get(p.source ?? '') ?? 0);
    return d === 0 ? p : { ...p, position: p.position - d };
  });
}

/** The votes of the low-J seeds, each source against its own free lines. */
function firstVotes(ctx: AssignContext): OffsetVotes {
  return voteOffsets(
    ctx.cands.filter((c, i) => ctx.seedable[i] && c.j <= START_J),
    ctx.freeBySource,
    ctx.maxOffset,
    ctx.minLines,
    undefined,
    ctx.referenceDunham,
  );
}

function assignOnce(
  peaks: readonly PeakInput[],
  species: readonly { iso: Isotopologue; abundance: number }[],
  masses: ReadonlyMap<string, MassValue>,
  options: AssignOptions,
  /** Per source, the offset taken off its free lines while they are assigned (sourceAlignment). */
  alignment?: ReadonlyMap<string, number>,
): AssignResult {
  const ctx = prepareAssignment(alignment ? alignedPeaks(peaks, alignment) : peaks, species, masses, options);
  if (ctx.inWindow === 0) {
    ctx.warnings.push({
      code: 'NO_BAND_IN_WINDOW',
      message: `no band of ${speciesNames(ctx)} is predicted between ${ctx.lo.toFixed(1)} and ${ctx.hi.toFixed(1)} cm-1`,
    });
    return finishAssignment(ctx, new Map(), undefined);
  }
  let offsets = firstVotes(ctx);
  // Offsets are reported on each source's own scale.
  ctx.warnings.push(...ambiguousOffsetWarnings(alignment ? unalignedVotes(offsets, alignment) : offsets));
  const state: LoopState = {
    auto: new Map(),
    detailed: undefined,
    detailedIsOfAuto: false,
    competitions: [],
    swept: false,
    banned: new Map(),
    twinSwaps: new Set(),
    twinPhase: options.judgeTwins === true,
  };
  for (let pass = 0; pass < 2; pass++) {
    iterateAssignment(ctx, offsets, state);
    // Second pass, when many lines are left: weaker bands that share a level with a fitted band may seed too (a hot
    // band whose lower level the fundamental fixed); their fitted B_v must still agree with the reference.
    if (pass > 0 || !state.detailed || !widenSeeds(ctx, state.auto, state.detailed)) break;
    state.swept = false;
  }
  // Gaps: a list without the low-J lines of a band (a saturated band centre cut out, a sparse random subset) leaves
  // bands that never seeded, or fitted bands whose next lines lie beyond a gap. When enough lines are left, the
  // reference predictions of every J are let in (their tolerance widening with J, and below a fifth of the line
  // spacing), after a vote over the strong lines of every J; fitted predictions still take a peak first.
  if (ctx.free.filter((p) => !state.auto.has(p.index)).length >= ctx.minLines) {
    ctx.wide = true;
    offsets = widenedOffsets(ctx, offsets, state.auto);
    state.swept = false;
    iterateAssignment(ctx, offsets, state);
  }
  withholdAmbiguous(ctx, offsets, state);
  noteCompetitions(ctx, state);
  const twinPairs = twinsOf(ctx).size >= TWIN_SHARE * ctx.cands.length && twinsOf(ctx).size > 0;
  if (!alignment) return { ...finishAssignment(ctx, state.auto, offsets), twinPairs };
  // The lines as sent for the final fit (its own source offsets take the instruments' difference up again), and the
  // offsets on their scale for what is reported with them.
  return { ...finishAssignment(withPeaks(ctx, peaks), state.auto, unalignedVotes(offsets, alignment)), twinPairs };
}

/** The context of an aligned assignment with the peaks as sent: the same candidates, the lines' own positions. */
function withPeaks(ctx: AssignContext, peaks: readonly PeakInput[]): AssignContext {
  return { ...ctx, ...peakViews(peaks, ctx.sources), peaks, autoInputs: new Map() };
}

/** The free lines of the peaks, by source and by source in position order, and each line as the fit takes it. */
function peakViews(
  peaks: readonly PeakInput[],
  sources: readonly string[],
): Pick<AssignContext, 'free' | 'freeBySource' | 'freeByPosition' | 'inputs'> {
  const free = freePeaks(peaks);
  const freeBySource = new Map(sources.map((s) => [s, free.filter((p) => (peaks[p.index]?.source ?? '') === s)]));
  return {
    free,
    freeBySource,
    freeByPosition: new Map([...freeBySource].map(([s, f]) => [s, [...f].sort((a, b) => a.position - b.position)])),
    inputs: baseInputs(peaks),
  };
}

/** Offsets voted on aligned lines, put back on each source's own scale. */
function unalignedVotes(votes: OffsetVotes, alignment: ReadonlyMap<string, number>): OffsetVotes {
  const back = <T extends OffsetChoice>(o: T, source: string): T => ({
    ...o,
    offset: o.offset + (alignment.get(source) ?? 0),
  });
  // perBand is keyed "band#source": the longest source name that ends the key is its source.
  const sources = [...alignment.keys()].sort((a, b) => b.length - a.length);
  const sourceOfKey = (k: string) => sources.find((s) => k.endsWith(`#${s}`)) ?? '';
  const perBand = new Map([...votes.perBand].map(([k, o]) => [k, back(o, sourceOfKey(k))] as const));
  return offsetVotes(new Map([...votes.bySource].map(([s, o]) => [s, back(o, s)])), perBand);
}

/** What every stage of the assignment reads: the lines, their window, the candidates and the free lines per source. */
export interface AssignContext {
  readonly peaks: readonly PeakInput[];
  readonly species: readonly { iso: Isotopologue; abundance: number }[];
  readonly masses: ReadonlyMap<string, MassValue>;
  readonly options: AssignOptions;
  /** The observed window widened by 1 cm⁻¹ each side. */
  readonly lo: number;
  readonly hi: number;
  /** Every line of every plausible band in the window, down to any intensity. */
  readonly cands: readonly CandidateLine[];
  /** Per candidate: its band's number in `bands`. */
  readonly candBand: Int32Array;
  /** The band keys of the candidates ("species|v′-v″"), numbered. */
  readonly bands: readonly string[];
  /** A candidate's number in `cands`. */
  readonly candIndex: ReadonlyMap<CandidateLine, number>;
  /** Whether a candidate's transition was sent with a given assignment (never predicted). */
  readonly candGiven: Uint8Array;
  /** Per band (by number), its candidates in ascending J″. */
  readonly bandCands: readonly Int32Array[];
  /** Which candidates may seed a band (strong enough); the second pass widens it. */
  readonly seedable: boolean[];
  /**
   * How many candidates (the first ones) the reference places in the window; those after them lie up to EDGE_WIDTH
   * beyond it, for growth along a fitted band only (see edgeCandidates).
   */
  readonly inWindow: number;
  /** Per band, the median distance between neighbouring lines of one branch. */
  readonly spacing: ReadonlyMap<string, number>;
  /** Lines sent with an assignment. */
  readonly given: readonly { readonly index: number; readonly t: Transition }[];
  /** Lines sent without one, all and per source. */
  readonly free: readonly ObservedPeak[];
  readonly sources: readonly string[];
  readonly freeBySource: ReadonlyMap<string, readonly ObservedPeak[]>;
  /** The same lists sorted by position, as matchLines sorts them (already in order, its sort is a single pass). */
  readonly freeByPosition: ReadonlyMap<string, readonly ObservedPeak[]>;
  /** Per line, the number of its source in `sources` (−1 for a given line whose source no free line has). */
  readonly sourceNumbers: Int32Array;
  /** The library's Dunham coefficients per isotopologue (for the B_v test of strayBands). */
  readonly referenceDunham: ReadonlyMap<string, ReadonlyMap<string, number>>;
  /** The lines as the fit takes them before any automatic assignment (`lineInputs` adds those). */
  readonly inputs: readonly LineInput[];
  /** The lines as the fit takes them with an automatic assignment, by pairKey (made once per pair, see autoInput). */
  readonly autoInputs: Map<number, LineInput>;
  /** Median σ of the lines that carry one. */
  readonly typicalSigma: number | undefined;
  /** Whether reference predictions of every J are let in (the gap pass, see assignAndFit). */
  wide: boolean;
  /** The last fit's predictions by candidate number, each asked of it once (see fittedPosition). */
  readonly fitted: { fit: DetailedFit | undefined; at: (FittedPosition | undefined | null)[] };
  /** Lines a band matched by position but pruneImplausibleBands dropped for their intensity, and why. */
  readonly intensityLeftOut: Map<number, string>;
  readonly maxOffset: number;
  readonly minLines: number;
  readonly warnings: Warning[];
  /** Why a line is unassigned or how a competition was decided, by line index. */
  readonly notes: Map<number, string>;
}

/**
 * How far beyond the observed window (cm⁻¹) the reference may place a line the list holds at its edge: the library's
 * H35Cl, without γ_e, β_e, H_e, places 2-0 P(20) 8 cm⁻¹ off, and the lowest line of a list was never a candidate.
 */
const EDGE_WIDTH = 25;

/**
 * The candidates the reference places within EDGE_WIDTH beyond [lo, hi], for growth along a fitted band (never
 * seeds, not in the line spacing), their intensities on the scale of `inner` (the candidates in the window).
 */
export function edgeCandidates(
  species: readonly { iso: Isotopologue; abundance: number }[],
  lo: number,
  hi: number,
  options: AssignOptions,
  inner: readonly CandidateLine[],
): CandidateLine[] {
  const wide = candidateLines(species, lo - EDGE_WIDTH, hi + EDGE_WIDTH, {
    ...options,
    minRelativeIntensity: 0,
    maxJ: options.maxJ ?? MAX_J,
  });
  const first = inner[0];
  const same = first && wide.find((c) => transitionKey(c) === transitionKey(first));
  if (!first || !same) return [];
  const scale = first.intensity / same.intensity;
  return wide.filter((c) => c.position < lo || c.position > hi).map((c) => ({ ...c, intensity: c.intensity * scale }));
}

/** What the iterations carry from one to the next. */
export interface LoopState {
  auto: Map<number, CandidateLine>;
  detailed: DetailedFit | undefined;
  /** Whether `detailed` is the fit of exactly `auto` (a refit after withdrawals can fail). */
  detailedIsOfAuto: boolean;
  competitions: Competition[];
  /** Whether the withdrawn pairs had their last chance against a settled model. */
  swept: boolean;
  /**
   * Withdrawn pairs: tried again once the band has grown (a line off an early, short fit may suit the final one),
   * but never a fourth time.
   */
  readonly banned: Map<number, { at: number; count: number }>;
  /** Lines relabelled as their twin isotopologue (pairKey of line and new candidate): each such swap is made once. */
  readonly twinSwaps: Set<number>;
  /** Whether the rounds look for lines held by the wrong twin isotopologue (AssignOptions.judgeTwins). */
  twinPhase: boolean;
}

export function prepareAssignment(
  peaks: readonly PeakInput[],
  species: readonly { iso: Isotopologue; abundance: number }[],
  masses: ReadonlyMap<string, MassValue>,
  options: AssignOptions,
): AssignContext {
  const positions = peaks.map((p) => p.position);
  const extent = extentOf(positions);
  const lo = extent.lo - 1;
  const hi = extent.hi + 1;
  // Every line of every plausible band, down to any intensity: bands are seeded from their strong lines only, but a
  // fitted band grows for as long as the data carry it.
  const inner = withBorrowedPositions(
    candidateLines(species, lo, hi, {
      ...options,
      minRelativeIntensity: 0,
      maxJ: options.maxJ ?? MAX_J,
    }),
    options.borrowed,
  );
  const cands = [...inner, ...edgeCandidates(species, lo, hi, options, inner)];
  const given = peaks.flatMap((p, index) => (p.assignment ? [{ index, t: p.assignment }] : []));
  const sourceOf = (i: number) => peaks[i]?.source ?? '';
  const withSigma = peaks.flatMap((p) => (p.uncertainty !== undefined ? [p.uncertainty] : []));
  const sources = [...new Set(peaks.flatMap((p, i) => (p.assignment ? [] : [sourceOf(i)])))];
  const index = candidateIndex(cands, given);
  return {
    peaks,
    species,
    masses,
    options,
    lo,
    hi,
    cands,
    ...index,
    seedable: [
      ...seedFilter(inner, options.minRelativeIntensity ?? 1e-4),
      ...cands.slice(inner.length).map(() => false),
    ],
    inWindow: inner.length,
    spacing: lineSpacings({ cands: inner, ...index }),
    given,
    sources,
    ...peakViews(peaks, sources),
    sourceNumbers: mapInts(peaks, (_, i) => sources.indexOf(sourceOf(i))),
    autoInputs: new Map(),
    referenceDunham: referenceDunham(species),
    typicalSigma: withSigma.length > 0 ? robustMedian(withSigma) : undefined,
    wide: false,
    fitted: { fit: undefined, at: [] },
    intensityLeftOut: new Map(),
    maxOffset: options.maxOffset ?? 0.5,
    minLines: options.minLinesPerBand ?? 4,
    warnings: [],
    notes: new Map(),
  };
}

/** The candidates' numbers and band numbers, made once for the loop's look-ups. */
export function candidateIndex(
  cands: readonly CandidateLine[],
  given: readonly { readonly t: Transition }[],
): Pick<AssignContext, 'candBand' | 'bands' | 'candIndex' | 'candGiven' | 'bandCands'> {
  const number = new Map<string, number>();
  const candBand = ints(cands.length);
  let last: CandidateLine | undefined;
  cands.forEach((c, ci) => {
    // Lines of one band come together and share its band object: the key is made once per band, not per line.
    if (last && c.band === last.band && c.species === last.species) {
      candBand[ci] = candBand[ci - 1] as number;
    } else {
      const k = bandKey(c);
      let b = number.get(k);
      if (b === undefined) {
        b = number.size;
        number.set(k, b);
      }
      candBand[ci] = b;
    }
    last = c;
  });
  const members: number[][] = Array.from({ length: number.size }, () => []);
  candBand.forEach((b, ci) => {
    members[b]?.push(ci);
  });
  const givenKeys = new Set(given.map((g) => transitionKey(g.t)));
  const candIndex = new Map<CandidateLine, number>();
  for (let ci = 0; ci < cands.length; ci++) candIndex.set(cands[ci] as CandidateLine, ci);
  const candGiven = new Uint8Array(cands.length);
  if (givenKeys.size > 0)
    for (let ci = 0; ci < cands.length; ci++)
      if (givenKeys.has(transitionKey(cands[ci] as CandidateLine))) candGiven[ci] = 1;
  return {
    candBand,
    bandCands: members.map((m) => byJ(cands, m)),
    bands: [...number.keys()],
    candIndex,
    candGiven,
  };
}

/** Largest candidate number byJ sorts as one number with its J″ (J″ · 2²¹ + number stays an exact double). */
const BY_J_NUMBERS = 1 << 21;

/**
 * A band's candidate numbers in ascending J″, then number: sorted as numbers J″ · 2²¹ + number (no comparator),
 * the same order as the comparison of (J″, number).
 */
export function byJ(cands: readonly CandidateLine[], members: readonly number[]): Int32Array {
  const keys = floats(members.length);
  for (let k = 0; k < members.length; k++) {
    const ci = members[k] as number;
    const j = (cands[ci] as CandidateLine).j;
    if (!(ci < BY_J_NUMBERS && Number.isInteger(j) && j >= 0 && j < BY_J_NUMBERS))
      return copyInts(
        [...members].sort((x, y) => (cands[x] as CandidateLine).j - (cands[y] as CandidateLine).j || x - y),
      );
    keys[k] = j * BY_J_NUMBERS + ci;
  }
  keys.sort();
  const out = ints(members.length);
  for (let k = 0; k < keys.length; k++) out[k] = (keys[k] as number) % BY_J_NUMBERS;
  return out;
}

/** A withdrawn pair (peak, candidate) as one number. */
export const pairKey = (ctx: AssignContext, peak: number, c: CandidateLine) =>
  peak * ctx.cands.length + (ctx.candIndex.get(c) as number);

/** The lines sent without an assignment, as the matcher takes them. */
export function freePeaks(peaks: readonly PeakInput[]): ObservedPeak[] {
  return peaks.flatMap((p, index) =>
    p.assignment
      ? []
      : [
          {
            index,
            position: p.position,
            ...(p.intensity !== undefined ? { intensity: p.intensity } : {}),
            ...(p.uncertainty !== undefined ? { sigma: p.uncertainty } : {}),
          },
        ],
  );
}

const sourceNumber = (ctx: AssignContext, i: number) => ctx.sourceNumbers[i] as number;
const speciesNames = (ctx: AssignContext) => ctx.species.map((s) => s.iso.formula).join(', ');

/** The line list as the fit takes it: given assignments as sent, automatic ones from the map. */
export function lineInputs(ctx: AssignContext, auto: ReadonlyMap<number, CandidateLine>): LineInput[] {
  return ctx.inputs.map((base, index) => {
    const c = auto.get(index);
    return c ? autoInput(ctx, index, c) : base;
  });
}

/** A line as the fit takes it with an automatic assignment: made once per pair (line, candidate) and kept in ctx. */
export function autoInput(ctx: AssignContext, index: number, c: CandidateLine): LineInput {
  const k = pairKey(ctx, index, c);
  let line = ctx.autoInputs.get(k);
  if (!line) {
    line = {
      ...(ctx.inputs[index] as LineInput),
      assignment: { species: c.species, band: c.band, branch: c.branch, j: c.j, source: 'auto' as const },
    };
    ctx.autoInputs.set(k, line);
  }
  return line;
}

/** Each line as the fit takes it, given assignment included, without an automatic one (made once). */
export function baseInputs(peaks: readonly PeakInput[]): LineInput[] {
  return peaks.map((p) => ({
    position: p.position,
    ...(p.uncertainty !== undefined ? { uncertainty: p.uncertainty } : {}),
    ...(p.intensity !== undefined ? { intensity: p.intensity } : {}),
    ...(p.source !== undefined ? { source: p.source } : {}),
    ...(p.assignment ? { assignment: p.assignment } : {}),
  }));
}

export function ambiguousOffsetWarnings(offsets: OffsetVotes): Warning[] {
  return [...offsets.bySource].flatMap(([s, o]) =>
    o.ambiguous
      ? [
          {
            code: 'OFFSET_AMBIGUOUS',
            message: `the instrument offset${s ? ` of source "${s}"` : ''} is ambiguous: a second value explains nearly as many lines as ${o.offset.toFixed(3)} cm-1`,
          },
        ]
      : [],
  );
}

/**
 * Predict, match, prune, fit and withdraw until the assignment settles (at most 60 rounds). Once settled, every pair
 * withdrawn fewer than three times gets one more chance against the final model (it may have been withdrawn by an
 * early fit that a wrong line had bent).
 */
export function iterateAssignment(ctx: AssignContext, offsets: OffsetVotes, state: LoopState): void {
  let proposed: ProposedMatches | undefined;
  // The residual statistics of state.detailed over state.auto, when the last round left both as it judged them.
  let residuals: ResidualStatistics | undefined;
  for (let iter = 0; iter < 60; iter++) {
    const round = matchRound(
      ctx,
      offsets,
      state,
      iter,
      stillProposed(proposed, state) ? proposed : proposeMatches(ctx, offsets, state, residuals),
    );
    proposed = round.proposed;
    state.competitions = round.competitions;
    const next = round.next;
    resolveDoublets(next, ctx.peaks);
    if (state.twinPhase) resolveLoneTwins(twinContext(ctx, state, iter), twinsOf(ctx), next);
    pruneThinBands(next, ctx.minLines, ctx.given);
    pruneImplausibleBands(ctx, offsets, next);
    if (next.size === 0 && ctx.given.length === 0) break;
    const fit = roundFit(ctx, state, next);
    if (!fit) break;
    const stats = residualStatistics(ctx, fit, next);
    const rejected = withdrawRejected(ctx, fit, next, state.banned, iter, stats);
    const stray = withdrawStrayBands(ctx, fit, next, state.banned, iter);
    const withdrawn = rejected + stray;
    // Nothing withdrawn: the fit stays that of `next`, which the statistics were taken over.
    residuals = withdrawn === 0 ? stats : undefined;
    const same = withdrawn === 0 && sameAssignments(state.auto, next);
    state.auto = next;
    const refit = withdrawn > 0 ? tryFit(ctx, lineInputs(ctx, next), fit.scatterEstimate) : fit;
    state.detailed = refit ?? fit;
    state.detailedIsOfAuto = refit !== undefined;
    if (same) {
      if (state.swept || state.banned.size === 0) break;
      state.swept = true;
      for (const b of state.banned.values()) b.at = Number.NEGATIVE_INFINITY;
    }
  }
}

/**
 * Least share of the candidates with a twin for the lines to be assigned again judging twins. In H⁷⁹Br/H⁸¹Br lists
 * every candidate has its twin within TWIN_SPLIT_LIMIT (held-out seeds 1, 32, 126, 163: all of them; seed 35 1 568 of
 * 1 576), in H³⁵Cl/H³⁷Cl lists the fundamental's and low overtones' (seed 13: 958 of 2 416); in a CO list only the few
 * transitions where two isotopologues' bands cross at high J (seed 34: 34 of 4 147; seed 204 none), which a second
 * assignment, a quarter of such a scan's time, never changed in the held-out sweep.
 */
const TWIN_SHARE = 0.1;

/** Each candidate's twins in the other isotopologues (see lone-twins.ts), found once per candidate list. */
const twinCache = new WeakMap<readonly CandidateLine[], Map<CandidateLine, CandidateLine[]>>();
function twinsOf(ctx: AssignContext): Map<CandidateLine, CandidateLine[]> {
  let t = twinCache.get(ctx.cands);
  if (!t) {
    t = twinCandidates(ctx.cands);
    twinCache.set(ctx.cands, t);
  }
  return t;
}

/** The lone-twin test's view of a round: the free peaks of each line's source, and the pairs it may not make. */
function twinContext(ctx: AssignContext, state: LoopState, iter: number): TwinContext {
  return {
    peaks: ctx.peaks,
    freeNear: (i) => ctx.freeByPosition.get(ctx.sources[sourceNumber(ctx, i)] as string) ?? [],
    refused: (peak, c) => {
      const ci = ctx.candIndex.get(c);
      if (ci === undefined || ctx.candGiven[ci] === 1) return true;
      const k = peak * ctx.cands.length + ci;
      return isBanned(state.banned, k, iter) || state.twinSwaps.has(k);
    },
    swapped: (peak, c) => {
      const ci = ctx.candIndex.get(c);
      if (ci !== undefined) state.twinSwaps.add(peak * ctx.cands.length + ci);
    },
    fitted: (c) => {
      const ci = ctx.candIndex.get(c);
      return ci === undefined || !state.detailed ? undefined : fittedPosition(ctx, state.detailed, ci);
    },
  };
}

/**
 * The fit of this round's assignment: the last round's when the assignment has not changed since (the same lines
 * with the same weights give the same fit), else a new one.
 */
export function roundFit(
  ctx: AssignContext,
  state: LoopState,
  next: Map<number, CandidateLine>,
): DetailedFit | undefined {
  if (state.detailed && state.detailedIsOfAuto && sameAssignments(state.auto, next)) return state.detailed;
  const last = state.detailed;
  return fitDroppingThinBands(ctx, next, last && (last.scatterOfResiduals() ?? last.scatterEstimate));
}

export const isBanned = (banned: LoopState['banned'], k: number, iter: number) => {
  const b = banned.get(k);
  return b !== undefined && (b.count >= 3 || iter - b.at < 4);
};

/** What the predictions of one round are made from: the last fit and what it has assigned. */
export interface RoundModel {
  /** Highest J″ assigned per band (by its number in AssignContext.bands; −1 when none). */
  readonly reach: Int32Array;
  /** Observed/predicted intensity per band (and per class under '#ir' and '#rot'). */
  readonly scale: ReadonlyMap<string, number>;
  readonly residuals: ResidualStatistics | undefined;
  readonly detailed: DetailedFit | undefined;
}

/**
 * One round of predictions matched one-to-one against the free lines of each source, banned pairs left out. The
 * matches before the bans (`proposed`) depend only on the last fit and assignment: a round whose model has not
 * changed passes the last round's in (see iterateAssignment).
 */
export function matchRound(
  ctx: AssignContext,
  offsets: OffsetVotes,
  state: LoopState,
  iter: number,
  proposed: ProposedMatches = proposeMatches(ctx, offsets, state),
): { next: Map<number, CandidateLine>; competitions: Competition[]; proposed: ProposedMatches } {
  const next = new Map<number, CandidateLine>();
  proposed.peaks.forEach((peak, m) => {
    const ci = proposed.cands[m] as number;
    // pairKey from the candidate's number at hand (no look-up of it by candidate).
    if (!isBanned(state.banned, peak * ctx.cands.length + ci, iter)) next.set(peak, ctx.cands[ci] as CandidateLine);
  });
  return { next, competitions: [...proposed.competitions], proposed };
}

/** A round's matches before the bans, in order: peak and candidate numbers, and the competitions. */
export interface ProposedMatches {
  readonly peaks: readonly number[];
  readonly cands: readonly number[];
  readonly competitions: readonly Competition[];
  /** What they were predicted from. */
  readonly detailed: DetailedFit | undefined;
  readonly auto: ReadonlyMap<number, CandidateLine>;
}

/** Each source's predictions from the last fit and assignment (`roundModel`), matched to its free lines. */
export function proposeMatches(
  ctx: AssignContext,
  offsets: OffsetVotes,
  state: LoopState,
  residuals?: ResidualStatistics,
): ProposedMatches {
  const model = roundModel(ctx, state, residuals);
  const out = { peaks: [] as number[], cands: [] as number[], competitions: [] as Competition[] };
  const near = withinReach(ctx, model.reach);
  // Only the second attempt for sources that reach different levels places bands across sources (crossSourceShift).
  const cross = ctx.options.crossSources === true;
  const levels = cross ? sourceLevels(ctx, state.auto) : undefined;
  const carried = cross ? carriedOffsets(state.detailed) : undefined;
  ctx.sources.forEach((name, n) => {
    const src: SourceRef = levels
      ? { name, n, bands: [], levels: levels[n] as Map<string, number>, allLevels: levels, carried }
      : { name, n, bands: [] };
    const preds: Prediction[] = [];
    for (const ci of near) {
      const p = predictionOf(ctx, offsets, model, ci, src);
      if (p) preds.push(p);
    }
    const m = matchLines(preds, ctx.freeByPosition.get(name) ?? []);
    for (const x of m.matches) {
      out.peaks.push(x.peak.index);
      // A prediction's key is its candidate's number (see predictionOf).
      out.cands.push(Number(x.prediction.key));
    }
    for (const c of m.competitions) out.competitions.push(c);
  });
  return { ...out, detailed: state.detailed, auto: state.auto };
}

/**
 * What a round predicts from: the reach and intensity scale of the assignment, the last fit and its residuals (when
 * known, those of the last fit over the assignment).
 */
export function roundModel(ctx: AssignContext, state: LoopState, residuals?: ResidualStatistics): RoundModel {
  return {
    reach: bandReach(ctx, state.auto),
    scale: intensityScales(state.auto, ctx.peaks),
    residuals: state.detailed ? (residuals ?? residualStatistics(ctx, state.detailed, state.auto)) : undefined,
    detailed: state.detailed,
  };
}

/**
 * Whether a round's proposed matches still hold: made from the same fit and from an assignment with the same pairs
 * in the same order (the order of a band's intensity ratios is that of the map).
 */
export function stillProposed(p: ProposedMatches | undefined, state: LoopState): p is ProposedMatches {
  if (!p || p.detailed !== state.detailed || p.auto.size !== state.auto.size) return false;
  const a = p.auto.entries();
  for (const [k, v] of state.auto) {
    const [k0, v0] = a.next().value as [number, CandidateLine];
    if (k0 !== k || v0 !== v) return false;
  }
  return true;
}

/**
 * The candidates a round may predict, in their order in `cands`: per band those up to the farthest J″ its reach
 * allows (see outOfReach); the rest of the band's candidates are not looked at.
 */
export function withinReach(ctx: AssignContext, reach: Int32Array): Int32Array {
  const out: number[] = [];
  ctx.bandCands.forEach((list, b) => {
    const r = reach[b] as number;
    const rr = r >= 0 ? r : START_J;
    for (const ci of list) {
      if (!ctx.wide && outOfReach((ctx.cands[ci] as CandidateLine).j, rr)) break;
      out.push(ci);
    }
  });
  return copyInts(out).sort();
}

/** Highest J″ assigned per band (by number; −1 when none), automatic or given. */
export function bandReach(ctx: AssignContext, auto: ReadonlyMap<number, CandidateLine>): Int32Array {
  const reach = ints(ctx.bands.length).fill(-1);
  const raise = (b: number | undefined, j: number) => {
    if (b !== undefined && j > (reach[b] as number)) reach[b] = j;
  };
  for (const c of auto.values()) raise(ctx.candBand[ctx.candIndex.get(c) as number], Math.max(c.j, 0));
  if (ctx.given.length > 0) {
    const number = new Map(ctx.bands.map((k, b) => [k, b]));
    for (const g of ctx.given) raise(number.get(bandKey(g.t)), Math.max(g.t.j, 0));
  }
  return reach;
}

/**
 * Where to look for a candidate and how wide: from the fit when its band is fitted (or both its levels are, through
 * other bands), else from the reference positions and the voted offset. Undefined when the candidate is given, out
 * of reach, or too uncertain to tell.
 */
export function predictionOf(
  ctx: AssignContext,
  offsets: OffsetVotes,
  model: RoundModel,
  ci: number,
  src: SourceRef,
): Prediction | undefined {
  if (ctx.candGiven[ci] === 1) return undefined;
  const c = ctx.cands[ci] as CandidateLine;
  const band = ctx.candBand[ci] as number;
  const b = model.reach[band] as number;
  const reach = b >= 0 ? b : undefined;
  // Beyond the farthest either placement may reach (a band without lines reaches from START_J): no prediction, and
  // none of the fit is asked for.
  if (!ctx.wide && outOfReach(c.j, reach ?? START_J)) return undefined;
  const view = bandInSource(ctx, offsets, model, src, band, c);
  const cand: CandidateRef = { c, ci, band, bk: view.bk };
  // A band whose two levels are both fitted (through other bands) is predicted by the fit, matched or not.
  const fitted = model.detailed ? fittedPosition(ctx, model.detailed, ci) : undefined;
  const r = reach ?? (fitted ? START_J : undefined);
  const placed =
    (fitted && r !== undefined && model.residuals
      ? fittedPrediction(
          ctx,
          offsets,
          model.residuals,
          cand,
          fitted,
          r,
          src,
          view,
          model.detailed && c.j > r ? disagreementAt(ctx, model.detailed, band, c, r) : undefined,
          ctx.options.crossSources && src.allLevels
            ? crossSourceShift(offsets, src, c, src.allLevels, ctx.sources)
            : undefined,
          reach === undefined,
        )
      : referencePrediction(ctx, offsets, cand, r, src.name, view)) ??
    // Beyond a gap the fitted model may have run out while the reference still places the line well.
    (ctx.wide && fitted ? referencePrediction(ctx, offsets, cand, undefined, src.name, view) : undefined);
  if (!placed) return undefined;
  return keyedPrediction(ci, placed, view.scale !== undefined ? view.scale * c.intensity : undefined, view.borrowed);
}

/**
 * The fit's position minus the reference one for the line of `c`'s band and branch at J″ = j (undefined when the
 * band has no such candidate or the fit does not predict it): how far the reference is off where the band has lines.
 */
export function disagreementAt(
  ctx: AssignContext,
  fit: DetailedFit,
  band: number,
  c: CandidateLine,
  j: number,
): number | undefined {
  const list = ctx.bandCands[band] as Int32Array;
  let lo = 0;
  let hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if ((ctx.cands[list[mid] as number] as CandidateLine).j < j) lo = mid + 1;
    else hi = mid;
  }
  for (let k = lo; k < list.length; k++) {
    const ci = list[k] as number;
    const x = ctx.cands[ci] as CandidateLine;
    if (x.j !== j) break;
    if (x.branch !== c.branch) continue;
    const p = fittedPosition(ctx, fit, ci);
    return p ? p.value - x.position : undefined;
  }
  return undefined;
}

/** Where a band's lines are placed within one source: its offset there and its line spacing (undefined: none). */
export interface BandPlacement {
  readonly offset: OffsetChoice;
  readonly spacing: number | undefined;
}

/** What the predictions of one band within one source share in a round, looked up once rather than per candidate. */
export interface BandInSource extends BandPlacement {
  readonly bk: string;
  /**
   * The observed/predicted intensity scale its predictions carry: its own, else (unless its positions establish it)
   * that of its class's main band.
   */
  readonly scale: number | undefined;
  /** Whether `scale` is not the band's own (and so held to BAND_RATIO_LIMIT). */
  readonly borrowed: boolean;
}

/** The band's view within the source (`c` one of its candidates, for its class), made once per round and source. */
export function bandInSource(
  ctx: AssignContext,
  offsets: OffsetVotes,
  model: RoundModel,
  src: SourceRef,
  band: number,
  c: CandidateLine,
): BandInSource {
  const known = src.bands?.[band];
  if (known !== undefined) return known;
  const bk = ctx.bands[band] as string;
  const offset = offsets.of(bk, src.name);
  const own = model.scale.get(scaleKey(bk, src.name));
  // A band its positions establish is not held to another band's intensity scale before it has its own.
  const scale = own ?? (offset.established ? undefined : classScale(model.scale, c, src.name));
  const view = { bk, offset, spacing: ctx.spacing.get(bk), scale, borrowed: own === undefined };
  if (src.bands) src.bands[band] = view;
  return view;
}

type FittedPosition = { readonly value: number; readonly variance: number };

/**
 * A fit's prediction of a candidate (undefined when the fit holds not both its levels), asked of each fit once per
 * candidate: the rounds that settle the assignment and the passes after it predict from the same fit again.
 */
export function fittedPosition(ctx: AssignContext, fit: DetailedFit, ci: number): FittedPosition | undefined {
  const memo = ctx.fitted;
  if (memo.fit !== fit) {
    memo.fit = fit;
    memo.at = new Array(ctx.cands.length).fill(null);
  }
  let p = memo.at[ci];
  if (p === null) {
    p = fit.predict(ctx.cands[ci] as CandidateLine);
    memo.at[ci] = p;
  }
  return p;
}

/**
 * A placement as the matcher takes it, keyed by the candidate's number (proposeMatches maps a match back to its
 * candidate by it), with the expected intensity when known (held to BAND_RATIO_LIMIT when it is another band's
 * scale). Built member by member: object spreads cost more than the rest of a prediction here.
 */
export function keyedPrediction(
  ci: number,
  placed: Placement,
  intensity: number | undefined,
  borrowedScale: boolean,
): Prediction {
  const p: { -readonly [K in keyof Prediction]: Prediction[K] } = {
    key: String(ci),
    position: placed.position,
    tolerance: placed.tolerance,
  };
  if (placed.withSigma !== undefined) p.withSigma = placed.withSigma;
  if (placed.tier !== undefined) p.tier = placed.tier;
  if (placed.intensity !== undefined) p.intensity = placed.intensity;
  if (placed.intensityRatioLimit !== undefined) p.intensityRatioLimit = placed.intensityRatioLimit;
  if (intensity === undefined) return p;
  p.intensity = intensity;
  if (borrowedScale) p.intensityRatioLimit = BAND_RATIO_LIMIT;
  return p;
}

export type Placement = Omit<Prediction, 'key'>;

/** A candidate with its number, its band's number and its band key. */
export interface CandidateRef {
  readonly c: CandidateLine;
  readonly ci: number;
  readonly band: number;
  readonly bk: string;
}

/** A source of lines by name and by its number in AssignContext.sources. */
export interface SourceRef {
  readonly name: string;
  readonly n: number;
  /** Its bands as a round's predictions see them, by band number (bandInSource; kept when given). */
  readonly bands?: (BandInSource | undefined)[];
  /** How many of its assigned lines reach each vibrational level ("species|v"; sourceLevels; unknown when not given). */
  readonly levels?: ReadonlyMap<string, number>;
  /** Every source's levels, by source number (sourceLevels). */
  readonly allLevels?: readonly ReadonlyMap<string, number>[];
  /** The offsets the last round fit carried, by source (carriedOffsets; the reference source's is 0). */
  readonly carried?: ReadonlyMap<string, number>;
}

/**
 * Per source (by number), how many of its assigned lines (automatic and given) reach each vibrational level
 * ("species|v"), as upper or lower level. A band whose upper or lower level no line of a source reaches is placed by
 * the round fit only through other sources' lines, and so off by their offset against this source, as far as the
 * round fit could not carry it (crossSourceShift).
 */
export function sourceLevels(ctx: AssignContext, auto: ReadonlyMap<number, CandidateLine>): Map<string, number>[] {
  const out = ctx.sources.map(() => new Map<string, number>());
  const add = (index: number, t: { species: string; band: Band }) => {
    const counts = out[ctx.sourceNumbers[index] as number];
    if (!counts) return;
    for (const v of t.band.upper === t.band.lower ? [t.band.upper] : [t.band.upper, t.band.lower]) {
      const k = `${t.species}|${v}`;
      counts.set(k, (counts.get(k) ?? 0) + 1);
    }
  };
  for (const [index, c] of auto) add(index, c);
  for (const g of ctx.given) add(g.index, g.t);
  return out;
}

/** The source offsets a round fit carried (none when it carried none). */
export function carriedOffsets(fit: DetailedFit | undefined): Map<string, number> {
  const out = new Map<string, number>();
  const so = fit?.result.sourceOffsets;
  if (!so?.applied) return out;
  for (const s of so.sources) if (s.offset) out.set(s.source, s.offset.value);
  return out;
}

/**
 * How a fitted placement of `c` in `src` must move and widen when the fit holds one of its band's levels only
 * through another source's lines: by the difference of the two sources' voted offsets, within the wider of their
 * vote tolerances. Undefined when the source's own lines reach both levels (or for pure rotation).
 */
export function crossSourceShift(
  offsets: OffsetVotes,
  src: SourceRef,
  c: CandidateLine,
  all: readonly ReadonlyMap<string, number>[],
  sources: readonly string[],
): { shift: number; tolerance: number } | undefined {
  const own = src.levels;
  if (!own || c.band.upper === c.band.lower) return undefined;
  const missing = [c.band.upper, c.band.lower].map((v) => `${c.species}|${v}`).filter((k) => !own.has(k));
  if (missing.length === 0) return undefined;
  // The other source whose lines reach the missing level(s) most.
  let best = -1;
  let most = 0;
  all.forEach((counts, n) => {
    if (n === src.n) return;
    const reach = missing.reduce((a, k) => a + (counts.get(k) ?? 0), 0);
    if (reach > most) {
      most = reach;
      best = n;
    }
  });
  if (best < 0) return undefined;
  const other = sources[best] as string;
  const mine = offsets.bySource.get(src.name);
  const theirs = offsets.bySource.get(other);
  if (!mine || !theirs) return undefined;
  // What the fit already carried of the two sources' difference (its placement adds this source's carried offset):
  // a pure rotation band fixes its source's offset while a vibrational band's absorbs into the band origin, so a
  // carried offset need not be the whole difference.
  const carried = (src.carried?.get(src.name) ?? 0) - (src.carried?.get(other) ?? 0);
  return { shift: mine.offset - theirs.offset - carried, tolerance: Math.max(mine.tolerance, theirs.tolerance) };
}

/**
 * Whether J″ lies past what a band of reach r may take in one round: a fitted band grows by max(GROWTH_J, r) (as far
 * as its model stays sharp, see fittedPrediction), a reference placement by GROWTH_J (never further).
 */
export const outOfReach = (j: number, r: number) => j > r + Math.max(GROWTH_J, r);

/**
 * A fitted band's prediction, grown a few lines past its reach; undefined where the model has run out. `at`: the
 * band's offset and spacing in the source (looked up when not given).
 */
export function fittedPrediction(
  ctx: AssignContext,
  offsets: OffsetVotes,
  residuals: ResidualStatistics,
  { c, band, bk }: CandidateRef,
  fitted: { value: number; variance: number },
  r: number,
  { name: src, n: srcNumber, carried }: SourceRef,
  { offset, spacing }: BandPlacement = { offset: offsets.of(bk, src), spacing: ctx.spacing.get(bk) },
  atReach?: number,
  cross?: { readonly shift: number; readonly tolerance: number },
  /** The band has no lines yet: its levels were fitted through other bands only (see `between` below). */
  bridged = false,
): Placement | undefined {
  if (!ctx.wide && outOfReach(c.j, r)) return undefined;
  const st = residuals.of(band, srcNumber);
  // Where the model's own uncertainty exceeds the scatter of the lines (twice it), the data have run out
  // for this model: it must not reach further until nearer lines have sharpened it.
  // Beyond the reach, a few lines at a time; further only where the model is still as sharp as the data.
  const noise = Math.max(st.scatter, st.sigmaFactor * (ctx.typicalSigma ?? 0));
  // In the gap pass (sparse lists, bands cut by gaps) the model may reach further, as long as its tolerance stays
  // well inside the line spacing (below).
  const limit = ctx.wide ? WIDE_MODEL_TO_NOISE : MAX_MODEL_TO_NOISE;
  if (c.j > r + GROWTH_J && noise > 0 && Math.sqrt(fitted.variance) > limit * noise) return undefined;
  // The fitted model's variance ignores the terms it could not yet determine: where it extrapolates, the
  // reference prediction (with its offset) is a second opinion, and the tolerance spans the two. Where the reference
  // is already off at the reach (`atReach`: fit − reference in the same branch there; a library without γ_e puts
  // H35Cl 2-0 R(19) 7.3 cm⁻¹ off, and the band stopped growing), only the change of that disagreement counts, when
  // smaller: a reference off by a smooth amount still says where the extrapolation bends.
  const apart = fitted.value + st.shift - (c.position + shiftAt(offset, c));
  const second =
    c.j > r
      ? Math.min(Math.abs(apart), atReach !== undefined ? Math.abs(fitted.value - c.position - atReach) : Infinity)
      : 0;
  // A band without lines of its own, predicted through levels other bands fixed (2-1 through 1-0 and 2-0), misses
  // the instrument's offset: each of those bands held it once and their levels took it up, so their difference does
  // not (the real CO list shifted by +0.03 cm⁻¹ and sent unassigned: all 96 lines of 2-1 were left). At its low-J
  // seeds, where the reference is good, the placement spans both the fitted position and the reference with the
  // band's voted offset; once the band has lines, its median residual (st.shift) carries the offset.
  const between = bridged && c.j <= START_J ? -apart / 2 : 0;
  const spanned = between !== 0 ? Math.abs(between) + offset.tolerance : 0;
  const model = Math.hypot(K_FITTED * Math.sqrt(fitted.variance), second, spanned, cross?.tolerance ?? 0) + 1e-6;
  // A tolerance wider than a quarter of the line spacing tells nothing.
  if (model > 0.25 * (spacing ?? Number.POSITIVE_INFINITY)) return undefined;
  const coincidence = COINCIDENCE_FRACTION * (spacing ?? 0);
  return {
    position: fitted.value + st.shift + between + (cross?.shift ?? 0) + (carried?.get(src) ?? 0),
    tolerance: Math.max(Math.hypot(model, K_FITTED * st.scatter), coincidence),
    // The same floor for lines with σ: a database's stated σ is a lower bound. Real CO 3-0 R(34) and R(40) by the
    // band head lie 8e-5 and 1.3e-4 cm⁻¹ (8 and 13 times their stated σ) from the band's fit, under the floor of
    // 8.3e-4 (the band's median spacing is 8.3 cm⁻¹), their nearest other predictions 0.027 and 0.31 cm⁻¹ away; they
    // were left unassigned. The fit rejects them, as it does when the published labels are sent (484 of 494 fitted
    // either way; withholdAmbiguous guards pairs that sit closer).
    withSigma: { model: Math.max(model, coincidence), perSigma: K_FITTED * st.sigmaFactor },
  };
}

/**
 * A seedable candidate of a band not yet fitted: its reference position shifted by the voted offset. `at`: the
 * band's offset and spacing in the source (looked up when not given).
 */
export function referencePrediction(
  ctx: AssignContext,
  offsets: OffsetVotes,
  { c, ci, bk }: CandidateRef,
  r: number | undefined,
  src: string,
  { offset: o, spacing }: BandPlacement = { offset: offsets.of(bk, src), spacing: ctx.spacing.get(bk) },
): Placement | undefined {
  if (!ctx.seedable[ci] || (!ctx.wide && c.j > (r ?? START_J) + GROWTH_J)) return undefined;
  // In the gap pass, past the low-J seeds, the tolerance stays that of the offset vote: a line list whose lines the
  // reference places that well is assigned from it at any J, while a reference too rough for it only seeds at low J
  // (widened like the low-J seeds, ten spurious peaks of a hot scan made a coincidence band of 13C16O 2-1).
  const beyondSeeds = ctx.wide && c.j > START_J + GROWTH_J;
  const tolerance = beyondSeeds ? o.tolerance : o.tolerance * (1 + (c.j / 20) ** 2);
  if (beyondSeeds && tolerance > WIDE_SPACING_FRACTION * (spacing ?? 0)) return undefined;
  return { position: c.position + shiftAt(o, c), tolerance, tier: 1 };
}

/** The fit of a round; when it cannot be made (too few lines or rank deficient), the thinnest band goes and again. */
export function fitDroppingThinBands(
  ctx: AssignContext,
  next: Map<number, CandidateLine>,
  scatter: ScatterEstimate | undefined,
): DetailedFit | undefined {
  let fit = tryFit(ctx, lineInputs(ctx, next), scatter);
  while (!fit && next.size > 0) {
    const thinnest = thinnestBand(next);
    for (const [i, c] of next) if (bandKey(c) === thinnest) next.delete(i);
    fit = tryFit(ctx, lineInputs(ctx, next), scatter);
  }
  return fit;
}

/**
 * Auto-assigned lines the fit rejects are withdrawn (a chance coincidence or a blend). Judged against the band's own
 * robust scatter and the line's σ, not the fit's pooled scale: a line a correct model explains stays, however noisy
 * its band. Returns how many were withdrawn.
 */
export function withdrawRejected(
  ctx: AssignContext,
  fit: DetailedFit,
  next: Map<number, CandidateLine>,
  banned: LoopState['banned'],
  iter: number,
  stats: ResidualStatistics = residualStatistics(ctx, fit, next),
): number {
  let withdrawn = 0;
  for (const l of autoLines(fit, next)) {
    const c = next.get(l.index);
    if (c && l.status === 'rejected' && !explained(ctx, fit, stats, c, l)) {
      const k = pairKey(ctx, l.index, c);
      banned.set(k, { at: iter, count: (banned.get(k)?.count ?? 0) + 1 });
      next.delete(l.index);
      ctx.notes.set(
        l.index,
        `automatic assignment to ${transitionLabel(c)} withdrawn: ${l.reason ?? 'rejected by the fit'}`,
      );
      withdrawn++;
    }
  }
  return withdrawn;
}

/**
 * A band whose fitted rotational constants stray from the reference ones by more than a real band can (1 %) was made
 * of coincidences: all its automatic lines go, for good. Returns how many were withdrawn.
 */
export function withdrawStrayBands(
  ctx: AssignContext,
  fit: DetailedFit,
  next: Map<number, CandidateLine>,
  banned: LoopState['banned'],
  iter: number,
): number {
  let withdrawn = 0;
  for (const bk of strayBands(fit, next, ctx.referenceDunham)) {
    for (const [i, c] of next) {
      if (bandKey(c) !== bk) continue;
      banned.set(pairKey(ctx, i, c), { at: iter, count: 3 });
      next.delete(i);
      ctx.notes.set(
        i,
        `automatic assignment to ${transitionLabel(c)} withdrawn: its band's fitted constants are far from the reference ones (chance coincidences)`,
      );
      withdrawn++;
    }
  }
  return withdrawn;
}

/**
 * With many lines left, candidates of weaker bands that share a level with the fit may seed too. Returns whether any
 * was added.
 */
export function widenSeeds(
  ctx: AssignContext,
  auto: ReadonlyMap<number, CandidateLine>,
  detailed: DetailedFit,
): boolean {
  const left = ctx.free.filter((p) => !auto.has(p.index)).length;
  if (left < 8) return false;
  const fittedLevels = new Set(detailed.result.levels.map((l) => `${l.species}|${l.v}`));
  let widened = 0;
  ctx.cands.forEach((c, i) => {
    if (ctx.seedable[i] || c.intensity < 1e-9 || i >= ctx.inWindow) return;
    if (fittedLevels.has(`${c.species}|${c.band.lower}`) || fittedLevels.has(`${c.species}|${c.band.upper}`)) {
      ctx.seedable[i] = true;
      widened++;
    }
  });
  return widened > 0;
}

/** A note on each unassigned line that lost a competition, naming the winner. */
export function noteCompetitions(ctx: AssignContext, state: LoopState): void {
  for (const c of state.competitions) {
    if (state.auto.has(c.peak)) continue;
    const winner = state.auto.get(c.winner);
    if (winner)
      ctx.notes.set(
        c.peak,
        `competed with line ${c.winner} for ${transitionLabel(winner)}; residual and intensity decided for line ${c.winner}`,
      );
  }
}

/**
 * Least margin, in χ² (−2 ln of the likelihood ratio), by which a line's label must beat every other label the
 * settled model admits for it: 16, a 4σ step, as the fit's rejection threshold (a pair of predictions 4σ apart or
 * closer cannot tell its lines apart; a line taken by the wrong one of a pair stays only past 4σ of its own).
 */
const AMBIGUITY_MARGIN = 16;

/**
 * Lines that two fitted predictions explain about equally well are withheld: near a band head R(J) and R(J′) close
 * in on one another (CO 3-0 R(0) and R(68) 0.007 cm⁻¹ apart, 2-0 R(50) and R(51) 0.011, R(28) and R(73) 0.017), a
 * pair may sit within the lines' noise, and where one of the pair is missing the other's prediction may take its
 * line. The settled model predicts every candidate of its fitted bands up to each band's highest J″ assigned, as a
 * round would (beyond it the model extrapolates to lines the list need not hold: a line the matcher took for a sharp
 * low-J prediction is not given up for them). A line whose label beats another admissible prediction of its source
 * (free, or held by a line of the source that would take this label in exchange) by less than AMBIGUITY_MARGIN is
 * left unassigned, with a note naming both labels; so is the other line of an exchange. Reference predictions of
 * bands not fitted are not judged here. Returns how many lines were withheld.
 */
export function withholdAmbiguous(ctx: AssignContext, offsets: OffsetVotes, state: LoopState): number {
  const fit = state.detailed;
  if (!fit || state.auto.size === 0) return 0;
  const model = roundModel(ctx, state);
  const holder = new Map<number, number>();
  for (const [i, c] of state.auto) holder.set(ctx.candIndex.get(c) as number, i);
  const withheld = new Map<number, string>();
  const free = new Map(ctx.free.map((p) => [p.index, p]));
  const peakOf = (i: number) => free.get(i) as ObservedPeak;
  ctx.sources.forEach((name, n) => {
    const preds = settledPredictions(ctx, offsets, model, { name, n, bands: [] });
    const sorted = [...preds].sort((a, b) => a[1].position - b[1].position);
    const at = copyFloats(sorted.map(([, p]) => p.position));
    // The widest tolerance any prediction has for a line of the source bounds the search around each line.
    const span = widestTolerance(
      sorted.map(([, p]) => p),
      (ctx.freeBySource.get(name) ?? []).reduce((m, p) => Math.max(m, p.sigma ?? 0), 0),
    );
    for (const [i, c] of state.auto) {
      if (sourceNumber(ctx, i) !== n) continue;
      const ci = ctx.candIndex.get(c) as number;
      const own = preds.get(ci);
      if (!own) continue;
      const pk = peakOf(i);
      const mine = labelChiSquare(own, pk);
      if (mine === undefined) continue;
      for (let k = lowerBound(at, pk.position - span); k < sorted.length; k++) {
        const [cj, q] = sorted[k] as [number, Prediction];
        if (q.position > pk.position + span) break;
        if (cj === ci) continue;
        const other = labelChiSquare(q, pk);
        if (other === undefined) continue;
        const h = holder.get(cj);
        if (h !== undefined && sourceNumber(ctx, h) !== n) continue;
        const exchange = h === undefined ? 0 : exchangeCost(own, q, peakOf(h));
        if (exchange === undefined) continue;
        const margin = other - mine + exchange;
        if (margin >= AMBIGUITY_MARGIN) continue;
        const why = `left unassigned: ${transitionLabel(c)} and ${transitionLabel(ctx.cands[cj] as CandidateLine)} are predicted ${Math.abs(q.position - own.position).toPrecision(2)} cm-1 apart, and this line fits either within its uncertainty (χ² differs by ${margin.toFixed(1)}, less than ${AMBIGUITY_MARGIN})`;
        withheld.set(i, why);
        if (h !== undefined) withheld.set(h, why);
      }
    }
  });
  for (const [i, why] of withheld) {
    state.auto.delete(i);
    ctx.notes.set(i, why);
  }
  return withheld.size;
}

/**
 * The predictions the settled model makes for one source: every candidate of each fitted band up to the band's
 * highest J″ assigned (its reach), first-tier predictions only, by candidate index.
 */
function settledPredictions(
  ctx: AssignContext,
  offsets: OffsetVotes,
  model: ReturnType<typeof roundModel>,
  src: SourceRef,
): Map<number, Prediction> {
  const preds = new Map<number, Prediction>();
  ctx.bandCands.forEach((list, b) => {
    const r = model.reach[b] as number;
    if (r < 0) return;
    for (const ci of list) {
      if ((ctx.cands[ci] as CandidateLine).j > r) break;
      const p = predictionOf(ctx, offsets, model, ci, src);
      if (p && (p.tier ?? 0) === 0) preds.set(ci, p);
    }
  });
  return preds;
}

/**
 * What an exchange of labels costs the line that holds the other label (χ² of its taking `own` less that of keeping
 * `theirs`); undefined when either label is inadmissible for it, so no exchange is possible.
 */
function exchangeCost(own: Prediction, theirs: Prediction, holder: ObservedPeak): number | undefined {
  const kept = labelChiSquare(theirs, holder);
  const swapped = labelChiSquare(own, holder);
  return kept === undefined || swapped === undefined ? undefined : swapped - kept;
}

/** The widest tolerance any of the predictions has for a line whose σ is at most `maxSigma` (as the matcher bounds it). */
export function widestTolerance(predictions: readonly Prediction[], maxSigma: number): number {
  let w = 0;
  for (const p of predictions) {
    const t = p.withSigma
      ? Math.max(p.tolerance, Math.hypot(p.withSigma.model, p.withSigma.perSigma * maxSigma))
      : p.tolerance;
    if (t > w) w = t;
  }
  return w;
}

/**
 * −2 ln of the likelihood of a line under a label, up to a constant: (Δ/s)² + 2 ln s with s the prediction's
 * standard deviation (its tolerance / K_FITTED), plus, when both intensities are known, the matcher's intensity term
 * on the same scale (0.5 (ln ratio)² against (Δ/tol)² there, so K_FITTED²/2 (ln ratio)² against (Δ/s)²: a ln-intensity
 * scatter of 0.28); undefined where the matcher would not admit the pair (beyond the tolerance or the intensity limit).
 */
export function labelChiSquare(pr: Prediction, pk: ObservedPeak): number | undefined {
  const s = toleranceFor(pr, pk) / K_FITTED;
  const z = (pk.position - pr.position) / s;
  if (Math.abs(z) > K_FITTED) return undefined;
  let chi = z * z + 2 * Math.log(s);
  if (pr.intensity !== undefined && pk.intensity !== undefined && pr.intensity > 0) {
    if (!(pk.intensity > 0)) return undefined;
    const lr = Math.log(pk.intensity / pr.intensity);
    if (Math.abs(lr) > Math.log(pr.intensityRatioLimit ?? 8)) return undefined;
    chi += 0.5 * K_FITTED * K_FITTED * lr * lr;
  }
  return chi;
}

/** Whether a line the fit rejected lies within the tolerance a correct model of its band leaves. */
export function explained(
  ctx: AssignContext,
  fit: DetailedFit,
  stats: ResidualStatistics,
  c: CandidateLine,
  l: { index: number; residual?: number },
): boolean {
  const p = fit.predict(c);
  if (!p || l.residual === undefined) return false;
  const st = stats.of(ctx.candBand[ctx.candIndex.get(c) as number] as number, sourceNumber(ctx, l.index));
  const model = K_FITTED * Math.sqrt(p.variance);
  const sigma = ctx.peaks[l.index]?.uncertainty;
  const tol =
    sigma !== undefined
      ? Math.hypot(model, K_FITTED * st.sigmaFactor * sigma)
      : Math.hypot(model, K_FITTED * st.scatter);
  const coincidence = COINCIDENCE_FRACTION * (ctx.spacing.get(bandKey(c)) ?? 0);
  return Math.abs(l.residual - st.shift) <= Math.max(tol, coincidence);
}

/** Why no line could be assigned, in the terms a caller can act on. */
export function nothingAssigned(ctx: AssignContext): ScienceError {
  const min = ctx.minLines;
  const names = speciesNames(ctx);
  if (ctx.free.length < min) {
    return new ScienceError(
      'FIT_NO_ASSIGNED_LINES',
      `${ctx.free.length} line(s) were sent without assignments: a band needs at least ${min} lines to be recognised and assigned automatically; send more lines, or assign them`,
      { lines: ctx.free.length, minLinesPerBand: min },
    );
  }
  const hint = wavelengthHint(ctx.lo, ctx.hi);
  if (hint) {
    // the likeliest cause first: a problem's detail is cut at 300 characters
    return new ScienceError('FIT_NO_ASSIGNED_LINES', `nothing matches the declared species ${names}${hint}`, {
      window: [ctx.lo, ctx.hi],
      suggestedUnit: 'um',
    });
  }
  if (ctx.inWindow === 0) {
    return new ScienceError(
      'FIT_NO_ASSIGNED_LINES',
      `nothing matches the declared species: no band of ${names} is predicted between ${ctx.lo.toFixed(1)} and ${ctx.hi.toFixed(1)} cm-1, where the lines lie`,
      { window: [ctx.lo, ctx.hi] },
    );
  }
  const bestBand = [
    ...groupBy(
      ctx.cands.filter((c, i) => ctx.seedable[i] && c.j <= START_J),
      bandKey,
    ),
  ]
    .map(([k, list]) => ({ k, list, best: bestBandOffset(list, ctx.free, ctx.maxOffset) }))
    .sort((a, b) => (b.best?.matches ?? 0) - (a.best?.matches ?? 0))[0];
  const beyond = bestBand ? beyondWindow(ctx, bestBand.k, bestBand.list) : undefined;
  if (bestBand && beyond) {
    // The remedy first: a problem's detail is cut at 300 characters.
    return new ScienceError(
      'FIT_NO_ASSIGNED_LINES',
      `nothing matches the declared species ${names} within ±${ctx.maxOffset} cm-1 ("options.maxOffset"), but at offset ${signed(beyond.offset)} cm-1 its band ${bestBand.k.replace('|', ' ')} finds ${beyond.matches} of its ${bestBand.list.length} strongest predicted lines: if the calibration is that far off, send a larger "options.maxOffset" (e.g. ${beyond.reach})`,
      { species: names, offsetFound: beyond.offset, suggestedMaxOffset: beyond.reach },
    );
  }
  return new ScienceError(
    'FIT_NO_ASSIGNED_LINES',
    `nothing matches the declared species ${names}: ${
      bestBand
        ? `its best band in the window, ${bestBand.k.replace('|', ' ')}, finds only ${bestBand.best?.matches ?? 0} of its ${bestBand.list.length} strongest predicted lines at any offset within ±${ctx.maxOffset} cm-1, and a band needs ${min}`
        : 'none of its bands has a strong line predicted where the lines lie'
    }`,
    { species: names },
  );
}

/**
 * Positions between 0.5 and 50 that match nothing read like vacuum wavelengths in µm sent without a unit (the
 * infrared from 200 to 20 000 cm⁻¹): say so, with the wavenumbers they would be.
 */
export function wavelengthHint(lo: number, hi: number): string {
  if (lo < 0.5 || hi > 50) return '';
  return ` between ${lo.toFixed(2)} and ${hi.toFixed(2)} cm-1; read as wavelengths in µm the lines would lie at ${(1e4 / hi).toFixed(1)}–${(1e4 / lo).toFixed(1)} cm-1: if they are, send "unit": "um"`;
}

export const signed = (x: number) => `${x >= 0 ? '+' : ''}${x.toFixed(3)}`;

/**
 * A band that matches too few lines within ±maxOffset but enough just beyond it (searched up to 4× maxOffset, within
 * half its line spacing, as bandNotFound does): the offset it finds there, its matches and a window that reaches it.
 */
export function beyondWindow(
  ctx: AssignContext,
  k: string,
  strong: readonly CandidateLine[],
): { offset: number; matches: number; reach: number } | undefined {
  const { maxOffset, minLines: min } = ctx;
  const wide = Math.min(4 * maxOffset, 0.45 * (ctx.spacing.get(k) ?? 4 * maxOffset));
  if (!(wide > maxOffset)) return undefined;
  const best = bestBandOffset(strong, ctx.free, wide);
  if (!best || best.matches < min || Math.abs(best.offset) <= maxOffset) return undefined;
  return { ...best, reach: Math.ceil((Math.abs(best.offset) + 0.05) * 10) / 10 };
}

/** The level fit of a round; undefined when too few lines or a rank deficiency leave it impossible. */
export function tryFit(ctx: AssignContext, lines: LineInput[], scatter?: ScatterEstimate): DetailedFit | undefined {
  // Lines of two or more sources that do not all reach the same levels: the sources' offsets carried
  // (fitRoundWithOffsets), so that lines of a level seen by two instruments do not pull against each other
  // (fittedPrediction adds them back); when no offset is determined or that fit fails, the round is fitted without.
  if (ctx.options.crossSources && ctx.sources.length > 1 && levelsSeenByOneSource(lines)) {
    const carried = loopFit(ctx, lines, scatter, (o) => fitRoundWithOffsets(lines, ctx.masses, o));
    if (carried) return carried;
  }
  return loopFit(ctx, lines, scatter, (o) => fitLineListDetailed(lines, ctx.masses, o));
}

/**
 * Whether some vibrational level is reached by the assigned lines of one source and not of another: only then can a
 * source's offset not be taken up per band and source (the shift of residualStatistics) and must be carried in the
 * round fits. When every source reaches every level (a list split line by line) the offsets stay out of the rounds:
 * carried there, estimated from a round's assignment, they took up the isotope shift of H79Br/H81Br and H35Cl/H37Cl
 * lines exchanged in one source and led the next rounds further astray (held-out seeds 93, 219: 171 and 204 lines
 * right before, 3 and 96 with them).
 */
export function levelsSeenByOneSource(lines: readonly LineInput[]): boolean {
  const bySource = new Map<string, Set<string>>();
  const all = new Set<string>();
  for (const l of lines) {
    const a = l.assignment;
    if (!a || l.source === undefined) continue;
    let set = bySource.get(l.source);
    if (!set) {
      set = new Set();
      bySource.set(l.source, set);
    }
    for (const v of [a.band.upper, a.band.lower]) {
      const k = `${a.species}|${v}`;
      set.add(k);
      all.add(k);
    }
  }
  if (bySource.size < 2) return false;
  for (const set of bySource.values()) if (set.size < all.size) return true;
  return false;
}

/** A round's fit with the loop's options (levels only, no checks), undefined when the lines cannot support one. */
function loopFit(
  ctx: AssignContext,
  lines: readonly LineInput[],
  scatter: ScatterEstimate | undefined,
  solve: (options: FitOptions) => DetailedFit | undefined,
): DetailedFit | undefined {
  try {
    // Few lines: B and D only, so that extrapolation to the next lines is not led astray by terms fitted to noise.
    const n = lines.filter((l) => l.assignment).length;
    const order = Math.min(ctx.options.fit?.maxCentrifugalOrder ?? 4, n < FEW_LINES ? 2 : 4);
    return solve({
      ...(ctx.options.fit ?? {}),
      levelsOnly: true,
      // The loop reads the lines, levels and predictions of its fits, never their warnings.
      withoutChecks: true,
      maxCentrifugalOrder: order,
      ...(scatter ? { reuseScatter: { from: scatter, growth: SCATTER_REUSE_GROWTH } } : {}),
    });
  } catch (e) {
    if (
      e instanceof ScienceError &&
      (e.code === 'FIT_TOO_FEW_LINES' || e.code === 'FIT_RANK_DEFICIENT' || e.code === 'FIT_NO_ASSIGNED_LINES')
    ) {
      return undefined;
    }
    throw e;
  }
}

/** The lines among `which` whose position equals that of a line sent before them (exact repeats, in index order). */
export function repeatedPositions(peaks: readonly PeakInput[], which: readonly number[]): number[] {
  const firstAt = new Map<number, number>();
  for (const [i, p] of peaks.entries()) if (!firstAt.has(p.position)) firstAt.set(p.position, i);
  return which.filter((i) => (firstAt.get((peaks[i] as PeakInput).position) as number) < i);
}

/** The final fit of the settled assignment (Dunham included), the unexplained lines, the bands and the calibration. */
export function finishAssignment(
  ctx: AssignContext,
  assigned: ReadonlyMap<number, CandidateLine>,
  offsets: OffsetVotes | undefined,
): AssignResult {
  if (!lineInputs(ctx, assigned).some((l) => l.assignment)) throw nothingAssigned(ctx);
  const start = ctx.warnings.length;
  const rounds = finalFit(ctx, assigned);
  const fittedByRounds = rounds.fit.result.statistics.fitted;
  const result = finishedWith(ctx, rounds, assigned, offsets);
  const placing = () => {
    const placed = withLinesTheFitPlaces(ctx, rounds);
    if (placed === rounds) return result;
    // The finishing warnings are made again for the lines now assigned.
    ctx.warnings.length = start;
    return { ...finishedWith(ctx, placed, new Map([...assigned, ...placed.auto]), offsets), fittedByRounds };
  };
  return { ...result, fittedByRounds, warningsAtFinish: result.warnings.length, withPlacedLines: placing };
}

/**
 * The assignment chosen among the attempts, with the lines its final fit places alone (fill.ts) and the warnings
 * added to it since it was finished (the temperature's); no longer able to add them. Only the chosen attempt is
 * placed: placed lines added to every attempt changed which one won (held-out seed 32: 774 lines right → 242).
 */
export function withPlacedLines(r: AssignResult): AssignResult {
  const { withPlacedLines: place, warningsAtFinish, ...rest } = r;
  if (!place) return rest;
  const { withPlacedLines: _, warningsAtFinish: __, ...placed } = place();
  return { ...rest, ...placed, warnings: [...placed.warnings, ...r.warnings.slice(warningsAtFinish)] };
}

/** The result of an assignment from its final fit: notes and warnings on what stayed out, bands, calibration. */
function finishedWith(
  ctx: AssignContext,
  final: ReturnType<typeof finalFit>,
  /** What the final fit was asked to fit (it may have withdrawn a band). */
  assigned: ReadonlyMap<number, CandidateLine>,
  offsets: OffsetVotes | undefined,
): AssignResult {
  const { fit, auto, lines } = final;
  const unexplained = ctx.peaks.flatMap((p, i) => (p.assignment || auto.has(i) ? [] : [i]));
  if (offsets) noteIntensityRefusals(ctx, auto, offsets, unexplained);
  const forIntensity = unexplained.filter((i) => ctx.intensityLeftOut.has(i));
  for (const i of forIntensity) ctx.notes.set(i, ctx.intensityLeftOut.get(i) as string);
  if (forIntensity.length > 0) {
    ctx.warnings.push({
      code: 'LINES_LEFT_OUT_FOR_INTENSITY',
      message: `${forIntensity.length} line(s) match a predicted band by position but were left out for their intensity (its observed-to-predicted intensity ratio strays more than ×${BAND_RATIO_LIMIT} from the main band's): if the intensities of different scans were normalised separately, label the lines with "source"`,
      lines: forIntensity,
    });
  }
  ctx.warnings.push(...intensityScaleWarnings(ctx, auto));
  // Lines of a band withdrawn by finalFit carry their own note and warning.
  const byNoBand = unexplained.filter((i) => !ctx.intensityLeftOut.has(i) && !assigned.has(i));
  if (byNoBand.length > 0) {
    const repeats = repeatedPositions(ctx.peaks, byNoBand);
    const why =
      repeats.length > 0
        ? `; ${repeats.length} of them repeat the position of an earlier line (a duplicated row?): lines ${repeats.slice(0, 10).join(', ')}${repeats.length > 10 ? ', …' : ''}`
        : '';
    ctx.warnings.push({
      code: 'LINES_UNEXPLAINED',
      message: `${byNoBand.length} line(s) are explained by no band of ${speciesNames(ctx)}; they stay unassigned and out of the fit${why}`,
      lines: byNoBand,
    });
  }
  const bands = bandSummaries(ctx, auto, offsets);
  const calibration = estimateCalibration(auto, ctx.peaks, ctx.species[0]?.iso.formula);
  return {
    fit,
    lines,
    notes: ctx.notes,
    ...(calibration ? { calibration } : {}),
    bands,
    unexplained,
    warnings: [...ctx.warnings],
  };
}

/**
 * The final fit again with the lines it places alone on free lines (fill.ts#linesTheFitPlaces), each noted; those
 * the new fit rejects are left out again (their earlier notes kept), with the fit before them when all were.
 */
function withLinesTheFitPlaces(ctx: AssignContext, final: ReturnType<typeof finalFit>): ReturnType<typeof finalFit> {
  const added = linesTheFitPlaces(ctx, final.fit, final.auto);
  if (!added) return final;
  const again = finalFit(ctx, new Map([...final.auto, ...added]));
  const kept = new Map([...added].filter(([i]) => again.fit.result.lines[i]?.status === 'fitted'));
  for (const [i, c] of kept)
    ctx.notes.set(i, `assigned at the end: the final fit places ${transitionLabel(c)} on this line alone`);
  if (kept.size === added.size) return again;
  return kept.size === 0 ? final : finalFit(ctx, new Map([...final.auto, ...kept]));
}

/**
 * The final fit of the assignment. The rounds fit levels only, with fewer centrifugal terms; when the full fit finds
 * the level model undetermined (FIT_RANK_DEFICIENT: a 837 K H79Br/H81Br 2-0 + 3-0 scan whose H81Br levels hung on
 * one thin hot band), the thinnest automatic band is withdrawn, its lines noted, and the fit made again, rather than
 * the whole list refused.
 */
export function finalFit(
  ctx: AssignContext,
  assigned: ReadonlyMap<number, CandidateLine>,
): { fit: DetailedFit; auto: ReadonlyMap<number, CandidateLine>; lines: LineInput[] } {
  let auto = assigned;
  for (;;) {
    const lines = lineInputs(ctx, auto);
    try {
      return { fit: fitLineListDetailed(lines, ctx.masses, ctx.options.fit ?? {}), auto, lines };
    } catch (e) {
      if (!(e instanceof ScienceError && e.code === 'FIT_RANK_DEFICIENT') || auto.size === 0) throw e;
      const thinnest = thinnestBand(auto);
      const kept = new Map([...auto].filter(([, c]) => bandKey(c) !== thinnest));
      if (!lineInputs(ctx, kept).some((l) => l.assignment)) throw e;
      for (const [i, c] of auto) {
        if (kept.has(i)) continue;
        ctx.notes.set(
          i,
          `automatic assignment to ${transitionLabel(c)} withdrawn: with its band the level model could not be determined (${e.message.slice(0, 160)})`,
        );
      }
      ctx.warnings.push({
        code: 'BAND_WITHDRAWN_UNDETERMINED',
        message: `${thinnest.replace('|', ' band ')}: its ${auto.size - kept.size} automatically assigned line(s) were withdrawn because with them ${e.message}`,
        lines: [...auto.keys()].filter((i) => !kept.has(i)),
      });
      auto = kept;
    }
  }
}

/**
 * Unassigned lines that a band's reference prediction takes by position but the matcher refused for their intensity
 * (against the main band's scale, before the band had its own): noted as left out for their intensity.
 */
export function noteIntensityRefusals(
  ctx: AssignContext,
  auto: ReadonlyMap<number, CandidateLine>,
  offsets: OffsetVotes,
  unexplained: readonly number[],
): void {
  const scale = intensityScales(auto, ctx.peaks);
  const seeds = ctx.cands.filter((_, ci) => ctx.seedable[ci]).sort((a, b) => a.position - b.position);
  const at = mapFloats(seeds, (c) => c.position);
  for (const i of unexplained) {
    const p = ctx.peaks[i] as PeakInput;
    if (p.intensity === undefined || !(p.intensity > 0) || ctx.intensityLeftOut.has(i)) continue;
    const source = p.source ?? '';
    const limit = ctx.maxOffset + 0.3;
    for (let k = lowerBound(at, p.position - limit); k < at.length && (at[k] as number) <= p.position + limit; k++) {
      const c = seeds[k] as CandidateLine;
      const bk = bandKey(c);
      const o = offsets.of(bk, source);
      if (Math.abs(p.position - c.position - shiftAt(o, c)) > o.tolerance) continue;
      if (scale.has(scaleKey(bk, source)) || o.established) continue;
      const ref = classScale(scale, c, source);
      if (ref === undefined) continue;
      const ratio = p.intensity / (ref * c.intensity);
      if (Math.abs(Math.log(ratio)) <= Math.log(BAND_RATIO_LIMIT)) continue;
      ctx.intensityLeftOut.set(
        i,
        `left out for its intensity: its position matches ${transitionLabel(c)} (${signed(p.position - c.position - shiftAt(o, c))} cm-1 from the reference with its offset), but its intensity is ×${ratioText(ratio)} the one expected on the main band's scale${source ? ` of source "${source}"` : ''} (more than ×${BAND_RATIO_LIMIT} either way), so it was taken for a coincidence`,
      );
      break;
    }
  }
}

/**
 * A band kept for its positions although its intensities are on a scale far from the main band's of the same source:
 * a warning naming the intensity scale (scans normalised separately?), since intensity-derived results would differ.
 */
export function intensityScaleWarnings(ctx: AssignContext, auto: ReadonlyMap<number, CandidateLine>): Warning[] {
  return [...strayingScales(auto, ctx.peaks).values()].map((b) => ({
    code: 'INTENSITY_SCALE_DIFFERS',
    message: `band ${b.bk.replace('|', ' ')}${b.source ? ` of source "${b.source}"` : ''} was assigned by its positions, but its observed-to-predicted intensity ratio is ×${ratioText(b.ratio)} that of the main band (more than ×${BAND_RATIO_LIMIT}): were its intensities normalised separately? Label the lines of each scan with "source" so that intensities are compared only within a scan`,
  }));
}

type BandCount = BandSummary & { seeds: CandidateLine[] };

/** Per band: lines predicted (seedable) and matched, with the strong seeds kept for the not-found search. */
export function bandCounts(ctx: AssignContext, auto: ReadonlyMap<number, CandidateLine>): Map<string, BandCount> {
  type Mutable = { -readonly [K in keyof BandCount]: BandCount[K] };
  const counts = new Map<string, Mutable>();
  ctx.cands.forEach((c, ci) => {
    const k = ctx.bands[ctx.candBand[ci] as number] as string;
    let b = counts.get(k);
    if (!b) {
      b = { species: c.species, band: formatBand(c.band), predicted: 0, matched: 0, seeds: [] };
      counts.set(k, b);
    }
    if (ctx.seedable[ci]) {
      b.seeds.push(c);
      b.predicted++;
    }
  });
  const count = (k: string) => {
    const b = counts.get(k);
    if (b) b.matched++;
  };
  for (const c of auto.values()) count(bandKey(c));
  for (const g of ctx.given) count(bandKey(g.t));
  return counts;
}

/** A summary per band worth naming, and a BAND_NOT_FOUND warning for each band with strong lines but few matches. */
export function bandSummaries(
  ctx: AssignContext,
  auto: ReadonlyMap<number, CandidateLine>,
  offsets: OffsetVotes | undefined,
): BandSummary[] {
  const bands: BandSummary[] = [];
  for (const [k, { seeds, ...b }] of bandCounts(ctx, auto)) {
    const strong = seeds.filter((c) => c.j <= START_J);
    if (b.matched === 0 && b.predicted < 3) continue;
    const used = ctx.sources.flatMap((s) => {
      const o = offsets?.perBand.get(`${k}#${s}`);
      return o ? [{ ...(s ? { source: s } : {}), offset: round(o.offset), own: o.own }] : [];
    });
    const summary: BandSummary = { ...b, ...(b.matched > 0 && used.length > 0 ? { offsets: used } : {}) };
    if (b.matched < ctx.minLines && strong.length >= 2 * ctx.minLines)
      bands.push(bandNotFound(ctx, k, summary, strong));
    else bands.push(summary);
  }
  return bands;
}

/**
 * A band with strong lines predicted but too few matched: its best offset, searched wider than maxOffset (up to 4×,
 * within half the line spacing), since the answer may be to widen it; and a warning saying so.
 */
export function bandNotFound(
  ctx: AssignContext,
  k: string,
  b: BandSummary,
  strong: readonly CandidateLine[],
): BandSummary {
  const { maxOffset, minLines: min } = ctx;
  const wide = Math.min(4 * maxOffset, 0.45 * (ctx.spacing.get(k) ?? 4 * maxOffset));
  const best = bestBandOffset(strong, ctx.free, Math.max(maxOffset, wide));
  ctx.warnings.push({
    code: 'BAND_NOT_FOUND',
    message: `${b.species} band ${b.band}: ${strong.length} strong lines are predicted in the window but ${b.matched === 0 ? 'none was' : `only ${b.matched} were`} matched${
      best
        ? `; its best offset is ${best.offset >= 0 ? '+' : ''}${best.offset.toFixed(3)} cm-1, which matches ${best.matches} of them${
            best.matches < min
              ? ''
              : Math.abs(best.offset) > maxOffset
                ? ` (beyond the ±${maxOffset} cm-1 searched: send a larger "maxOffset")`
                : refusedWithinReach(ctx, maxOffset)
          }`
        : ''
    }${best && best.matches >= min ? '' : ' (the band is absent, too weak, or shifted further)'}`,
  });
  return { ...b, ...(best ? { bestOffset: best } : {}) };
}

export const round = (x: number) => Math.round(x * 1e5) / 1e5;

/** Why a band whose best offset lies within reach and matches enough lines still has too few: what refused them. */
export function refusedWithinReach(ctx: AssignContext, maxOffset: number): string {
  const withIntensity = ctx.free.some((p) => p.intensity !== undefined);
  return ` (within the ±${maxOffset} cm-1 searched, yet refused: ${
    withIntensity
      ? `its lines' observed-to-predicted intensity ratio strays more than ×${BAND_RATIO_LIMIT} from that of the best-established band, so it was taken for a coincidence (are the intensities real?), or `
      : ''
  }their peaks went to lines of another band)`;
}

/**
 * Which candidates may seed a band: lines at least `floor` of the strongest line of their class. Pure rotation
 * (Δv = 0) is its own class: its strength comes from the permanent dipole, not from the vibrational transition
 * moment, so it cannot be ranked against infrared bands.
 */
export function seedFilter(cands: readonly CandidateLine[], floor: number): boolean[] {
  let maxIr = 0;
  let maxRot = 0;
  for (const c of cands) {
    if (c.band.upper === c.band.lower) maxRot = Math.max(maxRot, c.intensity);
    else maxIr = Math.max(maxIr, c.intensity);
  }
  return cands.map((c) => c.intensity >= floor * (c.band.upper === c.band.lower ? maxRot : maxIr));
}

export interface OffsetChoice {
  readonly offset: number;
  readonly tolerance: number;
  /** Found by the band's own vote, not the source's. */
  readonly own: boolean;
  /**
   * The band's own vote found it only with its reference positions drifting with J (src/assign/drift.ts): the
   * coefficient g, cm⁻¹, of g[(v′ + ½)² J′(J′ + 1) − (v″ + ½)² J″(J″ + 1)] added to every reference position.
   */
  readonly drift?: number;
  /**
   * Most of the band's strong predicted lines (at least 2 × minLines) lie on peaks at this offset that no other band
   * predicts: its intensities are not held against those of other bands (they may be on their own scale).
   */
  readonly established?: boolean;
}

/** Share of a band's strong predicted lines that must lie on peaks for its positions alone to establish it. */
const ESTABLISHED_SHARE = 0.6;

export interface OffsetVotes {
  readonly bySource: Map<string, OffsetChoice & { ambiguous: boolean }>;
  readonly perBand: Map<string, OffsetChoice>;
  of(band: string, source: string): OffsetChoice;
}

/**
 * Offsets by voting, per source of lines: first one for the whole source from its strongest predictions; then each
 * band votes alone, and keeps its own offset when that explains clearly more of its strong lines than the
 * source's (a band measured on another instrument, or against another calibration).
 */
export function voteOffsets(
  seeds: readonly CandidateLine[],
  freeBySource: ReadonlyMap<string, readonly ObservedPeak[]>,
  maxOffset: number,
  minLines: number,
  voters = { source: 80, band: 30 },
  reference?: ReadonlyMap<string, ReadonlyMap<string, number>>,
): OffsetVotes {
  const bySource = new Map<string, OffsetChoice & { ambiguous: boolean }>();
  const perBand = new Map<string, OffsetChoice>();
  const bands = new Map<string, CandidateLine[]>();
  for (const c of seeds) {
    const list = bands.get(bandKey(c)) ?? [];
    list.push(c);
    bands.set(bandKey(c), list);
  }
  for (const [src, peaks] of freeBySource) {
    const observed = peaks.map((p) => p.position);
    const choice = sourceOffset(seeds, observed, maxOffset, voters.source);
    bySource.set(src, choice);
    const sorted = copyFloats(observed).sort();
    const vote: BandVote = {
      seeds,
      observed,
      sorted,
      choice,
      maxOffset,
      minLines,
      ...(reference ? { reference } : {}),
    };
    for (const [bk, list] of bands) {
      const top = [...list].sort((a, b) => b.intensity - a.intensity).slice(0, voters.band);
      perBand.set(`${bk}#${src}`, bandOffset(vote, bk, top));
    }
  }
  return offsetVotes(bySource, perBand);
}

/** The offsets found, looked up per band and source (the source's when the band has none, else 0 ± 0.1). */
function offsetVotes(
  bySource: Map<string, OffsetChoice & { ambiguous: boolean }>,
  perBand: Map<string, OffsetChoice>,
): OffsetVotes {
  return {
    bySource,
    perBand,
    of: (band, source) =>
      perBand.get(`${band}#${source}`) ??
      bySource.get(source) ?? { offset: 0, tolerance: 0.1, own: false, ambiguous: false },
  };
}

/** One source's offset, voted by the strongest `voters` predictions against its peaks (ambiguous near a tie). */
function sourceOffset(
  seeds: readonly CandidateLine[],
  observed: readonly number[],
  maxOffset: number,
  voters: number,
): OffsetChoice & { ambiguous: boolean } {
  const strong = [...seeds].sort((a, b) => b.intensity - a.intensity).slice(0, voters);
  const est = estimateOffset(strong, observed, maxOffset, 0.06);
  return {
    offset: est?.offset ?? 0,
    tolerance: Math.min(Math.max(4 * (est?.spread ?? 0.05), 0.03), 0.3),
    own: false,
    ambiguous: est !== undefined && est.runnerUpVotes > 0.7 * est.votes,
  };
}

/** What a band's own vote is held against: every seed, one source's peaks (as sent and sorted) and its offset. */
interface BandVote {
  readonly seeds: readonly CandidateLine[];
  readonly observed: readonly number[];
  readonly sorted: Float64Array;
  readonly choice: OffsetChoice;
  readonly maxOffset: number;
  readonly minLines: number;
  /** The reference's Dunham coefficients per species: with them a band that finds too few lines may drift. */
  readonly reference?: ReadonlyMap<string, ReadonlyMap<string, number>>;
}

/**
 * A band's offset within one source from its strongest predictions (`top`): its own when that explains clearly more
 * of them than the source's, and established when most of them lie on peaks no other band predicts.
 */
function bandOffset(vote: BandVote, bk: string, top: readonly CandidateLine[]): OffsetChoice {
  const { seeds, observed, sorted, choice, maxOffset, minLines } = vote;
  if (top.length < minLines) return choice;
  let use: OffsetChoice = choice;
  const withSource = countNear(top, sorted, choice.offset, choice.tolerance);
  const own = estimateOffset(top, observed, maxOffset, 0.06);
  if (own) {
    const tol = Math.min(Math.max(4 * own.spread, 0.03), 0.3);
    // Peaks another band predicts at the source's offset are its, not evidence for this band's own offset:
    // the H81Br band moved by the isotope splitting lands on H79Br lines (a scan missing H81Br's strongest
    // lines gave it that offset, and every H79Br line went to H81Br).
    const claimed = claimedByOthers(seeds, bk, choice.offset);
    const n = countNear(top, sorted, own.offset, tol, claimed, choice.tolerance);
    if (n >= minLines && n >= withSource + 3 && n >= 2 * withSource)
      use = { offset: own.offset, tolerance: tol, own: true };
    else if (n < minLines && withSource < minLines) use = driftedOffset(top, vote, claimed, withSource) ?? use;
  }
  if (use === choice && withSource < minLines && vote.reference) use = fartherOffset(top, vote, bk, withSource) ?? use;
  // Most of the band's strong lines on peaks no other band predicts: its positions establish it, whatever scale
  // its intensities are on.
  const alone = countNear(
    use.drift === undefined ? top : top.map((c) => ({ position: c.position + shiftAt(use, c) - use.offset })),
    sorted,
    use.offset,
    use.tolerance,
    claimedByOthers(seeds, bk, use.offset),
    use.tolerance,
  );
  return alone >= 2 * minLines && alone >= ESTABLISHED_SHARE * top.length ? { ...use, established: true } : use;
}

/**
 * A band that finds too few of its strong lines at any one offset, tried once more with its reference positions
 * drifting with J (src/assign/drift.ts): kept when the drift explains at least minLines of them on peaks no other
 * band claims, three more and twice as many as the source's offset does.
 */
function driftedOffset(
  top: readonly CandidateLine[],
  vote: BandVote,
  claimed: Float64Array,
  withSource: number,
): OffsetChoice | undefined {
  const { observed, sorted, choice, maxOffset, minLines } = vote;
  const maxDrift = driftLimit(vote.reference?.get((top[0] as CandidateLine).species));
  const d = driftedVote(top, observed, sorted, maxOffset, maxDrift, claimed, choice.tolerance);
  if (!d || d.drift === 0 || d.matches < minLines || d.matches < withSource + 3 || d.matches < 2 * withSource)
    return undefined;
  return { offset: d.offset, tolerance: d.tolerance, own: true, drift: d.drift };
}

/**
 * A band that finds too few of its strong lines within ±maxOffset, plainly or drifting, searched farther: as far as
 * its reference origin is uncertain (src/assign/reach.ts), the reach doubling from 2 maxOffset, plainly and drifting
 * at each reach. The placement that puts most of its strong lines on peaks no other band claims wins (ties: the
 * smaller reach, plain before drifting): a wider reach or a drift can put a few lines on coincidences (a 3-0 R
 * branch folding back at its head onto the lines of lower J), not as many as the true placement. Only placements
 * beyond the window count (an H79Br 4-1 placed inside it this way, 7 of 9 lines, turned a dense 2-0 + 3-0 list from
 * 345 lines right into 6 right and 47 wrong). Kept on the terms of the band's own offset (at least minLines such
 * lines, three more and twice as many as the source's offset puts) and when chance would give as many with
 * probability below FARTHER_CHANCE (chanceOfFarther: a dense list needs far more matches than a sparse one).
 */
function fartherOffset(
  top: readonly CandidateLine[],
  vote: BandVote,
  bk: string,
  withSource: number,
): OffsetChoice | undefined {
  const { seeds, observed, sorted, choice, maxOffset, minLines } = vote;
  const cap = offsetReach(top, maxOffset);
  if (!(cap > maxOffset)) return undefined;
  const claimed = claimedByOthers(seeds, bk, choice.offset);
  const maxDrift = driftLimit(vote.reference?.get((top[0] as CandidateLine).species));
  let best: { choice: OffsetChoice; matches: number } | undefined;
  // Only placements beyond the window: within it the band's own vote, plain and drifting, had its say.
  const consider = (c: OffsetChoice, matches: number) => {
    if (Math.abs(c.offset) > maxOffset && (!best || matches > best.matches)) best = { choice: c, matches };
  };
  for (let reach = Math.min(2 * maxOffset, cap); ; reach = Math.min(2 * reach, cap)) {
    const est = estimateOffset(top, observed, reach, 0.06);
    if (est) {
      const tol = Math.min(Math.max(4 * est.spread, 0.03), 0.3);
      consider(
        { offset: est.offset, tolerance: tol, own: true },
        countNear(top, sorted, est.offset, tol, claimed, choice.tolerance),
      );
    }
    const d = driftedVote(top, observed, sorted, reach, maxDrift, claimed, choice.tolerance);
    if (d && d.drift !== 0)
      consider({ offset: d.offset, tolerance: d.tolerance, own: true, drift: d.drift }, d.matches);
    if (reach >= cap) break;
  }
  const found = best as { choice: OffsetChoice; matches: number } | undefined;
  if (!found) return undefined;
  const n = found.matches;
  if (n < minLines || n < withSource + 3 || n < 2 * withSource) return undefined;
  return chanceOfFarther(top, sorted, found.choice, n, cap, maxDrift) < FARTHER_CHANCE ? found.choice : undefined;
}

/**
 * How likely chance alone explains a farther placement (src/assign/reach.ts#chanceOfPlacement): the peak density
 * over the band's strong lines widened by the reach, the placements tried the reach over the tolerance, times the
 * drifts that move the band's strong lines apart by more than the tolerance when a drift was searched.
 */
function chanceOfFarther(
  top: readonly CandidateLine[],
  sorted: Float64Array,
  choice: OffsetChoice,
  matches: number,
  cap: number,
  maxDrift: number,
): number {
  let lo = Number.POSITIVE_INFINITY;
  let hi = Number.NEGATIVE_INFINITY;
  let largest = 0;
  for (const c of top) {
    lo = Math.min(lo, c.position);
    hi = Math.max(hi, c.position);
    largest = Math.max(largest, Math.abs(driftFactor(c)));
  }
  const peaks = lowerBound(sorted, hi + cap + 1e-12) - lowerBound(sorted, lo - cap);
  const density = peaks / (hi - lo + 2 * cap);
  const tol = choice.tolerance;
  const drifts = choice.drift === undefined ? 1 : 1 + (2 * maxDrift * largest) / tol;
  return chanceOfPlacement(matches, top.length, tol, density, (cap / tol) * drifts);
}

/**
 * The offsets of the gap pass: a source whose lines the low-J vote already assigned (at least minLines of them) keeps
 * its offsets; any other votes again over the strong lines of every J (more of them: a band may have lost its
 * strongest lines to a gap).
 */
export function widenedOffsets(
  ctx: AssignContext,
  first: OffsetVotes,
  auto: ReadonlyMap<number, CandidateLine>,
): OffsetVotes {
  const assigned = new Map<string, number>();
  for (const i of auto.keys()) {
    const s = ctx.peaks[i]?.source ?? '';
    assigned.set(s, (assigned.get(s) ?? 0) + 1);
  }
  const again = new Map([...ctx.freeBySource].filter(([s]) => (assigned.get(s) ?? 0) < ctx.minLines));
  if (again.size === 0) return first;
  const wide = voteOffsets(
    ctx.cands.filter((_, i) => ctx.seedable[i]),
    again,
    ctx.maxOffset,
    ctx.minLines,
    { source: 300, band: 60 },
    ctx.referenceDunham,
  );
  const bySource = new Map(first.bySource);
  const perBand = new Map(first.perBand);
  for (const [s, o] of wide.bySource) bySource.set(s, o);
  for (const [k, o] of wide.perBand) perBand.set(k, o);
  return offsetVotes(bySource, perBand);
}

/** Where the seeds of every band but `band` are predicted at the given offset, sorted. */
export function claimedByOthers(seeds: readonly CandidateLine[], band: string, offset: number): Float64Array {
  const out: number[] = [];
  for (const c of seeds) if (bandKey(c) !== band) out.push(c.position + offset);
  return copyFloats(out).sort();
}

/** The best offset a band's own strong predictions find among the free peaks, and how many they then match. */
export function bestBandOffset(
  strong: readonly CandidateLine[],
  free: readonly ObservedPeak[],
  maxOffset: number,
): { offset: number; matches: number } | undefined {
  const observed = free.map((p) => p.position);
  const est = estimateOffset(strong, observed, maxOffset, 0.06);
  if (!est) return undefined;
  const tol = Math.min(Math.max(4 * est.spread, 0.03), 0.3);
  return {
    offset: round(est.offset),
    matches: countNear(strong, copyFloats(observed).sort(), est.offset, tol),
  };
}

export interface ResidualStatistics {
  /** For a band and a source, by their numbers (AssignContext.bands, AssignContext.sources). */
  of(band: number, source: number): ResidualStat;
}

export interface ResidualStat {
  readonly shift: number;
  readonly scatter: number;
  readonly sigmaFactor: number;
}

/** Residuals of one band and source: in cm⁻¹ for lines without σ, in units of σ for lines with one (and that σ). */
export interface ResidualGroup {
  readonly r: number[];
  readonly z: number[];
  readonly sigma: number[];
}

/**
 * From the fitted assignment, per band and source: the median residual (a source's calibration relative to the
 * fit), and the noise a correct model leaves, taken from the fit itself (`DetailedFit.lineSigma`): for lines
 * without σ the scatter the fit estimated for their source or band (cm⁻¹), for lines with σ the factor the fit
 * applies to their stated σ (its per-group rescaling and √s²) at the median σ of the band's lines. So the
 * assignment judges lines by the σ the fit weighs them with, never narrower than the band's own robust scatter
 * (the fit's σ may be pooled over bands or carried from an earlier round by `reuseScatter`, and a tolerance below
 * a band's scatter drops its noisiest lines: matching must not shrink the variance); bands with few lines take
 * the pooled scatter, and where the fit gives no finite σ the robust scatter alone.
 */
export function residualStatistics(
  ctx: AssignContext,
  fit: DetailedFit,
  auto: ReadonlyMap<number, CandidateLine>,
): ResidualStatistics {
  const { shifts, groups, pooled } = residualGroups(ctx, fit, auto);
  const scatterOf = (g: ResidualGroup | undefined) =>
    g && g.r.length >= MIN_FOR_OWN_SCATTER ? robustSigma(g.r) : pooled.r.length >= 3 ? robustSigma(pooled.r) : 0.01;
  const factorOf = (g: ResidualGroup | undefined) =>
    Math.max(
      1,
      g && g.z.length >= MIN_FOR_OWN_SCATTER ? robustSigma(g.z) : pooled.z.length >= 3 ? robustSigma(pooled.z) : 1,
    );
  const fitSigma = (band: number, source: number, uncertainty?: number) => {
    const t = transitionOfBand(ctx.bands[band] ?? '');
    const name = ctx.sources[source] ?? '';
    const s = t
      ? fit.lineSigma(t, {
          ...(uncertainty !== undefined ? { uncertainty } : {}),
          ...(name !== '' ? { source: name } : {}),
        })
      : Number.NaN;
    return Number.isFinite(s) && s > 0 ? s : undefined;
  };
  // Asked once per candidate and round: each band's answer is computed once.
  const known = new Map<number, ResidualStat>();
  const nSources = ctx.sources.length;
  return {
    of(band, source) {
      const k = band * nSources + source;
      let st = known.get(k);
      if (!st) {
        const g = groups.get(k);
        const own = scatterOf(g);
        const fitted = fitSigma(band, source);
        const given = g && g.sigma.length > 0 ? g.sigma : pooled.sigma;
        const typical = given.length > 0 ? robustMedian(given) : undefined;
        const scaled = typical !== undefined ? fitSigma(band, source, typical) : undefined;
        st = {
          shift: shifts.get(k) ?? 0,
          scatter: fitted !== undefined ? Math.max(fitted, own) : own,
          sigmaFactor:
            scaled !== undefined && typical !== undefined ? Math.max(scaled / typical, factorOf(g)) : factorOf(g),
        };
        known.set(k, st);
      }
      return st;
    },
  };
}

/** A transition of a band given by its key (`species|v′-v″`), for asking the fit the σ of its lines. */
export function transitionOfBand(band: string): Transition | undefined {
  const [species, vs] = band.split('|');
  const [upper, lower] = (vs ?? '').split('-').map(Number);
  if (species === undefined || !Number.isInteger(upper) || !Number.isInteger(lower)) return undefined;
  return { species, band: { upper: upper as number, lower: lower as number }, branch: 'R', j: 0 };
}

/**
 * The fitted automatic lines grouped by band and source (key band × sources + source): each group's median residual
 * (0 under three lines), and the residuals about it per group and pooled.
 */
export function residualGroups(
  ctx: AssignContext,
  fit: DetailedFit,
  auto: ReadonlyMap<number, CandidateLine>,
): { shifts: Map<number, number>; groups: Map<number, ResidualGroup>; pooled: ResidualGroup } {
  const nSources = ctx.sources.length;
  // The members as parallel lists (key, line, residual): no object per line.
  const keys: number[] = [];
  const lines: number[] = [];
  const residuals: number[] = [];
  const byKey = new Map<number, number[]>();
  for (const l of autoLines(fit, auto)) {
    const c = auto.get(l.index);
    if (!c || l.status !== 'fitted' || l.residual === undefined) continue;
    const key = (ctx.candBand[ctx.candIndex.get(c) as number] as number) * nSources + sourceNumber(ctx, l.index);
    keys.push(key);
    lines.push(l.index);
    residuals.push(l.residual);
    const list = byKey.get(key);
    if (list) list.push(l.residual);
    else byKey.set(key, [l.residual]);
  }
  const shifts = new Map<number, number>();
  for (const [k, list] of byKey) shifts.set(k, list.length >= 3 ? robustMedian(list) : 0);
  const groups = new Map<number, ResidualGroup>();
  const pooled: ResidualGroup = { r: [], z: [], sigma: [] };
  for (let m = 0; m < keys.length; m++) {
    const key = keys[m] as number;
    const r = (residuals[m] as number) - (shifts.get(key) ?? 0);
    const sigma = ctx.peaks[lines[m] as number]?.uncertainty;
    let g = groups.get(key);
    if (!g) {
      g = { r: [], z: [], sigma: [] };
      groups.set(key, g);
    }
    addResidual(g, r, sigma);
    addResidual(pooled, r, sigma);
  }
  return { shifts, groups, pooled };
}

/**
 * The fit's records of the automatically assigned lines, in the order of the lines (ascending index): looked up by
 * index (a fit's lines are those it was given, in order) rather than by scanning every line sent.
 */
export function autoLines(fit: DetailedFit, auto: ReadonlyMap<number, CandidateLine>): readonly LineOutcome[] {
  const lines = fit.result.lines;
  const at = copyInts([...auto.keys()]).sort();
  const out: LineOutcome[] = [];
  for (const i of at) {
    const l = lines[i];
    // Not the fit of these lines: every line, as they come.
    if (l === undefined || l.index !== i) return lines;
    out.push(l);
  }
  return out;
}

/** A residual into its group: in cm⁻¹ for a line without σ, in units of σ (and that σ) for a line with one. */
function addResidual(into: ResidualGroup, r: number, sigma: number | undefined): void {
  if (sigma === undefined) into.r.push(r);
  else {
    into.z.push(r / sigma);
    into.sigma.push(sigma);
  }
}

export function sameAssignments(a: ReadonlyMap<number, CandidateLine>, b: ReadonlyMap<number, CandidateLine>): boolean {
  if (a.size !== b.size) return false;
  for (const [k, v] of a) if (b.get(k) !== v) return false;
  return true;
}

/**
 * How far a band's observed/predicted intensity ratio may stray from that of the best-established band of its
 * class before the band is taken for a coincidence (the band-strength guesses are good to a few times; common
 * practice, generous).
 */
const BAND_RATIO_LIMIT = 20;

export const bandClass = (c: CandidateLine) => (c.band.upper === c.band.lower ? 'rot' : 'ir');

/** Key of a band's intensity scale within one source of lines: each source has its own scale. */
export const scaleKey = (bk: string, source: string) => `${bk}@${source}`;

/** The intensity scale of the band with the most matched lines of the candidate's class in the same source. */
export function classScale(scale: ReadonlyMap<string, number>, c: CandidateLine, source: string): number | undefined {
  return scale.get(scaleKey(`#${bandClass(c)}`, source));
}

/** Per band and source, how far its intensity scale strays from that of the main band of its class (a ratio). */
export function strayingScales(
  auto: ReadonlyMap<number, CandidateLine>,
  peaks: readonly PeakInput[],
  groups: ReturnType<typeof scaleGroups> = scaleGroups(auto, peaks),
): Map<string, { bk: string; source: string; ratio: number }> {
  const scale = intensityScales(auto, peaks, groups);
  const out = new Map<string, { bk: string; source: string; ratio: number }>();
  // Judged once per group, in the order of its first line (the order the warnings are listed in).
  const judged = new Set<ScaleGroup>();
  for (const g of groups.ofLine) {
    if (judged.has(g)) continue;
    judged.add(g);
    const own = scale.get(g.key);
    const ref = scale.get(g.cls);
    if (own !== undefined && ref !== undefined && Math.abs(Math.log(own / ref)) > Math.log(BAND_RATIO_LIMIT))
      out.set(g.key, { bk: g.bk, source: g.source, ratio: own / ref });
  }
  return out;
}

/**
 * Bands whose matched lines are far stronger or weaker than their predictions relative to the main band of the same
 * source, unless their positions establish them (OffsetChoice.established); the lines dropped get a note saying so.
 */
export function pruneImplausibleBands(
  ctx: AssignContext,
  offsets: OffsetVotes,
  auto: Map<number, CandidateLine>,
): void {
  const groups = scaleGroups(auto, ctx.peaks);
  const bad = strayingScales(auto, ctx.peaks, groups);
  if (bad.size === 0) return;
  let n = 0;
  for (const [i, c] of auto) {
    const g = groups.ofLine[n++] as ScaleGroup;
    const b = bad.get(g.key);
    if (!b || offsets.of(b.bk, g.source).established) continue;
    auto.delete(i);
    ctx.intensityLeftOut.set(
      i,
      `left out for its intensity: a match for ${transitionLabel(c)} by position, but that band's observed-to-predicted intensity ratio is ×${ratioText(b.ratio)} that of the main band${g.source ? ` of source "${g.source}"` : ''} (more than ×${BAND_RATIO_LIMIT} either way), so it was taken for a coincidence`,
    );
  }
}

export const ratioText = (r: number) => (r >= 1 ? r.toPrecision(3) : `1/${(1 / r).toPrecision(3)}`);

/**
 * Isotopologues of one molecule assigned jointly: where the same transition of two isotopologues lies closer than
 * DOUBLET_WIDTH, the reference constants predict the splitting far better than either position (their errors are
 * common to both, through the mass scaling), and the abundance ratio predicts the intensity ratio. Each such pair
 * of matched peaks keeps the labelling that fits the predicted splitting and, when intensities were sent, the
 * abundance ratio (a soft constraint, ln-ratio σ 0.3), or swaps its two labels when the swap fits better.
 */
export function resolveDoublets(auto: Map<number, CandidateLine>, peaks: readonly PeakInput[]): void {
  // A doublet needs two isotopologues: with one species among the lines there is nothing to judge.
  let species: string | undefined;
  let mixed = false;
  for (const c of auto.values()) {
    if (species === undefined) species = c.species;
    else if (c.species !== species) {
      mixed = true;
      break;
    }
  }
  if (!mixed) return;
  // Keyed by band, branch and J″ as one number (every species' line of one transition in one group).
  const groups = new Map<number, number[]>();
  for (const [i, c] of auto) {
    const k =
      ((c.band.upper * 256 + c.band.lower) * 3 + (c.branch === 'P' ? 0 : c.branch === 'Q' ? 1 : 2)) * 4096 + c.j;
    const list = groups.get(k) ?? [];
    list.push(i);
    groups.set(k, list);
  }
  for (const list of groups.values()) {
    if (list.length !== 2) continue;
    const [i, k] = list as [number, number];
    const a = auto.get(i) as CandidateLine;
    const b = auto.get(k) as CandidateLine;
    if (a.species === b.species) continue;
    const predicted = a.position - b.position;
    if (Math.abs(predicted) > DOUBLET_WIDTH) continue;
    const pa = peaks[i] as PeakInput;
    const pb = peaks[k] as PeakInput;
    const observed = pa.position - pb.position;
    const scale = Math.max(Math.abs(predicted) * 0.05, pa.uncertainty ?? 0, pb.uncertainty ?? 0, 1e-4);
    let keep = ((observed - predicted) / scale) ** 2;
    let swap = ((-observed - predicted) / scale) ** 2;
    // The candidates' relative intensities carry the abundances.
    if (pa.intensity && pb.intensity && a.intensity > 0 && b.intensity > 0) {
      const expected = Math.log(a.intensity / b.intensity);
      const lr = Math.log(pa.intensity / pb.intensity);
      keep += ((lr - expected) / 0.3) ** 2;
      swap += ((-lr - expected) / 0.3) ** 2;
    }
    if (swap < keep) {
      auto.set(i, b);
      auto.set(k, a);
    }
  }
}

/** Transitions of two isotopologues closer than this (cm⁻¹) are judged as a doublet. */
const DOUBLET_WIDTH = 1;

/** Largest relative difference between a fitted B_v and the reference one for a band to be believed. */
const MAX_B_DEVIATION = 0.01;

/**
 * Bands with automatic lines whose levels' fitted B_v differ from the reference library's by more than
 * MAX_B_DEVIATION (relative). Reference B_v = Σ_k Y_k1 (v + ½)^k.
 */
export function strayBands(
  fit: DetailedFit,
  auto: ReadonlyMap<number, CandidateLine>,
  ref: AssignContext['referenceDunham'],
): Set<string> {
  const referenceB = (formula: string, v: number): number | undefined => {
    const y = ref.get(formula);
    if (!y) return undefined;
    let b = 0;
    for (const [k, val] of y) {
      const [i, l] = k.split(',').map(Number) as [number, number];
      if (l === 1) b += val * (v + 0.5) ** i;
    }
    return b;
  };
  const stray = new Set<string>();
  const bands = new Map<string, CandidateLine>();
  for (const c of auto.values()) bands.set(bandKey(c), c);
  for (const [bk, c] of bands) {
    for (const v of [c.band.lower, c.band.upper]) {
      const level = fit.result.levels.find((l) => l.species === c.species && l.v === v);
      const b = referenceB(c.species, v);
      if (!level || b === undefined) continue;
      if (Math.abs(level.B.value / b - 1) > MAX_B_DEVIATION) stray.add(bk);
    }
  }
  return stray;
}

/** The library's Dunham coefficients of each isotopologue that has them (made once per assignment). */
export function referenceDunham(species: readonly { iso: Isotopologue }[]): Map<string, Map<string, number>> {
  const ref = new Map<string, Map<string, number>>();
  for (const s of species) {
    const e = constantsFor(s.iso);
    if (e) ref.set(s.iso.formula, dunhamFromEntry(e));
  }
  return ref;
}

/** Per band, the median distance between neighbouring lines of one branch (about 2B). */
export function lineSpacings(ctx: Pick<AssignContext, 'cands' | 'candBand' | 'bands'>): Map<string, number> {
  // Per band and branch (3b + 0, 1, 2 for P, Q, R), the position of each J″: the last candidate of a J wins.
  const byBranch = new Map<number, Map<number, number>>();
  ctx.cands.forEach((c, ci) => {
    const k = 3 * (ctx.candBand[ci] as number) + (c.branch === 'P' ? 0 : c.branch === 'Q' ? 1 : 2);
    let m = byBranch.get(k);
    if (!m) {
      m = new Map<number, number>();
      byBranch.set(k, m);
    }
    m.set(c.j, c.position);
  });
  const d = new Map<number, number[]>();
  for (const [k, m] of byBranch) {
    const b = Math.floor(k / 3);
    const list = d.get(b) ?? [];
    for (const [j, x] of m) {
      const y = m.get(j + 1);
      if (y !== undefined) list.push(Math.abs(y - x));
    }
    d.set(b, list);
  }
  const out = new Map<string, number>();
  for (const [b, list] of d) if (list.length > 0) out.set(ctx.bands[b] as string, robustMedian(list));
  return out;
}

export function groupBy<T>(xs: readonly T[], key: (x: T) => string): Map<string, T[]> {
  const out = new Map<string, T[]>();
  for (const x of xs) {
    const k = key(x);
    const list = out.get(k) ?? [];
    list.push(x);
    out.set(k, list);
  }
  return out;
}

/** The band with the fewest automatically assigned lines. */
export function thinnestBand(auto: ReadonlyMap<number, CandidateLine>): string {
  const count = new Map<string, number>();
  for (const c of auto.values()) count.set(bandKey(c), (count.get(bandKey(c)) ?? 0) + 1);
  return [...count].sort((a, b) => a[1] - b[1])[0]?.[0] ?? '';
}

/**
 * Bands with fewer lines than the minimum are more likely coincidences than bands. The caller's given assignments
 * count: a band anchored by given lines is no coincidence, and its first automatic lines (R(4)–R(6) past given
 * J ≤ 3) are how it grows.
 */
export function pruneThinBands(
  auto: Map<number, CandidateLine>,
  min: number,
  given: readonly { readonly t: Parameters<typeof bandKey>[0] }[],
): void {
  const count = new Map<string, number>();
  for (const g of given) count.set(bandKey(g.t), (count.get(bandKey(g.t)) ?? 0) + 1);
  // Each line's band key looked up once, in the map's order.
  const keys: string[] = [];
  for (const c of auto.values()) {
    const k = bandKey(c);
    keys.push(k);
    count.set(k, (count.get(k) ?? 0) + 1);
  }
  let n = 0;
  for (const i of auto.keys()) if ((count.get(keys[n++] as string) ?? 0) < min) auto.delete(i);
}

/** The automatic lines of one band within one source, with the observed/predicted intensity ratios of those that carry an intensity. */
export interface ScaleGroup {
  readonly species: string;
  readonly bk: string;
  readonly source: string;
  /** scaleKey of the band and of its class within the source. */
  readonly key: string;
  readonly cls: string;
  readonly ratios: number[];
}

/**
 * The automatic lines grouped by band and source: each line's group (in the map's order), and the groups in the
 * order of their first line with an intensity. A band's candidates share its band object: the keys are made once
 * per band and source, not per line.
 */
export function scaleGroups(
  auto: ReadonlyMap<number, CandidateLine>,
  peaks: readonly PeakInput[],
): { readonly ofLine: ScaleGroup[]; readonly withRatios: ScaleGroup[] } {
  const byBand = new Map<CandidateLine['band'], Map<string, ScaleGroup>>();
  const byKey = new Map<string, ScaleGroup>();
  const ofLine: ScaleGroup[] = [];
  const withRatios: ScaleGroup[] = [];
  for (const [i, c] of auto) {
    const source = peaks[i]?.source ?? '';
    let bySource = byBand.get(c.band);
    if (!bySource) {
      bySource = new Map();
      byBand.set(c.band, bySource);
    }
    let g = bySource.get(source);
    if (!g || g.species !== c.species) g = scaleGroupOf(byKey, c, source, bySource);
    ofLine.push(g);
    const obs = peaks[i]?.intensity;
    if (obs === undefined || !(obs > 0)) continue;
    if (g.ratios.length === 0) withRatios.push(g);
    g.ratios.push(obs / c.intensity);
  }
  return { ofLine, withRatios };
}

/** The group of a candidate's band within a source, by its key (made on first use; kept by band object when it may). */
function scaleGroupOf(
  byKey: Map<string, ScaleGroup>,
  c: CandidateLine,
  source: string,
  bySource: Map<string, ScaleGroup>,
): ScaleGroup {
  const bk = bandKey(c);
  const key = scaleKey(bk, source);
  let g = byKey.get(key);
  if (!g) {
    g = { species: c.species, bk, source, key, cls: scaleKey(`#${bandClass(c)}`, source), ratios: [] };
    byKey.set(key, g);
  }
  if (!bySource.has(source)) bySource.set(source, g);
  return g;
}

/** Per band, the median ratio of observed to predicted intensity over the matched lines (three or more). */
export function intensityScales(
  auto: ReadonlyMap<number, CandidateLine>,
  peaks: readonly PeakInput[],
  groups: ReturnType<typeof scaleGroups> = scaleGroups(auto, peaks),
): Map<string, number> {
  const out = new Map<string, number>();
  const best = new Map<string, number>();
  for (const { key, cls, ratios: r } of groups.withRatios) {
    if (r.length < 3) continue;
    // One median per band and source: its class takes the same value when this band has the most lines.
    const m = median(r);
    out.set(key, m);
    if (r.length > (best.get(cls) ?? 0)) {
      best.set(cls, r.length);
      out.set(cls, m);
    }
  }
  return out;
}

export function estimateCalibration(
  auto: ReadonlyMap<number, CandidateLine>,
  peaks: readonly PeakInput[],
  mainSpecies: string | undefined,
): Calibration | undefined {
  const pts: CalibrationPoint[] = [];
  for (const [i, c] of auto) {
    if (c.species !== mainSpecies || c.j > 20) continue;
    const p = peaks[i] as PeakInput;
    pts.push({
      reference: c.position,
      observed: p.position,
      ...(p.uncertainty !== undefined ? { uncertainty: p.uncertainty } : {}),
    });
  }
  return calibrationFromPoints(pts, `reference-library positions of ${mainSpecies}`);
}

export interface CalibrationPoint {
  readonly reference: number;
  readonly observed: number;
  readonly uncertainty?: number;
}

/**
 * Offset and scale of the wavenumber axis against reference positions: a weighted linear regression of
 * observed − reference on (reference − centre), covariance scaled a posteriori. The offset is reported at the
 * centre of the lines, where it is least correlated with the scale; the scale only when the lines span at least
 * 1 % of the centre (otherwise the two cannot be told apart).
 */
export function calibrationFromPoints(pts: readonly CalibrationPoint[], reference: string): Calibration | undefined {
  if (pts.length < 3) return undefined;
  const w = pts.map((p) => 1 / (p.uncertainty ?? 1) ** 2);
  let sw = 0;
  let swx = 0;
  pts.forEach((p, i) => {
    sw += w[i] as number;
    swx += (w[i] as number) * p.reference;
  });
  const centre = swx / sw;
  const xs = pts.map((p) => p.reference);
  const span = spanOf(xs);
  const withScale = span >= 0.01 * centre && pts.length >= 4;
  const n = pts.length;
  const cols = withScale ? 2 : 1;
  const design = floats(n * cols);
  pts.forEach((p, i) => {
    design[i] = 1;
    if (withScale) design[n + i] = p.reference - centre;
  });
  const r = solveLeastSquares({
    rows: n,
    cols,
    design,
    observations: mapFloats(pts, (p) => p.observed - p.reference),
    weights: copyFloats(w),
  });
  if (r.rankDeficient) return undefined;
  const s2 = n > cols ? r.chiSquare / (n - cols) : 1;
  const sd = (j: number) => Math.sqrt(s2 * (r.covariance[j * cols + j] as number));
  return {
    offset: quantity(r.coefficients[0] as number, sd(0), 'cm-1'),
    ...(withScale ? { scale: quantity((r.coefficients[1] as number) * 1e6, sd(1) * 1e6, 'ppm') } : {}),
    centre,
    lines: n,
    reference,
  };
}

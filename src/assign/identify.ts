import { ScienceError } from '../errors.js';
import { compileDunham } from '../models/dunham.js';
import { type Band, type Branch, upperJ } from '../models/transitions.js';
import { constantsFor, dunhamFromEntry, libraryEntries, libraryEntry } from '../species/library.js';
import { elementsOnly, enrichedAtomsOnly, type Isotopologue, parseSpecies } from '../species/parse.js';
import { incompleteBeta } from '../stats/distributions.js';
import { type CandidateOptions, candidateLines, isotopologuesMeant } from './candidates.js';
import { uninformativeIntensities } from './intensity.js';
import { matchLines } from './match.js';
import { estimateOffset } from './offset.js';

export interface IdentificationCandidate {
  /** The molecule as a natural mixture, named by its most abundant isotopologue. */
  readonly species: string;
  readonly name: string;
  /** 0 … 1: share of the strong predicted lines found × share of the strong observed lines explained. */
  readonly score: number;
  readonly matched: number;
  readonly predicted: number;
  readonly offset: number;
}

/**
 * What identification compares with the library, shared by the diatomic and the linear ranking: the observed window
 * widened by 1 cm⁻¹ each side, and the lines to be matched — the stronger half (at least ten) when every line has
 * an intensity, else all of them.
 */
export function identificationWindow(peaks: readonly { position: number; intensity?: number }[]): {
  lo: number;
  hi: number;
  strongObserved: { index: number; position: number; intensity: number }[];
} {
  let lo = Number.POSITIVE_INFINITY;
  let hi = Number.NEGATIVE_INFINITY;
  for (const p of peaks) {
    lo = Math.min(lo, p.position);
    hi = Math.max(hi, p.position);
  }
  // Placeholder intensities (the shared rule of ./intensity.ts) rank nothing: every line is then as strong.
  const withIntensity = peaks.every((p) => p.intensity !== undefined) && !uninformativeIntensities(peaks);
  const strongObserved = peaks
    .map((p, index) => ({ index, position: p.position, intensity: withIntensity ? (p.intensity as number) : 1 }))
    .sort((a, b) => b.intensity - a.intensity)
    .slice(0, withIntensity ? Math.max(10, Math.ceil(peaks.length / 2)) : peaks.length);
  return { lo: lo - 1, hi: hi + 1, strongObserved };
}

/**
 * Rank the library's molecules by how well their predicted spectrum (natural isotopic mixture, reference
 * constants) explains the strong observed lines, after each one's own offset estimate. No fit is made: this only
 * chooses what to assign against.
 */
export function identifySpecies(
  peaks: readonly { position: number; intensity?: number }[],
  options: CandidateOptions & { maxOffset?: number } = {},
): IdentificationCandidate[] {
  const { lo, hi, strongObserved } = identificationWindow(peaks);
  // Each pair of elements once as its natural mixture; a parent that is not the most abundant isotopologue of its
  // elements (DCl, DF) as its enriched atom with the other's natural mixture (DCl: 2H-35Cl and 2H-37Cl), for
  // isotopically enriched samples.
  const seen = new Set<string>();
  const tests: MixtureTest[] = [];
  for (const e of libraryEntries().filter((x) => !x.derivedFrom)) {
    const iso = parseSpecies(e.formula);
    const natural = isotopologuesMeant(elementsOnly(iso), options.minAbundance ?? 1e-3);
    if (natural[0]?.iso.formula === e.formula) {
      const elements = `${iso.atoms[0].element.symbol}-${iso.atoms[1].element.symbol}`;
      if (seen.has(elements)) continue;
      seen.add(elements);
      tests.push({ formula: e.formula, name: e.name, mixture: natural });
    } else {
      tests.push({
        formula: e.formula,
        name: e.name,
        mixture: isotopologuesMeant(enrichedAtomsOnly(iso), options.minAbundance ?? 1e-3),
      });
    }
  }
  return rankMixtures(tests, strongObserved, lo, hi, options);
}

/**
 * Each natural isotopologue of a species' elements on its own (abundance ≥ minAbundance, default 1e-6), ranked as
 * identifySpecies ranks molecules: which isotopologue lines left over by an assignment against another one are.
 */
export function identifyIsotopologues(
  peaks: readonly { position: number; intensity?: number }[],
  species: Isotopologue,
  options: CandidateOptions & { maxOffset?: number } = {},
): IdentificationCandidate[] {
  if (peaks.length === 0) return [];
  const { lo, hi, strongObserved } = identificationWindow(peaks);
  const name = libraryEntry(parseSpecies(species.formula))?.name ?? species.formula;
  const tests = isotopologuesMeant(elementsOnly(species), options.minAbundance ?? 1e-6).map(({ iso }) => ({
    formula: iso.formula,
    name: `${name} (${iso.formula})`,
    mixture: [{ iso, abundance: 1 }],
  }));
  return rankMixtures(tests, strongObserved, lo, hi, options);
}

/**
 * The declared species' own match to the lines when it is no better than lines at random would reach: each
 * isotopologue the declaration stands for (`isotopologuesMeant`: "CO" its natural mixture above 1e-3, "13C16O"
 * itself) is scored alone, as identifySpecies scores a molecule, so that an enriched sample declared by its
 * elements is judged by the isotopologue it holds. Returns the best of them (by the score before the chance rule)
 * when every one scores 0 and it has at least 3 strong predictions in the window; undefined when one matches beyond
 * chance or there is too little to judge.
 */
export function matchNotBeyondChance(
  peaks: readonly { position: number; intensity?: number }[],
  species: Isotopologue,
  options: CandidateOptions & { maxOffset?: number } = {},
): IdentificationCandidate | undefined {
  if (peaks.length === 0) return undefined;
  const { lo, hi, strongObserved } = identificationWindow(peaks);
  const tests = isotopologuesMeant(species, options.minAbundance ?? 1e-3).map(({ iso }) => ({
    formula: iso.formula,
    name: iso.formula,
    mixture: [{ iso, abundance: 1 }],
  }));
  const [best] = rankMixtures(tests, strongObserved, lo, hi, options);
  return best && best.score === 0 && best.predicted >= 3 ? best : undefined;
}

/**
 * Whether one of the bands an assignment fitted finds lines beyond chance by its own predictions: the band's lines
 * with J″ ≤ 12 in the window, shifted by their own voted offset and matched as matchNotBeyondChance matches a
 * species' strongest lines, at the same false-alarm bar. A list holding a hot band or an overtone alone (the 2-1
 * band of CO) is explained by that band, while the species' strongest predictions at the assumed temperature (its
 * fundamental) find nothing in it. Predicted as at BAND_TEST_TEMPERATURE, so that a hot band's lower level is
 * populated; the temperature only weighs the band's own lines against one another here.
 */
export function fittedBandBeyondChance(
  peaks: readonly { position: number; intensity?: number }[],
  bands: readonly { readonly species: string; readonly band: Band }[],
  options: { readonly maxOffset?: number } = {},
): boolean {
  if (peaks.length === 0) return false;
  const { lo, hi, strongObserved } = identificationWindow(peaks);
  return bands.some(({ species, band }) => {
    const test = { formula: species, name: species, mixture: [{ iso: parseSpecies(species), abundance: 1 }], band };
    const scoring = { temperature: BAND_TEST_TEMPERATURE, minRelativeIntensity: 0, ...options };
    return scoreMixture(test, strongObserved, lo, hi, scoring).score > 0;
  });
}

/** K: the lower levels of hot bands to v = 4 populated above the candidates' cut (1e-6) in every library species. */
const BAND_TEST_TEMPERATURE = 3000;

/**
 * A mixture to score: the molecule's formula and name, and its isotopologues with their abundances; with `band`,
 * that band's predictions only.
 */
interface MixtureTest {
  readonly formula: string;
  readonly name: string;
  readonly mixture: ReturnType<typeof isotopologuesMeant>;
  readonly band?: Band;
}

type StrongObserved = ReturnType<typeof identificationWindow>['strongObserved'];

/** A candidate with its score before the chance rule, which orders those the rule set to 0. */
type ScoredCandidate = IdentificationCandidate & { readonly uncorrected: number };

/** Score each mixture's strongest predictions (J″ ≤ 12) against the strong observed lines; best first. */
function rankMixtures(
  tests: readonly MixtureTest[],
  strongObserved: StrongObserved,
  lo: number,
  hi: number,
  options: CandidateOptions & { maxOffset?: number },
): IdentificationCandidate[] {
  const out = tests.map((t) => scoreMixture(t, strongObserved, lo, hi, options));
  return out.sort((a, b) => b.score - a.score || b.uncorrected - a.uncorrected).map(({ uncorrected: _, ...c }) => c);
}

/**
 * One mixture's candidate: its strongest predictions shifted by their own voted offset and matched to the strong
 * observed lines; the score set to 0 when lines at random would match as well too often.
 */
function scoreMixture(
  test: MixtureTest,
  strongObserved: StrongObserved,
  lo: number,
  hi: number,
  options: CandidateOptions & { maxOffset?: number },
): ScoredCandidate {
  const cands = strongestPredictions(test.mixture, lo, hi, options, test.band);
  if (cands.length < 3) {
    return {
      species: test.formula,
      name: test.name,
      score: 0,
      matched: 0,
      predicted: cands.length,
      offset: 0,
      uncorrected: 0,
    };
  }
  const est = estimateOffset(
    cands,
    strongObserved.map((p) => p.position),
    options.maxOffset ?? 0.5,
    0.06,
  );
  const offset = est?.offset ?? 0;
  const tol = Math.min(Math.max(4 * (est?.spread ?? 0.05), 0.03), 0.3);
  const { matched, score } = matchScore(cands, strongObserved, offset, tol);
  const chance = chanceMatchProbability(tol, strongObserved.length / (hi - lo));
  const falseAlarm = chanceFalseAlarm(matched, cands.length, chance, (options.maxOffset ?? 0.5) / tol);
  return {
    species: test.formula,
    name: test.name,
    // A match that as many lines at random would reach as often as once in a thousand lists identifies nothing.
    score: falseAlarm > MAX_FALSE_ALARM ? 0 : score,
    matched,
    predicted: cands.length,
    offset,
    uncorrected: score,
  };
}

/** The mixture's 60 strongest predicted lines with J″ ≤ 12 in [lo, hi] (of one band when given), strongest first. */
function strongestPredictions(
  mixture: MixtureTest['mixture'],
  lo: number,
  hi: number,
  options: CandidateOptions,
  band?: Band,
): ReturnType<typeof candidateLines> {
  return candidateLines(mixture, lo, hi, options)
    .filter((c) => c.j <= 12 && (!band || (c.band.upper === band.upper && c.band.lower === band.lower)))
    .sort((a, b) => b.intensity - a.intensity)
    .slice(0, 60);
}

/**
 * The predictions shifted by `offset`, matched one-to-one within ±tol: how many matched, and the score — the share
 * of the predicted weight (√intensity) found × the share of the strong observed lines explained, out of as many as
 * the predictions could explain at most (full at half).
 */
function matchScore(
  cands: readonly { position: number; intensity: number }[],
  strongObserved: StrongObserved,
  offset: number,
  tol: number,
): { matched: number; score: number } {
  const { matches } = matchLines(
    cands.map((c, i) => ({ key: String(i), position: c.position + offset, tolerance: tol })),
    strongObserved,
  );
  const predictedWeight = cands.reduce((s, c) => s + Math.sqrt(c.intensity), 0);
  const matchedWeight = matches.reduce(
    (s, m) => s + Math.sqrt((cands[Number(m.prediction.key)] as { intensity: number }).intensity),
    0,
  );
  const observedShare = matches.length / Math.min(strongObserved.length, cands.length);
  return { matched: matches.length, score: (matchedWeight / predictedWeight) * Math.min(1, observedShare / 0.5) };
}

/** Highest chance (over offsets tried) of a random list matching as well, for a match to identify anything. */
export const MAX_FALSE_ALARM = 1e-3;

/**
 * Chance that a prediction finds an observed line within ±tolerance when the observed lines lie at random with
 * `density` lines per cm⁻¹ (Poisson): 1 − exp(−2 · tolerance · density).
 */
export function chanceMatchProbability(tolerance: number, density: number): number {
  return 1 - Math.exp(-2 * tolerance * density);
}

/**
 * Chance that lines at random match at least `matched` of `predicted` predictions, each matched with probability
 * `p`, at one of `trials` independent offsets (the voted offset ranges over ±maxOffset in steps of a tolerance):
 * trials · P(Binomial(predicted, p) ≥ matched) = trials · I_p(matched, predicted − matched + 1), at most 1.
 */
export function chanceFalseAlarm(matched: number, predicted: number, p: number, trials: number): number {
  if (matched <= 0) return 1;
  if (matched > predicted) return 0;
  return Math.min(1, Math.max(1, trials) * incompleteBeta(p, matched, predicted - matched + 1));
}

/** A line that carries a label (band, branch, J″) but no species. */
export interface LabelledLine {
  readonly index: number;
  readonly position: number;
  readonly band: Band;
  readonly branch: Branch;
  readonly j: number;
}

/** What the labels of species-less lines say about their species. */
export interface LabelIdentification {
  /** The molecule whose labelled positions explain the lines best, as a natural mixture ("12C-16O"). */
  readonly species: string;
  readonly name: string;
  /** Lines within tolerance of their label's prediction, of all labelled lines. */
  readonly explained: number;
  readonly lines: number;
  readonly offset: number;
  /** The isotopologue of each line, by input index: the one whose prediction of the label lies nearest. */
  readonly isotopologueOf: ReadonlyMap<number, string>;
}

/** Lines used to vote the offset (the first ones): enough to decide, bounded in cost. */
const MAX_VOTERS = 200;

/**
 * Identify the species of lines that came labelled but without a species: every molecule of the library (as its
 * natural mixture) predicts each label's position from its reference constants; after one common offset
 * (|offset| ≤ maxOffset, voted: the offset that brings most labelled lines within tolerance), the molecule whose
 * predictions explain the most lines is ranked first. The tolerance grows with J as the reference prediction's
 * error does (0.05·(1 + (J/10)²) cm⁻¹ + 2e-5 of the position: HCl R(11) is 0.5 cm⁻¹ off without γ_e, so a high-J
 * line may fall outside; only the share explained counts). Each line takes the isotopologue whose prediction of
 * its label lies nearest. Sorted best first; no fit is made.
 */
export function identifyLabelledSpecies(
  lines: readonly LabelledLine[],
  options: { readonly maxOffset?: number } = {},
): LabelIdentification[] {
  const maxOffset = options.maxOffset ?? 0.5;
  const out: LabelIdentification[] = [];
  if (lines.length === 0) return out;
  for (const { name, mixture } of labelMixtures()) {
    const residuals = labelResiduals(lines, mixture);
    const best = votedLabelOffset(lines, residuals, maxOffset);
    out.push({
      species: (mixture[0] as LabelPredictor).formula,
      name,
      explained: best.count,
      lines: lines.length,
      offset: best.offset,
      isotopologueOf: nearestIsotopologues(lines, residuals, mixture, best.offset),
    });
  }
  return out.sort((a, b) => b.explained - a.explained || Math.abs(a.offset) - Math.abs(b.offset));
}

/** One isotopologue's prediction of a label: its formula and its level energies from the reference constants. */
interface LabelPredictor {
  readonly formula: string;
  readonly energy: ReturnType<typeof compileDunham>;
}

/**
 * Each molecule of the library once, as in identifySpecies: its natural mixture, or a parent that is not the most
 * abundant isotopologue of its elements (DCl, DF) as itself; the isotopologues the library has constants for.
 */
function labelMixtures(): { name: string; mixture: LabelPredictor[] }[] {
  const out: { name: string; mixture: LabelPredictor[] }[] = [];
  const seen = new Set<string>();
  for (const e of libraryEntries().filter((x) => !x.derivedFrom)) {
    const iso = parseSpecies(e.formula);
    const natural = isotopologuesMeant(elementsOnly(iso), 1e-3);
    const members = natural[0]?.iso.formula === e.formula ? natural : isotopologuesMeant(enrichedAtomsOnly(iso), 1e-3);
    const key = members.map((m) => m.iso.formula).join('+');
    if (seen.has(key)) continue;
    seen.add(key);
    const mixture = members.flatMap(({ iso: m }) => {
      const entry = constantsFor(m);
      return entry ? [{ formula: m.formula, energy: compileDunham(dunhamFromEntry(entry)) }] : [];
    });
    if (mixture.length > 0) out.push({ name: e.name, mixture });
  }
  return out;
}

/** Residual of each line against each isotopologue's prediction of its label (+∞ where there is none). */
function labelResiduals(lines: readonly LabelledLine[], mixture: readonly LabelPredictor[]): number[][] {
  return lines.map((l) =>
    mixture.map((m) => {
      const p = m.energy(l.band.upper, upperJ(l)) - m.energy(l.band.lower, l.j);
      return Number.isFinite(p) ? l.position - p : Number.POSITIVE_INFINITY;
    }),
  );
}

/**
 * The offset (|offset| ≤ maxOffset, one of the first voters' residuals, else 0) that brings most lines within the
 * tolerance of one of their predictions, the smaller offset on a tie; with that count.
 */
function votedLabelOffset(
  lines: readonly LabelledLine[],
  residuals: readonly (readonly number[])[],
  maxOffset: number,
): { offset: number; count: number } {
  const tolOf = (l: LabelledLine) => 0.05 * (1 + (l.j / 10) ** 2) + 2e-5 * Math.abs(l.position);
  const countAt = (offset: number) =>
    lines.reduce(
      (n, l, i) => n + ((residuals[i] as number[]).some((r) => Math.abs(r - offset) <= tolOf(l)) ? 1 : 0),
      0,
    );
  let best = { offset: 0, count: countAt(0) };
  residuals.slice(0, MAX_VOTERS).forEach((rs) => {
    for (const r of rs) {
      if (!(Math.abs(r) <= maxOffset)) continue;
      const count = countAt(r);
      if (count > best.count || (count === best.count && Math.abs(r) < Math.abs(best.offset)))
        best = { offset: r, count };
    }
  });
  return best;
}

/** The isotopologue of each line (by input index): the one whose prediction of its label lies nearest after `offset`. */
function nearestIsotopologues(
  lines: readonly LabelledLine[],
  residuals: readonly (readonly number[])[],
  mixture: readonly LabelPredictor[],
  offset: number,
): Map<number, string> {
  const isotopologueOf = new Map<number, string>();
  lines.forEach((l, i) => {
    const rs = residuals[i] as number[];
    let k = 0;
    rs.forEach((r, m) => {
      if (Math.abs(r - offset) < Math.abs((rs[k] as number) - offset)) k = m;
    });
    isotopologueOf.set(l.index, (mixture[k] as LabelPredictor).formula);
  });
  return isotopologueOf;
}

/**
 * The species of labelled lines sent without one, when their labels make it clear: the best molecule of
 * `identifyLabelledSpecies` explains at least three lines and half of them, and its runner-up fewer than half as
 * many. Otherwise SPECIES_UNIDENTIFIED, naming the best candidates and what to add.
 */
export function speciesFromLabels(
  lines: readonly LabelledLine[],
  options: { readonly maxOffset?: number } = {},
): LabelIdentification {
  const ranking = identifyLabelledSpecies(lines, options);
  const [best, runnerUp] = ranking;
  const clear =
    best !== undefined &&
    best.explained >= 3 &&
    best.explained >= 0.5 * best.lines &&
    (runnerUp === undefined || runnerUp.explained < 0.5 * best.explained);
  if (clear) return best;
  const first = lines[0]?.index ?? 0;
  const shown = ranking
    .slice(0, 3)
    .filter((r) => r.explained > 0)
    .map((r) => `${r.name} (${r.species}) explains ${r.explained} of ${r.lines}`);
  throw new ScienceError(
    'SPECIES_UNIDENTIFIED',
    `assigned lines name no species (line ${first} and ${lines.length - 1} more, counted from 0), none is declared, and their labels do not tell it (${shown.length > 0 ? shown.join('; ') : 'no library species predicts them near their labels'}): give "species" (e.g. "CO", "H35Cl"; ?species= with a CSV or JCAMP-DX body, --species in the CLI), or send the lines unassigned`,
    {
      line: first,
      candidates: ranking
        .slice(0, 5)
        .map((r) => ({ species: r.species, name: r.name, explained: r.explained, lines: r.lines })),
    },
  );
}

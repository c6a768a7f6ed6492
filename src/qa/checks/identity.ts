import type { Analysis } from '../../assign/analyse.js';
import type { PeakInput } from '../../assign/assign-lines.js';
import { type IdentificationCandidate, identifySpecies } from '../../assign/identify.js';
import { compileDunham } from '../../models/dunham.js';
import { constantsFor, dunhamFromEntry } from '../../species/library.js';
import { type Isotopologue, parseSpecies } from '../../species/parse.js';
import { type Check, type CheckStatus, mainBand, moleculeKey, notEvaluated, type Tolerances } from './common.js';

/** The identity check: the fitted species against the line ranking and the reference library. */

export function identityCheck(
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
  // the runner-up is the best-ranked other molecule (an isotopologue of the fitted one is no rival) with some support:
  // one that scores 0 matches no better than lines at random and is not named (it was, "runner-up 2H-19F (score 0.00)")
  const runnerUp = ranking.find((c) => c.score > 0 && moleculeKey(parseSpecies(c.species)) !== moleculeKey(iso));
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

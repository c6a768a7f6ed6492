import type { Analysis } from '../../assign/analyse.js';
import type { PeakInput } from '../../assign/assign-lines.js';
import { identifyIsotopologues, identifySpecies } from '../../assign/identify.js';
import { parseSpecies } from '../../species/parse.js';
import type { Check, CheckStatus, Tolerances } from './common.js';

/** The unexplained-lines check: the share of the lines (or of the intensity) no band explains, and what might. */

export function unexplainedCheck(peaks: readonly PeakInput[], analysis: Analysis, tol: Tolerances): Check {
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

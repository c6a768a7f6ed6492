import type { Analysis } from '../../assign/analyse.js';
import type { PeakInput } from '../../assign/assign-lines.js';
import { candidateLines, naturalAbundances } from '../../assign/candidates.js';
import type { Branch } from '../../models/transitions.js';
import { parseSpecies } from '../../species/parse.js';
import { extentOf } from '../../stats/extent.js';
import type { Check, CheckStatus, Tolerances } from './common.js';

/** The fit-quality check: reduced χ², the share of outliers and the completeness of the strong lines. */

export function fitQualityCheck(peaks: readonly PeakInput[], analysis: Analysis, T: number, tol: Tolerances): Check {
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
  const { lo, hi } = extentOf(positions);
  const strong = candidateLines(weighted, lo, hi, { temperature: T }).filter((c) => c.intensity >= 0.1);
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

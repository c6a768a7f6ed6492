import type { Analysis } from '../../assign/analyse.js';
import type { PeakInput } from '../../assign/assign-lines.js';
import { MIN_DOF_TO_SCALE_DOWN } from '../../fit/fit-lines.js';
import { constantsFor, dunhamFromEntry } from '../../species/library.js';
import { parseSpecies } from '../../species/parse.js';
import {
  type CalibrationPoint,
  calibrateAgainstLibrary,
  guardBandedStatus,
  type ReferenceCalibration,
} from '../calibration.js';
import { libraryUncertainties } from '../library-uncertainty.js';
import { plusMinus } from '../plus-minus.js';
import { type Check, type CheckStatus, notEvaluated, RANK, type Tolerances } from './common.js';

/** The calibration check: offset and scale of the wavenumber axis against the library's positions. */

export function calibrationCheck(
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
    libraryUncertainties(entry),
  );
  if (!c) return notEvaluated('calibration', 'fewer than three fitted lines of the main species with J″ ≤ 20');
  const disagree = analysis.result.warnings.find((w) => w.code === 'SOURCE_MEAN_RESIDUALS');
  const own = calibrationStatus(c, tol);
  // Sources that disagree beyond their uncertainties: the axis is not one calibrated axis, whatever the mean says.
  const status: CheckStatus = disagree && RANK[own] < RANK.warn ? 'warn' : own;
  return {
    id: 'calibration',
    status,
    measured: {
      ...(disagree ? { sourcesDisagree: disagree.message } : {}),
      offset: c.offset,
      ...(c.scale ? { scale: c.scale } : {}),
      ...(c.scaleUndetermined !== undefined ? { scaleUncertaintyIfFitted: c.scaleUndetermined } : {}),
      centre: c.centre,
      lines: c.lines,
      reference: c.reference,
      libraryTermsCarried: c.nuisance,
      libraryConstantsCarried: c.libraryConstants,
    },
    limit,
    message: `${calibrationMessage(c, own, tol)}${disagree ? `; the line sources disagree with each other beyond their uncertainties (warning SOURCE_MEAN_RESIDUALS of the fit), so the scan is not on one calibrated axis` : ''}`,
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
  const found = `offset ${plusMinus(c.offset.value, c.offset.uncertainty, 4)} cm-1 at ${c.centre.toFixed(1)} cm-1 (the weighted centre of ${c.lines} lines with J″ ≤ 20, fitted against the library with its missing terms and the uncertainty of its own constants carried; fit.assignment.calibration is the assignment's search estimate, which leaves them out)${c.scale ? `, scale ${plusMinus(c.scale.value, c.scale.uncertainty, 1)} ppm` : ''}`;
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

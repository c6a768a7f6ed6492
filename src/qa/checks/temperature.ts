import type { Analysis } from '../../assign/analyse.js';
import type { PeakInput } from '../../assign/assign-lines.js';
import { guardBandedStatus } from '../calibration.js';
import { plusMinus } from '../plus-minus.js';
import { type BoltzmannPoint, boltzmannTemperature } from '../temperature.js';
import { type Check, type CheckStatus, mainBand, notEvaluated, type Tolerances } from './common.js';

/** The temperature check: the rotational temperature of the main band from a Boltzmann plot. */

export function temperatureCheck(
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
  const pts = boltzmannPoints(peaks, analysis, main, band.band, level);
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

/**
 * The fitted lines of the main species in its main band with the intensity sent, E″ from the fitted lower level
 * (B x − D x² + H x³, x = J(J+1)).
 */
function boltzmannPoints(
  peaks: readonly PeakInput[],
  analysis: Analysis,
  main: string | undefined,
  band: string,
  level: Analysis['result']['levels'][number],
): BoltzmannPoint[] {
  const energy = (j: number) => {
    const x = j * (j + 1);
    return level.B.value * x - (level.D?.value ?? 0) * x * x + (level.H?.value ?? 0) * x ** 3;
  };
  return analysis.result.lines.flatMap((l) => {
    const a = l.assignment;
    if (l.status !== 'fitted' || !a || a.species !== main || a.band !== band) return [];
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
}

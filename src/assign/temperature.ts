import type { Quantity } from '../derive/quantity.js';
import type { FitResult, Warning } from '../fit/fit-lines.js';
import { compileDunham } from '../models/dunham.js';
import { parseBand } from '../models/transitions.js';
import { type BoltzmannPoint, boltzmannTemperature } from '../qa/temperature.js';
import { constantsFor, dunhamFromEntry } from '../species/library.js';
import { parseSpecies } from '../species/parse.js';
import type { PeakInput } from './assign-lines.js';
import { median } from './offset.js';

/** The temperature the candidates are weighed at when none is given, K. */
export const DEFAULT_TEMPERATURE = 296;

/** Fewest lines of one band a temperature is read from. */
const MIN_LINES = 8;
/** Largest relative σ of a temperature that is used. */
const MAX_RELATIVE_SIGMA = 0.25;
/** Smallest ratio to the default (either way) for which the lines are assigned again at the temperature read. */
const MIN_RATIO = 1.3;

/**
 * The rotational temperature the intensities of a fit's lines give (Boltzmann plot, qa/temperature.ts): over the
 * fitted, automatically assigned lines of the cold band (lower level v = 0) holding most of the intensity (of those
 * with MIN_LINES or more: the band holding most lines was, in a 1281 K CO scan assigned at 296 K, 12C18O 1-0 with 22
 * lines, most of them hot lines of 12C16O, and the plot read 326 K, so the scan was never assigned again: 59 of 1037
 * peaks right, 49 wrong; now 930 right, none wrong), lower-state
 * energies from the library's constants. Undefined with fewer than 8 such lines or when the plot has no
 * negative slope.
 */
export function temperatureOfLines(result: FitResult, peaks: readonly PeakInput[]): Quantity | undefined {
  const byBand = new Map<string, { index: number; branch: 'P' | 'R'; j: number }[]>();
  const strength = new Map<string, number>();
  for (const l of result.lines) {
    const a = l.assignment;
    if (l.status !== 'fitted' || a?.source !== 'auto' || a.branch === 'Q') continue;
    if (parseBand(a.band).lower !== 0 || !(peaks[l.index]?.intensity !== undefined)) continue;
    const key = `${a.species}|${a.band}`;
    const list = byBand.get(key) ?? [];
    list.push({ index: l.index, branch: a.branch, j: a.j });
    byBand.set(key, list);
    strength.set(key, (strength.get(key) ?? 0) + (peaks[l.index]?.intensity as number));
  }
  const [key, lines] =
    [...byBand]
      .filter(([, l]) => l.length >= MIN_LINES)
      .sort((x, y) => (strength.get(y[0]) as number) - (strength.get(x[0]) as number))[0] ?? [];
  if (!key || !lines) return undefined;
  const entry = constantsFor(parseSpecies(key.split('|')[0] as string));
  if (!entry) return undefined;
  const energy = compileDunham(dunhamFromEntry(entry));
  const e00 = energy(0, 0);
  const points = lines.map((l) => {
    const p = peaks[l.index] as PeakInput;
    return {
      position: p.position,
      intensity: p.intensity as number,
      branch: l.branch,
      j: l.j,
      lowerEnergy: energy(0, l.j) - e00,
    };
  });
  const kept = onTheLine(points);
  return kept.length >= MIN_LINES ? boltzmannTemperature(kept)?.temperature : undefined;
}

/**
 * The points of a Boltzmann plot that lie on its robust line: Theil–Sen (the median of the pairwise slopes, the
 * intercept the median of y − slope x), points within 3 robust σ (1.4826 × MAD of the residuals, at least 0.1 in
 * ln I) of it. Weak lines taken at high J because they matched the intensities predicted at too low a temperature
 * would otherwise tilt the plot towards that temperature (a 1281 K CO scan read 315 K).
 */
export function onTheLine(points: readonly BoltzmannPoint[]): BoltzmannPoint[] {
  const pts = points.filter((p) => p.intensity > 0 && (p.branch === 'R' ? p.j + 1 : p.j) > 0);
  const x = pts.map((p) => p.lowerEnergy);
  const y = pts.map((p) => Math.log(p.intensity / (p.position * (p.branch === 'R' ? p.j + 1 : p.j))));
  const slopes: number[] = [];
  for (let i = 0; i < pts.length; i++)
    for (let k = i + 1; k < pts.length; k++) {
      const dx = (x[k] as number) - (x[i] as number);
      if (dx !== 0) slopes.push(((y[k] as number) - (y[i] as number)) / dx);
    }
  if (slopes.length === 0) return [];
  const slope = median(slopes);
  const intercept = median(y.map((yi, i) => yi - slope * (x[i] as number)));
  const residuals = y.map((yi, i) => yi - intercept - slope * (x[i] as number));
  const limit = 3 * Math.max(0.1, 1.4826 * median(residuals.map(Math.abs)));
  return pts.filter((_, i) => Math.abs(residuals[i] as number) <= limit);
}

/**
 * Whether lines assigned at one temperature should be assigned again at the one their intensities give: determined
 * to 25 % and at least 1.3 times away from the one assumed, either way.
 */
export function worthReassigning(t: Quantity | undefined, assumed: number): t is Quantity {
  if (!t || !(t.value > 0) || !(t.uncertainty < MAX_RELATIVE_SIGMA * t.value)) return false;
  return Math.max(t.value / assumed, assumed / t.value) >= MIN_RATIO;
}

/**
 * The warning that says the temperature was read from the intensities and the lines assigned at it; with `hotStart`,
 * that the lines fitted from the default temperature were too few and the assignment started again from there.
 */
export function temperatureWarning(t: Quantity, lines: number, hotStart?: number): Warning {
  const read = `no temperature was given: the intensities of the assigned lines give ${t.value.toFixed(0)} ± ${t.uncertainty.toFixed(0)} K (Boltzmann plot of the strongest cold band), not the ${DEFAULT_TEMPERATURE} K assumed`;
  const how =
    hotStart === undefined
      ? 'so the lines were assigned again at the temperature so read'
      : `too few lines fitted from ${DEFAULT_TEMPERATURE} K, so the lines were assigned again from ${hotStart} K and at the temperature read where it differs more`;
  return {
    code: 'TEMPERATURE_ESTIMATED',
    message: `${read}${hotStart === undefined ? ', ' : '; '}${how} (${lines} fitted); send the temperature to set it`,
  };
}

import { findPeaks, type PeakResult } from '../../src/spectra/peaks.js';
import { toWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { FitRequest } from '../schemas/fit.js';
import type { PeaksRequest, PeaksResponse } from '../schemas/peaks.js';

type Spectrum = NonNullable<FitRequest['spectrum']>;

/**
 * Peaks already found per spectrum object and options: a spectrum sent without a species goes through the diatomic
 * pipeline first and then, when no diatomic explains it, through the linear one, which must not search it twice.
 */
const FOUND = new WeakMap<Spectrum, Map<string, PeakResult>>();

/** Peaks of a spectrum given in any supported x unit; x is converted to cm⁻¹ first. */
export function peaksOf(spectrum: Spectrum, options: FitRequest['peakOptions'] = {}): PeakResult {
  const key = JSON.stringify(options ?? {});
  const known = FOUND.get(spectrum)?.get(key);
  if (known) return known;
  const found = findPeaksOf(spectrum, options);
  const byOptions = FOUND.get(spectrum) ?? new Map<string, PeakResult>();
  byOptions.set(key, found);
  FOUND.set(spectrum, byOptions);
  return found;
}

function findPeaksOf(spectrum: Spectrum, options: FitRequest['peakOptions'] = {}): PeakResult {
  const x = spectrum.xUnit === 'cm-1' ? spectrum.x : spectrum.x.map((v) => toWavenumber(v, spectrum.xUnit).value);
  return findPeaks(x, spectrum.y, {
    yUnit: spectrum.yUnit,
    ...(options.threshold !== undefined ? { threshold: options.threshold } : {}),
    ...(options.shape !== undefined ? { shape: options.shape } : {}),
  });
}

/** The unit of every number of a peak list: x is always converted to cm⁻¹, y to absorbance. */
export const PEAK_UNITS = {
  position: 'cm-1',
  uncertainty: 'cm-1',
  width: 'cm-1',
  intensity: 'cm-1',
  height: 'absorbance',
  step: 'cm-1',
  noise: 'absorbance',
} as const;

/** POST /v1/peaks. */
export function runPeaks(req: PeaksRequest): PeaksResponse {
  const r = peaksOf(req.spectrum, req.peakOptions);
  return { peaks: r.peaks, points: r.points, noise: r.noise, step: r.step, units: PEAK_UNITS, notice: SAFETY_NOTICE };
}

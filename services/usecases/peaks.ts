import { findPeaks, type PeakOptions, type PeakResult } from '../../src/spectra/peaks.js';
import { toWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import { findPeaksInThreads } from '../peak-threads.js';
import type { FitRequest } from '../schemas/fit.js';
import type { PeaksRequest, PeaksResponse } from '../schemas/peaks.js';

type Spectrum = NonNullable<FitRequest['spectrum']>;

const wavenumbers = (spectrum: Spectrum): readonly number[] =>
  spectrum.xUnit === 'cm-1' ? spectrum.x : spectrum.x.map((v) => toWavenumber(v, spectrum.xUnit).value);

const peakOptions = (spectrum: Spectrum, options: FitRequest['peakOptions'] = {}): PeakOptions => ({
  yUnit: spectrum.yUnit,
  ...(options.threshold !== undefined ? { threshold: options.threshold } : {}),
  ...(options.shape !== undefined ? { shape: options.shape } : {}),
});

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
  const found = findPeaks(wavenumbers(spectrum), spectrum.y, peakOptions(spectrum, options));
  const byOptions = FOUND.get(spectrum) ?? new Map<string, PeakResult>();
  byOptions.set(key, found);
  FOUND.set(spectrum, byOptions);
  return found;
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

const answer = (r: PeakResult): PeaksResponse => ({
  peaks: r.peaks,
  points: r.points,
  noise: r.noise,
  step: r.step,
  units: PEAK_UNITS,
  notice: SAFETY_NOTICE,
});

/** POST /v1/peaks. */
export function runPeaks(req: PeaksRequest): PeaksResponse {
  return answer(peaksOf(req.spectrum, req.peakOptions));
}

/** POST /v1/peaks with the group fits of a large spectrum spread over `threads` threads (services/peak-threads.ts). */
export async function runPeaksInThreads(req: PeaksRequest, threads: number): Promise<PeaksResponse> {
  const { spectrum } = req;
  return answer(
    await findPeaksInThreads(wavenumbers(spectrum), spectrum.y, peakOptions(spectrum, req.peakOptions), threads),
  );
}

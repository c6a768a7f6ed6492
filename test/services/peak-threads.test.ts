import { describe, expect, it } from 'vitest';
import { chunkRanges, findPeaksInThreads, PEAK_THREAD_POINTS } from '../../services/peak-threads.js';
import { findPeaks, finishPeaks, fitGroups, packGroups, preparePeakSearch } from '../../src/spectra/peaks.js';
import { useApp } from '../helpers/app.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

const app = useApp();

// 60 lines of an invented band (spacing ~3.8 cm⁻¹, heights 0.02–0.4; the last few fall beyond the range) sampled at 0.001 cm⁻¹ over
// 250 cm⁻¹: 250 001 points, above PEAK_THREAD_POINTS, with blends where two lines fall close.
const lines = Array.from({ length: 60 }, (_, k) => ({
  position: 1980 + 3.8 * k + 0.011 * k * k - (k % 7 === 3 ? 3.7 : 0),
  strength: 0.02 + 0.38 * Math.exp(-((k - 25) ** 2) / 200),
}));
const spectrum = syntheticSpectrum({
  lines,
  from: 1975,
  to: 2225,
  step: 0.001,
  gaussianFwhm: 0.02,
  lorentzianFwhm: 0.01,
  noise: 0.0005,
  baseline: [0.03, 1e-5],
  seed: 17,
});

describe('group fits of a large spectrum in worker threads', () => {
  it('groups packed in chunks and fitted apart give exactly the peaks of one pass (src, no threads)', () => {
    const search = preparePeakSearch(spectrum.x, spectrum.y);
    const chunks = chunkRanges(search, 3);
    expect(chunks).toHaveLength(3);
    const fits = chunks.flatMap(([from, to]) => fitGroups(packGroups(search, from, to)));
    expect(finishPeaks(search, fits)).toEqual(findPeaks(spectrum.x, spectrum.y));
  });

  it('three threads give exactly the peaks of one thread, and the lines are found', async () => {
    expect(spectrum.x.length).toBeGreaterThanOrEqual(PEAK_THREAD_POINTS);
    const one = findPeaks(spectrum.x, spectrum.y);
    const three = await findPeaksInThreads(spectrum.x, spectrum.y, {}, 3);
    expect(three).toEqual(one);
    // Every line within 3σ + a tenth of the step of a found peak (the finder's own tolerance, test/spectra).
    for (const l of lines.filter((l) => l.position > 1976 && l.position < 2224)) {
      const near = one.peaks.reduce((a, b) =>
        Math.abs(b.position - l.position) < Math.abs(a.position - l.position) ? b : a,
      );
      expect(Math.abs(near.position - l.position)).toBeLessThan(3 * near.uncertainty + 1e-4);
    }
  });

  it('POST /v1/peaks with the 250 001-point body (a worker, then group-fit threads) answers the one-thread peaks', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/peaks',
      payload: { spectrum: { x: Array.from(spectrum.x), y: Array.from(spectrum.y) } },
    });
    expect(r.statusCode, r.body.slice(0, 300)).toBe(200);
    expect(r.json().peaks).toEqual(findPeaks(spectrum.x, spectrum.y).peaks);
  });
});

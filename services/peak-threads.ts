import { Piscina } from 'piscina';
import {
  finishPeaks,
  fitGroups,
  type GroupFit,
  type PackedGroups,
  type PeakOptions,
  type PeakResult,
  type PeakSearch,
  packGroups,
  preparePeakSearch,
} from '../src/spectra/peaks.js';

/**
 * The group fits of a large spectrum spread over threads. src/ stays synchronous: the baseline, noise and candidate
 * stages run here (src/spectra/peaks.ts#preparePeakSearch), the groups are cut into chunks of about equal window
 * length, each chunk packed (only the samples its fits read) and fitted by the pure src function fitGroups, one
 * chunk on this thread and the others in worker threads (piscina, started on first use), and the last stage takes
 * the fits back in group order: the same numbers as findPeaks on one thread (test/services/peak-threads.test.ts).
 */

/** Spectra of fewer points are fitted on the calling thread: below this a thread hop costs more than it saves. */
export const PEAK_THREAD_POINTS = 200_000;

let pool: Piscina | undefined;

function groupFitPool(threads: number): Piscina {
  if (!pool || pool.options.maxThreads < threads - 1) {
    void pool?.destroy();
    const isTs = import.meta.url.endsWith('.ts');
    pool = new Piscina({
      filename: new URL(isTs ? './peak-threads-worker.ts' : './peak-threads-worker.js', import.meta.url).href,
      minThreads: 0,
      maxThreads: threads - 1,
      idleTimeout: 30_000,
      ...(isTs ? { execArgv: ['--import', 'tsx'] } : {}),
    });
  }
  return pool;
}

/** Group ranges [from, to) of about equal summed window length, `parts` of them at most. */
export function chunkRanges(search: PeakSearch, parts: number): [number, number][] {
  const { groups } = search;
  const total = groups.reduce((sum, g) => sum + g.hi - g.lo + 1, 0);
  const ranges: [number, number][] = [];
  let from = 0;
  let acc = 0;
  groups.forEach((g, k) => {
    acc += g.hi - g.lo + 1;
    if (acc >= (total * (ranges.length + 1)) / parts && ranges.length < parts - 1) {
      ranges.push([from, k + 1]);
      from = k + 1;
    }
  });
  if (from < groups.length) ranges.push([from, groups.length]);
  return ranges;
}

/**
 * findPeaks with the group fits of a spectrum of PEAK_THREAD_POINTS or more spread over `threads` threads (this
 * one included); smaller spectra, or threads ≤ 1, fit on this thread.
 */
export async function findPeaksInThreads(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  options: PeakOptions,
  threads: number,
): Promise<PeakResult> {
  const search = preparePeakSearch(x, y, options);
  const parts = x.length >= PEAK_THREAD_POINTS ? Math.min(threads, search.groups.length) : 1;
  if (parts <= 1) return finishPeaks(search, fitGroups(packGroups(search, 0, search.groups.length)), options);
  const [mine, ...theirs] = chunkRanges(search, parts).map(([from, to]) => packGroups(search, from, to));
  const workers = groupFitPool(parts);
  const pending = theirs.map((chunk) => workers.run(chunk) as Promise<GroupFit[]>);
  const local = fitGroups(mine as PackedGroups);
  const fits = [local, ...(await Promise.all(pending))];
  return finishPeaks(search, fits.flat(), options);
}

import { type AnalyseOptions, analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { heldoutScan, scoreScan, sweepOptions } from './heldout-scans.js';

/**
 * One held-out scan of the sweep (test/helpers/heldout-scans.ts) analysed as a lab would send it (no temperature
 * unless given here), with its score against the generator's truth.
 */
export function analysedHeldout(seed: number, options: AnalyseOptions = {}) {
  const o = sweepOptions(seed);
  const scan = heldoutScan(o);
  const r = analyseLineList(scan.peaks, parseSpecies(o.molecule), options).result;
  return { o, scan, r, s: scoreScan(scan.truth, r.lines) };
}

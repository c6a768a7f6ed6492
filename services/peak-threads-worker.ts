import { fitGroups, type GroupFit, type PackedGroups } from '../src/spectra/peaks.js';

/** A worker thread of services/peak-threads.ts: one packed chunk of candidate groups fitted by the pure src stage. */
export default function fitChunk(chunk: PackedGroups): GroupFit[] {
  return fitGroups(chunk);
}

/**
 * The 60-line fit of the throughput bench, in process: CPU per call of the use case (runFit) and of fitLineList
 * alone, and the solves one fit makes. For profiling: `node --import tsx --cpu-prof bench/fit-profile.ts`.
 * FIT_PROFILE_MS sets the CPU time spent per measure (default 1500). Nothing here is asserted.
 */

import { runFit } from '../services/usecases/fit.js';
import { fitLineList } from '../src/fit/fit-lines.js';
import { solveCount } from '../src/linalg/least-squares.js';
import { parseBand } from '../src/models/transitions.js';
import { parseSpecies } from '../src/species/parse.js';
import { reducedMass } from '../src/species/reduced-mass.js';
import { fitBody } from './fit-body.js';

const ms = Number(process.env.FIT_PROFILE_MS ?? 1500);
const body = JSON.parse(fitBody());
const iso = parseSpecies('CO');
const masses = new Map([[iso.formula, reducedMass(iso)]]);
const lines = body.lines.map((l: { position: number; uncertainty: number; assignment: object }) => ({
  ...l,
  assignment: { ...l.assignment, species: iso.formula, band: parseBand((l.assignment as { band: string }).band) },
}));

function cpuPerCall(f: () => void): number {
  for (let i = 0; i < 200; i++) f();
  const c0 = process.cpuUsage();
  let calls = 0;
  let used = 0;
  while (used < ms * 1000) {
    f();
    calls++;
    const u = process.cpuUsage(c0);
    used = u.user + u.system;
  }
  return used / 1000 / calls;
}
const s0 = solveCount.value;
runFit(body);
const solves = solveCount.value - s0;
const useCase = cpuPerCall(() => void runFit(body));
const fit = cpuPerCall(() => void fitLineList(lines, masses));
console.log(
  `60-line fit: runFit ${(useCase * 1000).toFixed(0)} µs, fitLineList ${(fit * 1000).toFixed(0)} µs CPU per call, ${solves} solves`,
);

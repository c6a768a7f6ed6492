import { identifySpecies } from '../../src/assign/identify.js';
import { ScienceError } from '../../src/errors.js';
import {
  assignLinearLines,
  identifyLinearSpecies,
  type LinearAssignResult,
  linearChecks,
  mergeIdentifications,
} from '../../src/linear/assign.js';
import type { LinearLineInput } from '../../src/linear/fit.js';
import { type Tolerances, verdictOf } from '../../src/qa/checks.js';
import { toWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { CheckRequest, CheckResponse } from '../schemas/checks.js';
import type { FitRequest, FitResponse } from '../schemas/fit.js';
import { asLineRequest, runLinearFit } from './linear-fit.js';
import type { DeepReadonly } from './types.js';

/**
 * Automatic assignment for the linear fit use case: when a request for a linear species sends no assignment at all,
 * the library's bands are assigned first (src/linear/assign.ts) and the fit runs on the lines so assigned. Lines
 * given with an assignment are never touched (an assignment on any line turns this off, as for diatomics a given
 * band does). Returns the lines with assignments filled in and the indices assigned automatically.
 */
export function withAutomaticLinearAssignment(
  species: string,
  lines: readonly LinearLineInput[],
  intensities: readonly (number | undefined)[],
  options: { readonly temperature?: number; readonly maxOffset?: number },
): { lines: LinearLineInput[]; automatic: ReadonlySet<number>; result?: LinearAssignResult } {
  if (lines.some((l) => l.assignment !== undefined)) return { lines: [...lines], automatic: new Set() };
  const result = assignLinearLines(
    species,
    lines.map((l, i) => ({
      position: l.position,
      ...(l.uncertainty !== undefined ? { uncertainty: l.uncertainty } : {}),
      ...(intensities[i] !== undefined ? { intensity: intensities[i] as number } : {}),
    })),
    {
      ...(options.temperature !== undefined ? { temperature: options.temperature } : {}),
      ...(options.maxOffset !== undefined ? { maxOffset: options.maxOffset } : {}),
    },
  );
  const automatic = new Set<number>();
  const out = lines.map((l, i) => {
    const a = result.lines[i]?.assignment;
    if (!a) return { ...l };
    automatic.add(i);
    return { ...l, assignment: a };
  });
  return { lines: out, automatic, result };
}

/**
 * POST /v1/checks (and GraphQL `check`) for a linear species: the list is assigned automatically (given assignments
 * are not used here), fitted by the linear fit use case, and judged by the identity, calibration and
 * unexplained-lines checks of src/linear/assign.ts. The identification ranking spans the diatomic and the linear
 * library. A fit that cannot be made leaves `fit: null` and the checks say why.
 */
export function runLinearCheck(sent: CheckRequest, applied: Tolerances): CheckResponse {
  const { req, spectrum } = asLineRequest(sent);
  const { tolerances: _tolerances, ...fitReq } = req;
  const unit = fitReq.unit ?? 'cm-1';
  const peaks = (fitReq.lines ?? []).map((l) => {
    const c = toWavenumber(l.position, unit, l.uncertainty);
    return {
      position: c.value,
      ...(c.uncertainty !== undefined ? { uncertainty: c.uncertainty } : {}),
      ...(l.intensity !== undefined ? { intensity: l.intensity } : {}),
    };
  });
  let fit: FitResponse | null = null;
  try {
    // A fully assigned list is fitted with its own assignments (echoed as "given"); any other list is re-assigned.
    const lines = fitReq.lines ?? [];
    const assigned = lines.length > 0 && lines.every((l) => l.assignment !== undefined);
    fit = runLinearFit(assigned ? fitReq : { ...fitReq, lines: lines.map(({ assignment: _a, ...l }) => l) });
    if (spectrum) fit = { ...fit, spectrum };
  } catch (e) {
    if (!(e instanceof ScienceError) || !NO_FIT_CODES.has(e.code)) throw e;
  }
  const species = fit?.species[0]?.formula ?? (fitReq.species as string);
  const result = assignLinearLines(species, peaks, {
    ...(fitReq.options?.temperature !== undefined ? { temperature: fitReq.options.temperature } : {}),
    ...(fitReq.options?.maxOffset !== undefined ? { maxOffset: fitReq.options.maxOffset } : {}),
  });
  const ranking = mergeIdentifications(identifySpecies(peaks), identifyLinearSpecies(peaks));
  const checks = linearChecks(peaks, result, ranking, applied);
  const response: DeepReadonly<CheckResponse> = {
    verdict: verdictOf(checks),
    checks,
    tolerances: { ...applied },
    fit,
    notice: SAFETY_NOTICE,
  };
  return response as CheckResponse;
}

const NO_FIT_CODES = new Set(['FIT_NO_ASSIGNED_LINES', 'FIT_TOO_FEW_LINES', 'FIT_RANK_DEFICIENT']);

/**
 * The linear species an unassigned line list sent WITHOUT a species belongs to, when the diatomic library explained
 * none of it (called only after SPECIES_UNIDENTIFIED, so diatomic lists pay nothing): the best of the linear
 * library's ranking with a score ≥ 0.5 (the diatomic threshold), else undefined. A spectrum is ranked by its peaks
 * (found once: services/usecases/peaks.ts keeps them). Lists with assignments are left to the diatomic answer.
 */
export function identifiedLinearSpecies(sent: FitRequest): string | undefined {
  if (sent.species !== undefined) return undefined;
  const { req } = asLineRequest(sent);
  if (!req.lines || req.lines.length === 0) return undefined;
  if (req.lines.some((l) => l.assignment !== undefined)) return undefined;
  const unit = req.unit ?? 'cm-1';
  const peaks = req.lines.map((l) => ({
    position: toWavenumber(l.position, unit, l.uncertainty).value,
    ...(l.intensity !== undefined ? { intensity: l.intensity } : {}),
  }));
  const best = identifyLinearSpecies(peaks)[0];
  return best && best.score >= 0.5 ? best.species : undefined;
}

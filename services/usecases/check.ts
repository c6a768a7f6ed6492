import { ScienceError } from '../../src/errors.js';
import { checksWithoutFit, DEFAULT_TOLERANCES, runChecks } from '../../src/qa/checks.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { CheckRequest, CheckResponse } from '../schemas/checks.js';
import { analyseRequest, prepareFit, presentFit } from './fit.js';
import { identifiedLinearSpecies, linearSpeciesFirst, runLinearCheck } from './linear-assign.js';
import { isLinearFitRequest } from './linear-fit.js';
import type { DeepReadonly } from './types.js';

/** Errors that mean "no fit could be made", which a QA check reports as a failed identity, not as a 422. */
const NO_FIT = new Set([
  'FIT_NO_ASSIGNED_LINES',
  'NUMBERING_AMBIGUOUS',
  'FIT_TOO_FEW_LINES',
  'FIT_RANK_DEFICIENT',
  'SPECIES_UNIDENTIFIED',
]);

/** POST /v1/checks and GraphQL `check`. */
export function runCheck(req: CheckRequest): CheckResponse {
  const { tolerances, ...fitReq } = req;
  const applied = { ...DEFAULT_TOLERANCES, ...(tolerances ?? {}) };
  if (isLinearFitRequest(fitReq)) return runLinearCheck(req, applied);
  // An unassigned list without a species that a linear molecule explains far better than any diatomic.
  const first = linearSpeciesFirst(fitReq);
  if (first) return runLinearCheck({ ...req, species: first }, applied);
  const prepared = prepareFit(fitReq);
  try {
    const analysed = analyseRequest(prepared);
    const report = runChecks(prepared.peaks, prepared.declared, analysed.analysis, applied);
    const response: DeepReadonly<CheckResponse> = {
      ...report,
      tolerances: applied,
      fit: presentFit(analysed),
      notice: SAFETY_NOTICE,
    };
    return response as CheckResponse;
  } catch (e) {
    // No diatomic explains an unassigned list sent without a species: the linear library may.
    const linear =
      e instanceof ScienceError && e.code === 'SPECIES_UNIDENTIFIED' ? identifiedLinearSpecies(fitReq) : undefined;
    if (linear) return runLinearCheck({ ...req, species: linear }, applied);
    if (e instanceof ScienceError && NO_FIT.has(e.code)) {
      const report = checksWithoutFit(prepared.peaks, prepared.declared, e.message);
      const response: DeepReadonly<CheckResponse> = {
        ...report,
        tolerances: applied,
        fit: null,
        notice: SAFETY_NOTICE,
      };
      return response as CheckResponse;
    }
    throw e;
  }
}

import { ScienceError } from '../../src/errors.js';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseBand } from '../../src/models/transitions.js';
import { type Isotopologue, parseSpecies } from '../../src/species/parse.js';
import { type MassValue, reducedMass } from '../../src/species/reduced-mass.js';
import { toWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { FitRequest, FitResponse } from '../schemas/fit.js';
import type { DeepReadonly } from './types.js';

/**
 * POST /v1/fits and GraphQL `fit`: convert units, resolve species, fit, and shape the response. Both faces call
 * this function, so they cannot drift.
 */
export function runFit(req: FitRequest): FitResponse {
  const unit = req.unit ?? 'cm-1';
  const declared = req.species !== undefined ? parseSpecies(req.species) : undefined;
  const masses = new Map<string, MassValue>();
  const resolve = (s: string | undefined, index: number): Isotopologue => {
    if (s !== undefined) return parseSpecies(s);
    if (declared) return declared;
    throw new ScienceError(
      'SPECIES_UNIDENTIFIED',
      `line ${index} is assigned but names no species, and the request declares none: give "species"`,
      { line: index },
    );
  };
  const lines: LineInput[] = req.lines.map((l, index) => {
    const c = toWavenumber(l.position, unit, l.uncertainty);
    const base = {
      position: c.value,
      ...(c.uncertainty !== undefined ? { uncertainty: c.uncertainty } : {}),
      ...(l.intensity !== undefined ? { intensity: l.intensity } : {}),
    };
    if (!l.assignment) return base;
    const iso = resolve(l.assignment.species, index);
    if (!masses.has(iso.formula)) masses.set(iso.formula, reducedMass(iso));
    let band: ReturnType<typeof parseBand>;
    try {
      band = parseBand(l.assignment.band);
    } catch (e) {
      if (e instanceof ScienceError)
        throw new ScienceError(e.code, `line ${index}: ${e.message}`, { ...e.details, line: index });
      throw e;
    }
    return {
      ...base,
      assignment: {
        species: iso.formula,
        band,
        branch: l.assignment.branch,
        j: l.assignment.j,
        source: 'given' as const,
      },
    };
  });
  const result = fitLineList(lines, masses, req.options ?? {});
  // The science result must match the wire schema (checked here by the compiler, up to readonly-ness).
  const response: DeepReadonly<FitResponse> = { ...result, notice: SAFETY_NOTICE };
  return response as FitResponse;
}

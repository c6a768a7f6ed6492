import { parseBand } from '../../src/models/transitions.js';
import { predictLines } from '../../src/qa/predictions.js';
import { parseSpecies } from '../../src/species/parse.js';
import { fromWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { PredictionRequest, PredictionResponse } from '../schemas/predictions.js';

/** POST /v1/predictions and GraphQL `predict`. */
export function runPrediction(req: PredictionRequest): PredictionResponse {
  const iso = parseSpecies(req.species);
  const r = predictLines(
    iso,
    req.constants
      ? {
          values: req.constants.values,
          ...(req.constants.covariance ? { covariance: req.constants.covariance } : {}),
        }
      : undefined,
    { bands: req.bands.map(parseBand), jMax: req.jMax, temperature: req.temperature },
  );
  return {
    species: iso.formula,
    source: r.source,
    constants: [...r.constants],
    lines: r.lines.map((l) => {
      const c = fromWavenumber(l.wavenumber.value, req.unit, l.wavenumber.uncertainty ?? undefined);
      return {
        ...l,
        wavenumber: { ...l.wavenumber },
        position: { value: c.value, uncertainty: c.uncertainty ?? null, unit: req.unit },
      };
    }),
    notice: SAFETY_NOTICE,
  };
}

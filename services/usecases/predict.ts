import { ScienceError } from '../../src/errors.js';
import { LINEAR_TERM_CONVENTION } from '../../src/linear/fit.js';
import { predictLinearBands } from '../../src/linear/predict.js';
import { isLinearSpeciesString, parseLinearSpecies } from '../../src/linear/species.js';
import { parseBand } from '../../src/models/transitions.js';
import { predictLines } from '../../src/qa/predictions.js';
import { parseSpecies } from '../../src/species/parse.js';
import { fromWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { PredictionRequest, PredictionResponse } from '../schemas/predictions.js';
import { fromWire, toWire } from './linear-fit.js';

/** hc/k, cm·K (CODATA 2018 second radiation constant c₂). */
const C2 = 1.438776877;

/** POST /v1/predictions and GraphQL `predict`. */
export function runPrediction(req: PredictionRequest): PredictionResponse {
  if (isLinearSpeciesString(req.species)) return runLinearPrediction(req);
  const bands = req.bands.map((b) => {
    if (typeof b !== 'string') {
      throw new ScienceError(
        'ASSIGNMENT_INVALID',
        `${req.species} is diatomic: bands are "v'-v''" strings, not { upper, lower } levels`,
        {},
      );
    }
    return parseBand(b);
  });
  const iso = parseSpecies(req.species);
  const r = predictLines(
    iso,
    req.constants
      ? {
          values: req.constants.values,
          ...(req.constants.covariance ? { covariance: req.constants.covariance } : {}),
        }
      : undefined,
    { bands, jMax: req.jMax, temperature: req.temperature },
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

/**
 * Linear polyatomic predictions from the level constants the caller sends (the reference library of linear
 * molecules is a separate piece of work). Relative intensities: ν · Hönl–London · exp(−c₂E″/T), scaled to the
 * strongest line 1; nuclear-spin weights beyond missing levels are not applied.
 */
function runLinearPrediction(req: PredictionRequest): PredictionResponse {
  const species = parseLinearSpecies(req.species);
  if (!req.levels) {
    throw new ScienceError(
      'INPUT_INVALID',
      `predictions for ${species.formula} need "levels": the constants { v, l, G, B, D, … } of every level the bands join`,
      { species: species.formula },
    );
  }
  if (req.constants) {
    throw new ScienceError(
      'INPUT_INVALID',
      'linear polyatomic predictions take per-level "levels", not equilibrium "constants"',
      {},
    );
  }
  const bands = req.bands.map((b) => {
    if (typeof b === 'string') {
      throw new ScienceError(
        'ASSIGNMENT_INVALID',
        `${species.formula} is a linear polyatomic: give bands as { "upper": { "v": [..], "l": l }, "lower": { … } }`,
        { band: b },
      );
    }
    return { upper: fromWire(b.upper), lower: fromWire(b.lower) };
  });
  const levels = req.levels.map((e) => ({
    level: fromWire(e),
    constants: {
      G: e.G,
      B: e.B,
      D: e.D,
      ...(e.H !== undefined ? { H: e.H } : {}),
      ...(e.q !== undefined ? { q: e.q } : {}),
      ...(e.qJ !== undefined ? { qJ: e.qJ } : {}),
    },
  }));
  const lines = predictLinearBands(species, levels, bands, req.jMax);
  const weight = lines.map(
    (l) => Math.abs(l.position) * l.honlLondon * Math.exp((-C2 * l.lowerEnergy) / req.temperature),
  );
  const top = Math.max(...weight, 0);
  return {
    species: species.formula,
    source: 'caller',
    constants: req.levels.flatMap((e) =>
      (['G', 'B', 'D', 'H', 'q', 'qJ'] as const)
        .filter((k) => e[k] !== undefined)
        .map((k) => ({ name: `${k}(${e.v.join(',')}|${e.l})`, value: e[k] as number, uncertainty: null })),
    ),
    lines: lines.map((l, i) => {
      const c = fromWavenumber(l.position, req.unit);
      return {
        band: l.band,
        branch: l.branch,
        j: l.j,
        position: { value: c.value, uncertainty: null, unit: req.unit },
        wavenumber: { value: l.position, uncertainty: null, unit: 'cm-1' },
        relativeIntensity: top > 0 ? (weight[i] as number) / top : 0,
        lowerEnergy: l.lowerEnergy,
        upper: toWire(l.upper),
        lower: toWire(l.lower),
        upperJ: l.upperJ,
        parity: l.lowerParity,
        upperParity: l.upperParity,
      };
    }),
    convention: LINEAR_TERM_CONVENTION,
    notice: SAFETY_NOTICE,
  };
}

import { ScienceError } from '../../src/errors.js';
import { LINEAR_TERM_CONVENTION } from '../../src/linear/fit.js';
import { relativeIntensity } from '../../src/linear/intensity.js';
import { type LevelConstantsEntry, type PredictedLinearLine, predictLinearBands } from '../../src/linear/predict.js';
import {
  LINEAR_REFERENCE,
  LINEAR_SOURCES,
  linearReference,
  type ReferenceLevel,
  type ReferenceSource,
  type ReferenceSpecies,
  type ReferenceValue,
  referenceBands,
  referenceConstants,
} from '../../src/linear/reference.js';
import { isLinearSpeciesString, parseLinearSpecies } from '../../src/linear/species.js';
import { exchangeStatistics, levelSpinWeight } from '../../src/linear/spin-statistics.js';
import { type LinearLevel, levelKey } from '../../src/linear/types.js';
import { parseBand } from '../../src/models/transitions.js';
import { predictLines } from '../../src/qa/predictions.js';
import { parseSpecies } from '../../src/species/parse.js';
import { fromWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { PredictionRequest, PredictionResponse } from '../schemas/predictions.js';
import { fromWire, toWire } from './linear-fit.js';

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
 * Linear polyatomic predictions from per-level constants: the caller's `levels`, or, when none are sent, the
 * reference library of linear molecules (src/linear/reference.ts), every value echoed with its status and source
 * and the sources cited. Bands: the caller's { upper, lower } pairs; with the library and no bands sent (the
 * diatomic default "1-0" left in place) every infrared band of the library for the species. Relative intensities:
 * nuclear-spin weight × Hönl–London factor (one parity component, branches of one J″ summing to 2J″+1) ×
 * Boltzmann factor × ν(1 − e^(−c₂ν/T)) (src/linear/intensity.ts#relativeIntensity), scaled to the strongest line 1.
 * Positions from library values carry the uncertainty their constants' stated σ give (uncorrelated), null when a
 * constant they rest on states none.
 */
function runLinearPrediction(req: PredictionRequest): PredictionResponse {
  const species = parseLinearSpecies(req.species);
  if (req.constants) {
    throw new ScienceError(
      'INPUT_INVALID',
      'linear polyatomic predictions take per-level "levels" (or none, for the reference library), not equilibrium "constants"',
      {},
    );
  }
  const ref = req.levels ? undefined : linearReference(species.formula);
  if (!req.levels && !ref) {
    throw new ScienceError(
      'SPECIES_NOT_IN_LIBRARY',
      `${species.formula} has no reference constants in the linear library (${LINEAR_REFERENCE.map((x) => x.formula).join(', ')}): send "levels", the constants { v, l, G, B, D, … } of every level the bands join`,
      { species: species.formula },
    );
  }
  const defaultBands = req.bands.length === 1 && req.bands[0] === '1-0';
  const bands =
    ref && defaultBands
      ? referenceBands(ref).map((b) => ({ upper: b.upper as LinearLevel, lower: b.lower as LinearLevel }))
      : req.bands.map((b) => {
          if (typeof b === 'string') {
            throw new ScienceError(
              'ASSIGNMENT_INVALID',
              `${species.formula} is a linear polyatomic: give bands as { "upper": { "v": [..], "l": l }, "lower": { … } }${ref ? ', or none for every infrared band of the library' : ''}`,
              { band: b },
            );
          }
          return { upper: fromWire(b.upper), lower: fromWire(b.lower) };
        });
  const levels = ref ? libraryLevels(ref) : callerLevels(req.levels ?? []);
  const lines = predictLinearBands(species, levels, bands, req.jMax);
  const stats = exchangeStatistics(species.formula.split('-'));
  const weight = lines.map((l) =>
    relativeIntensity(
      {
        position: l.position,
        branch: l.branch,
        j: l.j,
        lowerL: l.lower.l,
        upperL: l.upper.l,
        lowerEnergy: l.lowerEnergy,
        spinWeight: levelSpinWeight(stats, l.lower, l.j, l.lowerParity),
      },
      req.temperature,
    ),
  );
  const top = Math.max(...weight, 0);
  const byKey = new Map((ref?.levels ?? []).map((l) => [levelKey(l), l]));
  return {
    species: species.formula,
    source: ref ? 'library' : 'caller',
    constants: ref ? libraryConstants(ref, bands) : callerConstants(req.levels ?? []),
    ...(ref ? { sources: citedSources(ref, bands) } : {}),
    lines: lines.map((l, i) => {
      const sigma = ref ? positionSigma(byKey, l) : null;
      const c = fromWavenumber(l.position, req.unit, sigma ?? undefined);
      return {
        band: l.band,
        branch: l.branch,
        j: l.j,
        position: { value: c.value, uncertainty: sigma === null ? null : (c.uncertainty ?? null), unit: req.unit },
        wavenumber: { value: l.position, uncertainty: sigma, unit: 'cm-1' },
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

type WireLevels = NonNullable<PredictionRequest['levels']>;

function callerLevels(levels: WireLevels): LevelConstantsEntry[] {
  return levels.map((e) => ({
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
}

function callerConstants(levels: WireLevels): PredictionResponse['constants'] {
  return levels.flatMap((e) =>
    (['G', 'B', 'D', 'H', 'q', 'qJ'] as const)
      .filter((k) => e[k] !== undefined)
      .map((k) => ({ name: `${k}(${e.v.join(',')}|${e.l})`, value: e[k] as number, uncertainty: null })),
  );
}

function libraryLevels(ref: ReferenceSpecies): LevelConstantsEntry[] {
  return ref.levels.map((l) => ({
    level: { v: l.v, l: l.l, ...(l.r !== undefined ? { r: l.r } : {}) },
    constants: referenceConstants(l),
  }));
}

const LIBRARY_KEYS = ['G', 'B', 'D', 'H', 'q', 'qJ'] as const;

/** Levels of the library that the bands join, lowest first. */
function levelsJoined(ref: ReferenceSpecies, bands: readonly { upper: LinearLevel; lower: LinearLevel }[]) {
  const keys = new Set(bands.flatMap((b) => [levelKey(b.upper), levelKey(b.lower)]));
  return ref.levels.filter((l) => keys.has(levelKey(l)));
}

/** Every library value the prediction rests on, named K(v|l), with its status and source key (uncertainty null when none). */
function libraryConstants(
  ref: ReferenceSpecies,
  bands: readonly { upper: LinearLevel; lower: LinearLevel }[],
): PredictionResponse['constants'] {
  return levelsJoined(ref, bands).flatMap((l) =>
    LIBRARY_KEYS.flatMap((k) => {
      const x: ReferenceValue | undefined = l[k];
      if (!x || ((k === 'q' || k === 'qJ') && l.l === 0)) return [];
      return [
        {
          name: `${k}(${levelKey(l)})`,
          value: x.value,
          uncertainty: x.uncertainty ?? null,
          status: x.status,
          source: x.source,
        },
      ];
    }),
  );
}

/** The sources cited by those values, keyed as in their `source`. */
function citedSources(
  ref: ReferenceSpecies,
  bands: readonly { upper: LinearLevel; lower: LinearLevel }[],
): Record<string, { cite: string; address: string }> {
  const keys = new Set<string>();
  for (const l of levelsJoined(ref, bands)) {
    for (const k of LIBRARY_KEYS) for (const s of l[k]?.source.split('+') ?? []) keys.add(s);
  }
  return Object.fromEntries(
    [...keys].filter((k) => LINEAR_SOURCES[k]).map((k) => [k, { ...(LINEAR_SOURCES[k] as ReferenceSource) }]),
  );
}

/**
 * 1σ of a predicted position from the stated σ of the constants of both levels, uncorrelated:
 * ∂ν/∂G = ±1, ∂ν/∂B = ±y, ∂ν/∂D = ∓y², ∂ν/∂H = ±y³, ∂ν/∂q = ±(∓x/2) (terms.ts); null when one of them states none.
 */
function positionSigma(byKey: ReadonlyMap<string, ReferenceLevel>, l: PredictedLinearLine): number | null {
  let sum = 0;
  for (const [level, J, parity] of [
    [l.upper, l.upperJ, l.upperParity],
    [l.lower, l.j, l.lowerParity],
  ] as const) {
    const r = byKey.get(levelKey(level));
    if (!r) return null;
    const x = J * (J + 1);
    const y = x - r.l * r.l;
    const parts: [ReferenceValue | undefined, number][] = [
      [r.G, 1],
      [r.B, y],
      [r.D, y * y],
      [r.H, y * y * y],
      [r.l >= 1 ? r.q : undefined, (parity === 'e' ? -0.5 : 0.5) * x],
      [r.l >= 1 ? r.qJ : undefined, (parity === 'e' ? -0.5 : 0.5) * x * x],
    ];
    for (const [v, d] of parts) {
      if (!v) continue;
      if (v.uncertainty === undefined) return null;
      sum += (v.uncertainty * d) ** 2;
    }
  }
  return Math.sqrt(sum);
}

import { ScienceError } from '../../src/errors.js';
import { isLinearSpeciesString } from '../../src/linear/species.js';
import { dunhamFromConstants, printedDigitsUncertainty } from '../../src/potential/constants-input.js';
import { type DunhamCoefficient, potentialCurves } from '../../src/potential/potential-curve.js';
import type { ConstantsInput, PredictionConstant } from '../../src/qa/predictions.js';
import { constantsFor, type LibraryEntry, libraryEntry } from '../../src/species/library.js';
import { type Isotopologue, parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { PotentialRequest, PotentialResponse } from '../schemas/potentials.js';
import { analyseRequest, prepareFit } from './fit.js';

interface PotentialSource {
  readonly species: Isotopologue;
  readonly source: 'library' | 'caller' | 'fit';
  readonly coefficients: DunhamCoefficient[];
  readonly covariance: ArrayLike<number>;
  readonly vData?: number;
  readonly warnings: { code: string; message: string }[];
}

/** POST /v1/potentials, GraphQL `potential` and `branchwise potential`. */
export function runPotential(req: PotentialRequest): PotentialResponse {
  const src = req.lines !== undefined || req.spectrum !== undefined ? fromFit(req) : fromConstants(req);
  return present(src, req.vMax, req.verify, req.refine);
}

function present(src: PotentialSource, vMax: number, verify: boolean, refine?: boolean): PotentialResponse {
  const mu = reducedMass(src.species);
  const r = potentialCurves({
    coefficients: src.coefficients,
    covariance: src.covariance,
    reducedMass: mu,
    vMax,
    ...(src.vData !== undefined ? { vData: src.vData } : {}),
    verify,
    ...(refine !== undefined ? { refine } : {}),
  });
  return {
    species: src.species.formula,
    source: src.source,
    reducedMass: { value: mu.value, uncertainty: mu.uncertainty, unit: 'u' },
    hbar2Over2mu: r.hbar2Over2mu,
    vMax,
    ...(src.vData !== undefined ? { vData: src.vData } : {}),
    levels: r.levels.map((l) => ({ ...l })),
    ...(r.morse ? { morse: { ...r.morse } } : {}),
    curves: { rkr: [...r.curves.rkr], morse: [...r.curves.morse] },
    ...(r.verification
      ? { verification: { ...r.verification, levels: r.verification.levels.map((l) => ({ ...l })) } }
      : {}),
    ...(r.refined
      ? {
          refined: {
            ...r.refined,
            rounds: r.refined.rounds.map((x) => ({ ...x })),
            levels: r.refined.levels.map((l) => ({ ...l })),
          },
        }
      : {}),
    warnings: [...src.warnings, ...r.warnings],
    notice: SAFETY_NOTICE,
  };
}

/** Potential curves (RKR, Morse) are one-coordinate curves of a diatomic: a linear polyatomic gets a plain 422. */
function refuseLinear(species: string | undefined): void {
  if (species === undefined || !isLinearSpeciesString(species)) return;
  throw new ScienceError(
    'INPUT_INVALID',
    `potential curves are for diatomics: "${species}" is a linear polyatomic molecule, whose levels depend on several coordinates (fit its lines with /v1/fits instead)`,
    { species },
  );
}

/**
 * The rounding uncertainty of a library value's last printed digit. A mass-scaled entry (derivedFrom) prints no
 * digits of its own: its values carry the parent's rounding, scaled by the same mass factor as the value.
 */
function libraryRounding(entry: LibraryEntry, name: string, value: number): number {
  const parent = entry.derivedFrom ? libraryEntry(entry.derivedFrom) : undefined;
  const p = parent?.constants[name as keyof LibraryEntry['constants']];
  if (p && p.value !== 0) return printedDigitsUncertainty(p.value) * Math.abs(value / p.value);
  return printedDigitsUncertainty(value);
}

function fromConstants(req: PotentialRequest): PotentialSource {
  refuseLinear(req.species);
  const species = parseSpecies(req.species as string);
  let input: ConstantsInput | undefined = req.constants;
  let source: PotentialSource['source'] = 'caller';
  const warnings: PotentialSource['warnings'] = [];
  if (!input) {
    const entry = constantsFor(species);
    if (!entry) {
      throw new ScienceError(
        'SPECIES_NOT_IN_LIBRARY',
        `${species.formula} is not in the reference library: send its constants`,
        { species: species.formula },
      );
    }
    // The library's tables print no uncertainties; each value carries at least the rounding of its last digit.
    const values: Partial<Record<PredictionConstant, { value: number; uncertainty: number }>> = {};
    for (const [name, c] of Object.entries(entry.constants)) {
      if (c && c.unit === 'cm-1')
        values[name as PredictionConstant] = { value: c.value, uncertainty: libraryRounding(entry, name, c.value) };
    }
    input = { values };
    source = 'library';
    warnings.push({
      code: 'POTENTIAL_NO_COVARIANCE',
      message:
        'the library tabulates its constants without uncertainties: each is given the rounding uncertainty of its last printed digit (half a unit, uniform: u = 10^-d/√12; a mass-scaled isotopologue takes that of its parent, scaled), uncorrelated; the uncertainties of the turning points are lower bounds',
    });
  }
  const d = dunhamFromConstants(input);
  return {
    species,
    source,
    coefficients: d.coefficients,
    covariance: d.covariance,
    ...(req.vData !== undefined ? { vData: req.vData } : {}),
    warnings,
  };
}

function fromFit(req: PotentialRequest): PotentialSource {
  refuseLinear(req.species);
  const { constants: _c, vMax: _v, vData: _d, verify: _f, refine: _r, sample: _s, ...fitBody } = req;
  const { analysis, declared } = analyseRequest(prepareFit(fitBody));
  return fromFitResult(analysis.result, declared?.formula);
}

/** The parts of a fit (FitResult or its REST shape) a potential needs. */
export interface FitForPotential {
  readonly dunham: readonly {
    readonly species: string;
    readonly parameters: readonly { readonly name: string; readonly value: number }[];
    readonly covariance: { readonly matrix: readonly (readonly number[])[] };
  }[];
  /** v is a number for diatomic levels (linear polyatomic levels carry an array and are ignored here). */
  readonly levels: readonly { readonly species: string; readonly v: number | readonly number[] }[];
  readonly warnings: readonly { readonly code: string; readonly message: string }[];
}

function fromFitResult(result: FitForPotential, declared?: string): PotentialSource {
  const formula = declared ?? result.dunham[0]?.species;
  const dunham = result.dunham.find((d) => d.species === formula);
  if (!formula || !dunham) {
    throw new ScienceError(
      'POTENTIAL_UNDETERMINED',
      'the fit determined no Dunham coefficients (lines of two or more vibrational levels are needed)',
      { warnings: result.warnings.map((w) => w.code) },
    );
  }
  const idx: number[] = [];
  const coefficients: DunhamCoefficient[] = [];
  dunham.parameters.forEach((p, i) => {
    const m = /^Y(\d)(\d)$/.exec(p.name);
    if (!m) return;
    const k = Number(m[1]);
    const l = Number(m[2]);
    if (l > 1 || (l === 0 && k === 0)) return;
    idx.push(i);
    coefficients.push({ k, l, value: p.value });
  });
  const covariance = new Float64Array(idx.length * idx.length);
  idx.forEach((a, i) => {
    idx.forEach((b, j) => {
      covariance[i * idx.length + j] = dunham.covariance.matrix[a]?.[b] as number;
    });
  });
  const vs = result.levels
    .filter((l) => l.species === formula)
    .map((l) => l.v)
    .filter((v): v is number => typeof v === 'number');
  return {
    species: parseSpecies(formula),
    source: 'fit',
    coefficients,
    covariance,
    ...(vs.length > 0 ? { vData: Math.max(...vs) } : {}),
    warnings: result.warnings
      .filter((w) => w.code === 'HIGHER_TERMS_NEGLECTED' || w.code === 'VIBRATION_NEEDS_TWO_INTERVALS')
      .map((w) => ({ code: w.code, message: w.message })),
  };
}

/**
 * The potential of a fit over the levels its data reached, for the report: only when the fit determined ω_e x_e
 * (two or more vibrational intervals), else undefined. Refusals of the science (G not increasing …) also give
 * undefined: the report then simply has no potential plot.
 */
export function potentialOfFit(fit: FitForPotential): PotentialResponse | undefined {
  const d = fit.dunham.find(
    (x) => x.parameters.some((p) => p.name === 'Y20') && x.parameters.some((p) => p.name === 'Y01'),
  );
  if (!d) return undefined;
  try {
    const src = fromFitResult(fit, d.species);
    if (src.vData === undefined) return undefined;
    return present(src, src.vData, true);
  } catch (e) {
    if (e instanceof ScienceError) return undefined;
    throw e;
  }
}

import { bandStrengthGuess, relativeIntensity } from '../assign/intensity.js';
import { ScienceError } from '../errors.js';
import { dunhamBasis } from '../models/dunham.js';
import { type Band, type Branch, upperJ } from '../models/transitions.js';
import { constantsFor } from '../species/library.js';
import type { Isotopologue } from '../species/parse.js';

/** Customary constants and the Dunham coefficient each one is, with its sign (Y10 = ω_e, Y20 = −ω_e x_e, …). */
export const CONSTANT_TO_DUNHAM = {
  omega_e: { k: 1, l: 0, sign: 1 },
  omega_e_x_e: { k: 2, l: 0, sign: -1 },
  omega_e_y_e: { k: 3, l: 0, sign: 1 },
  omega_e_z_e: { k: 4, l: 0, sign: 1 },
  B_e: { k: 0, l: 1, sign: 1 },
  alpha_e: { k: 1, l: 1, sign: -1 },
  gamma_e: { k: 2, l: 1, sign: 1 },
  D_e: { k: 0, l: 2, sign: -1 },
  beta_e: { k: 1, l: 2, sign: -1 },
  H_e: { k: 0, l: 3, sign: 1 },
} as const;
export type PredictionConstant = keyof typeof CONSTANT_TO_DUNHAM;

export interface ConstantsInput {
  readonly values: Readonly<Partial<Record<PredictionConstant, { value: number; uncertainty?: number }>>>;
  /** Full covariance of the constants, in the order of `names`; overrides the separate uncertainties. */
  readonly covariance?: {
    readonly names: readonly PredictionConstant[];
    readonly matrix: readonly (readonly number[])[];
  };
}

export interface PredictionOptions {
  readonly bands: readonly Band[];
  /** Highest J″. Default 30. */
  readonly jMax?: number;
  /** K, for relative intensities. Default 296. */
  readonly temperature?: number;
}

export interface PredictedTransition {
  readonly band: string;
  readonly branch: Branch;
  readonly j: number;
  /**
   * Wavenumber with its standard uncertainty propagated from the constants' covariance; the uncertainty is null when
   * a constant it depends on has none (library values without a published uncertainty), never 0.
   */
  readonly wavenumber: { readonly value: number; readonly uncertainty: number | null; readonly unit: 'cm-1' };
  /** Relative intensity (1 = strongest line predicted); across bands only an order-of-magnitude guide. */
  readonly relativeIntensity: number;
  /** E″ above v = 0, J = 0, cm⁻¹. */
  readonly lowerEnergy: number;
}

export interface PredictionResult {
  readonly source: 'library' | 'caller';
  /** The constants used; uncertainty null when the value came without one. */
  readonly constants: readonly { name: PredictionConstant; value: number; uncertainty: number | null }[];
  readonly lines: readonly PredictedTransition[];
}

/**
 * Line positions of chosen bands from equilibrium constants, with uncertainties σ² = gᵀ Σ g where g holds the
 * derivatives of the position with respect to each constant (the position is linear in the Dunham coefficients),
 * and relative intensities at a temperature (Hönl–London, Boltzmann; SCIENCE.md §5).
 */
export function predictLines(
  species: Isotopologue,
  constants: ConstantsInput | undefined,
  options: PredictionOptions,
): PredictionResult {
  const source: PredictionResult['source'] = constants ? 'caller' : 'library';
  const c = constantsWithCovariance(constants ?? libraryConstants(species));
  const raw = options.bands.flatMap((band) =>
    (band.upper === band.lower ? (['R'] as Branch[]) : (['P', 'R'] as Branch[])).flatMap((branch) =>
      branchLines(c, band, branch, options),
    ),
  );
  const max = Math.max(...raw.map((r) => r.strength), 0);
  return {
    source,
    constants: c.names.map((n, i) => ({
      name: n,
      value: c.x[i] as number,
      uncertainty: c.known[i] ? Math.sqrt(c.cov[i * c.p + i] as number) : null,
    })),
    lines: raw.map(({ strength, ...l }) => ({ ...l, relativeIntensity: max > 0 ? strength / max : 0 })),
  };
}

/** The library's equilibrium constants of the species, without uncertainties. */
function libraryConstants(species: Isotopologue): ConstantsInput {
  const entry = constantsFor(species);
  if (!entry) {
    throw new ScienceError(
      'SPECIES_NOT_IN_LIBRARY',
      `${species.formula} is not in the reference library: send its constants`,
      {
        species: species.formula,
      },
    );
  }
  const values: Partial<Record<PredictionConstant, { value: number }>> = {};
  for (const name of Object.keys(CONSTANT_TO_DUNHAM) as PredictionConstant[]) {
    const c = entry.constants[name as keyof typeof entry.constants];
    if (c) values[name] = { value: c.value };
  }
  return { values };
}

/** The constants given, their values, which have a known uncertainty, and their covariance (row-major p × p). */
interface Constants {
  readonly names: readonly PredictionConstant[];
  readonly p: number;
  readonly x: readonly number[];
  readonly known: readonly boolean[];
  readonly cov: Float64Array;
}

function constantsWithCovariance(input: ConstantsInput): Constants {
  const names = (Object.keys(CONSTANT_TO_DUNHAM) as PredictionConstant[]).filter((n) => input.values[n] !== undefined);
  if (!names.includes('B_e') || !names.includes('omega_e')) {
    throw new ScienceError(
      'INPUT_INVALID',
      'constants need at least omega_e and B_e (in constants.values; leave constants out to use the reference library)',
      { given: names },
    );
  }
  const p = names.length;
  const x = names.map((n) => input.values[n]?.value as number);
  // A constant without an uncertainty (and no covariance) has an unknown one, not a zero one.
  const known = names.map((n) => input.covariance !== undefined || input.values[n]?.uncertainty !== undefined);
  const cov = new Float64Array(p * p);
  if (input.covariance) {
    const idx = input.covariance.names.map((n) => names.indexOf(n));
    if (idx.some((i) => i < 0) || input.covariance.matrix.length !== idx.length) {
      throw new ScienceError(
        'INPUT_INVALID',
        'the covariance names must be constants that are given, one row per name',
        {
          names: input.covariance.names,
        },
      );
    }
    input.covariance.matrix.forEach((row, a) => {
      if (row.length !== idx.length)
        throw new ScienceError('INPUT_INVALID', 'the covariance matrix must be square', {});
      row.forEach((v, b) => {
        cov[(idx[a] as number) * p + (idx[b] as number)] = v;
      });
    });
  } else {
    names.forEach((n, i) => {
      const u = input.values[n]?.uncertainty ?? 0;
      cov[i * p + i] = u * u;
    });
  }
  return { names, p, x, known, cov };
}

/** Term value E(v, J) from the constants. */
function energyOf(c: Constants, v: number, j: number): number {
  return c.names.reduce((s, n, i) => {
    const d = CONSTANT_TO_DUNHAM[n];
    return s + d.sign * (c.x[i] as number) * dunhamBasis(d.k, d.l, v, j);
  }, 0);
}

/**
 * One branch's lines, up to jMax. A power series in J(J+1) holds only while the term values it gives still rise
 * with J: past the first J where the lower or upper level's energy stops rising (the centrifugal terms take over),
 * the branch ends.
 */
function branchLines(
  c: Constants,
  band: Band,
  branch: Branch,
  options: PredictionOptions,
): (PredictedTransition & { strength: number })[] {
  const T = options.temperature ?? 296;
  const jMax = options.jMax ?? 30;
  const e00 = energyOf(c, 0, 0);
  const out: (PredictedTransition & { strength: number })[] = [];
  let lastLower = Number.NEGATIVE_INFINITY;
  let lastUpper = Number.NEGATIVE_INFINITY;
  for (let j = branch === 'P' ? 1 : 0; j <= jMax; j++) {
    const ju = upperJ({ branch, j });
    const el = energyOf(c, band.lower, j);
    const eu = energyOf(c, band.upper, ju);
    if (!(el > lastLower && eu > lastUpper)) break;
    lastLower = el;
    lastUpper = eu;
    const nu = eu - el;
    const { variance, unknown } = positionVariance(c, band, ju, j);
    const s = nu > 0 ? bandStrengthGuess(band) * relativeIntensity(nu, branch, j, el - e00, T) : 0;
    // A Boltzmann factor that overflows (a term value below the ground level) has no meaning: the branch ends.
    if (!Number.isFinite(s) || !Number.isFinite(variance)) break;
    out.push({
      band: `${band.upper}-${band.lower}`,
      branch,
      j,
      wavenumber: { value: nu, uncertainty: unknown ? null : Math.sqrt(Math.max(variance, 0)), unit: 'cm-1' },
      relativeIntensity: 0,
      lowerEnergy: el - e00,
      strength: s,
    });
  }
  return out;
}

/** gᵀ Σ g for one line, and whether it depends on a constant of unknown uncertainty. */
function positionVariance(c: Constants, band: Band, ju: number, j: number): { variance: number; unknown: boolean } {
  const g = c.names.map((n) => {
    const d = CONSTANT_TO_DUNHAM[n];
    return d.sign * (dunhamBasis(d.k, d.l, band.upper, ju) - dunhamBasis(d.k, d.l, band.lower, j));
  });
  const unknown = g.some((ga, a) => ga !== 0 && !c.known[a]);
  let variance = 0;
  for (let a = 0; a < c.p; a++)
    for (let b = 0; b < c.p; b++) variance += (g[a] as number) * (c.cov[a * c.p + b] as number) * (g[b] as number);
  return { variance, unknown };
}

import { ROTATIONAL_FACTOR } from '../constants/codata-2018.js';
import { propagate, type Quantity, quantity, subCovariance } from '../derive/quantity.js';
import { ScienceError } from '../errors.js';
import type { MassValue } from '../species/reduced-mass.js';
import { morseEnergy, morseFromConstants } from './morse.js';
import { compareLevels, refineRkrCurve, solveOnRkrCurve } from './refine.js';
import { rkrTurningPoints, type TurningPoints } from './rkr.js';
import {
  rotationalConstant,
  type VibrationalSeries,
  vibrationalEnergy,
  vibrationalSlope,
} from './vibrational-terms.js';

/** One Dunham coefficient Y_kl (cm⁻¹); only l = 0 (vibration) and l = 1 (rotation) enter the potential. */
export interface DunhamCoefficient {
  readonly k: number;
  readonly l: number;
  readonly value: number;
}

export interface PotentialInput {
  readonly coefficients: readonly DunhamCoefficient[];
  /** Row-major covariance of `coefficients` (cm⁻²); zeros when the constants carry no uncertainty. */
  readonly covariance: ArrayLike<number>;
  readonly reducedMass: MassValue;
  /** Highest level to give turning points for. */
  readonly vMax: number;
  /** Highest vibrational level the data behind the constants reached, when known. */
  readonly vData?: number;
  /** Solve the radial equation on the RKR curve and compare. Default true. */
  readonly verify?: boolean;
  /**
   * Correct the curve until its Numerov levels give back G_v − G_0 and B_v (refine.ts). Default: as `verify`.
   */
  readonly refine?: boolean;
}

export interface PotentialLevel {
  readonly v: number;
  readonly energy: Quantity;
  readonly rMin: Quantity;
  readonly rMax: Quantity;
  readonly B: Quantity;
}

export interface CurvePoint {
  readonly r: number;
  readonly energy: number;
}

export interface NumerovCheck {
  /** Highest v of the RKR points the radial equation was solved on. */
  readonly vTop: number;
  readonly grid: { readonly from: number; readonly to: number; readonly step: number; readonly points: number };
  /** E_0(Numerov) − G(0): the v-independent shift first-order RKR leaves out (≈ Dunham's Y00). */
  readonly zeroPointShift: number;
  readonly levels: readonly {
    readonly v: number;
    /** Numerov eigenvalue above the minimum, cm⁻¹. */
    readonly energy: number;
    /** (E_v − E_0) − (G_v − G_0), cm⁻¹. */
    readonly intervalError: number;
    /** C⟨1/r²⟩, cm⁻¹. */
    readonly B: number;
    /** (B_v(Numerov) − B_v)/B_v. */
    readonly rotationalRelativeError: number;
  }[];
  readonly worstIntervalError: number;
  readonly worstRotationalRelativeError: number;
}

/** The refined curve: turning points at its quantum levels and its own round trip. */
export interface RefinedPotential {
  readonly vTop: number;
  /** The levels' response to a correction first taken as the identity, or measured (when the first did not do). */
  readonly start: 'identity' | 'finite-difference';
  /** Numerov solves made in all. */
  readonly solves: number;
  /** The worst residuals after each round of the kept run (the first is the first-order curve). */
  readonly rounds: readonly { readonly worstIntervalError: number; readonly worstRotationalRelativeError: number }[];
  readonly grid: NumerovCheck['grid'];
  /** E_0 − G_0 of the refined curve, cm⁻¹ (Dunham's Y00 with its higher-order terms). */
  readonly zeroPointShift: number;
  readonly levels: readonly {
    readonly v: number;
    /** E_v above the refined curve's minimum (G_v − G_0 + E_0), cm⁻¹; σ that of G_v. */
    readonly energy: Quantity;
    /** Classical turning points of the refined curve at E_v, Å; σ those of the first-order points. */
    readonly rMin: Quantity;
    readonly rMax: Quantity;
    readonly intervalError: number;
    readonly B: number;
    readonly rotationalRelativeError: number;
  }[];
  readonly worstIntervalError: number;
  readonly worstRotationalRelativeError: number;
  /** Both goals met: intervals within 0.01 cm⁻¹, B_v within 1e-4 relative. */
  readonly withinGoals: boolean;
}

export interface PotentialWarning {
  readonly code: string;
  readonly message: string;
}

export interface PotentialResult {
  readonly hbar2Over2mu: number;
  readonly levels: readonly PotentialLevel[];
  readonly morse?: { readonly D_e: Quantity; readonly a: Quantity; readonly r_e: Quantity };
  readonly curves: { readonly rkr: readonly CurvePoint[]; readonly morse: readonly CurvePoint[] };
  readonly verification?: NumerovCheck;
  readonly refined?: RefinedPotential;
  readonly warnings: readonly PotentialWarning[];
}

/** How far beyond the data the expansion may be used (a project rule): vMax ≤ 2·vData + 3. */
export const extrapolationLimit = (vData: number): number => 2 * vData + 3;

/** Levels of RKR points above vMax used by the Numerov check when G(v) allows. */
export const CHECK_MARGIN = 3;

/** Largest vMax accepted by the science (the service's schema may say less). */
export const MAX_V = 100;

function seriesOf(coefficients: readonly DunhamCoefficient[], values: readonly number[]): VibrationalSeries {
  const g: number[] = [];
  const b: number[] = [];
  coefficients.forEach((c, i) => {
    const val = values[i] as number;
    if (c.l === 0 && c.k >= 1) {
      while (g.length < c.k) g.push(0);
      g[c.k - 1] = val;
    } else if (c.l === 1) {
      while (b.length <= c.k) b.push(0);
      b[c.k] = val;
    }
  });
  return { g, b };
}

/**
 * Where G(v) stops increasing or B(v) stops being positive on v ∈ [−½, vTop], scanned on a fine grid (the
 * polynomials are of low degree, so 4000 samples cannot step over a sign change of interest).
 */
function firstInvalid(series: VibrationalSeries, vTop: number): { v: number; what: 'slope' | 'rotation' } | undefined {
  const steps = 4000;
  for (let i = 0; i <= steps; i++) {
    const x = ((vTop + 0.5) * i) / steps;
    if (!(vibrationalSlope(series, x) > 0)) return { v: x - 0.5, what: 'slope' };
    if (!(rotationalConstant(series, x) > 0)) return { v: x - 0.5, what: 'rotation' };
  }
  return undefined;
}

/**
 * RKR turning points with uncertainties, the Morse curve from the same constants, curve points for plotting and a
 * Numerov check of the RKR curve. Refuses (ScienceError) what first-order RKR cannot honestly give: G(v) not
 * increasing or B(v) not positive up to vMax, or vMax far beyond the levels the data reached.
 */
export function potentialCurves(input: PotentialInput): PotentialResult {
  const { coefficients, vMax } = input;
  checkInput(input);
  const warnings: PotentialWarning[] = rangeWarnings(input);
  const values = coefficients.map((c) => c.value);
  const series = seriesOf(coefficients, values);
  checkValidUpTo(series, vMax);
  warnings.push(...missingTermWarnings(coefficients));
  // ħ²/2μ in cm⁻¹ Å²: B μ r² = h/(8π²c m_u). The mass uncertainty (AME2020, ≲1e-9 relative) is neglected.
  const C = ROTATIONAL_FACTOR / input.reducedMass.value;
  const at = (vals: readonly number[], v: number): TurningPoints =>
    rkrTurningPoints({ series: seriesOf(coefficients, vals), hbar2Over2mu: C }, v);
  const levels = levelsWithUncertainties(input, values, series, at);
  let morse = morseOf(coefficients, values, input.covariance, C, warnings);
  const rkr = rkrCurve(at, values, vMax);
  const morseCurve = morse ? morsePoints(morse, rkr) : [];
  let verification = input.verify !== false ? verifyCurve(series, C, vMax, warnings) : undefined;
  const refined =
    verification && (input.refine ?? input.verify !== false)
      ? refineCurve(series, C, vMax, verification.vTop, levels, warnings)
      : undefined;
  const finite = (q: Quantity) => Number.isFinite(q.value) && Number.isFinite(q.uncertainty);
  if (!levels.every((l) => finite(l.energy) && finite(l.rMin) && finite(l.rMax) && finite(l.B))) {
    throw new ScienceError(
      'POTENTIAL_CONSTANTS_INVALID',
      'the constants give turning points that are not finite numbers',
      {
        vMax,
      },
    );
  }
  if (morse && !(finite(morse.D_e) && finite(morse.a) && finite(morse.r_e))) {
    morse = undefined;
    warnings.push({ code: 'POTENTIAL_NO_MORSE', message: 'the Morse parameters of these constants are not finite' });
  }
  const finiteCurve = (c: readonly CurvePoint[]) => c.every((p) => Number.isFinite(p.r) && Number.isFinite(p.energy));
  if (
    verification &&
    !(
      Number.isFinite(verification.worstIntervalError) &&
      Number.isFinite(verification.worstRotationalRelativeError) &&
      Number.isFinite(verification.zeroPointShift)
    )
  ) {
    verification = undefined;
    warnings.push({
      code: 'POTENTIAL_NOT_VERIFIED',
      message: 'the Numerov check gave no finite numbers for this curve',
    });
  }
  return {
    hbar2Over2mu: C,
    levels,
    ...(morse ? { morse } : {}),
    curves: { rkr: finiteCurve(rkr) ? rkr : [], morse: morse && finiteCurve(morseCurve) ? morseCurve : [] },
    ...(verification ? { verification } : {}),
    ...(refined ? { refined } : {}),
    warnings,
  };
}

/** ω_e and B_e are needed; vMax must be an integer in range. */
function checkInput({ coefficients, vMax }: PotentialInput): void {
  const has = (k: number, l: number) => coefficients.some((c) => c.k === k && c.l === l);
  if (!has(1, 0) || !has(0, 1)) {
    throw new ScienceError(
      'POTENTIAL_UNDETERMINED',
      'turning points need at least omega_e (Y10) and B_e (Y01): from a fit, send lines of two or more vibrational levels (a fundamental with an overtone or a hot band); or send the constants in constants.values, or the species alone to use the reference library',
      {
        given: coefficients.map((c) => `Y${c.k}${c.l}`),
      },
    );
  }
  if (!Number.isInteger(vMax) || vMax < 0 || vMax > MAX_V) {
    throw new ScienceError('INPUT_INVALID', `vMax must be an integer from 0 to ${MAX_V}`, { vMax });
  }
}

/** How far vMax lies beyond the levels the data reached: refused when too far, warned when beyond or unknown. */
function rangeWarnings({ vMax, vData }: PotentialInput): PotentialWarning[] {
  if (vData === undefined) {
    return [
      {
        code: 'POTENTIAL_RANGE_UNKNOWN',
        message: 'the levels the constants were fitted to are not known: turning points above them are extrapolated',
      },
    ];
  }
  const limit = extrapolationLimit(vData);
  if (vMax > limit) {
    throw new ScienceError(
      'POTENTIAL_EXTRAPOLATION_TOO_FAR',
      `vMax = ${vMax} is far beyond the highest level the data reached (v = ${vData}); at most ${limit} is accepted`,
      { vMax, vData, limit },
    );
  }
  return vMax > vData
    ? [
        {
          code: 'POTENTIAL_EXTRAPOLATED',
          message: `levels above v = ${vData} (up to ${vMax}) use the expansion beyond the levels the data reached`,
        },
      ]
    : [];
}

/** Refuses constants whose G(v) stops increasing or whose B(v) stops being positive below vMax. */
function checkValidUpTo(series: VibrationalSeries, vMax: number): void {
  const bad = firstInvalid(series, vMax);
  if (!bad) return;
  const code = bad.what === 'slope' ? 'POTENTIAL_LEVELS_NOT_INCREASING' : 'POTENTIAL_CONSTANTS_INVALID';
  const what = bad.what === 'slope' ? 'G(v) stops increasing' : 'B(v) is no longer positive';
  throw new ScienceError(code, `${what} near v = ${bad.v.toFixed(2)}, below vMax = ${vMax}`, {
    vMax,
    v: Number(bad.v.toFixed(3)),
    vLimit: Math.max(Math.floor(bad.v) - 1, -1),
  });
}

function missingTermWarnings(coefficients: readonly DunhamCoefficient[]): PotentialWarning[] {
  const has = (k: number, l: number) => coefficients.some((c) => c.k === k && c.l === l);
  const warnings: PotentialWarning[] = [];
  if (!has(2, 0)) {
    warnings.push({
      code: 'POTENTIAL_HARMONIC',
      message: 'without omega_e_x_e the levels are harmonic; no Morse curve',
    });
  }
  if (!has(1, 1)) {
    warnings.push({ code: 'POTENTIAL_RIGID', message: 'without alpha_e, B(v) is taken as B_e at every level' });
  }
  return warnings;
}

/** Energy, turning points and B of every level up to vMax, each with its uncertainty through the covariance. */
function levelsWithUncertainties(
  input: PotentialInput,
  values: readonly number[],
  series: VibrationalSeries,
  at: (vals: readonly number[], v: number) => TurningPoints,
): PotentialLevel[] {
  const { coefficients, covariance: cov } = input;
  const levels: PotentialLevel[] = [];
  for (let v = 0; v <= input.vMax; v++) {
    const tp = at(values, v);
    if (!(tp.rMin > 0) || !Number.isFinite(tp.rMax)) {
      throw new ScienceError('POTENTIAL_CONSTANTS_INVALID', `the RKR integrals give no turning points at v = ${v}`, {
        v,
      });
    }
    const x = v + 0.5;
    levels.push({
      v,
      energy: quantity(
        tp.energy,
        propagate((y) => vibrationalEnergy(seriesOf(coefficients, y), x), values, cov),
        'cm-1',
      ),
      rMin: quantity(
        tp.rMin,
        propagate((y) => at(y, v).rMin, values, cov),
        'angstrom',
      ),
      rMax: quantity(
        tp.rMax,
        propagate((y) => at(y, v).rMax, values, cov),
        'angstrom',
      ),
      B: quantity(
        rotationalConstant(series, x),
        propagate((y) => rotationalConstant(seriesOf(coefficients, y), x), values, cov),
        'cm-1',
      ),
    });
  }
  return levels;
}

/** The Morse parameters from ω_e, ω_e x_e and B_e with their covariance, where ω_e x_e > 0 (Y20 < 0). */
function morseOf(
  coefficients: readonly DunhamCoefficient[],
  values: readonly number[],
  cov: PotentialInput['covariance'],
  C: number,
  warnings: PotentialWarning[],
): PotentialResult['morse'] {
  const iw = coefficients.findIndex((c) => c.k === 1 && c.l === 0);
  const ix = coefficients.findIndex((c) => c.k === 2 && c.l === 0);
  const ib = coefficients.findIndex((c) => c.k === 0 && c.l === 1);
  if (ix < 0) return undefined;
  if (!((values[ix] as number) < 0)) {
    warnings.push({ code: 'POTENTIAL_NO_MORSE', message: 'omega_e_x_e is not positive: no Morse curve' });
    return undefined;
  }
  const idx = [iw, ix, ib];
  const x3 = idx.map((i) => values[i] as number);
  const c3 = subCovariance(cov, coefficients.length, idx);
  // Y20 = −ω_e x_e.
  const params = (y: readonly number[]) => morseFromConstants(y[0] as number, -(y[1] as number), y[2] as number, C);
  const m = params(x3);
  return {
    D_e: quantity(
      m.depth,
      propagate((y) => params(y).depth, x3, c3),
      'cm-1',
    ),
    a: quantity(
      m.range,
      propagate((y) => params(y).range, x3, c3),
      'angstrom-1',
    ),
    r_e: quantity(
      m.equilibrium,
      propagate((y) => params(y).equilibrium, x3, c3),
      'angstrom',
    ),
  };
}

/**
 * The Numerov check of the RKR curve. The curve is carried a little above vMax so that the tunnelling tails of the
 * top levels see RKR points, not the continuation (a check of the curve only: the turning points reported stop at
 * vMax).
 */
function verifyCurve(
  series: VibrationalSeries,
  C: number,
  vMax: number,
  warnings: PotentialWarning[],
): NumerovCheck | undefined {
  let vTop = vMax + CHECK_MARGIN;
  while (vTop > vMax && firstInvalid(series, vTop)) vTop -= 0.5;
  const verification = numerovCheck(series, C, vMax, vTop);
  if (!verification) {
    warnings.push({
      code: 'POTENTIAL_NOT_VERIFIED',
      message: 'the RKR curve is not single-valued on each side of the minimum; the Numerov check was skipped',
    });
  }
  return verification;
}

/** Turning points every quarter level from the minimum to vMax, in order of r, for plotting. */
function rkrCurve(at: (vals: readonly number[], v: number) => TurningPoints, values: number[], vMax: number) {
  const pts: TurningPoints[] = [];
  for (let q = 0; q <= 4 * vMax; q++) pts.push(at(values, q / 4));
  const re = at(values, -0.5).rMin;
  return [
    ...pts.map((t) => ({ r: t.rMin, energy: t.energy })).reverse(),
    { r: re, energy: 0 },
    ...pts.map((t) => ({ r: t.rMax, energy: t.energy })),
  ];
}

function morsePoints(m: NonNullable<PotentialResult['morse']>, rkr: readonly CurvePoint[]): CurvePoint[] {
  const rs = rkr.map((c) => c.r);
  const top = Math.max(...rkr.map((c) => c.energy), 1);
  const lo = Math.min(...rs);
  const hi = Math.max(...rs);
  const span = hi - lo;
  const params = { depth: m.D_e.value, range: m.a.value, equilibrium: m.r_e.value };
  const out: CurvePoint[] = [];
  const n = 160;
  for (let i = 0; i <= n; i++) {
    const r = lo - 0.05 * span + (1.4 * span * i) / n;
    const energy = morseEnergy(params, r);
    if (energy <= 1.5 * top) out.push({ r, energy });
  }
  return out;
}

/**
 * The Numerov check: the RKR curve as V(r) (see rkr-curve.ts) and the radial equation solved on a uniform grid of
 * 6000 points reaching a quarter of the well's width inside and half of it outside the outermost turning points.
 */
export function numerovCheck(
  series: VibrationalSeries,
  C: number,
  vMax: number,
  vTop: number,
): NumerovCheck | undefined {
  const solved = solveOnRkrCurve(series, C, vTop, vMax + 1);
  if (!solved || solved.levels.length === 0) return undefined;
  return { vTop, ...compareLevels(series, solved.grid, solved.levels) };
}

/** Goals of the round trip (issue 17). */
export const ROUND_TRIP_GOALS = { interval: 0.01, rotationalRelative: 1e-4 } as const;

/**
 * The curve corrected until its Numerov levels give back the constants (refine.ts), on the RKR points of the check.
 * The turning points' uncertainties are those of the first-order points: the correction (≲ 1e-4 Å for HCl) moves
 * with the constants only at second order.
 */
function refineCurve(
  series: VibrationalSeries,
  C: number,
  vMax: number,
  vTop: number,
  firstOrder: readonly PotentialLevel[],
  warnings: PotentialWarning[],
): RefinedPotential | undefined {
  const r = refineRkrCurve({ series, hbar2Over2mu: C, vMax, vTop });
  if (!r || r.levels.length !== firstOrder.length) {
    warnings.push({ code: 'POTENTIAL_NOT_REFINED', message: 'the RKR curve could not be refined (no Numerov levels)' });
    return undefined;
  }
  const withinGoals =
    r.check.worstIntervalError <= ROUND_TRIP_GOALS.interval &&
    r.check.worstRotationalRelativeError <= ROUND_TRIP_GOALS.rotationalRelative;
  if (!withinGoals) {
    warnings.push({
      code: 'POTENTIAL_REFINEMENT_SHORT',
      message: `the refined curve gives back G_v − G_0 within ${r.check.worstIntervalError.toPrecision(2)} cm-1 and B_v within ${r.check.worstRotationalRelativeError.toPrecision(2)} relative, short of 0.01 cm-1 and 1e-4: its turning points are no better than first order`,
    });
  }
  return {
    vTop,
    start: r.start,
    solves: r.solves,
    rounds: r.rounds,
    grid: r.check.grid,
    zeroPointShift: r.check.zeroPointShift,
    levels: r.check.levels.map((l, i) => {
      const fo = firstOrder[i] as PotentialLevel;
      const tp = r.levels[i] as (typeof r.levels)[number];
      return {
        v: l.v,
        energy: quantity(tp.energy, fo.energy.uncertainty, 'cm-1'),
        rMin: quantity(tp.rMin, fo.rMin.uncertainty, 'angstrom'),
        rMax: quantity(tp.rMax, fo.rMax.uncertainty, 'angstrom'),
        intervalError: l.intervalError,
        B: l.B,
        rotationalRelativeError: l.rotationalRelativeError,
      };
    }),
    worstIntervalError: r.check.worstIntervalError,
    worstRotationalRelativeError: r.check.worstRotationalRelativeError,
    withinGoals,
  };
}

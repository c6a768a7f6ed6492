import { solveLeastSquares } from '../linalg/least-squares.js';
import { type RadialLevel, solveRadialLevels } from './numerov.js';
import { rkrTurningPoints } from './rkr.js';
import { type RkrCurveModel, rkrCurveModel } from './rkr-curve.js';
import {
  rotationalConstant,
  type VibrationalSeries,
  vibrationalEnergy,
  vibrationalSlope,
} from './vibrational-terms.js';

/**
 * A curve whose quantum levels give back the constants: the inverted-perturbation idea (Kosman & Hinze, J. Mol.
 * Spectrosc. 56, 93 (1975); Vidal & Scheingraber, J. Mol. Spectrosc. 65, 46 (1977)) applied to the RKR curve itself.
 *
 * First-order RKR makes a curve whose semiclassical levels are the G(v) and B(v) it was given; for a light molecule
 * the exact levels of that curve differ by the higher-order (quantum) corrections, ≈ 0.2–1.3 cm⁻¹ in the intervals
 * of HCl and DCl. Here the curve is corrected until the Numerov levels reproduce the targets: the curve is the RKR
 * curve of G_c(v) = G(v) + ΔG(v), B_c(v) = B(v) + ΔB(v), with ΔG and ΔB low-degree polynomials in v + ½ (a smooth
 * correction of the curve; ΔG without a constant, so G_c still vanishes at the minimum). Each round solves the
 * radial equation on the current curve, takes the residuals
 *   ε_v = (G_v − G_0) − (E_v − E_0),   β_v = B_v − C⟨v|1/r²|v⟩,
 * and adds the least-squares ΔG, ΔB that fit them (ΔG(v) − ΔG(0) ≈ ε_v, ΔB(v) ≈ β_v), taking the response of the
 * levels to a change of G_c, B_c as the identity (the first-order RKR map is the identity up to the small quantum
 * correction, so the rounds contract quickly). The round with the smallest residuals is kept.
 *
 * The levels compared are intervals: the absolute E_v above the minimum carries Dunham's Y00 (≈ B_e/4 for a nearly
 * harmonic curve), which the constants do not determine; it is reported as the zero-point shift E_0 − G_0.
 */
export interface RefineInput {
  /** The target G(v), B(v) (from the constants). */
  readonly series: VibrationalSeries;
  readonly hbar2Over2mu: number;
  /** Levels 0…vMax are matched. */
  readonly vMax: number;
  /** Highest v of the RKR points the curve is built from (vMax + a margin, so top levels tunnel into RKR points). */
  readonly vTop: number;
  /** Rounds at most. Default 10. */
  readonly maxRounds?: number;
  /** Highest power of v + ½ in ΔG and ΔB. Default 4. */
  readonly degree?: number;
  /** Radial grid points. Default 6000. */
  readonly points?: number;
}

export interface RadialGridUsed {
  readonly from: number;
  readonly to: number;
  readonly step: number;
  readonly points: number;
}

export interface CurveLevelCheck {
  readonly v: number;
  /** Numerov eigenvalue above the curve's minimum, cm⁻¹. */
  readonly energy: number;
  /** (E_v − E_0) − (G_v − G_0), cm⁻¹. */
  readonly intervalError: number;
  /** C⟨1/r²⟩, cm⁻¹. */
  readonly B: number;
  /** (B_v(Numerov) − B_v)/B_v. */
  readonly rotationalRelativeError: number;
}

export interface CurveCheck {
  readonly grid: RadialGridUsed;
  /** E_0 − G_0, cm⁻¹. */
  readonly zeroPointShift: number;
  readonly levels: readonly CurveLevelCheck[];
  readonly worstIntervalError: number;
  readonly worstRotationalRelativeError: number;
}

export interface RefinedLevel {
  readonly v: number;
  /** E_v, the Numerov level above the refined curve's minimum, cm⁻¹. */
  readonly energy: number;
  /** Classical turning points of the refined curve at E_v, Å. */
  readonly rMin: number;
  readonly rMax: number;
}

export interface RefinedCurve {
  /** The G_c(v), B_c(v) whose RKR curve is the refined curve. */
  readonly series: VibrationalSeries;
  /** How the response of the levels was first taken: as the identity, or measured by finite differences. */
  readonly start: 'identity' | 'finite-difference';
  /** Numerov solves made in all. */
  readonly solves: number;
  /** The worst residuals after each round of the kept run, the first being the first-order curve. */
  readonly rounds: readonly { readonly worstIntervalError: number; readonly worstRotationalRelativeError: number }[];
  /** The check of the kept round. */
  readonly check: CurveCheck;
  readonly levels: readonly RefinedLevel[];
}

/** The RKR curve of `series` up to vTop with the radial equation solved for `count` levels on it. */
export function solveOnRkrCurve(
  series: VibrationalSeries,
  C: number,
  vTop: number,
  count: number,
  points = 6000,
  guesses?: readonly number[],
): { model: RkrCurveModel; grid: RadialGridUsed; levels: RadialLevel[] } | undefined {
  const model = rkrCurveModel(series, C, vTop);
  if (!model) return undefined;
  const width = model.outer - model.inner;
  const from = Math.max(model.inner - 0.25 * width, 0.2 * model.inner);
  const to = model.outer + 0.5 * width;
  const step = (to - from) / (points - 1);
  const levels = solveRadialLevels(model.potential, C, { from, to, step }, count, guesses);
  return { model, grid: { from, to, step, points }, levels };
}

/** The solved levels compared with the target G(v), B(v). */
export function compareLevels(target: VibrationalSeries, grid: RadialGridUsed, solved: readonly RadialLevel[]) {
  const e0 = (solved[0] as RadialLevel).energy;
  const g0 = vibrationalEnergy(target, 0.5);
  const levels: CurveLevelCheck[] = solved.map((s) => {
    const x = s.v + 0.5;
    const b = rotationalConstant(target, x);
    return {
      v: s.v,
      energy: s.energy,
      intervalError: s.energy - e0 - (vibrationalEnergy(target, x) - g0),
      B: s.rotational,
      rotationalRelativeError: (s.rotational - b) / b,
    };
  });
  return {
    grid,
    zeroPointShift: e0 - g0,
    levels,
    worstIntervalError: Math.max(...levels.map((l) => Math.abs(l.intervalError))),
    worstRotationalRelativeError: Math.max(...levels.map((l) => Math.abs(l.rotationalRelativeError))),
  };
}

/** Goals of the round trip (issue 17): 0.01 cm⁻¹ in the intervals, 1e-4 relative in B_v; the badness of a round. */
const badness = (c: CurveCheck) => Math.max(c.worstIntervalError / 0.01, c.worstRotationalRelativeError / 1e-4);

export function refineRkrCurve(input: RefineInput): RefinedCurve | undefined {
  const basis = correctionBasis(input.vMax + 1, input.degree ?? 4);
  // The identity start suffices when the quantum correction is small (HCl, DCl, CO to v = 20); when it does not
  // reach the goals (HF above v = 4, CO to v = 40), damped Gauss–Newton with the response measured in every round
  // takes over, with one more correction term when there are levels for it (newtonDegree).
  const first = iterate(input, basis);
  const run =
    first.best && badness(first.best.check) <= 1
      ? first
      : better(first, newtonIterate(input, correctionBasis(input.vMax + 1, newtonDegree(input))));
  const kept = run.best;
  if (!kept) return undefined;
  return {
    series: kept.series,
    start: run.start,
    solves: first === run ? first.solves : first.solves + run.solves,
    rounds: run.rounds,
    check: kept.check,
    levels: kept.check.levels.map((l) => ({
      v: l.v,
      energy: l.energy,
      ...turningPointsAt(kept.series, input.hbar2Over2mu, l.energy),
    })),
  };
}

type Basis = ReturnType<typeof correctionBasis>;
type JacobianStart = RefinedCurve['start'];
interface Run {
  readonly start: JacobianStart;
  readonly best: { series: VibrationalSeries; check: CurveCheck } | undefined;
  readonly rounds: RefinedCurve['rounds'][number][];
  readonly solves: number;
}

const better = (a: Run, b: Run): Run => (!b.best || (a.best && badness(a.best.check) <= badness(b.best.check)) ? a : b);

/** Numerov on the RKR curve of the corrected constants, compared with the targets; counts its solves. */
function curveSolver(input: RefineInput, basis: Basis) {
  const count = input.vMax + 1;
  let n = 0;
  /** `near`: a check of a nearby curve, whose levels start the bisections. */
  const solve = (pars: Float64Array, near?: CurveCheck): CurveCheck | undefined => {
    n++;
    const solved = solveOnRkrCurve(
      basis.apply(input.series, pars),
      input.hbar2Over2mu,
      input.vTop,
      count,
      input.points,
      near?.levels.map((l) => l.energy),
    );
    const check =
      solved && solved.levels.length === count ? compareLevels(input.series, solved.grid, solved.levels) : undefined;
    return check && Number.isFinite(check.worstIntervalError) && Number.isFinite(check.worstRotationalRelativeError)
      ? check
      : undefined;
  };
  return { solve, solves: () => n };
}

/**
 * Rounds of least-squares steps J s ≈ −r on the correction parameters. J starts as the identity response of the
 * levels (−A: a change ΔG, ΔB moves the levels by as much) and is updated by Broyden's rank-one rule
 * (C. G. Broyden, Math. Comp. 19, 577 (1965)) from each round's change of the residuals.
 */
function iterate(input: RefineInput, basis: Basis): Run {
  const { series: target, vMax } = input;
  const count = vMax + 1;
  const maxRounds = input.maxRounds ?? 10;
  const p = basis.kg + basis.kb;
  const rows = 2 * count - 1;
  const params = new Float64Array(p);
  const jac = new Float64Array(rows * p);
  for (let i = 0; i < rows; i++) for (let k = 0; k < p; k++) jac[i * p + k] = -basis.design(i, k, target);
  const rounds: RefinedCurve['rounds'][number][] = [];
  const { solve, solves } = curveSolver(input, basis);
  let best: Run['best'];
  let last: { r: Float64Array; step: Float64Array } | undefined;
  let stalled = 0;
  let halvings = 0;
  for (let round = 0; round < maxRounds; round++) {
    const check = solve(params);
    if (!check) {
      // A step too long for the curve (it turned multi-valued, or lost a level): go back half of it, at most 4 times.
      if (!last || ++halvings > 4) break;
      for (let k = 0; k < p; k++) {
        const half = 0.5 * (last.step[k] as number);
        params[k] = (params[k] as number) - half;
        last.step[k] = half;
      }
      continue;
    }
    rounds.push({
      worstIntervalError: check.worstIntervalError,
      worstRotationalRelativeError: check.worstRotationalRelativeError,
    });
    const series = basis.apply(target, params);
    if (!best || badness(check) < 0.95 * badness(best.check)) {
      best = { series, check };
      stalled = 0;
    } else if (++stalled >= 3) break; // three rounds without a gain: the basis has done what it can
    // Good to a hundredth of the goals: stop.
    if (badness(check) < 0.01) break;
    const r = scaledResiduals(check);
    if (last) broydenUpdate(jac, rows, p, last.step, r, last.r);
    const step = gaussNewtonStep(jac, rows, p, r);
    if (!step) break;
    for (let k = 0; k < p; k++) params[k] = (params[k] as number) + (step[k] as number);
    last = { r, step };
  }
  return { start: 'identity', best, rounds, solves: solves() };
}

/** Column k of J by a forward difference of size probe(k) (a change of ~0.1 cm⁻¹ or 1e-5 B_e at the top level). */
function measureResponse(
  jac: Float64Array,
  rows: number,
  p: number,
  r: Float64Array,
  probe: (k: number) => number,
  params: Float64Array,
  solve: (pars: Float64Array) => CurveCheck | undefined,
): void {
  for (let k = 0; k < p; k++) {
    const h = probe(k);
    const moved = params.slice();
    moved[k] = (moved[k] as number) + h;
    const check = solve(moved);
    if (!check) continue; // keep the identity column
    const rk = scaledResiduals(check);
    for (let i = 0; i < rows; i++) jac[i * p + k] = ((rk[i] as number) - (r[i] as number)) / h;
  }
}

/**
 * The residuals of one round in units of the goals: (G_v − G_0) − (E_v − E_0) over 0.01 cm⁻¹ for v = 1…n−1, then
 * (B_v − C⟨1/r²⟩)/B_v over 1e-4 for v = 0…n−1.
 */
function scaledResiduals(check: CurveCheck): Float64Array {
  const n = check.levels.length;
  const r = new Float64Array(2 * n - 1);
  check.levels.forEach((l, v) => {
    if (v > 0) r[v - 1] = -l.intervalError / 0.01;
    r[n - 1 + v] = -l.rotationalRelativeError / 1e-4;
  });
  return r;
}

/**
 * ΔG(x) = Σ_{k=1..kg} d_k x^k and ΔB(x) = Σ_{k<kb} e_k x^k (x = v + ½), and the rows of their first-order effect on
 * the scaled residuals: ΔG(x_v) − ΔG(x_0) on interval row v, ΔB(x_v)/B_v on rotational row v.
 */
function correctionBasis(n: number, degree: number) {
  const kg = Math.min(degree, n - 1);
  const kb = Math.min(degree + 1, n);
  return {
    kg,
    kb,
    design(row: number, col: number, target: VibrationalSeries): number {
      if (row < n - 1) {
        const x = row + 1.5;
        return col < kg ? (x ** (col + 1) - 0.5 ** (col + 1)) / 0.01 : 0;
      }
      const x = row - (n - 1) + 0.5;
      return col >= kg ? x ** (col - kg) / rotationalConstant(target, x) / 1e-4 : 0;
    },
    /** A step in parameter k that moves the top level by ~0.1 cm⁻¹ (ΔG) or ~1e-5 B_e (ΔB). */
    probe(k: number, vMax: number, target: VibrationalSeries): number {
      const x = vMax + 0.5;
      return k < kg ? 0.1 / x ** (k + 1) : (1e-5 * (target.b[0] as number)) / x ** (k - kg);
    },
    apply(target: VibrationalSeries, params: Float64Array): VibrationalSeries {
      const g = [...target.g];
      const b = [...target.b];
      while (g.length < kg) g.push(0);
      while (b.length < kb) b.push(0);
      for (let k = 0; k < kg; k++) g[k] = (g[k] as number) + (params[k] as number);
      for (let k = 0; k < kb; k++) b[k] = (b[k] as number) + (params[kg + k] as number);
      return { g, b };
    },
  };
}

/** J ← J + ((r − r_prev) − J s) sᵀ / (sᵀ s). */
function broydenUpdate(
  jac: Float64Array,
  rows: number,
  p: number,
  s: Float64Array,
  r: Float64Array,
  prev: Float64Array,
): void {
  let ss = 0;
  for (let k = 0; k < p; k++) ss += (s[k] as number) ** 2;
  if (!(ss > 0)) return;
  for (let i = 0; i < rows; i++) {
    let js = 0;
    for (let k = 0; k < p; k++) js += (jac[i * p + k] as number) * (s[k] as number);
    const u = ((r[i] as number) - (prev[i] as number) - js) / ss;
    for (let k = 0; k < p; k++) jac[i * p + k] = (jac[i * p + k] as number) + u * (s[k] as number);
  }
}

/** The least-squares step s with J s ≈ −r. */
function gaussNewtonStep(jac: Float64Array, rows: number, p: number, r: Float64Array): Float64Array | undefined {
  const design = new Float64Array(rows * p);
  for (let i = 0; i < rows; i++) for (let k = 0; k < p; k++) design[k * rows + i] = jac[i * p + k] as number;
  const fit = solveLeastSquares({ rows, cols: p, design, observations: r.map((x) => -x), conditionNumber: false });
  return fit.rankDeficient ? undefined : fit.coefficients;
}

/**
 * The classical turning points of the RKR curve of `series` at energy E: the RKR points at the x with G_c(x) = E
 * (Newton from the harmonic guess; G_c increases on the range the curve was built on).
 */
function turningPointsAt(series: VibrationalSeries, C: number, energy: number): { rMin: number; rMax: number } {
  let x = energy / (series.g[0] as number);
  for (let i = 0; i < 60; i++) {
    const dx = (vibrationalEnergy(series, x) - energy) / vibrationalSlope(series, x);
    x -= dx;
    if (Math.abs(dx) < 1e-13 * Math.max(1, x)) break;
  }
  const tp = rkrTurningPoints({ series, hbar2Over2mu: C }, x - 0.5);
  return { rMin: tp.rMin, rMax: tp.rMax };
}

/**
 * Damped Gauss–Newton on the correction parameters: the response of the levels measured afresh by forward
 * differences in every round (one solve per parameter), the step halved until the sum of squared scaled residuals
 * falls (at most five halvings). Stops within half the goals, after a round that gains less than 30 %, or before
 * a round would pass 4(p + 2) solves.
 */
function newtonIterate(input: RefineInput, basis: Basis): Run {
  const { series: target, vMax } = input;
  const maxRounds = input.maxRounds ?? 10;
  const p = basis.kg + basis.kb;
  const rows = 2 * (vMax + 1) - 1;
  const { solve, solves } = curveSolver(input, basis);
  const rounds: RefinedCurve['rounds'][number][] = [];
  const note = (c: CurveCheck) =>
    rounds.push({
      worstIntervalError: c.worstIntervalError,
      worstRotationalRelativeError: c.worstRotationalRelativeError,
    });
  let params: Float64Array = new Float64Array(p);
  let check = solve(params);
  if (!check) return { start: 'finite-difference', best: undefined, rounds, solves: solves() };
  note(check);
  const jac = new Float64Array(rows * p);
  // A bound on the work whatever the curve does: about four rounds of response and step (a request has 60 s).
  const budget = 4 * (p + 2);
  for (let round = 0; round < maxRounds && badness(check) > 0.5 && solves() + p + 1 <= budget; round++) {
    const r = scaledResiduals(check);
    for (let i = 0; i < rows; i++) for (let k = 0; k < p; k++) jac[i * p + k] = -basis.design(i, k, target);
    const here = check;
    measureResponse(
      jac,
      rows,
      p,
      r,
      (k) => basis.probe(k, vMax, target),
      params,
      (pars) => solve(pars, here),
    );
    const step = gaussNewtonStep(jac, rows, p, r);
    if (!step) break;
    const before = sumSquares(r);
    let next: { params: Float64Array; check: CurveCheck } | undefined;
    for (let t = 1, h = 0; h <= 5 && !next; h++, t /= 2) {
      const trial = params.map((x, k) => x + t * (step[k] as number));
      const c = solve(trial, here);
      if (c && sumSquares(scaledResiduals(c)) < before) next = { params: trial, check: c };
    }
    if (!next) break;
    const gain = badness(next.check) / badness(check);
    params = next.params;
    check = next.check;
    note(check);
    if (gain > 0.7) break;
  }
  return { start: 'finite-difference', best: { series: basis.apply(target, params), check }, rounds, solves: solves() };
}

/**
 * The degree of the corrections for the Newton run: one more than the identity run's 4 when there are at least
 * six levels above v = 0 to fix it, at most 6 (a square system, as many terms as residuals, does not converge:
 * HF v ≤ 6 at degree 6 stalls at 1.8 cm⁻¹).
 */
function newtonDegree(input: RefineInput): number {
  return Math.min(6, Math.max(input.degree ?? 4, input.vMax - 1));
}

function sumSquares(r: Float64Array): number {
  let s = 0;
  for (const x of r) s += x * x;
  return s;
}

import { ScienceError } from '../errors.js';
import { type FitResult, fitLineList, type LineInput } from '../fit/fit-lines.js';
import { solveLeastSquares } from '../linalg/least-squares.js';
import type { Band, Branch } from '../models/transitions.js';
import type { MassValue } from '../species/reduced-mass.js';
import { lowerBound } from './match.js';

/**
 * Assignment from the band structure alone, for a species the library cannot predict (SCIENCE.md §6): take a
 * pair of neighbouring strong lines as P(1) and R(0) across the band gap, grow both branches outwards along the
 * Fortrat parabola ν(m) = ν₀ + (B′+B″)m + (B′−B″)m² + …, and keep the numbering (the gap and its shifts by ±1, ±2)
 * that the level model fits best, which is the numbering under which the combination differences vanish at J = −½.
 */

export interface StructureAssignment {
  /** Index of the peak → transition (lower J and branch) in the given band. */
  readonly assigned: ReadonlyMap<number, { branch: Branch; j: number }>;
  readonly reducedChiSquare: number;
  /** Boltzmann-plot scatter (with intensities) or Kratzer mismatch (without); smaller is more plausible. */
  readonly implausibility: number;
  /** Other numberings tried: shift = 10 × (R shift) + (P shift). */
  readonly alternatives: readonly { shift: number; reducedChiSquare: number }[];
}

const SHIFTS: readonly (readonly [number, number])[] = [0, -1, 1, 2].flatMap((r) =>
  [0, -1, 1, 2].map((p) => [r, p] as const),
);

interface Point {
  m: number;
  index: number;
  position: number;
}

export function assignByStructure(
  peaks: readonly { position: number; uncertainty?: number; intensity?: number }[],
  species: string,
  mass: MassValue,
  band: Band,
): StructureAssignment | undefined {
  const order = peaks
    .map((p, index) => ({ index, position: p.position, intensity: p.intensity ?? 1 }))
    .sort((a, b) => a.position - b.position);
  const pos = Float64Array.from(order, (p) => p.position);
  // Candidate gaps: neighbouring strong lines a, b whose distance d is about twice the local spacing, i.e. with a
  // line near a − d/2 (P(2)) or b + d/2 (R(1)).
  const chains: Point[][] = [];
  // Every neighbouring pair is a candidate: P(1) and R(0) are among the weakest lines of a band.
  // A spurious peak may sit inside the gap: b may also be the second or third peak after a.
  for (let i = 0; i + 1 < order.length; i++)
    for (let skip = 1; skip <= 3 && i + skip < order.length; skip++) {
      const a = order[i] as { index: number; position: number };
      const b = order[i + skip] as { index: number; position: number };
      const d = b.position - a.position;
      const ia = lowerBound(pos, a.position);
      const ib = lowerBound(pos, b.position);
      const below = ia > 0 ? a.position - (pos[ia - 1] as number) : Number.POSITIVE_INFINITY;
      const above = ib + 1 < pos.length ? (pos[ib + 1] as number) - b.position : Number.POSITIVE_INFINITY;
      if (!(d >= 1.6 * Math.min(below, above))) continue;
      const points = grow(a, b, pos, order);
      if (points.length >= 6) chains.push(points);
    }
  if (chains.length === 0) return undefined;
  chains.sort((x, y) => y.length - x.length);
  const longest = (chains[0] as Point[]).length;
  // The longest chains, first judged by the level model under their own numbering, then the best three with every
  // numbering shift.
  const contenders = chains.filter((c) => c.length >= 0.5 * longest).slice(0, 16);
  const judged = contenders.flatMap((c) => {
    const r = numberChain(c, [[0, 0]]);
    return r ? [{ c, r }] : [];
  });
  if (judged.length === 0) return undefined;
  // A Fortrat quartic can be renumbered from any missing line and still fit the positions (the m-shift is
  // absorbed by B′ and B″). Among the chains that fit, physics decides: the Boltzmann plot of the intensities must
  // be one straight line for both branches, or, without intensities, D must agree with Kratzer's 4B³/ν₀². The
  // chosen chain's numbering near its gap is then settled by the positions (shifts of ±1, ±2 fit far worse).
  const minChi = Math.min(...judged.map((x) => x.r.reducedChiSquare));
  const fitting = judged.filter((x) => x.r.reducedChiSquare <= 2 * minChi + 0.5);
  fitting.sort((a, b) => a.r.implausibility - b.r.implausibility);
  return numberChain((fitting[0] as (typeof fitting)[number]).c, SHIFTS);

  function numberChain(
    chain: Point[],
    _shifts: readonly (readonly [number, number])[],
  ): StructureAssignment | undefined {
    const best = { points: chain };
    // Numbering: the gap found, and each branch numbered up to two further out or one further in (a line missing
    // at the gap makes it look wider on that side only).
    const trials: {
      shift: number;
      chi: number;
      map: Map<number, { branch: Branch; j: number }>;
      implausibility: number;
    }[] = [];
    for (const shiftR of [0, -1, 1, 2])
      for (const shiftP of [0, -1, 1, 2]) {
        const shift = shiftR * 10 + shiftP;
        const map = new Map<number, { branch: Branch; j: number }>();
        let valid = true;
        for (const p of best.points) {
          const m = p.m > 0 ? p.m + shiftR : p.m - shiftP;
          if (m === 0 || Math.sign(m) !== Math.sign(p.m)) {
            valid = false;
            break;
          }
          map.set(p.index, m > 0 ? { branch: 'R', j: m - 1 } : { branch: 'P', j: -m });
        }
        if (!valid) continue;
        const lines: LineInput[] = peaks.map((pk, index) => {
          const t = map.get(index);
          const base = {
            position: pk.position,
            ...(pk.uncertainty !== undefined ? { uncertainty: pk.uncertainty } : {}),
          };
          return t
            ? { ...base, assignment: { species, band, branch: t.branch, j: t.j, source: 'auto' as const } }
            : base;
        });
        try {
          // B and D only: higher terms could absorb a wrong numbering, which is what this comparison must expose.
          const r = fitLineList(lines, new Map([[species, mass]]), { maxCentrifugalOrder: 2 });
          trials.push({
            shift,
            chi: r.statistics.reducedChiSquare ?? Number.POSITIVE_INFINITY,
            map,
            implausibility: implausibility(r, map, peaks),
          });
        } catch (e) {
          if (!(e instanceof ScienceError)) throw e;
        }
      }
    if (trials.length === 0) return undefined;
    trials.sort((a, b) => a.chi - b.chi);
    const win = trials[0] as (typeof trials)[number];
    return {
      assigned: win.map,
      reducedChiSquare: win.chi,
      implausibility: win.implausibility,
      alternatives: trials.slice(1).map((t) => ({ shift: t.shift, reducedChiSquare: t.chi })),
    };
  }
}

/**
 * How implausible a numbering is physically. With intensities: the rms scatter of ln(I/(Sν)) about one straight
 * line in E″ (a Boltzmann plot, SCIENCE.md §5) over both branches. Without: |ln(D″ / (4B″³/ν₀²))| (Kratzer).
 */
function implausibility(
  r: FitResult,
  map: ReadonlyMap<number, { branch: Branch; j: number }>,
  peaks: readonly { position: number; intensity?: number }[],
): number {
  const lower = r.levels.find((l) => l.v === Math.min(...r.levels.map((x) => x.v)));
  if (!lower) return Number.POSITIVE_INFINITY;
  const withI = [...map].filter(([i]) => (peaks[i]?.intensity ?? 0) > 0);
  if (withI.length >= 6) {
    const n = withI.length;
    const design = new Float64Array(n * 2);
    const obs = new Float64Array(n);
    withI.forEach(([i, t], k) => {
      const p = peaks[i] as { position: number; intensity: number };
      const S = t.branch === 'R' ? t.j + 1 : t.j;
      design[k] = 1;
      design[n + k] = lower.B.value * t.j * (t.j + 1);
      obs[k] = Math.log(p.intensity / (S * p.position));
    });
    const f = solveLeastSquares({ rows: n, cols: 2, design, observations: obs });
    if (f.rankDeficient) return Number.POSITIVE_INFINITY;
    return Math.sqrt(f.chiSquare / (n - 2));
  }
  const origin = r.bands[0]?.origin?.value;
  const d = lower.D?.value;
  if (origin === undefined || d === undefined || !(d > 0)) return Number.POSITIVE_INFINITY;
  return Math.abs(Math.log(d / ((4 * lower.B.value ** 3) / origin ** 2)));
}

/** Grow R (m = 1, 2, …) and P (m = −1, −2, …) from a candidate P(1), R(0) pair along a fitted Fortrat polynomial. */
export function grow(
  p1: { index: number; position: number },
  r0: { index: number; position: number },
  pos: Float64Array,
  order: readonly { index: number; position: number }[],
): Point[] {
  const points: Point[] = [
    { m: -1, index: p1.index, position: p1.position },
    { m: 1, index: r0.index, position: r0.position },
  ];
  const used = new Set([p1.index, r0.index]);
  const spacing0 = (r0.position - p1.position) / 2;
  if (!(spacing0 > 0)) return points;
  const misses = { R: 0, P: 0 };
  let next = { R: 2, P: -2 };
  for (let step = 0; step < 400 && (misses.R < 3 || misses.P < 3); step++) {
    for (const side of ['R', 'P'] as const) {
      if (misses[side] >= 3) continue;
      const m = next[side];
      const predicted = fortrat(points, m, spacing0);
      const spacing = Math.abs(fortrat(points, m, spacing0) - fortrat(points, m - Math.sign(m), spacing0));
      const tol = 0.2 * Math.max(spacing, 1e-6);
      const lo = lowerBound(pos, predicted - tol);
      let bestI = -1;
      for (let i = lo; i < pos.length && (pos[i] as number) <= predicted + tol; i++) {
        const o = order[i] as { index: number; position: number };
        if (used.has(o.index)) continue;
        if (
          bestI < 0 ||
          Math.abs(o.position - predicted) < Math.abs((order[bestI] as { position: number }).position - predicted)
        )
          bestI = i;
      }
      if (bestI >= 0) {
        const o = order[bestI] as { index: number; position: number };
        points.push({ m, index: o.index, position: o.position });
        used.add(o.index);
        misses[side] = 0;
      } else {
        misses[side]++;
      }
      next = { ...next, [side]: m + Math.sign(m) };
    }
  }
  return points;
}

/** The Fortrat polynomial through the points so far (degree up to 3 in m), evaluated at m. */
function fortrat(points: readonly Point[], m: number, spacing0: number): number {
  const n = points.length;
  const degree = Math.min(3, n - 1);
  if (degree < 2) {
    const centre = points.reduce((s, p) => s + p.position - p.m * spacing0, 0) / n;
    return centre + m * spacing0;
  }
  const cols = degree + 1;
  const design = new Float64Array(n * cols);
  points.forEach((p, i) => {
    for (let k = 0; k < cols; k++) design[k * n + i] = p.m ** k;
  });
  const r = solveLeastSquares({ rows: n, cols, design, observations: Float64Array.from(points, (p) => p.position) });
  if (r.rankDeficient) return points[0]?.position ?? 0;
  let v = 0;
  for (let k = 0; k < cols; k++) v += (r.coefficients[k] as number) * m ** k;
  return v;
}

import { ScienceError } from '../errors.js';
import { fitLineList, type LineInput } from '../fit/fit-lines.js';
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
  /** Other numberings tried: shift = 10 × (R shift) + (P shift). */
  readonly alternatives: readonly { shift: number; reducedChiSquare: number }[];
}

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
  const strong = [...order].sort((a, b) => b.intensity - a.intensity).slice(0, Math.min(40, order.length));
  strong.sort((a, b) => a.position - b.position);
  let best: { points: Point[]; score: number } | undefined;
  for (let i = 0; i + 1 < strong.length; i++) {
    const a = strong[i] as { index: number; position: number };
    const b = strong[i + 1] as { index: number; position: number };
    const points = grow(a, b, pos, order);
    if (points.length < 6) continue;
    const score = points.length;
    if (!best || score > best.score) best = { points, score };
  }
  if (!best) return undefined;
  // Numbering: the gap found, and each branch numbered up to two further out or one further in (a line missing
  // at the gap makes it look wider on that side only).
  const trials: { shift: number; chi: number; map: Map<number, { branch: Branch; j: number }> }[] = [];
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
        return t ? { ...base, assignment: { species, band, branch: t.branch, j: t.j, source: 'auto' as const } } : base;
      });
      try {
        const r = fitLineList(lines, new Map([[species, mass]]), { rejectionThreshold: 0 });
        trials.push({ shift, chi: r.statistics.reducedChiSquare ?? Number.POSITIVE_INFINITY, map });
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
    alternatives: trials.slice(1).map((t) => ({ shift: t.shift, reducedChiSquare: t.chi })),
  };
}

/** Grow R (m = 1, 2, …) and P (m = −1, −2, …) from a candidate P(1), R(0) pair along a fitted Fortrat polynomial. */
function grow(
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

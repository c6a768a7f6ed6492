import type { Observation } from '../models/linear-model.js';
import { isRankDeficient, type SolvedModel, solveModel, type UncertaintyMode } from './engine.js';

/**
 * Relative wavenumber offset of each line source against a reference source, estimated on the fitted level model
 * without refitting it (Frisch–Waugh–Lovell): with M the weighted residual maker of the level design and z_s the
 * indicator of source s, the offsets δ of the model "levels + δ_s z_s" solve (Z′WMZ) δ = Z′W r, r = My the
 * residuals of the fit. A source whose indicator lies in the span of the level design (its bands share no level
 * with another source's, so a shift is indistinguishable from a change of their origins) is not identifiable.
 */
export interface SourceOffset {
  readonly source: string;
  /** Relative offset (this source's positions minus the reference's) in cm⁻¹; undefined when not identifiable. */
  readonly offset?: number;
  readonly uncertainty?: number;
  /** Bands (as "v′-v″") with lines of this source. */
  readonly bands: readonly string[];
}

export interface SourceOffsets {
  /**
   * When the lines cannot fix the absolute scale: the source the others are measured against, the one with the
   * greatest total weight Σ 1/σ² (ties: more lines, then name order).
   */
  readonly reference?: string;
  readonly offsets: readonly SourceOffset[];
  /** Sources whose offset the lines cannot determine (no level or loop of bands shared with another source). */
  readonly unidentified: readonly { readonly source: string; readonly bands: readonly string[] }[];
}

/** Fraction of an indicator's weighted norm that must remain outside the level design's span to call it identified. */
const IDENTIFIABLE = 1e-8;

interface Group {
  readonly source: string;
  readonly rows: number[];
  weight: number;
  readonly bands: Set<string>;
}

function groupBySource(obs: readonly Observation[], sources: readonly (string | undefined)[]): Group[] {
  const groups = new Map<string, Group>();
  obs.forEach((o, i) => {
    const s = sources[o.index];
    if (s === undefined) return;
    let g = groups.get(s);
    if (!g) {
      g = { source: s, rows: [], weight: 0, bands: new Set() };
      groups.set(s, g);
    }
    g.rows.push(i);
    g.weight += o.weight;
    g.bands.add(`${o.upperV}-${o.lowerV}`);
  });
  return [...groups.values()].sort(
    (a, b) => b.weight - a.weight || b.rows.length - a.rows.length || (a.source < b.source ? -1 : 1),
  );
}

/** M z for the indicator of `rows`: the residuals of the same weighted fit with the indicator as the data. */
function projectedIndicator(fit: SolvedModel, rows: readonly number[]): Float64Array | undefined {
  const inSource = new Uint8Array(fit.observations.length);
  for (const i of rows) inSource[i] = 1;
  const obs = fit.observations.map((o, i) => ({ ...o, position: inSource[i] as number }));
  const solved = solveModel(fit.model, obs, 'absolute', false);
  return isRankDeficient(solved) ? undefined : solved.residuals;
}

/** Solves the small symmetric system a x = b (Gauss–Jordan, partial pivoting): x and a⁻¹; undefined if singular. */
function solveSmall(a: number[][], b: number[]): { x: number[]; inverse: number[][] } | undefined {
  const k = b.length;
  const m = a.map((row, i) => [...row, ...Array.from({ length: k }, (_, j) => (i === j ? 1 : 0)), b[i] as number]);
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(m[r]?.[c] as number) > Math.abs(m[p]?.[c] as number)) p = r;
    [m[c], m[p]] = [m[p] as number[], m[c] as number[]];
    const pivot = m[c] as number[];
    const d = pivot[c] as number;
    if (!(Math.abs(d) > IDENTIFIABLE * Math.abs(a[c]?.[c] ?? 0)) || d === 0) return undefined;
    for (let j = 0; j < pivot.length; j++) pivot[j] = (pivot[j] as number) / d;
    for (let r = 0; r < k; r++) {
      if (r === c) continue;
      const row = m[r] as number[];
      const f = row[c] as number;
      for (let j = 0; j < row.length; j++) row[j] = (row[j] as number) - f * (pivot[j] as number);
    }
  }
  return { x: m.map((row) => row[2 * k] as number), inverse: m.map((row) => row.slice(k, 2 * k)) };
}

/** Offsets of `groups` fitted jointly; undefined when their projected indicators are (nearly) dependent. */
function jointOffsets(
  fit: SolvedModel,
  projected: readonly { readonly group: Group; readonly mz: Float64Array }[],
  mode: UncertaintyMode,
): { value: number; uncertainty: number }[] | undefined {
  const w = fit.observations.map((o) => o.weight);
  const dot = (x: Float64Array, y: Float64Array) =>
    x.reduce((acc, v, i) => acc + (w[i] as number) * v * (y[i] as number), 0);
  const k = projected.length;
  const a = projected.map((p) => projected.map((q) => dot(p.mz, q.mz)));
  const b = projected.map((p) => dot(p.mz, fit.residuals));
  const solved = solveSmall(a, b);
  if (!solved) return undefined;
  const explained = solved.x.reduce((acc, v, i) => acc + v * (b[i] as number), 0);
  const nu = fit.degreesOfFreedom - k;
  const scale = mode === 'absolute' ? 1 : nu > 0 ? Math.max(fit.chiSquare - explained, 0) / nu : Number.NaN;
  return solved.x.map((value, i) => ({ value, uncertainty: Math.sqrt(scale * (solved.inverse[i]?.[i] as number)) }));
}

/**
 * The offset of every source when the lines determine them all (a pure-rotation band, or a loop of bands such as
 * 2-0 against 1-0 + 2-1, fixes the absolute scale: `reference` is then undefined), else of every source but the
 * reference; undefined with fewer than two sources among the fitted lines.
 */
export function estimateSourceOffsets(
  fit: SolvedModel,
  sources: readonly (string | undefined)[],
  mode: UncertaintyMode,
): SourceOffsets | undefined {
  const groups = groupBySource(fit.observations, sources);
  if (groups.length < 2) return undefined;
  const projected: { group: Group; mz: Float64Array }[] = [];
  for (const g of groups) {
    const mz = projectedIndicator(fit, g.rows);
    if (!mz) continue;
    const left = mz.reduce((acc, x, i) => acc + (fit.observations[i] as Observation).weight * x * x, 0);
    if (left > IDENTIFIABLE * g.weight) projected.push({ group: g, mz });
  }
  const all = projected.length === groups.length ? jointOffsets(fit, projected, mode) : undefined;
  const reference = all ? undefined : (groups[0] as Group).source;
  const used = all ? projected : projected.filter((p) => p.group.source !== reference);
  const found = all ?? (used.length > 0 ? jointOffsets(fit, used, mode) : undefined) ?? [];
  const at = new Map(used.map((p, i) => [p.group.source, found[i]]));
  const seen = new Set(projected.map((p) => p.group.source));
  return {
    ...(reference !== undefined ? { reference } : {}),
    offsets: groups
      .filter((g) => g.source !== reference && seen.has(g.source))
      .map((g) => {
        const bands = [...g.bands].sort();
        const o = at.get(g.source);
        return o
          ? { source: g.source, offset: o.value, uncertainty: o.uncertainty, bands }
          : { source: g.source, bands };
      }),
    unidentified: groups
      .filter((g) => !seen.has(g.source))
      .map((g) => ({ source: g.source, bands: [...g.bands].sort() })),
  };
}

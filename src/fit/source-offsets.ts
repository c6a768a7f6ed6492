import { designColumns, type Observation } from '../models/linear-model.js';
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
): { value: number; uncertainty: number; covariance: number[] }[] | undefined {
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
  return solved.x.map((value, i) => ({
    value,
    uncertainty: Math.sqrt(scale * (solved.inverse[i]?.[i] as number)),
    covariance: (solved.inverse[i] as number[]).map((c) => scale * c),
  }));
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

/** The one additive offset of all lines on the absolute scale, when their bands fix it (see `absoluteOffset`). */
export interface AbsoluteOffset {
  readonly value: number;
  readonly uncertainty: number;
  /** Bands (as "v′-v″") of the fitted lines. */
  readonly bands: readonly string[];
}

/**
 * Whether the bands can fix a common shift at all, read from the band graph alone (cheap, before the projection that
 * measures it): per species, levels v are nodes and each band an edge; the shift is a change of the term values when
 * they can be given potentials with T(v′) − T(v″) = 1 for every band, so it is fixed by a pure-rotation band (v′ = v″)
 * or by a loop whose bands do not add up that way (2-0 against 1-0 + 2-1). A list of one band, or of bands from one
 * level, skips the projection (it was 10 % of fitLineList's time on 50 000 lines of 1-0).
 */
function bandsFixScale(obs: readonly Observation[]): boolean {
  // The distinct bands per species as numbers (v′ · 1024 + v″): no string per line.
  const bands = new Map<string, Set<number>>();
  for (const o of obs) {
    if (o.upperV === o.lowerV) return true;
    const set = bands.get(o.species) ?? new Set<number>();
    bands.set(o.species, set);
    set.add(o.upperV * 1024 + o.lowerV);
  }
  const edges: Map<number, number[]>[] = [];
  for (const set of bands.values()) {
    if (set.size < 3) continue; // two bands or fewer make no loop
    const g = new Map<number, number[]>();
    for (const b of set) {
      const u = Math.floor(b / 1024);
      const l = b % 1024;
      g.set(u, [...(g.get(u) ?? []), l]);
      g.set(l, [...(g.get(l) ?? []), u]);
    }
    edges.push(g);
  }
  for (const g of edges) {
    const potential = new Map<number, number>();
    for (const start of g.keys()) {
      if (potential.has(start)) continue;
      potential.set(start, 0);
      const stack = [start];
      while (stack.length > 0) {
        const v = stack.pop() as number;
        const pv = potential.get(v) as number;
        for (const w of g.get(v) ?? []) {
          // The band between v and w raises the potential by one toward its upper level.
          const want = pv + (w > v ? 1 : -1);
          const pw = potential.get(w);
          if (pw === undefined) {
            potential.set(w, want);
            stack.push(w);
          } else if (pw !== want) return true;
        }
      }
    }
  }
  return false;
}

/**
 * The additive offset common to every fitted line (all the lines of one instrument), when the bands fix it: a loop
 * such as 2-0 against 1-0 + 2-1 (each band holds the offset once, so the loop closes at δ instead of 0), or a
 * pure-rotation band (whose lines extrapolate to δ at J = 0). Undefined when the level design absorbs a common
 * shift (bands that all start from one level, such as 1-0 and 2-0: the shift is then a change of their origins).
 * Same partialling-out as the source offsets, with the indicator of every line.
 */
export function absoluteOffset(fit: SolvedModel, mode: UncertaintyMode): AbsoluteOffset | undefined {
  if (!bandsFixScale(fit.observations)) return undefined;
  const rows = fit.observations.map((_, i) => i);
  const bands = new Set(fit.observations.map((o) => `${o.upperV}-${o.lowerV}`));
  const group: Group = { source: '', rows, weight: 0, bands };
  for (const o of fit.observations) group.weight += o.weight;
  const mz = projectedIndicator(fit, rows);
  if (!mz) return undefined;
  const left = mz.reduce((acc, x, i) => acc + (fit.observations[i] as Observation).weight * x * x, 0);
  if (!(left > IDENTIFIABLE * group.weight)) return undefined;
  const found = jointOffsets(fit, [{ group, mz }], mode)?.[0];
  if (!found || !(found.uncertainty > 0)) return undefined;
  return { value: found.value, uncertainty: found.uncertainty, bands: [...bands].sort() };
}

/**
 * Offsets of every other source against one reference source, for carrying them in the fit as nuisance
 * parameters: the model "levels + Σ_{s ≠ reference} δ_s z_s", solved for δ by the same partialling-out as above.
 * The joint least-squares estimate of the level parameters is then the level fit of the positions less Zδ, and
 * their covariance that fit's plus A Σ_δ A′ (A = the regression of the indicators on the level design; see
 * `withOffsetCovariance`), so correcting the positions and widening the covariance is the joint fit, exactly.
 */
export interface RelativeOffsets {
  readonly reference: string;
  /** Every source among the fitted lines, reference first, then by line count (ties: weight, name). */
  readonly sources: readonly {
    readonly source: string;
    readonly lines: number;
    /** Undefined when the shared levels cannot determine it (never for the reference, whose offset is 0). */
    readonly offset?: number;
    readonly uncertainty?: number;
  }[];
  /** The sources with a determined offset (the reference excluded), in the order of `values` and `covariance`. */
  readonly fitted: readonly string[];
  readonly values: readonly number[];
  readonly covariance: readonly (readonly number[])[];
  /** Largest |δ_s|/σ_s over the fitted sources (0 when none). */
  readonly largestZ: number;
}

/** Orders sources by lines, then weight, then name (the default reference is the first). */
function byLines(groups: readonly Group[]): Group[] {
  return [...groups].sort(
    (a, b) => b.rows.length - a.rows.length || b.weight - a.weight || (a.source < b.source ? -1 : 1),
  );
}

/**
 * The offsets of all sources against `reference` (default: the source with most lines); undefined with fewer than
 * two sources among the fitted lines. A named reference with no fitted line is an error of the caller's: thrown.
 */
export function estimateRelativeOffsets(
  fit: SolvedModel,
  sources: readonly (string | undefined)[],
  mode: UncertaintyMode,
  reference?: string,
): RelativeOffsets | undefined {
  const groups = byLines(groupBySource(fit.observations, sources));
  if (groups.length < 2) return undefined;
  const ref = reference === undefined ? (groups[0] as Group) : groups.find((g) => g.source === reference);
  if (!ref) throw new RangeError(`reference source ${reference} has no fitted line`);
  const projected: { group: Group; mz: Float64Array }[] = [];
  for (const g of groups) {
    if (g === ref) continue;
    const mz = projectedIndicator(fit, g.rows);
    if (!mz) continue;
    const left = mz.reduce((acc, x, i) => acc + (fit.observations[i] as Observation).weight * x * x, 0);
    if (left > IDENTIFIABLE * g.weight) projected.push({ group: g, mz });
  }
  const joint = projected.length > 0 ? jointOffsets(fit, projected, mode) : undefined;
  const used = joint ? projected : [];
  const at = new Map(used.map((p, i) => [p.group.source, joint?.[i]]));
  const values = used.map((_, i) => joint?.[i]?.value as number);
  const covariance = used.map((_, i) => used.map((_, j) => joint?.[i]?.covariance[j] as number));
  return {
    reference: ref.source,
    sources: [ref, ...groups.filter((g) => g !== ref)].map((g) => {
      const o = g === ref ? { value: 0, uncertainty: 0 } : at.get(g.source);
      const lines = g.rows.length;
      return o ? { source: g.source, lines, offset: o.value, uncertainty: o.uncertainty } : { source: g.source, lines };
    }),
    fitted: used.map((p) => p.group.source),
    values,
    covariance,
    largestZ: Math.max(0, ...values.map((v, i) => Math.abs(v) / Math.sqrt(covariance[i]?.[i] as number))),
  };
}

/**
 * The fit's covariance widened by the offsets' uncertainty: with the fit solved on positions corrected by the
 * offsets, the joint fit's covariance is C + A Σ_δ A′, A_s = C X′W z_s / s² (C already scaled by s²; a fit with
 * priors counts them in C, so A is the regression of z_s on the lines and the priors, the prior rows' z being 0).
 * `sourceOf` gives an observation's source by its line index.
 */
export function withOffsetCovariance(
  fit: SolvedModel,
  mode: UncertaintyMode,
  sourceOf: (index: number) => string | undefined,
  offsets: Pick<RelativeOffsets, 'fitted' | 'covariance'>,
): SolvedModel {
  const p = fit.model.parameters.length;
  const s2 = mode === 'absolute' ? 1 : fit.chiSquare / fit.degreesOfFreedom;
  if (offsets.fitted.length === 0 || !(s2 > 0) || p === 0) return fit;
  const cols = designColumns(fit.model, fit.observations);
  const a = offsets.fitted.map((s) => {
    const g = new Float64Array(p);
    fit.observations.forEach((o, i) => {
      if (sourceOf(o.index) !== s) return;
      for (let j = 0; j < p; j++) g[j] = (g[j] as number) + o.weight * ((cols[j] as Float64Array)[i] as number);
    });
    const out = new Float64Array(p);
    for (let r = 0; r < p; r++) {
      let acc = 0;
      for (let j = 0; j < p; j++) acc += (fit.covariance[r * p + j] as number) * (g[j] as number);
      out[r] = acc / s2;
    }
    return out;
  });
  const covariance = Float64Array.from(fit.covariance);
  a.forEach((as, si) => {
    a.forEach((at, ti) => {
      const c = offsets.covariance[si]?.[ti] as number;
      for (let r = 0; r < p; r++) {
        for (let q = 0; q < p; q++)
          covariance[r * p + q] = (covariance[r * p + q] as number) + (as[r] as number) * c * (at[q] as number);
      }
    });
  });
  return { ...fit, covariance };
}

/**
 * How far the reference's own offset may lie from zero, as a fraction of the largest offset carried against it,
 * for a flagged offset to be carried without the caller's word (see `referenceVouched`).
 */
export const REFERENCE_DRIFT = 0.05;

/**
 * Whether offsets against the reference may be carried by default. Yes when the lines fix only relative offsets
 * (with another source as the reference every offset moves by that source's: the choice is a convention), or when
 * they fix every source's own offset and the reference's lies within REFERENCE_DRIFT of the largest carried one
 * (the lines vouch for its calibration, e.g. through a pure-rotation band). No when a loop of bands alone
 * determines a combination such as δ_B − 2δ_A (2-0 against 1-0 + 2-1): the value against the reference then
 * holds the reference's own miscalibration, doubled, which the lines cannot tell.
 */
export function referenceVouched(
  fit: SolvedModel,
  sources: readonly (string | undefined)[],
  mode: UncertaintyMode,
  offsets: RelativeOffsets,
): boolean {
  const other = offsets.fitted[0];
  if (other === undefined) return false;
  const against = new Map(offsets.sources.map((s) => [s.source, s.offset]));
  const moved = against.get(other) as number;
  const tolerance = 1e-3 * Math.sqrt(offsets.covariance[0]?.[0] as number);
  const swapped = estimateRelativeOffsets(fit, sources, mode, other);
  const invariant = swapped?.sources.every((s) => {
    const before = against.get(s.source);
    if (before === undefined || s.offset === undefined) return before === s.offset;
    return Math.abs(s.offset - (before - moved)) <= tolerance;
  });
  if (invariant) return true;
  const absolute = estimateSourceOffsets(fit, sources, mode);
  if (!absolute || absolute.reference !== undefined) return false;
  const own = absolute.offsets.find((o) => o.source === offsets.reference)?.offset;
  const largest = Math.max(...offsets.values.map((v) => Math.abs(v)));
  return own !== undefined && Math.abs(own) <= REFERENCE_DRIFT * largest;
}

import { ScienceError } from '../errors.js';
import { type FitResult, fitLineListDetailed, type LineInput } from '../fit/fit-lines.js';
import { solveLeastSquares } from '../linalg/least-squares.js';
import { copyFloats, floats, mapFloats } from '../linalg/small-arrays.js';
import type { Band, Branch } from '../models/transitions.js';
import type { MassValue } from '../species/reduced-mass.js';
import { chiSquareSurvival } from '../stats/distributions.js';
import { extentOf } from '../stats/extent.js';
import { median, robustSigma as robustSigmaOf } from '../stats/robust.js';
import { lowerBound, matchLines, type Prediction } from './match.js';

/**
 * Assignment from the band structure alone, for a species the library cannot predict (SCIENCE.md §6).
 *
 * 1. Progressions: a pair of neighbouring lines across a gap is taken as the innermost P and R lines, and both
 *    branches are grown outwards along the Fortrat polynomial ν(m) = ν₀ + (B′+B″)m + (B′−B″)m² + … .
 * 2. Numberings: the lines of a progression keep their order; what is open is where m = 0 (the band origin, where
 *    no line can be) sits in the gap, and whether the two sides are aligned. Every placement of the origin in the
 *    gap, and misalignments by one, are numberings to judge.
 * 3. Evidence against each numbering, in χ²-like units (lower is better):
 *    - positions: the level model's χ² relative to the best numbering's scatter (a misaligned branch cannot fit);
 *    - combination differences: Δ₂F″(J) = R(J−1) − P(J+1) = F″(J+1) − F″(J−1) vanishes at J = −½; its
 *      intercept there, in units of its standard uncertainty, squared;
 *    - the missing line at the origin: a line lying where the numbering puts ν₀ costs 25 (a 5σ argument);
 *    - intensities, when given: ln(I/(S·ν)) against E″ must be one straight line for both branches (Boltzmann
 *      plot with Hönl–London factors S = J″+1 for R, J″ for P): n·ln(RSS/RSS_best);
 *    - Kratzer's relation D_e = 4B_e³/ω_e² (exact in Dunham's expansion to order (B_e/ω_e)²) with B_e and ω_e from
 *      the numbering's own constants (ω_e x_e from Pekeris's relation α_e = 6√(ω_e x_e B_e³)/ω_e − 6B_e²/ω_e), as a
 *      likelihood with its own uncertainty (`kratzerTest`): a whole shift by one line moves it by about 3α_e/B_e
 *      (2 % for CS, 8 % for LiH); constants no bound ¹Σ state has (D″ ≤ 0, B′ ≥ B″, D″ not determined where
 *      another numbering's is) cost as much as a line at the origin.
 *    A positions-only fit cannot tell a shift of the whole numbering (a Fortrat polynomial renumbered is another
 *    Fortrat polynomial with other B′, B″): only the origin line, the intensities and the priors can.
 * 4. The numbering with the least total is chosen when the runner-up's total is at least MIN_MARGIN more;
 *    otherwise there is no numbering to report, and the caller refuses.
 *
 * The stage functions below are exported for their direct tests (test/assign/structure-stages.test.ts); the
 * service and the rest of src/assign use assignByStructure, extendByFit and MIN_MARGIN only.
 */

export interface NumberingEvidence {
  /** Where the numbering puts the origin in the progression, and any realignment of its two sides. */
  readonly label: string;
  /** The empty slot of the progression taken as the origin (0: the first after the seed gap's P-side line). */
  readonly originSlot: number;
  /** The R side moved against the P side by this many lines (0 as the spacing across the gap says). */
  readonly alignment: number;
  readonly lines: number;
  readonly origin?: number;
  readonly lowerB?: number;
  readonly reducedChiSquare: number;
  /** Δ₂F″ extrapolated to J = −½ (zero for a right numbering), cm⁻¹, with its standard uncertainty. */
  readonly differenceIntercept?: { readonly value: number; readonly uncertainty: number };
  readonly lineAtOrigin: boolean;
  /** rms of the Boltzmann plot (natural log units), when intensities were sent. */
  readonly boltzmannScatter?: number;
  /** D_e / (4B_e³/ω_e²) (D_e from D″ through Dunham's β_e; one for a right numbering). */
  readonly kratzerRatio?: number;
  /** Relative standard uncertainty of that ratio (D″'s own, ω_e's through Pekeris, β_e, and a floor). */
  readonly kratzerUncertainty?: number;
  /** Total evidence against, χ²-like units; the chosen numbering has the least. */
  readonly score: number;
  readonly parts: {
    readonly positions: number;
    readonly differences: number;
    readonly origin: number;
    readonly intensities: number;
    readonly kratzer: number;
  };
}

export interface StructureAssignment {
  /** Index of the peak → transition (lower J and branch) in the given band. */
  readonly assigned: ReadonlyMap<number, { branch: Branch; j: number }>;
  readonly reducedChiSquare: number;
  /** The chosen numbering first, then the runners-up by score. */
  readonly evidence: readonly NumberingEvidence[];
  /** Score of the runner-up minus that of the chosen numbering. */
  readonly margin: number;
  /**
   * False when every line of the best numbering carries a σ and its fit is improbable for them (χ² tail below
   * 1e-6): a progression made of the wrong lines, whatever the margin.
   */
  readonly fitsUncertainties: boolean;
  /**
   * False when one of the best numbering's own tests counts against it beyond 3σ (Δ₂F″ intercept, Kratzer) or a
   * line lies at its origin: the true numbering was not among those judged, whatever the margin.
   */
  readonly ownEvidence: boolean;
  /** True when the margin reaches MIN_MARGIN and the best numbering passes its own tests. */
  readonly decisive: boolean;
}

/** Least score margin for a numbering to be reported (χ²-like units: odds of about e^{−9/2} ≈ 1 : 90). */
export const MIN_MARGIN = 9;
/** Fraction of the line spacing within which a line of another band or a spurious peak is not met by chance. */
const COINCIDENCE = 1e-4;
/** χ² tail probability below which the best numbering's fit is not believed (lines with σ only). */
const IMPROBABLE_FIT = 1e-6;
/**
 * Floor of the relative 1σ of the Kratzer test: Dunham's Y02 = −4Y01³/Y10² is exact to order (B_e/ω_e)², and the
 * published ¹Σ ground states checked hold it within 0.1 % (CO, HCl, HF, O2, from memory; CS 0.3 % from its
 * microwave D_0).
 */
const KRATZER_SIGMA = 0.003;
/**
 * Pekeris's relation over-predicts ω_e x_e for every ¹Σ ground state checked (`kratzerTest`: +2 % to +18 %, mean
 * +8.9 %, standard deviation 5 %): its value is divided by PEKERIS_BIAS, and PEKERIS_DOUBT is the relative 1σ left
 * (the whole range, 1.02–1.18, within 1σ of 1.09).
 */
const PEKERIS_BIAS = 1.09;
const PEKERIS_DOUBT = 0.08;
/** Cost of a line lying at a numbering's band origin. */
const ORIGIN_LINE_COST = 25;

export interface Point {
  m: number;
  index: number;
  position: number;
}

export type Peak = { position: number; uncertainty?: number; intensity?: number };
/** Index of a peak → its transition (lower J and branch) in the band being numbered. */
export type Numbering = Map<number, { branch: Branch; j: number }>;

/** What every numbering of one call is judged against. */
export interface StructureContext {
  readonly peaks: readonly Peak[];
  readonly species: string;
  readonly band: Band;
  /** Lines of another band of the species, already numbered, fitted with every numbering. */
  readonly anchors: readonly LineInput[];
  readonly masses: ReadonlyMap<string, MassValue>;
  /** The peak positions in ascending order. */
  readonly pos: Float64Array;
}

/**
 * The stages: progressions grown from every gap pair → the longest distinct ones → every numbering of them judged
 * → the best one's nearest rivals judged → one numbering per band origin, scored → the verdict.
 */
export function assignByStructure(
  peaks: readonly Peak[],
  species: string,
  mass: MassValue,
  band: Band,
  anchors: readonly LineInput[] = [],
): StructureAssignment | undefined {
  const order = peaks
    .map((p, index) => ({ index, position: p.position, intensity: p.intensity ?? 1 }))
    .sort((a, b) => a.position - b.position);
  const pos = mapFloats(order, (p) => p.position);
  const chains = progressions(order, pos);
  if (chains.length === 0) return undefined;
  const ctx: StructureContext = { peaks, species, band, anchors, masses: new Map([[species, mass]]), pos };
  const tried = new Set<string>();
  const trials = judgeProgressions(longestProgressions(chains), ctx, tried);
  if (trials.length === 0) return undefined;
  trials.push(...judgeRivals(score(trials)[0] as Trial, ctx, tried));
  return verdict(onePerOrigin(score(trials), peaks), peaks);
}

/**
 * Progressions of six lines or more grown from every neighbouring pair across a gap (P(1) and R(0) are among the
 * weakest lines of a band, and a spurious peak may sit inside the gap: b may also be the second or third peak
 * after a), longest first.
 */
export function progressions(order: readonly { index: number; position: number }[], pos: Float64Array): Point[][] {
  const chains: Point[][] = [];
  /** The smooth progressions (by their place in `chains`) each line belongs to. */
  const inChain = new Map<number, number[]>();
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
      // A pair inside a progression already grown is a line missing from it, not a new band: its numberings are
      // judged through that progression's empty slots. Only a progression whose sides are smooth counts, and only
      // when it holds both lines: one grown from a spurious seed can run through the true gap with a side made of
      // every other line, and two progressions may share a line without sharing the gap between.
      const ca = inChain.get(a.index);
      if (ca && inChain.get(b.index)?.some((k) => ca.includes(k))) continue;
      const points = grow(a, b, pos, order);
      if (points.length >= 6) {
        chains.push(points);
        if (smoothSides(points))
          for (const p of points) inChain.set(p.index, [...(inChain.get(p.index) ?? []), chains.length - 1]);
      }
    }
  return chains.sort((x, y) => y.length - x.length);
}

/** The longest progressions (within 90 % of the longest), at most four distinct: several gap pairs usually grow the same one. */
export function longestProgressions(chains: readonly Point[][]): Point[][] {
  const longest = (chains[0] as Point[]).length;
  const seen = new Set<string>();
  const contenders: Point[][] = [];
  for (const c of chains) {
    if (c.length < 0.9 * longest) break;
    const base = Math.min(...c.map((p) => p.m));
    const sig = c
      .map((p) => `${p.index}@${p.m - base}`)
      .sort()
      .join(',');
    if (seen.has(sig)) continue;
    seen.add(sig);
    contenders.push(c);
    if (contenders.length >= 4) break;
  }
  return contenders;
}

/** A numbering's identity: two progressions may number the same lines the same way. */
export function numberingKey(map: Numbering): string {
  return [...map]
    .map(([i, t]) => `${i}${t.branch}${t.j}`)
    .sort()
    .join(',');
}

/** Every numbering of the contending progressions judged once (`tried` collects their keys). */
export function judgeProgressions(contenders: readonly Point[][], ctx: StructureContext, tried: Set<string>): Trial[] {
  const trials: Trial[] = [];
  for (const chain of contenders) {
    for (const { q, delta } of numberingsOf(chain)) {
      const map = numbered(chain, q, delta);
      if (!map) continue;
      const key = numberingKey(map);
      if (tried.has(key)) continue;
      tried.add(key);
      const t = judge(map, q, delta, ctx);
      if (t) trials.push(t);
    }
  }
  return trials;
}

/**
 * The nearest rivals of the best numbering, always judged: the whole numbering moved by up to three lines, and the
 * R side moved by one against the P side (a line lying at a rival's origin then counts against it).
 */
export function judgeRivals(first: Trial, ctx: StructureContext, tried: Set<string>): Trial[] {
  const trials: Trial[] = [];
  for (let shift = -3; shift <= 3; shift++)
    for (const delta of [-1, 0, 1]) {
      if (shift === 0 && delta === 0) continue;
      const map: Numbering = new Map();
      for (const [i, t] of first.map) {
        const m0 = t.branch === 'R' ? t.j + 1 : -t.j;
        const m = m0 + shift + (m0 > 0 ? delta : 0);
        if (m !== 0) map.set(i, m > 0 ? { branch: 'R', j: m - 1 } : { branch: 'P', j: -m });
      }
      const key = numberingKey(map);
      if (tried.has(key)) continue;
      tried.add(key);
      const t = judge(map, first.q - shift, delta, ctx);
      if (t) trials.push(t);
    }
  return trials;
}

export type ScoredTrial = Trial & { evidence: NumberingEvidence };

/**
 * Different progressions (one with a stray line more, say) give the same numbering: one entry per band origin
 * (within a quarter of the line spacing), the best scored.
 */
export function onePerOrigin(scored: readonly ScoredTrial[], peaks: readonly Peak[]): ScoredTrial[] {
  const spacing = localSpacing(scored[0]?.map ?? new Map(), peaks);
  const evidence: ScoredTrial[] = [];
  for (const t of scored) {
    if (
      evidence.some(
        (e) => e.origin !== undefined && t.origin !== undefined && Math.abs(e.origin - t.origin) < 0.25 * spacing,
      )
    )
      continue;
    evidence.push(t);
  }
  return evidence;
}

/** The best numbering, its margin over the runner-up, and whether it passes its own tests. */
/** Root mean square residual of the fitted lines among the first `count` (the numbered ones, not the anchors). */
export function fittedRms(r: FitResult, count: number): number {
  let sum = 0;
  let n = 0;
  for (const l of r.lines) {
    if (l.status !== 'fitted' || l.residual === undefined || l.index >= count) continue;
    sum += l.residual ** 2;
    n++;
  }
  return n > 0 ? Math.sqrt(sum / n) : Number.POSITIVE_INFINITY;
}

export function verdict(evidence: readonly ScoredTrial[], peaks: readonly Peak[]): StructureAssignment {
  const best = evidence[0] as ScoredTrial;
  const runnerUp = evidence[1];
  const margin = runnerUp ? runnerUp.evidence.score - best.evidence.score : Number.POSITIVE_INFINITY;
  // The best of bad numberings is no numbering: when every line of it carries a σ, its fit must be a probable one.
  const withSigma = [...best.map.keys()].every((i) => peaks[i]?.uncertainty !== undefined);
  // Unless its lines lie within 1e-4 of the line spacing of the fit (rms): no line of another band or spurious peak
  // falls that close by chance, and the misfit is the stated σ's (a database's lower bounds: real CO 3-0 at
  // χ²/ν 3.6 against them, rms 2e-5 cm⁻¹ on a spacing of 3.5) or a model a term short.
  const fitsUncertainties =
    !withSigma ||
    chiSquareSurvival(best.chiSquare, best.dof) >= IMPROBABLE_FIT ||
    fittedRms(best.result, peaks.length) < COINCIDENCE * localSpacing(best.map, peaks);
  // And none of its own absolute tests (Δ₂F″ intercept, a line at its origin, Kratzer) may count against it beyond
  // what chance gives (3σ each): otherwise the true numbering was not among those judged.
  const parts = best.evidence.parts;
  const ownEvidence = parts.differences <= MIN_MARGIN && parts.kratzer <= MIN_MARGIN && parts.origin === 0;
  return {
    assigned: best.map,
    reducedChiSquare: best.reducedChiSquare,
    evidence: evidence.slice(0, 6).map((e) => e.evidence),
    margin,
    fitsUncertainties,
    ownEvidence,
    decisive: margin >= MIN_MARGIN && fitsUncertainties && ownEvidence,
  };
}

/** The peaks as a line list numbered by `map` (the others unassigned). */
export function numberedLines(map: Numbering, ctx: StructureContext): LineInput[] {
  const { peaks, species, band } = ctx;
  return peaks.map((pk, index) => {
    const t = map.get(index);
    const base = { position: pk.position, ...(pk.uncertainty !== undefined ? { uncertainty: pk.uncertainty } : {}) };
    return t ? { ...base, assignment: { species, band, branch: t.branch, j: t.j, source: 'auto' as const } } : base;
  });
}

/** Whether a peak lies within the fit's tolerance of the numbering's band origin. */
export function lineAtOriginOf(
  origin: number | undefined,
  rms: number,
  map: Numbering,
  ctx: StructureContext,
): boolean {
  if (origin === undefined) return false;
  const { peaks, pos } = ctx;
  const spacing = localSpacing(map, peaks);
  const sigmas = peaks.flatMap((p) => (p.uncertainty !== undefined ? [p.uncertainty] : []));
  const tol = Math.min(Math.max(4 * rms, 4 * (sigmas.length > 0 ? median(sigmas) : 0)), 0.1 * spacing);
  const k = lowerBound(pos, origin - tol);
  return k < pos.length && (pos[k] as number) <= origin + tol;
}

/** One numbering fitted and tested; undefined when the fit refuses it. */
export function judge(map: Numbering, q: number, delta: number, ctx: StructureContext): Trial | undefined {
  const { peaks, band, anchors, masses } = ctx;
  try {
    // Lines already numbered (another band of the species) are fitted with it: a level the two bands share must
    // fit both, which no misnumbered band does.
    const all = [...numberedLines(map, ctx), ...anchors];
    const d = fitLineListDetailed(all, masses, { levelsOnly: true, rejectionThreshold: 0 });
    const r = d.result;
    const stated = statedChiSquare(r, all);
    const origin = originOf(r, band);
    const rms = r.statistics.rms;
    return {
      map,
      q,
      delta,
      band,
      result: r,
      chiSquare: stated ?? (r.statistics.reducedChiSquare ?? 1) * Math.max(1, r.statistics.degreesOfFreedom),
      dof: Math.max(1, r.statistics.degreesOfFreedom),
      reducedChiSquare:
        stated !== undefined
          ? stated / Math.max(1, r.statistics.degreesOfFreedom)
          : (r.statistics.reducedChiSquare ?? Number.POSITIVE_INFINITY),
      ...(origin !== undefined ? { origin } : {}),
      lineAtOrigin: lineAtOriginOf(origin, rms, map, ctx),
      intercept: differenceIntercept(map, peaks),
      unitSigma: peaks.some((p) => p.uncertainty === undefined) ? (r.scatter?.[0]?.sigma ?? rms) : 1,
      boltzmann: boltzmannResiduals(map, peaks, r, band),
      kratzer: kratzerTest(r, band),
    };
  } catch (e) {
    if (e instanceof ScienceError) return undefined;
    throw e;
  }
}

export interface Trial {
  map: Map<number, { branch: Branch; j: number }>;
  q: number;
  delta: number;
  band: Band;
  result: FitResult;
  chiSquare: number;
  dof: number;
  reducedChiSquare: number;
  origin?: number;
  lineAtOrigin: boolean;
  intercept: { value: number; uncertainty: number; ownScale: number } | undefined;
  /** The scatter a line without σ has (σ = 1 in the Δ₂F″ weights), or 1 when every line carries one. */
  unitSigma: number;
  boltzmann: { rss: number; n: number } | undefined;
  kratzer: KratzerTest | undefined;
}

/**
 * The reduced χ² that stands for the lines' own scale: that of the best-fitting numbering, unless a numbering passes
 * its combination-difference and Kratzer tests better (by 9 or more) — then the best fit among those that pass them
 * as well as it does. A numbering that fails those tests may still fit the positions better by over-fitting (with a
 * hot band's lower level fixed by the band below, a misaligned numbering can fit its lines at χ²/ν 0.59 against the
 * true numbering's 0.99), and must not make the true one look bad.
 */
export function positionScale(trials: readonly Trial[]): number {
  const own = (t: Trial) => {
    const d = t.intercept
      ? Math.min(1e6, (t.intercept.value / (t.intercept.uncertainty * t.intercept.ownScale || 1)) ** 2)
      : 0;
    const k = t.kratzer
      ? t.kratzer.ratio > 0
        ? (Math.log(t.kratzer.ratio) / t.kratzer.uncertainty) ** 2
        : IMPLAUSIBLE_COST
      : 0;
    return d + k + (t.lineAtOrigin ? ORIGIN_LINE_COST : 0);
  };
  const best = Math.min(...trials.map(own));
  const passing = trials.filter((t) => own(t) <= best + MIN_MARGIN);
  return Math.max(1e-300, Math.min(...passing.map((t) => t.reducedChiSquare)));
}

/** Evidence totals of every trial, best first. */
export function score(trials: readonly Trial[]): (Trial & { evidence: NumberingEvidence })[] {
  const minRed = positionScale(trials);
  const rssMin = Math.min(...trials.flatMap((t) => (t.boltzmann ? [t.boltzmann.rss / t.boltzmann.n] : [])));
  // The lines' scale, from the numbering that fits them best (a misaligned one inflates its own).
  const unit = Math.min(...trials.map((t) => t.unitSigma)) * Math.sqrt(Math.max(1, minRed));
  const tested = trials.flatMap((t) => (t.kratzer !== undefined && t.kratzer.ratio > 0 ? [t.kratzer.uncertainty] : []));
  const anyKratzer = tested.length > 0;
  // The Kratzer test as a likelihood, −2 ln of a normal density: z² plus 2 ln σ against the sharpest numbering's σ
  // (a numbering under which D″ is loose predicts nothing and gains nothing from passing).
  const sharpestKratzer = anyKratzer ? Math.min(...tested) : 1;
  const out = trials.map((t) => {
    const positions = Math.max(0, t.dof * (t.reducedChiSquare / minRed - 1));
    const intercept = t.intercept && {
      value: t.intercept.value,
      uncertainty: t.intercept.uncertainty * Math.max(unit, t.intercept.ownScale),
    };
    const differences = intercept ? Math.min(1e6, (intercept.value / intercept.uncertainty) ** 2) : 0;
    const origin = t.lineAtOrigin ? ORIGIN_LINE_COST : 0;
    const intensities =
      t.boltzmann && Number.isFinite(rssMin) && rssMin > 0
        ? Math.max(0, t.boltzmann.n * Math.log(t.boltzmann.rss / t.boltzmann.n / rssMin))
        : 0;
    // A numbering under which the lines do not even determine D″, where another's do, fits them as noise.
    const kratzer =
      t.kratzer === undefined
        ? anyKratzer
          ? IMPLAUSIBLE_COST
          : 0
        : t.kratzer.ratio > 0
          ? Math.min(1e6, (Math.log(t.kratzer.ratio) / t.kratzer.uncertainty) ** 2) +
            2 * Math.log(t.kratzer.uncertainty / sharpestKratzer)
          : IMPLAUSIBLE_COST;
    const total = positions + differences + origin + intensities + kratzer;
    const lower = t.result.levels.find((l) => l.v === t.band.lower);
    const evidence: NumberingEvidence = {
      label: describeShift(t.q, t.delta),
      originSlot: t.q,
      alignment: t.delta,
      lines: t.map.size,
      ...(t.origin !== undefined ? { origin: t.origin } : {}),
      ...(lower ? { lowerB: lower.B.value } : {}),
      reducedChiSquare: t.reducedChiSquare,
      ...(intercept ? { differenceIntercept: intercept } : {}),
      lineAtOrigin: t.lineAtOrigin,
      ...(t.boltzmann ? { boltzmannScatter: Math.sqrt(t.boltzmann.rss / t.boltzmann.n) } : {}),
      ...(t.kratzer !== undefined ? { kratzerRatio: t.kratzer.ratio, kratzerUncertainty: t.kratzer.uncertainty } : {}),
      score: total,
      parts: { positions, differences, origin, intensities, kratzer },
    };
    return { ...t, evidence };
  });
  return out.sort((a, b) => a.evidence.score - b.evidence.score);
}

export function describeShift(q: number, delta: number): string {
  const f = (x: number) => (x > 0 ? `+${x}` : `${x}`);
  return `origin at slot ${q} of the progression${delta !== 0 ? `, R side moved ${f(delta)} against the P side` : ''}`;
}

/**
 * The numberings worth judging for a progression, whose lines carry consecutive indices m (the seed gap's P-side
 * line at m = −1, its R-side line at m = slots − 1, as the spacing either side puts it): the origin at any empty
 * slot q (those nearest the seed gap first, at most 16, and up to 12 inside the progression), and the R side of the seed gap moved by δ = −1, 0, +1
 * against the P side (in case the gap was misjudged by a line).
 */
export function numberingsOf(chain: readonly Point[]): { q: number; delta: number }[] {
  const ms = new Set(chain.map((p) => p.m));
  const lo = extentOf(ms).lo;
  const hi = extentOf(ms).hi;
  const empty: number[] = [];
  for (let m = lo - 1; m <= hi + 1; m++) if (!ms.has(m)) empty.push(m);
  empty.sort((a, b) => Math.abs(a) - Math.abs(b));
  // And every empty slot inside the progression (lost lines, few): a seed taken from a spurious line beyond one
  // end grows a progression that runs through the true gap, far from its own seed gap.
  const inside = empty.filter((m) => m > lo && m < hi);
  const slots = [...new Set([...empty.slice(0, 16), ...inside.slice(0, 12)])];
  const out: { q: number; delta: number }[] = [];
  for (const q of slots) for (const delta of [0, -1, 1]) out.push({ q, delta });
  return out;
}

/**
 * The chain numbered with the origin at slot q and the R side of the seed gap (m ≥ 0) moved by δ: index m − q
 * (after the move) is the running number, R(J) at J + 1, P(J) at −J. Undefined when a line would sit at the origin.
 */
export function numbered(
  chain: readonly Point[],
  q: number,
  delta: number,
): Map<number, { branch: Branch; j: number }> | undefined {
  const map = new Map<number, { branch: Branch; j: number }>();
  for (const p of chain) {
    const m = p.m + (p.m >= 0 ? delta : 0) - q;
    if (m === 0) return undefined;
    map.set(p.index, m > 0 ? { branch: 'R', j: m - 1 } : { branch: 'P', j: -m });
  }
  return map;
}

export function localSpacing(map: ReadonlyMap<number, { branch: Branch; j: number }>, peaks: readonly Peak[]): number {
  const byM = [...map]
    .map(([i, t]) => ({ m: t.branch === 'R' ? t.j + 1 : -t.j, x: (peaks[i] as Peak).position }))
    .sort((a, b) => a.m - b.m);
  const d: number[] = [];
  for (let k = 1; k < byM.length; k++) {
    const a = byM[k - 1] as { m: number; x: number };
    const b = byM[k] as { m: number; x: number };
    if (b.m - a.m === 1) d.push(b.x - a.x);
  }
  return d.length > 0 ? median(d) : 1;
}

/**
 * Δ₂F″(J) = R(J−1) − P(J+1) fitted as a(J+½) + b(J+½)³ + c(J+½)⁵ plus an intercept; the intercept (Δ₂F″ at
 * J = −½) is zero for a right numbering whatever the constants — and for a numbering moved as a whole, whose pairs
 * are again R(J−1), P(J+1) of a polynomial in m: this test catches misaligned sides, not a whole shift. Weighted by
 * the lines' σ when given; the uncertainty is the a-priori one, for unit σ where none is given.
 */
export function differenceIntercept(
  map: ReadonlyMap<number, { branch: Branch; j: number }>,
  peaks: readonly Peak[],
): { value: number; uncertainty: number; ownScale: number } | undefined {
  const R = new Map<number, Peak>();
  const P = new Map<number, Peak>();
  for (const [i, t] of map) (t.branch === 'R' ? R : P).set(t.j, peaks[i] as Peak);
  const xs: number[] = [];
  const ys: number[] = [];
  const ws: number[] = [];
  for (const [j, r] of R) {
    const p = P.get(j + 2);
    if (!p) continue;
    xs.push(j + 1.5);
    ys.push(r.position - p.position);
    const s2 = (r.uncertainty ?? 1) ** 2 + (p.uncertainty ?? 1) ** 2;
    ws.push(1 / s2);
  }
  const n = xs.length;
  const fitWith = (cols: number) => {
    const design = floats(n * cols);
    xs.forEach((x, k) => {
      design[k] = 1;
      for (let c = 1; c < cols; c++) design[c * n + k] = x ** (2 * c - 1);
    });
    return solveLeastSquares({
      rows: n,
      cols,
      design,
      observations: copyFloats(ys),
      weights: copyFloats(ws),
    });
  };
  let cols = n >= 30 ? 6 : n >= 20 ? 5 : n >= 12 ? 4 : n >= 7 ? 3 : 2;
  if (n < cols + 2) return undefined;
  let f = fitWith(cols);
  // One more odd power while it is significant (F > 16, beyond 4σ) and leaves two degrees of freedom: a light
  // molecule's Δ₂F″ over J ≤ 14 needs its (J+½)⁵ term (LiH: 12H(J+½)⁵ reaches 0.6 cm⁻¹), and a model too short
  // bends the intercept of the true numbering by 5σ.
  while (cols < 7 && n >= cols + 3 && !f.rankDeficient) {
    const g = fitWith(cols + 1);
    if (g.rankDeficient) break;
    const F = (f.chiSquare - g.chiSquare) / (g.chiSquare / (n - cols - 1));
    if (!(F > 16)) break;
    f = g;
    cols++;
  }
  if (f.rankDeficient) return undefined;
  // A priori (σ = 1 for lines sent without one; `score` scales it by the lines' scatter) unless its own scale is
  // larger: the few degrees of freedom of this small fit make its own scale a poor estimate when smaller (7 pairs:
  // the true numbering of SiO with P(1), P(2) cut came out at −5σ).
  // Its own scale is used only when larger (a model too short for the J range, LiH's u³ term with two columns).
  const s2 = f.chiSquare / (n - cols);
  return {
    value: f.coefficients[0] as number,
    uncertainty: Math.sqrt(f.covariance[0] as number),
    ownScale: Math.sqrt(Math.max(s2, 0)),
  };
}

/** Residual sum of squares of the Boltzmann plot ln(I/(S·ν)) = a − b·E″ over both branches (six lines or more). */
export function boltzmannResiduals(
  map: ReadonlyMap<number, { branch: Branch; j: number }>,
  peaks: readonly Peak[],
  r: FitResult,
  band: Band,
): { rss: number; n: number } | undefined {
  const lower = r.levels.find((l) => l.v === band.lower);
  if (!lower) return undefined;
  const withI = [...map].filter(([i, t]) => (peaks[i]?.intensity ?? 0) > 0 && (t.branch === 'R' || t.j > 0));
  if (withI.length < 6) return undefined;
  const n = withI.length;
  const design = floats(n * 2);
  const obs = floats(n);
  const B = lower.B.value;
  const D = lower.D?.value ?? 0;
  withI.forEach(([i, t], k) => {
    const p = peaks[i] as { position: number; intensity: number };
    const S = t.branch === 'R' ? t.j + 1 : t.j;
    const x = t.j * (t.j + 1);
    design[k] = 1;
    design[n + k] = B * x - D * x * x;
    obs[k] = Math.log(p.intensity / (S * p.position));
  });
  const f = solveLeastSquares({ rows: n, cols: 2, design, observations: obs });
  if (f.rankDeficient) return undefined;
  return { rss: Math.max(f.chiSquare, 1e-12), n };
}

/**
 * χ² of the fitted lines against their stated σ, when every one has a σ (the sum of squares when none has): the
 * fit's own reduced χ² rescales a group of lines whose stated σ its scatter belies (src/fit/stated-scale.ts), and
 * estimates σ per band for lines without, either of which lets a misnumbered band, its residuals blown up, pass for
 * a noisy one (real CO 2-1 numbered wrong beside 1-0 without σ). Undefined for a mix.
 */
export function statedChiSquare(r: FitResult, lines: readonly LineInput[]): number | undefined {
  let chi = 0;
  let rss = 0;
  let withSigma = 0;
  let without = 0;
  for (const l of r.lines) {
    if (l.status !== 'fitted' || l.residual === undefined) continue;
    const s = lines[l.index]?.uncertainty;
    if (s !== undefined && s > 0) {
      chi += (l.residual / s) ** 2;
      withSigma++;
    } else {
      rss += l.residual ** 2;
      without++;
    }
  }
  // No line with σ: the sum of squares (σ = 1 for all; the scores compare numberings by ratios of it).
  if (withSigma === 0) return rss;
  return without === 0 ? chi : undefined;
}

/** The fitted origin of `band` (the fit may hold other bands of the species too). */
export function originOf(r: FitResult, band: Band): number | undefined {
  return r.bands.find((b) => b.band === `${band.upper}-${band.lower}`)?.origin?.value;
}

/** The Kratzer test of one numbering; a ratio of 0 when its constants are not those of a bound ¹Σ state. */
export interface KratzerTest {
  readonly ratio: number;
  readonly uncertainty: number;
}
const IMPLAUSIBLE: KratzerTest = { ratio: 0, uncertainty: 1 };
/** Cost of a numbering whose constants no ¹Σ ground state has (D″ ≤ 0, B′ ≥ B″), like a line at its origin. */
const IMPLAUSIBLE_COST = 25;

/**
 * Kratzer's relation as a test of a numbering: D_e / (4B_e³/ω_e²), which Dunham's expansion makes exact up to terms
 * of relative order (B_e/ω_e)² (Y02 = −4Y01³/Y10²), with its relative uncertainty.
 * - B_e = B″ + α_e(v″+½), α_e = (B″ − B′)/(v′ − v″): a numbering moved by s lines moves both B by about −α_e·s
 *   and leaves D almost as it was, so the ratio moves by about 3α_e/B_e per line (2 % for CS, 8 % for LiH).
 * - ω_e from the band origin ν₀ = ω_e Δv − ω_e x_e Δv(v′+v″+1), ω_e x_e from Pekeris's relation
 *   α_e = 6√(ω_e x_e B_e³)/ω_e − 6B_e²/ω_e, i.e. ω_e x_e = (α_eω_e + 6B_e²)²/(36B_e³) (iterated; against Huber &
 *   Herzberg's constants, from memory, it gives N2 +2 %, NaCl +4 %, CO +6 %, CS +6 %, SiO +8 %, O2 +9 %, HCl +12 %,
 *   LiH +15 %, HF +18 %; recomputed here for CO +5.7 %, HCl +12.1 %, N2 +2.1 %, and for the test constants of CS
 *   +5.6 %, SiO +7.7 %, NaCl +3.7 %, LiH +15 %: divided by PEKERIS_BIAS, its doubt PEKERIS_DOUBT enters through ω_e).
 * - D_e from the fitted D″ = D_e + β_e(v″+½), β_e from Dunham's relation β_e = D_e(8ω_e x_e/ω_e − 5α_e/B_e −
 *   α_e²ω_e/(24B_e³)) (common practice; half the correction is taken as its doubt).
 * The relative uncertainty adds D″'s own (from the fit), those of β_e and ω_e, and a floor of KRATZER_SIGMA in
 * quadrature.
 * Undefined without D″ or for pure rotation.
 */
export function kratzerTest(r: FitResult, band: Band): KratzerTest | undefined {
  const dv = band.upper - band.lower;
  if (dv <= 0) return undefined;
  const lo = r.levels.find((l) => l.v === band.lower);
  const up = r.levels.find((l) => l.v === band.upper);
  const origin = originOf(r, band);
  const D = lo?.D?.value;
  if (!lo || !up || origin === undefined || D === undefined) return undefined;
  const alpha = (lo.B.value - up.B.value) / dv;
  const Be = lo.B.value + alpha * (band.lower + 0.5);
  // A ¹Σ ground state has D > 0 and B falling with v (α_e > 0): a numbering that needs otherwise fails the test.
  if (!(D > 0) || !(alpha > 0) || !(Be > 0) || !(origin > 0)) return IMPLAUSIBLE;
  const levels = band.upper + band.lower + 1;
  let we = origin / dv;
  let wexe = 0;
  for (let k = 0; k < 20; k++) {
    wexe = (alpha * we + 6 * Be * Be) ** 2 / (36 * Be ** 3) / PEKERIS_BIAS;
    we = (origin + wexe * dv * levels) / dv;
  }
  const betaOverD = (8 * wexe) / we - (5 * alpha) / Be - (alpha * alpha * we) / (24 * Be ** 3);
  // D_e from D″ through Dunham's β_e, half the correction taken as its doubt (the fitted D′ − D″ would do it too, but
  // it takes up whatever higher terms the model lacks: LiH's true numbering came out 7σ off).
  const correction = betaOverD * (band.lower + 0.5);
  const De = D / (1 + correction);
  const ratio = De / ((4 * Be ** 3) / we ** 2);
  const fromD = (lo.D?.uncertainty ?? 0) / D;
  const fromBeta = 0.5 * Math.abs(correction);
  const fromOmega = (2 * PEKERIS_DOUBT * wexe * levels) / we;
  const uncertainty = Math.sqrt(KRATZER_SIGMA ** 2 + fromD ** 2 + fromBeta ** 2 + fromOmega ** 2);
  return Number.isFinite(ratio) && ratio > 0 && Number.isFinite(uncertainty) ? { ratio, uncertainty } : IMPLAUSIBLE;
}

/**
 * Whether each side of a progression has four lines or more and a smoothly varying spacing: per index step,
 * consecutive spacings differ by at most a quarter of the side's median spacing (a band's changes by 2(B′ − B″) per
 * line, a few per cent at most; a side that skips lines, or takes spurious ones, jumps by half a spacing or more).
 * A side of three lines tells nothing (a spurious line and two lines beyond the gap pass for one).
 */
export function smoothSides(points: readonly Point[]): boolean {
  for (const side of [points.filter((p) => p.m < 0), points.filter((p) => p.m >= 0)]) {
    if (side.length < 4) return false;
    const s = [...side].sort((a, b) => a.m - b.m);
    const steps: number[] = [];
    for (let k = 1; k < s.length; k++) {
      const a = s[k - 1] as Point;
      const b = s[k] as Point;
      steps.push((b.position - a.position) / (b.m - a.m));
    }
    if (steps.length < 2) continue;
    const typical = median(steps.map(Math.abs));
    for (let k = 1; k < steps.length; k++)
      if (Math.abs((steps[k] as number) - (steps[k - 1] as number)) > 0.25 * typical) return false;
  }
  return true;
}

/** Grow R (m = 1, 2, …) and P (m = −1, −2, …) from a candidate P(1), R(0) pair along a fitted Fortrat polynomial. */
export function grow(
  p1: { index: number; position: number },
  r0: { index: number; position: number },
  pos: Float64Array,
  order: readonly { index: number; position: number }[],
): Point[] {
  // The local spacing from the neighbours outside the gap (on each side the median of the next five spacings: a
  // spurious line beside a seed, common, splits one spacing in two); the gap then spans `slots` spacings.
  const ia = lowerBound(pos, p1.position);
  const ib = lowerBound(pos, r0.position);
  const below: number[] = [];
  for (let k = ia; k > 0 && k > ia - 5; k--) below.push((pos[k] as number) - (pos[k - 1] as number));
  const above: number[] = [];
  for (let k = ib; k + 1 < pos.length && k < ib + 5; k++) above.push((pos[k + 1] as number) - (pos[k] as number));
  const near = [below, above].filter((x) => x.length > 0).map((x) => median(x));
  const gap = r0.position - p1.position;
  // Across the gap the spacing changes steadily (by 2(B′ − B″) a line, 6 % a line for LiH): when the two sides'
  // spacings agree within a factor 1.4 their mean counts the slots. Otherwise either may be wrong (spurious lines
  // split the spacings of one side, lost lines double them): the gap is counted with each, and the longest
  // progression kept.
  const [n1, n2] = near as [number, number];
  const locals =
    near.length === 0
      ? [gap / 2]
      : near.length === 2 && Math.max(n1, n2) <= 1.4 * Math.min(n1, n2)
        ? [(n1 + n2) / 2]
        : near;
  const counts = [...new Set(locals.map((l) => Math.max(2, Math.min(30, Math.round(gap / l)))))];
  let best: Point[] = [];
  for (const slots of counts) {
    const points = growWithSlots(p1, r0, slots, pos, order);
    if (points.length > best.length) best = points;
  }
  return best;
}

/** A progression grown from a seed pair whose gap spans `slots` spacings. */
export function growWithSlots(
  p1: { index: number; position: number },
  r0: { index: number; position: number },
  slots: number,
  pos: Float64Array,
  order: readonly { index: number; position: number }[],
): Point[] {
  const spacing0 = (r0.position - p1.position) / slots;
  const points: Point[] = [
    { m: -1, index: p1.index, position: p1.position },
    { m: slots - 1, index: r0.index, position: r0.position },
  ];
  const used = new Set([p1.index, r0.index]);
  if (!(spacing0 > 0)) return points;
  extendBothSides(points, used, pos, order, spacing0);
  // A spurious line taken on the way (a seed inside the gap next to the true R(0), or a line nearer a rough early
  // prediction than the true one) bends what follows, and one side may stop early: the lines that stray from one
  // polynomial through all of them go, the holes are filled from the polynomial, and both sides grow once more.
  const stepped = byCommonStep(points);
  const kept = withoutStrays(stepped);
  if (!kept) return stepped;
  const usedAgain = new Set(kept.map((p) => p.index));
  fillHoles(kept, usedAgain, pos, order);
  extendInwards(kept, usedAgain, pos, order);
  extendBothSides(kept, usedAgain, pos, order, spacing0);
  return withoutStraySeedSide(kept, spacing0);
}

/**
 * A side of three points or fewer beside a long one (twelve or more) is kept only where the long side's
 * polynomial, carried across, puts its lines (within a quarter spacing): the Fortrat polynomial runs on through
 * the band origin, so a seed gap that is the origin loses nothing, while a spurious line taken as the seed beyond
 * one end of a band, its whole band then grown on the other side, is dropped rather than numbered as P(42).
 */
export function withoutStraySeedSide(points: Point[], spacing0: number): Point[] {
  const pSide = points.filter((p) => p.m < 0);
  const rSide = points.filter((p) => p.m >= 0);
  const [small, large] = pSide.length <= rSide.length ? [pSide, rSide] : [rSide, pSide];
  if (small.length === 0 || small.length > 3 || large.length < 12) return points;
  const drop = new Set<number>();
  for (const p of small) {
    const near = [...large].sort((x, y) => Math.abs(x.m - p.m) - Math.abs(y.m - p.m)).slice(0, 12);
    const predicted = fortrat(near, p.m, spacing0);
    const spacing = Math.abs(fortrat(near, p.m + 1, spacing0) - predicted);
    if (!(Math.abs(p.position - predicted) <= 0.25 * spacing)) drop.add(p.index);
  }
  return drop.size === 0 ? points : points.filter((p) => !drop.has(p.index));
}

/**
 * Indices renumbered by their common step: a spurious line beside a seed halves the local spacing, the gap then
 * counts twice the slots it has, and the progression takes the true lines at every other index (B″ comes out half
 * the true one, and every numbering fits badly), with a few spurious lines between. When four fifths of the
 * points or more share one residue of m + 1 modulo 2 or 3, those are kept and renumbered, the others dropped; the
 * seed's P-side line stays at m = −1.
 */
export function byCommonStep(points: readonly Point[]): Point[] {
  for (const g of [3, 2]) {
    const count = new Map<number, number>();
    for (const p of points) {
      const r = (((p.m + 1) % g) + g) % g;
      count.set(r, (count.get(r) ?? 0) + 1);
    }
    const [r, n] = [...count].sort((a, b) => b[1] - a[1])[0] as [number, number];
    if (n < 0.8 * points.length || n < 6) continue;
    const kept = points
      .filter((p) => (((p.m + 1) % g) + g) % g === r)
      .map((p) => ({ ...p, m: (p.m + 1 - r) / g - 1, side: p.m >= 0 }));
    // The R side stays at m ≥ 0: one index up for all when the renumbering put its innermost line below.
    const lift = kept.some((p) => p.side && p.m < 0) ? 1 : 0;
    return kept.map(({ side: _side, ...p }) => ({ ...p, m: p.m + lift }));
  }
  return [...points];
}

/**
 * Each side grown towards the seed gap (the lines next to the origin are among the weakest, and a misjudged seed
 * leaves them out): the P side upwards and the R side downwards, from the side's own polynomial, until the other
 * side is reached or two indices in a row are empty (the origin is one, a lost P(1) or R(0) another).
 */
export function extendInwards(
  points: Point[],
  used: Set<number>,
  pos: Float64Array,
  order: readonly { index: number; position: number }[],
): void {
  for (const side of ['P', 'R'] as const) {
    let misses = 0;
    for (let step = 0; step < 30 && misses < 2; step++) {
      const ps = points.filter((p) => p.m < 0).map((p) => p.m);
      const rs = points.filter((p) => p.m >= 0).map((p) => p.m);
      if (ps.length < 4 || rs.length < 4) return;
      const top = extentOf(ps).hi;
      const bottom = extentOf(rs).lo;
      const m = side === 'P' ? top + 1 + misses : bottom - 1 - misses;
      if (m >= bottom || m <= top || (side === 'P' && m >= 0) || (side === 'R' && m < 0)) break;
      const local = localPoints(points, side === 'P' ? -1 : 0).filter((p) => (side === 'P' ? p.m < 0 : p.m >= 0));
      if (local.length < 4) break;
      const predicted = fortrat(local, m, 1);
      const spacing = Math.abs(fortrat(local, m + (side === 'P' ? -1 : 1), 1) - predicted);
      const o = nearestFree(
        predicted,
        Math.min(0.2 * spacing, 6 * sideScatter(points, side === 'P')),
        used,
        pos,
        order,
      );
      if (!o) {
        misses++;
        continue;
      }
      points.push({ m, index: o.index, position: o.position });
      used.add(o.index);
      misses = 0;
    }
  }
}

/**
 * A local polynomial's points: the twelve nearest in m to the one sought, from its own side of the seed gap once
 * that side has four (the two sides may be misaligned by a line until a numbering says otherwise).
 */
export function localPoints(points: readonly Point[], m: number): readonly Point[] {
  const same = points.filter((p) => p.m < 0 === m < 0);
  const pool = same.length >= 4 ? same : points;
  return pool.length <= 12 ? pool : [...pool].sort((x, y) => Math.abs(x.m - m) - Math.abs(y.m - m)).slice(0, 12);
}

/** The free line nearest to `predicted` within `tol`, or undefined. */
export function nearestFree(
  predicted: number,
  tol: number,
  used: ReadonlySet<number>,
  pos: Float64Array,
  order: readonly { index: number; position: number }[],
): { index: number; position: number } | undefined {
  let best: { index: number; position: number } | undefined;
  for (let i = lowerBound(pos, predicted - tol); i < pos.length && (pos[i] as number) <= predicted + tol; i++) {
    const o = order[i] as { index: number; position: number };
    if (used.has(o.index)) continue;
    if (!best || Math.abs(o.position - predicted) < Math.abs(best.position - predicted)) best = o;
  }
  return best;
}

/**
 * The empty indices inside a progression (away from its two innermost slots, where the origin may lie), each
 * filled with the nearest free line within a fifth of the spacing of the polynomial through the twelve nearest
 * points: interpolated, far sharper than the extrapolation that grew past it.
 */
export function fillHoles(
  points: Point[],
  used: Set<number>,
  pos: Float64Array,
  order: readonly { index: number; position: number }[],
): void {
  const has = new Set(points.map((p) => p.m));
  const ms = [...has];
  const lo = extentOf(ms).lo;
  const hi = extentOf(ms).hi;
  for (let m = lo + 1; m < hi; m++) {
    if (has.has(m)) continue;
    // Only holes with neighbours on both sides within two indices: a wide empty stretch is the gap at the origin.
    const near = (d: number) => has.has(m - d) || has.has(m - d - 1);
    const far = (d: number) => has.has(m + d) || has.has(m + d + 1);
    if (!(near(1) && far(1))) continue;
    const local = localPoints(points, m);
    const predicted = fortrat(local, m, 1);
    const spacing = Math.abs(fortrat(local, m + 1, 1) - predicted);
    const o = nearestFree(predicted, Math.min(0.2 * spacing, 6 * sideScatter(points, m < 0)), used, pos, order);
    if (!o) continue;
    points.push({ m, index: o.index, position: o.position });
    used.add(o.index);
  }
}

/** Grow both sides of a progression outwards (each until three lines in a row are missing). */
export function extendBothSides(
  points: Point[],
  used: Set<number>,
  pos: Float64Array,
  order: readonly { index: number; position: number }[],
  spacing0: number,
): void {
  const ms = points.map((p) => p.m);
  const misses = { R: 0, P: 0 };
  let next = { R: extentOf(ms).hi + 1, P: extentOf(ms).lo - 1 };
  for (let step = 0; step < 400 && (misses.R < 3 || misses.P < 3); step++) {
    for (const side of ['R', 'P'] as const) {
      if (misses[side] >= 3) continue;
      const m = next[side];
      const local = localPoints(points, m);
      const predicted = fortrat(local, m, spacing0);
      const spacing = Math.abs(predicted - fortrat(local, m - Math.sign(m), spacing0));
      // A fifth of the spacing while the side is young; once it has eight lines, eight times its own scatter plus
      // twice the extrapolation's own doubt (a spurious line 0.1 cm⁻¹ off is not taken for a lost line on a side
      // whose lines lie within 0.003 of its polynomial).
      // The local polynomial's own extrapolation error is gauged by how far a degree lower would put the line.
      const modelError =
        local.length >= 5 ? Math.abs(predicted - fortrat(local, m, spacing0, 2)) : Number.POSITIVE_INFINITY;
      const tol = Math.min(0.2 * Math.max(spacing, 1e-6), 8 * sideScatter(points, m < 0) + 2 * modelError);
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
      next = { ...next, [side]: m + (side === 'R' ? 1 : -1) };
    }
  }
}

/**
 * Each side of the seed gap on its own (the two may be misaligned by a line, which the numberings judge): the
 * points within five robust standard deviations of one polynomial (degree up to 4 in m) through the side's points,
 * refitted without those beyond (twice). A side of fewer than eight points is kept as it is; undefined when a side
 * would keep fewer than six.
 */
export function withoutStrays(points: readonly Point[]): Point[] | undefined {
  const out: Point[] = [];
  for (const side of [points.filter((p) => p.m < 0), points.filter((p) => p.m >= 0)]) {
    if (side.length < 8) {
      out.push(...side);
      continue;
    }
    const kept = strayFree(side);
    if (!kept) return undefined;
    out.push(...kept);
  }
  return out;
}

/**
 * Robust scatter of one side's points about its polynomial (degree up to 4 in m): how far a line filled in from
 * that polynomial may lie (six of it) — a spurious line a tenth of a spacing off is not taken for a lost one.
 * Infinite when the side has too few points to tell.
 */
export function sideScatter(points: readonly Point[], pSide: boolean): number {
  const side = points.filter((p) => p.m < 0 === pSide);
  if (side.length < 8) return Number.POSITIVE_INFINITY;
  const r = polynomialResiduals(side);
  if (!r) return Number.POSITIVE_INFINITY;
  // The residuals of a polynomial with five coefficients through a few points understate the lines' scatter (nine
  // points keep four degrees of freedom, and their median deviation is a rough guess): the larger of the robust
  // scale and the root mean square, each corrected for the coefficients (CS R(9) lay 2.6σ from the cubic through
  // R(0)–R(8) while the robust scale alone made the tolerance 0.8σ, and the R branch stopped there).
  const dof = r.length - Math.min(5, r.length - 3);
  const correction = Math.sqrt(r.length / dof);
  const rms = Math.sqrt(r.reduce((a, x) => a + x * x, 0) / dof);
  const s = Math.max(robustSigmaOf(r) * correction, rms);
  return s > 0 ? s : Number.POSITIVE_INFINITY;
}

/** Residuals of the points about one polynomial in m (degree up to 4), or undefined when it cannot be fitted. */
export function polynomialResiduals(points: readonly Point[]): Float64Array | undefined {
  const n = points.length;
  const cols = Math.min(5, n - 3);
  if (cols < 2) return undefined;
  const ms = points.map((p) => p.m);
  const centre = (extentOf(ms).hi + extentOf(ms).lo) / 2;
  const half = Math.max(1, (extentOf(ms).hi - extentOf(ms).lo) / 2);
  const design = floats(n * cols);
  points.forEach((p, i) => {
    for (let k = 0; k < cols; k++) design[k * n + i] = ((p.m - centre) / half) ** k;
  });
  const r = solveLeastSquares({ rows: n, cols, design, observations: mapFloats(points, (p) => p.position) });
  return r.rankDeficient ? undefined : r.residuals;
}

export function strayFree(points: readonly Point[]): Point[] | undefined {
  let kept = [...points];
  for (let round = 0; round < 2; round++) {
    const r = polynomialResiduals(kept);
    if (!r) return undefined;
    const s = robustSigmaOf(r);
    if (!(s > 0)) return kept;
    const next = kept.filter((_, i) => Math.abs(r[i] as number) <= 5 * s);
    if (next.length === kept.length) return kept;
    if (next.length < 6) return undefined;
    kept = next;
  }
  return kept;
}

/** The Fortrat polynomial through the points so far (degree up to 3 in m), evaluated at m. */
export function fortrat(points: readonly Point[], m: number, spacing0: number, maxDegree = 3): number {
  const n = points.length;
  const degree = Math.min(maxDegree, n - 1);
  if (degree < 2) {
    const centre = points.reduce((s, p) => s + p.position - p.m * spacing0, 0) / n;
    return centre + m * spacing0;
  }
  const cols = degree + 1;
  const design = floats(n * cols);
  points.forEach((p, i) => {
    for (let k = 0; k < cols; k++) design[k * n + i] = p.m ** k;
  });
  const r = solveLeastSquares({ rows: n, cols, design, observations: mapFloats(points, (p) => p.position) });
  if (r.rankDeficient) return points[0]?.position ?? 0;
  let v = 0;
  for (let k = 0; k < cols; k++) v += (r.coefficients[k] as number) * m ** k;
  return v;
}

/**
 * Once numbered, the band grows along its own fitted level model (like a library band): every P and R line up to
 * half again the highest J found is predicted with its variance, and peaks within 5σ of (prediction − observation),
 * the scatter taken robustly from the lines already assigned and each peak's own σ, are taken one-to-one.
 */
export function extendByFit(
  peaks: readonly Peak[],
  assigned: ReadonlyMap<number, { branch: Branch; j: number }>,
  species: string,
  mass: MassValue,
  band: Band,
  anchors: readonly LineInput[] = [],
): Map<number, { branch: Branch; j: number }> {
  const masses = new Map([[species, mass]]);
  let map = new Map(assigned);
  for (let iter = 0; iter < 12; iter++) {
    let fit: ReturnType<typeof fitLineListDetailed>;
    try {
      fit = fitLineListDetailed([...labelledLines(peaks, map, species, band), ...anchors], masses, {
        levelsOnly: true,
      });
    } catch (e) {
      if (e instanceof ScienceError) return map;
      throw e;
    }
    const preds = extensionPredictions(fit, peaks, map, species, band);
    const free = peaks.flatMap((pk, index) =>
      map.has(index)
        ? []
        : [{ index, position: pk.position, ...(pk.uncertainty !== undefined ? { sigma: pk.uncertainty } : {}) }],
    );
    const m = matchLines(preds, free);
    const next = new Map(map);
    // Lines the fit rejects are dropped (they were taken by the progression, not by the model).
    for (const l of fit.result.lines) if (l.status === 'rejected' && l.index < peaks.length) next.delete(l.index);
    for (const x of m.matches) {
      const key = x.prediction.key;
      next.set(x.peak.index, { branch: key[0] as Branch, j: Number(key.slice(1)) });
    }
    if (next.size === map.size && [...next].every(([i, t]) => map.get(i) === t)) return next;
    map = next;
  }
  return map;
}

/** The peaks as a line list, those numbered so far labelled (source auto) in the band. */
function labelledLines(
  peaks: readonly Peak[],
  map: ReadonlyMap<number, { branch: Branch; j: number }>,
  species: string,
  band: Band,
): LineInput[] {
  return peaks.map((pk, index) => {
    const t = map.get(index);
    const base = { position: pk.position, ...(pk.uncertainty !== undefined ? { uncertainty: pk.uncertainty } : {}) };
    return t ? { ...base, assignment: { species, band, branch: t.branch, j: t.j, source: 'auto' as const } } : base;
  });
}

/**
 * The scale of the fitted lines' residuals: the robust scatter of those without σ (0 below three) and the robust
 * spread of the normalised residuals of those with σ (at least 1; 1 below three).
 */
function residualScales(
  fit: ReturnType<typeof fitLineListDetailed>,
  peaks: readonly Peak[],
): { scatter: number; factor: number } {
  const res: number[] = [];
  const z: number[] = [];
  for (const l of fit.result.lines) {
    if (l.status !== 'fitted' || l.residual === undefined || l.index >= peaks.length) continue;
    const s = peaks[l.index]?.uncertainty;
    if (s === undefined) res.push(l.residual);
    else z.push(l.residual / s);
  }
  return {
    scatter: res.length >= 3 ? robustSigmaOf(res) : 0,
    factor: Math.max(1, z.length >= 3 ? robustSigmaOf(z) : 1),
  };
}

/** The P and R lines not yet numbered, up to half again the highest J found, each with its 5σ tolerance. */
function extensionPredictions(
  fit: ReturnType<typeof fitLineListDetailed>,
  peaks: readonly Peak[],
  map: ReadonlyMap<number, { branch: Branch; j: number }>,
  species: string,
  band: Band,
): Prediction[] {
  const { scatter, factor } = residualScales(fit, peaks);
  const jTop = Math.max(...[...map.values()].map((t) => t.j));
  const taken = new Map<string, number>();
  for (const [i, t] of map) taken.set(`${t.branch}${t.j}`, i);
  const preds: Prediction[] = [];
  const jMax = jTop + Math.max(3, Math.floor(jTop / 2));
  // The scale of a line's own noise: the scatter of lines without σ, or the typical σ times its factor.
  const sigmas = peaks.flatMap((p) => (p.uncertainty !== undefined ? [p.uncertainty] : []));
  const noise = Math.max(scatter, factor * (sigmas.length > 0 ? median(sigmas) : 0));
  const spacing = localSpacing(map, peaks);
  for (const branch of ['P', 'R'] as const)
    for (let j = branch === 'P' ? 1 : 0; j <= jMax; j++) {
      if (taken.has(`${branch}${j}`)) continue;
      const p = fit.predict({ species, band, branch, j });
      if (!p) continue;
      const model = 5 * Math.sqrt(p.variance) + 1e-6;
      // Beyond three lines past the reach the prediction must be as sharp as twice the noise (there the data
      // have run out for this model), and nowhere may its tolerance span a quarter of the line spacing: a light
      // molecule's fit extrapolated from J ≤ 15 to J = 45 took a hot band's lines and spurious ones.
      if (j > jTop + 3 && noise > 0 && Math.sqrt(p.variance) > 2 * noise) continue;
      if (model > 0.25 * spacing) continue;
      preds.push({
        key: `${branch}${j}`,
        position: p.value,
        tolerance: Math.hypot(model, 5 * scatter),
        withSigma: { model, perSigma: 5 * factor },
      });
    }
  return preds;
}

import { type Observation, reweighted } from '../models/linear-model.js';
import { formatBand } from '../models/transitions.js';
import { median, robustSigma } from '../stats/robust.js';
import type { SolvedModel } from './engine.js';
import { type ScaleFitSettings, screenGrossErrors } from './gross-errors.js';
import { type LevelSelection, selectLevelModel } from './level-selection.js';
import type { LineInput, Warning } from './types.js';

/** The scatter estimated for one group of lines sent without an uncertainty. */
export interface ScatterGroup {
  /** The source label, or "species band" (e.g. "12C-16O 1-0"), or "all lines without an uncertainty". */
  readonly group: string;
  readonly by: 'source' | 'band' | 'pooled';
  /** Lines of the group that had no uncertainty (and took this estimate). */
  readonly lines: number;
  /** Robust standard deviation of the lines, cm⁻¹. */
  readonly sigma: number;
}

export interface WeightedLines {
  /** The assigned lines with weights 1/σ² from the given or the estimated uncertainties. */
  readonly observations: readonly Observation[];
  readonly groups: readonly ScatterGroup[];
  /** σ for a line without an uncertainty: by source, by band ("species|upper-lower"), or pooled. */
  sigmaFor(species: string, band: string, source?: string): number;
  readonly warnings: readonly Warning[];
  /** The scatter as estimated (or reused), for a later fit of a grown line list to reuse (`ScatterReuse`). */
  readonly estimate?: ScatterEstimate;
}

/**
 * A scatter estimate carried from one fit to the next over a list that grows (the inner fits of the automatic
 * assignment): it is reused while the list holds the same groups of lines without σ, each within `growth` (a
 * fraction) of the lines it had when it was estimated, none crossing MIN_SCATTER_GROUP; otherwise the scatter is
 * estimated afresh. The estimate of a group of n lines is itself uncertain by about 1/√(2n) (±10 % at
 * n = 50): a quarter more lines moves it by less than that.
 */
export interface ScatterReuse {
  readonly from: ScatterEstimate;
  readonly growth: number;
}

/** Groups smaller than this take the pooled estimate: the MAD of fewer lines is itself uncertain by > 35 %. */
export const MIN_SCATTER_GROUP = 10;
/** Reweighting rounds: the estimate moves the fit, which moves the residuals; two rounds settle it. */
const ROUNDS = 2;

/** Group of the lines with a stated σ when gross errors are screened. */
const STATED = 'stated';

const bandKeyOf = (o: Observation) => `${o.species}|${o.upperV}-${o.lowerV}`;

/**
 * Stage 1b, weights. Lines with an uncertainty weigh 1/σ². Lines without one (the usual peak list) get σ estimated
 * from the data: a first level fit, then per group (the line's source when it names one, else its band) the
 * normal-consistent MAD of the leverage-corrected residuals eᵢ/√(1 − hᵢᵢ) (SCIENCE.md §9; Rousseeuw & Croux 1993),
 * which a few wrong lines do not inflate, refined by the clipped rms (`scatterOf`), and a refit with the new
 * weights. Groups with fewer than
 * MIN_SCATTER_GROUP such lines take the estimate pooled over all lines without σ, or, when some lines do carry
 * uncertainties and too few lack one, the median of the given ones (as before).
 */
/**
 * How another level model takes part (linear polyatomics, src/linear/fit.ts): its refit of a sample of lines, and
 * the band of an observation as a group key and a label. Defaults: the diatomic level model and "species v′-v″".
 */
export interface WeighHooks {
  refit(obs: readonly Observation[]): LevelSelection;
  band(o: Observation): { readonly key: string; readonly label: string };
}

type SigmaInput = Pick<LineInput, 'uncertainty' | 'source'>;

export function weighLines(
  input: readonly SigmaInput[],
  observations: readonly Observation[],
  fit: ScaleFitSettings,
  hooks?: WeighHooks,
  reuse?: ScatterReuse,
): WeightedLines {
  const given = input.filter((l) => l.uncertainty !== undefined).map((l) => l.uncertainty as number);
  const fallback = given.length > 0 ? median(given) : 1;
  const missing = observations.filter((o) => input[o.index]?.uncertainty === undefined);
  const warnings: Warning[] = [];
  const fixed = (sigma: number): WeightedLines => ({
    observations: reweighted(observations, (o) =>
      input[o.index]?.uncertainty === undefined ? 1 / (sigma * sigma) : undefined,
    ),
    groups: [],
    sigmaFor: () => sigma,
    warnings,
  });
  if (given.length === input.length) return fixed(fallback);
  if (given.length > 0 && missing.length < MIN_SCATTER_GROUP) {
    warnings.push({
      code: 'UNCERTAINTY_FILLED',
      message: `${input.length - given.length} line(s) had no uncertainty and were given the median of the others, ${fallback} cm-1`,
    });
    return fixed(fallback);
  }
  if (missing.length === 0) return fixed(fallback);
  const est =
    (reuse && reusedScatter(reuse, input, observations, fallback, hooks)) ??
    estimateScatter(input, observations, fallback, fit, hooks);
  const groups = scatterGroups(est);
  if (groups.length > 0) {
    warnings.push({
      code: 'UNCERTAINTY_ESTIMATED',
      message: `${missing.length} line(s) had no uncertainty: σ was estimated from the scatter of the residuals (1.4826 × median absolute deviation, per ${groups.some((g) => g.by === 'source') ? 'source' : 'band'}) and used for the weights and the covariance: ${groups.map((g) => `${g.group} ${g.sigma.toPrecision(2)} cm-1 (${g.lines} lines)`).join(', ')}`,
    });
  }
  const finalPooled = groups.length > 0 ? est.pooled : fallback;
  const { sigmas } = est;
  return {
    observations: est.observations,
    groups,
    sigmaFor(species, band, source) {
      if (source !== undefined) {
        const s = sigmas.get(`source|${source}`);
        if (s !== undefined) return s;
      }
      return sigmas.get(`band|${species}|${band}`) ?? finalPooled;
    },
    warnings,
    estimate: est,
  };
}

/** What the estimating rounds leave: the reweighted observations, σ per group (key "source|…" or "band|…"), pooled σ. */
export interface ScatterEstimate {
  readonly observations: readonly Observation[];
  readonly sigmas: ReadonlyMap<string, number>;
  readonly pooled: number;
  /** Lines without σ per group, as the first round found them. */
  readonly counts: ReadonlyMap<string, number>;
  /** Labels of band groups given by hooks (key without the "band|" prefix). */
  readonly labels: ReadonlyMap<string, string>;
  /** The σ that lines without one started from (the median of the given ones, else 1). */
  readonly fallback: number;
  /** Lines without σ per group when the σ were estimated (a reused estimate keeps them). */
  readonly estimatedAt: ReadonlyMap<string, number>;
}

/** The group of a line without σ: its source when it names one, else its band ("band|species|v′-v″" or the hook's). */
function scatterGroupOf(
  input: readonly SigmaInput[],
  hooks: WeighHooks | undefined,
  labels: Map<string, string>,
): (o: Observation) => string {
  // Each band's key made once per species and levels (asked once or twice per line and fit).
  const bandKeys = new Map<string, Map<number, string>>();
  const small = (v: number) => (v | 0) === v && v >= 0 && v < 65536;
  const bandGroup = (o: Observation) => {
    if (!small(o.upperV) || !small(o.lowerV)) return `band|${bandKeyOf(o)}`;
    let bySpecies = bandKeys.get(o.species);
    if (!bySpecies) {
      bySpecies = new Map();
      bandKeys.set(o.species, bySpecies);
    }
    const n = o.upperV * 65536 + o.lowerV;
    let k = bySpecies.get(n);
    if (k === undefined) {
      k = `band|${bandKeyOf(o)}`;
      bySpecies.set(n, k);
    }
    return k;
  };
  return (o) => {
    const source = input[o.index]?.source;
    if (source !== undefined) return `source|${source}`;
    if (!hooks) return bandGroup(o);
    const b = hooks.band(o);
    labels.set(b.key, b.label);
    return `band|${b.key}`;
  };
}

/**
 * The earlier estimate applied to these observations when its groups still stand (see ScatterReuse); undefined when
 * they do not and the scatter must be estimated again.
 */
function reusedScatter(
  reuse: ScatterReuse,
  input: readonly SigmaInput[],
  observations: readonly Observation[],
  fallback: number,
  hooks: WeighHooks | undefined,
): ScatterEstimate | undefined {
  const { from, growth } = reuse;
  if (from.fallback !== fallback || from.estimatedAt.size === 0) return undefined;
  const labels = new Map<string, string>();
  const groupOf = scatterGroupOf(input, hooks, labels);
  const counts = new Map<string, number>();
  const groupOfLine = new Map<Observation, string>();
  for (const o of observations) {
    if (input[o.index]?.uncertainty !== undefined) continue;
    const k = groupOf(o);
    groupOfLine.set(o, k);
    counts.set(k, (counts.get(k) ?? 0) + 1);
  }
  if (counts.size !== from.estimatedAt.size) return undefined;
  for (const [k, n] of counts) {
    const n0 = from.estimatedAt.get(k);
    if (n0 === undefined || Math.abs(n - n0) > growth * n0) return undefined;
    if (n >= MIN_SCATTER_GROUP !== n0 >= MIN_SCATTER_GROUP) return undefined;
  }
  const sigmaOf = (k: string) => from.sigmas.get(k) ?? from.pooled;
  // Member by member, not by spreading `from`: its reweighted observations are not needed here (see scatterOfFit).
  return {
    observations: reweighted(observations, (o) => {
      const k = groupOfLine.get(o);
      return k === undefined ? undefined : 1 / sigmaOf(k) ** 2;
    }),
    sigmas: from.sigmas,
    pooled: from.pooled,
    counts,
    labels: new Map([...from.labels, ...labels]),
    fallback: from.fallback,
    estimatedAt: from.estimatedAt,
  };
}

/**
 * The estimating rounds: fit with the provisional weights, measure each group's scatter from the leverage-corrected
 * residuals of its lines without σ, reweigh. Lines far outside their group's scatter stay out of the next estimating
 * fit (not out of the main fit: stage 3 judges them), so that one gross error does not bend the fit whose residuals
 * measure the scatter.
 */
function estimateScatter(
  input: readonly SigmaInput[],
  observations: readonly Observation[],
  fallback: number,
  fit: ScaleFitSettings,
  hooks?: WeighHooks,
): ScatterEstimate {
  const labels = new Map<string, string>();
  const groupOf = scatterGroupOf(input, hooks, labels);
  const withoutSigma = (o: Observation) => input[o.index]?.uncertainty === undefined;
  let obs = reweighted(observations, (o) => (withoutSigma(o) ? 1 / fallback ** 2 : undefined));
  let sigmas = new Map<string, number>();
  let pooled = fallback;
  let counts = new Map<string, number>();
  let gross = new Set<number>();
  const refit = (sample: readonly Observation[]) =>
    hooks ? hooks.refit(sample) : selectLevelModel(sample, fit.maxOrder, 'a-posteriori', fit.termSignificance);
  let screened: ReadonlySet<number> = gross;
  for (let round = 0; round < ROUNDS; round++) {
    let level: ReturnType<typeof selectLevelModel>;
    try {
      const sample = gross.size > 0 ? obs.filter((o) => !gross.has(o.index)) : obs;
      level = refit(sample);
      if (round === 0 && fit.screenGross !== false) {
        // Gross errors out of every estimating fit, this first one included (see gross-errors.ts).
        const screen = screenGrossErrors(
          level,
          refit,
          (o) => (withoutSigma(o) ? groupOf(o) : STATED),
          MIN_SCATTER_GROUP,
        );
        level = screen.level;
        screened = screen.gross;
      }
    } catch {
      // Too few lines or an indeterminate model: the main fit will say so; keep the provisional weights.
      break;
    }
    const f = level.fit;
    const measured = measureScatter(f, withoutSigma, groupOf);
    if (!measured) break;
    pooled = measured.pooled;
    sigmas = measured.sigmas;
    if (round === 0) counts = withScreened(measured.counts, screened, observations, withoutSigma, groupOf);
    const sigmaOf = (o: Observation) => sigmas.get(groupOf(o)) ?? pooled;
    gross = new Set(screened);
    f.observations.forEach((o, i) => {
      if (!withoutSigma(o)) return;
      if (Math.abs(f.residuals[i] as number) > GROSS * sigmaOf(o)) gross.add(o.index);
    });
    obs = reweighted(observations, (o) => (withoutSigma(o) ? 1 / sigmaOf(o) ** 2 : undefined));
  }
  return { observations: obs, sigmas, pooled, counts, labels, fallback, estimatedAt: counts };
}

/** The first round's counts per group with the lines screened out of its fit as gross errors counted back in. */
function withScreened(
  counts: Map<string, number>,
  screened: ReadonlySet<number>,
  observations: readonly Observation[],
  withoutSigma: (o: Observation) => boolean,
  groupOf: (o: Observation) => string,
): Map<string, number> {
  if (screened.size === 0) return counts;
  const out = new Map(counts);
  for (const o of observations) {
    if (!screened.has(o.index) || !withoutSigma(o)) continue;
    const k = groupOf(o);
    out.set(k, (out.get(k) ?? 0) + 1);
  }
  return out;
}

/**
 * One estimating round's measure on a fit: per group (of MIN_SCATTER_GROUP lines or more) and pooled, the scatter of
 * the leverage-corrected residuals eᵢ/√(1 − hᵢᵢ) of its lines without σ, and how many such lines each group has.
 * Undefined when the fit leaves under two degrees of freedom, has no leverages, or has fewer than three such lines.
 */
function measureScatter(
  f: SolvedModel,
  withoutSigma: (o: Observation) => boolean,
  groupOf: (o: Observation) => string,
): { pooled: number; sigmas: Map<string, number>; counts: Map<string, number> } | undefined {
  if (f.degreesOfFreedom < 2 || f.leverages.length !== f.observations.length) return undefined;
  const byGroup = new Map<string, number[]>();
  const all: number[] = [];
  f.observations.forEach((o, i) => {
    if (!withoutSigma(o)) return;
    const h = Math.min(f.leverages[i] as number, 1 - 1e-9);
    const e = (f.residuals[i] as number) / Math.sqrt(1 - h);
    all.push(e);
    const k = groupOf(o);
    const list = byGroup.get(k) ?? [];
    list.push(e);
    byGroup.set(k, list);
  });
  if (all.length < 3) return undefined;
  const sigmas = new Map<string, number>();
  for (const [k, e] of byGroup) if (e.length >= MIN_SCATTER_GROUP) sigmas.set(k, scatterOf(e));
  return { pooled: scatterOf(all), sigmas, counts: new Map([...byGroup].map(([k, v]) => [k, v.length])) };
}

/**
 * The scatter a finished fit leaves on its lines without σ (measured as one estimating round measures it, on the
 * fit's kept lines), as an estimate for a later fit of the grown list to reuse (`ScatterReuse`): the inner fits of
 * the automatic assignment, whose list grows a few lines a round, take their weights from the last round's
 * residuals instead of estimating afresh with two extra level fits each. Its counts are those of all `observations`
 * without σ (rejected lines too), as the next fit's reuse test counts them. Undefined when the fit cannot measure it.
 */
export function scatterOfFit(
  input: readonly SigmaInput[],
  observations: readonly Observation[],
  fit: SolvedModel,
): ScatterEstimate | undefined {
  const withoutSigma = (o: Observation) => input[o.index]?.uncertainty === undefined;
  const labels = new Map<string, string>();
  const groupOf = scatterGroupOf(input, undefined, labels);
  const measured = measureScatter(fit, withoutSigma, groupOf);
  if (!measured) return undefined;
  const { sigmas, pooled } = measured;
  const given = input.filter((l) => l.uncertainty !== undefined).map((l) => l.uncertainty as number);
  const counts = new Map<string, number>();
  for (const o of observations) {
    if (!withoutSigma(o)) continue;
    const k = groupOf(o);
    counts.set(k, (counts.get(k) ?? 0) + 1);
  }
  // The reweighted observations only when asked for: a later fit that reuses the estimate weighs its own lines.
  let reweighedLines: Observation[] | undefined;
  return {
    get observations() {
      reweighedLines ??= reweighted(observations, (o) =>
        withoutSigma(o) ? 1 / (sigmas.get(groupOf(o)) ?? pooled) ** 2 : undefined,
      );
      return reweighedLines;
    },
    sigmas,
    pooled,
    counts,
    labels,
    fallback: given.length > 0 ? median(given) : 1,
    estimatedAt: counts,
  };
}

/** The groups as reported: each with its own σ, and one pooled group for the lines of groups too small for one. */
function scatterGroups(est: ScatterEstimate): ScatterGroup[] {
  const groups: ScatterGroup[] = [];
  let pooledLines = 0;
  for (const [k, n] of est.counts) {
    const s = est.sigmas.get(k);
    if (s === undefined) {
      pooledLines += n;
      continue;
    }
    const [kind, rest] = k.split(/\|(.*)/s) as [string, string];
    const label = kind === 'source' ? rest : (est.labels.get(rest) ?? bandLabel(rest));
    groups.push({ group: label, by: kind === 'source' ? 'source' : 'band', lines: n, sigma: s });
  }
  if (pooledLines > 0)
    groups.push({ group: 'all lines without an uncertainty', by: 'pooled', lines: pooledLines, sigma: est.pooled });
  return groups;
}

function bandLabel(key: string): string {
  const [species, band] = key.split('|') as [string, string];
  const [u, l] = band.split('-').map(Number) as [number, number];
  return `${species} ${formatBand({ upper: u, lower: l })}`;
}

/** Residuals beyond this many σ stay out of the next estimating fit. */
const GROSS = 5;
/** Clipping of the refined estimate, in units of the MAD estimate. */
const CLIP = 3;
/** E[z² | |z| < 3] for a standard normal z: 1 − 6φ(3)/(2Φ(3) − 1) = 0.97334. */
const CLIPPED_VARIANCE = 0.97334;

/**
 * Scatter of leverage-corrected residuals: the normal-consistent MAD (robust, but only 37 % efficient: ±18 % for
 * 40 lines), then the rms of the residuals within 3 MAD-σ, corrected for the clipping — a one-step refinement
 * that keeps the robustness and recovers most of the efficiency of a standard deviation (common practice, e.g.
 * the clipped estimators of Huber, Robust Statistics, 1981, ch. 5). When more than half the residuals vanish
 * (rounded or computed positions) the MAD is 0 and the plain rms is used.
 */
export function scatterOf(e: readonly number[]): number {
  const mad = robustSigma(e);
  const rms = (xs: readonly number[]) => Math.sqrt(xs.reduce((a, x) => a + x * x, 0) / Math.max(xs.length, 1));
  if (!(mad > 0 && Number.isFinite(mad))) {
    const r = rms(e);
    return r > 0 ? r : 1e-9;
  }
  const inside = e.filter((x) => Math.abs(x) <= CLIP * mad);
  if (inside.length < 3) return mad;
  return rms(inside) / Math.sqrt(CLIPPED_VARIANCE);
}

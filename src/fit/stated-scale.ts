import { type Observation, reweighted } from '../models/linear-model.js';
import { formatBand } from '../models/transitions.js';
import { fDistributionSurvival } from '../stats/distributions.js';
import { robustSigma } from '../stats/robust.js';
import { type ScaleFitSettings, screenGrossErrors } from './gross-errors.js';
import { type LevelSelection, selectLevelModel } from './level-selection.js';
import type { LineInput, Warning } from './types.js';
import { MIN_SCATTER_GROUP } from './weights.js';

/** A group of lines with stated uncertainties whose scatter disagrees with the rest, and the factor applied. */
export interface StatedScaleGroup {
  /** The source label, or "species band, σ = …" (lines of one band stating one σ: one measurement, as a rule). */
  readonly group: string;
  readonly lines: number;
  /** Robust scale of residual/σ in the group (1 = the stated σ describe the scatter). */
  readonly factor: number;
}

export interface StatedScale {
  readonly observations: readonly Observation[];
  readonly groups: readonly StatedScaleGroup[];
  /** The factor by which the stated σ of a line of this group was multiplied (1 when none was). */
  factorFor(species: string, band: string, sigma: number, source?: string): number;
  readonly warnings: readonly Warning[];
}

/**
 * Two-sided p below which a group's scale counts as different from the rest: a variance ratio this far out happens
 * by chance once in a thousand groups, so lines whose stated σ do describe their scatter keep them.
 */
const DIFFERENT = 1e-3;
const ROUNDS = 2;
/** Residuals beyond this many of the group's scale stay out of the next estimating fit. */
const GROSS = 5;
/** Key of the pooled scale of the lines in no differing group. */
const REST = 'rest';
/** Group of the lines without a stated σ when gross errors are screened (their σ were estimated per group before). */
const WITHOUT_SIGMA = 'without σ';

/** The key of a band and stated σ, within a source when the line names one. */
const bandKey = (species: string, band: string, sigma: number, source: string | undefined): string =>
  `band|${species}|${band}|${sigma.toPrecision(3)}${source !== undefined ? `|${source}` : ''}`;
const sourceKey = (source: string): string => `source|${source}`;
/** The key of a band's lines that state σ line by line (no σ shared by MIN_SCATTER_GROUP of them), without a source. */
const perLineKey = (species: string, band: string): string => `lines|${species}|${band}`;

/**
 * Stage 1c (a-posteriori mode only), stated uncertainties that disagree between groups. With one scale s² for the
 * whole list, a list that mixes lines whose σ overstate their scatter a hundredfold with lines whose σ are right
 * (a database list: computed positions stated to 1e-4 beside measured ones stated to 1e-5) makes the second kind
 * look like 5–9σ outliers, and weighs them wrongly. Each group of ≥ MIN_SCATTER_GROUP lines — the lines of one
 * band stating one σ (within one source when they name it), and the other lines of a source together — whose scale of leverage-corrected residual/σ (`differingGroups`)
 * differs from that of the other lines with p < 0.001 (F test of the variance ratio) gets its σ multiplied by it; the
 * remaining lines are multiplied by their pooled scale, so that s² ≈ 1 and every line is judged against its own
 * group's scatter (variance components per group; Helmert's estimation, common practice in geodesy). Two rounds,
 * gross errors (> 5 of the group's scale) left out of the estimating fits. Lists where every group agrees are
 * left exactly as they were. Lines without a stated σ (already estimated per group) are not touched.
 */
export function rescaleStatedUncertainties(
  input: readonly LineInput[],
  observations: readonly Observation[],
  fit: ScaleFitSettings,
  /** The level fit of `observations` as weighted (the first round reuses it: lists whose groups agree cost nothing). */
  first: LevelSelection,
): StatedScale {
  const none: StatedScale = { observations, groups: [], factorFor: () => 1, warnings: [] };
  if (oneStatedGroup(observations, input)) return none;
  const keyOf = statedGroupKeys(observations, input, fit.perLineGroups ?? true);
  if (!canDiffer(observations, keyOf)) return none;
  const scaled = groupScales(input, observations, fit, first, keyOf);
  if (scaled.factors.size === 0) return none;
  return statedScaleOf(observations, scaled, keyOf);
}

/** The scale of each differing group (and REST) after the last round that found one, and the lines reweighted by them. */
interface GroupScales {
  readonly factors: ReadonlyMap<string, number>;
  readonly observations: readonly Observation[];
}

/**
 * Up to ROUNDS rounds: residual/σ of the stated lines per group from a level fit (the first round's is `first`,
 * later ones refit the reweighted lines without the gross errors), the groups that differ, and the stated σ
 * multiplied by their scale. Stops at the first round where no group differs or the fit fails; no factors when
 * none ever did.
 */
function groupScales(
  input: readonly LineInput[],
  observations: readonly Observation[],
  fit: ScaleFitSettings,
  first: LevelSelection,
  keyOf: (o: Observation) => string | undefined,
): GroupScales {
  const stated = (o: Observation) => input[o.index]?.uncertainty !== undefined;
  const refit = (sample: readonly Observation[]) =>
    selectLevelModel(sample, fit.maxOrder, 'a-posteriori', fit.termSignificance);
  // Gross errors out of every estimating fit, the first included (see gross-errors.ts).
  const screen =
    fit.screenGross === false
      ? { gross: new Set<number>(), level: first }
      : screenGrossErrors(first, refit, (o) => keyOf(o) ?? WITHOUT_SIGMA, MIN_SCATTER_GROUP);
  let factors = new Map<string, number>();
  let gross = new Set<number>(screen.gross);
  let obs = observations;
  for (let round = 0; round < ROUNDS; round++) {
    let level = screen.level;
    if (round > 0)
      try {
        const sample = gross.size > 0 ? obs.filter((o) => !gross.has(o.index)) : obs;
        level = refit(sample);
      } catch {
        break;
      }
    const f = level.fit;
    if (f.degreesOfFreedom < 2 || f.leverages.length !== f.observations.length) break;
    const byGroup = statedResiduals(f, input, keyOf);
    const next = differingGroups(byGroup);
    if (next.size === 0) break;
    factors = next;
    gross = grossLines(f.observations, byGroup, keyOf);
    for (const i of screen.gross) gross.add(i);
    const factorOf = (o: Observation) => factors.get(keyOf(o) as string) ?? (factors.get(REST) as number);
    obs = reweighted(observations, (o) => (stated(o) ? o.weight / factorOf(o) ** 2 : undefined));
  }
  return { factors, observations: obs };
}

/**
 * Leverage-corrected residual over the stated σ, e/σ/√(1 − h), of each stated line of the fit, by group, in the
 * order of the fit's observations.
 */
function statedResiduals(
  f: LevelSelection['fit'],
  input: readonly LineInput[],
  keyOf: (o: Observation) => string | undefined,
): Map<string, number[]> {
  const byGroup = new Map<string, number[]>();
  f.observations.forEach((o, i) => {
    if (input[o.index]?.uncertainty === undefined) return;
    const h = Math.min(f.leverages[i] as number, 1 - 1e-9);
    // Scaled by the stated σ only (the factor of this round is what is being estimated).
    const z = (f.residuals[i] as number) / (input[o.index]?.uncertainty as number) / Math.sqrt(1 - h);
    const k = keyOf(o) as string;
    const list = byGroup.get(k) ?? [];
    list.push(z);
    byGroup.set(k, list);
  });
  return byGroup;
}

/** The rescaled lines, the groups with their line counts and factors, the factor lookup and the warning naming them. */
function statedScaleOf(observations: readonly Observation[], scaled: GroupScales, keyOf: StatedGroupKeys): StatedScale {
  const { factors } = scaled;
  const groups: StatedScaleGroup[] = [];
  for (const [k, factor] of factors) {
    if (k === REST) continue;
    const lines = observations.filter((o) => keyOf(o) === k).length;
    groups.push({ group: labelOf(k), lines, factor });
  }
  return {
    observations: scaled.observations,
    groups,
    factorFor(species, band, sigma, source) {
      return factors.get(keyOf.keyFor(species, band, sigma, source)) ?? (factors.get(REST) as number);
    },
    warnings: [
      {
        code: 'UNCERTAINTY_RESCALED',
        message: `the stated uncertainties of some groups of lines disagree with their scatter and with the other lines (F test, p < ${DIFFERENT}); the σ of each such group were multiplied by its own scale (rms of residual/σ, gross errors out) and those of the other lines by their pooled scale ${(factors.get(REST) as number).toPrecision(2)}, so that every line is weighed and judged against the scatter of its own group: ${groups.map((g) => `${g.group} × ${g.factor.toPrecision(2)} (${g.lines} lines)`).join(', ')}`,
      },
    ],
  };
}

/**
 * Whether any group of stated lines can be judged against the rest: a group of ≥ MIN_SCATTER_GROUP lines with
 * ≥ MIN_SCATTER_GROUP other stated lines beside it (`differingGroups` asks the same of the clipped groups, which only
 * lose lines). A list of one band stating one σ, the common case, has no other group: no fit of residuals is needed
 * to know that nothing will be rescaled.
 */
function canDiffer(observations: readonly Observation[], keyOf: (o: Observation) => string | undefined): boolean {
  const counts = new Map<string, number>();
  let total = 0;
  for (const o of observations) {
    const k = keyOf(o);
    if (k === undefined) continue;
    counts.set(k, (counts.get(k) ?? 0) + 1);
    total++;
  }
  for (const n of counts.values()) if (n >= MIN_SCATTER_GROUP && total - n >= MIN_SCATTER_GROUP) return true;
  return false;
}

/** The group key of each stated line (by its input index), built once; undefined for a line without σ. */
function statedGroupKeys(
  observations: readonly Observation[],
  input: readonly LineInput[],
  perLineGroups: boolean,
): StatedGroupKeys {
  const fine: (string | undefined)[] = [];
  const groups = new Map<string, { lines: number; source: string | undefined }>();
  for (const o of observations) {
    const line = input[o.index];
    if (line?.uncertainty === undefined) continue;
    const k = bandKey(o.species, `${o.upperV}-${o.lowerV}`, line.uncertainty, line.source);
    fine[o.index] = k;
    const g = groups.get(k);
    if (g) g.lines++;
    else groups.set(k, { lines: 1, source: line.source });
  }
  // A source's band and σ too few to judge alone join the source's other such lines (a source stating a σ per
  // line is judged as one group), and so does a source's only band and σ (the group is the source's lines). Without
  // a source, a band's σ too few to judge alone join the band's other such lines (a peak list states a σ per line:
  // each band is then judged as one group, so that a band whose σ are right keeps them beside a band whose σ are
  // overstated, instead of taking the pooled scale of both).
  const perSource = new Map<string, number>();
  for (const { source } of groups.values())
    if (source !== undefined) perSource.set(source, (perSource.get(source) ?? 0) + 1);
  const own = new Set<string>();
  for (const [k, g] of groups)
    if (g.lines >= MIN_SCATTER_GROUP && (g.source === undefined || (perSource.get(g.source) as number) > 1)) own.add(k);
  const keyOfBand = (k: string, species: string, band: string, source: string | undefined) =>
    own.has(k) ? k : source !== undefined ? sourceKey(source) : perLineGroups ? perLineKey(species, band) : k;
  const keys: (string | undefined)[] = [];
  for (const o of observations) {
    const k = fine[o.index];
    if (k !== undefined) keys[o.index] = keyOfBand(k, o.species, `${o.upperV}-${o.lowerV}`, input[o.index]?.source);
  }
  const keyOf = (o: Observation) => keys[o.index];
  return Object.assign(keyOf, {
    keyFor: (species: string, band: string, sigma: number, source: string | undefined) =>
      keyOfBand(bandKey(species, band, sigma, source), species, band, source),
  });
}

/**
 * The group key of each stated line (by its input index), built once; undefined for a line without σ. `keyFor` gives
 * the key of a band, σ and source (the lines' own keys, for the factor of a line looked up by them).
 */
type StatedGroupKeys = ((o: Observation) => string | undefined) & {
  readonly keyFor: (species: string, band: string, sigma: number, source: string | undefined) => string;
};

/** Every stated line of one species and band, without a source, stating the same σ: one group (no key built). */
function oneStatedGroup(observations: readonly Observation[], input: readonly LineInput[]): boolean {
  let first: Observation | undefined;
  let sigma = 0;
  for (const o of observations) {
    const line = input[o.index];
    if (line?.uncertainty === undefined) continue;
    if (line.source !== undefined) return false;
    if (!first) {
      first = o;
      sigma = line.uncertainty;
    } else if (
      line.uncertainty !== sigma ||
      o.species !== first.species ||
      o.upperV !== first.upperV ||
      o.lowerV !== first.lowerV
    )
      return false;
  }
  return true;
}

/**
 * The groups whose scale differs from the other lines' (p < DIFFERENT, two-sided F test of the variance ratio), each
 * with its scale, and under REST the pooled scale of all other lines; empty when no group stands out. A group's scale is the rms of its
 * residual/σ within GROSS robust-σ (gross errors out, heavy tails of real measurements in: judging a group against
 * its clipped core would make its honest 3–4σ lines outliers).
 */
function differingGroups(byGroup: ReadonlyMap<string, readonly number[]>): Map<string, number> {
  const core = (z: readonly number[]) => {
    const r = robustSigma(z);
    return r > 0 ? z.filter((x) => Math.abs(x) <= GROSS * r) : z;
  };
  const meanSq = (z: readonly number[]) => z.reduce((a, x) => a + x * x, 0) / Math.max(z.length, 1);
  const cores = new Map([...byGroup].map(([k, z]) => [k, core(z)]));
  const out = new Map<string, number>();
  for (const [k, z] of cores) {
    if (z.length < MIN_SCATTER_GROUP) continue;
    const others = [...cores].filter(([g]) => g !== k).flatMap(([, x]) => x);
    if (others.length < MIN_SCATTER_GROUP) continue;
    const ratio = meanSq(z) / meanSq(others);
    const p =
      2 *
      Math.min(
        fDistributionSurvival(ratio, z.length, others.length),
        fDistributionSurvival(1 / ratio, others.length, z.length),
      );
    if (p < DIFFERENT) out.set(k, Math.sqrt(meanSq(z)));
  }
  if (out.size === 0) return out;
  const rest = [...cores].filter(([g]) => !out.has(g)).flatMap(([, x]) => x);
  out.set(REST, rest.length > 0 && meanSq(rest) > 0 ? Math.sqrt(meanSq(rest)) : 1);
  return out;
}

/** Lines beyond GROSS robust-σ of their own group, in the order of the fit's observations (by index). */
function grossLines(
  obs: readonly Observation[],
  byGroup: ReadonlyMap<string, readonly number[]>,
  keyOf: (o: Observation) => string | undefined,
): Set<number> {
  const scale = new Map([...byGroup].map(([k, z]) => [k, robustSigma(z)]));
  const seen = new Map<string, number>();
  const out = new Set<number>();
  for (const o of obs) {
    const k = keyOf(o);
    if (k === undefined) continue;
    const i = seen.get(k) ?? 0;
    seen.set(k, i + 1);
    const z = (byGroup.get(k) as readonly number[])[i] as number;
    const r = scale.get(k) as number;
    if (r > 0 && Math.abs(z) > GROSS * r) out.add(o.index);
  }
  return out;
}

function labelOf(key: string): string {
  // A source's name may hold "|": it is the rest of the key after the fixed fields.
  if (key.startsWith('source|')) return key.slice('source|'.length);
  if (key.startsWith('lines|')) {
    const [, species, band] = key.split('|') as [string, string, string];
    const [u, l] = band.split('-').map(Number) as [number, number];
    return `${species} ${formatBand({ upper: u, lower: l })}, σ per line`;
  }
  const [, species, band, sigma, ...source] = key.split('|') as [string, string, string, string, ...string[]];
  const [u, l] = band.split('-').map(Number) as [number, number];
  const label = `${species} ${formatBand({ upper: u, lower: l })}, σ = ${sigma} cm-1`;
  return source.length === 0 ? label : `${source.join('|')}: ${label}`;
}

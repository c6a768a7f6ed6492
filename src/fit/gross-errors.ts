import type { Observation } from '../models/linear-model.js';
import { robustSigma } from '../stats/robust.js';
import type { SolvedModel } from './engine.js';
import type { LevelSelection } from './level-selection.js';

/**
 * A line counts as a candidate gross error when its leverage-corrected residual is beyond this many robust σ of
 * its group (normal-consistent MAD): a mislabelled line (J off by one, the wrong branch) is hundreds to thousands of
 * σ out, a normal line never this far (two-sided P ≈ 6e-89), and the heavy tails of real lists rarely (real CO database
 * lines: 36 at most in a small group judged by the pooled scale, 13 in a large one).
 */
const CANDIDATE = 20;
/** Most lines taken out one after the other (each a refit); one to three gross errors is what this is for. */
const MAX_STEPS = 6;
/**
 * A gross error bends the fit: every other line's residual grows with it (one J + 1 label in the real CO list made
 * the pooled scale of the other lines 450 times larger; a heavy-tailed but honest line moves it by a few %). The
 * removals are kept only when the other lines' scale falls at least this many times.
 */
const RELIEF = 2;
/** The fewest removals whose scale is within this factor of the least reached are kept (not the heavy tails after). */
const NEAR = 1.5;

/** What the scale estimates (stated-scale.ts, weights.ts) fit with, and whether they screen gross errors first. */
export interface ScaleFitSettings {
  readonly maxOrder: number;
  readonly termSignificance: number;
  /** Screen gross errors out of the estimating fits (default true; false in the assignment's round fits). */
  readonly screenGross?: boolean;
  /**
   * Judge a band's lines that state σ line by line as one group (stated-scale.ts; default true; false in the
   * assignment's round fits, whose bands still hold wrong and missing lines).
   */
  readonly perLineGroups?: boolean;
}

export interface GrossScreen {
  /** Input indices of the lines found to bend the fit (empty when none did). */
  readonly gross: ReadonlySet<number>;
  /** The fit without them (the given one when none was found). */
  readonly level: LevelSelection;
}

/**
 * Gross errors found before any scale is estimated from residuals. The scale estimates of the stated σ per group
 * (stated-scale.ts) and of the lines without σ (weights.ts) start from a fit of all lines; one mislabelled line
 * bends that fit so much that every group's scale comes out tens to hundreds of times too large, the groups' factors
 * and the weights of the next round with them, and the good lines' fate then depends on the error. Here the worst
 * line by its group's robust scale (`standardised`) is taken out and the fit repeated while one stands beyond
 * CANDIDATE robust σ (a backward search, as in Hadi & Simonoff, J. Am. Stat. Assoc. 88, 1264 (1993), from memory,
 * with the median absolute deviation as the scale so that the errors do not mask each other); the removals are
 * kept up to the fewest whose pooled robust scale of the other lines is within NEAR of the least reached, only when
 * that scale fell at least RELIEF-fold, and of several only those that bend the fit on their own (`bending`). A
 * list without gross errors keeps `first` as it is: its heavy-tailed lines move the others' scale by a few %, and
 * are left to the rounds and to the rejection stage as before. The lines found stay in the main fit: stage 3
 * judges them.
 */
export function screenGrossErrors(
  first: LevelSelection,
  refit: (obs: readonly Observation[]) => LevelSelection,
  /** The group whose robust scale a line is judged by (lines of one σ and band, or source). */
  groupOf: (o: Observation) => string,
  /** Groups smaller than this are judged by the pooled scale (MIN_SCATTER_GROUP of weights.ts). */
  minGroup: number,
): GrossScreen {
  const none: GrossScreen = { gross: new Set(), level: first };
  const steps: { level: LevelSelection; scale: number; removed: number | undefined }[] = [];
  let level = first;
  let out: number | undefined;
  for (let step = 0; step <= MAX_STEPS; step++) {
    const judged = standardised(level.fit, groupOf, minGroup);
    if (!judged) break;
    steps.push({ level, scale: judged.scale, removed: out });
    if (judged.worst.ratio <= CANDIDATE || step === MAX_STEPS) break;
    const worst = judged.worst.index;
    out = worst;
    try {
      level = refit(level.fit.observations.filter((o) => o.index !== worst));
    } catch {
      break;
    }
  }
  if (steps.length < 2) return none;
  const least = Math.min(...steps.map((s) => s.scale));
  const kept = steps.findIndex((s) => s.scale <= NEAR * least);
  if (kept <= 0 || (steps[0]?.scale as number) < RELIEF * (steps[kept]?.scale as number)) return none;
  const removed = steps.slice(1, kept + 1).map((s) => s.removed as number);
  const cleaned = steps[kept] as (typeof steps)[number];
  if (removed.length === 1) return { gross: new Set(removed), level: cleaned.level };
  return bending(first, cleaned, removed, refit, groupOf, minGroup) ?? none;
}

/**
 * Of several lines taken out, those that bend the fit each on its own: put back alone into the fit without all of
 * them, a gross error raises the other lines' scale RELIEF-fold, a heavy-tailed line that the search took on its
 * way (it can stand further out than a gross error in a group the error has blown up) by a few %. The fit without
 * the lines that do; undefined when none does.
 */
function bending(
  first: LevelSelection,
  cleaned: { readonly level: LevelSelection; readonly scale: number },
  removed: readonly number[],
  refit: (obs: readonly Observation[]) => LevelSelection,
  groupOf: (o: Observation) => string,
  minGroup: number,
): GrossScreen | undefined {
  const all = first.fit.observations;
  const base = cleaned.level.fit.observations;
  const gross = new Set<number>();
  for (const i of removed) {
    const line = all.find((o) => o.index === i) as Observation;
    let scale: number | undefined;
    try {
      scale = standardised(refit([...base, line]).fit, groupOf, minGroup)?.scale;
    } catch {
      scale = undefined;
    }
    if (scale === undefined || scale >= RELIEF * cleaned.scale) gross.add(i);
  }
  if (gross.size === removed.length) return { gross, level: cleaned.level };
  if (gross.size === 0) return undefined;
  try {
    return { gross, level: refit(all.filter((o) => !gross.has(o.index))) };
  } catch {
    return undefined;
  }
}

/**
 * The fit's leverage-corrected residuals in units of the weights' σ, e√w/√(1 − h), judged against the robust σ
 * of their group (groups of fewer than `minGroup` lines, or of zero scale, against the pooled one): the
 * line furthest out and the pooled robust scale. Undefined when the fit has no leverages, fewer than 3 degrees of
 * freedom, or a zero pooled scale (positions that the model reproduces to the last digit).
 */
function standardised(
  f: SolvedModel,
  groupOf: (o: Observation) => string,
  minGroup: number,
): { worst: { index: number; ratio: number }; scale: number } | undefined {
  const n = f.observations.length;
  if (f.degreesOfFreedom < 3 || f.leverages.length !== n) return undefined;
  const z = new Float64Array(n);
  const byGroup = new Map<string, number[]>();
  const keys: string[] = [];
  for (let i = 0; i < n; i++) {
    const o = f.observations[i] as Observation;
    const h = Math.min(f.leverages[i] as number, 1 - 1e-9);
    z[i] = ((f.residuals[i] as number) * Math.sqrt(o.weight)) / Math.sqrt(1 - h);
    const k = groupOf(o);
    keys.push(k);
    const list = byGroup.get(k);
    if (list) list.push(z[i] as number);
    else byGroup.set(k, [z[i] as number]);
  }
  const pooled = robustSigma(z);
  if (!(pooled > 0 && Number.isFinite(pooled))) return undefined;
  const scales = new Map<string, number>();
  for (const [k, list] of byGroup) {
    const s = list.length >= minGroup ? robustSigma(list) : 0;
    scales.set(k, s > 0 && Number.isFinite(s) ? s : pooled);
  }
  let worst = { index: -1, ratio: 0 };
  for (let i = 0; i < n; i++) {
    const ratio = Math.abs(z[i] as number) / (scales.get(keys[i] as string) as number);
    if (ratio > worst.ratio) worst = { index: (f.observations[i] as Observation).index, ratio };
  }
  return { worst, scale: pooled };
}

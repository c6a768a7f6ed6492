import { floatsFrom } from '../linalg/small-arrays.js';
import { aboveBaseline, firstNoiseEstimate, lowerQuantile, toAbsorbance } from './peak-baseline.js';
import { type CandidateGroup, findCandidates, groupCandidates } from './peak-candidates.js';
import { type FittedProfile, fitProfiles, type LineShape, type ProfileFit } from './pseudo-voigt-fit.js';

/**
 * Peak finding in an absorption spectrum, in stages:
 * 1. absorbance with increasing x (peak-baseline.ts), above a piecewise-linear baseline through low percentiles
 *    of long segments;
 * 2. a first noise estimate from the median absolute deviation of first differences;
 * 3. candidates: local maxima above the threshold, grouped where they overlap (peak-candidates.ts);
 * 4. per group, a Levenberg–Marquardt fit of pseudo-Voigt profiles with a local linear baseline
 *    (pseudo-voigt-fit.ts); weak or duplicate members dropped, one blended line added where the residual shows it;
 * 5. the final noise from the pooled fit residuals; each position's uncertainty is the fit's covariance scaled by
 *    its group's rms residual where that is larger (the profile model misses there), never below the pooled noise,
 *    with a floor of 2 % of the sampling step in quadrature (see POSITION_FLOOR_FRACTION_OF_STEP);
 *    profiles of untypical width or at the ends of the spectrum dropped.
 */

export type { LineShape } from './pseudo-voigt-fit.js';

export interface PeakOptions {
  readonly yUnit?: 'absorbance' | 'transmittance';
  /** Detection threshold in noise standard deviations. Default 6. */
  readonly threshold?: number;
  /** Default 'voigt' (pseudo-Voigt with a free Lorentzian share). */
  readonly shape?: LineShape;
  /** Most peaks returned (the strongest). Default 20 000. */
  readonly maxPeaks?: number;
}

export interface Peak {
  /** cm⁻¹ (the x unit of the input). */
  readonly position: number;
  readonly uncertainty: number;
  /** Integrated absorbance (area), a linear intensity scale. */
  readonly intensity: number;
  /** Peak absorbance above the baseline. */
  readonly height: number;
  /** Full width at half maximum. */
  readonly width: number;
  /** Lorentzian share of the pseudo-Voigt (0 Gaussian, 1 Lorentzian). */
  readonly lorentzianFraction: number;
}

export interface PeakResult {
  readonly peaks: Peak[];
  /** Noise standard deviation of the absorbance. */
  readonly noise: number;
  readonly points: number;
  /** Sampling step (median). */
  readonly step: number;
}

export function findPeaks(xIn: ArrayLike<number>, yIn: ArrayLike<number>, options: PeakOptions = {}): PeakResult {
  const search = preparePeakSearch(xIn, yIn, options);
  return finishPeaks(search, fitGroups(packGroups(search, 0, search.groups.length)), options);
}

/** Stages 1–3: the spectrum above its baseline, the first noise figure and the candidate groups to fit. */
export interface PeakSearch extends GroupContext {
  readonly groups: readonly CandidateGroup[];
}

export function preparePeakSearch(
  xIn: ArrayLike<number>,
  yIn: ArrayLike<number>,
  options: PeakOptions = {},
): PeakSearch {
  const spectrum = toAbsorbance(xIn, yIn, options.yUnit);
  const { x, step } = spectrum;
  const r = aboveBaseline(spectrum);
  const noise0 = firstNoiseEstimate(r);
  const threshold = (options.threshold ?? 6) * noise0;
  const groups = groupCandidates(findCandidates(r, threshold, CANDIDATE_PROMINENCE * noise0), x.length);
  return { x, r, step, shape: options.shape ?? 'voigt', threshold, noise0, groups };
}

/**
 * Groups [from, to) of a search with only the samples their fits read: each group's window, laid end to end, and
 * the groups' indices moved to match. A fit reads nothing outside its window, so a packed group fits exactly as it
 * does in place; a packed chunk is small (~1 % of a 10⁶-point spectrum) and can go to another thread.
 */
export interface PackedGroups extends GroupContext {
  readonly groups: readonly CandidateGroup[];
}

export function packGroups(search: PeakSearch, from: number, to: number): PackedGroups {
  const chosen = search.groups.slice(from, to);
  const length = chosen.reduce((sum, g) => sum + g.hi - g.lo + 1, 0);
  const x = new Float64Array(length);
  const r = new Float64Array(length);
  let at = 0;
  const groups = chosen.map((g) => {
    x.set(search.x.subarray(g.lo, g.hi + 1), at);
    r.set(search.r.subarray(g.lo, g.hi + 1), at);
    const shift = at - g.lo;
    at += g.hi - g.lo + 1;
    return { ...g, members: g.members.map((m) => m + shift), lo: g.lo + shift, hi: g.hi + shift };
  });
  const { step, shape, threshold, noise0 } = search;
  return { x, r, step, shape, threshold, noise0, groups };
}

/** What a group fit leaves for the last stage (plain data: it crosses threads). */
export interface GroupFit {
  readonly profiles: FittedProfile[];
  readonly rss: number;
  readonly dof: number;
}

/** Stage 4 for a packed chunk of groups: each group fitted, weak or duplicate members dropped, blends added. */
export function fitGroups(packed: PackedGroups): GroupFit[] {
  return packed.groups.map((g) => {
    const f = fitGroup(packed, g);
    return { profiles: f.profiles, rss: f.rss, dof: f.dof };
  });
}

/** Stage 5: the pooled noise, the lines kept and their uncertainties, from every group's fit (in group order). */
export function finishPeaks(search: PeakSearch, fits: readonly GroupFit[], options: PeakOptions = {}): PeakResult {
  const { x, step, threshold } = search;
  const pooled = pooledNoise(fits, search.noise0);
  const groupNoise = new Map<FittedProfile, number>();
  for (const f of fits) {
    const own = groupResidualScale(f, pooled);
    for (const p of f.profiles) groupNoise.set(p, own);
  }
  const fitted = fits.flatMap((f) => f.profiles.filter((p) => p.valid && p.height >= threshold));
  const peaks = typicalLines(fitted, x).map((p) => toPeak(p, groupNoise.get(p) ?? pooled, step));
  peaks.sort((p, q) => p.position - q.position);
  return { peaks: strongest(peaks, options.maxPeaks ?? 20_000), noise: pooled, points: x.length, step };
}

/**
 * How far, in first-estimate noise σ, a candidate must rise above the dip between it and a higher neighbour: noise
 * on a strong line's wings makes local maxima above the threshold that stand 1–3 σ above their dips (common
 * practice: a prominence of a few noise σ, as peak pickers use). A true line that close to another without a
 * deeper dip is left to the blend stage, which looks for it in the fit residuals.
 */
export const CANDIDATE_PROMINENCE = 4;

/** What every group fit needs besides its own candidates. */
export interface GroupContext {
  readonly x: Float64Array;
  readonly r: Float64Array;
  readonly step: number;
  readonly shape: LineShape;
  /** Detection threshold in absorbance. */
  readonly threshold: number;
  readonly noise0: number;
}

/** Fits a group, dropping weak or duplicate members, then tries one blended line where the residual shows it. */
function fitGroup(ctx: GroupContext, g: CandidateGroup): ProfileFit {
  const kept = fitDroppingWeak(ctx, g);
  return addBlend(ctx, g, kept.members, kept.widths, kept.fit);
}

/** Index of a member to drop: one whose profile left the window or went negative, else the weakest duplicate. */
function memberToDrop(profiles: readonly FittedProfile[], threshold: number): number {
  const invalid = profiles.findIndex((p) => !p.valid);
  if (invalid >= 0) return invalid;
  return profiles.findIndex(
    (p, k) =>
      p.height < threshold ||
      profiles.some(
        (q, k2) =>
          k2 !== k && Math.abs(q.position - p.position) < 0.25 * Math.min(p.width, q.width) && q.height >= p.height,
      ),
  );
}

/** While a profile comes out weaker than the threshold or on top of another, drop it and fit again. */
function fitDroppingWeak(ctx: GroupContext, g: CandidateGroup) {
  let members = g.members;
  let widths = g.halfWidths;
  let fit = fitProfiles(ctx.x, ctx.r, g, members, widths, ctx.step, ctx.shape);
  for (;;) {
    const weak = memberToDrop(fit.profiles, ctx.threshold);
    if (weak < 0 || members.length === 1) break;
    members = members.filter((_, k) => k !== weak);
    widths = widths.filter((_, k) => k !== weak);
    fit = fitProfiles(ctx.x, ctx.r, g, members, widths, ctx.step, ctx.shape);
  }
  return { members, widths, fit };
}

/**
 * Blends: where the residual keeps a peak above the threshold, add a profile there, and keep it when the fit
 * improves by more than 25 noise variances per half width and by 30 %, and the new profile is at least a tenth of
 * the tallest (a pseudo-Voigt's small misfit to a true line shape must not grow phantom lines). One addition per
 * group: a second one mostly fits line-shape misfit.
 */
function addBlend(
  ctx: GroupContext,
  g: CandidateGroup,
  members: readonly number[],
  widths: readonly number[],
  fit: ProfileFit,
): ProfileFit {
  if (!fit.profiles.every((p) => p.valid)) return fit;
  // The pseudo-Voigt misses a true Voigt by about 1 % of its height (Thompson, Cox & Hastings): a residual below
  // 5 % of the tallest profile is line-shape misfit, not a line.
  let bestRes = Math.max(ctx.threshold, 0.05 * Math.max(...fit.profiles.map((p) => p.height)));
  let best = -1;
  for (let i = g.lo; i <= g.hi; i++) {
    const res = (ctx.r[i] as number) - fit.model(ctx.x[i] as number);
    if (res > bestRes) {
      bestRes = res;
      best = i;
    }
  }
  if (best < 0) return fit;
  const trialMembers = [...members, best].sort((a, b) => a - b);
  const trialWidths = trialMembers.map((m) => widths[members.indexOf(m)] ?? Math.max(...widths));
  const trial = fitProfiles(ctx.x, ctx.r, g, trialMembers, trialWidths, ctx.step, ctx.shape);
  const tallest = Math.max(...trial.profiles.map((p) => p.height));
  const ok =
    trial.profiles.every((p) => p.valid && p.height >= Math.max(ctx.threshold, 0.1 * tallest)) &&
    fit.rss - trial.rss > Math.max(25 * ctx.noise0 * ctx.noise0 * Math.max(1, g.widest), 0.3 * fit.rss);
  return ok ? trial : fit;
}

/**
 * The residual scale a group's positions are judged by: its own rms residual where that exceeds the pooled noise (the
 * profile model misses the line's shape, a neighbour's wing or the baseline there), never below the pooled noise.
 */
function groupResidualScale(f: GroupFit, pooled: number): number {
  return f.dof > 0 ? Math.max(pooled, Math.sqrt(f.rss / f.dof)) : pooled;
}

/** The final noise from the pooled fit residuals (a-posteriori); the first estimate when no fit has freedom left. */
function pooledNoise(fits: readonly GroupFit[], noise0: number): number {
  let rss = 0;
  let dof = 0;
  for (const f of fits) {
    rss += f.rss;
    dof += f.dof;
  }
  return dof > 0 ? Math.sqrt(rss / dof) : noise0;
}

/**
 * Profiles far wider or narrower than the median line (with five or more) are baseline structure or noise, not
 * lines; so are profiles on the ends of the spectrum, where the baseline is least known.
 */
function typicalLines(fitted: readonly FittedProfile[], x: Float64Array): FittedProfile[] {
  const widths = floatsFrom(fitted, (p) => p.width);
  const medianWidth = fitted.length > 0 ? lowerQuantile(widths, 0.5, new Float64Array(widths.length)) : 0;
  const x0 = x[0] as number;
  const x1 = x[x.length - 1] as number;
  return fitted.filter(
    (p) =>
      (fitted.length < 5 || (p.width <= 4 * medianWidth && p.width >= 0.25 * medianWidth)) &&
      p.position - x0 > 0.5 * p.width &&
      x1 - p.position > 0.5 * p.width,
  );
}

/**
 * Floor of a peak position's uncertainty, as a fraction of the sampling step, added in quadrature to the σ the
 * profile fit's covariance gives from its group's residual scale (groupResidualScale: the group's own rms residual
 * where the pseudo-Voigt misses the shape, a neighbour's wing or the baseline, never below the pooled noise). The
 * residual scale carries what the profile model cannot tell; the floor only keeps a noise-free spectrum of an
 * exactly representable shape (σ ≈ 1e-18 cm⁻¹, reduced χ² 1e11 in the band fit) and the remaining sampling error of
 * a noise-free Voigt at 5 points per FWHM covered. Measured (test/spectra/position-floor.test.ts, position-pulls
 * .test.ts): noise-free Voigt rms pulls 0.98 / 0.004 / 0.17 at steps 0.02 / 0.05 / 0.5 (1.02 with 1 % of the step);
 * over 200 seeded noisy spectra per case the covariance σ alone covers 70–73 % / 96–97 % at step 0.02, so a larger
 * floor only inflates strong lines' σ (10 % of the step made them ten times their errors, rms pull 0.06–0.1; 2 %
 * gives 0.30–0.42). Engineering choice, stated, not derived.
 */
export const POSITION_FLOOR_FRACTION_OF_STEP = 0.02;

function toPeak(p: FittedProfile, noise: number, step: number): Peak {
  const floor = POSITION_FLOOR_FRACTION_OF_STEP * step;
  return {
    position: p.position,
    uncertainty: Number.isFinite(p.varianceUnit) ? Math.hypot(Math.sqrt(p.varianceUnit) * noise, floor) : step,
    intensity: p.intensity,
    height: p.height,
    width: p.width,
    lorentzianFraction: p.lorentzianFraction,
  };
}

/** The `max` tallest peaks, still in order of position. */
function strongest(peaks: Peak[], max: number): Peak[] {
  if (peaks.length <= max) return peaks;
  return [...peaks]
    .sort((p, q) => q.height - p.height)
    .slice(0, max)
    .sort((p, q) => p.position - q.position);
}

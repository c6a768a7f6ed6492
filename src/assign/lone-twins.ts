import type { CandidateLine } from './candidates.js';
import type { ObservedPeak } from './match.js';

/*
 * Isotopologues whose lines come in close pairs (H⁷⁹Br/H⁸¹Br, H³⁵Cl/H³⁷Cl): the same transition of the two lies a
 * fraction of a cm⁻¹ to a few cm⁻¹ apart, and the reference predicts that splitting far better than either position
 * (its errors, mostly the missing γ_e, β_e, H_e, are common to both through the mass scaling). Where a band's reference
 * drifts from its lines by more than the splitting (HBr 3-1 P(10): 0.9 cm⁻¹ against a splitting of 0.8), one
 * isotopologue's prediction can land on the other's line. `resolveDoublets` judges pairs of which both lines are
 * assigned; this judges a line whose twin transition has no line, by looking for the twin's peak.
 */

/** Largest splitting (cm⁻¹) judged: HCl 1-0 (2.1) and HBr 3-0 (1.1) within it. */
const TWIN_SPLIT_LIMIT = 2.5;

/**
 * How well the reference places the splitting: measured on held-out scans (scripts/heldout-sweep.ts seeds 1, 35, 105,
 * 126, 163, 185, 219, 239; 1 142 HBr pairs with their own Dunham constants, γ_e to L_e): the observed minus reference
 * splitting had median 6e-4, 95th percentile 5.4e-3 and largest 1.4e-2 cm⁻¹ (at J″ ≈ 30 of a 0.65 cm⁻¹ splitting).
 */
const splitSigma = (split: number) => 0.002 + 0.01 * Math.abs(split);

/** A peak's σ when it was sent without one (the scatter of a typical FTIR list, common practice). */
const SIGMA_WHEN_UNSENT = 0.005;

/** Width (σ of ln) of the intensity ratio of the two twins about the abundance ratio (as in resolveDoublets). */
const LN_RATIO_SIGMA = 0.3;

/** Each candidate's twins: the other isotopologues' candidates of the same transition within TWIN_SPLIT_LIMIT. */
export function twinCandidates(cands: readonly CandidateLine[]): Map<CandidateLine, CandidateLine[]> {
  const byTransition = new Map<string, CandidateLine[]>();
  for (const c of cands) {
    const k = `${c.band.upper}-${c.band.lower}|${c.branch}|${c.j}`;
    const list = byTransition.get(k);
    if (list) list.push(c);
    else byTransition.set(k, [c]);
  }
  const twins = new Map<CandidateLine, CandidateLine[]>();
  for (const list of byTransition.values()) {
    if (list.length < 2) continue;
    for (const a of list)
      for (const b of list)
        if (a.species !== b.species && Math.abs(a.position - b.position) <= TWIN_SPLIT_LIMIT) {
          const t = twins.get(a);
          if (t) t.push(b);
          else twins.set(a, [b]);
        }
  }
  return twins;
}

/** What the lone-twin test needs of the assignment's context. */
export interface TwinContext {
  readonly peaks: readonly { readonly position: number; readonly intensity?: number; readonly uncertainty?: number }[];
  /** The free peaks of the source of line i, ascending in position. */
  freeNear(i: number): readonly ObservedPeak[];
  /**
   * Whether the candidate may not be given to the peak: banned this round, sent with an assignment, or given to it by
   * a swap before (a swap the next round's matching undid is not made again: that is the fit's judgement).
   */
  refused(peak: number, c: CandidateLine): boolean;
  /** Notes that a swap gave the candidate to the peak. */
  swapped(peak: number, c: CandidateLine): void;
  /** The last fit's prediction of a candidate, when its levels were fitted. */
  fitted(c: CandidateLine): { readonly value: number; readonly variance: number } | undefined;
}

/**
 * Lines assigned to a transition A whose twin B (another isotopologue, `twinCandidates`) has no line: relabelled B,
 * and the free peak where A then lies labelled A, when such a peak sits at the line's position plus the splitting
 * (within 3σ of the splitting and both positions; with intensities, their ratio within ×2.5 of the abundance-weighted
 * prediction) and no free peak fits the present labelling (B at the position minus the splitting) as well. Each free
 * peak serves one swap; a swap refused by the context (banned, or made before and undone by the next round's
 * matching) is not made, nor is one between twins the last fit already places apart. Returns the number relabelled.
 */
export function resolveLoneTwins(
  ctx: TwinContext,
  twins: ReadonlyMap<CandidateLine, readonly CandidateLine[]>,
  auto: Map<number, CandidateLine>,
): number {
  if (twins.size === 0) return 0;
  const held = new Set(auto.values());
  const swaps: { line: number; a: CandidateLine; b: CandidateLine; partner: number }[] = [];
  const used = new Set<number>();
  for (const [i, a] of auto) {
    for (const b of twins.get(a) ?? []) {
      if (held.has(b)) continue;
      const split = a.position - b.position;
      // Both twins placed by the last fit, each well within the splitting: the fit's residuals judge, not this test
      // (judged here too, a line the fit puts on B's place was swapped back and forth every round).
      if (fitSeparates(ctx, a, b, split)) continue;
      // p is B and the partner A (at p + split), against p being A and a partner B (at p − split).
      const swapped = bestPartner(ctx, auto, i, split, b, a, used);
      if (!swapped || ctx.refused(i, b) || ctx.refused(swapped.index, a)) continue;
      const kept = bestPartner(ctx, auto, i, -split, a, b, used);
      if (kept && kept.cost <= swapped.cost) continue;
      swaps.push({ line: i, a, b, partner: swapped.index });
      used.add(swapped.index);
      break;
    }
  }
  for (const s of swaps) {
    ctx.swapped(s.line, s.b);
    auto.set(s.line, s.b);
    auto.set(s.partner, s.a);
  }
  return swaps.length;
}

function fitSeparates(ctx: TwinContext, a: CandidateLine, b: CandidateLine, split: number): boolean {
  const fa = ctx.fitted(a);
  const fb = ctx.fitted(b);
  const sharp = (f: typeof fa) => f !== undefined && 3 * Math.sqrt(f.variance) < Math.abs(split) / 2;
  return sharp(fa) && sharp(fb);
}

/**
 * The free, unassigned peak of line i's source nearest its position + shift that fits as `asPartner` with line i as
 * `asLine`: its position within 3σ of the predicted one and, with intensities, its ratio within 3σ of the prediction.
 */
function bestPartner(
  ctx: TwinContext,
  auto: ReadonlyMap<number, CandidateLine>,
  i: number,
  shift: number,
  asLine: CandidateLine,
  asPartner: CandidateLine,
  used: ReadonlySet<number>,
): { index: number; cost: number } | undefined {
  const p = ctx.peaks[i] as TwinContext['peaks'][number];
  const at = p.position + shift;
  const sp = p.uncertainty ?? SIGMA_WHEN_UNSENT;
  const free = ctx.freeNear(i);
  let best: { index: number; cost: number } | undefined;
  for (let k = lowerBound(free, at - 0.5); k < free.length; k++) {
    const q = free[k] as ObservedPeak;
    if (q.position > at + 0.5) break;
    if (q.index === i || auto.has(q.index) || used.has(q.index)) continue;
    const tol = Math.hypot(splitSigma(shift), sp, q.sigma ?? SIGMA_WHEN_UNSENT);
    const z = (q.position - at) / tol;
    if (Math.abs(z) > 3) continue;
    let cost = z * z;
    if (p.intensity && q.intensity && asLine.intensity > 0 && asPartner.intensity > 0) {
      const zi =
        (Math.log(q.intensity / p.intensity) - Math.log(asPartner.intensity / asLine.intensity)) / LN_RATIO_SIGMA;
      if (Math.abs(zi) > 3) continue;
      cost += zi * zi;
    }
    if (!best || cost < best.cost) best = { index: q.index, cost };
  }
  return best;
}

function lowerBound(sorted: readonly ObservedPeak[], x: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((sorted[mid] as ObservedPeak).position < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

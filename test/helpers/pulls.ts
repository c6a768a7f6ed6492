import { expect } from 'vitest';
import { type CustomaryConstants, levelConstants, termValue } from './independent-lines.js';

/** Pulls z = (value − truth)/σ of reported quantities, and their summary: coverage at 1σ and 2σ, mean, SD. */
export interface PullSummary {
  readonly n: number;
  readonly within1: number;
  readonly within2: number;
  readonly mean: number;
  readonly sd: number;
}

export function pullSummary(pulls: readonly number[]): PullSummary {
  const n = pulls.length;
  const mean = pulls.reduce((s, z) => s + z, 0) / n;
  const sd = Math.sqrt(pulls.reduce((s, z) => s + (z - mean) ** 2, 0) / (n - 1));
  return {
    n,
    within1: pulls.filter((z) => Math.abs(z) <= 1).length / n,
    within2: pulls.filter((z) => Math.abs(z) <= 2).length / n,
    mean,
    sd,
  };
}

/** Collects pulls by name. */
export class PullTally {
  readonly byName = new Map<string, number[]>();
  add(name: string, q: { readonly value: number; readonly uncertainty: number } | undefined, truth: number): void {
    if (!q) return;
    const list = this.byName.get(name) ?? [];
    list.push((q.value - truth) / q.uncertainty);
    this.byName.set(name, list);
  }
  all(): number[] {
    return [...this.byName.values()].flat();
  }
  summary(name?: string): PullSummary {
    return pullSummary(name === undefined ? this.all() : (this.byName.get(name) ?? []));
  }
  /** One line per quantity, for a test's log and the closing notes. */
  table(): string {
    return [...this.byName.keys()]
      .map((k) => {
        const s = this.summary(k);
        return `${k}: n ${s.n}, 1σ ${s.within1.toFixed(3)}, 2σ ${s.within2.toFixed(3)}, mean ${s.mean.toFixed(2)}, SD ${s.sd.toFixed(2)}`;
      })
      .join('\n');
  }
}

type Reported = { readonly value: number; readonly uncertainty: number } | undefined;

/**
 * The pulls of a diatomic fit's band origins and level B_v, D_v against the independent generator's truth
 * (test/helpers/independent-lines.ts), under "origin v′-v″", "B_v" and "D_v".
 */
export function tallyBandsAndLevels(
  tally: PullTally,
  r: {
    readonly bands: readonly { readonly band: string; readonly origin?: Reported }[];
    readonly levels: readonly { readonly v: number; readonly B?: Reported; readonly D?: Reported }[];
  },
  c: CustomaryConstants,
): void {
  for (const b of r.bands) {
    const [u, l] = b.band.split('-').map(Number) as [number, number];
    tally.add(`origin ${b.band}`, b.origin, termValue(c, u, 0) - termValue(c, l, 0));
  }
  for (const lv of r.levels) {
    const truth = levelConstants(c, lv.v);
    tally.add(`B_${lv.v}`, lv.B, truth.B);
    tally.add(`D_${lv.v}`, lv.D, truth.D);
  }
}

/**
 * The coverage the pull tests over 200 trials require unless they say otherwise: n trials, |pull| ≤ 1 in 0.60–0.76
 * and ≤ 2 in ≥ 0.92 (normal 0.683 / 0.954; 0.60 and 0.76 lie 2.5 binomial SD from 0.683 at n = 200).
 */
export function expectCoverage(s: PullSummary, n: number): void {
  expect(s.n).toBe(n);
  expect(s.within1).toBeGreaterThanOrEqual(0.6);
  expect(s.within1).toBeLessThanOrEqual(0.76);
  expect(s.within2).toBeGreaterThanOrEqual(0.92);
}

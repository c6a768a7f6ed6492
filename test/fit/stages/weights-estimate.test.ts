import { describe, expect, it } from 'vitest';
import { selectLevelModel } from '../../../src/fit/level-selection.js';
import type { LineInput } from '../../../src/fit/types.js';
import { MIN_SCATTER_GROUP, weighLines } from '../../../src/fit/weights.js';
import type { Observation } from '../../../src/models/linear-model.js';
import { CO_12_16, independentLines } from '../../helpers/independent-lines.js';
import { observationsOf } from './observations-of.js';

// Stage 1b on its own, second part: the estimate checked number for number against a hand computation of the
// leverage-corrected MAD and clipped rms, lists that mix lines with and without σ, and the reuse of an earlier
// estimate (ScatterReuse) at and beyond its limits. Lines of the independent generator (¹²C¹⁶O, Huber & Herzberg
// constants from memory). Everything computed inside `it` (mutation testing, test/MUTANTS.md).

const FIT = { maxOrder: 5, termSignificance: 0.01 };
/** 1/Φ⁻¹(3/4) (SciPy 1.17: 1/norm.ppf(0.75) = 1.482602218505602). */
const MAD_FACTOR = 1.482602218505602;
/** E[z² | |z| ≤ 3] for a standard normal z = 0.9733369246625415 (SciPy 1.17); the code rounds it to 0.97334. */
const CLIPPED = 0.97334;

function median(x: readonly number[]): number {
  const s = [...x].sort((a, b) => a - b);
  const n = s.length;
  return n % 2 ? (s[(n - 1) / 2] as number) : ((s[n / 2 - 1] as number) + (s[n / 2] as number)) / 2;
}

/** The estimate written out: MAD σ about the median, then the rms within 3 MAD-σ of zero over √0.97334. */
function handScatter(e: readonly number[]): number {
  const m = median(e);
  const mad = MAD_FACTOR * median(e.map((x) => Math.abs(x - m)));
  const inside = e.filter((x) => Math.abs(x) <= 3 * mad);
  return Math.sqrt(inside.reduce((a, x) => a + x * x, 0) / inside.length) / Math.sqrt(CLIPPED);
}

/** CO bands without σ (each its own scatter), J″ ≤ jMax; observations weighted 1. */
function bands(spec: { upper: number; lower?: number; sigma: number; jMax?: number }[], seed = 43) {
  const list = independentLines({
    molecule: CO_12_16,
    bands: spec.map((b) => ({ upper: b.upper, lower: b.lower ?? 0, jMax: b.jMax ?? 25, sigma: b.sigma })),
    withUncertainties: false,
    seed,
  });
  const input: LineInput[] = list.lines.map((l) => ({ position: l.position }));
  return { input, obs: observationsOf(list) };
}

describe('the scatter estimate, number for number', () => {
  it('one band without σ: σ is the hand-computed clipped scatter of eᵢ/√(1 − hᵢᵢ) of the level fit', () => {
    // All lines of one group weigh the same, so the estimating fits of both rounds have the residuals and leverages
    // of the unweighted level fit: the estimate must equal the hand computation from that fit to rounding.
    const { input, obs } = bands([{ upper: 1, sigma: 0.003 }]);
    const w = weighLines(input, obs, FIT);
    const f = selectLevelModel(obs, 5, 'a-posteriori', 0.01).fit;
    const e = Array.from(f.residuals, (r, i) => r / Math.sqrt(1 - (f.leverages[i] as number)));
    const want = handScatter(e);
    expect(w.groups).toHaveLength(1);
    expect(w.groups[0]?.sigma).toBeCloseTo(want, 12);
    // The correction matters: without it the estimate is about √(1 − p/n) smaller (p = 3 of 51: 3 %).
    const plain = handScatter(Array.from(f.residuals));
    expect(Math.abs(plain / want - 1)).toBeGreaterThan(0.01);
    // And the estimate is near the generating σ (51 lines: ±10 % per 1σ, 30 % stated).
    expect(Math.abs(want / 0.003 - 1)).toBeLessThan(0.3);
    for (const o of w.observations) expect(o.weight).toBeCloseTo(1 / want ** 2, 3);
  });

  it(`a band of exactly ${MIN_SCATTER_GROUP} lines without σ gets its own σ; one of ${MIN_SCATTER_GROUP - 1} takes the pooled one`, () => {
    // 1-0 to J″ = 4 has P(1..4) and R(0..4): 9 lines; to J″ = 5 with P(1) dropped: 10 lines.
    const big = bands([
      { upper: 2, sigma: 0.002, jMax: 25 },
      { upper: 1, sigma: 0.002, jMax: 5 },
    ]);
    const keep = big.obs.filter((o) => !(o.upperV === 1 && o.lowerJ === 1 && o.upperJ === 0));
    const ten = weighLines(big.input, keep, FIT);
    expect(ten.groups.map((g) => [g.group, g.by, g.lines])).toEqual([
      ['12C-16O 2-0', 'band', 51],
      ['12C-16O 1-0', 'band', 10],
    ]);
    const nine = weighLines(
      big.input,
      keep.filter((o) => !(o.upperV === 1 && o.lowerJ === 5 && o.upperJ === 4)),
      FIT,
    );
    expect(nine.groups.map((g) => [g.group, g.by, g.lines])).toEqual([
      ['12C-16O 2-0', 'band', 51],
      ['all lines without an uncertainty', 'pooled', 9],
    ]);
  });

  it('a gross error stays counted in its group (counts from the first round), and the σ of its band is not inflated', () => {
    const { input, obs } = bands([
      { upper: 1, sigma: 0.002 },
      { upper: 2, sigma: 0.002 },
    ]);
    const bad = obs.map((o, i) => (i === 10 ? { ...o, position: o.position + 0.2 } : o));
    const w = weighLines(input, bad, FIT);
    expect(w.groups.map((g) => g.lines)).toEqual([51, 51]);
    expect(Math.abs((w.groups[0]?.sigma as number) / 0.002 - 1)).toBeLessThan(0.3);
  });
});

describe('lists that mix lines with and without σ', () => {
  /** 1-0 sent with σ = 0.001 (true scatter 0.001), 2-0 without σ (true scatter 0.004). */
  function mixed(sourceOf?: (o: Observation) => string | undefined) {
    const { input, obs } = bands([
      { upper: 1, sigma: 0.001 },
      { upper: 2, sigma: 0.004 },
    ]);
    const withSigma: LineInput[] = input.map((l, i) => {
      const o = obs.find((x) => x.index === i) as Observation;
      const s = sourceOf?.(o);
      return {
        ...l,
        ...(o.upperV === 1 ? { uncertainty: 0.001 } : {}),
        ...(s === undefined ? {} : { source: s }),
      };
    });
    const weighted = obs.map((o) => (o.upperV === 1 ? { ...o, weight: 1 / 0.001 ** 2 } : o));
    return { input: withSigma, obs: weighted };
  }

  it(`${MIN_SCATTER_GROUP} or more lines without σ beside lines with σ: their σ is estimated, not filled`, () => {
    const { input, obs } = mixed();
    let first: readonly Observation[] | undefined;
    const w = weighLines(input, obs, FIT, {
      refit(o) {
        first ??= o;
        return selectLevelModel(o, 5, 'a-posteriori', 0.01);
      },
      band: (o) => ({ key: `${o.species}|${o.upperV}-${o.lowerV}`, label: `band ${o.upperV}-${o.lowerV}` }),
    });
    // The first estimating fit starts the lines without σ from the median of the given σ (0.001 cm⁻¹).
    for (const o of first ?? []) expect(o.weight).toBeCloseTo(1 / 0.001 ** 2, 3);
    // Only the lines without σ form groups; the lines with σ keep their weights.
    expect(w.groups.map((g) => [g.group, g.by, g.lines])).toEqual([['band 2-0', 'band', 51]]);
    expect(Math.abs((w.groups[0]?.sigma as number) / 0.004 - 1)).toBeLessThan(0.3);
    for (const o of w.observations) {
      if (o.upperV === 1) expect(o.weight).toBe(1 / 0.001 ** 2);
      else expect(o.weight).toBeCloseTo(1 / (w.groups[0]?.sigma as number) ** 2, 3);
    }
    expect(w.warnings.map((x) => x.code)).toEqual(['UNCERTAINTY_ESTIMATED']);
  });

  it('the 2-0 lines put in a source group, the others in band groups: the message says per source', () => {
    const { input, obs } = bands([
      { upper: 1, sigma: 0.002 },
      { upper: 2, sigma: 0.004 },
    ]);
    const sourced: LineInput[] = input.map((l, i) =>
      obs.find((o) => o.index === i)?.upperV === 2 ? { ...l, source: 'second scan' } : l,
    );
    const w = weighLines(sourced, obs, FIT);
    expect(w.groups.map((g) => [g.group, g.by])).toEqual([
      ['12C-16O 1-0', 'band'],
      ['second scan', 'source'],
    ]);
    expect(w.warnings[0]?.message).toContain('(1.4826 × median absolute deviation, per source)');
    expect(w.sigmaFor('12C-16O', '1-0', 'second scan')).toBe(w.groups[1]?.sigma);
    expect(w.sigmaFor('12C-16O', '1-0')).toBe(w.groups[0]?.sigma);
  });
});

describe('reusing an earlier estimate (ScatterReuse)', () => {
  /** 1-0 (0.002) and 2-0 (0.006), 51 lines each; the earlier list lacks one line of each band (50 each). */
  function lists() {
    const { input, obs } = bands([
      { upper: 1, sigma: 0.002 },
      { upper: 2, sigma: 0.006 },
    ]);
    const dropped = new Set([obs[5]?.index, obs[60]?.index]);
    const earlierObs = obs.filter((o) => !dropped.has(o.index));
    return { input, obs, earlierObs };
  }

  it('within the growth allowed: the earlier σ, weights 1/σ², the groups with the lines they now hold', () => {
    const { input, obs, earlierObs } = lists();
    const earlier = weighLines(input, earlierObs, FIT);
    expect(earlier.groups.map((g) => g.lines)).toEqual([50, 50]);
    // |51 − 50| = 1 = 0.02 × 50: at the limit, still reused.
    expect(0.02 * 50).toBe(1);
    const reused = weighLines(input, obs, FIT, undefined, {
      from: earlier.estimate as NonNullable<typeof earlier.estimate>,
      growth: 0.02,
    });
    expect(reused.groups.map((g) => [g.group, g.lines, g.sigma])).toEqual([
      ['12C-16O 1-0', 51, earlier.groups[0]?.sigma],
      ['12C-16O 2-0', 51, earlier.groups[1]?.sigma],
    ]);
    for (const o of reused.observations) {
      const s = earlier.groups[o.upperV - 1]?.sigma as number;
      expect(o.weight).toBe(1 / s ** 2);
    }
    expect(reused.estimate?.estimatedAt).toEqual(earlier.estimate?.estimatedAt);
    // A fresh estimate of the longer list differs (it is not what was reused).
    const fresh = weighLines(input, obs, FIT);
    expect(fresh.groups[0]?.sigma).not.toBe(earlier.groups[0]?.sigma);
  });

  it('beyond the growth allowed, or with another fallback σ, the scatter is estimated afresh', () => {
    const { input, obs, earlierObs } = lists();
    const earlier = weighLines(input, earlierObs, FIT);
    const from = earlier.estimate as NonNullable<typeof earlier.estimate>;
    const fresh = weighLines(input, obs, FIT).groups.map((g) => g.sigma);
    const tight = weighLines(input, obs, FIT, undefined, { from, growth: 0.019 });
    expect(tight.groups.map((g) => g.sigma)).toEqual(fresh);
    // The same lines, but the earlier estimate started from another σ for lines without one.
    const other = { ...from, fallback: 0.5 };
    const refused = weighLines(input, obs, FIT, undefined, { from: other, growth: 1 });
    expect(refused.groups.map((g) => g.sigma)).toEqual(fresh);
    // An estimate that holds no group cannot be reused.
    const empty = { ...from, estimatedAt: new Map<string, number>() };
    expect(weighLines(input, obs, FIT, undefined, { from: empty, growth: 1 }).groups.map((g) => g.sigma)).toEqual(
      fresh,
    );
  });

  it('a group that was not there, or that is gone, forces a new estimate', () => {
    const { input, obs } = lists();
    const only1 = obs.filter((o) => o.upperV === 1);
    const earlier = weighLines(input, only1, FIT);
    const from = earlier.estimate as NonNullable<typeof earlier.estimate>;
    const fresh = weighLines(input, obs, FIT).groups.map((g) => g.sigma);
    expect(weighLines(input, obs, FIT, undefined, { from, growth: 10 }).groups.map((g) => g.sigma)).toEqual(fresh);
    // As many groups as before, but another one: 2-0 instead of 1-0.
    const only2 = obs.filter((o) => o.upperV === 2);
    const fresh2 = weighLines(input, only2, FIT).groups.map((g) => g.sigma);
    expect(weighLines(input, only2, FIT, undefined, { from, growth: 10 }).groups.map((g) => g.sigma)).toEqual(fresh2);
  });

  it(`a group crossing ${MIN_SCATTER_GROUP} lines is estimated afresh; a small group reused takes the pooled σ`, () => {
    const big = bands([
      { upper: 2, sigma: 0.002, jMax: 25 },
      { upper: 1, sigma: 0.004, jMax: 4 },
    ]);
    // 2-0: 51 lines; 1-0: 9 lines (P(1..4), R(0..4)), pooled.
    const earlier = weighLines(big.input, big.obs, FIT);
    expect(earlier.groups.map((g) => [g.by, g.lines])).toEqual([
      ['band', 51],
      ['pooled', 9],
    ]);
    const from = earlier.estimate as NonNullable<typeof earlier.estimate>;
    const same = weighLines(big.input, big.obs, FIT, undefined, { from, growth: 0 });
    const pooled = earlier.groups[1]?.sigma as number;
    for (const o of same.observations.filter((x) => x.upperV === 1)) expect(o.weight).toBe(1 / pooled ** 2);
    expect(same.groups).toEqual(earlier.groups);
    // One more 1-0 line (R(5)): 10 lines, its own group now, so no reuse even with growth 1.
    const more = bands([
      { upper: 2, sigma: 0.002, jMax: 25 },
      { upper: 1, sigma: 0.004, jMax: 5 },
    ]);
    const ten = more.obs.filter((o) => !(o.upperV === 1 && o.lowerJ === 5 && o.upperJ === 4));
    const grown = weighLines(more.input, ten, FIT, undefined, { from, growth: 1 });
    expect(grown.groups.map((g) => [g.by, g.lines])).toEqual([
      ['band', 51],
      ['band', 10],
    ]);
  });

  it('band labels of the hooks are kept from the earlier estimate and added from this one', () => {
    const { input, obs } = lists();
    const hooks = {
      refit: (o: readonly Observation[]) => selectLevelModel(o, 5, 'a-posteriori', 0.01),
      band: (o: Observation) => ({ key: `k${o.upperV}`, label: `level ${o.upperV}` }),
    };
    const earlier = weighLines(input, obs, FIT, hooks);
    const reused = weighLines(input, obs, FIT, hooks, {
      from: earlier.estimate as NonNullable<typeof earlier.estimate>,
      growth: 0,
    });
    expect(reused.groups.map((g) => g.group)).toEqual(['level 1', 'level 2']);
    expect(reused.groups.map((g) => g.sigma)).toEqual(earlier.groups.map((g) => g.sigma));
  });
});

describe('the limits of reuse, second part', () => {
  /** 1-0 (σ 0.002, J″ ≤ 25: 51 lines) and 2-0 (σ 0.004, J″ ≤ 5 less P(1): exactly 10 lines), no σ sent. */
  function twoGroups() {
    const { input, obs } = bands([
      { upper: 1, sigma: 0.002 },
      { upper: 2, sigma: 0.004, jMax: 5 },
    ]);
    return { input, obs: obs.filter((o) => !(o.upperV === 2 && o.lowerJ === 1 && o.upperJ === 0)) };
  }

  it(`a group of exactly ${MIN_SCATTER_GROUP} lines is reused as it was (it stays on its side of the limit)`, () => {
    const { input, obs } = twoGroups();
    // The earlier list lacks one 1-0 line: 50 and 10 lines.
    const earlierObs = obs.filter((o) => o !== obs[3]);
    const earlier = weighLines(input, earlierObs, FIT);
    expect(earlier.groups.map((g) => [g.by, g.lines])).toEqual([
      ['band', 50],
      ['band', 10],
    ]);
    const reused = weighLines(input, obs, FIT, undefined, {
      from: earlier.estimate as NonNullable<typeof earlier.estimate>,
      growth: 0.05,
    });
    expect(reused.groups.map((g) => g.sigma)).toEqual(earlier.groups.map((g) => g.sigma));
    expect(weighLines(input, obs, FIT).groups[0]?.sigma).not.toBe(earlier.groups[0]?.sigma);
  });

  it('a small group reused takes the earlier pooled σ; a small group that is another band forces a new estimate', () => {
    const big = bands([
      { upper: 1, sigma: 0.002, jMax: 25 },
      { upper: 2, sigma: 0.004, jMax: 4 },
    ]);
    const earlierObs = big.obs.filter((o) => o !== big.obs[3]);
    const earlier = weighLines(big.input, earlierObs, FIT);
    expect(earlier.groups.map((g) => [g.by, g.lines])).toEqual([
      ['band', 50],
      ['pooled', 9],
    ]);
    const from = earlier.estimate as NonNullable<typeof earlier.estimate>;
    const reused = weighLines(big.input, big.obs, FIT, undefined, { from, growth: 0.05 });
    expect(reused.groups.map((g) => g.sigma)).toEqual(earlier.groups.map((g) => g.sigma));
    // The same shape (51 + 9 lines), but the small group is 3-0, not 2-0: estimated afresh.
    const other = bands([
      { upper: 1, sigma: 0.002, jMax: 25 },
      { upper: 3, sigma: 0.004, jMax: 4 },
    ]);
    const fresh = weighLines(other.input, other.obs, FIT).groups.map((g) => g.sigma);
    expect(weighLines(other.input, other.obs, FIT, undefined, { from, growth: 1 }).groups.map((g) => g.sigma)).toEqual(
      fresh,
    );
    expect(fresh[0]).not.toBe(earlier.groups[0]?.sigma);
  });

  it('a group that is gone forces a new estimate', () => {
    const { input, obs } = twoGroups();
    const earlier = weighLines(input, obs, FIT);
    const only1 = obs.filter((o) => o.upperV === 1);
    const fresh = weighLines(input, only1, FIT).groups.map((g) => g.sigma);
    const again = weighLines(input, only1, FIT, undefined, {
      from: earlier.estimate as NonNullable<typeof earlier.estimate>,
      growth: 1,
    });
    expect(again.groups.map((g) => g.sigma)).toEqual(fresh);
    expect(fresh[0]).not.toBe(earlier.groups[0]?.sigma);
  });

  it('a list mixing lines with σ and without: only the lines without σ are counted and reweighed when reused', () => {
    const { input, obs } = bands([
      { upper: 1, sigma: 0.001 },
      { upper: 2, sigma: 0.004 },
    ]);
    const withSigma: LineInput[] = input.map((l, i) =>
      obs.find((o) => o.index === i)?.upperV === 1 ? { ...l, uncertainty: 0.001 } : l,
    );
    const weighted = obs.map((o) => (o.upperV === 1 ? { ...o, weight: 1e6 } : o));
    const earlierObs = weighted.filter((o) => o !== weighted.find((x) => x.upperV === 2));
    const earlier = weighLines(withSigma, earlierObs, FIT);
    expect(earlier.groups.map((g) => [g.group, g.lines])).toEqual([['12C-16O 2-0', 50]]);
    const reused = weighLines(withSigma, weighted, FIT, undefined, {
      from: earlier.estimate as NonNullable<typeof earlier.estimate>,
      growth: 0.05,
    });
    expect(reused.groups.map((g) => [g.group, g.lines, g.sigma])).toEqual([
      ['12C-16O 2-0', 51, earlier.groups[0]?.sigma],
    ]);
    for (const o of reused.observations) {
      if (o.upperV === 1) expect(o.weight).toBe(1e6);
      else expect(o.weight).toBe(1 / (earlier.groups[0]?.sigma as number) ** 2);
    }
  });

  it(`exactly ${MIN_SCATTER_GROUP} lines without σ beside lines with σ: estimated, not filled with the median`, () => {
    const { input, obs } = bands([{ upper: 1, sigma: 0.002 }]);
    const without = new Set(obs.slice(0, 10).map((o) => o.index));
    const mixed: LineInput[] = input.map((l, i) => (without.has(i) ? l : { ...l, uncertainty: 0.002 }));
    const weighted = obs.map((o) => (without.has(o.index) ? o : { ...o, weight: 1 / 0.002 ** 2 }));
    const w = weighLines(mixed, weighted, FIT);
    expect(w.warnings.map((x) => x.code)).toEqual(['UNCERTAINTY_ESTIMATED']);
    expect(w.groups.map((g) => [g.group, g.lines])).toEqual([['12C-16O 1-0', 10]]);
  });
});

import { describe, expect, it } from 'vitest';
import { fitLineListDetailed, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_12_16, independentLines } from '../helpers/independent-lines.js';

/**
 * FitOptions.reuseScatter (the inner fits of the automatic assignment): an earlier fit's scatter estimate of the
 * lines without σ is reused while each group (here: each band) has changed by at most the stated fraction of its
 * lines, and estimated afresh otherwise. Lines from the independent generator (test/helpers/independent-lines.ts),
 * two CO bands with different noise (0.002 and 0.006 cm⁻¹), no σ sent.
 */
const co = parseSpecies(CO_12_16.formula);
const masses = new Map([[co.formula, reducedMass(co)]]);

const full = independentLines({
  molecule: CO_12_16,
  bands: [
    { upper: 1, lower: 0, jMax: 30, sigma: 0.002 },
    { upper: 2, lower: 1, jMax: 30, sigma: 0.006 },
  ],
  seed: 11,
  withUncertainties: false,
}).lines as LineInput[];
/** The list less every 25th line: each band about 4 % smaller. */
const fewer = full.filter((_, i) => i % 25 !== 7);
const sigmas = (f: ReturnType<typeof fitLineListDetailed>) => (f.result.scatter ?? []).map((g) => [g.group, g.sigma]);

/** The earlier fit (of the list less every 25th line), made inside each test so that a mutation run sees it. */
function earlierFit() {
  const earlier = fitLineListDetailed(fewer, masses);
  return { earlier, estimate: earlier.scatterEstimate };
}

describe('scatter estimate reused between fits of a growing list', () => {
  it('the earlier fit exposes its estimate, one σ per band, and the two bands differ as their noise does', () => {
    const { earlier, estimate } = earlierFit();
    expect(estimate).toBeDefined();
    const s = sigmas(earlier);
    expect(s).toHaveLength(2);
    // 0.006 / 0.002 = 3; the MAD-based estimate from ~60 lines each is good to about ±20 % (1/√(2n) per band).
    const ratio = (s[1]?.[1] as number) / (s[0]?.[1] as number);
    expect(ratio).toBeGreaterThan(2);
    expect(ratio).toBeLessThan(4.5);
  });

  it('within the growth allowed the earlier σ are taken as they were, and the groups report the lines they now hold', () => {
    const { earlier, estimate } = earlierFit();
    const reused = fitLineListDetailed(full, masses, {
      reuseScatter: { from: estimate as NonNullable<ReturnType<typeof earlierFit>['estimate']>, growth: 0.1 },
    });
    expect(sigmas(reused)).toEqual(sigmas(earlier));
    const lines = (f: typeof reused) => (f.result.scatter ?? []).reduce((n, g) => n + g.lines, 0);
    expect(lines(reused)).toBe(full.length);
    expect(lines(earlier)).toBe(fewer.length);
  });

  it('beyond the growth allowed the scatter is estimated afresh: the same σ and constants as a fit without reuse', () => {
    const { earlier, estimate } = earlierFit();
    const fresh = fitLineListDetailed(full, masses);
    const again = fitLineListDetailed(full, masses, {
      reuseScatter: { from: estimate as NonNullable<ReturnType<typeof earlierFit>['estimate']>, growth: 0.01 },
    });
    expect(sigmas(again)).toEqual(sigmas(fresh));
    expect(sigmas(again)).not.toEqual(sigmas(earlier));
    expect(again.result.levels.map((l) => l.B.value)).toEqual(fresh.result.levels.map((l) => l.B.value));
  });

  it('a fit reusing its own estimate on the same lines gives the same constants to the last bit', () => {
    const fresh = fitLineListDetailed(full, masses);
    const same = fitLineListDetailed(full, masses, {
      reuseScatter: {
        from: fresh.scatterEstimate as NonNullable<ReturnType<typeof earlierFit>['estimate']>,
        growth: 0,
      },
    });
    expect(same.result.levels.map((l) => [l.B.value, l.B.uncertainty])).toEqual(
      fresh.result.levels.map((l) => [l.B.value, l.B.uncertainty]),
    );
    expect(same.result.bands.map((b) => b.origin?.value)).toEqual(fresh.result.bands.map((b) => b.origin?.value));
  });

  it('a band that was not there when the estimate was made forces a new estimate', () => {
    const oneBand = full.filter((l) => l.assignment?.band.upper === 1);
    const first = fitLineListDetailed(oneBand, masses);
    const both = fitLineListDetailed(full, masses, {
      reuseScatter: {
        from: first.scatterEstimate as NonNullable<ReturnType<typeof earlierFit>['estimate']>,
        growth: 10,
      },
    });
    expect(sigmas(both)).toEqual(sigmas(fitLineListDetailed(full, masses)));
  });
});

import { describe, expect, it } from 'vitest';
import { fitLineList, fitLineListDetailed, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { type BandRequest, CO_12_16, independentLines } from '../helpers/independent-lines.js';
import { type PullSummary, PullTally, tallyBandsAndLevels } from '../helpers/pulls.js';

/**
 * Lists without uncertainties (the usual peak list): the fit must estimate the scatter itself, per band or per
 * source, and its uncertainties must cover the truth. Lines come from the independent generator
 * (test/helpers/independent-lines.ts: CO with ω_e y_e, γ_e, β_e, H_e), 200 seeded trials per case. Required
 * (issue 11): pull SD within 0.8–1.25; coverage at 1σ within 0.60–0.76 (nominal 0.683) and at 2σ within
 * 0.91–0.99 (nominal 0.954); |mean pull| < 0.35. The pulls of one trial are correlated (B_0 and B_1 move
 * together), so the bands are wider than binomial ones for 200 × k independent pulls.
 */
const co = parseSpecies(CO_12_16.formula);
const masses = new Map([[co.formula, reducedMass(co)]]);
const TRIALS = 200;
const C = CO_12_16.constants;

function pullsOf(list: (seed: number) => LineInput[]) {
  const tally = new PullTally();
  const sigmas: number[][] = [];
  for (let seed = 1; seed <= TRIALS; seed++) {
    const r = fitLineList(list(seed), masses);
    sigmas.push((r.scatter ?? []).map((s) => s.sigma));
    tallyBandsAndLevels(tally, r, C);
  }
  if (process.env.PULLS_LOG) console.info(`${tally.table()}\nall: ${JSON.stringify(tally.summary())}`);
  return { summary: tally.summary(), tally, sigmas };
}

function expectCalibrated(s: PullSummary) {
  expect(s.within1).toBeGreaterThan(0.6);
  expect(s.within1).toBeLessThan(0.76);
  expect(s.within2).toBeGreaterThan(0.91);
  expect(s.within2).toBeLessThan(0.99);
  expect(s.sd).toBeGreaterThan(0.8);
  expect(s.sd).toBeLessThan(1.25);
  expect(Math.abs(s.mean)).toBeLessThan(0.35);
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1] as number;
const noSigma = (bands: BandRequest[], seed: number, sigma?: number) =>
  independentLines({ molecule: CO_12_16, bands, seed, withUncertainties: false, ...(sigma ? { sigma } : {}) })
    .lines as LineInput[];

describe('lists without uncertainties: σ from the robust scatter', () => {
  it('a clean CO fundamental (σ = 0.002 cm-1, J″ ≤ 25): pulls calibrated, σ recovered within 10 % (median)', () => {
    const { summary, sigmas } = pullsOf((seed) => noSigma([{ upper: 1, lower: 0, jMax: 25 }], seed, 0.002));
    expectCalibrated(summary);
    expect(median(sigmas.map((s) => s[0] as number)) / 0.002).toBeGreaterThan(0.9);
    expect(median(sigmas.map((s) => s[0] as number)) / 0.002).toBeLessThan(1.1);
  });

  it('two bands of different scatter (0.002 and 0.008 cm-1) are weighted apart, per band', () => {
    const { summary, sigmas } = pullsOf((seed) =>
      noSigma(
        [
          { upper: 1, lower: 0, jMax: 22, sigma: 0.002 },
          { upper: 2, lower: 0, jMax: 22, sigma: 0.008 },
        ],
        seed,
      ),
    );
    expectCalibrated(summary);
    // Tolerance 10 % on the median estimate of each band's σ (one estimate from 45 lines scatters by about 12 %).
    expect(median(sigmas.map((s) => s[0] as number)) / 0.002).toBeGreaterThan(0.9);
    expect(median(sigmas.map((s) => s[0] as number)) / 0.002).toBeLessThan(1.1);
    expect(median(sigmas.map((s) => s[1] as number)) / 0.008).toBeGreaterThan(0.9);
    expect(median(sigmas.map((s) => s[1] as number)) / 0.008).toBeLessThan(1.1);
  });

  it('the same bands measured on two instruments (0.001 and 0.006 cm-1) are weighted apart, per source', () => {
    const bands: BandRequest[] = [
      { upper: 1, lower: 0, jMax: 18 },
      { upper: 2, lower: 0, jMax: 18 },
    ];
    const { summary, sigmas } = pullsOf((seed) => [
      ...noSigma(bands, seed, 0.001).map((l) => ({ ...l, source: 'ftir-a' })),
      ...noSigma(bands, seed + 10_000, 0.006).map((l) => ({ ...l, source: 'ftir-b' })),
    ]);
    expectCalibrated(summary);
    expect(median(sigmas.map((s) => s[0] as number)) / 0.001).toBeGreaterThan(0.9);
    expect(median(sigmas.map((s) => s[0] as number)) / 0.001).toBeLessThan(1.1);
    expect(median(sigmas.map((s) => s[1] as number)) / 0.006).toBeGreaterThan(0.9);
    expect(median(sigmas.map((s) => s[1] as number)) / 0.006).toBeLessThan(1.1);
  });

  it('says so in a warning, reports the groups, resists a gross error and gives the assignment a per-line σ', () => {
    const lines = noSigma([{ upper: 1, lower: 0, jMax: 20 }], 7, 0.003);
    // One gross error: the estimate must not follow it (a standard deviation would grow to about 0.008).
    lines[4] = { ...(lines[4] as LineInput), position: (lines[4] as LineInput).position + 0.05 };
    const d = fitLineListDetailed(lines, masses);
    const w = d.result.warnings.find((x) => x.code === 'UNCERTAINTY_ESTIMATED');
    expect(w?.message).toContain('12C-16O 1-0');
    expect(d.result.scatter?.[0]?.by).toBe('band');
    expect(d.result.scatter?.[0]?.lines).toBe(41);
    // One estimate from 41 lines: within ±35 % of the true 0.003 (about 3 standard errors of the estimate).
    const s = d.result.scatter?.[0]?.sigma as number;
    expect(s / 0.003).toBeGreaterThan(0.65);
    expect(s / 0.003).toBeLessThan(1.35);
    expect(d.result.statistics.rejected).toBe(1);
    // The reduced χ² is a statistic again (weights from the estimate): near 1, not σ² in cm².
    expect(d.result.statistics.reducedChiSquare).toBeGreaterThan(0.5);
    expect(d.result.statistics.reducedChiSquare).toBeLessThan(1.8);
    const t = { species: co.formula, band: { upper: 1, lower: 0 }, branch: 'R' as const, j: 3 };
    expect(d.lineSigma(t) / 0.003).toBeGreaterThan(0.65);
    expect(d.lineSigma(t) / 0.003).toBeLessThan(1.35);
    // A line's own uncertainty wins over the estimate (scaled by √s² of the fit).
    expect(d.lineSigma(t, { uncertainty: 0.1 }) / 0.1).toBeCloseTo(Math.sqrt(d.scale), 6);
  });

  it('lines that all carry uncertainties are fitted as before (no estimate, no warning)', () => {
    const { lines } = independentLines({
      molecule: CO_12_16,
      bands: [{ upper: 1, lower: 0, jMax: 20 }],
      sigma: 0.003,
      seed: 3,
    });
    const r = fitLineList(lines as LineInput[], masses);
    expect(r.scatter).toBeUndefined();
    expect(r.warnings.some((x) => x.code === 'UNCERTAINTY_ESTIMATED' || x.code === 'UNCERTAINTY_FILLED')).toBe(false);
  });
});

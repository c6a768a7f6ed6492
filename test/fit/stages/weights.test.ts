import { describe, expect, it } from 'vitest';
import { selectLevelModel } from '../../../src/fit/level-selection.js';
import type { LineInput } from '../../../src/fit/types.js';
import { MIN_SCATTER_GROUP, scatterOf, weighLines } from '../../../src/fit/weights.js';
import type { Observation } from '../../../src/models/linear-model.js';
import { CO_12_16, independentLines } from '../../helpers/independent-lines.js';
import { observationsOf } from './observations-of.js';

// Stage 1b on its own: weights from stated σ, the fill rule, and σ estimated per band or source from the scatter
// of lines sent without one, on lines of the independent generator (¹²C¹⁶O, Huber & Herzberg constants from
// memory). Computed inside `it` (mutation testing).

/** 1/Φ⁻¹(3/4), the normal-consistent MAD factor (Rousseeuw & Croux 1993): 1.482602 (SciPy 1.17 1/norm.ppf(0.75)). */
const MAD = 1.482602218505602;
/** E[z² | |z| ≤ 3] = 1 − 6φ(3)/(2Φ(3) − 1) = 0.973337 (SciPy 1.17). */
const CLIPPED = 0.9733369246625415;
const FIT = { maxOrder: 5, termSignificance: 0.01 };

describe('scatterOf: MAD, then the clipped rms', () => {
  it('[3, −1, 2, 0, 1, −2, 10]: MAD σ 2.965; 10 lies beyond 3 MAD-σ; rms of the rest / √0.97334', () => {
    // median 1, |x − 1| = 2, 2, 1, 1, 0, 3, 9 → median 2 → σ_MAD = 2 × 1.4826; 3σ_MAD = 8.9 keeps all but 10.
    const want = Math.sqrt((9 + 1 + 4 + 0 + 1 + 4) / 6) / Math.sqrt(CLIPPED);
    expect(scatterOf([3, -1, 2, 0, 1, -2, 10])).toBeCloseTo(want, 5);
    expect(2 * MAD).toBeLessThan(10 / 3);
  });
  it('more than half the residuals 0 (MAD 0): the plain rms; all 0: 1e-9', () => {
    expect(scatterOf([0, 0, 0, 0, 0.5])).toBeCloseTo(Math.sqrt(0.25 / 5), 14);
    expect(scatterOf([0, 0, 0])).toBe(1e-9);
  });
  it('fewer than three residuals within 3 MAD-σ of zero: the MAD σ itself', () => {
    // Residuals all near 102: MAD σ = 1.4826 (|x − 102| = 2, 1, 0, 1, 2), none within 4.45 of zero.
    expect(scatterOf([100, 101, 102, 103, 104])).toBeCloseTo(MAD, 12);
  });
});

/** CO 1-0 (σ₁) and 2-0 (σ₂), J″ ≤ jMax, sent without σ; `extra` bands for small groups. */
function unweighted(sig1: number, sig2: number, jMax = 25, extra: { upper: number; jMax: number }[] = []) {
  const list = independentLines({
    molecule: CO_12_16,
    bands: [
      { upper: 1, lower: 0, jMax, sigma: sig1 },
      { upper: 2, lower: 0, jMax, sigma: sig2 },
      ...extra.map((b) => ({ upper: b.upper, lower: 0, jMax: b.jMax, sigma: sig1 })),
    ],
    withUncertainties: false,
    seed: 41,
  });
  const input: LineInput[] = list.lines.map((l) => ({ position: l.position }));
  return { input, obs: observationsOf(list) };
}

describe('weighLines: stated σ and the fill rule', () => {
  it('every line with σ: the observations are left as they are, no group, no warning', () => {
    const { obs } = unweighted(0.001, 0.001);
    const input: LineInput[] = obs.map((o, i) => ({ position: o.position, uncertainty: i % 2 ? 0.001 : 0.004 }));
    const w = weighLines(input, obs, FIT);
    expect(w.observations).toHaveLength(obs.length);
    for (const [i, o] of w.observations.entries()) expect(o).toBe(obs[i]);
    expect(w.groups).toEqual([]);
    expect(w.warnings).toEqual([]);
    // Median of 0.001 and 0.004 over an even count: their mean.
    expect(w.sigmaFor('12C-16O', '1-0')).toBeCloseTo(0.0025, 15);
  });

  it(`fewer than ${MIN_SCATTER_GROUP} assigned lines without σ beside lines with σ take the median of the given σ`, () => {
    const { obs } = unweighted(0.001, 0.001);
    const missing = new Set([0, 7, 30, 44]);
    const input: LineInput[] = obs.map((o, i) =>
      missing.has(i) ? { position: o.position } : { position: o.position, uncertainty: i < 20 ? 0.002 : 0.001 },
    );
    // One more line, unassigned and without σ: counted in the message, not weighed.
    input.push({ position: 2500 });
    const w = weighLines(input, obs, FIT);
    expect(w.warnings).toEqual([
      {
        code: 'UNCERTAINTY_FILLED',
        message: '5 line(s) had no uncertainty and were given the median of the others, 0.001 cm-1',
      },
    ]);
    for (const [i, o] of w.observations.entries()) {
      if (missing.has(i)) expect(o.weight).toBeCloseTo(1 / 0.001 ** 2, 6);
      else expect(o).toBe(obs[i]);
    }
    expect(w.sigmaFor('12C-16O', '2-0')).toBe(0.001);
  });
});

describe('weighLines: σ estimated from the scatter', () => {
  it('two bands of different scatter (0.002 and 0.006 cm⁻¹) get their own σ, within 30 %', () => {
    const { input, obs } = unweighted(0.002, 0.006);
    const w = weighLines(input, obs, FIT);
    expect(w.groups.map((g) => [g.group, g.by, g.lines])).toEqual([
      ['12C-16O 1-0', 'band', 51],
      ['12C-16O 2-0', 'band', 51],
    ]);
    const [g1, g2] = w.groups;
    // 51 residuals: the clipped estimate's relative σ is about 10 %; 30 % is three of those (stated tolerance).
    expect(Math.abs((g1?.sigma as number) / 0.002 - 1)).toBeLessThan(0.3);
    expect(Math.abs((g2?.sigma as number) / 0.006 - 1)).toBeLessThan(0.3);
    expect(w.sigmaFor('12C-16O', '1-0')).toBe(g1?.sigma);
    expect(w.sigmaFor('12C-16O', '2-0', 'no such source')).toBe(g2?.sigma);
    for (const o of w.observations) {
      const s = o.upperV === 1 ? (g1?.sigma as number) : (g2?.sigma as number);
      expect(o.weight).toBeCloseTo(1 / s ** 2, 6);
    }
    // A band not seen takes the pooled σ, between the two.
    const pooled = w.sigmaFor('12C-16O', '3-0');
    expect(pooled).toBeGreaterThan(g1?.sigma as number);
    expect(pooled).toBeLessThan(g2?.sigma as number);
    expect(w.warnings).toHaveLength(1);
    expect(w.warnings[0]?.code).toBe('UNCERTAINTY_ESTIMATED');
    expect(w.warnings[0]?.message).toBe(
      `102 line(s) had no uncertainty: σ was estimated from the scatter of the residuals (1.4826 × median absolute deviation, per band) and used for the weights and the covariance: 12C-16O 1-0 ${g1?.sigma.toPrecision(2)} cm-1 (51 lines), 12C-16O 2-0 ${g2?.sigma.toPrecision(2)} cm-1 (51 lines)`,
    );
  });

  it('a gross error (0.2 cm⁻¹, 100σ) moves its band’s σ by less than 30 %', () => {
    const { input, obs } = unweighted(0.002, 0.002);
    const bad = obs.map((o, i) => (i === 10 ? { ...o, position: o.position + 0.2 } : o));
    const w = weighLines(input, bad, FIT);
    expect(Math.abs((w.groups[0]?.sigma as number) / 0.002 - 1)).toBeLessThan(0.3);
    expect(Math.abs((w.groups[1]?.sigma as number) / 0.002 - 1)).toBeLessThan(0.3);
  });

  it('lines that name their source are grouped by source, whatever their band', () => {
    const { input, obs } = unweighted(0.002, 0.002);
    // Source "fine" keeps the generated scatter; source "coarse" gets 0.008 cm⁻¹ more (seeded, own stream).
    let k = 7;
    const noise = () => {
      k = (k * 16807) % 2147483647;
      return (k / 2147483647 - 0.5) * Math.sqrt(12);
    };
    const moved: Observation[] = obs.map((o, i) => (i % 2 ? { ...o, position: o.position + 0.008 * noise() } : o));
    const sourced: LineInput[] = input.map((l, i) => ({ ...l, source: i % 2 ? 'coarse' : 'fine' }));
    const w = weighLines(sourced, moved, FIT);
    expect(w.groups.map((g) => [g.group, g.by, g.lines])).toEqual([
      ['fine', 'source', 51],
      ['coarse', 'source', 51],
    ]);
    const fine = w.groups[0]?.sigma as number;
    const coarse = w.groups[1]?.sigma as number;
    expect(coarse / fine).toBeGreaterThan(2.5);
    expect(w.sigmaFor('12C-16O', '1-0', 'coarse')).toBe(coarse);
    expect(w.sigmaFor('12C-16O', '1-0', 'fine')).toBe(fine);
    expect(w.warnings[0]?.message).toContain('median absolute deviation, per source)');
  });

  it(`a band with fewer than ${MIN_SCATTER_GROUP} lines takes the pooled σ, reported as one group`, () => {
    const { input, obs } = unweighted(0.002, 0.002, 25, [{ upper: 3, jMax: 3 }]);
    const w = weighLines(input, obs, FIT);
    expect(w.groups.map((g) => [g.group, g.by, g.lines])).toEqual([
      ['12C-16O 1-0', 'band', 51],
      ['12C-16O 2-0', 'band', 51],
      ['all lines without an uncertainty', 'pooled', 7],
    ]);
    const pooled = w.groups[2]?.sigma as number;
    expect(w.sigmaFor('12C-16O', '3-0')).toBe(pooled);
    for (const o of w.observations.filter((x) => x.upperV === 3)) expect(o.weight).toBeCloseTo(1 / pooled ** 2, 6);
  });

  it('another level model takes part through the hooks: its refit and its band labels', () => {
    const { input, obs } = unweighted(0.002, 0.006);
    let refits = 0;
    const w = weighLines(input, obs, FIT, {
      refit(o) {
        refits++;
        return selectLevelModel(o, 5, 'a-posteriori', 0.01);
      },
      band: (o) => ({ key: `v${o.upperV}`, label: `upper level ${o.upperV}` }),
    });
    expect(refits).toBe(2);
    expect(w.groups.map((g) => g.group)).toEqual(['upper level 1', 'upper level 2']);
    expect(Math.abs((w.groups[1]?.sigma as number) / 0.006 - 1)).toBeLessThan(0.3);
  });

  it('too few lines for an estimating fit: the provisional weights stay and nothing is reported', () => {
    const { input, obs } = unweighted(0.002, 0.002);
    // 3 lines of 1-0 cannot support the estimating fit's two degrees of freedom (T, B″, B′ take three).
    const three = obs.slice(0, 3);
    const w = weighLines(input.slice(0, 3), three, FIT);
    expect(w.groups).toEqual([]);
    expect(w.warnings).toEqual([]);
    for (const o of w.observations) expect(o.weight).toBe(1);
    expect(w.sigmaFor('12C-16O', '1-0')).toBe(1);
  });
});

import { describe, expect, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_12_16, HCL_1_35, independentLines } from '../helpers/independent-lines.js';

const co = '12C-16O';
const coMasses = new Map([[co, reducedMass(parseSpecies(co))]]);

/**
 * The rejection floor for long lists: the studentised-residual threshold is raised to the two-sided normal
 * quantile of 0.25/n (Bonferroni-style), 4.06 for n = 5 000, so that clean Gaussian lists lose about 0.25 lines on
 * average whatever their length. With a caller's threshold of 3 and no floor, 5 000 clean lines would lose about
 * 5 000 × 0.0027 = 13.5.
 */
describe('rejection floor with a 5 000-line list', () => {
  // Ten scans (seeds) of five CO bands, J″ ≤ 49: 10 × 5 × 99 = 4 950 lines, plus the 50 R(50) lines.
  const lines: LineInput[] = [];
  for (let scan = 0; scan < 10; scan++) {
    const { lines: l } = independentLines({
      molecule: CO_12_16,
      bands: [
        { upper: 1, lower: 0, jMax: 49 },
        { upper: 2, lower: 0, jMax: 49 },
        { upper: 3, lower: 0, jMax: 49 },
        { upper: 2, lower: 1, jMax: 49 },
        { upper: 3, lower: 2, jMax: 49 },
      ],
      sigma: 0.001,
      seed: 500 + scan,
    });
    lines.push(...(l as LineInput[]));
    for (const band of [
      { upper: 1, lower: 0 },
      { upper: 2, lower: 0 },
      { upper: 3, lower: 0 },
      { upper: 2, lower: 1 },
      { upper: 3, lower: 2 },
    ]) {
      const r50 = independentLines({
        molecule: CO_12_16,
        bands: [{ ...band, jMin: 50, jMax: 50, branches: ['R'] }],
        sigma: 0.001,
        seed: 900 + scan * 7 + band.upper * 3 + band.lower,
      });
      lines.push(...(r50.lines as LineInput[]));
    }
  }

  it('builds 5 000 lines', () => {
    expect(lines).toHaveLength(5000);
  });

  it('a caller’s threshold of 3 is floored for 5 000 lines: at most 2 of the clean lines are rejected', () => {
    // Poisson mean 0.25 with the floor: P(≥ 3) = 0.002.
    const r = fitLineList(lines, coMasses, { rejectionThreshold: 3 });
    expect(r.statistics.fitted).toBeGreaterThanOrEqual(4998);
    expect(r.statistics.rejected).toBeLessThanOrEqual(2);
  });

  it('a 10σ outlier put into the long list is still rejected', () => {
    const bad = lines.map((l, i) => (i === 1234 ? { ...l, position: l.position + 0.01 } : l));
    const r = fitLineList(bad, coMasses);
    expect(r.lines[1234]?.status).toBe('rejected');
    expect(r.statistics.rejected).toBeLessThanOrEqual(3);
  });
});

/**
 * The documented fill rule (DEVELOPERS.md, "How a fit flows", stage 1): in a list where some lines carry an
 * uncertainty and fewer than 10 lack one, those lines are weighted with the median of the given uncertainties and a
 * warning says so; when 10 or more lack one, their σ is estimated from the scatter of the residuals per band.
 */
describe('fill rule for missing uncertainties', () => {
  const hcl = '1H-35Cl';
  const masses = new Map([[hcl, reducedMass(parseSpecies(hcl))]]);
  const { lines } = independentLines({
    molecule: HCL_1_35,
    bands: [
      { upper: 1, lower: 0, jMax: 12 },
      { upper: 2, lower: 0, jMax: 12 },
    ],
    sigma: 0.002,
    seed: 31,
  });
  // Given σ cycle through 0.001, 0.002, 0.002, 0.006 (median 0.002, mean 0.00275); every 9th line has none (5 lines).
  const given = [0.001, 0.002, 0.002, 0.006];
  let k = 0;
  const partial: LineInput[] = lines.map((l, i) =>
    i % 9 === 4
      ? { position: l.position, ...(l.assignment ? { assignment: l.assignment } : {}) }
      : { ...l, uncertainty: given[k++ % 4] as number },
  );
  const missing = partial.filter((l) => l.uncertainty === undefined).length;
  const sigmas = partial.flatMap((l) => (l.uncertainty === undefined ? [] : [l.uncertainty])).sort((a, b) => a - b);
  const mid = sigmas.length >> 1;
  const medianGiven =
    sigmas.length % 2 ? (sigmas[mid] as number) : 0.5 * ((sigmas[mid - 1] as number) + (sigmas[mid] as number));

  it('fewer than 10 lines without σ: the same fit as with the median written in (parameters to 1e-12 relative)', () => {
    expect(missing).toBeGreaterThan(0);
    expect(missing).toBeLessThan(10);
    const filled = partial.map((l) => (l.uncertainty === undefined ? { ...l, uncertainty: medianGiven } : l));
    const a = fitLineList(partial, masses);
    const b = fitLineList(filled, masses);
    expect(a.parameters.map((p) => p.name)).toEqual(b.parameters.map((p) => p.name));
    a.parameters.forEach((p, i) => {
      const q = b.parameters[i] as { value: number; uncertainty: number };
      expect(Math.abs(p.value - q.value) / Math.abs(q.value), p.name).toBeLessThan(1e-12);
      expect(Math.abs(p.uncertainty / q.uncertainty - 1), p.name).toBeLessThan(1e-9);
    });
    const w = a.warnings.find((x) => x.code === 'UNCERTAINTY_FILLED');
    expect(w?.message).toContain(String(medianGiven));
    expect(b.warnings.some((x) => x.code === 'UNCERTAINTY_FILLED')).toBe(false);
  });

  it('the rule is the median: filling with the mean (0.00275) gives a different fit', () => {
    const mean = sigmas.reduce((s, x) => s + x, 0) / sigmas.length;
    expect(Math.abs(mean - medianGiven)).toBeGreaterThan(5e-4);
    const withMean = partial.map((l) => (l.uncertainty === undefined ? { ...l, uncertainty: mean } : l));
    const b0 = (r: ReturnType<typeof fitLineList>) => r.levels.find((x) => x.v === 0)?.B.value as number;
    expect(b0(fitLineList(partial, masses))).not.toBe(b0(fitLineList(withMean, masses)));
  });

  it('10 or more lines without σ: σ estimated per band from the scatter (0.001 and 0.004 cm⁻¹ within 25 %)', () => {
    // Two bands of different noise, every line without σ; ±25 % is about 2.5 sd of a robust scale estimate from
    // 25 lines (common practice for MAD-based scales, efficiency ≈ 0.37 before the clipped refinement).
    const one = independentLines({
      molecule: HCL_1_35,
      bands: [
        { upper: 1, lower: 0, jMax: 14, sigma: 0.001 },
        { upper: 2, lower: 0, jMax: 14, sigma: 0.004 },
      ],
      withUncertainties: false,
      seed: 32,
    });
    const r = fitLineList(one.lines as LineInput[], masses);
    const est = new Map((r.scatter ?? []).map((g) => [g.group, g.sigma]));
    const of = (band: string) => [...est].find(([k]) => k.includes(band))?.[1] as number;
    expect(Math.abs(of('1-0') / 0.001 - 1)).toBeLessThan(0.25);
    expect(Math.abs(of('2-0') / 0.004 - 1)).toBeLessThan(0.25);
    expect(r.warnings.some((w) => w.code === 'UNCERTAINTY_ESTIMATED')).toBe(true);
  });
});

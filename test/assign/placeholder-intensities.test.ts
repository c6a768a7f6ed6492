import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { uninformativeIntensities } from '../../src/assign/intensity.js';
import { assignLinearLines } from '../../src/linear/assign.js';
import { runChecks } from '../../src/qa/checks.js';
import { parseSpecies } from '../../src/species/parse.js';
import { genLineList, genUnassigned, N2O_446 } from '../helpers/independent-linear.js';
import { CO_12_16 } from '../helpers/independent-lines.js';
import { scan, shares } from '../helpers/scan-scenarios.js';

/**
 * Placeholder intensities with a slip: every line at 1 but one at 100 (or one at 0 among 100s) is no Boltzmann
 * envelope, and one rule (src/assign/intensity.ts) now says so for the diatomic and the linear assignment, the
 * identification and the QA checks. Lists from the independent generators (test/helpers/independent-lines.ts,
 * independent-linear.ts: published constant sets with their higher terms, own term values and J bookkeeping).
 */
const ones = (n: number) => Array.from({ length: n }, () => ({ intensity: 1 }));

describe('uninformativeIntensities: a flat list with a few odd lines', () => {
  it('one odd line in ten or more is a placeholder list; two in twenty, or one in nine, are not', () => {
    expect(uninformativeIntensities([...ones(20), { intensity: 100 }])).toMatch(
      /every line but 1 carries the same intensity \(1\)/,
    );
    expect(uninformativeIntensities([...ones(9).map(() => ({ intensity: 100 })), { intensity: 0 }])).toMatch(
      /but 1 carries the same intensity \(100\)/,
    );
    // Near-flat (within ×1.2) with one odd line.
    const near = Array.from({ length: 12 }, (_, i) => ({ intensity: 1 + 0.01 * i }));
    expect(uninformativeIntensities([...near, { intensity: 40 }])).toMatch(/all but 1 of the 13 intensities/);
    expect(uninformativeIntensities([...ones(18), { intensity: 100 }, { intensity: 50 }])).toBeUndefined();
    expect(uninformativeIntensities([...ones(8), { intensity: 100 }])).toBeUndefined();
    // 100 lines may carry two odd ones (one in 50).
    expect(uninformativeIntensities([...ones(98), { intensity: 100 }, { intensity: 0 }])).toMatch(/but 2 carries/);
  });

  it('a real band envelope is never taken for one: CO 1-0 at 296 K and at 1500 K, 20 to 120 lines', () => {
    for (const [T, jMax] of [
      [296, 10],
      [296, 30],
      [1500, 60],
    ] as const) {
      const s = scan({
        parts: [{ molecule: CO_12_16, abundance: 1, bands: [{ upper: 1, lower: 0, jMax }] }],
        temperature: T,
        sigma: 0.002,
        withUncertainties: true,
        withIntensities: true,
        missing: 0,
        spurious: 0,
        detection: 0,
        seed: 3,
      });
      expect(uninformativeIntensities(s.lines)).toBeUndefined();
    }
  });
});

describe('the assignment and the checks ignore them', () => {
  const base = scan({
    parts: [{ molecule: CO_12_16, abundance: 1, bands: [{ upper: 1, lower: 0, jMax: 25 }] }],
    temperature: 296,
    sigma: 0.002,
    withUncertainties: false,
    withIntensities: false,
    missing: 0.05,
    spurious: 0.1,
    detection: 1e-4,
    seed: 5,
  });
  const spurious = base.truth.findIndex((t) => !t);
  const real = base.truth.findIndex((t) => t?.j === 20);
  const variants: [string, (i: number) => number][] = [
    ['a spurious line at 100 among 1s', (i) => (i === spurious ? 100 : 1)],
    ['an R(20) or P(20) at 100 among 1s', (i) => (i === real ? 100 : 1)],
    ['one line at 0 among 100s', (i) => (i === real ? 0 : 100)],
  ];
  for (const [name, intensity] of variants) {
    it(`CO 1-0, ${name}: ≥ 98 % correct declared or not, temperature not measured from them`, () => {
      const lines = base.lines.map((l, i) => ({ ...l, intensity: intensity(i) }));
      for (const declared of [parseSpecies('CO'), undefined]) {
        // Before: 78-80 % correct (the P or R branch refused on the odd line's intensity) and, undeclared, refused
        // ("no species of the reference library explains these lines", CO scoring 0.32-0.38).
        const a = analyseLineList(lines, declared);
        const r = shares(base.truth, a.result.lines);
        expect(r.correct / r.trueLines, r.misses.slice(0, 4).join('; ')).toBeGreaterThanOrEqual(0.98);
        expect(r.spuriousTaken).toBe(0);
        expect(a.result.warnings.find((w) => w.code === 'INTENSITIES_IGNORED')?.message).toMatch(/but 1 carries/);
        const report = runChecks(lines, declared, a);
        const temperature = report.checks.find((c) => c.id === 'temperature');
        expect(temperature?.status).toBe('not-evaluated');
        expect(temperature?.message).toMatch(/intensities ignored: every line but 1/);
        // The unexplained share is counted by lines (5 spurious of 50), not by the odd line's intensity.
        const unexplained = report.checks.find((c) => c.id === 'unexplained-lines');
        expect(unexplained?.measured.basis).toBe('line count');
      }
    });
  }

  it('N2O ν3 (linear), one spurious line at 100 among 1s: the unexplained share is by count, not 46 % by intensity', () => {
    const list = genLineList({
      molecule: N2O_446,
      bands: [{ upper: '0001', lower: '0000' }],
      minRelativeIntensity: 1e-3,
      jMax: 60,
      sigma: 1e-3,
      spurious: 5,
      seed: 4,
    });
    const odd = list.findIndex((l) => l.kind === 'spurious');
    const peaks = genUnassigned(list).map((p, i) => ({ ...p, intensity: i === odd ? 100 : 1 }));
    const r = assignLinearLines('N2O', peaks);
    const real = list.filter((l) => l.kind !== 'spurious').length;
    expect(r.lines.filter((l, i) => l.assignment && list[i]?.kind !== 'spurious').length).toBe(real);
    // Measured: 0.040 (5 of 126 lines); weighed by the placeholder intensities it was (5 + 99)/(126 + 99) = 0.46.
    expect(r.unexplainedFraction).toBeCloseTo(5 / list.length, 6);
    expect(r.warnings.join(' ')).toMatch(/intensities ignored: every line but 1 carries the same intensity \(1\)/);
  });

  it('the same list with all zeros: the unexplained share is by count (it was 0 of 0 intensity, a pass)', () => {
    const lines = base.lines.map((l) => ({ ...l, intensity: 0 }));
    const a = analyseLineList(lines, parseSpecies('CO'));
    const unexplained = runChecks(lines, parseSpecies('CO'), a).checks.find((c) => c.id === 'unexplained-lines');
    expect(unexplained?.measured.basis).toBe('line count');
    expect(unexplained?.measured.fraction).toBeGreaterThan(0.05);
  });
});

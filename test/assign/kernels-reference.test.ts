import { describe, expect, it } from 'vitest';
import { candidateLines, isotopologuesMeant, naturalAbundances } from '../../src/assign/candidates.js';
import { bandStrengthGuess, honlLondon, relativeIntensity } from '../../src/assign/intensity.js';
import { estimateOffset, median } from '../../src/assign/offset.js';
import { parseSpecies } from '../../src/species/parse.js';

// Fast checks of the small kernels of the automatic assignment against values worked out by hand or published,
// each computed inside `it`.

/** Second radiation constant c₂ = hc/k = 1.438776877503933 cm K from the exact SI values of h, c and k. */
const C2 = 1.438776877503933;

describe('line intensities for ranking (SCIENCE.md §5)', () => {
  it('Hönl–London factors J″+1 (R), J″ (P), 0 (Q) and the rough band strengths (common practice)', () => {
    expect([honlLondon('R', 0), honlLondon('R', 7), honlLondon('P', 7), honlLondon('Q', 7)]).toEqual([1, 8, 7, 0]);
    // 1 per Δv = 0; (v″ + 1) for Δv = 1; 10^−2(Δv−1) for overtones.
    expect(bandStrengthGuess({ upper: 3, lower: 3 })).toBe(1);
    expect(bandStrengthGuess({ upper: 1, lower: 0 })).toBe(1);
    expect(bandStrengthGuess({ upper: 3, lower: 2 })).toBe(3);
    expect(bandStrengthGuess({ upper: 2, lower: 0 })).toBeCloseTo(0.01, 15);
    expect(bandStrengthGuess({ upper: 4, lower: 1 })).toBeCloseTo(1e-4, 18);
  });

  it('I = ν S e^{−c₂E″/T}(1 − e^{−c₂ν/T}), by hand at 2000 cm⁻¹, R(3), E″ = 23 cm⁻¹, 296 K (1e-12 relative)', () => {
    const expected = 2000 * 4 * Math.exp((-C2 * 23) / 296) * (1 - Math.exp((-C2 * 2000) / 296));
    expect(Math.abs(relativeIntensity(2000, 'R', 3, 23, 296) - expected) / expected).toBeLessThan(1e-12);
    // At low ν the stimulated-emission factor matters: 20 cm⁻¹, P(2), E″ = 6 cm⁻¹, 80 K.
    const low = 20 * 2 * Math.exp((-C2 * 6) / 80) * (1 - Math.exp((-C2 * 20) / 80));
    expect(Math.abs(relativeIntensity(20, 'P', 2, 6, 80) - low) / low).toBeLessThan(1e-12);
    expect(relativeIntensity(2000, 'Q', 3, 23, 296)).toBe(0);
  });
});

describe('instrument offset by voting', () => {
  it('the median of the best window, its spread, and the runner-up two windows away', () => {
    // Predicted lines at 100, 200, 300, 400 (intensity 4: weight 2 each); peaks 0.1 above each (one 0.12),
    // and two spurious peaks 0.5 below 200 and 300.
    const predicted = [100, 200, 300, 400].map((position) => ({ position, intensity: 4 }));
    const observed = [100.1, 200.1, 300.12, 400.1, 199.5, 299.5];
    const e = estimateOffset(predicted, observed, 1, 0.05);
    if (!e) throw new Error('no estimate');
    // Window holding 0.1, 0.1, 0.1, 0.12: median 0.1; |d − 0.1| = 0, 0, 0, 0.02 → MAD 0 → spread 0.
    expect(e.offset).toBeCloseTo(0.1, 12);
    expect(e.spread).toBeCloseTo(0, 12);
    expect(e.votes).toBe(8);
    // The two −0.5 differences are ≥ 2 windows away and share one window: weight 4.
    expect(e.runnerUpVotes).toBe(4);
    // Differences beyond ±maxOffset do not vote: with maxOffset 0.3 the −0.5 votes are gone.
    expect(estimateOffset(predicted, observed, 0.3, 0.05)?.runnerUpVotes).toBe(0);
    expect(estimateOffset(predicted, [5, 1000], 1, 0.05)).toBeUndefined();
  });

  it('weights are √intensity: one line of intensity 100 outvotes four of intensity 4 (10 against 8)', () => {
    const predicted = [
      { position: 100, intensity: 100 },
      ...[200, 300, 400, 500].map((position) => ({ position, intensity: 4 })),
    ];
    const e = estimateOffset(predicted, [99.7, 200.2, 300.2, 400.2, 500.2], 0.5, 0.05);
    expect(e?.offset).toBeCloseTo(-0.3, 12);
    expect(e?.votes).toBe(10);
    expect(e?.runnerUpVotes).toBe(8);
  });

  it('median of odd and even counts; NaN for none', () => {
    expect(median([3, 1, 2])).toBe(2);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median([])).toBeNaN();
    expect(median([-5])).toBe(-5);
  });
});

describe('candidate lines from the library', () => {
  // CIAAW 2013 best measurements (Meija et al., Pure Appl. Chem. 88, 293 (2016), Table 1; from memory):
  // 12C 0.988922, 13C 0.011078, 16O 0.9976206, 18O 0.0020004. Tolerance 2e-6 (their last digits).
  it('CO stands for its natural isotopologues, most abundant first, each above the 1e-3 floor', () => {
    const meant = isotopologuesMeant(parseSpecies('CO'), 1e-3);
    expect(meant.map((m) => m.iso.formula)).toEqual(['12C-16O', '13C-16O', '12C-18O']);
    expect(Math.abs((meant[0]?.abundance as number) - 0.988922 * 0.9976206)).toBeLessThan(2e-6);
    const c13 = meant.find((m) => m.iso.formula === '13C-16O');
    expect(Math.abs((c13?.abundance as number) - 0.011078 * 0.9976206)).toBeLessThan(2e-6);
    expect(Math.abs((meant[2]?.abundance as number) - 0.988922 * 0.0020004)).toBeLessThan(2e-6);
    for (let i = 1; i < meant.length; i++)
      expect(meant[i]?.abundance as number).toBeLessThanOrEqual(meant[i - 1]?.abundance as number);
    for (const m of meant) expect(m.abundance).toBeGreaterThanOrEqual(1e-3);
    // A mass number names one isotopologue, abundance 1.
    expect(isotopologuesMeant(parseSpecies('13C16O'), 1e-3)).toEqual([{ iso: parseSpecies('13C16O'), abundance: 1 }]);
    const all = naturalAbundances('CO');
    expect(all.get('12C-16O')).toBe(meant[0]?.abundance);
    expect([...all.values()].reduce((a, b) => a + b, 0)).toBeCloseTo(1, 3);
  });

  it('12C16O 1-0 in 2140–2150 cm⁻¹: R(0) 2147.08 and P(1) 2139.43 just outside (HITRAN, from memory); the strongest is 1', () => {
    const c = candidateLines([{ iso: parseSpecies('12C16O'), abundance: 1 }], 2140, 2150);
    const r0 = c.find((x) => x.band.upper === 1 && x.band.lower === 0 && x.branch === 'R' && x.j === 0);
    expect(Math.abs((r0?.position as number) - 2147.08)).toBeLessThan(0.05);
    expect(r0?.lowerEnergy).toBe(0);
    expect(c.find((x) => x.branch === 'P' && x.j === 1 && x.band.upper === 1 && x.band.lower === 0)).toBeUndefined();
    for (const x of c) {
      expect(x.position).toBeGreaterThanOrEqual(2140);
      expect(x.position).toBeLessThanOrEqual(2150);
      expect(x.species).toBe('12C-16O');
    }
    expect(Math.max(...c.map((x) => x.intensity))).toBe(1);
    // Hot-band lines (2-1 R) fall here too, weaker by the population of v = 1: e^{−c₂·2143/296} ≈ 3e-5 × 2.
    const hot = c.filter((x) => x.band.lower === 1);
    for (const h of hot) expect(h.intensity).toBeLessThan(1e-3);
  });

  it('the intensity floor and the temperature: at 1500 K hot bands enter above a floor of 1e-2', () => {
    const iso = [{ iso: parseSpecies('12C16O'), abundance: 1 }];
    const cold = candidateLines(iso, 2000, 2250, { minRelativeIntensity: 1e-2 });
    const warm = candidateLines(iso, 2000, 2250, { minRelativeIntensity: 1e-2, temperature: 1500 });
    expect(cold.some((x) => x.band.lower === 1)).toBe(false);
    expect(warm.some((x) => x.band.lower === 1)).toBe(true);
    for (const x of cold) expect(x.intensity).toBeGreaterThanOrEqual(1e-2);
    // maxJ and maxLowerV bound what is predicted.
    const few = candidateLines(iso, 2000, 2250, { maxJ: 3, maxLowerV: 0 });
    expect(few.every((x) => x.j <= 3 && x.band.lower === 0)).toBe(true);
    expect(few.filter((x) => x.band.upper === 1).map((x) => `${x.branch}${x.j}`)).toEqual([
      'P1',
      'P2',
      'P3',
      'R0',
      'R1',
      'R2',
      'R3',
    ]);
    // maxDeltaV 0: no vibrational band reaches this window.
    expect(candidateLines(iso, 2000, 2250, { maxDeltaV: 0 })).toEqual([]);
  });
});

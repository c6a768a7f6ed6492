import { describe, expect, it } from 'vitest';
import { candidateLines, isotopologuesMeant } from '../../src/assign/candidates.js';
import { bandStrengthGuess, relativeIntensity } from '../../src/assign/intensity.js';
import { estimateOffset } from '../../src/assign/offset.js';
import { compileDunham } from '../../src/models/dunham.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';

// Edges of the candidate-line and offset kernels of the automatic assignment: bounds met exactly, the Boltzmann cut
// of hot bands, the polynomial's turning point for a hydride, and the voting windows. Every value is computed
// inside `it`; expected values are worked out in the comments.

const CO = [{ iso: parseSpecies('12C16O'), abundance: 1 }];

describe('which isotopologues a species stands for', () => {
  it('H35Cl fixes chlorine only: hydrogen is its natural mixture (1H 0.99984426, CIAAW 2013 best measurement, from memory)', () => {
    const meant = isotopologuesMeant(parseSpecies('H35Cl'), 1e-6);
    expect(meant.map((m) => m.iso.formula)).toEqual(['1H-35Cl', '2H-35Cl']);
    // Tolerance 1e-8: the last published digit.
    expect(Math.abs((meant[0]?.abundance as number) - 0.99984426)).toBeLessThan(1e-8);
    expect(Math.abs((meant[1]?.abundance as number) - (1 - 0.99984426))).toBeLessThan(1e-8);
    // At the default-like floor 1e-3 the deuterated one (1.6e-4) drops out.
    expect(isotopologuesMeant(parseSpecies('H35Cl'), 1e-3).map((m) => m.iso.formula)).toEqual(['1H-35Cl']);
  });

  it('an isotopologue exactly at the abundance floor is kept (≥)', () => {
    const meant = isotopologuesMeant(parseSpecies('CO'), 1e-3);
    const c13 = meant.find((m) => m.iso.formula === '13C-16O')?.abundance as number;
    const atFloor = isotopologuesMeant(parseSpecies('CO'), c13).map((m) => m.iso.formula);
    expect(atFloor).toEqual(['12C-16O', '13C-16O']);
  });
});

describe('candidate lines: bounds, cuts and intensities', () => {
  it('a species the library lacks (NO) predicts nothing, and does not stop the others', () => {
    const no = isotopologuesMeant(parseSpecies('NO'), 1e-3);
    expect(candidateLines(no, 1800, 1950)).toEqual([]);
    const both = candidateLines([...no, ...CO], 2140, 2150);
    expect(both.length).toBeGreaterThan(0);
    expect(new Set(both.map((c) => c.species))).toEqual(new Set(['12C-16O']));
  });

  it('the window includes lines exactly at its ends', () => {
    const all = candidateLines(CO, 2140, 2155);
    const r0 = all.find((c) => c.branch === 'R' && c.j === 0 && c.band.lower === 0) as { position: number };
    const r1 = all.find((c) => c.branch === 'R' && c.j === 1 && c.band.lower === 0) as { position: number };
    const exact = candidateLines(CO, r0.position, r1.position, { maxLowerV: 0 });
    expect(exact.map((c) => `${c.branch}${c.j}`)).toEqual(['R0', 'R1']);
  });

  it('a floor of 1 keeps exactly the strongest line (intensity ≥ floor)', () => {
    const top = candidateLines(CO, 2000, 2250, { minRelativeIntensity: 1 });
    expect(top).toHaveLength(1);
    expect(top[0]?.intensity).toBe(1);
    // R(7) of the fundamental at 296 K: the R-branch maximum lies near J = √(kT/2hcB) − ½ ≈ 6.9 (B = 1.93 cm⁻¹,
    // kT/hc = 205.7 cm⁻¹; common practice), and R beats P by the factor J+1 against J.
    expect(`${top[0]?.branch}${top[0]?.j}`).toBe('R7');
  });

  it('lines whose Boltzmann factor underflows to 0 (CO at 10 K, J up to 80) are not predicted', () => {
    const cold = candidateLines(CO, 0, 400, { temperature: 10, minRelativeIntensity: 0 });
    expect(cold.length).toBeGreaterThan(10);
    for (const c of cold) expect(c.intensity).toBeGreaterThan(0);
    // e^{−c₂E″/T} with c₂/T = 0.1439 cm and E″(J = 80) ≈ 12 400 cm⁻¹ is e^{−1780}: 0 in double precision.
    expect(Math.max(...cold.map((c) => c.j))).toBeLessThan(80);
  });

  it('hot bands enter only while their lower level holds ≥ 1e-6 of the population (CO, 296 K)', () => {
    // Population of v = 1: e^{−c₂·2143.3/296} = e^{−10.4} ≈ 3e-5 (kept); v = 2: e^{−c₂·4260/296} ≈ 1e-9 (cut), with
    // ΔG(1/2) = 2143.27 and G(2) − G(0) ≈ 4260 cm⁻¹ (Huber & Herzberg ω_e 2169.8, ω_e x_e 13.29; from memory).
    const c = candidateLines(CO, 2000, 2200, { minRelativeIntensity: 1e-15 });
    expect(c.some((x) => x.band.lower === 1 && x.band.upper === 2)).toBe(true);
    expect(c.some((x) => x.band.lower >= 2)).toBe(false);
    // At 3000 K, v = 2 holds e^{−c₂·4260/3000} ≈ 0.13: the 3-2 band appears.
    const hot = candidateLines(CO, 2000, 2200, { minRelativeIntensity: 1e-15, temperature: 3000 });
    expect(hot.some((x) => x.band.lower === 2 && x.band.upper === 3)).toBe(true);
  });

  it('Δv up to maxDeltaV inclusive: the second overtone 3-0 near 6350 and 4-0 near 8414 cm⁻¹ by default', () => {
    // 4-0 origin G(4) − G(0) = 4ω_e − 20ω_e x_e ≈ 8414 cm⁻¹ (Huber & Herzberg, from memory).
    const four = candidateLines(CO, 8300, 8500, { minRelativeIntensity: 0 });
    expect(four.length).toBeGreaterThan(20);
    // Δv = 4 only: 4-0 and its hot band 5-1 (weighed by e^{−10.4} for v = 1).
    expect(four.every((x) => x.band.upper - x.band.lower === 4)).toBe(true);
    expect(four.filter((x) => x.band.lower === 0).length).toBeGreaterThan(20);
    expect(candidateLines(CO, 8300, 8500, { minRelativeIntensity: 0, maxDeltaV: 3 })).toEqual([]);
    // maxDeltaV 1: no overtone in the 2-0 window near 4260 cm⁻¹.
    expect(candidateLines(CO, 4200, 4300, { maxDeltaV: 1 })).toEqual([]);
    expect(candidateLines(CO, 4200, 4300).length).toBeGreaterThan(0);
  });

  it('every intensity is abundance × band strength × the line formula, over the largest (CO mixture, two bands)', () => {
    const mix = isotopologuesMeant(parseSpecies('CO'), 1e-3);
    const abundance = new Map(mix.map((m) => [m.iso.formula, m.abundance]));
    const c = candidateLines(mix, 2050, 2150, { minRelativeIntensity: 0, temperature: 1000 });
    expect(new Set(c.map((x) => x.species))).toEqual(new Set(['12C-16O', '13C-16O', '12C-18O']));
    const raw = c.map(
      (x) =>
        (abundance.get(x.species) as number) *
        bandStrengthGuess(x.band) *
        relativeIntensity(x.position, x.branch, x.j, x.lowerEnergy, 1000),
    );
    const max = Math.max(...raw);
    c.forEach((x, i) => {
      expect(Math.abs(x.intensity - (raw[i] as number) / max)).toBeLessThan(1e-12);
    });
    // The 2-1 band weighs (v″+1) = 2 times the fundamental per molecule in the lower level: some 2-1 line is here.
    expect(c.some((x) => x.band.upper === 2 && x.band.lower === 1)).toBe(true);
  });

  it('pure rotation has an R branch only (no P lines at negative wavenumbers)', () => {
    const c = candidateLines(CO, -100, 100, { minRelativeIntensity: 0 });
    expect(c.length).toBeGreaterThan(10);
    for (const x of c) {
      expect(x.branch).toBe('R');
      expect(x.band.upper).toBe(x.band.lower);
      expect(x.position).toBeGreaterThan(0);
    }
  });

  it("H35Cl up to J″ = 400: no line past the J where a level's energy polynomial stops rising", () => {
    const iso = parseSpecies('1H35Cl');
    const energy = compileDunham(dunhamFromEntry(constantsFor(iso) as NonNullable<ReturnType<typeof constantsFor>>));
    // The turning J of each level, scanned here: the last J with E(v, J) > E(v, J − 1).
    const turning = (v: number) => {
      let j = 1;
      while (j <= 400 && energy(v, j) > energy(v, j - 1)) j++;
      return j - 1;
    };
    const c = candidateLines([{ iso, abundance: 1 }], -1e6, 1e6, {
      maxJ: 400,
      minRelativeIntensity: 0,
      temperature: 5000,
      maxLowerV: 1,
      maxDeltaV: 1,
    });
    for (const band of [
      { upper: 0, lower: 0 },
      { upper: 1, lower: 0 },
      { upper: 1, lower: 1 },
      { upper: 2, lower: 1 },
    ]) {
      const top = Math.min(turning(band.lower), turning(band.upper) - 1);
      // HCl turns near J ≈ 100 (B/2D ≈ 10.6/(2·5.3e-4) = 1e4 = J(J+1); Huber & Herzberg, from memory).
      expect(top).toBeGreaterThan(80);
      expect(top).toBeLessThan(110);
      const js = c.filter((x) => x.band.upper === band.upper && x.band.lower === band.lower).map((x) => x.j);
      expect(Math.max(...js)).toBe(top);
    }
  });

  it('maxJ near the turning J of H35Cl: the highest J″ is the smaller of ⌊maxJ⌋ and the turning J, fractions included', () => {
    const iso = parseSpecies('1H35Cl');
    const energy = compileDunham(dunhamFromEntry(constantsFor(iso) as NonNullable<ReturnType<typeof constantsFor>>));
    let turn = 1;
    while (energy(0, turn) > energy(0, turn - 1)) turn++;
    turn--;
    // Pure rotation of v = 0: the upper level (J″ + 1) stops rising first, so the band ends at turn − 1.
    const highest = (maxJ: number) =>
      Math.max(
        ...candidateLines([{ iso, abundance: 1 }], -1e6, 1e6, { maxJ, minRelativeIntensity: 0, maxLowerV: 0 })
          .filter((x) => x.band.upper === 0 && x.band.lower === 0)
          .map((x) => x.j),
      );
    for (const maxJ of [turn - 3, turn - 2, turn - 1.5, turn - 1, turn, turn + 0.5, turn + 1, turn + 2, 400]) {
      expect({ maxJ, j: highest(maxJ) }).toEqual({ maxJ, j: Math.min(Math.floor(maxJ), turn - 1) });
    }
  });
});

describe('offset voting: edges', () => {
  it('a peak exactly maxOffset away still votes', () => {
    // 100.5 − 100 = 0.5 exactly in binary.
    const e = estimateOffset([{ position: 100, intensity: 1 }], [100.5], 0.5, 0.05);
    expect(e?.offset).toBe(0.5);
    expect(e?.votes).toBe(1);
  });

  it('votes exactly two windows from the winner count for the runner-up', () => {
    // Differences +0.125 (two votes) and −0.375 (one): |−0.375 − 0.125| = 0.5 = 2 × 0.25, exact in binary.
    const predicted = [100, 200, 300].map((position) => ({ position, intensity: 1 }));
    const e = estimateOffset(predicted, [100.125, 200.125, 299.625], 0.5, 0.25);
    expect(e?.offset).toBe(0.125);
    expect(e?.votes).toBe(2);
    expect(e?.runnerUpVotes).toBe(1);
  });

  it('weak predictions: votes of √0.01 = 0.1 each are summed (three give 0.3)', () => {
    const predicted = [100, 200, 300].map((position) => ({ position, intensity: 0.01 }));
    const e = estimateOffset(predicted, [100.2, 200.2, 300.2], 0.5, 0.05);
    expect(e?.votes).toBeCloseTo(0.3, 12);
    expect(e?.offset).toBeCloseTo(0.2, 9);
  });

  it('a window spans its width inclusive: differences 0 and 0.25 share a window of 0.25', () => {
    const predicted = [100, 200].map((position) => ({ position, intensity: 1 }));
    const e = estimateOffset(predicted, [100, 200.25], 0.5, 0.25);
    expect(e?.votes).toBe(2);
    // Median of 0 and 0.25.
    expect(e?.offset).toBe(0.125);
    // Spread: 1.4826 × median(|0 − 0.125|, |0.25 − 0.125|) = 1.4826 × 0.125.
    expect(e?.spread).toBeCloseTo(1.4826 * 0.125, 12);
  });

  it('of two windows of equal weight the one met first (the lower difference) wins', () => {
    const predicted = [100, 200].map((position) => ({ position, intensity: 1 }));
    const e = estimateOffset(predicted, [99.75, 200.25], 0.5, 0.05);
    expect(e?.offset).toBe(-0.25);
    expect(e?.votes).toBe(1);
    expect(e?.runnerUpVotes).toBe(1);
  });
});

import { describe, expect, it } from 'vitest';
import { quantity } from '../../src/derive/quantity.js';
import { linearCombinationDifferences } from '../../src/linear/combination-differences.js';
import { parseLinearSpecies } from '../../src/linear/species.js';
import { bandTransitions, type LinearTransition } from '../../src/linear/transitions.js';
import { levelKey } from '../../src/linear/types.js';

// Lower-state combination differences of a parallel band, on positions made here from term values written out
// (F(J) = G + B J(J+1) − D [J(J+1)]², invented constants near those of CO2's ν3 band, not a table's): R(J−1) and
// P(J+1) reach the same upper level, so Δ₂F″(J) = F″(J+1) − F″(J−1) = B″(4J + 2) − D″[(J+1)²(J+2)² − (J−1)²J²],
// and the fit of Δ₂F″ gives back B″ and D″ exactly, whatever the upper level's constants.
const F = (G: number, B: number, D: number, J: number) => G + B * J * (J + 1) - D * (J * (J + 1)) ** 2;
const LOWER = { G: 0, B: 0.39, D: 1.3e-7 };
const UPPER = { G: 2349.1, B: 0.387, D: 1.4e-7 };

function band(formula: string, sigma?: (i: number) => number) {
  const species = parseLinearSpecies(formula);
  const upper = { v: [0, 0, 1], l: 0 };
  const lower = { v: [0, 0, 0], l: 0 };
  const lines = bandTransitions(species, upper, lower, 30);
  const transitions = new Map<number, LinearTransition>();
  const input = lines.map((t, i) => {
    transitions.set(i, t);
    const position = F(UPPER.G, UPPER.B, UPPER.D, t.upperJ) - F(LOWER.G, LOWER.B, LOWER.D, t.j);
    return sigma ? { position, uncertainty: sigma(i) } : { position };
  });
  return { species, lower, lines, transitions, input };
}

describe('lower-state combination differences of a linear molecule', () => {
  it('CO2 626 ν3 (even J″ only): B″ and D″ exactly, Δ₂F″ at odd J, the deviation from the full fit in σ', () => {
    const { species, lower, transitions, input } = band('CO2', () => 0.001);
    const levels = [
      {
        key: levelKey(lower),
        B: quantity(0.39 + 2e-6, 1e-6, 'cm-1'),
        D: quantity(1.3e-7, 1e-10, 'cm-1'),
      },
    ];
    const [cd, ...more] = linearCombinationDifferences(species, input, transitions, new Map(), levels);
    expect(more).toEqual([]);
    if (!cd) throw new Error('no combination differences');
    expect(cd.kind).toBe('lower');
    expect(cd.band).toBe('00⁰1–00⁰0');
    expect(cd.level).toBe('00⁰0');
    // R(0…28) with P(2…30): J = 1, 3, …, 29.
    expect(cd.points.map((p) => p.j)).toEqual([1, 3, 5, 7, 9, 11, 13, 15, 17, 19, 21, 23, 25, 27, 29]);
    for (const p of cd.points) {
      const J = p.j;
      const d2f = LOWER.B * (4 * J + 2) - LOWER.D * ((J + 1) ** 2 * (J + 2) ** 2 - (J - 1) ** 2 * J ** 2);
      expect(Math.abs(p.value - d2f)).toBeLessThan(1e-9);
      expect(Math.abs(p.uncertainty - Math.SQRT2 * 0.001)).toBeLessThan(1e-15);
      expect(Math.abs(p.residual)).toBeLessThan(1e-9);
    }
    expect(Math.abs(cd.B.value - 0.39)).toBeLessThan(1e-11);
    expect(Math.abs((cd.D?.value as number) - 1.3e-7)).toBeLessThan(1e-14);
    expect(cd.degreesOfFreedom).toBe(13);
    expect(cd.rms).toBeLessThan(1e-9);
    expect(cd.fitted.value).toBe(0.39 + 2e-6);
    // |B_cd − B_fit| / √(σ_cd² + σ_fit²) = 2e-6 / √(σ_cd² + 1e-12).
    expect(Math.abs(cd.deviation - 2e-6 / Math.hypot(cd.B.uncertainty, 1e-6)) / cd.deviation).toBeLessThan(1e-3);
    expect(cd.B.uncertainty).toBeGreaterThan(0);
    expect(cd.B.unit).toBe('cm-1');
  });

  it('without line σ the points carry the fit scatter; a level without D gives B alone (absorbing D″)', () => {
    const { species, lower, transitions, input } = band('OCS');
    // OCS has every J: pairs R(J−1), P(J+1) for J = 1 … 29.
    const onlyB = linearCombinationDifferences(species, input, transitions, new Map(), [
      { key: levelKey(lower), B: quantity(0.39, 1e-5, 'cm-1') },
    ]);
    const cd = onlyB[0];
    if (!cd) throw new Error('no combination differences');
    expect(cd.points.map((p) => p.j)).toEqual(Array.from({ length: 29 }, (_, i) => i + 1));
    expect(cd.D).toBeUndefined();
    expect(cd.degreesOfFreedom).toBe(28);
    // Without D″ the B-only fit is biased low (D″ > 0 pulls the differences down at high J) and leaves residuals.
    expect(cd.B.value).toBeLessThan(0.39);
    expect(cd.rms).toBeGreaterThan(1e-6);
    const s = Math.sqrt(cd.points.reduce((a, p) => a + p.residual * p.residual, 0) / cd.degreesOfFreedom);
    for (const p of cd.points) expect(Math.abs(p.uncertainty - s) / s).toBeLessThan(1e-9);
  });

  it('rejected lines, Π lower levels and too few pairs leave a band out; the level must have a B from the fit', () => {
    const { species, lower, lines, transitions, input } = band('OCS', () => 0.002);
    const levels = [{ key: levelKey(lower), B: quantity(0.39, 1e-5, 'cm-1'), D: quantity(1.3e-7, 1e-9, 'cm-1') }];
    // Reject every P line but P(2), P(3), P(4), P(5): pairs J = 1, 2, 3, 4 remain (four: enough for B alone).
    const rejected = new Map<number, string>();
    lines.forEach((t, i) => {
      if (t.branch === 'P' && t.j > 5) rejected.set(i, 'test');
    });
    const four = linearCombinationDifferences(species, input, transitions, rejected, levels)[0];
    expect(four?.points.map((p) => p.j)).toEqual([1, 2, 3, 4]);
    expect(four?.D).toBeUndefined();
    lines.forEach((t, i) => {
      if (t.branch === 'P' && t.j === 5) rejected.set(i, 'test');
    });
    expect(linearCombinationDifferences(species, input, transitions, rejected, levels)).toEqual([]);
    expect(linearCombinationDifferences(species, input, transitions, new Map(), [])).toEqual([]);
  });
});

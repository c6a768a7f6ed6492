import { describe, expect, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';

/**
 * Term selection at its stated level (p < 0.01, the documented default): pure-rotation lines R(0)…R(29) whose
 * residuals are built so that adding D to the level model has a known F statistic on (1, 28) degrees of freedom.
 * Positions are 2B(J+1) + σ(a û + b ŵ): û is the D column made orthogonal to the B column, ŵ a fixed pattern
 * orthogonal to both, each of unit length. Then χ²(B) = a² + b², χ²(B, D) = b², and with b² = 28 the statistic is
 * F = a². Critical values from scipy.stats.f.isf(p, 1, 28): p = 0.009 → F = 7.8798, p = 0.011 → F = 7.4167.
 */
const SPECIES = '12C-16O';
const masses = new Map([[SPECIES, reducedMass(parseSpecies(SPECIES))]]);
const N = 30;
const SIGMA = 0.001;
const B = 1.9225;

const dot = (x: readonly number[], y: readonly number[]) => x.reduce((s, xi, i) => s + xi * (y[i] as number), 0);
const scale = (x: readonly number[], k: number) => x.map((xi) => xi * k);
const minus = (x: readonly number[], y: readonly number[]) => x.map((xi, i) => xi - (y[i] as number));
const unit = (x: readonly number[]) => scale(x, 1 / Math.sqrt(dot(x, x)));
/** x with its components along the (orthonormal) basis removed. */
const orthogonalTo = (x: readonly number[], basis: readonly (readonly number[])[]) =>
  basis.reduce((acc, e) => minus(acc, scale(e, dot(acc, e))), [...x]);

function linesWithF(f: number): LineInput[] {
  const js = Array.from({ length: N }, (_, j) => j);
  // Columns of the level model for R(J): B multiplies x′ − x = 2(J+1), D multiplies −(x′² − x²) = −4(J+1)³.
  const bCol = js.map((j) => 2 * (j + 1));
  const dCol = js.map((j) => -4 * (j + 1) ** 3);
  const e1 = unit(bCol);
  const u = unit(orthogonalTo(dCol, [e1]));
  const pattern = js.map((j) => (j % 3 === 0 ? 1 : j % 3 === 1 ? -0.5 : -0.4) + 0.1 * Math.cos(j));
  const w = unit(orthogonalTo(pattern, [e1, u]));
  const a = Math.sqrt(f);
  const b = Math.sqrt(N - 2);
  return js.map((j) => ({
    position: B * (bCol[j] as number) + SIGMA * (a * (u[j] as number) + b * (w[j] as number)),
    uncertainty: SIGMA,
    assignment: { species: SPECIES, band: { upper: 0, lower: 0 }, branch: 'R' as const, j, source: 'given' as const },
  }));
}

function termsOfGround(f: number) {
  const r = fitLineList(linesWithF(f), masses, { maxCentrifugalOrder: 2 });
  return { terms: r.model.levelTerms.find((t) => t.v === 0)?.terms ?? [], r };
}

describe('term selection at p < 0.01 (nested F test on 1 and 28 degrees of freedom)', () => {
  it('keeps D when F = 7.88 (p = 0.009, just inside the level)', () => {
    const { terms, r } = termsOfGround(7.8797594769215396);
    expect(terms).toEqual(['B', 'D']);
    // Construction check: with D the residual χ² is b² = 28 on 28 degrees of freedom.
    expect(r.statistics.degreesOfFreedom).toBe(28);
    expect(Math.abs((r.statistics.reducedChiSquare as number) - 1)).toBeLessThan(1e-6);
    expect(r.statistics.rejected).toBe(0);
  });

  it('leaves D out when F = 7.42 (p = 0.011, just outside the level)', () => {
    const { terms, r } = termsOfGround(7.416740862305518);
    expect(terms).toEqual(['B']);
    // Without D: χ² = a² + b² = 35.42 on 29 degrees of freedom.
    expect(r.statistics.degreesOfFreedom).toBe(29);
    expect(Math.abs((r.statistics.reducedChiSquare as number) * 29 - (28 + 7.416740862305518))).toBeLessThan(1e-5);
    expect(r.statistics.rejected).toBe(0);
  });

  it('moves with termSignificance: F = 7.42 is kept at p < 0.02 and F = 7.88 refused at p < 0.005', () => {
    expect(
      fitLineList(linesWithF(7.416740862305518), masses, { maxCentrifugalOrder: 2, termSignificance: 0.02 }).model
        .levelTerms[0]?.terms,
    ).toEqual(['B', 'D']);
    expect(
      fitLineList(linesWithF(7.8797594769215396), masses, { maxCentrifugalOrder: 2, termSignificance: 0.005 }).model
        .levelTerms[0]?.terms,
    ).toEqual(['B']);
  });
});

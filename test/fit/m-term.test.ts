import { describe, expect, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';

/**
 * The x⁵ term M_v of the level model. Pure-rotation lines R(0)–R(80) of a CO-like ground state written out here
 * (F(J) = B x − D x² + H x³ + L x⁴ + M x⁵, x = J(J+1), not src/models): B, D, H, L, M are the values a scratch fit
 * of the real ¹²C¹⁶O database pure-rotation lines to x⁵ gave (test/fixtures/co-database-lines), rounded.
 * Positions noise-free, σ = 1e-6 cm⁻¹. In absolute mode M_0 is then below the term test (the L model leaves rms
 * 2.2e-7 cm⁻¹, a fifth of σ), so the recovery is run a posteriori, where noise-free lines make every term
 * significant.
 */
const B = 1.9225289;
const D = 6.1215e-6;
const H = 5.81e-12;
const L = -3.65e-17;
const M = -5.7e-23;
const F = (j: number) => {
  const x = j * (j + 1);
  return B * x - D * x ** 2 + H * x ** 3 + L * x ** 4 + M * x ** 5;
};
const SPECIES = '12C-16O';
const masses = new Map([[SPECIES, reducedMass(parseSpecies(SPECIES))]]);
const lines: LineInput[] = Array.from({ length: 81 }, (_, j) => ({
  position: F(j + 1) - F(j),
  uncertainty: 1e-6,
  assignment: { species: SPECIES, band: { upper: 0, lower: 0 }, branch: 'R' as const, j, source: 'given' as const },
}));

describe('level model to M_v (x⁵)', () => {
  it('recovers M_0 when the lines need it (J to 80), and B…L to the rounding of the generator', () => {
    const r = fitLineList(lines, masses);
    const g = r.levels[0];
    expect(r.model.levelTerms[0]?.terms).toEqual(['B', 'D', 'H', 'L', 'M']);
    // Noise-free lines: the fit returns the generator's constants to far below their σ (tolerance 1e-9 relative
    // for B and D, 1e-4 for H and 1e-2 for L and M, the last limited by the conditioning of x⁵ against x⁴).
    expect(Math.abs((g?.B.value as number) / B - 1)).toBeLessThan(1e-9);
    expect(Math.abs((g?.D?.value as number) / D - 1)).toBeLessThan(1e-9);
    expect(Math.abs((g?.H?.value as number) / H - 1)).toBeLessThan(1e-4);
    expect(Math.abs((g?.L?.value as number) / L - 1)).toBeLessThan(1e-2);
    expect(Math.abs((g?.M?.value as number) / M - 1)).toBeLessThan(1e-2);
  });

  it('with maxCentrifugalOrder 4 (or M below the term test), M_0 is carried as a constrained term and said so', () => {
    const below = fitLineList(lines, masses, { uncertaintyMode: 'absolute' });
    expect(below.model.levelTerms[0]?.terms).toEqual(['B', 'D', 'H', 'L']);
    expect(below.warnings.find((x) => x.code === 'TERMS_CONSTRAINED')?.message).toContain('M_0 = 0 ±');
    const r = fitLineList(
      lines.filter((l) => (l.assignment?.j as number) <= 40),
      masses,
      { uncertaintyMode: 'absolute', maxCentrifugalOrder: 4 },
    );
    expect(r.model.levelTerms[0]?.terms).toEqual(['B', 'D', 'H', 'L']);
    expect(r.levels[0]?.M).toBeUndefined();
    const w = r.warnings.find((x) => x.code === 'TERMS_CONSTRAINED');
    expect(w?.message).toContain('M_0');
  });
});

import { describe, expect, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { predictBand } from '../../src/models/predict.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { seededNormal } from '../helpers/random.js';

// H³⁵Cl (Huber & Herzberg) and H³⁷Cl derived from it by Born–Oppenheimer mass scaling (REFERENCE-DATA §5e):
// a mass-reduced Dunham fit must find one set of U_kl = Y_kl μ^(k/2+l) for both.
describe('several isotopologues', () => {
  const noise = seededNormal(21);
  const lines: LineInput[] = [];
  const masses = new Map();
  for (const s of ['H35Cl', 'H37Cl']) {
    const iso = parseSpecies(s);
    masses.set(iso.formula, reducedMass(iso));
    const y = dunhamFromEntry(constantsFor(iso) ?? (undefined as never));
    for (const b of [
      { upper: 1, lower: 0 },
      { upper: 2, lower: 0 },
      { upper: 3, lower: 0 },
    ]) {
      for (const p of predictBand(y, b, 10)) {
        lines.push({
          position: p.position + 0.002 * noise(),
          uncertainty: 0.002,
          assignment: { species: iso.formula, band: b, branch: p.branch, j: p.j, source: 'given' },
        });
      }
    }
  }
  // Fitted inside each test, so that mutation testing sees the fit (see test/MUTANTS.md).
  const fitted = () => fitLineList(lines, masses, { massReducedDunham: true });

  it('fits each isotopologue and gives ω_e ∝ μ^−½ and B_e ∝ μ^−1 (Born–Oppenheimer) to 1e-5 relative', () => {
    const r = fitted();
    const [a, b] = r.equilibrium;
    const mu35 = reducedMass(parseSpecies('H35Cl')).value;
    const mu37 = reducedMass(parseSpecies('H37Cl')).value;
    expect(a?.species).toBe('1H-35Cl');
    expect(
      Math.abs((a?.omega_e?.value as number) / (b?.omega_e?.value as number) / Math.sqrt(mu37 / mu35) - 1),
    ).toBeLessThan(1e-5);
    expect(Math.abs((a?.B_e?.value as number) / (b?.B_e?.value as number) / (mu37 / mu35) - 1)).toBeLessThan(1e-5);
  });

  it('the mass-reduced fit gives U01 = B_e μ = 10.593416 × 0.97959254 cm⁻¹ u (HH, AME2020) within 4σ', () => {
    const r = fitted();
    const u = r.massReducedDunham?.parameters.find((x) => x.name === 'U01');
    const truth = 10.593416 * reducedMass(parseSpecies('H35Cl')).value;
    expect(u).toBeDefined();
    expect(u?.unit).toBe('cm-1 u^1');
    expect(Math.abs((u?.value as number) - truth)).toBeLessThan(4 * (u?.uncertainty as number));
  });

  it('reports cross-checks as approximations: Kratzer D_e within 1 % of the fitted D_e for HCl (Huber & Herzberg agree to 0.1 %)', () => {
    const r = fitted();
    const k = r.crossChecks.find((c) => c.id === 'kratzer-D_e' && c.species === '1H-35Cl');
    expect(k?.approximation).toBe(true);
    expect(Math.abs((k?.value.value as number) / (k?.fitted?.value as number) - 1)).toBeLessThan(0.01);
    const well = r.crossChecks.find((c) => c.id === 'morse-well-depth' && c.species === '1H-35Cl');
    // ω_e²/(4ω_e x_e) = 2990.9463²/(4·52.8186) = 42 342 cm⁻¹ from HH constants (derived), within 1 %.
    expect(Math.abs((well?.value.value as number) / 42342 - 1)).toBeLessThan(0.01);
  });
});

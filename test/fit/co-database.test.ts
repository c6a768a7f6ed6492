import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';

/**
 * Real data: 494 database line positions of ¹²C¹⁶O (bands 0-0 to J = 80, 1-0, 2-0, 3-0, 2-1; HITRAN2020, see
 * test/fixtures/co-database-lines/SOURCE.md) fitted with the given position uncertainties, and the level constants
 * compared with the published B_v, D_v, H_v of v = 0–3 (Gendriesch et al., A&A 497, 927 (2009), Table 2; MHz, kHz,
 * mHz, converted with c = 29 979.2458 MHz per cm⁻¹, exact).
 *
 * Required: v = 1, 2, 3 agree within two combined standard uncertainties, z = Δ/√(σ_fit² + σ_pub²), |z| ≤ 2.
 * v = 0 does not, and this test says so rather than hide it: the 0-0 lines to J = 80 need rotational terms beyond
 * L_0 (a fit of the 0-0 lines alone with terms to x⁶ gives B_0 = 57 635.968 04(14) MHz, z = 0.15, but H_0 stays at
 * 173.9 against 171.68(10) mHz: the database's ground-state model and the laboratory one differ at that level).
 * For v = 0 the bar is relative agreement of B_0 within 2e-8 and of D_0 within 5e-5.
 */
const C_MHZ = 29979.2458;
const data = JSON.parse(readFileSync(new URL('../fixtures/co-database-lines/lines.json', import.meta.url), 'utf8')) as {
  lines: { band: string; branch: 'P' | 'R'; j: number; position: number; uncertainty: number }[];
  published: Record<'B_v_MHz' | 'D_v_kHz' | 'H_v_mHz', { v: number[]; value: number[]; uncertainty: number[] }>;
};
const iso = parseSpecies('12C-16O');
const lines: LineInput[] = data.lines.map((l) => {
  const [upper, lower] = l.band.split('-').map(Number) as [number, number];
  return {
    position: l.position,
    uncertainty: l.uncertainty,
    assignment: { species: iso.formula, band: { upper, lower }, branch: l.branch, j: l.j, source: 'given' },
  };
});
const r = fitLineList(lines, new Map([[iso.formula, reducedMass(iso)]]));
const FACTOR = { B_v_MHz: 1 / C_MHZ, D_v_kHz: 1e-3 / C_MHZ, H_v_mHz: 1e-9 / C_MHZ } as const;
const KIND = { B_v_MHz: 'B', D_v_kHz: 'D', H_v_mHz: 'H' } as const;

function compare(key: keyof typeof FACTOR, v: number) {
  const pub = data.published[key];
  const i = pub.v.indexOf(v);
  const value = (pub.value[i] as number) * FACTOR[key];
  const sigma = (pub.uncertainty[i] as number) * FACTOR[key];
  const fitted = r.levels.find((l) => l.v === v)?.[KIND[key]];
  if (!fitted) throw new Error(`${KIND[key]}_${v} not fitted`);
  return { z: (fitted.value - value) / Math.hypot(fitted.uncertainty, sigma), relative: fitted.value / value - 1 };
}

describe('real CO database lines against published level constants', () => {
  it('fits all five bands with B, D, H, L per level and rejects few lines', () => {
    expect(r.statistics.fitted).toBeGreaterThan(470);
    expect(r.model.levelTerms.every((t) => t.terms.includes('H'))).toBe(true);
  });

  for (const v of [1, 2, 3]) {
    it(`v = ${v}: B_${v}, D_${v}, H_${v} within 2 combined standard uncertainties`, () => {
      for (const key of ['B_v_MHz', 'D_v_kHz', 'H_v_mHz'] as const) expect(Math.abs(compare(key, v).z)).toBeLessThan(2);
    });
  }

  it('v = 0: B_0 within 2e-8 and D_0 within 5e-5 relative (not within the combined uncertainties, see above)', () => {
    expect(Math.abs(compare('B_v_MHz', 0).relative)).toBeLessThan(2e-8);
    expect(Math.abs(compare('D_v_kHz', 0).relative)).toBeLessThan(5e-5);
  });
});

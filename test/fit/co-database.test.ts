import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { type FitOptions, fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';

/**
 * Real data: 494 database line positions of ¹²C¹⁶O (bands 0-0 to J = 80, 1-0, 2-0, 3-0, 2-1; HITRAN2020, see
 * test/fixtures/co-database-lines/SOURCE.md) fitted with the given position uncertainties, and the level constants
 * compared with the published B_v, D_v, H_v of v = 0–3 (Gendriesch et al., A&A 497, 927 (2009), Table 2, whose
 * v = 0 column quotes Winnewisser et al., J. Mol. Spectrosc. 184, 468 (1997); MHz, kHz, mHz, converted with
 * c = 29 979.2458 MHz per cm⁻¹, exact). z = Δ/√(σ_fit² + σ_pub²).
 *
 * Measured (2026-12-02, level model to M_v = x⁵, next term constrained, stated σ judged per group):
 *   default (a-posteriori) fit, every level to M: v = 0 B_0 z = 1.6, D_0 z = 8.6, H_0 z = 24;
 *     v = 1–3 |z| ≤ 0.8 for B, D and H; before M_v: B_0 z = 7.4, D_0 z = 11.8, H_0 z = 27.
 *   absolute mode (the fixture's σ taken as standard uncertainties): B_0 z = 0.6, D_0 z = 5.5, H_0 z = 19.
 * Goal |z| ≤ 3: met for B_0 and for every constant of v = 1–3; not met for D_0 and H_0. The cause is in the data,
 * not the model's order: the database's own pure-rotation lines give H_0 = 173.2–174.4 mHz in every J range from
 * J ≤ 37 to J ≤ 80 and with B…H, B…L or B…M (scratch fits of the 0-0 lines alone), against the laboratory
 * 171.68(10) mHz — a 1.4 % difference in H_0 between the database's ground-state model and the laboratory fit of
 * lines to J ≈ 38, which D_0 shares through their correlation. Over the laboratory's own range (0-0 lines with
 * J ≤ 30, last test) all three agree within 2 σ. Tolerances below are the measured figures rounded up, so that a
 * regression (the old 7.4, 11.8, 27) fails.
 */
const C_MHZ = 29979.2458;
const data = JSON.parse(readFileSync(new URL('../fixtures/co-database-lines/lines.json', import.meta.url), 'utf8')) as {
  lines: { band: string; branch: 'P' | 'R'; j: number; position: number; uncertainty: number }[];
  published: Record<'B_v_MHz' | 'D_v_kHz' | 'H_v_mHz', { v: number[]; value: number[]; uncertainty: number[] }>;
};
const iso = parseSpecies('12C-16O');
const toInput = (l: (typeof data.lines)[number]): LineInput => {
  const [upper, lower] = l.band.split('-').map(Number) as [number, number];
  return {
    position: l.position,
    uncertainty: l.uncertainty,
    assignment: { species: iso.formula, band: { upper, lower }, branch: l.branch, j: l.j, source: 'given' },
  };
};
const lines = data.lines.map(toInput);
const masses = new Map([[iso.formula, reducedMass(iso)]]);
const fitCo = (input: readonly LineInput[], options: FitOptions = {}) => fitLineList(input, masses, options);
type Fit = ReturnType<typeof fitLineList>;
// Fitted inside the tests (once), not while the file is collected, so that mutants of src/fit are active.
let cached: { r: Fit; rAbsolute: Fit } | undefined;
const fits = () => {
  cached ??= { r: fitCo(lines), rAbsolute: fitCo(lines, { uncertaintyMode: 'absolute' }) };
  return cached;
};
const FACTOR = { B_v_MHz: 1 / C_MHZ, D_v_kHz: 1e-3 / C_MHZ, H_v_mHz: 1e-9 / C_MHZ } as const;
const KIND = { B_v_MHz: 'B', D_v_kHz: 'D', H_v_mHz: 'H' } as const;

function compare(result: Fit, key: keyof typeof FACTOR, v: number) {
  const pub = data.published[key];
  const i = pub.v.indexOf(v);
  const value = (pub.value[i] as number) * FACTOR[key];
  const sigma = (pub.uncertainty[i] as number) * FACTOR[key];
  const fitted = result.levels.find((l) => l.v === v)?.[KIND[key]];
  if (!fitted) throw new Error(`${KIND[key]}_${v} not fitted`);
  return { z: (fitted.value - value) / Math.hypot(fitted.uncertainty, sigma), relative: fitted.value / value - 1 };
}

describe('real CO database lines against published level constants', () => {
  it('fits all five bands, the ground state to M_0 (x⁵), and rejects few lines', () => {
    const { r } = fits();
    expect(r.statistics.fitted).toBeGreaterThan(470);
    const ground = r.model.levelTerms.find((t) => t.v === 0);
    expect(ground?.terms).toEqual(['B', 'D', 'H', 'L', 'M']);
    expect(r.levels.find((l) => l.v === 0)?.M).toBeDefined();
  });

  for (const v of [1, 2, 3]) {
    it(`v = ${v}: B_${v}, D_${v}, H_${v} within 2 combined standard uncertainties (both modes)`, () => {
      const { r, rAbsolute } = fits();
      for (const result of [r, rAbsolute])
        for (const key of ['B_v_MHz', 'D_v_kHz', 'H_v_mHz'] as const)
          expect(Math.abs(compare(result, key, v).z)).toBeLessThan(2);
    });
  }

  it('v = 0: B_0 within 3 combined standard uncertainties (measured z = 1.6 a posteriori, 0.6 absolute)', () => {
    const { r, rAbsolute } = fits();
    expect(Math.abs(compare(r, 'B_v_MHz', 0).z)).toBeLessThan(3);
    expect(Math.abs(compare(rAbsolute, 'B_v_MHz', 0).z)).toBeLessThan(3);
  });

  it('v = 0: D_0 and H_0 miss by the database/laboratory difference only (z ≤ 10 and ≤ 26; relative 1e-5 and 2 %)', () => {
    const { r, rAbsolute } = fits();
    for (const result of [r, rAbsolute]) {
      expect(Math.abs(compare(result, 'D_v_kHz', 0).z)).toBeLessThan(10);
      expect(Math.abs(compare(result, 'H_v_mHz', 0).z)).toBeLessThan(26);
      expect(Math.abs(compare(result, 'D_v_kHz', 0).relative)).toBeLessThan(1e-5);
      expect(Math.abs(compare(result, 'H_v_mHz', 0).relative)).toBeLessThan(0.02);
    }
  });

  it('v = 0 over the laboratory J range (0-0 lines with J ≤ 30): B_0, D_0, H_0 within 2 combined σ', () => {
    const low = data.lines.filter((l) => l.band === '0-0' && l.j <= 30).map(toInput);
    const result = fitCo(low);
    for (const key of ['B_v_MHz', 'D_v_kHz', 'H_v_mHz'] as const)
      expect(Math.abs(compare(result, key, 0).z)).toBeLessThan(2);
  });

  it('combination differences agree with the full fit (no alarm; largest measured 2.5σ a posteriori, 1.1σ absolute; before 5.1σ)', () => {
    const { r, rAbsolute } = fits();
    for (const result of [r, rAbsolute]) {
      expect(result.combinationDifferences.length).toBe(8);
      expect(result.warnings.map((w) => w.code)).not.toContain('COMBINATION_DIFFERENCES_DISAGREE');
      for (const c of result.combinationDifferences) expect(c.deviation).toBeLessThan(3);
    }
  });
});

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
 * Goal |z| ≤ 3: met for B_0 and for every constant of v = 1–3; not met for D_0 and H_0 of the full fit, and that
 * is a difference between models, not a fault of the fit: the published v = 0 column is a B, D, H model (no L),
 * whose H_0 absorbs L_0 x⁴. The database's own pure-rotation lines fitted with B, D, H only over J ≤ 30 give
 * 171.95(21) mHz, the laboratory value within 1.2σ; with L_0 in the model (the lines to J = 80 determine it,
 * −3.65e-17 cm⁻¹, and Dunham's estimate from the library's constants is −3.6e-17) they give 173.1–174.4 mHz in every
 * J range, and D_0 moves with H_0 through their correlation. So the v = 0 tests below state the comparison for what
 * it is: the full fit's D_0, H_0 against the laboratory with bars at the measured figures rounded up (a regression
 * to the old 7.4, 11.8, 27 fails), the truncated fit over the laboratory's J range against the fuller model on the
 * same source (must cover it: z ≤ 2), and the laboratory's model on the database lines (z ≤ 2). A per-source
 * systematic σ (the database's model error, which its stated 1e-6 cm⁻¹ do not include) was considered and not
 * added: nothing in a list of smooth computed positions lets a fit estimate it.
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

/** Unit-weight least squares by normal equations on scaled columns (3 × 3 here), with a-posteriori σ. */
function plainLeastSquares(rows: number[][], y: number[]): { values: number[]; sigmas: number[] } {
  const p = (rows[0] as number[]).length;
  const scale = Array.from({ length: p }, (_, k) => Math.sqrt(rows.reduce((s, r) => s + (r[k] as number) ** 2, 0)));
  const a = rows.map((r) => r.map((v, k) => v / (scale[k] as number)));
  const n = Array.from({ length: p }, (_, i) =>
    Array.from({ length: p }, (_, k) => a.reduce((s, r) => s + (r[i] as number) * (r[k] as number), 0)),
  );
  const inverse = invert(n);
  const u = Array.from({ length: p }, (_, i) => a.reduce((s, r, m) => s + (r[i] as number) * (y[m] as number), 0));
  const c = inverse.map((row) => row.reduce((s, v, k) => s + v * (u[k] as number), 0));
  const residual = a.map((r, m) => (y[m] as number) - r.reduce((s, v, k) => s + v * (c[k] as number), 0));
  const s2 = residual.reduce((s, e) => s + e * e, 0) / (y.length - p);
  return {
    values: c.map((v, k) => v / (scale[k] as number)),
    sigmas: c.map((_, k) => Math.sqrt(s2 * ((inverse[k] as number[])[k] as number)) / (scale[k] as number)),
  };
}

/** Gauss–Jordan inverse with partial pivoting (small, well-conditioned after scaling). */
function invert(m: number[][]): number[][] {
  const p = m.length;
  const a = m.map((row, i) => [...row, ...Array.from({ length: p }, (_, k) => (k === i ? 1 : 0))]);
  for (let c = 0; c < p; c++) {
    let best = c;
    for (let r = c + 1; r < p; r++)
      if (Math.abs((a[r] as number[])[c] as number) > Math.abs((a[best] as number[])[c] as number)) best = r;
    [a[c], a[best]] = [a[best] as number[], a[c] as number[]];
    const pivot = (a[c] as number[])[c] as number;
    a[c] = (a[c] as number[]).map((v) => v / pivot);
    for (let r = 0; r < p; r++) {
      if (r === c) continue;
      const f = (a[r] as number[])[c] as number;
      a[r] = (a[r] as number[]).map((v, k) => v - f * ((a[c] as number[])[k] as number));
    }
  }
  return a.map((row) => row.slice(p));
}

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

  it('v = 0 over the laboratory J range (0-0 lines with J ≤ 30, L_0 constrained): B_0, D_0, H_0 cover what the whole pure-rotation list (J ≤ 80, L_0 and M_0 determined) says, within 2 combined σ', () => {
    // The truncated fit's σ must cover the constants of the fuller model on the same source (measured 2026-12-02:
    // z = −1.6, −0.8, −0.4 for B_0, D_0, H_0; H_0 173.8(9) against 174.19(4) mHz).
    const low = fitCo(data.lines.filter((l) => l.band === '0-0' && l.j <= 30).map(toInput));
    const full = fitCo(data.lines.filter((l) => l.band === '0-0').map(toInput));
    expect(low.model.constraints.map((c) => c.parameter)).toContain('L_0');
    expect(full.model.levelTerms[0]?.terms).toEqual(['B', 'D', 'H', 'L', 'M']);
    for (const k of ['B', 'D', 'H'] as const) {
      const a = low.levels[0]?.[k];
      const b = full.levels[0]?.[k];
      if (!a || !b) throw new Error(`${k}_0 not fitted`);
      expect(Math.abs((a.value - b.value) / Math.hypot(a.uncertainty, b.uncertainty)), `${k}_0`).toBeLessThan(2);
    }
  });

  it('the laboratory H_0 is that of a B, D, H model without L: the same 0-0 lines (J ≤ 30) fitted so give it within 2σ', () => {
    // The published v = 0 constants come from a fit of B, D, H to laboratory lines up to J ≈ 38 (Winnewisser et
    // al. 1997 via Gendriesch et al. 2009); L_0 x⁴ (L_0 ≈ −3.6e-17 cm⁻¹ from the database lines to J = 80 and from
    // Dunham's estimate) is then absorbed into an effective H_0. The database lines fitted here with B, D, H only
    // (plain least squares written out in this test, unit weights, J ≤ 30 where the lines' rms is their rounding to
    // 1e-6 cm⁻¹) give 171.95(21) mHz against the laboratory 171.68(10): z = 1.2; B_0 z = −1.9, D_0 z = −0.6
    // (measured 2026-12-02). With L_0 in the model the same lines give 173.1–174.4 mHz for every J range: the v = 0
    // "disagreement" of the full fit (H_0 z = 24) is a comparison between models, not between data and fit.
    const low = data.lines.filter((l) => l.band === '0-0' && l.j <= 30);
    const fit = plainLeastSquares(
      low.map((l) => {
        const x0 = l.j * (l.j + 1);
        const x1 = (l.j + 1) * (l.j + 2);
        return [x1 - x0, -(x1 ** 2 - x0 ** 2), x1 ** 3 - x0 ** 3];
      }),
      low.map((l) => l.position),
    );
    const keys = ['B_v_MHz', 'D_v_kHz', 'H_v_mHz'] as const;
    keys.forEach((key, i) => {
      const pub = data.published[key];
      const z =
        ((fit.values[i] as number) / FACTOR[key] - (pub.value[0] as number)) /
        Math.hypot((fit.sigmas[i] as number) / FACTOR[key], pub.uncertainty[0] as number);
      expect(Math.abs(z), key).toBeLessThan(2);
    });
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

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { PLANCK_H, ROTATIONAL_FACTOR, SPEED_OF_LIGHT } from '../../src/constants/codata-2018.js';
import { solveLeastSquares } from '../../src/linalg/least-squares.js';
import { type DunhamCoefficient, potentialCurves } from '../../src/potential/potential-curve.js';
import { rkrTurningPoints } from '../../src/potential/rkr.js';
import type { VibrationalSeries } from '../../src/potential/vibrational-terms.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';

/**
 * First-order RKR (src/potential/rkr.ts) against a published table of turning points. This is H2 X ¹Σg⁺, not the
 * CO or HCl issue 17 names: no published RKR table of those could be read (DEVELOPERS.md). The table: T. E. Sharp,
 * Atomic Data 2, 119 (1971), v = 0–13, energies above v = 0 in eV and Rmin, Rmax in Å, 4 decimals each, as
 * transcribed in a public repository (test/fixtures/h2-turning-points/SOURCE.md).
 *
 * 1. The half-width f = (r₊ − r₋)/2 depends only on G(v): it is computed from the table's own energies through a
 *    smooth G(v) = Σ_{k=1..K} Y_k (v + ½)^k fitted to E_v − E_0 (unweighted least squares; K the smallest degree
 *    whose rms residual is within 20 % of the energies' rounding scatter 1e-4 eV/√12 = 0.233 cm⁻¹).
 * 2. The turning points need B(v): B_e − α_e(v + ½) with B_e = 60.853, α_e = 3.0622 cm⁻¹ (NIST CCCBDB, Release 22
 *    (2022), experimental data for H2, after Huber & Herzberg 1979; read from the stored page).
 *
 * Masses: AME2020 ¹H (the project's nuclide table); eV → cm⁻¹ = e/(hc) with the exact SI 2019 values of CODATA 2018.
 */
interface Table {
  readonly levels: readonly (readonly [number, number, number, number])[];
}
const TABLE = JSON.parse(
  readFileSync(new URL('../fixtures/h2-turning-points/levels.json', import.meta.url), 'utf8'),
) as Table;
const LEVELS = TABLE.levels.map(([v, eV, rMin, rMax]) => ({ v, eV, rMin, rMax }));

const ELEMENTARY_CHARGE = 1.602176634e-19; // C, exact (CODATA 2018)
const CM_PER_EV = ELEMENTARY_CHARGE / (PLANCK_H * SPEED_OF_LIGHT * 100); // 8065.543937… cm⁻¹
const ROUNDING_SIGMA = (1e-4 * CM_PER_EV) / Math.sqrt(12); // the table's 4-decimal eV, as a uniform scatter
const C = ROTATIONAL_FACTOR / reducedMass(parseSpecies('HH')).value;
const B_PUBLISHED = [60.853, -3.0622]; // B_e, −α_e, cm⁻¹ (CCCBDB / Huber & Herzberg 1979)
const OMEGA_E = 4401.213; // cm⁻¹, same source

/** Y_1 … Y_K of G(x) = Σ Y_k x^k (x = v + ½) fitted to the table's E_v − E_0, and the rms residual (cm⁻¹). */
function fitG(K: number): { g: number[]; rms: number } {
  const n = LEVELS.length;
  const design = new Float64Array(n * K);
  LEVELS.forEach((l, i) => {
    for (let k = 1; k <= K; k++) design[(k - 1) * n + i] = (l.v + 0.5) ** k - 0.5 ** k;
  });
  const observations = Float64Array.from(LEVELS, (l) => l.eV * CM_PER_EV);
  const r = solveLeastSquares({ rows: n, cols: K, design, observations });
  if (r.rankDeficient) throw new Error(`degree ${K}: rank deficient`);
  return { g: [...r.coefficients], rms: Math.sqrt(r.chiSquare / (n - K)) };
}

function chosenDegree(): number {
  for (let K = 4; K <= 10; K++) if (fitG(K).rms <= 1.2 * ROUNDING_SIGMA) return K;
  throw new Error('no degree reaches the rounding scatter');
}

const K = chosenDegree();
const SERIES: VibrationalSeries = { g: fitG(K).g, b: B_PUBLISHED };
const firstOrder = (series: VibrationalSeries, v: number) => rkrTurningPoints({ series, hbar2Over2mu: C }, v);
const ANGSTROM_E4 = (x: number) => Math.round(x * 1e5) / 10; // for messages: units of 1e-4 Å, one decimal

describe('H2 X ¹Σg⁺ (Sharp 1971): G(v) through the table', () => {
  it('needs degree 8 to reach the rounding of the energies; ω_e comes out within 0.5 % of the published one', () => {
    // Measured rms: K = 6 0.41, 7 0.39, 8 0.27, 9 0.26 cm⁻¹ against 0.233 from rounding alone.
    expect(K).toBe(8);
    expect(fitG(K).rms).toBeLessThan(1.2 * ROUNDING_SIGMA);
    // Y_1 = 4414.9 cm⁻¹ (measured; 0.31 % above ω_e = 4401.213): a 14-level polynomial is not Dunham's series,
    // but a G(v) whose leading term strays far from ω_e would mean a wrong conversion or fit.
    expect(Math.abs((SERIES.g[0] as number) / OMEGA_E - 1)).toBeLessThan(0.005);
  });
});

describe('H2 X ¹Σg⁺ (Sharp 1971): half-widths f = (r₊ − r₋)/2 from the table’s own energies', () => {
  /**
   * Tolerance 2e-4 Å for v ≤ 11, 4e-4 Å at v = 12. Why: the table's half-width carries up to 0.5e-4 Å of rounding;
   * the energies' rounding moves f by ≤ 0.2e-4 Å for v ≤ 11 and 0.5e-4 Å at v = 12 (200 trials of uniform ±0.5e-4 eV,
   * refitted, rms); degrees 6–9 of G(v) spread f by up to 0.8e-4 Å (v = 10–12) and 2e-4 Å at v = 12. Measured worst
   * over degrees 6–9: 1.7e-4 Å (v = 0, whose f rests on G(v) extrapolated below v = 0), 3.3e-4 Å at v = 12.
   * What is left beyond rounding (~1e-4 Å) cannot be split here between the G(v) form and the higher-order
   * semiclassical terms first order leaves out.
   */
  const tolerance = (v: number) => (v <= 11 ? 2e-4 : 4e-4);

  it('agree within the tolerance for v = 0–12 (the chosen degree)', () => {
    // Measured (1e-4 Å, ours − table), degree 8: 1.1 −0.5 0.1 0.0 0.2 0.1 0.1 0.3 0.0 0.7 1.3 1.2 1.4.
    for (const l of LEVELS.filter((x) => x.v <= 12)) {
      const diff = firstOrder(SERIES, l.v).f - (l.rMax - l.rMin) / 2;
      expect(Math.abs(diff), `v = ${l.v}: ${ANGSTROM_E4(diff)}e-4 Å`).toBeLessThanOrEqual(tolerance(l.v));
    }
  });

  it('do not hinge on the degree: 6, 7 and 9 agree within the same tolerance', () => {
    for (const degree of [6, 7, 9]) {
      const series = { g: fitG(degree).g, b: B_PUBLISHED };
      for (const l of LEVELS.filter((x) => x.v <= 12)) {
        const diff = firstOrder(series, l.v).f - (l.rMax - l.rMin) / 2;
        expect(Math.abs(diff), `K = ${degree}, v = ${l.v}`).toBeLessThanOrEqual(tolerance(l.v));
      }
    }
  });

  it('v = 13, 0.095 eV below the dissociation limit, is beyond the polynomial G(v): f short by 5–15e-4 Å', () => {
    // Measured −14.5, −12.4, −7.9, −4.9 e-4 Å for degrees 6–9: the power series cannot bend towards the limit,
    // and v = 13 is not used in the comparisons above. Asserted so that a change here is noticed and explained.
    for (const degree of [6, 7, 8, 9]) {
      const l = LEVELS[13] as (typeof LEVELS)[number];
      const diff = firstOrder({ g: fitG(degree).g, b: B_PUBLISHED }, 13).f - (l.rMax - l.rMin) / 2;
      expect(diff).toBeLessThan(-4e-4);
      expect(diff).toBeGreaterThan(-2e-3);
    }
  });
});

describe('H2 X ¹Σg⁺ (Sharp 1971): turning points with the published B(v)', () => {
  const rows = LEVELS.filter((l) => l.v <= 12).map((l) => {
    const tp = firstOrder(SERIES, l.v);
    return { l, tp, dMin: tp.rMin - l.rMin, dMax: tp.rMax - l.rMax };
  });

  it('first order misses the table by 0.6–82e-4 Å: more than its 1e-4 Å at every v ≥ 1', () => {
    // Measured (1e-4 Å, ours − table) r₋ / r₊, degree 8: v0 1.1/3.3, v1 5.6/4.6, v2 10.5/10.7, v3 19.1/19.2,
    // v4 31.6/32.1, v5 43.4/43.5, v6 55.9/56.1, v7 66.6/67.1, v8 76.5/76.5, v9 80.4/81.7, v10 76.8/79.3,
    // v11 58.1/60.5, v12 7.7/10.4. Bound 85e-4 Å: the measured worst (81.7e-4, v = 9) and rounding.
    for (const { l, dMin, dMax } of rows) {
      expect(Math.max(Math.abs(dMin), Math.abs(dMax)), `v = ${l.v}`).toBeLessThanOrEqual(85e-4);
      if (l.v >= 1) expect(Math.max(Math.abs(dMin), Math.abs(dMax)), `v = ${l.v}`).toBeGreaterThan(1e-4);
    }
  });

  it('the miss is the midpoint (the g integral, i.e. B(v)), not the width: with the table’s g, r₋ comes back', () => {
    // r± = √(f² + f/g) ± f with our f and g_table = (1/r₋ − 1/r₊)/2 of the table: r₋ within 2.5e-4 Å for v ≤ 12
    // (measured 2.3e-4 at v = 0, where the table's rounding of 1/r alone moves r₋ by up to 1.6e-4; ≤ 0.5e-4 above).
    // Both walls move together (|Δr₋ − Δr₊| = 2|Δf|, bounded by the half-width tolerance) while the midpoint
    // is off by up to 81e-4 Å.
    for (const { l, tp, dMin, dMax } of rows) {
      const gTable = (1 / l.rMin - 1 / l.rMax) / 2;
      const root = Math.sqrt(tp.f * tp.f + tp.f / gTable);
      expect(Math.abs(root - tp.f - l.rMin), `v = ${l.v}`).toBeLessThanOrEqual(2.5e-4);
      expect(Math.abs(dMin - dMax), `v = ${l.v}`).toBeLessThanOrEqual(2 * (l.v <= 11 ? 2e-4 : 4e-4));
    }
  });

  it('the table’s g implies a B(v) with B_e within 0.5 % of the published one, above the linear B(v) at v = 3–9', () => {
    // B(x) = Σ_{k≤4} b_k x^k fitted (least squares) so that our g integrals give the table's g for v ≤ 12; g is
    // linear in the b_k. Measured: b_0 = 60.75 (0.18 % below B_e = 60.853), B_3…B_9 1.0–3.4 % above
    // B_e − α_e(v + ½): the linear B(v) of the published constants is too small at mid v, which makes g too small
    // by up to 2.3 % and the first-order points too far out. B_0…B_3 come out 59.31, 56.41, 53.53, 50.66 cm⁻¹.
    const rowsUsed = LEVELS.filter((l) => l.v <= 12);
    const n = rowsUsed.length;
    const p = 5;
    const design = new Float64Array(n * p);
    rowsUsed.forEach((l, i) => {
      for (let k = 0; k < p; k++) {
        design[k * n + i] = rkrTurningPoints(
          { series: SERIES, hbar2Over2mu: C, rotational: (x: number) => x ** k },
          l.v,
        ).g;
      }
    });
    const observations = Float64Array.from(rowsUsed, (l) => (1 / l.rMin - 1 / l.rMax) / 2);
    const fit = solveLeastSquares({ rows: n, cols: p, design, observations });
    const b = [...fit.coefficients];
    const B = (v: number) => b.reduce((s, bk, k) => s + bk * (v + 0.5) ** k, 0);
    const linear = (v: number) => (B_PUBLISHED[0] as number) + (B_PUBLISHED[1] as number) * (v + 0.5);
    expect(Math.abs((b[0] as number) / (B_PUBLISHED[0] as number) - 1)).toBeLessThan(0.005);
    for (let v = 3; v <= 9; v++) expect(B(v) / linear(v) - 1, `v = ${v}`).toBeGreaterThan(0.005);
  });
});

describe('H2 X ¹Σg⁺ (Sharp 1971): the refined curve', () => {
  it('meets its goals to v = 6 and moves r₋ towards the table; r₊ stays where the linear B(v) puts it', () => {
    // Refinement (refine.ts) corrects the semiclassical error against the same G(v) and B(v); it cannot correct
    // B(v) itself. Measured (1e-4 Å, refined − table) r₋ / r₊: v0 −3.0/5.6, v1 1.1/5.5, v2 5.4/10.8, v3 12.9/18.9,
    // v4 24.1/31.4, v5 34.8/42.4, v6 47.5/54.4 (first order: the table of the test above): r₋ moves in by
    // 4–9e-4 Å, r₊ by < 2e-4 Å. Round trip first order 7.8 cm⁻¹, 5.8e-3 → refined 0.0013 cm⁻¹, 2.9e-5 (Newton run,
    // 54 solves, ~4 s). From vMax = 8 on the refinement falls short (8: 7.4 cm⁻¹, 5.3e-3; 12: 35 cm⁻¹, 0.10) and
    // says so in POTENTIAL_REFINEMENT_SHORT.
    const coefficients: DunhamCoefficient[] = [
      ...SERIES.g.map((value, i) => ({ k: i + 1, l: 0, value })),
      ...SERIES.b.map((value, k) => ({ k, l: 1, value })),
    ];
    const result = potentialCurves({
      coefficients,
      covariance: new Float64Array(coefficients.length ** 2),
      reducedMass: reducedMass(parseSpecies('HH')),
      vMax: 6,
      vData: 13,
    });
    const refined = result.refined;
    expect(refined?.withinGoals).toBe(true);
    for (const level of refined?.levels ?? []) {
      const l = LEVELS[level.v] as (typeof LEVELS)[number];
      const first = firstOrder(SERIES, level.v);
      const dMin = level.rMin.value - l.rMin;
      const dMax = level.rMax.value - l.rMax;
      expect(first.rMin - level.rMin.value, `v = ${level.v}: r₋ moves in`).toBeGreaterThan(3e-4);
      expect(Math.abs(first.rMax - level.rMax.value), `v = ${level.v}: r₊ stays`).toBeLessThan(3e-4);
      if (level.v >= 2) expect(Math.abs(dMin), `v = ${level.v}`).toBeLessThan(Math.abs(first.rMin - l.rMin));
      // Still more than the table's digits at every level: the linear B(v) is not refined away.
      expect(Math.max(Math.abs(dMin), Math.abs(dMax)), `v = ${level.v}`).toBeGreaterThan(1e-4);
    }
    expect(refined?.levels.length).toBe(7);
  });
});

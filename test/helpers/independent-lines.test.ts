import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  CO_12_16,
  gaussianStream,
  HCL_1_35,
  honlLondon,
  independentLines,
  levelConstants,
  termValue,
  uniformStream,
  upperStateJ,
} from './independent-lines.js';

interface DatabaseLine {
  band: string;
  branch: 'P' | 'R';
  j: number;
  position: number;
}
const fixture = JSON.parse(
  readFileSync(new URL('../fixtures/co-database-lines/lines.json', import.meta.url), 'utf8'),
) as { lines: DatabaseLine[]; published: { B_v_MHz: { value: number[] }; D_v_kHz: { value: number[] } } };

const MHZ_PER_CM = 29979.2458; // c / (10^4 m MHz), exact

function generated(l: DatabaseLine): number {
  const [up, lo] = l.band.split('-').map(Number) as [number, number];
  return termValue(CO_12_16.constants, up, upperStateJ(l.branch, l.j)) - termValue(CO_12_16.constants, lo, l.j);
}

describe('independent generator against the real 12C16O lines (HITRAN2020, shared fixture)', () => {
  const residuals = fixture.lines.map((l) => ({ l, r: l.position - generated(l) }));

  it('reproduces all 494 database positions within 0.012 cm⁻¹ from the recalled Huber & Herzberg constants', () => {
    // Tolerance: the recalled set has no ω_e z_e and no L term; the 3-0 origin (≈ 0.0095 cm⁻¹ off) and R(80) of
    // pure rotation (≈ 0.005 cm⁻¹, the L term) are the largest. A wrong J bookkeeping is off by ≈ 2B ≈ 3.8 cm⁻¹.
    expect(residuals).toHaveLength(494);
    for (const { l, r } of residuals) expect(Math.abs(r), `${l.band} ${l.branch}(${l.j})`).toBeLessThan(0.012);
  });

  it('reproduces pure rotation R(0)–R(40) within 1e-4 cm⁻¹ (B_e, α_e, γ_e, D_e, β_e to their recalled digits)', () => {
    for (const { l, r } of residuals) {
      if (l.band === '0-0' && l.j <= 40) expect(Math.abs(r), `R(${l.j})`).toBeLessThan(1e-4);
    }
  });

  it('gets each band’s rotational structure right: residual spread for J″ ≤ 40 under 2e-3 cm⁻¹', () => {
    // The spread removes each band's origin error (vibrational terms beyond those recalled); what remains is the
    // J dependence, which B_v, D_v of every level and the J bookkeeping determine. The largest is 3-0 (1.5e-3 cm⁻¹:
    // the recalled set puts B_3 0.06 MHz low); a J off by one would give a spread of several cm⁻¹.
    for (const band of ['0-0', '1-0', '2-0', '3-0', '2-1']) {
      const rs = residuals.filter(({ l }) => l.band === band && l.j <= 40).map(({ r }) => r);
      expect(rs.length, band).toBeGreaterThan(40);
      expect(Math.max(...rs) - Math.min(...rs), band).toBeLessThan(2e-3);
    }
  });

  it('matches lower-state combination differences R(J−1) − P(J+1) of 1-0 within 1e-4 cm⁻¹ for J = 1…50', () => {
    const at = (branch: string, j: number) =>
      fixture.lines.find((l) => l.band === '1-0' && l.branch === branch && l.j === j)?.position as number;
    for (let j = 1; j <= 50; j++) {
      const observed = at('R', j - 1) - at('P', j + 1);
      const calc = termValue(CO_12_16.constants, 0, j + 1) - termValue(CO_12_16.constants, 0, j - 1);
      expect(Math.abs(observed - calc), `J = ${j}`).toBeLessThan(1e-4);
    }
  });

  it('gives B_v of v = 0–2 within 0.05 MHz and D_v within 0.01 kHz of Gendriesch et al. (2009), Table 2', () => {
    // Tolerances: one unit in the last recalled digit of α_e (1e-8 cm⁻¹ ≈ 0.0003 MHz) times (v+½) plus γ_e's
    // recalled digits (≈ 6e-8 cm⁻¹ of disagreement with the fixture's B_v) leave about 0.03 MHz at v = 2.
    for (let v = 0; v <= 2; v++) {
      const k = levelConstants(CO_12_16.constants, v);
      expect(Math.abs(k.B * MHZ_PER_CM - (fixture.published.B_v_MHz.value[v] as number)), `B_${v}`).toBeLessThan(0.05);
      expect(Math.abs(k.D * MHZ_PER_CM * 1e3 - (fixture.published.D_v_kHz.value[v] as number)), `D_${v}`).toBeLessThan(
        0.01,
      );
    }
  });
});

describe('independent generator: HCl and bookkeeping', () => {
  it('puts the H35Cl 1-0 origin at 2885.977 cm⁻¹ (REFERENCE-DATA.md §5c, from Huber & Herzberg with ω_e z_e)', () => {
    const origin = termValue(HCL_1_35.constants, 1, 0) - termValue(HCL_1_35.constants, 0, 0);
    expect(Math.abs(origin - 2885.977075)).toBeLessThan(1e-5); // same constants, arithmetic only
  });

  it('labels lines by J″ with J′ = J″+1 (R), J″−1 (P), J″ (Q), and no P(0)', () => {
    const { lines, truth } = independentLines({
      molecule: HCL_1_35,
      bands: [{ upper: 1, lower: 0, jMax: 3, branches: ['P', 'Q', 'R'] }],
      seed: 1,
    });
    expect(lines.map((l) => `${l.assignment?.branch}${l.assignment?.j}`)).toEqual([
      'P1',
      'P2',
      'P3',
      'Q0',
      'Q1',
      'Q2',
      'Q3',
      'R0',
      'R1',
      'R2',
      'R3',
    ]);
    const c = HCL_1_35.constants;
    const r2 = truth[9]?.exact as number;
    const p2 = truth[1]?.exact as number;
    expect(r2).toBeCloseTo(termValue(c, 1, 3) - termValue(c, 0, 2), 9);
    expect(p2).toBeCloseTo(termValue(c, 1, 1) - termValue(c, 0, 2), 9);
    // Lower-state combination difference R(1) − P(3) = F″(3) − F″(1) ≈ 10 B_0 ≈ 104.4 cm⁻¹ for HCl.
    expect((truth[8]?.exact as number) - (truth[2]?.exact as number)).toBeCloseTo(
      termValue(c, 0, 3) - termValue(c, 0, 1),
      9,
    );
  });

  it('gives R lines Hönl–London J″+1, P lines J″ and a Boltzmann-weighted intensity', () => {
    expect([honlLondon('R', 4), honlLondon('P', 4), honlLondon('Q', 4)]).toEqual([5, 4, 9]);
    const { lines, truth } = independentLines({
      molecule: CO_12_16,
      bands: [{ upper: 1, lower: 0, jMax: 10 }],
      temperature: 300,
      seed: 2,
    });
    const c2 = 1.438776877; // cm K, CODATA 2018 (exact to the digits shown)
    const p5 = lines.findIndex((l) => l.assignment?.branch === 'P' && l.assignment.j === 5);
    const p6 = lines.findIndex((l) => l.assignment?.branch === 'P' && l.assignment.j === 6);
    const ratio = (lines[p6]?.intensity as number) / (lines[p5]?.intensity as number);
    const t5 = truth[p5];
    const t6 = truth[p6];
    const expected =
      ((6 * (t6?.exact as number)) / (5 * (t5?.exact as number))) *
      Math.exp((-c2 * ((t6?.lowerEnergy as number) - (t5?.lowerEnergy as number))) / 300) *
      (-Math.expm1((-c2 * (t6?.exact as number)) / 300) / -Math.expm1((-c2 * (t5?.exact as number)) / 300));
    expect(ratio).toBeCloseTo(expected, 10);
  });

  it('adds per-band offsets, leaves σ off on request, and marks spurious lines', () => {
    const base = independentLines({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 5 }], seed: 3 });
    const shifted = independentLines({
      molecule: CO_12_16,
      bands: [{ upper: 1, lower: 0, jMax: 5, offset: 0.02 }],
      sigma: 0.001,
      withUncertainties: false,
      spurious: 4,
      seed: 3,
    });
    expect(shifted.lines).toHaveLength(base.lines.length + 4);
    expect(shifted.lines.every((l) => l.uncertainty === undefined)).toBe(true);
    expect(shifted.truth.filter((t) => t.spurious)).toHaveLength(4);
    expect(shifted.lines.slice(-4).every((l) => l.assignment === undefined)).toBe(true);
    base.truth.forEach((t, i) => {
      expect((shifted.truth[i]?.exact as number) - t.exact).toBeCloseTo(0.02, 10);
    });
  });
});

describe('independent random streams', () => {
  it('repeat for a seed and differ between seeds', () => {
    const a = uniformStream(7);
    const b = uniformStream(7);
    const c = uniformStream(8);
    const xs = Array.from({ length: 5 }, () => a());
    expect(Array.from({ length: 5 }, () => b())).toEqual(xs);
    expect(Array.from({ length: 5 }, () => c())).not.toEqual(xs);
  });

  it('give standard normal deviates: mean within 0.03, sd within 0.02 and 95.4 ± 0.6 % inside 2σ over 20 000', () => {
    // Tolerances ≈ 4 standard errors for n = 20 000 (1/√n = 0.007; sd of the 2σ fraction 0.0015).
    const g = gaussianStream(12345);
    const n = 20_000;
    const xs = Array.from({ length: n }, () => g());
    const mean = xs.reduce((s, x) => s + x, 0) / n;
    const sd = Math.sqrt(xs.reduce((s, x) => s + (x - mean) ** 2, 0) / (n - 1));
    expect(Math.abs(mean)).toBeLessThan(0.03);
    expect(Math.abs(sd - 1)).toBeLessThan(0.02);
    const inside = xs.filter((x) => Math.abs(x) < 2).length / n;
    expect(Math.abs(inside - 0.9545)).toBeLessThan(0.006);
    const u = uniformStream(99);
    const us = Array.from({ length: n }, () => u());
    expect(Math.min(...us)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...us)).toBeLessThan(1);
    expect(Math.abs(us.reduce((s, x) => s + x, 0) / n - 0.5)).toBeLessThan(0.01);
  });
});

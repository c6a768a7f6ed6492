import { describe, expect, it } from 'vitest';
import { bondLength } from '../../src/derive/bond-length.js';
import { crossChecks, type DunhamSet, equilibriumFromDunham } from '../../src/derive/equilibrium.js';
import { propagate, quantity } from '../../src/derive/quantity.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { gaussianStream } from '../helpers/independent-lines.js';

// Fast reference checks of src/derive and src/species against values computed outside the project. "DER" marks a
// value computed for this test with Python's decimal module (40 digits) from CODATA 2018 (h, c, m_u) and AME2020
// masses (shared/REFERENCE-DATA.md §1, §2a), with the formula named.

const CO = parseSpecies('12C-16O');
const HCL = parseSpecies('1H-35Cl');
const HBR = parseSpecies('1H-79Br');

describe('bond lengths from published B_e (Huber & Herzberg) and AME2020 reduced masses', () => {
  it.each([
    // species, B_e (HH, from memory + secondary copy), r_e = √(K/(μB_e)) (DER), HH r_e (published digits)
    [CO, 1.93128087, 1.1283231963, 1.128323],
    [HCL, 10.593416, 1.2745518285, 1.27455],
  ])('%s: r_e to 1e-7 Å of the value computed outside, and to the published digits', (s, b, re, hh) => {
    const r = bondLength(quantity(b, 0, 'cm-1'), reducedMass(s));
    expect(Math.abs((r?.value as number) - re)).toBeLessThan(1e-7);
    expect(Math.abs((r?.value as number) - hh)).toBeLessThan(0.6e-5); // half a unit of the last HH digit (HCl: 1e-5)
    expect(r?.unit).toBe('angstrom');
  });

  it('σ(r)/r = ½ √((σ_B/B)² + (σ_μ/μ)² + (σ_K/K)²): each input counts (σ_K/K = 3.03e-10, CODATA 2018)', () => {
    const mu = { value: 0.98, uncertainty: 0.98 * 4e-6 };
    const r = bondLength(quantity(10, 10 * 3e-6, 'cm-1'), mu);
    const rel = 0.5 * Math.hypot(3e-6, 4e-6, 5.0e-37 / 1.6605390666e-27);
    expect(Math.abs((r?.uncertainty as number) / ((r?.value as number) * rel) - 1)).toBeLessThan(1e-9);
    // With B and μ exact, only K's own 3.03e-10 is left: r σ = r × 1.51e-10.
    const exact = bondLength(quantity(10, 0, 'cm-1'), { value: 0.98, uncertainty: 0 });
    const relK = (exact?.uncertainty as number) / (exact?.value as number);
    expect(Math.abs(relK / 1.5056e-10 - 1)).toBeLessThan(1e-3);
  });

  it('refuses a non-positive B (no bond length)', () => {
    expect(bondLength(quantity(0, 0, 'cm-1'), reducedMass(CO))).toBeUndefined();
    expect(bondLength(quantity(-1, 0, 'cm-1'), reducedMass(CO))).toBeUndefined();
  });
});

describe('reduced-mass uncertainty by AME2020 propagation', () => {
  it.each([
    // σ_μ = √(((m₂/M)² σ₁)² + ((m₁/M)² σ₂)²) with AME2020 masses and σ (REFERENCE-DATA §2a; DER)
    [HBR, 0.9951169115, 1.7131e-10],
    [HCL, 0.9795925391, 3.2622e-11],
    [CO, 6.8562086379, 5.8797e-11],
  ])('%s: μ and σ_μ within 1e-10 u and 0.1 %', (s, mu, sigma) => {
    const m = reducedMass(s);
    expect(Math.abs(m.value - mu)).toBeLessThan(1e-10);
    expect(Math.abs(m.uncertainty / sigma - 1)).toBeLessThan(1e-3);
  });
});

/** A Dunham set from customary constants with a covariance (row-major), keys Y10, Y20, Y01, Y11. */
function setOf(we: number, wexe: number, b: number, alpha: number, cov?: number[]): DunhamSet {
  return {
    keys: ['1,0', '2,0', '0,1', '1,1'],
    values: [we, -wexe, b, -alpha],
    covariance: cov ?? new Array<number>(16).fill(0),
  };
}

describe('cross-checks against hand values (Huber & Herzberg constants, from memory + secondary copy)', () => {
  const cases = [
    // name, ω_e, ω_e x_e, B_e, α_e, μ; Kratzer 4B³/ω², Pekeris, Morse well ω²/(4ωx), Morse a = √(k_e/(2D_e)),
    // k_e = μ(2πcω_e)², all DER (double precision, CODATA 2018)
    ['HCl', 2990.9463, 52.8186, 10.593416, 0.307181, HCL, 5.3155822e-4, 0.27755796, 42341.901193, 1.75193476],
    ['CO', 2169.81358, 13.28831, 1.93128087, 0.01750441, CO, 6.1200006e-6, 0.0167402, 88575.804071, 2.32476276],
  ] as const;

  it.each(cases)('%s: Kratzer D_e, Pekeris α_e, Morse D_e and a, each to 1e-7 relative', (...c) => {
    const [, we, wexe, b, alpha, s, kratzer, pekeris, well, a] = c;
    const mu = reducedMass(s);
    const set = setOf(we, wexe, b, alpha);
    const eq = equilibriumFromDunham(set, mu);
    expect(eq.omega_e?.value).toBe(we);
    expect(eq.omega_e_x_e?.value).toBe(wexe);
    expect(eq.B_e?.value).toBe(b);
    expect(eq.alpha_e?.value).toBe(alpha);
    const byId = new Map(crossChecks(set, eq, mu).map((x) => [x.id, x.value.value]));
    const rel = (id: string, v: number) => Math.abs((byId.get(id) as number) / v - 1);
    expect(rel('kratzer-D_e', kratzer)).toBeLessThan(1e-7);
    expect(rel('pekeris-alpha_e', pekeris)).toBeLessThan(1e-7);
    expect(rel('morse-well-depth', well)).toBeLessThan(1e-7);
    expect(rel('morse-a', a)).toBeLessThan(1e-7);
    // D_0 = D_e − G(0), G(0) = ω_e/2 − ω_e x_e/4 (no ω_e y_e in this set; DER)
    expect(rel('morse-D_0', well - (we / 2 - wexe / 4))).toBeLessThan(1e-9);
  });

  it('signs of the customary constants: ω_e x_e = −Y20, α_e = −Y11, γ_e = Y21, D_e = −Y02, β_e = −Y12, H_e = Y03', () => {
    const set: DunhamSet = {
      keys: ['1,0', '2,0', '3,0', '0,1', '1,1', '2,1', '0,2', '1,2', '0,3'],
      values: [2990, -52, 0.22, 10.6, -0.31, 0.0017, -5.3e-4, 7.5e-6, 1.7e-8],
      covariance: new Array<number>(81).fill(0),
    };
    const eq = equilibriumFromDunham(set, reducedMass(HCL));
    expect([
      eq.omega_e?.value,
      eq.omega_e_x_e?.value,
      eq.omega_e_y_e?.value,
      eq.B_e?.value,
      eq.alpha_e?.value,
      eq.gamma_e?.value,
      eq.D_e?.value,
      eq.beta_e?.value,
      eq.H_e?.value,
    ]).toEqual([2990, 52, 0.22, 10.6, 0.31, 0.0017, 5.3e-4, -7.5e-6, 1.7e-8]);
  });
});

/** Correlated normal samples by a Cholesky factor of `cov` (p ≤ 4), with the test's own Gaussian stream. */
function sampler(mean: readonly number[], cov: readonly number[], seed: number): () => number[] {
  const p = mean.length;
  const l = new Array<number>(p * p).fill(0);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j <= i; j++) {
      let s = cov[i * p + j] as number;
      for (let k = 0; k < j; k++) s -= (l[i * p + k] as number) * (l[j * p + k] as number);
      l[i * p + j] = i === j ? Math.sqrt(Math.max(s, 0)) : s / (l[j * p + j] as number);
    }
  }
  const g = gaussianStream(seed);
  return () => {
    const z = mean.map(() => g());
    return mean.map((m, i) => {
      let x = m;
      for (let k = 0; k <= i; k++) x += (l[i * p + k] as number) * (z[k] as number);
      return x;
    });
  };
}

function sampleSd(f: (x: readonly number[]) => number, draw: () => number[], n: number): number {
  let s = 0;
  let s2 = 0;
  for (let i = 0; i < n; i++) {
    const y = f(draw());
    s += y;
    s2 += y * y;
  }
  const mean = s / n;
  return Math.sqrt((s2 - n * mean * mean) / (n - 1));
}

describe('propagation with correlations, checked by Monte Carlo (20 000 seeded draws, sd known to ≈ 0.5 %)', () => {
  it('σ(x₀ − x₁) with ρ = +0.95 is √(2 − 2ρ) σ, not √2 σ (within 3 %)', () => {
    const cov = [1e-6, 0.95e-6, 0.95e-6, 1e-6];
    const f = (x: readonly number[]) => (x[0] as number) - (x[1] as number);
    const analytic = propagate(f, [3, 2], cov);
    expect(Math.abs(analytic / Math.sqrt(0.1e-6) - 1)).toBeLessThan(1e-6);
    const mc = sampleSd(f, sampler([3, 2], cov, 21), 20_000);
    expect(Math.abs(analytic / mc - 1)).toBeLessThan(0.03);
  });

  it('Kratzer D_e and Morse a with strongly correlated Dunham coefficients agree with Monte Carlo within 3 %', () => {
    // HCl-like values; σ(Y10) = 0.0015 ω_e, σ(Y01) = 0.001 B_e, ρ(Y10, Y01) = +0.9, ρ(Y10, Y20) = +0.8: ignoring the
    // correlations would give Kratzer's σ about 3× too large.
    const we = 2990.9;
    const y20 = -52.8;
    const b = 10.59;
    const s = [we * 1.5e-3, 0.05, b * 1e-3, 1e-4];
    const rho = [
      [1, 0.8, 0.9, 0],
      [0.8, 1, 0.6, 0],
      [0.9, 0.6, 1, 0],
      [0, 0, 0, 1],
    ];
    const cov = rho.flatMap((row, i) => row.map((r, j) => r * (s[i] as number) * (s[j] as number)));
    const set: DunhamSet = { keys: ['1,0', '2,0', '0,1', '1,1'], values: [we, y20, b, -0.307], covariance: cov };
    const mu = reducedMass(HCL);
    const checks = new Map(crossChecks(set, equilibriumFromDunham(set, mu), mu).map((c) => [c.id, c.value]));
    const draw = sampler(set.values, cov, 22);
    const kratzer = (x: readonly number[]) => (4 * (x[2] as number) ** 3) / (x[0] as number) ** 2;
    const kr = checks.get('kratzer-D_e');
    expect(Math.abs((kr?.uncertainty as number) / sampleSd(kratzer, draw, 20_000) - 1)).toBeLessThan(0.03);
    // Morse a = √(k_e/(2 D_e)) with k_e = μ(2πcω_e)², D_e = ω_e²/(4ω_e x_e): a ∝ √(−Y20 μ) (ω_e cancels).
    const morse = (x: readonly number[]) => Math.sqrt(-(x[1] as number));
    const a = checks.get('morse-a');
    const relMc = sampleSd(morse, draw, 20_000) / Math.sqrt(-y20);
    expect(Math.abs((a?.uncertainty as number) / (a?.value as number) / relMc - 1)).toBeLessThan(0.03);
  });
});

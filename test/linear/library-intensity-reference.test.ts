import { describe, expect, it } from 'vitest';
import { SECOND_RADIATION_CM_K } from '../../src/constants/codata-2018.js';
import {
  honlLondonComponent,
  honlLondonLinear,
  type LinearBoltzmannPoint,
  linearBoltzmannTemperature,
  relativeIntensity,
  wigner3j,
} from '../../src/linear/intensity.js';
import {
  LINEAR_REFERENCE,
  linearReference,
  referenceBands,
  referenceConstants,
  referenceLevel,
} from '../../src/linear/reference.js';

/**
 * Direct checks of intensity.ts and of the look-ups of reference.ts, against closed forms written out here:
 * 3j symbols (j 0 j; m 0 −m) = (−1)^(j−m)/√(2j+1) (Edmonds 1957, eq. 3.7.9, from memory), Hönl–London factors of
 * Herzberg's tables for Σ–Σ and Π←Σ, and a Boltzmann plot fitted by ordinary least squares written out below.
 * c₂ = hc/k = 1.4387768775039 cm K (exact since the 2019 SI: CODATA 2018).
 */
const C2 = 1.4387768775039;

describe('3j symbols and Hönl–London factors', () => {
  it('(j 0 j; m 0 −m) = (−1)^(j−m)/√(2j+1), with its sign, for j ≤ 6', () => {
    for (let j = 0; j <= 6; j++) {
      for (let m = -j; m <= j; m++) {
        const want = ((j - m) % 2 === 0 ? 1 : -1) / Math.sqrt(2 * j + 1);
        expect(wigner3j(j, 0, j, m, 0, -m)).toBeCloseTo(want, 12);
      }
    }
    // m1 + m2 + m3 ≠ 0: zero by definition.
    expect(wigner3j(1, 1, 1, 1, 0, 0)).toBe(0);
    expect(wigner3j(2, 1, 2, 1, 1, 1)).toBe(0);
  });

  it('one parity component: the whole factor unless both levels have l ≥ 1, then half', () => {
    // Σ–Σ R(5) = J″+1 = 6; Π←Σ R(5) = (J″+2)/2 = 3.5; Σ←Π P(5) = … the whole factor too; Π–Π R(5): half.
    expect(honlLondonComponent('R', 0, 0, 5)).toBeCloseTo(6, 12);
    expect(honlLondonComponent('R', 0, 1, 5)).toBeCloseTo(3.5, 12);
    expect(honlLondonComponent('P', 1, 0, 5)).toBeCloseTo(honlLondonLinear('P', 1, 0, 5), 12);
    expect(honlLondonComponent('P', 1, 0, 5)).toBeGreaterThan(0);
    expect(honlLondonComponent('R', 1, 1, 5)).toBeCloseTo(honlLondonLinear('R', 1, 1, 5) / 2, 12);
    // |Δl| > 1, J below l, J′ below l′: no line.
    expect(honlLondonLinear('R', 0, 2, 5)).toBe(0);
    expect(honlLondonLinear('R', 2, 0, 5)).toBe(0);
    expect(honlLondonLinear('R', 1, 1, 0)).toBe(0);
    expect(honlLondonLinear('P', 0, 1, 1)).toBe(0);
    expect(honlLondonLinear('P', 0, 0, 0)).toBe(0);
  });

  it('relative intensity: g_ns S exp(−c₂E″/T) ν (1 − exp(−c₂ν/T)) written out', () => {
    const line = {
      position: 667.38,
      branch: 'Q' as const,
      j: 10,
      lowerL: 0,
      upperL: 1,
      lowerEnergy: 42.9,
      spinWeight: 1,
    };
    const T = 250;
    const S = (2 * 10 + 1) / 2; // Π←Σ Q(10)
    const want = S * Math.exp((-C2 * 42.9) / T) * 667.38 * (1 - Math.exp((-C2 * 667.38) / T));
    // Relative 1e-9: c₂ above is rounded to 10 digits.
    expect(Math.abs(relativeIntensity(line, T) / want - 1)).toBeLessThan(1e-9);
    expect(Math.abs(relativeIntensity({ ...line, spinWeight: 3 }, T) / (3 * want) - 1)).toBeLessThan(1e-9);
    expect(SECOND_RADIATION_CM_K).toBeCloseTo(C2, 12);
  });
});

/** Boltzmann-plot points of one Σ–Σ band at T: intensity from the formula, times exp(noise). */
function plot(T: number, js: number[], noise: (i: number) => number = () => 0): LinearBoltzmannPoint[] {
  const B = 0.39;
  return js.map((j, i) => {
    const E = B * j * (j + 1);
    const nu = 2349 + 2 * B * (j + 1);
    const S = j + 1; // Σ–Σ R(J″)
    return {
      position: nu,
      branch: 'R' as const,
      j,
      lowerL: 0,
      upperL: 0,
      lowerEnergy: E,
      spinWeight: 1,
      intensity: S * Math.exp((-C2 * E) / T) * nu * (1 - Math.exp((-C2 * nu) / T)) * Math.exp(noise(i)),
    };
  });
}

describe('Boltzmann temperature', () => {
  it('exactly 4 usable lines are enough; unusable ones (no intensity, no spin weight, E″ not finite, S = 0) are dropped', () => {
    const four = plot(400, [2, 10, 20, 30]);
    const r4 = linearBoltzmannTemperature(four);
    expect(r4?.used).toBe(4);
    expect(Math.abs((r4?.temperature.value ?? 0) / 400 - 1)).toBeLessThan(1e-9);
    expect(r4?.temperature.unit).toBe('K');
    expect(linearBoltzmannTemperature(four.slice(0, 3))).toBeUndefined();
    const bad: LinearBoltzmannPoint[] = [
      { ...(four[0] as LinearBoltzmannPoint), intensity: 0 },
      { ...(four[1] as LinearBoltzmannPoint), intensity: -1 },
      { ...(four[2] as LinearBoltzmannPoint), spinWeight: 0, intensity: 77 },
      { ...(four[3] as LinearBoltzmannPoint), lowerEnergy: Number.NaN },
      { ...(four[3] as LinearBoltzmannPoint), lowerEnergy: Number.POSITIVE_INFINITY },
      { ...(four[3] as LinearBoltzmannPoint), branch: 'Q', intensity: 5 }, // Σ–Σ Q: S = 0
    ];
    const r = linearBoltzmannTemperature([...four, ...bad]);
    expect(r?.used).toBe(4);
    expect(Math.abs((r?.temperature.value ?? 0) / 400 - 1)).toBeLessThan(1e-9);
    expect(r?.points).toHaveLength(4);
    // A plot whose intensities rise with E″ (slope > 0) has no temperature.
    const rising = four.map((p, i) => ({ ...p, intensity: (i + 1) * 1e3 * p.lowerEnergy }));
    expect(linearBoltzmannTemperature(rising)).toBeUndefined();
  });

  it('slope, intercept and σ(T) agree with an ordinary least-squares fit written out (a-posteriori, n − 2)', () => {
    // ln-intensity noise ±0.05 in a fixed pattern; T = 300 K.
    const pattern = [0.05, -0.04, 0.03, -0.05, 0.02, 0.04, -0.03, -0.02];
    const pts = plot(300, [1, 5, 9, 13, 17, 21, 25, 29], (i) => pattern[i] as number);
    const r = linearBoltzmannTemperature(pts);
    expect(r).toBeDefined();
    // Own fit: y = ln(I / (S ν (1 − e^(−c₂ν/T)))) at the fitted T (iterated here too), x = E″.
    let T = 296;
    let slope = 0;
    let intercept = 0;
    let se = 0;
    for (let k = 0; k < 50; k++) {
      const x = pts.map((p) => p.lowerEnergy);
      const y = pts.map((p) =>
        Math.log(p.intensity / ((p.j + 1) * p.position * (1 - Math.exp((-C2 * p.position) / T)))),
      );
      const n = x.length;
      const mx = x.reduce((s, v) => s + v, 0) / n;
      const my = y.reduce((s, v) => s + v, 0) / n;
      const sxx = x.reduce((s, v) => s + (v - mx) ** 2, 0);
      slope = x.reduce((s, v, i) => s + (v - mx) * ((y[i] as number) - my), 0) / sxx;
      intercept = my - slope * mx;
      const rss = x.reduce((s, v, i) => s + ((y[i] as number) - intercept - slope * v) ** 2, 0);
      se = Math.sqrt(rss / (n - 2) / sxx);
      T = -C2 / slope;
    }
    expect(r?.slope).toBeCloseTo(slope, 10);
    expect(r?.intercept).toBeCloseTo(intercept, 8);
    expect(Math.abs((r?.temperature.value ?? 0) / T - 1)).toBeLessThan(1e-9);
    // σ_T = T² σ_slope / c₂.
    expect(Math.abs((r?.temperature.uncertainty ?? 0) / ((T * T * se) / C2) - 1)).toBeLessThan(1e-6);
    // Residuals are y − fit, x the E″.
    expect(r?.points[0]?.x).toBe(pts[0]?.lowerEnergy);
    const p0 = r?.points[0];
    expect((p0?.y ?? 0) - (intercept + slope * (p0?.x ?? 0))).toBeCloseTo(p0?.residual ?? 1, 8);
  });
});

describe('library look-ups', () => {
  it('a species by chain formula or alias; a level by quanta or database label; constants of the level', () => {
    const ocs = linearReference('16O-12C-32S');
    expect(ocs?.aliases).toContain('OCS');
    expect(linearReference('OCS')).toBe(ocs);
    expect(linearReference('12C-16O')).toBeUndefined();
    const v1 = ocs ? referenceLevel(ocs, { v: [1, 0, 0], l: 0 }) : undefined;
    expect(v1?.databaseLabel).toBe('1000');
    expect(ocs ? referenceLevel(ocs, '1000') : undefined).toBe(v1);
    expect(ocs ? referenceLevel(ocs, '9999') : undefined).toBeUndefined();
    expect(ocs ? referenceLevel(ocs, { v: [0, 3, 0], l: 1 }) : undefined).toBeUndefined();
    // OCS 10⁰0: G 858.9669714 (the note's fit of HITRAN energies); a Σ level has no q even when asked.
    const c = v1 ? referenceConstants(v1) : undefined;
    expect(c?.G).toBe(858.9669714);
    expect(c && 'q' in c).toBe(false);
    expect(c && 'qJ' in c).toBe(false);
    // HCN 01¹0: q = 7.48756e-3 cm⁻¹ (note §0) is carried.
    const hcn = linearReference('HCN');
    const v2 = hcn ? referenceLevel(hcn, { v: [0, 1, 0], l: 1 }) : undefined;
    const c2 = v2 ? referenceConstants(v2) : undefined;
    expect(Math.abs((c2?.q ?? 0) - 7.48756e-3)).toBeLessThan(1e-7);
    expect(c2?.qJ).toBeLessThan(0);
  });

  it('bands: from the ground level, g↔u only for CO2, and CO2’s two laser bands by name', () => {
    const co2 = linearReference('CO2');
    const bands = co2 ? referenceBands(co2) : [];
    const names = bands.map((b) => b.name);
    expect(names).toContain('10 µm laser band I');
    expect(names).toContain('9 µm laser band II');
    const laser = bands.find((b) => b.name === '10 µm laser band I');
    expect(laser?.upper.databaseLabel).toBe('00011');
    expect(laser?.lower.databaseLabel).toBe('10001');
    expect(laser?.kind).toBe('parallel');
    // ν1 (10⁰0, Raman only: g → g) is not an infrared band of CO2; ν2 (perpendicular) and ν3 are.
    const fromGround = bands.filter((b) => b.lower.databaseLabel === co2?.levels[0]?.databaseLabel);
    expect(fromGround.some((b) => b.upper.v[0] === 1 && b.upper.v[1] === 0 && b.upper.v[2] === 0)).toBe(false);
    expect(fromGround.find((b) => b.upper.l === 1)?.kind).toBe('perpendicular');
    // OCS has no centre of symmetry: every level from the ground state is a band.
    const ocs = linearReference('OCS');
    expect(ocs ? referenceBands(ocs).length : 0).toBe((ocs?.levels.length ?? 0) - 1);
    expect(LINEAR_REFERENCE.length).toBeGreaterThanOrEqual(5);
  });
});

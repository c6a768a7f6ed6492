import { describe, expect, it } from 'vitest';
import {
  honlLondonComponent,
  honlLondonLinear,
  type LinearBoltzmannPoint,
  linearBoltzmannTemperature,
  relativeIntensity,
  wigner3j,
} from '../../src/linear/intensity.js';
import {
  C2H2_1221,
  CO2_626,
  type GenLine,
  type GenMolecule,
  genGaussian,
  genHonlLondon,
  genLineList,
  HCN_H12C14N,
} from '../helpers/independent-linear.js';
import { pullSummary } from '../helpers/pulls.js';

describe('Wigner 3j symbols', () => {
  it('known values: (1 1 0; 0 0 0) = −1/√3, (1 1 2; 1 −1 0) = 1/√30, (2 1 1; 0 0 0) = √(2/15) (Edmonds, Table 2)', () => {
    expect(wigner3j(1, 1, 0, 0, 0, 0)).toBeCloseTo(-1 / Math.sqrt(3), 12);
    expect(wigner3j(1, 1, 2, 1, -1, 0)).toBeCloseTo(1 / Math.sqrt(30), 12);
    expect(Math.abs(wigner3j(2, 1, 1, 0, 0, 0))).toBeCloseTo(Math.sqrt(2 / 15), 12);
    expect(wigner3j(1, 1, 1, 0, 0, 0)).toBe(0);
    expect(wigner3j(1, 1, 3, 0, 0, 0)).toBe(0);
  });
  it('orthogonality Σ_{m1,m2} (j1 j2 j3; m1 m2 m3)² = 1/(2j3+1) for j up to 40', () => {
    for (const [j1, j2, j3, m3] of [
      [5, 1, 5, 2],
      [12, 1, 13, -3],
      [40, 1, 39, 1],
      [7, 3, 6, 0],
    ] as const) {
      let s = 0;
      for (let m1 = -j1; m1 <= j1; m1++) {
        const m2 = -m1 - m3;
        if (Math.abs(m2) <= j2) s += wigner3j(j1, j2, j3, m1, m2, m3) ** 2;
      }
      expect(s).toBeCloseTo(1 / (2 * j3 + 1), 12);
    }
  });
});

describe('Hönl–London factors of linear molecules', () => {
  it('Σ–Σ: R = J″+1, P = J″, no Q (SCIENCE.md §5); Σ→Π: R (J″+2)/2, Q (2J″+1)/2, P (J″−1)/2', () => {
    for (let J = 0; J <= 30; J++) {
      expect(honlLondonLinear('R', 0, 0, J)).toBeCloseTo(J + 1, 10);
      expect(honlLondonLinear('P', 0, 0, J)).toBeCloseTo(J, 10);
      expect(honlLondonLinear('Q', 0, 0, J)).toBe(0);
      expect(honlLondonLinear('R', 0, 1, J)).toBeCloseTo((J + 2) / 2, 10);
      expect(honlLondonLinear('Q', 0, 1, J)).toBeCloseTo(J === 0 ? 0 : (2 * J + 1) / 2, 10);
      expect(honlLondonLinear('P', 0, 1, J)).toBeCloseTo(J <= 1 ? 0 : (J - 1) / 2, 10);
    }
  });
  it('agree with the generator’s closed forms for Δl = 0, ±1, l ≤ 3, J″ ≤ 60 (3j route vs explicit formulas)', () => {
    let n = 0;
    for (let lLow = 0; lLow <= 3; lLow++) {
      for (const lUp of [lLow - 1, lLow, lLow + 1]) {
        if (lUp < 0) continue;
        for (let J = lLow; J <= 60; J++) {
          for (const b of ['P', 'Q', 'R'] as const) {
            const Jp = b === 'P' ? J - 1 : b === 'R' ? J + 1 : J;
            const expected = Jp < lUp ? 0 : genHonlLondon(b, lLow, lUp, J);
            expect(honlLondonLinear(b, lLow, lUp, J)).toBeCloseTo(expected, 9);
            n++;
          }
        }
      }
    }
    expect(n).toBeGreaterThan(1500);
    expect(honlLondonLinear('R', 0, 2, 5)).toBe(0);
  });
  it('relative intensities reproduce the generator’s (same lines, same temperature) to 1e-9', () => {
    const list = genLineList({
      molecule: HCN_H12C14N,
      bands: [{ upper: '0110', lower: '0000' }],
      jMax: 30,
      temperature: 500,
    });
    const mine = list.map((l) => relativeIntensity(asIntensityLine(l), 500));
    const top = Math.max(...mine);
    list.forEach((l, i) => {
      expect((mine[i] as number) / top).toBeCloseTo(l.intensity, 9);
    });
    expect(honlLondonComponent('R', 1, 1, 5)).toBeCloseTo(honlLondonLinear('R', 1, 1, 5) / 2, 12);
  });
});

function asIntensityLine(l: GenLine): LinearBoltzmannPoint {
  return {
    position: l.position,
    intensity: l.intensity,
    branch: l.branch as 'P' | 'Q' | 'R',
    j: l.j as number,
    lowerL: l.lower?.l as number,
    upperL: l.upper?.l as number,
    lowerEnergy: l.lowerEnergy as number,
    spinWeight: l.spinWeight as number,
  };
}

/** Lines of a band at temperature T with log-normal intensity noise of relative size `rel`. */
function noisyBand(mol: GenMolecule, upper: string, lower: string, T: number, rel: number, seed: number, jMax = 40) {
  const g = genGaussian(seed);
  return genLineList({
    molecule: mol,
    bands: [{ upper, lower }],
    jMax,
    temperature: T,
    minRelativeIntensity: 1e-3,
  }).map((l) => ({ ...asIntensityLine(l), intensity: l.intensity * Math.exp(rel * g()) }));
}

describe('Boltzmann temperature from linear-molecule bands', () => {
  it('recovers T exactly from noiseless C2H2 ν3 (1:3 alternation), CO2 ν3 (every other J) and CO2 ν2 (Q branch)', () => {
    for (const [mol, up, lo, T] of [
      [C2H2_1221, '00100', '00000', 296],
      [C2H2_1221, '00100', '00000', 900],
      [CO2_626, '00011', '00001', 296],
      [CO2_626, '01101', '00001', 1200],
    ] as const) {
      const r = linearBoltzmannTemperature(noisyBand(mol, up, lo, T, 0, 1, 60));
      expect(r).toBeDefined();
      // Noiseless data from the generator's own closed forms: T recovered to 1e-6 relative.
      expect(Math.abs((r?.temperature.value as number) / T - 1)).toBeLessThan(1e-6);
    }
  });
  it('ignoring the spin weights would bend the C2H2 plot (rms of ln residuals ≈ ½ ln 3 vs 0)', () => {
    const pts = noisyBand(C2H2_1221, '00100', '00000', 296, 0, 1);
    const flat = linearBoltzmannTemperature(pts.map((p) => ({ ...p, spinWeight: 1 })));
    const rms = Math.sqrt((flat?.points ?? []).reduce((s, p) => s + p.residual ** 2, 0) / (flat?.points.length ?? 1));
    expect(rms).toBeGreaterThan(0.4);
    expect(rms).toBeLessThan(0.7);
  });
  it('temperature uncertainties are calibrated: 200 seeded trials, 5 % intensity noise, C2H2 ν3 at 400 K', () => {
    // Requirement (common practice for a linear model with Gaussian noise in ln I): 1σ coverage 0.60–0.78,
    // 2σ coverage ≥ 0.90, |mean pull| < 0.25.
    const pulls: number[] = [];
    for (let seed = 1; seed <= 200; seed++) {
      const r = linearBoltzmannTemperature(noisyBand(C2H2_1221, '00100', '00000', 400, 0.05, 1000 + seed));
      if (!r) throw new Error(`no temperature for seed ${seed}`);
      pulls.push((r.temperature.value - 400) / r.temperature.uncertainty);
    }
    const s = pullSummary(pulls);
    expect(s.within1).toBeGreaterThan(0.6);
    expect(s.within1).toBeLessThan(0.78);
    expect(s.within2).toBeGreaterThan(0.9);
    expect(Math.abs(s.mean)).toBeLessThan(0.25);
  });
  it('refuses too few lines or a flat plot', () => {
    const pts = noisyBand(CO2_626, '00011', '00001', 296, 0, 1).slice(0, 3);
    expect(linearBoltzmannTemperature(pts)).toBeUndefined();
  });
});

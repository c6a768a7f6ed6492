import { describe, expect, it } from 'vitest';
import type { ScienceError } from '../../src/errors.js';
import {
  calibrateAgainstLibrary,
  FALSE_ALARM_RATE,
  FALSE_ALARM_Z,
  guardBandedStatus,
} from '../../src/qa/calibration.js';
import { type ConstantsInput, predictLines } from '../../src/qa/predictions.js';
import { boltzmannTemperature } from '../../src/qa/temperature.js';
import { parseSpecies } from '../../src/species/parse.js';

// Fast checks of the QA kernels (temperature, calibration, guard band, predictions) against values worked out by
// hand or published, each computed inside `it`. The constants below are invented (not a molecule).

/** Second radiation constant c₂ = hc/k = 1.438776877503933 cm K from the exact SI values of h, c and k. */
const C2 = 1.438776877503933;

const err = (f: () => unknown): ScienceError => {
  try {
    f();
  } catch (e) {
    return e as ScienceError;
  }
  throw new Error('expected a ScienceError');
};

describe('Boltzmann plot (SCIENCE.md §5) on intensities made here', () => {
  /** I = A ν S e^{−c₂E/T}(1 − e^{−c₂ν/T}) with S = J″+1 (R), J″ (P); low ν so that the stimulated factor matters. */
  function lines(T: number, noise: (i: number) => number = () => 1) {
    const out: { position: number; intensity: number; branch: 'P' | 'R'; j: number; lowerEnergy: number }[] = [];
    let i = 0;
    for (let j = 0; j <= 12; j++) {
      for (const branch of ['P', 'R'] as const) {
        if (branch === 'P' && j === 0) continue;
        const position = branch === 'R' ? 60 + 4 * (j + 1) : 60 - 4 * j;
        const s = branch === 'R' ? j + 1 : j;
        const E = 2 * j * (j + 1);
        const intensity =
          7.3 * position * s * Math.exp((-C2 * E) / T) * (1 - Math.exp((-C2 * position) / T)) * noise(i++);
        out.push({ position, intensity, branch, j, lowerEnergy: E });
      }
    }
    return out;
  }

  // The iteration on the stimulated-emission factor stops when T moves by less than 1e-6 relative, so T, the slope
  // and the intercept are checked to 1e-7 and 1e-6 (the factor itself is 0.25 at 60 cm⁻¹ and 300 K).
  it.each([80, 300, 1200])('gives back %i K to 1e-7 with slope −c₂/T and intercept ln 7.3 (noise-free)', (T) => {
    const r = boltzmannTemperature(lines(T));
    if (!r) throw new Error('no temperature');
    expect(Math.abs(r.temperature.value - T) / T).toBeLessThan(1e-7);
    expect(r.temperature.unit).toBe('K');
    expect(Math.abs(r.slope + C2 / T) / (C2 / T)).toBeLessThan(1e-7);
    expect(Math.abs(r.intercept - Math.log(7.3))).toBeLessThan(1e-6);
    expect(r.points).toHaveLength(25);
    for (const p of r.points) expect(Math.abs(p.residual)).toBeLessThan(1e-6);
    expect(r.temperature.uncertainty).toBeLessThan(1e-6 * T);
  });

  it('σ(T) = T² σ(slope)/c₂ with σ(slope)² = s²/Σ(E − Ē)² of the straight-line fit (1e-9 relative)', () => {
    const r = boltzmannTemperature(lines(300, (i) => Math.exp(0.02 * Math.sin(1.7 * i + 0.3))));
    if (!r) throw new Error('no temperature');
    const T = r.temperature.value;
    expect(Math.abs(T - 300) / 300).toBeLessThan(0.02);
    // The y of each point is ln(I/(ν S (1 − e^{−c₂ν/T}))) at the T of the last round (within 1e-6 of the T found);
    // the line through them is an ordinary fit.
    const src = lines(300, (i) => Math.exp(0.02 * Math.sin(1.7 * i + 0.3)));
    const n = src.length;
    const ys = src.map((p) => {
      const s = p.branch === 'R' ? p.j + 1 : p.j;
      return Math.log(p.intensity / (p.position * s * (1 - Math.exp((-C2 * p.position) / T))));
    });
    r.points.forEach((p, i) => {
      expect(Math.abs(p.y - (ys[i] as number))).toBeLessThan(1e-6);
      expect(p.x).toBe(src[i]?.lowerEnergy);
    });
    const xs = src.map((p) => p.lowerEnergy);
    const mx = xs.reduce((a, b) => a + b, 0) / n;
    const my = ys.reduce((a, b) => a + b, 0) / n;
    let sxx = 0;
    let sxy = 0;
    for (let i = 0; i < n; i++) {
      sxx += ((xs[i] as number) - mx) ** 2;
      sxy += ((xs[i] as number) - mx) * ((ys[i] as number) - my);
    }
    const slope = sxy / sxx;
    const intercept = my - slope * mx;
    let ss = 0;
    for (let i = 0; i < n; i++) ss += ((ys[i] as number) - intercept - slope * (xs[i] as number)) ** 2;
    const sigmaSlope = Math.sqrt(ss / (n - 2) / sxx);
    // Converged to 1e-6 relative in T: the slope and T agree to that.
    expect(Math.abs(r.slope - slope) / Math.abs(slope)).toBeLessThan(1e-5);
    expect(Math.abs(r.intercept - intercept)).toBeLessThan(1e-5);
    const sigmaT = (T * T * sigmaSlope) / C2;
    expect(Math.abs(r.temperature.uncertainty - sigmaT) / sigmaT).toBeLessThan(1e-4);
    for (const p of r.points) expect(Math.abs(p.residual - (p.y - r.intercept - r.slope * p.x))).toBeLessThan(1e-12);
  });

  it('leaves out lines of zero intensity and P(0); needs four lines, two energies and a falling plot', () => {
    const base = lines(300);
    const withJunk = [
      ...base,
      { position: 70, intensity: 0, branch: 'R' as const, j: 3, lowerEnergy: 24 },
      { position: 60, intensity: 5, branch: 'P' as const, j: 0, lowerEnergy: 0 },
      { position: 70, intensity: -1, branch: 'R' as const, j: 2, lowerEnergy: 12 },
    ];
    expect(boltzmannTemperature(withJunk)?.points).toHaveLength(25);
    expect(Math.abs((boltzmannTemperature(withJunk)?.temperature.value as number) - 300)).toBeLessThan(1e-6);
    expect(boltzmannTemperature(base.slice(0, 3))).toBeUndefined();
    expect(boltzmannTemperature(base.slice(0, 4))).toBeDefined();
    const flat = base.map((p) => ({ ...p, lowerEnergy: 10 }));
    expect(boltzmannTemperature(flat)).toBeUndefined();
    // Intensities rising with E″ (an inverted population) give no temperature.
    const rising = base.map((p) => ({
      ...p,
      intensity: p.position * (p.branch === 'R' ? p.j + 1 : p.j) * Math.exp(p.lowerEnergy / 100),
    }));
    expect(boltzmannTemperature(rising)).toBeUndefined();
    // Exactly level: no temperature either.
    const level = base.map((p) => ({
      ...p,
      intensity: p.position * (p.branch === 'R' ? p.j + 1 : p.j) * (1 - Math.exp((-C2 * p.position) / 296)),
    }));
    expect(boltzmannTemperature(level)).toBeUndefined();
  });
});

describe('calibration against reference positions, by hand', () => {
  // Term values from Y10 = 2000, Y20 = −10, Y01 = 2, Y11 = −0.02 written out here: E(v, J) = Σ Y_kl (v + ½)^k (J(J+1))^l.
  const Y: [string, number][] = [
    ['1,0', 2000],
    ['2,0', -10],
    ['0,1', 2],
    ['1,1', -0.02],
  ];
  const energy = (v: number, j: number) => {
    const x = v + 0.5;
    const n = j * (j + 1);
    return 2000 * x - 10 * x * x + 2 * n - 0.02 * x * n;
  };
  // A rigid rotor on a harmonic oscillator (Y10, Y01 only): no term the scale priors sit next to.
  const rigid = (v: number, j: number) => 2000 * (v + 0.5) + 2 * j * (j + 1);
  const lines = (offset: number, ppm: number, sigma: (i: number) => number, E = energy) => {
    const pts: { observed: number; sigma: number; upperV: number; upperJ: number; lowerV: number; lowerJ: number }[] =
      [];
    let i = 0;
    for (let j = 0; j <= 10; j++) {
      pts.push({ observed: E(1, j + 1) - E(0, j), sigma: sigma(i++), upperV: 1, upperJ: j + 1, lowerV: 0, lowerJ: j });
      if (j > 0)
        pts.push({
          observed: E(1, j - 1) - E(0, j),
          sigma: sigma(i++),
          upperV: 1,
          upperJ: j - 1,
          lowerV: 0,
          lowerJ: j,
        });
    }
    let sw = 0;
    let swx = 0;
    for (const p of pts) {
      sw += 1 / p.sigma ** 2;
      swx += p.observed / p.sigma ** 2;
    }
    const centre = swx / sw;
    return {
      centre,
      pts: pts.map((p) => ({ ...p, observed: p.observed + offset + ppm * 1e-6 * (p.observed - centre) })),
    };
  };

  it('recovers offset and scale exactly, with the nuisance terms the constants lack next to those they have', () => {
    const sig = (i: number) => 0.002 * (1 + (i % 3));
    const { centre, pts } = lines(0.013, 25, sig);
    const r = calibrateAgainstLibrary(pts, new Map(Y), 'test constants', 100);
    if (!r) throw new Error('no calibration');
    expect(r.nuisance).toEqual(['ω_e y_e', 'γ_e']);
    expect(Math.abs(r.offset.value - 0.013)).toBeLessThan(1e-9);
    expect(Math.abs((r.scale?.value as number) - 25)).toBeLessThan(1e-5);
    expect(Math.abs(r.centre - centre)).toBeLessThan(1e-9);
    expect(r.lines).toBe(pts.length);
    expect(r.reference).toBe('test constants');
    expect([r.offset.unit, r.scale?.unit]).toEqual(['cm-1', 'ppm']);
  });

  it('without nuisance terms it is the weighted straight line: σ(offset) = 1/√Σw, σ(scale) = 1/√Σw(x − x̄)² (1e-9)', () => {
    const sig = (i: number) => 0.001 * (1 + (i % 4));
    const { centre, pts } = lines(-0.004, -10, sig, rigid);
    const map = new Map([
      ['1,0', 2000],
      ['0,1', 2],
    ]);
    const r = calibrateAgainstLibrary(pts, map, 'x', 1000);
    if (!r) throw new Error('no calibration');
    expect(r.nuisance).toEqual([]);
    expect(Math.abs(r.centre - centre)).toBeLessThan(1e-9);
    let sw = 0;
    let swxx = 0;
    for (const p of pts) {
      sw += 1 / p.sigma ** 2;
      swxx += (rigid(p.upperV, p.upperJ) - rigid(p.lowerV, p.lowerJ) - centre) ** 2 / p.sigma ** 2;
    }
    expect(Math.abs(r.offset.uncertainty - 1 / Math.sqrt(sw)) / (1 / Math.sqrt(sw))).toBeLessThan(1e-9);
    const sScale = 1e6 / Math.sqrt(swxx);
    expect(Math.abs((r.scale?.uncertainty as number) - sScale) / sScale).toBeLessThan(1e-9);
    expect(Math.abs(r.offset.value + 0.004)).toBeLessThan(1e-9);
    expect(Math.abs((r.scale?.value as number) + 10)).toBeLessThan(1e-5);
    // A limit at 3σ exactly still reports the scale; just below, only its σ.
    const limit = 3 * (r.scale?.uncertainty as number);
    expect(calibrateAgainstLibrary(pts, map, 'x', limit * (1 + 1e-9))?.scale).toBeDefined();
    const under = calibrateAgainstLibrary(pts, map, 'x', limit * 0.999);
    expect(under?.scale).toBeUndefined();
    expect(Math.abs((under?.scaleUndetermined as number) - sScale) / sScale).toBeLessThan(1e-9);
  });

  it('ω_e z_e is a nuisance only next to ω_e y_e; H_e comes with D_e, from the Dunham relation ± 50 %', () => {
    const { pts } = lines(0, 0, () => 0.002);
    const withY30 = calibrateAgainstLibrary(pts, new Map([...Y, ['3,0', 0.01]]), 'x', 100);
    expect(withY30?.nuisance).toEqual(['ω_e z_e', 'γ_e']);
    const withD = calibrateAgainstLibrary(pts, new Map([...Y, ['0,2', -1e-4]]), 'x', 100);
    expect(withD?.nuisance).toEqual(['ω_e y_e', 'γ_e', 'β_e', 'H_e']);
    const withH = calibrateAgainstLibrary(pts, new Map([...Y, ['0,2', -1e-4], ['0,3', 1e-9]]), 'x', 100);
    expect(withH?.nuisance).toEqual(['ω_e y_e', 'γ_e', 'β_e']);
    // Without ω_e or B_e there is no κ = B_e/ω_e, so no scale priors.
    const noOmega = calibrateAgainstLibrary(
      pts,
      new Map([
        ['0,1', 2],
        ['2,0', -10],
        ['1,1', -0.02],
      ]),
      'x',
      100,
    );
    expect(noOmega?.nuisance).toEqual([]);
  });

  // Lines of three bands whose true term values carry ω_e y_e = 0.05 and γ_e = 3e-5 cm⁻¹, which the reference
  // constants lack: with the two nuisance terms in the regression, and lines far more precise (σ = 1e-5) than the
  // priors (0 ± a few 0.01), the offset and scale come out as put in; with the nuisance columns zeroed by hand the
  // offset came out 1.04 cm⁻¹ off.
  it('the nuisance terms take up what the constants lack, so offset and scale come out right (1e-6, 0.01 ppm)', () => {
    const truth = (v: number, j: number) => {
      const x = v + 0.5;
      return energy(v, j) + 0.05 * x ** 3 + 3e-5 * x * x * j * (j + 1);
    };
    const pts: { observed: number; sigma: number; upperV: number; upperJ: number; lowerV: number; lowerJ: number }[] =
      [];
    for (const up of [1, 2, 3])
      for (let j = 0; j <= 12; j++) {
        pts.push({
          observed: truth(up, j + 1) - truth(0, j),
          sigma: 1e-5,
          upperV: up,
          upperJ: j + 1,
          lowerV: 0,
          lowerJ: j,
        });
        if (j > 0)
          pts.push({
            observed: truth(up, j - 1) - truth(0, j),
            sigma: 1e-5,
            upperV: up,
            upperJ: j - 1,
            lowerV: 0,
            lowerJ: j,
          });
      }
    const refs = pts.map((p) => energy(p.upperV, p.upperJ) - energy(p.lowerV, p.lowerJ));
    const centre = refs.reduce((a, b) => a + b, 0) / refs.length;
    const shifted = pts.map((p, i) => ({
      ...p,
      observed: p.observed + 0.013 + 25e-6 * ((refs[i] as number) - centre),
    }));
    const r = calibrateAgainstLibrary(shifted, new Map(Y), 'x', 100);
    if (!r) throw new Error('no calibration');
    expect(r.nuisance).toEqual(['ω_e y_e', 'γ_e']);
    expect(Math.abs(r.centre - centre)).toBeLessThan(1e-9);
    expect(Math.abs(r.offset.value - 0.013)).toBeLessThan(1e-6);
    expect(Math.abs((r.scale?.value as number) - 25)).toBeLessThan(0.01);
  });

  it('fewer than three lines, or lines that cannot separate offset and scale, give no calibration', () => {
    const { pts } = lines(0, 0, () => 0.002);
    expect(calibrateAgainstLibrary(pts.slice(0, 2), new Map(Y), 'x', 100)).toBeUndefined();
    expect(calibrateAgainstLibrary(pts.slice(0, 3), new Map(Y), 'x', 100)).toBeDefined();
    const same = [pts[0], pts[0], pts[0]] as typeof pts;
    expect(calibrateAgainstLibrary(same, new Map(Y), 'x', 100)).toBeUndefined();
  });
});

describe('guard-banded decision (JCGM 106:2012, guard band 2u)', () => {
  it('the false-alarm quantile is the two-sided 1 % point of the normal, 2.5758293035489 (SciPy norm.ppf(0.995))', () => {
    expect(FALSE_ALARM_RATE).toBe(0.01);
    expect(Math.abs(FALSE_ALARM_Z - 2.5758293035489004)).toBeLessThan(1e-12);
  });
  it.each([
    // x, u, limit, status: worked out from the rule |x| ≤ L, or |x| ≤ 2.576u while u ≤ L → pass; |x| > L + 2u → fail; else warn.
    [0.05, 0.001, 0.05, 'pass'],
    [-0.05, 0.001, 0.05, 'pass'],
    [0.0501, 0.001, 0.05, 'warn'],
    [0.0519, 0.001, 0.05, 'warn'],
    [0.0521, 0.001, 0.05, 'fail'],
    [-0.0521, 0.001, 0.05, 'fail'],
    [0.125, 0.05, 0.05, 'pass'], // 0.125 ≤ 2.5758 × 0.05 = 0.1288
    [0.13, 0.05, 0.05, 'warn'], // above 0.1288, not above 0.15
    [0.151, 0.05, 0.05, 'fail'],
    [0, 0, 0, 'pass'],
    [1e-9, 0, 0, 'fail'],
  ] as const)('x = %f, u = %f, L = %f → %s', (x, u, limit, status) => {
    expect(guardBandedStatus(x, u, limit)).toBe(status);
  });
});

describe('predicted lines by hand', () => {
  // ω_e = 2000, ω_e x_e = 10, B_e = 2, α_e = 0.02, D_e = 1e-5: G(1) − G(0) = 2000 − 10·(2.25 − 0.25) = 1980;
  // B₀ = 1.99, B₁ = 1.97; F_v(J) = B_v J(J+1) − D J²(J+1)².
  //   R(0) = 1980 + 1.97·2 − 1e-5·4 = 1983.93996
  //   P(1) = 1980 − (1.99·2 − 1e-5·4) = 1976.02004
  //   R(1) = 1980 + 1.97·6 − 1e-5·36 − (1.99·2 − 1e-5·4) = 1987.83968
  // ∂R(0)/∂(ω_e, ω_e x_e, B_e, α_e, D_e) = (1, −2, 2, −3, −4): σ² = Σ (g σ)².
  const constants: ConstantsInput = {
    values: {
      omega_e: { value: 2000, uncertainty: 0.1 },
      omega_e_x_e: { value: 10, uncertainty: 0.01 },
      B_e: { value: 2, uncertainty: 1e-4 },
      alpha_e: { value: 0.02, uncertainty: 1e-5 },
      D_e: { value: 1e-5, uncertainty: 1e-8 },
    },
  };
  const species = parseSpecies('HCl');
  it('positions, E″ and σ of R(0), P(1), R(1) (1e-9)', () => {
    const r = predictLines(species, constants, { bands: [{ upper: 1, lower: 0 }], jMax: 3 });
    expect(r.source).toBe('caller');
    const line = (branch: 'P' | 'R', j: number) => r.lines.find((l) => l.branch === branch && l.j === j);
    expect(Math.abs((line('R', 0)?.wavenumber.value as number) - 1983.93996)).toBeLessThan(1e-9);
    expect(Math.abs((line('P', 1)?.wavenumber.value as number) - 1976.02004)).toBeLessThan(1e-9);
    expect(Math.abs((line('R', 1)?.wavenumber.value as number) - 1987.83968)).toBeLessThan(1e-9);
    expect(Math.abs((line('R', 1)?.lowerEnergy as number) - (1.99 * 2 - 4e-5))).toBeLessThan(1e-12);
    expect(line('R', 0)?.lowerEnergy).toBe(0);
    const s = Math.hypot(0.1, 2 * 0.01, 2 * 1e-4, 3 * 1e-5, 4 * 1e-8);
    expect(Math.abs((line('R', 0)?.wavenumber.uncertainty as number) - s) / s).toBeLessThan(1e-9);
    expect(line('R', 0)?.band).toBe('1-0');
    expect(line('R', 0)?.wavenumber.unit).toBe('cm-1');
    expect(r.lines.map((l) => `${l.branch}${l.j}`)).toEqual(['P1', 'P2', 'P3', 'R0', 'R1', 'R2', 'R3']);
    expect(r.constants).toEqual([
      { name: 'omega_e', value: 2000, uncertainty: 0.1 },
      { name: 'omega_e_x_e', value: 10, uncertainty: 0.01 },
      { name: 'B_e', value: 2, uncertainty: 1e-4 },
      { name: 'alpha_e', value: 0.02, uncertainty: 1e-5 },
      { name: 'D_e', value: 1e-5, uncertainty: 1e-8 },
    ]);
    expect(Math.max(...r.lines.map((l) => l.relativeIntensity))).toBe(1);
    for (const l of r.lines) expect(l.relativeIntensity).toBeGreaterThan(0);
  });

  it('a covariance overrides the separate σ: ρ(ω_e, ω_e x_e) = 1 gives σ(R(0)) from |0.1 − 2·0.01| and the rest', () => {
    const r = predictLines(
      species,
      {
        values: constants.values,
        covariance: {
          names: ['omega_e_x_e', 'omega_e'],
          matrix: [
            [1e-4, 1e-3],
            [1e-3, 1e-2],
          ],
        },
      },
      { bands: [{ upper: 1, lower: 0 }], jMax: 0 },
    );
    const r0 = r.lines.find((l) => l.branch === 'R' && l.j === 0);
    // Only ω_e and ω_e x_e carry variance: σ = |1·0.1 + (−2)·0.01| = 0.08.
    expect(Math.abs((r0?.wavenumber.uncertainty as number) - 0.08)).toBeLessThan(1e-12);
    expect(r.constants.find((c) => c.name === 'B_e')?.uncertainty).toBe(0);
  });

  it('a branch ends where the term values stop rising with J (D_e = 0.01: R to J″ = 8, P to J″ = 9)', () => {
    const steep = { values: { ...constants.values, D_e: { value: 0.01, uncertainty: 1e-8 } } };
    const r = predictLines(species, steep, { bands: [{ upper: 1, lower: 0 }], jMax: 30 });
    expect(r.lines.filter((l) => l.branch === 'R').map((l) => l.j)).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8]);
    expect(r.lines.filter((l) => l.branch === 'P').map((l) => l.j)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9]);
  });

  it('a pure rotation band has R lines only, and ω_e without σ leaves its σ known (it does not enter)', () => {
    const noOmegaSigma = { values: { ...constants.values, omega_e: { value: 2000 } } };
    const r = predictLines(species, noOmegaSigma, { bands: [{ upper: 0, lower: 0 }], jMax: 2 });
    expect(r.lines.map((l) => `${l.branch}${l.j}`)).toEqual(['R0', 'R1', 'R2']);
    // R(0) of v = 0: 2 B₀ − 4 D = 3.97996, σ² = (2σ_B)² + (2·½ σ_α)² + (4σ_D)².
    const r0 = r.lines[0];
    expect(Math.abs((r0?.wavenumber.value as number) - 3.97996)).toBeLessThan(1e-12);
    const s = Math.hypot(2e-4, 1e-5, 4e-8);
    expect(Math.abs((r0?.wavenumber.uncertainty as number) - s) / s).toBeLessThan(1e-9);
    expect(r.constants[0]).toEqual({ name: 'omega_e', value: 2000, uncertainty: null });
    const band = predictLines(species, noOmegaSigma, { bands: [{ upper: 1, lower: 0 }], jMax: 1 });
    for (const l of band.lines) expect(l.wavenumber.uncertainty).toBeNull();
  });

  // I ∝ g_band ν S e^{−c₂E″/T}(1 − e^{−c₂ν/T}) (SCIENCE.md §5), S = J″+1 (R), J″ (P), normalised to the strongest
  // line; g_band, the rough band strength of the ranking (common practice): 1 for 1-0, 2 for 2-1, 0.01 for 2-0.
  it('relative intensities across bands at 296 K follow the formula written out here (1e-9)', () => {
    const bands = [
      { upper: 1, lower: 0 },
      { upper: 2, lower: 0 },
      { upper: 2, lower: 1 },
    ];
    const r = predictLines(species, constants, { bands, jMax: 20 });
    const g = { '1-0': 1, '2-0': 0.01, '2-1': 2 } as Record<string, number>;
    const raw = r.lines.map((l) => {
      const s = l.branch === 'R' ? l.j + 1 : l.j;
      const nu = l.wavenumber.value;
      return (g[l.band] as number) * nu * s * Math.exp((-C2 * l.lowerEnergy) / 296) * (1 - Math.exp((-C2 * nu) / 296));
    });
    const max = Math.max(...raw);
    r.lines.forEach((l, i) => {
      expect(Math.abs(l.relativeIntensity - (raw[i] as number) / max)).toBeLessThan(1e-9);
    });
    // E″ of the hot band's lines is measured from v = 0, J = 0: G(1) − G(0) = 1980 plus the rotation of v = 1.
    const hot = r.lines.find((l) => l.band === '2-1' && l.branch === 'R' && l.j === 0);
    expect(Math.abs((hot?.lowerEnergy as number) - 1980)).toBeLessThan(1e-9);
    // A band drawn downwards (upper below lower) has ν < 0: its lines carry intensity 0, never NaN.
    const down = predictLines(species, constants, { bands: [{ upper: 0, lower: 1 }], jMax: 3 });
    expect(down.lines.length).toBeGreaterThan(0);
    for (const l of down.lines) {
      expect(l.wavenumber.value).toBeLessThan(0);
      expect(l.relativeIntensity).toBe(0);
    }
  });

  it('a covariance makes every σ known, even of constants given without one', () => {
    const bare = {
      values: { omega_e: { value: 2000 }, omega_e_x_e: { value: 10 }, B_e: { value: 2 }, alpha_e: { value: 0.02 } },
      covariance: { names: ['omega_e' as const], matrix: [[0.01]] },
    };
    const r = predictLines(species, bare, { bands: [{ upper: 1, lower: 0 }], jMax: 1 });
    for (const l of r.lines) expect(l.wavenumber.uncertainty).toBeCloseTo(0.1, 12);
    expect(r.constants.map((c) => c.uncertainty)).toEqual([0.1, 0, 0, 0]);
  });

  it('library constants carry no σ; refusals name what is missing or wrong', () => {
    const lib = predictLines(species, undefined, { bands: [{ upper: 1, lower: 0 }], jMax: 2 });
    expect(lib.source).toBe('library');
    for (const c of lib.constants) expect(c.uncertainty).toBeNull();
    expect(lib.constants.map((c) => c.name)).toContain('omega_e');
    // R(0) of H35Cl 1-0 lies at 2906.25 cm⁻¹ (HITRAN, from memory); the library's constants without higher terms
    // give it within 0.5 cm⁻¹.
    const r0 = lib.lines.find((l) => l.branch === 'R' && l.j === 0);
    expect(Math.abs((r0?.wavenumber.value as number) - 2906.25)).toBeLessThan(0.5);
    const missing = err(() => predictLines(parseSpecies('NaCl'), undefined, { bands: [] }));
    expect(missing.code).toBe('SPECIES_NOT_IN_LIBRARY');
    expect(missing.message).toBe('23Na-35Cl is not in the reference library: send its constants');
    expect(missing.details).toEqual({ species: '23Na-35Cl' });
    const noB = err(() => predictLines(species, { values: { omega_e: { value: 2000 } } }, { bands: [] }));
    expect(noB.code).toBe('INPUT_INVALID');
    expect(noB.message).toBe(
      'constants need at least omega_e and B_e (in constants.values; leave constants out to use the reference library)',
    );
    expect(noB.details).toEqual({ given: ['omega_e'] });
    const badName = err(() =>
      predictLines(
        species,
        { values: constants.values, covariance: { names: ['gamma_e'], matrix: [[1]] } },
        { bands: [] },
      ),
    );
    expect(badName.message).toBe('the covariance names must be constants that are given, one row per name');
    expect(badName.code).toBe('INPUT_INVALID');
    expect(badName.details).toEqual({ names: ['gamma_e'] });
    const oneUnknown = err(() =>
      predictLines(
        species,
        {
          values: constants.values,
          covariance: {
            names: ['B_e', 'gamma_e'],
            matrix: [
              [1, 0],
              [0, 1],
            ],
          },
        },
        { bands: [] },
      ),
    );
    expect(oneUnknown.message).toBe('the covariance names must be constants that are given, one row per name');
    const rows = err(() =>
      predictLines(
        species,
        { values: constants.values, covariance: { names: ['B_e'], matrix: [[1], [1]] } },
        { bands: [] },
      ),
    );
    expect(rows.code).toBe('INPUT_INVALID');
    const square = err(() =>
      predictLines(
        species,
        { values: constants.values, covariance: { names: ['B_e'], matrix: [[1, 2]] } },
        { bands: [] },
      ),
    );
    expect(square.message).toBe('the covariance matrix must be square');
    expect(square.code).toBe('INPUT_INVALID');
  });
});

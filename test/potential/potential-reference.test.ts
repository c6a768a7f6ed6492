import { describe, expect, it } from 'vitest';
import { ROTATIONAL_FACTOR } from '../../src/constants/codata-2018.js';
import type { ScienceError } from '../../src/errors.js';
import {
  type DunhamCoefficient,
  extrapolationLimit,
  MAX_V,
  type PotentialInput,
  potentialCurves,
} from '../../src/potential/potential-curve.js';

// Fast checks of potentialCurves without the Numerov check (verify: false), each computed inside `it`, against
// values worked out by hand below for an invented set of constants (not a molecule): ω_e = 2000, ω_e x_e = 10,
// B_e = 2, α_e = 0.02 cm⁻¹, μ = 1 u, so C = ħ²/2μ = ROTATIONAL_FACTOR (16.8576… cm⁻¹ Å², CODATA 2018).
const BASE: DunhamCoefficient[] = [
  { k: 1, l: 0, value: 2000 },
  { k: 2, l: 0, value: -10 },
  { k: 0, l: 1, value: 2 },
  { k: 1, l: 1, value: -0.02 },
];
// σ(Y10) = 0.5, σ(Y20) = 0.01, σ(Y01) = 1e-4, σ(Y11) = 2e-5, uncorrelated.
const SIGMA = [0.5, 0.01, 1e-4, 2e-5];
const diagonal = (s: readonly number[]) => {
  const m = new Float64Array(s.length * s.length);
  s.forEach((v, i) => {
    m[i * s.length + i] = v * v;
  });
  return m;
};
const mu = { value: 1, uncertainty: 0 };
const run = (over: Partial<PotentialInput> = {}) =>
  potentialCurves({
    coefficients: BASE,
    covariance: diagonal(SIGMA),
    reducedMass: mu,
    vMax: 4,
    verify: false,
    ...over,
  });
const refusal = (over: Partial<PotentialInput>): ScienceError => {
  try {
    run(over);
  } catch (e) {
    return e as ScienceError;
  }
  throw new Error('expected a ScienceError');
};

describe('levels of potentialCurves by hand', () => {
  it('G_v = 2000x − 10x², B_v = 2 − 0.02x at x = v + ½, with σ from the diagonal covariance (1e-9 relative)', () => {
    const r = run();
    expect(r.hbar2Over2mu).toBe(ROTATIONAL_FACTOR);
    expect(r.levels.map((l) => l.v)).toEqual([0, 1, 2, 3, 4]);
    for (const l of r.levels) {
      const x = l.v + 0.5;
      expect(Math.abs(l.energy.value - (2000 * x - 10 * x * x))).toBeLessThan(1e-9);
      // σ(G) = √((x σ10)² + (x² σ20)²), σ(B) = √(σ01² + (x σ11)²).
      const sG = Math.hypot(x * 0.5, x * x * 0.01);
      expect(Math.abs(l.energy.uncertainty - sG) / sG).toBeLessThan(1e-6);
      expect(Math.abs(l.B.value - (2 - 0.02 * x))).toBeLessThan(1e-14);
      const sB = Math.hypot(1e-4, x * 2e-5);
      expect(Math.abs(l.B.uncertainty - sB) / sB).toBeLessThan(1e-6);
      expect([l.energy.unit, l.rMin.unit, l.rMax.unit, l.B.unit]).toEqual(['cm-1', 'angstrom', 'angstrom', 'cm-1']);
      expect(l.rMin.uncertainty).toBeGreaterThan(0);
      expect(l.rMax.uncertainty).toBeGreaterThan(0);
    }
  });

  it('σ(r±) follow the covariance: zero without it, and σ(B_e) alone moves both turning points by r·σ(B)/(2B) at v = 0 (10 %)', () => {
    const none = run({ covariance: new Float64Array(16) });
    for (const l of none.levels)
      expect([l.energy.uncertainty, l.rMin.uncertainty, l.rMax.uncertainty]).toEqual([0, 0, 0]);
    // With B(v) of the harmonic-like v = 0 level, r± scale as 1/√B to first order: σ(r) ≈ r σ(B)/(2B).
    const onlyB = run({ covariance: diagonal([0, 0, 1e-4, 0]) });
    const l0 = onlyB.levels[0];
    if (!l0) throw new Error('no level');
    expect(Math.abs(l0.rMin.uncertainty - (l0.rMin.value * 1e-4) / 4) / ((l0.rMin.value * 1e-4) / 4)).toBeLessThan(0.1);
    expect(Math.abs(l0.rMax.uncertainty - (l0.rMax.value * 1e-4) / 4) / ((l0.rMax.value * 1e-4) / 4)).toBeLessThan(0.1);
  });

  it('coefficients in any order, Y00 and l = 2 terms left out of the potential', () => {
    const shuffled = [BASE[3], { k: 0, l: 0, value: 0.5 }, BASE[0], { k: 0, l: 2, value: -6e-6 }, BASE[2], BASE[1]];
    const s = [2e-5, 0, 0.5, 0, 1e-4, 0.01];
    const a = run({ coefficients: shuffled as DunhamCoefficient[], covariance: diagonal(s) });
    const b = run();
    for (let v = 0; v <= 4; v++) {
      const la = a.levels[v];
      const lb = b.levels[v];
      if (!la || !lb) throw new Error('missing level');
      expect(Math.abs(la.energy.value - lb.energy.value)).toBeLessThan(1e-12);
      expect(Math.abs(la.rMin.value - lb.rMin.value)).toBeLessThan(1e-13);
      expect(Math.abs(la.rMax.value - lb.rMax.value)).toBeLessThan(1e-13);
      expect(Math.abs(la.B.value - lb.B.value)).toBeLessThan(1e-15);
      expect(Math.abs(la.rMax.uncertainty - lb.rMax.uncertainty)).toBeLessThan(1e-3 * lb.rMax.uncertainty);
    }
  });
});

describe('Morse parameters by hand', () => {
  // D_e = ω_e²/(4 ω_e x_e) = 4e6/40 = 100 000; a = √(ω_e x_e / C); r_e = √(C/B_e).
  // σ(D_e)² = (ω_e/(2ω_e x_e) σ_ω)² + (ω_e²/(4(ω_e x_e)²) σ_ωx)² = (100·0.5)² + (10 000·0.01)² → σ = √(2500 + 10 000);
  // σ(a) = a σ_ωx/(2ω_e x_e) = a·0.0005; σ(r_e) = r_e σ_B/(2B_e) = r_e·2.5e-5.
  it('D_e, a, r_e and their σ (1e-6 relative)', () => {
    const m = run().morse;
    if (!m) throw new Error('no Morse parameters');
    const C = ROTATIONAL_FACTOR;
    expect(Math.abs(m.D_e.value - 100_000)).toBeLessThan(1e-8);
    expect(Math.abs(m.D_e.uncertainty - Math.sqrt(12_500)) / Math.sqrt(12_500)).toBeLessThan(1e-6);
    expect(Math.abs(m.a.value - Math.sqrt(10 / C))).toBeLessThan(1e-14);
    expect(Math.abs(m.a.uncertainty - Math.sqrt(10 / C) * 0.0005) / (Math.sqrt(10 / C) * 0.0005)).toBeLessThan(1e-6);
    expect(Math.abs(m.r_e.value - Math.sqrt(C / 2))).toBeLessThan(1e-14);
    expect(Math.abs(m.r_e.uncertainty - Math.sqrt(C / 2) * 2.5e-5) / (Math.sqrt(C / 2) * 2.5e-5)).toBeLessThan(1e-6);
    expect([m.D_e.unit, m.a.unit, m.r_e.unit]).toEqual(['cm-1', 'angstrom-1', 'angstrom']);
  });

  // Y20 = −ω_e x_e, so ρ(ω_e, ω_e x_e) = +1 is cov(Y10, Y20) = −σ10 σ20.
  it('a correlation between ω_e and ω_e x_e enters σ(D_e): ρ = 1 gives |100·0.5 − 10 000·0.01| = 50', () => {
    const cov = diagonal(SIGMA);
    cov[1] = -0.5 * 0.01;
    cov[4] = -0.5 * 0.01;
    const m = run({ covariance: cov }).morse;
    expect(Math.abs((m?.D_e.uncertainty as number) - 50) / 50).toBeLessThan(1e-5);
  });

  it('no Morse curve without ω_e x_e (a warning), or when ω_e x_e is not positive (another)', () => {
    const harmonic = run({
      coefficients: BASE.filter((c) => c.k !== 2),
      covariance: diagonal([0.5, 1e-4, 2e-5]),
    });
    expect(harmonic.morse).toBeUndefined();
    expect(harmonic.curves.morse).toEqual([]);
    expect(harmonic.warnings.map((w) => w.code)).toContain('POTENTIAL_HARMONIC');
    expect(harmonic.warnings.map((w) => w.code)).not.toContain('POTENTIAL_NO_MORSE');
    const upward = run({ coefficients: BASE.map((c) => (c.k === 2 ? { ...c, value: 10 } : c)) });
    expect(upward.morse).toBeUndefined();
    expect(upward.warnings).toContainEqual({
      code: 'POTENTIAL_NO_MORSE',
      message: 'omega_e_x_e is not positive: no Morse curve',
    });
    const zero = run({ coefficients: BASE.map((c) => (c.k === 2 ? { ...c, value: 0 } : c)) });
    expect(zero.morse).toBeUndefined();
  });
});

describe('warnings and refusals of potentialCurves', () => {
  it('warns when the range of the data is unknown, when B is rigid, and above vData; not within it', () => {
    const codes = (r: ReturnType<typeof run>) => r.warnings.map((w) => w.code);
    expect(codes(run())).toEqual(['POTENTIAL_RANGE_UNKNOWN']);
    expect(run().warnings[0]?.message).toBe(
      'the levels the constants were fitted to are not known: turning points above them are extrapolated',
    );
    expect(codes(run({ vData: 4 }))).toEqual([]);
    expect(codes(run({ vData: 5 }))).toEqual([]);
    const above = run({ vData: 1 });
    expect(above.warnings).toEqual([
      {
        code: 'POTENTIAL_EXTRAPOLATED',
        message: 'levels above v = 1 (up to 4) use the expansion beyond the levels the data reached',
      },
    ]);
    const rigid = run({ coefficients: BASE.slice(0, 3), covariance: diagonal(SIGMA.slice(0, 3)), vData: 4 });
    expect(rigid.warnings).toEqual([
      { code: 'POTENTIAL_RIGID', message: 'without alpha_e, B(v) is taken as B_e at every level' },
    ]);
    for (const l of rigid.levels) expect(l.B.value).toBe(2);
    const harmonic = run({
      coefficients: [BASE[0], BASE[2]] as DunhamCoefficient[],
      covariance: diagonal([0.5, 1e-4]),
      vData: 4,
    });
    expect(harmonic.warnings).toEqual([
      { code: 'POTENTIAL_HARMONIC', message: 'without omega_e_x_e the levels are harmonic; no Morse curve' },
      { code: 'POTENTIAL_RIGID', message: 'without alpha_e, B(v) is taken as B_e at every level' },
    ]);
  });

  it('vMax up to 2·vData + 3 (a project rule) is accepted, one more refused with the limit in the details', () => {
    expect(extrapolationLimit(1)).toBe(5);
    expect(run({ vData: 1, vMax: 5 }).levels).toHaveLength(6);
    const e = refusal({ vData: 1, vMax: 6 });
    expect(e.code).toBe('POTENTIAL_EXTRAPOLATION_TOO_FAR');
    expect(e.message).toBe('vMax = 6 is far beyond the highest level the data reached (v = 1); at most 5 is accepted');
    expect(e.details).toEqual({ vMax: 6, vData: 1, limit: 5 });
  });

  it('vMax must be an integer from 0 to 100; 0 gives the ground level alone', () => {
    expect(MAX_V).toBe(100);
    for (const vMax of [-1, 1.5, 101, Number.NaN]) {
      const e = refusal({ vMax });
      expect(e.code).toBe('INPUT_INVALID');
      expect(e.message).toBe('vMax must be an integer from 0 to 100');
    }
    const ground = run({ vMax: 0 });
    expect(ground.levels.map((l) => l.v)).toEqual([0]);
  });

  it('ω_e and B_e are required, and the refusal names what was given', () => {
    const e = refusal({ coefficients: BASE.slice(1), covariance: diagonal(SIGMA.slice(1)) });
    expect(e.code).toBe('POTENTIAL_UNDETERMINED');
    expect(e.message).toBe(
      'turning points need at least omega_e (Y10) and B_e (Y01): from a fit, send lines of two or more vibrational levels (a fundamental with an overtone or a hot band); or send the constants in constants.values, or the species alone to use the reference library',
    );
    expect(e.details).toEqual({ given: ['Y20', 'Y01', 'Y11'] });
    const noB = refusal({ coefficients: [BASE[0], BASE[1]] as DunhamCoefficient[], covariance: diagonal([0.5, 0.01]) });
    expect(noB.code).toBe('POTENTIAL_UNDETERMINED');
  });

  // dG/dv = 2000 − 20x vanishes at x = 100 (v = 99.5); B = 2 − 0.02x at x = 100 too, so make α larger:
  // with α_e = 0.5, B = 2 − 0.5x vanishes at x = 4 (v = 3.5). The scan samples x in steps of (vMax + ½)/4000, so
  // the v reported lies within one step above the zero.
  it('refuses G(v) that stops rising (v = 99.5) and B(v) that stops being positive (v = 3.5), with where', () => {
    const flat = refusal({ vMax: 100 });
    expect(flat.code).toBe('POTENTIAL_LEVELS_NOT_INCREASING');
    expect(flat.message).toMatch(/^G\(v\) stops increasing near v = 99\.5\d, below vMax = 100$/);
    expect(flat.details.vMax).toBe(100);
    expect(flat.details.vLimit).toBe(98);
    expect(flat.details.v as number).toBeGreaterThanOrEqual(99.5);
    expect(flat.details.v as number).toBeLessThanOrEqual(99.5 + 100.5 / 4000 + 5e-4);
    const steep = refusal({ coefficients: BASE.map((c) => (c.l === 1 && c.k === 1 ? { ...c, value: -0.5 } : c)) });
    expect(steep.code).toBe('POTENTIAL_CONSTANTS_INVALID');
    expect(steep.message).toBe('B(v) is no longer positive near v = 3.50, below vMax = 4');
    expect(steep.details.vLimit).toBe(2);
    expect(steep.details.v as number).toBeGreaterThanOrEqual(3.5);
    expect(steep.details.v as number).toBeLessThanOrEqual(3.5 + 4.5 / 4000 + 5e-4);
    // Just below: vMax = 3 is accepted.
    expect(
      run({ vMax: 3, coefficients: BASE.map((c) => (c.l === 1 && c.k === 1 ? { ...c, value: -0.5 } : c)) }).levels,
    ).toHaveLength(4);
  });
});

describe('curves for plotting', () => {
  it('RKR points every quarter level on both branches around r_e, the Morse curve below 1.5× the top', () => {
    const r = run();
    const rkr = r.curves.rkr;
    // 4·vMax + 1 = 17 energies on each branch plus the minimum.
    expect(rkr).toHaveLength(35);
    expect(rkr[17]).toEqual({ r: Math.sqrt(ROTATIONAL_FACTOR / 2), energy: 0 });
    for (let q = 0; q <= 16; q++) {
      const x = q / 4 + 0.5;
      const g = 2000 * x - 10 * x * x;
      expect(Math.abs((rkr[18 + q]?.energy as number) - g)).toBeLessThan(1e-9);
      expect(Math.abs((rkr[16 - q]?.energy as number) - g)).toBeLessThan(1e-9);
    }
    const level4 = r.levels[4];
    expect(rkr[34]?.r).toBe(level4?.rMax.value);
    expect(rkr[0]?.r).toBe(level4?.rMin.value);
    const morse = r.curves.morse;
    const top = rkr[34]?.energy as number;
    const lo = rkr[0]?.r as number;
    const span = (rkr[34]?.r as number) - lo;
    expect(morse.length).toBeGreaterThan(40);
    expect(morse.length).toBeLessThan(161);
    // Points are r = lo − 0.05 span + 1.4 span i/160 kept where V ≤ 1.5 top.
    for (const p of morse) {
      expect(p.energy).toBeLessThanOrEqual(1.5 * top);
      const i = ((p.r - lo + 0.05 * span) * 160) / (1.4 * span);
      expect(Math.abs(i - Math.round(i))).toBeLessThan(1e-6);
    }
    const m = r.morse;
    if (!m) throw new Error('no Morse');
    for (const p of morse) {
      const y = 1 - Math.exp(-m.a.value * (p.r - m.r_e.value));
      expect(Math.abs(p.energy - m.D_e.value * y * y)).toBeLessThan(1e-6);
    }
    // The first point kept is the first grid point with V ≤ 1.5 top: the one before it is above.
    const first = morse[0] as { r: number };
    const i0 = Math.round(((first.r - lo + 0.05 * span) * 160) / (1.4 * span));
    if (i0 > 0) {
      const rPrev = lo - 0.05 * span + (1.4 * span * (i0 - 1)) / 160;
      const y = 1 - Math.exp(-m.a.value * (rPrev - m.r_e.value));
      expect(m.D_e.value * y * y).toBeGreaterThan(1.5 * top);
    }
  });
});

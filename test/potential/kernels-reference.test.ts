import { describe, expect, it } from 'vitest';
import type { ScienceError } from '../../src/errors.js';
import { dunhamFromConstants, printedDigitsUncertainty } from '../../src/potential/constants-input.js';
import { gaussLegendreUnit } from '../../src/potential/gauss-legendre.js';
import { morseEnergy, morseFromConstants, morseTurningPoints } from '../../src/potential/morse.js';
import { solveRadialLevels } from '../../src/potential/numerov.js';
import { rkrTurningPoints } from '../../src/potential/rkr.js';
import { rkrCurveModel } from '../../src/potential/rkr-curve.js';
import { cubicSpline, evaluateSpline, naturalCubicSpline } from '../../src/potential/spline.js';
import {
  energyGapOverU2,
  rotationalConstant,
  vibrationalEnergy,
  vibrationalSlope,
} from '../../src/potential/vibrational-terms.js';

// Fast checks of the kernels behind the potential curves against values that do not come from this code: closed
// forms (Gauss–Legendre rules of low order, the harmonic oscillator, the Morse oscillator), polynomials and splines
// worked out by hand below. Each result is computed inside `it`, so a mutation test sees it.

describe('Gauss–Legendre rules of low order (Abramowitz & Stegun, Table 25.4, mapped to [0, 1])', () => {
  it('n = 1: the midpoint, weight 1', () => {
    const { nodes, weights } = gaussLegendreUnit(1);
    expect([...nodes]).toEqual([0.5]);
    expect(Math.abs((weights[0] as number) - 1)).toBeLessThan(1e-15);
  });

  it('n = 2: nodes (1 ∓ 1/√3)/2, weights ½; n = 3: nodes (1 ∓ √(3/5))/2 and ½, weights 5/18, 8/18, 5/18 (1e-15)', () => {
    const two = gaussLegendreUnit(2);
    const s = 1 / Math.sqrt(3);
    const expect2 = [(1 - s) / 2, (1 + s) / 2];
    for (let i = 0; i < 2; i++) {
      expect(Math.abs((two.nodes[i] as number) - (expect2[i] as number))).toBeLessThan(1e-15);
      expect(Math.abs((two.weights[i] as number) - 0.5)).toBeLessThan(1e-15);
    }
    const three = gaussLegendreUnit(3);
    const t = Math.sqrt(3 / 5);
    const nodes3 = [(1 - t) / 2, 0.5, (1 + t) / 2];
    const weights3 = [5 / 18, 8 / 18, 5 / 18];
    for (let i = 0; i < 3; i++) {
      expect(Math.abs((three.nodes[i] as number) - (nodes3[i] as number))).toBeLessThan(1e-15);
      expect(Math.abs((three.weights[i] as number) - (weights3[i] as number))).toBeLessThan(1e-15);
    }
  });

  it('n = 5 and n = 512: nodes rise through (0, 1), weights sum to 1 and are symmetric (1e-13)', () => {
    for (const n of [5, 512]) {
      const { nodes, weights } = gaussLegendreUnit(n);
      expect(nodes).toHaveLength(n);
      let sum = 0;
      for (let i = 0; i < n; i++) {
        sum += weights[i] as number;
        if (i > 0) expect(nodes[i] as number).toBeGreaterThan(nodes[i - 1] as number);
        expect(Math.abs((nodes[i] as number) + (nodes[n - 1 - i] as number) - 1)).toBeLessThan(1e-13);
      }
      expect(nodes[0] as number).toBeGreaterThan(0);
      expect(nodes[n - 1] as number).toBeLessThan(1);
      expect(Math.abs(sum - 1)).toBeLessThan(1e-13);
    }
    // n = 5 integrates u⁹ exactly: 1/10.
    const { nodes, weights } = gaussLegendreUnit(5);
    let s9 = 0;
    for (let i = 0; i < 5; i++) s9 += (weights[i] as number) * (nodes[i] as number) ** 9;
    expect(Math.abs(s9 - 0.1)).toBeLessThan(1e-15);
  });

  it('refuses orders outside 1…512 and non-integers, and returns the same rule when asked twice', () => {
    for (const n of [0, -3, 513, 2.5, Number.NaN]) expect(() => gaussLegendreUnit(n)).toThrow(RangeError);
    expect(() => gaussLegendreUnit(513)).toThrow('Gauss–Legendre order 513 outside 1…512');
    expect(gaussLegendreUnit(7)).toBe(gaussLegendreUnit(7));
  });
});

describe('Dunham series in x = v + ½, worked out by hand', () => {
  // Y10 = 2000, Y20 = −10, Y30 = 0.1; Y01 = 2, Y11 = −0.02, Y21 = 1e-4; x = 2.5:
  // G = 2000·2.5 − 10·6.25 + 0.1·15.625 = 5000 − 62.5 + 1.5625 = 4939.0625
  // dG/dv = 2000 − 2·10·2.5 + 3·0.1·6.25 = 2000 − 50 + 1.875 = 1951.875
  // B = 2 − 0.02·2.5 + 1e-4·6.25 = 1.950625
  // At u = 0.6, x(1 − u²) = 1.6: G(1.6) = 3200 − 25.6 + 0.4096 = 3174.8096, so
  // [G(2.5) − G(1.6)]/0.36 = 1764.2529/0.36 = 4900.7025.
  const series = { g: [2000, -10, 0.1], b: [2, -0.02, 1e-4] };
  it('G, dG/dv, B and the gap [G(x) − G(x(1 − u²))]/u² (1e-9 relative)', () => {
    expect(Math.abs(vibrationalEnergy(series, 2.5) - 4939.0625)).toBeLessThan(1e-9 * 4939);
    expect(Math.abs(vibrationalSlope(series, 2.5) - 1951.875)).toBeLessThan(1e-9 * 1952);
    expect(Math.abs(rotationalConstant(series, 2.5) - 1.950625)).toBeLessThan(1e-12);
    expect(Math.abs(energyGapOverU2(series, 2.5, 0.6) - 4900.7025)).toBeLessThan(1e-9 * 4900);
    // u → 0: the gap tends to x·dG/dv = 2.5 · 1951.875 = 4879.6875.
    expect(Math.abs(energyGapOverU2(series, 2.5, 0) - 4879.6875)).toBeLessThan(1e-9 * 4880);
    expect(vibrationalEnergy({ g: [], b: [] }, 3)).toBe(0);
    expect(rotationalConstant({ g: [], b: [] }, 3)).toBe(0);
  });
});

describe('Morse oscillator by hand', () => {
  // ω_e = 2000, ω_e x_e = 10, B_e = 2, C = 16: D_e = 2000²/(4·10) = 100 000 cm⁻¹, a = √(10/16) = 0.790569… Å⁻¹,
  // r_e = √(16/2) = 2√2 Å. At E = D_e/4, √(E/D_e) = ½: r₋ = r_e − ln 1.5/a, r₊ = r_e + ln 2/a.
  it('D_e, a, r_e and the turning points at a quarter of the depth (1e-12 relative)', () => {
    const m = morseFromConstants(2000, 10, 2, 16);
    expect(Math.abs(m.depth - 100_000)).toBeLessThan(1e-7);
    expect(Math.abs(m.range - Math.sqrt(10 / 16))).toBeLessThan(1e-15);
    expect(Math.abs(m.equilibrium - 2 * Math.SQRT2)).toBeLessThan(1e-15);
    const tp = morseTurningPoints(m, 25_000);
    expect(Math.abs(tp.rMin - (2 * Math.SQRT2 - Math.log(1.5) / Math.sqrt(10 / 16)))).toBeLessThan(1e-12);
    expect(Math.abs(tp.rMax - (2 * Math.SQRT2 + Math.log(2) / Math.sqrt(10 / 16)))).toBeLessThan(1e-12);
    // V(r_e) = 0, V(r_e + ln 2/a) = D_e (1 − ½)² = D_e/4, V → D_e far out.
    expect(morseEnergy(m, m.equilibrium)).toBe(0);
    expect(Math.abs(morseEnergy(m, m.equilibrium + Math.log(2) / m.range) - 25_000)).toBeLessThan(1e-8);
    expect(Math.abs(morseEnergy(m, 200) - 100_000)).toBeLessThan(1e-6);
  });
});

describe('first-order RKR on the harmonic oscillator (closed form)', () => {
  // G = ω x, B constant: G(x) − G(x(1 − u²)) = ω x u², so f = √C ∫ 2x du/√(ω x) = 2√(C x/ω) and
  // g = (1/√C)·B·2√(x/ω); r± = √(f² + f/g) ± f. At v = −½ both turning points are r_e = √(C/B).
  const C = 16.857629;
  const omega = 2990;
  const B = 1.93;
  const input = { series: { g: [omega], b: [B] }, hbar2Over2mu: C, quadraturePoints: 16 };
  it('f, g and r± at v = 0, 3 and 10 (1e-12 relative); r_e at v = −½ and below', () => {
    for (const v of [0, 3, 10]) {
      const x = v + 0.5;
      const f = 2 * Math.sqrt((C * x) / omega);
      const g = (2 * B * Math.sqrt(x / omega)) / Math.sqrt(C);
      const root = Math.sqrt(f * f + f / g);
      const t = rkrTurningPoints(input, v);
      expect(t.v).toBe(v);
      expect(Math.abs(t.energy - omega * x)).toBeLessThan(1e-9);
      expect(Math.abs(t.f - f) / f).toBeLessThan(1e-12);
      expect(Math.abs(t.g - g) / g).toBeLessThan(1e-12);
      expect(Math.abs(t.rMin - (root - f))).toBeLessThan(1e-12);
      expect(Math.abs(t.rMax - (root + f))).toBeLessThan(1e-12);
    }
    for (const v of [-0.5, -0.7]) {
      const t = rkrTurningPoints(input, v);
      expect(t).toEqual({ v, energy: 0, rMin: Math.sqrt(C / B), rMax: Math.sqrt(C / B), f: 0, g: 0 });
    }
  });
});

describe('cubic splines worked out by hand', () => {
  // Natural spline through (0, 0), (1, 1), (3, 0): h = 1, 2; slopes s = 1, −½; the middle row
  // (1/6)·0 + (3/3) m₁ + (2/6)·0 = −½ − 1 gives m₁ = −1.5.
  //   at t = 0.5 (a = b = ½, h = 1): ½·0 + ½·1 + (−⅜·0 + (−⅜)(−1.5))·1/6 = 0.59375
  //   at t = 2 (a = b = ½, h = 2): ½·1 + ½·0 + (−⅜)(−1.5)·4/6 = 0.875
  //   end slopes: 1 − 1·(2·0 − 1.5)/6 = 1.25 on the left, −½ + 2·(2·0 − 1.5)/6 = −1 on the right,
  //   so y(−2) = −2.5 and y(4) = −1 on the straight continuations.
  it('natural spline: second derivatives, values inside, at the knots and on the straight continuations', () => {
    const s = naturalCubicSpline([0, 1, 3], [0, 1, 0]);
    for (const [i, m] of [0, -1.5, 0].entries()) expect(Math.abs((s.m[i] as number) - m)).toBeLessThan(1e-15);
    const at = (t: number) => evaluateSpline(s, t);
    const cases: [number, number][] = [
      [0.5, 0.59375],
      [2, 0.875],
      [-2, -2.5],
      [4, -1],
      [0, 0],
      [1, 1],
      [3, 0],
    ];
    for (const [t, y] of cases) expect(Math.abs(at(t) - y)).toBeLessThan(1e-14);
  });

  // A spline clamped to the true end slopes reproduces any cubic exactly (de Boor, ch. IV): y = x³ − 2x² + ½x + 1,
  // y′(0) = ½, y′(3) = 27 − 12 + ½ = 15.5, on uneven knots; beyond the ends it continues with those slopes.
  it('clamped spline reproduces a cubic on uneven knots (1e-12) and continues with the end slopes', () => {
    const y = (x: number) => x ** 3 - 2 * x ** 2 + 0.5 * x + 1;
    const xs = [0, 0.7, 1.5, 2.2, 2.4, 3];
    const s = cubicSpline(
      xs,
      xs.map((x) => y(x)),
      { startSlope: 0.5, endSlope: 15.5 },
    );
    for (let t = 0; t <= 3; t += 0.0625) expect(Math.abs(evaluateSpline(s, t) - y(t))).toBeLessThan(1e-12);
    // y″ = 6x − 4 at the knots.
    xs.forEach((x, i) => {
      expect(Math.abs((s.m[i] as number) - (6 * x - 4))).toBeLessThan(1e-11);
    });
    expect(Math.abs(evaluateSpline(s, -0.5) - (1 - 0.25))).toBeLessThan(1e-12);
    expect(Math.abs(evaluateSpline(s, 3.5) - (y(3) + 15.5 * 0.5))).toBeLessThan(1e-11);
  });

  it('one clamped end and one natural end: the clamped slope is met, y″ = 0 at the natural end', () => {
    const xs = [0, 1, 2.5, 4];
    const ys = [1, 0, 2, 1];
    const left = cubicSpline(xs, ys, { startSlope: -3 });
    const right = cubicSpline(xs, ys, { endSlope: 2 });
    // One-sided differences inside the knots: error about |y″| d/2 < 1e-5 for d = 1e-6.
    const d = 1e-6;
    expect(Math.abs((evaluateSpline(left, d) - evaluateSpline(left, 0)) / d - -3)).toBeLessThan(1e-5);
    expect(left.m[3]).toBe(0);
    expect(Math.abs((evaluateSpline(right, 4) - evaluateSpline(right, 4 - d)) / d - 2)).toBeLessThan(1e-5);
    expect(right.m[0]).toBe(0);
    // Both still pass through the knots.
    for (const s of [left, right])
      for (const [i, x] of xs.entries()) expect(Math.abs(evaluateSpline(s, x) - (ys[i] as number))).toBeLessThan(1e-14);
  });

  it('refuses fewer than three points, unequal lengths and abscissae that do not increase', () => {
    expect(() => cubicSpline([0, 1], [0, 1])).toThrow('a cubic spline needs three or more points, as many x as y');
    expect(() => cubicSpline([0, 1, 2], [0, 1])).toThrow(RangeError);
    expect(() => cubicSpline([0, 1, 1, 2], [0, 1, 2, 3])).toThrow('spline abscissae not increasing at 2');
    expect(() => cubicSpline([0, 2, 1], [0, 1, 2])).toThrow('spline abscissae not increasing at 2');
    expect(() => cubicSpline([0, 1, Number.NaN], [0, 1, 2])).toThrow(RangeError);
  });
});

describe('Numerov levels of the harmonic oscillator (closed form)', () => {
  // −C ψ″ + K (r − r₀)² ψ = E ψ has E_v = 2√(C K)(v + ½): with C = 1, K = 1, E = 1, 3, 5, … The ground state is
  // ψ ∝ exp(−(r − r₀)²/2), so ⟨1/r²⟩ is the Gaussian average of 1/r² with variance ½, integrated below by the
  // midpoint rule.
  const r0 = 10;
  const harmonic = (r: number) => (r - r0) ** 2;
  function gaussianInverseSquare(): number {
    let num = 0;
    let den = 0;
    for (let i = 0; i < 20_000; i++) {
      const r = 2 + (i + 0.5) * 8e-4;
      const w = Math.exp(-((r - r0) ** 2));
      num += w / (r * r);
      den += w;
    }
    return num / den;
  }
  it('E = 1, 3, 5, 7 within 1e-6 and B₀ = C⟨1/r²⟩ within 1e-8 relative (grid 2…18, step 0.004)', () => {
    const levels = solveRadialLevels(harmonic, 1, { from: 2, to: 18, step: 0.004 }, 4);
    expect(levels.map((l) => l.v)).toEqual([0, 1, 2, 3]);
    levels.forEach((l, v) => {
      expect(Math.abs(l.energy - (2 * v + 1))).toBeLessThan(1e-6);
    });
    const b0 = gaussianInverseSquare();
    expect(Math.abs((levels[0] as { rotational: number }).rotational - b0) / b0).toBeLessThan(1e-8);
    // With C = 4 the same potential gives E = 2√4 (v + ½) = 2, 6: the C of the equation, and B = 4⟨1/r²⟩.
    const four = solveRadialLevels(harmonic, 4, { from: 2, to: 18, step: 0.004 }, 2);
    expect(Math.abs((four[0] as { energy: number }).energy - 2)).toBeLessThan(1e-6);
    expect(Math.abs((four[1] as { energy: number }).energy - 6)).toBeLessThan(1e-6);
  });

  it('an excited level has ⟨1/r²⟩ of its own: v = 1 of the harmonic oscillator (1e-8 relative)', () => {
    // ψ₁ ∝ (r − r₀) exp(−(r − r₀)²/2): weight (r − r₀)² e^{−(r − r₀)²}.
    let num = 0;
    let den = 0;
    for (let i = 0; i < 20_000; i++) {
      const r = 2 + (i + 0.5) * 8e-4;
      const w = (r - r0) ** 2 * Math.exp(-((r - r0) ** 2));
      num += w / (r * r);
      den += w;
    }
    const levels = solveRadialLevels(harmonic, 1, { from: 2, to: 18, step: 0.004 }, 2);
    const b1 = (levels[1] as { rotational: number }).rotational;
    expect(Math.abs(b1 - num / den) / (num / den)).toBeLessThan(1e-8);
  });

  it('a box of 1 Å with a flat floor: the levels of a particle in a box, E = C(nπ/L)² (1e-5 relative)', () => {
    // ψ = 0 at r = 1 and 2: E_n = C (n π)², n = 1, 2, 3 with C = 1 and L = 1 Å.
    const levels = solveRadialLevels(() => 0, 1, { from: 1, to: 2, step: 1e-3 }, 3);
    levels.forEach((l, v) => {
      const e = ((v + 1) * Math.PI) ** 2;
      expect(Math.abs(l.energy - e) / e).toBeLessThan(1e-5);
    });
  });

  it('stops at the levels the grid holds and refuses a grid that is too short, too long or starts at r ≤ 0', () => {
    // A well of depth 30 (V = min((r − 10)², 30)): levels 1, 3, 5 (and those up to 29) lie below 30, 31 would not.
    const capped = solveRadialLevels((r) => Math.min(harmonic(r), 30), 1, { from: 2, to: 18, step: 0.004 }, 40);
    expect(capped.length).toBeGreaterThanOrEqual(14);
    expect(capped.length).toBeLessThanOrEqual(15);
    for (const l of capped) expect(l.energy).toBeLessThan(30);
    expect(() => solveRadialLevels(harmonic, 1, { from: 0, to: 18, step: 0.004 }, 1)).toThrow(
      'radial grid must start at r > 0 with 10…2e6 points',
    );
    expect(() => solveRadialLevels(harmonic, 1, { from: 9, to: 9.05, step: 0.01 }, 1)).toThrow(RangeError);
    expect(() => solveRadialLevels(harmonic, 1, { from: 1, to: 31, step: 1e-5 }, 1)).toThrow(RangeError);
    expect(solveRadialLevels(harmonic, 1, { from: 2, to: 18, step: 0.004 }, 0)).toEqual([]);
  });

  it('an infinite or undefined wall is held at the cap and does not change the levels (1e-6)', () => {
    const walled = (r: number) => (r < 4 ? Number.POSITIVE_INFINITY : r > 16 ? Number.NaN : harmonic(r));
    const levels = solveRadialLevels(walled, 1, { from: 2, to: 18, step: 0.004 }, 3);
    levels.forEach((l, v) => {
      expect(Math.abs(l.energy - (2 * v + 1))).toBeLessThan(1e-6);
    });
  });
});

describe('RKR curve of a Morse oscillator: spline inside, Morse-shaped walls outside', () => {
  // Same invented Morse oscillator as rkr.test.ts (D_e = 37 000 cm⁻¹, a = 1.9 Å⁻¹, r_e = 1.27 Å, C = 16.857629/0.98),
  // with B(v) the classical orbit average (derivation in rkr.test.ts), so that RKR returns the Morse turning points
  // and the curve must be the Morse potential itself, also beyond the last turning points, where the continuation
  // A(1 − z e^{−β(r − r₁)})² is of the Morse family.
  const C = 16.857629 / 0.98;
  const M = { depth: 37_000, range: 1.9, equilibrium: 1.27 };
  const WE = 2 * M.range * Math.sqrt(C * M.depth);
  const WX = M.range * M.range * C;
  const G = (x: number) => WE * x - WX * x * x;
  function classicalB(x: number): number {
    const E = G(x);
    if (E <= 0) return C / M.equilibrium ** 2;
    const s = Math.sqrt(E / M.depth);
    let num = 0;
    let den = 0;
    for (let i = 0; i < 160; i++) {
      const y = 1 + s * Math.cos((Math.PI * (i + 0.5)) / 160);
      const r = M.equilibrium - Math.log(y) / M.range;
      num += 1 / (y * r * r);
      den += 1 / y;
    }
    return (C * num) / den;
  }
  // Measured: 3e-5 cm⁻¹ inside (at the ends of the spline too) and below 7e-6 relative on the walls out to 3 Å beyond
  // the outer point; a natural instead of a clamped end, or an exponential instead of a Morse-shaped wall, misses
  // by far more.
  it('matches V(r) of the Morse oscillator inside (2e-4 cm⁻¹) and on both walls beyond v = 6 (2e-5 relative)', () => {
    const model = rkrCurveModel({ g: [WE, -WX], b: [C / M.equilibrium ** 2] }, C, 6, {
      rotational: classicalB,
      knots: 60,
    });
    expect(model).toBeDefined();
    if (!model) return;
    expect(model.knots).toBe(121);
    const top = morseTurningPoints(M, G(6.5));
    expect(Math.abs(model.inner - top.rMin)).toBeLessThan(1e-8);
    expect(Math.abs(model.outer - top.rMax)).toBeLessThan(1e-8);
    const inside = [model.inner + 1e-4, model.inner + 0.002, model.outer - 0.002, model.outer - 1e-4];
    for (let r = model.inner; r <= model.outer; r += (model.outer - model.inner) / 37) inside.push(r);
    for (const r of inside) expect(Math.abs(model.potential(r) - morseEnergy(M, r))).toBeLessThan(2e-4);
    for (const r of [
      model.inner - 0.05,
      model.inner - 0.15,
      model.inner - 0.3,
      model.outer + 0.1,
      model.outer + 0.4,
      model.outer + 1,
      model.outer + 3,
    ]) {
      const v = morseEnergy(M, r);
      expect(Math.abs(model.potential(r) - v) / v).toBeLessThan(2e-5);
    }
  });

  // With B(v) rising (Y11 = +0.05) the inner wall is less curved than a Morse wall can be at its end
  // (V″V/V′² ≈ 0.32 < ½, measured), so the continuation there is the exponential V₁ + c(e^{−b(r − r₁)} − 1): its
  // successive differences over equal steps have a constant ratio e^{bd}, and it joins the spline with its value
  // and slope.
  it('continues a wall no Morse shape fits by an exponential that joins the spline in value and slope', () => {
    const model = rkrCurveModel({ g: [2000, -10], b: [2, 0.05] }, 16.86, 8, { knots: 80 });
    if (!model) throw new Error('no curve');
    const V = model.potential;
    const r0 = model.inner;
    const V0 = V(r0);
    expect(Math.abs(V(r0 - 1e-9) - V0)).toBeLessThan(1e-3);
    const h = 1e-6;
    const slopeIn = (V(r0 + h) - V0) / h;
    const slopeOut = (V0 - V(r0 - h)) / h;
    expect(slopeIn).toBeLessThan(0);
    expect(Math.abs(slopeOut - slopeIn) / Math.abs(slopeIn)).toBeLessThan(1e-3);
    const d = 0.05;
    const [a, b, c, e] = [V0, V(r0 - d), V(r0 - 2 * d), V(r0 - 3 * d)] as [number, number, number, number];
    expect(b).toBeGreaterThan(a);
    const q1 = (c - b) / (b - a);
    const q2 = (e - c) / (c - b);
    expect(q1).toBeGreaterThan(1);
    expect(Math.abs(q1 - q2) / q1).toBeLessThan(1e-9);
  });

  it('gives no curve when the turning points do not run in order (B(v) doubling by v = 1.5)', () => {
    const series = { g: [2000, -10], b: [2] };
    expect(rkrCurveModel(series, 16.86, 10, { knots: 40 })).toBeDefined();
    expect(rkrCurveModel(series, 16.86, 10, { knots: 40, rotational: (x) => 2 * (1 + 0.5 * x) })).toBeUndefined();
  });
});

describe('constants as Dunham coefficients, the other paths', () => {
  const caught = (f: () => unknown): ScienceError => {
    try {
      f();
    } catch (e) {
      return e as ScienceError;
    }
    throw new Error('expected a ScienceError');
  };
  it('separate uncertainties fill the diagonal; l ≥ 2 constants are left out; D_e in a covariance is skipped', () => {
    const d = dunhamFromConstants({
      values: {
        omega_e: { value: 2000, uncertainty: 0.5 },
        omega_e_x_e: { value: 10 },
        B_e: { value: 2, uncertainty: 1e-4 },
        D_e: { value: 6e-6, uncertainty: 1e-8 },
        H_e: { value: 1e-12 },
      },
    });
    expect(d.names).toEqual(['omega_e', 'omega_e_x_e', 'B_e']);
    expect(d.coefficients).toEqual([
      { k: 1, l: 0, value: 2000 },
      { k: 2, l: 0, value: -10 },
      { k: 0, l: 1, value: 2 },
    ]);
    expect([...d.covariance]).toEqual([0.25, 0, 0, 0, 0, 0, 0, 0, 1e-4 * 1e-4]);
    const withD = dunhamFromConstants({
      values: { omega_e: { value: 2000 }, B_e: { value: 2 }, D_e: { value: 6e-6 } },
      covariance: {
        names: ['D_e', 'B_e', 'omega_e'],
        matrix: [
          [1e-16, 2e-12, 3e-8],
          [2e-12, 1e-8, 5e-5],
          [3e-8, 5e-5, 0.25],
        ],
      },
    });
    // Order of the names is CONSTANT_TO_DUNHAM's (ω_e, B_e); the covariance is read by name.
    expect([...withD.covariance]).toEqual([0.25, 5e-5, 5e-5, 1e-8]);
  });

  it('refuses a negative variance, a non-finite entry and a matrix that is not square', () => {
    const values = { omega_e: { value: 2000 }, B_e: { value: 2 } };
    const neg = () =>
      dunhamFromConstants({
        values,
        covariance: {
          names: ['omega_e', 'B_e'],
          matrix: [
            [-1, 0],
            [0, 1],
          ],
        },
      });
    expect(neg).toThrow('the variance of omega_e is negative');
    const negErr = caught(neg);
    expect(negErr.code).toBe('INPUT_INVALID');
    expect(negErr.details).toEqual({ name: 'omega_e', variance: -1 });
    const nan = () =>
      dunhamFromConstants({
        values,
        covariance: {
          names: ['omega_e', 'B_e'],
          matrix: [
            [1, Number.NaN],
            [Number.NaN, 1],
          ],
        },
      });
    expect(nan).toThrow('the covariance matrix must be finite and symmetric');
    expect(caught(nan).code).toBe('INPUT_INVALID');
    expect(caught(nan).details).toEqual({ at: ['omega_e', 'B_e'] });
    const ragged = () =>
      dunhamFromConstants({ values, covariance: { names: ['omega_e', 'B_e'], matrix: [[1, 0], [0]] } });
    expect(ragged).toThrow('the covariance matrix must be square, one row and column per name');
    expect(caught(ragged).code).toBe('INPUT_INVALID');
    expect(caught(ragged).details).toEqual({ names: ['omega_e', 'B_e'] });
    const unknown = () => dunhamFromConstants({ values, covariance: { names: ['alpha_e'], matrix: [[1]] } });
    expect(caught(unknown).code).toBe('INPUT_INVALID');
    expect(caught(unknown).details).toEqual({ unknown: ['alpha_e'] });
    const short = () => dunhamFromConstants({ values, covariance: { names: ['omega_e', 'B_e'], matrix: [[1, 0]] } });
    expect(short).toThrow(/square/);
    // Symmetric to 1e-9 relative is accepted.
    const near = dunhamFromConstants({
      values,
      covariance: {
        names: ['omega_e', 'B_e'],
        matrix: [
          [1, 0.5],
          [0.5 * (1 + 1e-12), 1],
        ],
      },
    });
    expect(near.covariance[1]).toBe(0.5);
    // 2e-9 relative is not: the tolerance is 1e-9 of the larger entry (0.5 here, so 5e-10 absolute).
    const far = () =>
      dunhamFromConstants({
        values,
        covariance: {
          names: ['omega_e', 'B_e'],
          matrix: [
            [1, 0.5],
            [0.5 * (1 + 2e-9), 1],
          ],
        },
      });
    expect(far).toThrow('the covariance matrix must be finite and symmetric');
  });

  it('accepts negative covariances and zero variances; entries of constants outside the potential are not read', () => {
    const d = dunhamFromConstants({
      values: { omega_e: { value: 2000 }, omega_e_x_e: { value: 10 }, B_e: { value: 2 }, D_e: { value: 6e-6 } },
      covariance: {
        // D_e last, so that its entries come after the others; its row is not symmetric and is ignored.
        names: ['omega_e', 'omega_e_x_e', 'B_e', 'D_e'],
        matrix: [
          [0.25, -0.004, 0, 7],
          [-0.004, 1e-4, 0, 0],
          [0, 0, 0, -3],
          [1, 2, 3, 4],
        ],
      },
    });
    // Y20 = −ω_e x_e flips the sign of its covariance with ω_e: +0.004 (+ 0 turns the −0 of flipped zeros into 0).
    expect([...d.covariance].map((v) => v + 0)).toEqual([0.25, 0.004, 0, 0.004, 1e-4, 0, 0, 0, 0]);
  });

  it('printed digits: nothing for 0 and non-finite values; 1e-5 → δ = 1e-5; 1500 → δ = 100 (trailing zeros unseen)', () => {
    expect([0, Number.NaN, Number.POSITIVE_INFINITY].map(printedDigitsUncertainty)).toEqual([0, 0, 0]);
    expect(printedDigitsUncertainty(1e-5) * Math.sqrt(12)).toBeCloseTo(1e-5, 18);
    expect(printedDigitsUncertainty(1500) * Math.sqrt(12)).toBeCloseTo(100, 10);
    expect(printedDigitsUncertainty(-2.5e-7) * Math.sqrt(12)).toBeCloseTo(1e-8, 20);
  });
});

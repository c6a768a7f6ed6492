import { describe, expect, it } from 'vitest';
import { ROTATIONAL_FACTOR } from '../../src/constants/codata-2018.js';
import { gaussLegendreUnit } from '../../src/potential/gauss-legendre.js';
import { morseEnergy, morseFromConstants, morseTurningPoints } from '../../src/potential/morse.js';
import { solveRadialLevels } from '../../src/potential/numerov.js';
import { rkrTurningPoints } from '../../src/potential/rkr.js';
import { rkrCurveModel } from '../../src/potential/rkr-curve.js';

/**
 * An invented Morse oscillator (not a real molecule; hydride-like so the test is demanding): D_e = 37 000 cm⁻¹,
 * a = 1.9 Å⁻¹, r_e = 1.27 Å, μ = 0.98 u. Morse (Phys. Rev. 34, 57 (1929)) solved it exactly: on the whole line its
 * levels are E_v = ω_e(v + ½) − ω_e x_e(v + ½)² with ω_e = 2a√(C D_e), ω_e x_e = a²C, C = ħ²/2μ. (On r > 0 the
 * difference is of order e^{−a r_e}-suppressed tunnelling into r < 0: far below 1e-6 cm⁻¹ here.)
 */
const C = ROTATIONAL_FACTOR / 0.98;
const M = { depth: 37_000, range: 1.9, equilibrium: 1.27 };
const WE = 2 * M.range * Math.sqrt(C * M.depth);
const WX = M.range * M.range * C;
const G = (x: number) => WE * x - WX * x * x;

/**
 * The classical time average B(E) = C⟨1/r²⟩ over a Morse orbit, which is what the RKR g integral assumes B(v) to
 * be. Derivation (ours): with y = e^{−a(r − r_e)}, V = D(1 − y)², dr = −dy/(a y); put y = 1 + √(E/D) cos θ, so
 * E − V = E sin²θ and dr/√(E − V) = dθ / (a √D y). Hence ⟨h(r)⟩ = ∫₀^π h(r(θ)) dθ / y(θ) ÷ ∫₀^π dθ / y(θ), a smooth
 * periodic integrand that the midpoint rule integrates to machine precision with 160 points.
 */
function classicalB(x: number): number {
  const E = G(x);
  if (E <= 0) return C / M.equilibrium ** 2;
  const s = Math.sqrt(E / M.depth);
  let num = 0;
  let den = 0;
  const n = 160;
  for (let i = 0; i < n; i++) {
    const y = 1 + s * Math.cos((Math.PI * (i + 0.5)) / n);
    const r = M.equilibrium - Math.log(y) / M.range;
    num += 1 / (y * r * r);
    den += 1 / y;
  }
  return (C * num) / den;
}

const morseSeries = { g: [WE, -WX], b: [C / M.equilibrium ** 2] };

describe('Gauss–Legendre on [0, 1]', () => {
  it('integrates u^k exactly up to k = 2n − 1 (1/(k+1), to 1e-14)', () => {
    const { nodes, weights } = gaussLegendreUnit(8);
    for (let k = 0; k <= 15; k++) {
      let s = 0;
      for (let i = 0; i < 8; i++) s += (weights[i] as number) * (nodes[i] as number) ** k;
      expect(Math.abs(s - 1 / (k + 1))).toBeLessThan(1e-14);
    }
  });
  it('gives ∫₀¹ du/(1 + u²) = π/4 with 24 points (to 1e-14)', () => {
    const { nodes, weights } = gaussLegendreUnit(24);
    let s = 0;
    for (let i = 0; i < 24; i++) s += (weights[i] as number) / (1 + (nodes[i] as number) ** 2);
    expect(Math.abs(s - Math.PI / 4)).toBeLessThan(1e-14);
  });
});

describe('Numerov radial solver', () => {
  it('gives the exact Morse levels v = 0…10 within 1e-4 cm⁻¹ (grid 0.7–3.2 Å, step 4e-4 Å)', () => {
    const levels = solveRadialLevels((r) => morseEnergy(M, r), C, { from: 0.7, to: 3.2, step: 4e-4 }, 11);
    expect(levels).toHaveLength(11);
    for (const l of levels) expect(Math.abs(l.energy - G(l.v + 0.5))).toBeLessThan(1e-4);
  });
  it('gives the same levels when started from guesses, near or far off (1e-6 cm⁻¹, B to 1e-9)', () => {
    const grid = { from: 0.7, to: 3.2, step: 4e-4 };
    const plain = solveRadialLevels((r) => morseEnergy(M, r), C, grid, 11);
    // Guesses ±0.3 cm⁻¹ (a nearby curve), 50 cm⁻¹ high, 900 cm⁻¹ low (below the level before), and none.
    const offsets = [0.3, -0.3, 50, -900, Number.NaN];
    for (const d of offsets) {
      const guesses = plain.map((l, i) => l.energy + (i % 2 === 0 ? d : -d));
      const guessed = solveRadialLevels((r) => morseEnergy(M, r), C, grid, 11, guesses);
      expect(guessed).toHaveLength(11);
      guessed.forEach((l, v) => {
        expect(Math.abs(l.energy - (plain[v]?.energy as number)), `offset ${d}, v = ${v}`).toBeLessThan(1e-6);
        expect(Math.abs(l.rotational / (plain[v]?.rotational as number) - 1)).toBeLessThan(1e-9);
      });
    }
  });

  it('finds no more levels than the grid holds', () => {
    const levels = solveRadialLevels(
      (r) => Math.min(morseEnergy(M, r), 5000),
      C,
      { from: 0.8, to: 2.5, step: 1e-3 },
      50,
    );
    expect(levels.length).toBeGreaterThan(0);
    expect(levels.length).toBeLessThan(50);
    for (const l of levels) expect(l.energy).toBeLessThan(5000);
  });
});

describe('RKR turning points against the analytic Morse case', () => {
  // Analytic: V(r) = E gives r± = r_e − ln(1 ∓ √(E/D_e))/a (outer with the minus sign); morse.ts and this test
  // share only that formula, which follows in one line from the potential.
  it('reproduces r± of the Morse oscillator within 1e-9 Å for v = 0…20, B(v) the classical orbit average', () => {
    const input = { series: morseSeries, hbar2Over2mu: C, rotational: classicalB };
    for (let v = 0; v <= 20; v++) {
      const t = rkrTurningPoints(input, v);
      const s = Math.sqrt(G(v + 0.5) / M.depth);
      const rMin = M.equilibrium - Math.log(1 + s) / M.range;
      const rMax = M.equilibrium - Math.log(1 - s) / M.range;
      expect(Math.abs(t.rMin - rMin)).toBeLessThan(1e-9);
      expect(Math.abs(t.rMax - rMax)).toBeLessThan(1e-9);
    }
  });
  it('f alone is the half width artanh(√(E/D_e))/a, whatever B is (1e-10 Å)', () => {
    const t = rkrTurningPoints({ series: { g: [WE, -WX], b: [7, -0.2] }, hbar2Over2mu: C }, 12);
    expect(Math.abs(t.f - Math.atanh(Math.sqrt(G(12.5) / M.depth)) / M.range)).toBeLessThan(1e-10);
  });
  it('morseTurningPoints and morseFromConstants invert each other', () => {
    const m = morseFromConstants(WE, WX, C / M.equilibrium ** 2, C);
    expect(m.depth).toBeCloseTo(M.depth, 6);
    expect(m.range).toBeCloseTo(M.range, 12);
    expect(m.equilibrium).toBeCloseTo(M.equilibrium, 12);
    const tp = morseTurningPoints(m, 12_000);
    expect(morseEnergy(m, tp.rMin)).toBeCloseTo(12_000, 6);
    expect(morseEnergy(m, tp.rMax)).toBeCloseTo(12_000, 6);
  });
});

describe('RKR curve → Numerov round trip on the Morse case', () => {
  it('gives back G_v within 1e-4 cm⁻¹ for v = 0…8 (RKR points to v = 11, 6000-point grid; measured 3e-6)', () => {
    const model = rkrCurveModel(morseSeries, C, 11, { rotational: classicalB });
    expect(model).toBeDefined();
    if (!model) return;
    const w = model.outer - model.inner;
    const from = model.inner - 0.25 * w;
    const to = model.outer + 0.5 * w;
    const levels = solveRadialLevels(model.potential, C, { from, to, step: (to - from) / 5999 }, 9);
    expect(levels).toHaveLength(9);
    for (const l of levels) expect(Math.abs(l.energy - G(l.v + 0.5))).toBeLessThan(1e-4);
  });
});

import { describe, expect, it } from 'vitest';
import { predictLinearBands } from '../../src/linear/predict.js';
import { parseLinearSpecies } from '../../src/linear/species.js';
import { bandTransitions, levelExists, resolveTransition } from '../../src/linear/transitions.js';

const CO2 = parseLinearSpecies('CO2');
const G0 = { v: [0, 0, 0], l: 0 };
const V3 = { v: [0, 0, 1], l: 0 };
const V2 = { v: [0, 1, 0], l: 1 };

describe('selection rules and spin statistics', () => {
  it('CO2 626: ground state even J only, 00⁰1 odd J only, 01¹0 e odd / f even (reference note §2)', () => {
    expect(levelExists(CO2, G0, 0, 'e')).toBe(true);
    expect(levelExists(CO2, G0, 1, 'e')).toBe(false);
    expect(levelExists(CO2, V3, 1, 'e')).toBe(true);
    expect(levelExists(CO2, V3, 2, 'e')).toBe(false);
    expect(levelExists(CO2, V2, 1, 'e')).toBe(true);
    expect(levelExists(CO2, V2, 2, 'f')).toBe(true);
    expect(levelExists(CO2, V2, 2, 'e')).toBe(false);
    // 16O-12C-18O: all J.
    expect(levelExists(parseLinearSpecies('16O-12C-18O'), G0, 1, 'e')).toBe(true);
  });

  it('never places a CO2 ground-state level at odd J', () => {
    expect(() => resolveTransition(CO2, { upper: V3, lower: G0, branch: 'R', j: 1 })).toThrow(/missing/);
    const ok = resolveTransition(CO2, { upper: V3, lower: G0, branch: 'R', j: 0 });
    expect(ok.upperJ).toBe(1);
  });

  it('has no Q branch in Σ–Σ bands and a Q branch to the f component in Π–Σ bands', () => {
    const s = bandTransitions(CO2, V3, G0, 20);
    expect(s.some((t) => t.branch === 'Q')).toBe(false);
    const p = bandTransitions(CO2, V2, G0, 20);
    const q = p.filter((t) => t.branch === 'Q');
    expect(q.length).toBeGreaterThan(0);
    expect(q.every((t) => t.upperParity === 'f' && t.j % 2 === 0)).toBe(true);
    expect(p.filter((t) => t.branch !== 'Q').every((t) => t.upperParity === 'e')).toBe(true);
    // Q(0) does not exist (J′ = 0 < l′ = 1), nor P(1) (J′ = 0).
    const hcn = bandTransitions(parseLinearSpecies('HCN'), V2, G0, 5);
    expect(hcn.find((t) => t.branch === 'Q' && t.j === 0)).toBeUndefined();
    expect(hcn.find((t) => t.branch === 'P' && t.j === 1)).toBeUndefined();
    expect(hcn.find((t) => t.branch === 'Q' && t.j === 1)).toBeDefined();
  });

  it('refuses Δl > 1, g–g bands of CO2, l > v2 and a missing parity', () => {
    const D = { v: [0, 2, 0], l: 2 };
    expect(() => resolveTransition(CO2, { upper: D, lower: G0, branch: 'R', j: 2 })).toThrow(/Δl/);
    expect(() => bandTransitions(CO2, { v: [1, 0, 0], l: 0 }, G0, 10)).toThrow(/no dipole/);
    expect(() => resolveTransition(CO2, { upper: { v: [0, 1, 0], l: 3 }, lower: G0, branch: 'R', j: 0 })).toThrow(
      /not possible/,
    );
    const hcn = parseLinearSpecies('HCN');
    expect(() => resolveTransition(hcn, { upper: { v: [0, 2, 0], l: 2 }, lower: V2, branch: 'R', j: 3 })).toThrow(
      /parity/,
    );
  });

  it('a CO2 ν3 band has lines about 4B apart, not 2B (R&Y 1981 constants, note §1.1)', () => {
    const lines = predictLinearBands(
      CO2,
      [
        { level: G0, constants: { G: 0, B: 0.39021894, D: 1.33373e-7 } },
        { level: V3, constants: { G: 2349.1433, B: 0.3871414, D: 1.33034e-7 } },
      ],
      [{ upper: V3, lower: G0 }],
      20,
    );
    const r = lines.filter((l) => l.branch === 'R').sort((a, b) => a.j - b.j);
    expect(r.map((l) => l.j)).toEqual([0, 2, 4, 6, 8, 10, 12, 14, 16, 18, 20]);
    // Spacing R(2) − R(0) = 4B′ + (B′ − B″)·(…) ≈ 1.55 cm⁻¹ (4 × 0.387 = 1.549; tolerance 0.02 for B′ − B″ terms).
    expect(Math.abs((r[1]?.position ?? 0) - (r[0]?.position ?? 0) - 4 * 0.3871414)).toBeLessThan(0.02);
    // R(0) = ν₀ + 2B′ (exact for Σ–Σ): 2349.1433 + 0.7742828.
    expect(r[0]?.position).toBeCloseTo(2349.1433 + 2 * 0.3871414 - 4 * 1.33034e-7, 9);
  });
});

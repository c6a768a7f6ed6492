import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { honlLondon, predictLinearBands } from '../../src/linear/predict.js';
import { parseLinearSpecies } from '../../src/linear/species.js';

/**
 * predictLinearBands against line lists written out by hand: the J bookkeeping (R: J′ = J″ + 1, P: J′ = J″ − 1,
 * Q: J′ = J″ with e ↔ f), the levels that exist (J ≥ l, Σ levels e only, every other J missing in 12C16O2), the
 * term values (E = G + B y − D y² ∓ ½ q x, y = J(J+1) − l², e: −, f: +, the documented convention, evaluated
 * here by its own code), the Hönl–London factors of Herzberg's tables for Σ–Σ and Π←Σ bands (R: J″+1, P: J″ for
 * Σ–Σ; R: (J″+2)/2, Q: (2J″+1)/2, P: (J″−1)/2 for Π←Σ: from memory, each J″ summing to 2J″+1) and the lower-state
 * energy above the lowest level given. Constants: rounded HCN and CO2 values (../shared/fixtures, reference
 * note); any values would do, the check is the bookkeeping.
 */
const E = (c: { G: number; B: number; D: number; q?: number }, l: number, J: number, p: 'e' | 'f') => {
  const x = J * (J + 1);
  const y = x - l * l;
  return c.G + c.B * y - c.D * y * y + (l >= 1 ? (p === 'e' ? -0.5 : 0.5) * (c.q ?? 0) * x : 0);
};
const G0 = { v: [0, 0, 0], l: 0 };
const V2 = { v: [0, 1, 0], l: 1 };
const V3 = { v: [0, 0, 1], l: 0 };
const C0 = { G: 0, B: 1.4782218, D: 2.909e-6 };
const C2 = { G: 711.98, B: 1.481779, D: 2.976e-6, q: 0.0074876 };

describe('predictLinearBands', () => {
  it('HCN ν2 01¹0–00⁰0 to J″ = 3: nine lines, positions, parities, Hönl–London factors, E″, sorted', () => {
    const HCN = parseLinearSpecies('HCN');
    const lines = predictLinearBands(
      HCN,
      [
        { level: G0, constants: C0 },
        { level: V2, constants: C2 },
      ],
      [{ upper: V2, lower: G0 }],
      3,
    );
    // By hand: P(2), P(3) (J′ = J″ − 1 ≥ l′ = 1), Q(1..3) to f (Q(0) would need J′ = 0 < l′), R(0..3).
    const want: [string, number, number, 'e' | 'f', number][] = [];
    for (const j of [2, 3]) want.push(['P', j, j - 1, 'e', (j - 1) / 2]);
    for (const j of [1, 2, 3]) want.push(['Q', j, j, 'f', (2 * j + 1) / 2]);
    for (const j of [0, 1, 2, 3]) want.push(['R', j, j + 1, 'e', (j + 2) / 2]);
    expect(lines).toHaveLength(9);
    for (const [branch, j, ju, pu, hl] of want) {
      const got = lines.find((x) => x.branch === branch && x.j === j);
      expect(got, `${branch}(${j})`).toBeDefined();
      expect(got?.upperJ).toBe(ju);
      expect(got?.upperParity).toBe(pu);
      expect(got?.lowerParity).toBe('e');
      expect(got?.position).toBeCloseTo(E(C2, 1, ju, pu) - E(C0, 0, j, 'e'), 9);
      // E″ above the lowest level given (ground J = 0 at 0).
      expect(got?.lowerEnergy).toBeCloseTo(E(C0, 0, j, 'e'), 9);
      expect(got?.honlLondon).toBeCloseTo(hl, 12);
      expect(got?.band).toBe('01¹0–00⁰0');
      expect(got?.upper).toEqual(V2);
      expect(got?.lower).toEqual(G0);
    }
    for (let i = 1; i < lines.length; i++) {
      expect(lines[i]?.position).toBeGreaterThanOrEqual(lines[i - 1]?.position ?? 0);
    }
  });

  it('12C16O2 ν3 00⁰1–00⁰0: only even J″ (odd J of Σg⁺ missing), Σ–Σ factors J″+1 and J″', () => {
    const CO2 = parseLinearSpecies('CO2');
    // B0 0.39021894, B(00⁰1) 0.38714135 (Rothman & Young 1981, via the note), G 2349.1433 (same); D rounded.
    const c0 = { G: 0, B: 0.39021894, D: 1.33e-7 };
    const c3 = { G: 2349.1433, B: 0.38714135, D: 1.33e-7 };
    const lines = predictLinearBands(
      CO2,
      [
        { level: G0, constants: c0 },
        { level: V3, constants: c3 },
      ],
      [{ upper: V3, lower: G0 }],
      6,
    );
    const got = lines.map((x) => `${x.branch}${x.j}`).sort();
    expect(got).toEqual(['P2', 'P4', 'P6', 'R0', 'R2', 'R4', 'R6'].sort());
    for (const x of lines) {
      expect(x.position).toBeCloseTo(E(c3, 0, x.upperJ, 'e') - E(c0, 0, x.j, 'e'), 9);
      expect(x.honlLondon).toBeCloseTo(x.branch === 'R' ? x.j + 1 : x.j, 12);
    }
    // Sorted by position: P(6) first, R(6) last.
    expect(`${lines[0]?.branch}${lines[0]?.j}`).toBe('P6');
    expect(`${lines[6]?.branch}${lines[6]?.j}`).toBe('R6');
  });

  it('E″ counts from the lowest level given (J = l of the level with the lowest term), not from G = 0', () => {
    const HCN = parseLinearSpecies('HCN');
    const V22 = { v: [0, 2, 0], l: 2 };
    const c22 = { G: 1412, B: 1.48536, D: 3.0e-6, q: 1e-5 };
    const lines = predictLinearBands(
      HCN,
      [
        { level: V2, constants: C2 },
        { level: V22, constants: c22 },
      ],
      [{ upper: V22, lower: V2 }],
      4,
    );
    const zero = E(C2, 1, 1, 'e');
    const r2f = lines.find((x) => x.branch === 'R' && x.j === 2 && x.lowerParity === 'f');
    expect(r2f?.lowerEnergy).toBeCloseTo(E(C2, 1, 2, 'f') - zero, 9);
    expect(r2f?.position).toBeCloseTo(E(c22, 2, 3, 'f') - E(C2, 1, 2, 'f'), 9);
    // Both levels l ≥ 1: each parity component carries half the branch factor (Π–Δ R(2): 4·… from 3j symbols;
    // here only the half is checked against the whole branch of honlLondon for l″ = 1, l′ = 2).
    const whole = 2 * (r2f?.honlLondon ?? 0);
    const e = lines.find((x) => x.branch === 'R' && x.j === 2 && x.lowerParity === 'e');
    expect((e?.honlLondon ?? 0) + (r2f?.honlLondon ?? 0)).toBeCloseTo(whole, 12);
    expect(honlLondon(1, 2, 'R', 2)).toBeCloseTo(r2f?.honlLondon ?? 0, 12);
  });

  it('l-type transitions within one level: Q(J) e→f at q J(J+1), R lines at 2B(J+1)-ish', () => {
    const HCN = parseLinearSpecies('HCN');
    const lines = predictLinearBands(HCN, [{ level: V2, constants: C2 }], [{ upper: V2, lower: V2 }], 3);
    const q = lines.filter((x) => x.branch === 'Q');
    expect(q.map((x) => x.j)).toEqual([1, 2, 3]);
    for (const x of q) {
      expect(x.lowerParity).toBe('e');
      expect(x.upperParity).toBe('f');
      expect(x.position).toBeCloseTo((C2.q ?? 0) * x.j * (x.j + 1), 12);
    }
    expect(lines.filter((x) => x.branch === 'P')).toEqual([]);
    const r1e = lines.find((x) => x.branch === 'R' && x.j === 1 && x.lowerParity === 'e');
    expect(r1e?.position).toBeCloseTo(E(C2, 1, 2, 'e') - E(C2, 1, 1, 'e'), 12);
  });

  it('a band whose level has no constants is refused, naming the level', () => {
    const HCN = parseLinearSpecies('HCN');
    for (const [levels, which, key] of [
      [[{ level: V2, constants: C2 }], 'lower', '0,0,0|0'],
      [[{ level: G0, constants: C0 }], 'upper', '0,1,0|1'],
    ] as const) {
      let err: unknown;
      try {
        predictLinearBands(HCN, levels, [{ upper: V2, lower: G0 }], 3);
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(ScienceError);
      const e = err as ScienceError;
      expect(e.code).toBe('INPUT_INVALID');
      expect(e.message).toBe(`band 01¹0–00⁰0: no constants for its ${which} level ${key}`);
      expect(e.details).toEqual({ level: which === 'lower' ? G0 : V2 });
    }
  });
});

import { describe, expect, it } from 'vitest';
import type { ScienceError } from '../../src/errors.js';
import { linearCombinationDifferences } from '../../src/linear/combination-differences.js';
import { parseLinearSpecies } from '../../src/linear/species.js';
import { powerSeriesOrigin, termOriginFromPowerSeries, termValue } from '../../src/linear/terms.js';
import {
  bandKind,
  bandTransitions,
  type LinearTransition,
  levelExists,
  MAX_LINEAR_J,
  resolveTransition,
} from '../../src/linear/transitions.js';
import {
  bendingModes,
  checkLevel,
  levelKey,
  levelLabel,
  parityComponents,
  parseLevelKey,
} from '../../src/linear/types.js';
import { thrown } from '../helpers/thrown.js';

/**
 * Fast direct checks of the small kernels of src/linear: level identities and labels, the selection rules of
 * resolveTransition with every refusal's code, message and details (API), term values with H and q_J written out,
 * and the combination-difference fit of a lower Σ level from differences computed here. Values worked out by
 * hand in the comments.
 */
const HCN = parseLinearSpecies('HCN');
const CO2 = parseLinearSpecies('CO2');
const G0 = { v: [0, 0, 0], l: 0 };
const V2 = { v: [0, 1, 0], l: 1 };
const V3 = { v: [0, 0, 1], l: 0 };

describe('levels', () => {
  it('keys, labels and their round trip, with ranks and quanta above 9', () => {
    expect(levelKey({ v: [1, 0, 0], l: 0, r: 2 })).toBe('1,0,0|0|r2');
    expect(parseLevelKey('1,0,0|0|r2')).toEqual({ v: [1, 0, 0], l: 0, r: 2 });
    expect(parseLevelKey('10,0,12|0')).toEqual({ v: [10, 0, 12], l: 0 });
    expect(parseLevelKey('0,11,0|11')).toEqual({ v: [0, 11, 0], l: 11 });
    for (const bad of ['x0,0,0|0', '0,0,0|0x', '0,0,0|0|r', '0,0,0|0|rx', '0,0,0', '0,0,0|0|r12']) {
      const e = thrown(() => parseLevelKey(bad));
      expect(e.code).toBe('INPUT_INVALID');
      if (!bad.endsWith('r12')) {
        expect(e.message).toBe(`not a level key: "${bad}"`);
        expect(e.details).toEqual({ key: bad });
      }
    }
    expect(levelLabel({ v: [0, 11, 0], l: 11 })).toBe('0(11)¹¹0');
    expect(levelLabel({ v: [10, 0, 0], l: 0 })).toBe('(10)0⁰0');
    expect(levelLabel({ v: [1, 0, 0], l: 0, r: 1 })).toBe('10⁰0_I');
    expect(levelLabel({ v: [1, 0, 0], l: 0, r: 9 })).toBe('10⁰0_IX');
    expect(levelLabel({ v: [0, 0, 0, 1, 1], l: 2 })).toBe('00011²');
    expect(parityComponents(0)).toEqual(['e']);
    expect(parityComponents(2)).toEqual(['e', 'f']);
  });

  it('refusals of a level: quanta count, range, l, Fermi rank', () => {
    const four = thrown(() => bendingModes(4));
    expect(four.message).toBe('a linear level has 3 or 5 vibrational quanta, not 4');
    expect(four.details).toEqual({ modes: 4 });
    expect(bendingModes(5)).toEqual([3, 4]);
    const big = thrown(() => checkLevel({ v: [101, 0, 0], l: 0 }));
    expect(big.message).toBe('vibrational quanta must be integers 0..100, got [101, 0, 0]');
    expect(big.details).toEqual({ v: [101, 0, 0] });
    expect(() => checkLevel({ v: [100, 0, 0], l: 0 })).not.toThrow();
    expect(() => checkLevel({ v: [0.5, 0, 0], l: 0 })).toThrow(/integers 0\.\.100/);
    for (const l of [-1, 0.5]) {
      const e = thrown(() => checkLevel({ v: [0, 1, 0], l }));
      expect(e.message).toBe(`l must be a non-negative integer, got ${l}`);
      expect(e.details).toEqual({ v: [0, 1, 0], l });
    }
    for (const r of [0, 10, 1.5]) {
      const e = thrown(() => checkLevel({ v: [1, 0, 0], l: 0, r }));
      expect(e.message).toBe(`the Fermi rank r must be an integer 1..9, got ${r}`);
      expect(e.details).toEqual({ v: [1, 0, 0], l: 0, r });
    }
    expect(() => checkLevel({ v: [1, 0, 0], l: 0, r: 1 })).not.toThrow();
    expect(() => checkLevel({ v: [1, 0, 0], l: 0, r: 9 })).not.toThrow();
    const l2 = thrown(() => checkLevel({ v: [0, 1, 0], l: 2 }));
    expect(l2.message).toBe('l = 2 is not possible in level [0, 1, 0]: the bending quanta allow l = 1');
    expect(l2.details).toEqual({ v: [0, 1, 0], l: 2, allowed: [1] });
  });
});

describe('selection rules of one line', () => {
  it('J bookkeeping and parities of P, Q, R lines', () => {
    const p = resolveTransition(HCN, { upper: V3, lower: G0, branch: 'P', j: 4 });
    expect(p).toEqual({ upper: V3, lower: G0, branch: 'P', j: 4, upperJ: 3, lowerParity: 'e', upperParity: 'e' });
    const q = resolveTransition(HCN, { upper: V2, lower: G0, branch: 'Q', j: 4 });
    expect([q.upperJ, q.lowerParity, q.upperParity]).toEqual([4, 'e', 'f']);
    const r = resolveTransition(HCN, { upper: V2, lower: G0, branch: 'R', j: 4 });
    expect([r.upperJ, r.upperParity]).toEqual([5, 'e']);
    // Σ ← Π: P and R start from e, Q from f (the upper Σ has only e).
    const down = resolveTransition(HCN, { upper: V3, lower: V2, branch: 'Q', j: 3 });
    expect([down.lowerParity, down.upperParity]).toEqual(['f', 'e']);
    expect(resolveTransition(HCN, { upper: V3, lower: V2, branch: 'R', j: 3 }).lowerParity).toBe('e');
    // Π–Π: the parity given is kept; Q changes it.
    const V21 = { v: [0, 1, 1], l: 1 };
    const pp = resolveTransition(HCN, { upper: V21, lower: V2, branch: 'Q', j: 2, parity: 'f' });
    expect([pp.lowerParity, pp.upperParity]).toEqual(['f', 'e']);
    expect(resolveTransition(HCN, { upper: V21, lower: V2, branch: 'P', j: 2, parity: 'f' }).upperParity).toBe('f');
    // Within one level: R lines and Q (e ↔ f).
    const lq = resolveTransition(HCN, { upper: V2, lower: V2, branch: 'Q', j: 3, parity: 'e' });
    expect([lq.upperJ, lq.upperParity]).toEqual([3, 'f']);
    expect(MAX_LINEAR_J).toBe(300);
    expect(resolveTransition(HCN, { upper: V3, lower: G0, branch: 'R', j: 300 }).upperJ).toBe(301);
    expect(levelExists(HCN, V2, 0, 'e')).toBe(false);
    expect(levelExists(HCN, G0, 3, 'f')).toBe(false);
    expect(levelExists(HCN, V2, 1, 'f')).toBe(true);
    expect(levelExists(CO2, G0, 1, 'e')).toBe(false);
  });

  it('every refusal with its message and details', () => {
    const details = (a: { upper: object; lower: object; branch: string; j: number }) => ({
      upper: a.upper,
      lower: a.lower,
      branch: a.branch,
      j: a.j,
    });
    const cases: [Parameters<typeof resolveTransition>[1], string][] = [
      [
        { upper: { v: [0, 0, 1, 0, 0], l: 0 }, lower: G0, branch: 'R', j: 1 },
        'R(1) of band 00100⁰–00⁰0: the upper level has 5 quanta; 1H-12C-14N has 3 modes',
      ],
      [
        { upper: V3, lower: { v: [0, 0, 0, 0, 0], l: 0 }, branch: 'R', j: 1 },
        'R(1) of band 00⁰1–00000⁰: the lower level has 5 quanta; 1H-12C-14N has 3 modes',
      ],
      [
        { upper: { v: [0, 1, 0], l: 3 }, lower: G0, branch: 'R', j: 4 },
        'R(4) of band 01³0–00⁰0: l = 3 is not possible in level [0, 1, 0]: the bending quanta allow l = 1',
      ],
      [{ upper: V3, lower: G0, branch: 'R', j: -1 }, 'R(-1) of band 00⁰1–00⁰0: J″ must be a whole number 0..300'],
      [{ upper: V3, lower: G0, branch: 'R', j: 1.5 }, 'R(1.5) of band 00⁰1–00⁰0: J″ must be a whole number 0..300'],
      [{ upper: V3, lower: G0, branch: 'R', j: 301 }, 'R(301) of band 00⁰1–00⁰0: J″ must be a whole number 0..300'],
      [
        { upper: { v: [0, 2, 0], l: 2 }, lower: G0, branch: 'R', j: 3 },
        'R(3) of band 02²0–00⁰0: band 02²0–00⁰0 changes l by 2: only Δl = 0 (parallel) and Δl = ±1 (perpendicular) bands are allowed',
      ],
      [
        { upper: G0, lower: G0, branch: 'P', j: 3 },
        'P(3) of band 00⁰0–00⁰0: lines within one vibrational level are written as R (J″+1 ← J″) or Q (e↔f)',
      ],
      [
        { upper: V3, lower: V2, branch: 'R', j: 0 },
        'R(0) of band 00⁰1–01¹0: J″ = 0 is below l″ = 1: the level does not exist',
      ],
      [
        { upper: V2, lower: G0, branch: 'P', j: 1 },
        'P(1) of band 01¹0–00⁰0: J′ = 0 is below l′ = 1: the level does not exist',
      ],
      [
        { upper: V3, lower: G0, branch: 'Q', j: 2 },
        'Q(2) of band 00⁰1–00⁰0: the upper Σ level has only e components, which a Q line from e cannot reach',
      ],
      [
        { upper: V3, lower: G0, branch: 'R', j: 2, parity: 'f' },
        'R(2) of band 00⁰1–00⁰0: a Σ lower level has only e components',
      ],
      [
        { upper: V3, lower: V2, branch: 'Q', j: 2, parity: 'e' },
        'Q(2) of band 00⁰1–01¹0: a Q line to a Σ upper level starts from the f component, not e',
      ],
      [
        { upper: V3, lower: V2, branch: 'P', j: 2, parity: 'f' },
        'P(2) of band 00⁰1–01¹0: a P line to a Σ upper level starts from the e component, not f',
      ],
      [
        { upper: { v: [0, 1, 1], l: 1 }, lower: V2, branch: 'R', j: 2 },
        'R(2) of band 01¹1–01¹0: both levels have l ≥ 1: give the parity ("e" or "f") of the lower level',
      ],
    ];
    for (const [a, message] of cases) {
      let e: ScienceError;
      try {
        e = thrown(() => resolveTransition(HCN, a));
      } catch {
        throw new Error(`not refused: ${message}`);
      }
      expect(e.code).toBe('ASSIGNMENT_INVALID');
      expect(e.message).toBe(message);
      expect(e.details).toEqual(details(a));
    }
    // Missing levels of 12C16O2 (spin statistics): lower J = 1 of the ground state, upper J = 2 of 00⁰1.
    const lower = thrown(() => resolveTransition(CO2, { upper: V3, lower: G0, branch: 'R', j: 1 }));
    expect(lower.message).toBe(
      'R(1) of band 00⁰1–00⁰0: the lower level J = 1 (e) is missing in 16O-12C-16O (nuclear-spin statistics)',
    );
    // 00⁰1 has odd J only (e); 01¹0 e has odd J: R(1) from 01¹0 e reaches J′ = 2 of 00⁰1, which is missing.
    const upper = thrown(() => resolveTransition(CO2, { upper: V3, lower: { v: [0, 1, 0], l: 1 }, branch: 'R', j: 1 }));
    expect(upper.message).toBe(
      'R(1) of band 00⁰1–01¹0: the upper level J = 2 (e) is missing in 16O-12C-16O (nuclear-spin statistics)',
    );
    // The Δl rule on its own.
    const dl = thrown(() => bandKind({ v: [0, 2, 0], l: 2 }, G0));
    expect(dl.details).toEqual({ upper: { v: [0, 2, 0], l: 2 }, lower: G0 });
    expect(bandKind(V2, G0)).toBe('perpendicular');
    expect(bandKind(G0, V2)).toBe('perpendicular');
    expect(bandKind(V3, G0)).toBe('parallel');
  });

  it('every line of a band, written out by hand', () => {
    // HCN 01¹0 within itself to J″ = 2: Q(1..2) e→f only, R(1..2) in e and f.
    const within = bandTransitions(HCN, V2, V2, 2).map((t) => `${t.branch}${t.j}${t.lowerParity}${t.upperParity}`);
    expect(within.sort()).toEqual(['Q1ef', 'Q2ef', 'R1ee', 'R1ff', 'R2ee', 'R2ff'].sort());
    // HCN 00⁰1–01¹0 (Σ ← Π) to J″ = 2: P(1..2)e (J′ = J″ − 1 ≥ 0), Q(1..2)f, R(1..2)e.
    const down = bandTransitions(HCN, V3, V2, 2).map((t) => `${t.branch}${t.j}${t.lowerParity}`);
    expect(down.sort()).toEqual(['P1e', 'P2e', 'Q1f', 'Q2f', 'R1e', 'R2e']);
    // CO2 ν3 to J″ = 4: P(2), P(4), R(0), R(2), R(4) (odd J of 00⁰0 missing).
    const co2 = bandTransitions(CO2, V3, G0, 4).map((t) => `${t.branch}${t.j}`);
    expect(co2.sort()).toEqual(['P2', 'P4', 'R0', 'R2', 'R4']);
    // CO2 01¹0–00⁰0 to J″ = 3: R(0), R(2) to e (odd J′ in 01¹0 e), Q(2) to f (even J in f), P(2) to J′ = 1 e.
    const nu2 = bandTransitions(CO2, { v: [0, 1, 0], l: 1 }, G0, 3).map((t) => `${t.branch}${t.j}${t.upperParity}`);
    expect(nu2.sort()).toEqual(['P2e', 'Q2f', 'R0e', 'R2e']);
    const gg = thrown(() => bandTransitions(CO2, { v: [1, 0, 0], l: 0 }, G0, 5));
    expect(gg.code).toBe('ASSIGNMENT_INVALID');
    expect(gg.message).toBe('band 10⁰0–00⁰0 joins two g states of 16O-12C-16O: it has no dipole (infrared) lines');
    expect(gg.details).toEqual({ upper: { v: [1, 0, 0], l: 0 }, lower: G0 });
    // 01¹1 (v2 + v3 = 2: g) – 00⁰1 (u) is allowed.
    expect(bandTransitions(CO2, { v: [0, 1, 1], l: 1 }, V3, 5).length).toBeGreaterThan(0);
    const uu2 = thrown(() => bandTransitions(CO2, { v: [0, 1, 0], l: 1 }, V3, 5));
    expect(uu2.message).toBe('band 01¹0–00⁰1 joins two u states of 16O-12C-16O: it has no dipole (infrared) lines');
  });
});

describe('term values', () => {
  it('H and q_J terms with their signs; the power-series constant with l = 2 and H', () => {
    const c = { G: 1000, B: 0.4, D: 1e-6, H: 1e-11, q: 3e-4, qJ: -2e-9 };
    // l = 2, J = 5: x = 30, y = 26. E_e = G + B y − D y² + H y³ − ½(q x + qJ x²).
    const x = 30;
    const y = 26;
    const base = 1000 + 0.4 * y - 1e-6 * y * y + 1e-11 * y ** 3;
    const split = 0.5 * (3e-4 * x + -2e-9 * x * x);
    expect(termValue(c, 2, 5, 'e')).toBeCloseTo(base - split, 12);
    expect(termValue(c, 2, 5, 'f')).toBeCloseTo(base + split, 12);
    // l = 0: no doubling even with q given.
    expect(termValue(c, 0, 5, 'e')).toBeCloseTo(1000 + 0.4 * x - 1e-6 * x * x + 1e-11 * x ** 3, 12);
    // G − B l² − D l⁴ − H l⁶ at l = 2: 1000 − 1.6 − 1.6e-5 − 6.4e-10.
    expect(powerSeriesOrigin(c, 2)).toBeCloseTo(1000 - 1.6 - 1.6e-5 - 6.4e-10, 12);
    expect(powerSeriesOrigin({ G: 1000, B: 0.4, D: 1e-6 }, 2)).toBeCloseTo(1000 - 1.6 - 1.6e-5, 12);
    expect(termOriginFromPowerSeries(powerSeriesOrigin(c, 2), c, 2)).toBeCloseTo(1000, 12);
    // The constant is the J(J+1) → 0 limit of E per parity without q: E(l, J) − (B x − D x² … ) at any J.
    const e3 = termValue({ G: 1000, B: 0.4, D: 1e-6, H: 1e-11 }, 2, 3, 'e');
    const x3 = 12;
    const series = powerSeriesOrigin(c, 2) + (0.4 + 2 * 1e-6 * 4 + 3 * 1e-11 * 16) * x3;
    // Only the linear term of the expansion is subtracted here: the rest (D, H in x², x³) is below 1e-3.
    expect(Math.abs(e3 - series)).toBeLessThan(1e-3);
  });
});

describe('combination differences of a lower Σ level', () => {
  /** R(J−1) − P(J+1) = F″(J+1) − F″(J−1) of the lower level, written from F″ = B y − D y². */
  function lines(B: number, D: number, n: number, sigma?: number) {
    const F = (J: number) => B * J * (J + 1) - D * (J * (J + 1)) ** 2;
    const input: { position: number; uncertainty?: number }[] = [];
    const transitions = new Map<number, LinearTransition>();
    const origin = 2000;
    for (let J = 1; J <= n; J++) {
      // R(J−1) ends on J′ = J, P(J+1) ends on J′ = J: the same upper level; upper term 0 + 0.38 J(J+1).
      const up = origin + 0.38 * J * (J + 1);
      transitions.set(input.length, {
        upper: V3,
        lower: G0,
        branch: 'R',
        j: J - 1,
        upperJ: J,
        lowerParity: 'e',
        upperParity: 'e',
      });
      input.push({ position: up - F(J - 1), ...(sigma ? { uncertainty: sigma } : {}) });
      transitions.set(input.length, {
        upper: V3,
        lower: G0,
        branch: 'P',
        j: J + 1,
        upperJ: J,
        lowerParity: 'e',
        upperParity: 'e',
      });
      input.push({ position: up - F(J + 1), ...(sigma ? { uncertainty: sigma } : {}) });
    }
    return { input, transitions };
  }
  const B = 1.4782218;
  const D = 2.909e-6;
  const full = {
    key: '0,0,0|0',
    B: { value: B, uncertainty: 1e-7, unit: 'cm-1' },
    D: { value: D, uncertainty: 1e-10, unit: 'cm-1' },
  };

  it('B″ and D″ from exact differences; σ of the points from the lines; deviation from the full fit', () => {
    const { input, transitions } = lines(B, D, 8, 1e-4);
    const [cd] = linearCombinationDifferences(HCN, input, transitions, new Map(), [full]);
    expect(cd?.band).toBe('00⁰1–00⁰0');
    expect(cd?.level).toBe('00⁰0');
    expect(cd?.kind).toBe('lower');
    expect(cd?.B.value).toBeCloseTo(B, 10);
    expect(cd?.D?.value).toBeCloseTo(D, 14);
    expect(cd?.points.map((p) => p.j)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
    // Δ₂F″(J) = F″(J+1) − F″(J−1) = B(4J+2) − D[(J+1)²(J+2)² − (J−1)²J²]: J = 1: 6B − 36D.
    expect(cd?.points[0]?.value).toBeCloseTo(6 * B - 36 * D, 10);
    expect(cd?.points[0]?.uncertainty).toBeCloseTo(Math.hypot(1e-4, 1e-4), 15);
    expect(cd?.degreesOfFreedom).toBe(6);
    expect(cd?.fitted.value).toBe(B);
    expect(cd?.deviation).toBeCloseTo(Math.abs((cd?.B.value ?? 0) - B) / Math.hypot(cd?.B.uncertainty ?? 0, 1e-7), 9);
  });

  it('without line σ, without D in the full fit, with fewer than four pairs, or with a rejected line', () => {
    const noSigma = lines(B, 0, 6);
    const [cd] = linearCombinationDifferences(HCN, noSigma.input, noSigma.transitions, new Map(), [
      { key: '0,0,0|0', B: full.B },
    ]);
    expect(cd?.D).toBeUndefined();
    expect(cd?.B.value).toBeCloseTo(B, 10);
    // Exact data: the scatter is rounding (below 1e-9), and the point σ is that scatter.
    expect(cd?.points[0]?.uncertainty).toBeLessThan(1e-9);
    expect(cd?.rms).toBeLessThan(1e-9);
    // Four pairs are enough (B alone); three are not.
    const four = lines(B, 0, 4);
    expect(linearCombinationDifferences(HCN, four.input, four.transitions, new Map(), [full])).toHaveLength(1);
    // With four pairs and D in the full fit: B alone (D needs five pairs).
    expect(linearCombinationDifferences(HCN, four.input, four.transitions, new Map(), [full])[0]?.D).toBeUndefined();
    const three = lines(B, 0, 3);
    expect(linearCombinationDifferences(HCN, three.input, three.transitions, new Map(), [full])).toEqual([]);
    // A rejected line breaks its pair: 4 pairs − 1 = 3, left out.
    expect(linearCombinationDifferences(HCN, four.input, four.transitions, new Map([[0, 'outlier']]), [full])).toEqual(
      [],
    );
    // No B from the fit for the level: left out.
    expect(linearCombinationDifferences(HCN, four.input, four.transitions, new Map(), [])).toEqual([]);
  });
});

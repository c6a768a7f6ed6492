import { describe, expect, it } from 'vitest';
import { powerSeriesOrigin, termOriginFromPowerSeries, termValue } from '../../src/linear/terms.js';
import { allowedL, bandLabel, checkLevel, levelKey, levelLabel, parseLevelKey } from '../../src/linear/types.js';

// HCN 01¹0 constants per parity, derived in ../shared/REFERENCE-DATA-LINEAR.md §1.6 (THIS_NOTE, fits of HITRAN
// lower-state energies with E = G + B J(J+1) − D [J(J+1)]² + H [J(J+1)]³ per parity).
const HCN_E = { G: 711.9795491, B: 1.478034789, D: 2.931952336e-6, H: 2.737587934e-12 };
const HCN_F = { G: 711.9795591, B: 1.485522349, D: 3.020421432e-6, H: 4.028555267e-12 };

function perParity(c: { G: number; B: number; D: number; H: number }, J: number): number {
  const x = J * (J + 1);
  return c.G + c.B * x - c.D * x * x + c.H * x * x * x;
}

describe('level identity and labels', () => {
  it('round-trips level keys and writes the trade notation', () => {
    expect(levelKey({ v: [0, 1, 0], l: 1 })).toBe('0,1,0|1');
    expect(parseLevelKey('0,0,1|0')).toEqual({ v: [0, 0, 1], l: 0 });
    expect(levelLabel({ v: [0, 1, 0], l: 1 })).toBe('01¹0');
    expect(bandLabel({ v: [0, 0, 1], l: 0 }, { v: [0, 0, 0], l: 0 })).toBe('00⁰1–00⁰0');
    expect(levelLabel({ v: [0, 0, 1, 0, 0], l: 0 })).toBe('00100⁰');
  });
  it('allows only the l values the bends carry', () => {
    expect(allowedL([0, 3, 0])).toEqual([3, 1]);
    expect(allowedL([0, 0, 0, 1, 1])).toEqual([2, 0]);
    expect(() => checkLevel({ v: [0, 1, 0], l: 2 })).toThrow(/not possible/);
    expect(() => checkLevel({ v: [0, 2, 0], l: 1 })).toThrow(/not possible/);
    expect(() => checkLevel({ v: [0, 1], l: 1 })).toThrow(/3 or 5/);
    expect(() => checkLevel({ v: [0, -1, 0], l: 1 })).toThrow(/integers/);
  });
});

describe('term values with l and e/f (convention of src/linear/terms.ts)', () => {
  // One level in our form: D, H = means of the parity values, q = B_f − B_e, G_v from the e origin.
  // Expanding B y − D y² with y = J(J+1) − 1 moves 2D into the coefficient of J(J+1): B = B̄ − 2D.
  const D = (HCN_E.D + HCN_F.D) / 2;
  const H = (HCN_E.H + HCN_F.H) / 2;
  const B = (HCN_E.B + HCN_F.B) / 2 - 2 * D;
  const q = HCN_F.B - HCN_E.B;
  const Gv = termOriginFromPowerSeries(HCN_E.G, { B, D, H }, 1);

  it('puts f above e by q J(J+1) and reproduces the HITRAN l-type transitions of HCN 01¹0', () => {
    const c = { G: Gv, B, D, q };
    // HITRAN Q(J) e→f in 01¹0 (reference note §4, read-secondary): 0.014975, 0.044923, 0.089840 cm⁻¹ for J = 1, 2, 3.
    // Tolerance 2e-5 cm⁻¹: the model has no q_J term (its size here, from the D_f − D_e of the note, is ~1e-5 at J = 3).
    const hitran = [0.014975, 0.044923, 0.08984];
    hitran.forEach((nu, i) => {
      const J = i + 1;
      expect(termValue(c, 1, J, 'f') - termValue(c, 1, J, 'e')).toBeCloseTo(nu, 4);
      expect(Math.abs(termValue(c, 1, J, 'f') - termValue(c, 1, J, 'e') - nu)).toBeLessThan(2e-5);
    });
  });

  it('reproduces the per-parity energies of the note and converts between the two origin conventions', () => {
    const c = { G: Gv, B, D, H, q };
    // Tolerance 1e-4 cm⁻¹ for J ≤ 5: the per-parity D and H differ (q_J, not modelled), worth < 4e-5 cm⁻¹ there.
    for (let J = 1; J <= 5; J++) {
      expect(Math.abs(termValue(c, 1, J, 'e') - perParity(HCN_E, J))).toBeLessThan(1e-4);
      expect(Math.abs(termValue(c, 1, J, 'f') - perParity(HCN_F, J))).toBeLessThan(1e-4);
    }
    // G_v of the B[J(J+1) − l²] form is the power-series origin + B l² (+ D l⁴): about 713.4613 cm⁻¹ with the e/f
    // mean B (the note's 713.45758 adds B_e instead of the mean, a q/2 = 0.0037 cm⁻¹ difference).
    expect(Gv).toBeCloseTo(711.9795491 + B + D + H, 8);
    expect(Gv).toBeCloseTo(713.4613, 3);
    expect(powerSeriesOrigin({ G: Gv, B, D, H }, 1)).toBeCloseTo(HCN_E.G, 9);
  });

  it('has no doubling for Σ levels and starts the rotational variable at l²', () => {
    const sigma = { G: 2349.1433, B: 0.3871414, D: 1.33034e-7, q: 0.1 };
    expect(termValue(sigma, 0, 3, 'e')).toBe(termValue(sigma, 0, 3, 'f'));
    // Lowest level of a Π state (J = 1, y = 1): G_v + B − q (e) and G_v + B + q (f).
    expect(termValue({ G: 10, B: 1, D: 0, q: 0.01 }, 1, 1, 'e')).toBeCloseTo(11 - 0.01, 12);
    expect(termValue({ G: 10, B: 1, D: 0, q: 0.01 }, 1, 1, 'f')).toBeCloseTo(11 + 0.01, 12);
  });
});

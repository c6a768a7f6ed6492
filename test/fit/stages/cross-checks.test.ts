import { describe, expect, it } from 'vitest';
import { quantity } from '../../../src/derive/quantity.js';
import { fitCombinationDifferences } from '../../../src/fit/combination-differences.js';
import { combinationChecks } from '../../../src/fit/cross-checks.js';
import { selectLevelModel } from '../../../src/fit/level-selection.js';
import { CO_12_16 } from '../../helpers/independent-lines.js';
import { generated } from './observations-of.js';

// Stage 6 on its own: B_v from the combination differences against the full fit's, on lines of the independent
// generator (¹²C¹⁶O, Huber & Herzberg constants from memory). The deviation is |ΔB| / √(σ_cd² + σ_fit²) with each
// σ no smaller than the lines' stated σ allow; it is recomputed here from the parts. Inside `it` (mutation testing).

function setting(mode: 'absolute' | 'a-posteriori') {
  const { obs } = generated({
    molecule: CO_12_16,
    bands: [
      { upper: 1, lower: 0, jMax: 25 },
      { upper: 2, lower: 0, jMax: 25 },
    ],
    sigma: 0.002,
    // Stated σ twice the scatter: s² ≈ 1/4 in a-posteriori mode.
    reportedSigmaFactor: 2,
    seed: 31,
  });
  const sel = selectLevelModel(obs, 5, mode, 0.01);
  const f = sel.fit;
  const p = f.model.parameters.length;
  const byKey = new Map(
    f.model.parameters.map((q, i) => [
      q.key,
      quantity(f.values[i] as number, Math.sqrt(f.covariance[i * p + i] as number), 'cm-1'),
    ]),
  );
  return { obs, sel, byKey, s2: f.chiSquare / f.degreesOfFreedom };
}

describe('combinationChecks', () => {
  it('a-posteriori, stated σ twice the scatter: each side judged with σ no smaller than the stated σ give', () => {
    const { obs, sel, byKey, s2 } = setting('a-posteriori');
    expect(s2).toBeLessThan(0.5);
    const { checks, warnings } = combinationChecks(sel.fit, sel.orders, 'a-posteriori', (k) => byKey.get(k), s2);
    expect(warnings).toEqual([]);
    expect(checks.map((x) => `${x.band} ${x.kind} ${x.v}`)).toEqual([
      '1-0 lower 0',
      '1-0 upper 1',
      '2-0 lower 0',
      '2-0 upper 2',
    ]);
    const stated = fitCombinationDifferences(obs, (s, v) => sel.orders.get(`${s}|${v}`) ?? 1, 'a-posteriori');
    for (const [i, ch] of checks.entries()) {
      const fitted = byKey.get(`12C-16O|B|${ch.v}`);
      expect(ch.fitted).toBe(fitted);
      const st = stated[i] as (typeof stated)[number];
      expect(ch.B.value).toBe(st.fit.B.value);
      // σ_cd: the larger of the a-posteriori one and the stated one; σ_fit: divided by √s² (s² < 1).
      const sigmaCd = Math.max(ch.B.uncertainty, st.statedUncertaintyOfB);
      expect(sigmaCd).toBe(st.statedUncertaintyOfB);
      const sigmaFit = (fitted?.uncertainty as number) / Math.sqrt(s2);
      expect(ch.deviation).toBeCloseTo(
        Math.abs(ch.B.value - (fitted?.value as number)) / Math.hypot(sigmaCd, sigmaFit),
        12,
      );
      expect(ch.deviation).toBeLessThan(3);
    }
    // Without the main fit's scale (or with s² ≥ 1) the fit's σ is taken as it is: larger deviations.
    const plain = combinationChecks(sel.fit, sel.orders, 'a-posteriori', (k) => byKey.get(k)).checks;
    const one = combinationChecks(sel.fit, sel.orders, 'a-posteriori', (k) => byKey.get(k), 1).checks;
    // s² of 0 (a perfect fit) or above 1 leaves the fit's σ as it is too.
    const zero = combinationChecks(sel.fit, sel.orders, 'a-posteriori', (k) => byKey.get(k), 0).checks;
    const four = combinationChecks(sel.fit, sel.orders, 'a-posteriori', (k) => byKey.get(k), 4).checks;
    expect(zero.map((x) => x.deviation)).toEqual(plain.map((x) => x.deviation));
    expect(four.map((x) => x.deviation)).toEqual(plain.map((x) => x.deviation));
    for (const [i, ch] of plain.entries()) {
      const fitted = ch.fitted;
      const sigmaCd = Math.max(ch.B.uncertainty, (stated[i] as (typeof stated)[number]).statedUncertaintyOfB);
      expect(ch.deviation).toBeCloseTo(
        Math.abs(ch.B.value - fitted.value) / Math.hypot(sigmaCd, fitted.uncertainty),
        12,
      );
      expect(one[i]?.deviation).toBe(ch.deviation);
      expect(ch.deviation).toBeGreaterThan((checks[i] as (typeof checks)[number]).deviation);
    }
  });

  it('absolute mode ignores the main scale', () => {
    const { sel, byKey } = setting('absolute');
    const a = combinationChecks(sel.fit, sel.orders, 'absolute', (k) => byKey.get(k), 0.25).checks;
    const b = combinationChecks(sel.fit, sel.orders, 'absolute', (k) => byKey.get(k), null).checks;
    expect(a.map((x) => x.deviation)).toEqual(b.map((x) => x.deviation));
  });

  it('a B that differs by more than 3σ is reported, naming the band, the level and the difference used', () => {
    const { sel, byKey } = setting('absolute');
    // Move the full fit's B_0 by 5 × σ_cd (the Δ₂F″ side dominates the combined σ here).
    const cd = combinationChecks(sel.fit, sel.orders, 'absolute', (k) => byKey.get(k)).checks;
    const first = cd[0] as (typeof cd)[number];
    const b0 = byKey.get('12C-16O|B|0');
    const moved = quantity((b0?.value as number) + 6 * first.B.uncertainty, b0?.uncertainty as number, 'cm-1');
    const { checks, warnings } = combinationChecks(sel.fit, sel.orders, 'absolute', (k) =>
      k === '12C-16O|B|0' ? moved : byKey.get(k),
    );
    const flagged = checks.filter((x) => x.deviation > 3);
    expect(flagged.map((x) => `${x.band} ${x.kind}`)).toEqual(['1-0 lower', '2-0 lower']);
    expect(warnings).toHaveLength(2);
    for (const [i, w] of warnings.entries()) {
      const x = flagged[i] as (typeof flagged)[number];
      expect(w.code).toBe('COMBINATION_DIFFERENCES_DISAGREE');
      expect(w.message).toBe(
        `12C-16O band ${x.band}: B_0 from Δ₂F″ differs from the full fit by ${x.deviation.toFixed(1)}σ (an assignment error or a perturbation?)`,
      );
    }
    // The upper level: B_1 moved, Δ₂F′ named.
    const b1 = byKey.get('12C-16O|B|1');
    const up = combinationChecks(sel.fit, sel.orders, 'absolute', (k) =>
      k === '12C-16O|B|1' ? quantity((b1?.value as number) - 1e-3, b1?.uncertainty as number, 'cm-1') : byKey.get(k),
    );
    expect(up.warnings.map((w) => w.message.slice(0, 44))).toEqual(['12C-16O band 1-0: B_1 from Δ₂F′ differs from']);
  });
});

import { describe, expect, it } from 'vitest';
import { CO_DATABASE } from './co-database.js';
import {
  dunhamTerm,
  heldoutScan,
  isotopologues,
  MOLECULES,
  rotationalConstant,
  scoreScan,
  sweepOptions,
  trueLines,
} from './heldout-scans.js';

/**
 * The held-out generator against data from outside the project: its ¹²C¹⁶O Dunham coefficients against the real
 * database lines (test/fixtures/co-database-lines, HITRAN2020) and the published B_0 (Gendriesch et al. 2009), its
 * HCl band origins against the measured ones (from memory: 2885.977, 5667.98, 8346.78 cm⁻¹), the natural
 * abundances (CIAAW, from memory) summing to one, and the Boltzmann envelope peaking where √(kT/2hcB) − ½ says.
 */
const co = isotopologues(MOLECULES.CO).find((i) => i.formula === '12C-16O');
const hcl = isotopologues(MOLECULES.HCl).find((i) => i.formula === '1H-35Cl');

describe('the held-out generator', () => {
  it('its 12C16O term values give the real database lines: within 1e-3 cm⁻¹ to J 30, 0.02 cm⁻¹ to J 80', () => {
    if (!co) throw new Error('no 12C-16O');
    for (const l of CO_DATABASE.lines) {
      const [up, lo] = l.band.split('-').map(Number) as [number, number];
      const calc = dunhamTerm(co.y, up, l.branch === 'R' ? l.j + 1 : l.j - 1) - dunhamTerm(co.y, lo, l.j);
      expect(Math.abs(l.position - calc), `${l.band} ${l.branch}(${l.j})`).toBeLessThan(l.j <= 30 ? 1e-3 : 0.02);
    }
    const b0 = (CO_DATABASE.published.B_v_MHz.value[0] as number) / 29979.2458;
    expect(Math.abs(rotationalConstant(co.y, 0) - b0) / b0).toBeLessThan(2e-7);
  });

  it('its H35Cl band origins are the measured ones (2885.977, 5667.98, 8346.78 cm⁻¹, from memory) within 0.01', () => {
    if (!hcl) throw new Error('no 1H-35Cl');
    const origin = (v: number) => dunhamTerm(hcl.y, v, 0) - dunhamTerm(hcl.y, 0, 0);
    expect(origin(1)).toBeCloseTo(2885.977, 2);
    expect(origin(2)).toBeCloseTo(5667.98, 1);
    expect(origin(3)).toBeCloseTo(8346.78, 1);
  });

  it('abundances sum to one per molecule; H37Cl is 0.2424/0.7576 of H35Cl; B scales as 1/μ', () => {
    for (const m of Object.values(MOLECULES)) {
      const sum = isotopologues(m).reduce((s, i) => s + i.abundance, 0);
      expect(sum).toBeCloseTo(1, 9);
    }
    const [h35, h37] = ['1H-35Cl', '1H-37Cl'].map((f) => isotopologues(MOLECULES.HCl).find((i) => i.formula === f));
    expect((h37?.abundance as number) / (h35?.abundance as number)).toBeCloseTo(0.2424 / 0.7576, 9);
    // μ(H35Cl)/μ(H37Cl) from the AME2020 masses: 0.998 486 … (B_e ratio, Dunham's first-order isotope relation)
    const ratio = rotationalConstant(h37?.y ?? [], -0.5) / rotationalConstant(h35?.y ?? [], -0.5);
    expect(ratio).toBeCloseTo(0.998486, 5);
  });

  it('the 1-0 R branch of CO at 296 K peaks at J = round(√(kT/2hcB) − ½) = 7, at 1500 K 16', () => {
    for (const [t, jPeak] of [
      [296, 7],
      [1500, 16],
    ] as const) {
      const r = trueLines('CO', t, [1]).filter((l) => l.species === '12C-16O' && l.band === '1-0' && l.branch === 'R');
      const best = r.reduce((a, b) => (b.strength > a.strength ? b : a));
      expect(Math.abs(best.j - jPeak), `T ${t}`).toBeLessThanOrEqual(1);
    }
  });

  it('a scan holds blends, spurious peaks and both sources; the score counts a right label, a wrong one and a left line', () => {
    const s = heldoutScan({
      ...sweepOptions(3),
      molecule: 'CO',
      temperature: 1200,
      detection: 1e-4,
      spurious: 0.2,
      resolution: 0.05,
      b: { offset: 0.01, sigma: 0.003, layout: 'random' },
    });
    expect(new Set(s.peaks.map((p) => p.source))).toEqual(new Set(['A', 'B']));
    expect(s.truth.some((t) => t.transitions.length === 2)).toBe(true);
    expect(s.truth.some((t) => t.transitions.length === 0)).toBe(true);
    const first = s.truth.findIndex((t) => t.transitions.length === 1);
    const t = s.truth[first]?.transitions[0];
    if (!t) throw new Error('no single line');
    const out = s.truth.map(() => ({ status: 'unassigned' }));
    const score = (a: typeof out) => scoreScan(s.truth, a);
    expect(score(out).left).toBe(s.truth.filter((x) => x.transitions.length > 0).length);
    const right = out.map((o, i) => (i === first ? { status: 'fitted', assignment: t } : o));
    expect(score(right).right).toBe(1);
    const wrong = out.map((o, i) => (i === first ? { status: 'fitted', assignment: { ...t, j: t.j + 1 } } : o));
    expect(score(wrong).wrong).toBe(1);
  });
});

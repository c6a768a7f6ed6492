import { describe, expect, it } from 'vitest';
import { honlLondonComponent } from '../../src/linear/intensity.js';
import { honlLondon, predictLinearBands } from '../../src/linear/predict.js';
import { parseLinearSpecies } from '../../src/linear/species.js';
import { hasMissingLevels, levelSpinWeight, speciesStatistics } from '../../src/linear/spin-statistics.js';
import { bandTransitions, levelExists } from '../../src/linear/transitions.js';
import type { LinearLevel } from '../../src/linear/types.js';
import {
  C2H2_1221,
  CO2_626,
  CO2_628,
  type GenLevel,
  type GenMolecule,
  genBandLines,
  genHonlLondon,
  genSpinWeight,
  HCN_H12C14N,
  N2O_446,
  OCS_622,
} from '../helpers/independent-linear.js';

/**
 * One rule for missing rotational levels and one line-strength normalisation across src/linear (selection rules,
 * predictions, intensities), each compared with the independent generator (test/helpers/independent-linear.ts: its
 * own parity and exchange rule, its own Hönl–London closed forms), level by level and line by line, for every band
 * the generator's molecules allow (|Δl| ≤ 1; g↔u for centrosymmetric chains), J″ ≤ 60, both e/f components.
 */
const MOLECULES: readonly GenMolecule[] = [CO2_626, CO2_628, N2O_446, OCS_622, HCN_H12C14N, C2H2_1221];
const level = (g: GenLevel): LinearLevel => ({ v: g.v, l: g.l });

/** Bands the generator's molecule allows: |Δl| ≤ 1, and for centrosymmetric chains an odd change of u quanta. */
function bandsOf(mol: GenMolecule): [GenLevel, GenLevel][] {
  const levels = Object.values(mol.levels);
  const u = (g: GenLevel) =>
    mol.spin.kind === 'exchange' ? mol.spin.uModes.reduce((n, m) => n + (g.v[m - 1] ?? 0), 0) % 2 : 0;
  const out: [GenLevel, GenLevel][] = [];
  for (const up of levels) {
    for (const lo of levels) {
      if (up === lo || Math.abs(up.l - lo.l) > 1) continue;
      if (mol.spin.kind === 'exchange' && u(up) === u(lo)) continue;
      if (
        (up.terms.form === 'per-parity' ? up.terms.e.G : up.terms.G) <=
        (lo.terms.form === 'per-parity' ? lo.terms.e.G : lo.terms.G)
      )
        continue;
      // Two levels with the same quanta and l (a Fermi dyad) are told apart in the library by a rank only.
      if (up.v.join() === lo.v.join() && up.l === lo.l) continue;
      out.push([up, lo]);
    }
  }
  return out;
}

describe('one rule for missing levels (spin-statistics.ts) against the independent generator', () => {
  it('every level J ≤ 60, e and f, of every level of six molecules: exists exactly when the generator gives it weight', () => {
    let compared = 0;
    for (const mol of MOLECULES) {
      const species = parseLinearSpecies(mol.formula);
      const stats = speciesStatistics(species);
      for (const g of Object.values(mol.levels)) {
        for (let J = 0; J <= 60; J++) {
          for (const p of ['e', 'f'] as const) {
            const theirs = J >= g.l && !(g.l === 0 && p === 'f') ? genSpinWeight(mol, g, J, p) : 0;
            expect(levelSpinWeight(stats, level(g), J, p), `${mol.formula} ${g.label} J=${J}${p}`).toBe(theirs);
            expect(levelExists(species, level(g), J, p)).toBe(theirs > 0);
            compared++;
          }
        }
      }
    }
    expect(compared).toBeGreaterThan(2500);
    // 12C16O2 has missing levels (16O: I = 0); 16O12C18O and C2H2 (weights 1 and 3) do not.
    expect(hasMissingLevels(parseLinearSpecies('CO2'))).toBe(true);
    expect(hasMissingLevels(parseLinearSpecies('16O-12C-18O'))).toBe(false);
    expect(hasMissingLevels(parseLinearSpecies('C2H2'))).toBe(false);
  });

  it('every line of every allowed band (J″ ≤ 60): the same lines as the generator, with its Hönl–London factor', () => {
    let lines = 0;
    for (const mol of MOLECULES) {
      const species = parseLinearSpecies(mol.formula);
      for (const [up, lo] of bandsOf(mol)) {
        const theirs = genBandLines(mol, { upper: up.label, lower: lo.label }, 60, 296);
        const key = (b: string, j: number, p: string) => `${b}${j}${p}`;
        const ours = bandTransitions(species, level(up), level(lo), 60);
        const mine = new Set(ours.map((t) => key(t.branch, t.j, t.lowerParity)));
        const gen = new Map(theirs.map((t) => [key(t.branch as string, t.j as number, t.lowerParity as string), t]));
        expect([...mine].sort(), `${mol.formula} ${up.label}–${lo.label}`).toEqual([...gen.keys()].sort());
        // The factor each path uses: predict.ts (honlLondon, on every predicted line) and intensity.ts.
        const components = up.l >= 1 && lo.l >= 1 ? 2 : 1;
        for (const t of ours) {
          const want = genHonlLondon(t.branch, lo.l, up.l, t.j) / components;
          expect(honlLondon(lo.l, up.l, t.branch, t.j)).toBeCloseTo(want, 9);
          expect(honlLondonComponent(t.branch, lo.l, up.l, t.j)).toBeCloseTo(want, 9);
          expect((gen.get(key(t.branch, t.j, t.lowerParity))?.honlLondon as number) - want).toBeCloseTo(0, 12);
          lines++;
        }
      }
    }
    expect(lines).toBeGreaterThan(1000);
  });

  it('predicted lines carry the same factor: a Σ→Π band (HCN ν2) R(0), Q(1), P(2) in the ratio 1 : 3/2 : 1/2 (Hönl–London, Herzberg)', () => {
    const species = parseLinearSpecies('HCN');
    const lv = (g: GenLevel) => ({
      level: level(g),
      constants: { G: 0, B: 1.478, D: 0, ...(g.l ? { q: 0.0075 } : {}) },
    });
    const lines = predictLinearBands(
      species,
      [
        lv(HCN_H12C14N.levels['0000'] as GenLevel),
        { ...lv(HCN_H12C14N.levels['0110'] as GenLevel), constants: { G: 713.46, B: 1.4818, D: 0, q: 0.0075 } },
      ],
      [{ upper: { v: [0, 1, 0], l: 1 }, lower: { v: [0, 0, 0], l: 0 } }],
      3,
    );
    const at = (b: string, j: number) => lines.find((l) => l.branch === b && l.j === j)?.honlLondon as number;
    // Σ→Π from the lower J″: R (J″+2)/2, Q (2J″+1)/2, P (J″−1)/2 (SCIENCE.md §10): R(0) = 1, Q(1) = 3/2, P(2) = 1/2.
    expect(at('R', 0)).toBeCloseTo(1, 12);
    expect(at('Q', 1)).toBeCloseTo(1.5, 12);
    expect(at('P', 2)).toBeCloseTo(0.5, 12);
  });
});

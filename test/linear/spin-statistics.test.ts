import { describe, expect, it } from 'vitest';
import {
  allowedJ,
  branchJStep,
  exchangeStatistics,
  levelExists,
  levelSpinWeight,
  nuclearSpin,
  totalParity,
} from '../../src/linear/spin-statistics.js';
import type { Parity } from '../../src/linear/types.js';
import { C2H2_1221, CO2_626, type GenMolecule, genSpinWeight } from '../helpers/independent-linear.js';

const CO2 = ['16O', '12C', '16O'];
const C2H2 = ['1H', '12C', '12C', '1H'];
const ground3 = { v: [0, 0, 0], l: 0 };
const nu3 = { v: [0, 0, 1], l: 0 };
const bend = { v: [0, 1, 0], l: 1 };

describe('nuclear-spin statistics of linear molecules', () => {
  it('nuclear spins (NUBASE2020, from memory): 1H ½, 12C 0, 13C ½, 14N 1, 16O 0, 17O 5/2', () => {
    expect([nuclearSpin('1H'), nuclearSpin('12C'), nuclearSpin('13C'), nuclearSpin('14N')]).toEqual([0.5, 0, 0.5, 1]);
    expect([nuclearSpin('16O'), nuclearSpin('17O'), nuclearSpin('99Xx')]).toEqual([0, 2.5, undefined]);
  });

  it('12C16O2: ground state only even J, 00⁰1 only odd J (Landolt–Börnstein II/20: odd levels missing in the ground state)', () => {
    const s = exchangeStatistics(CO2);
    expect(s.kind).toBe('exchange');
    expect(allowedJ(s, ground3, 'e')).toBe('even');
    expect(allowedJ(s, nu3, 'e')).toBe('odd');
    expect(levelExists(s, ground3, 0, 'e')).toBe(true);
    expect(levelExists(s, ground3, 1, 'e')).toBe(false);
    expect(levelExists(s, nu3, 1, 'e')).toBe(true);
    expect(levelExists(s, nu3, 2, 'e')).toBe(false);
    // 01¹0 (u): e at odd J, f at even J — the rule the reference note derives from all 21 HITRAN 626 levels.
    expect(allowedJ(s, bend, 'e')).toBe('odd');
    expect(allowedJ(s, bend, 'f')).toBe('even');
    expect(branchJStep(s, ground3)).toBe(2);
    // 10⁰0 and 02⁰0 (g): even J like the ground state; 11¹0 (u): e odd (note §2, HITRAN 11101 e odd J).
    expect(allowedJ(s, { v: [1, 0, 0], l: 0 }, 'e')).toBe('even');
    expect(allowedJ(s, { v: [1, 1, 0], l: 1 }, 'e')).toBe('odd');
    expect(allowedJ(s, { v: [1, 1, 0], l: 1 }, 'f')).toBe('even');
  });

  it('16O12C18O, N2O, OCS and HCN have every level (no equivalent nuclei)', () => {
    for (const chain of [
      ['16O', '12C', '18O'],
      ['14N', '14N', '16O'],
      ['16O', '12C', '32S'],
      ['1H', '12C', '14N'],
    ]) {
      const s = exchangeStatistics(chain);
      expect(s.kind).toBe('none');
      expect(allowedJ(s, ground3, 'e')).toBe('all');
      expect(branchJStep(s, ground3)).toBe(1);
    }
    // 16O13C16O keeps the 16O pair: the same missing levels as 626.
    expect(allowedJ(exchangeStatistics(['16O', '13C', '16O']), ground3, 'e')).toBe('even');
  });

  it('12C2H2 ground state: odd J weight 3 (ortho), even J weight 1 (para); every level exists', () => {
    const s = exchangeStatistics(C2H2);
    const g = { v: [0, 0, 0, 0, 0], l: 0 };
    expect(levelSpinWeight(s, g, 1, 'e') / levelSpinWeight(s, g, 2, 'e')).toBe(3);
    expect(levelSpinWeight(s, g, 0, 'e')).toBe(1);
    // ν3 (σu⁺): the alternation reverses in the upper level (even J′ weight 3), so R(J″) and P(J″) keep J″'s weight.
    const v3 = { v: [0, 0, 1, 0, 0], l: 0 };
    expect(levelSpinWeight(s, v3, 2, 'e')).toBe(3);
    expect(levelSpinWeight(s, v3, 1, 'e')).toBe(1);
    expect(allowedJ(s, g, 'e')).toBe('all');
  });

  it('12C2D2: even J twice odd J in the ground state (2H: I = 1, bosons; common textbook statement, from memory)', () => {
    const s = exchangeStatistics(['2H', '12C', '12C', '2H']);
    const g = { v: [0, 0, 0, 0, 0], l: 0 };
    expect(levelSpinWeight(s, g, 2, 'e') / levelSpinWeight(s, g, 1, 'e')).toBe(2);
  });

  it('agrees with the independent generator level by level (CO2 626 and C2H2, J ≤ 30, e and f)', () => {
    const cases: [GenMolecule, string[]][] = [
      [CO2_626, CO2],
      [C2H2_1221, C2H2],
    ];
    for (const [mol, chain] of cases) {
      const s = exchangeStatistics(chain);
      for (const level of Object.values(mol.levels)) {
        for (let J = level.l; J <= 30; J++) {
          for (const p of ['e', 'f'] as Parity[]) {
            if (level.l === 0 && p === 'f') continue;
            expect(levelSpinWeight(s, level, J, p)).toBe(genSpinWeight(mol, level, J, p));
          }
        }
      }
    }
  });

  it('e/f total parity and refusals', () => {
    expect(totalParity(2, 'e')).toBe('+');
    expect(totalParity(3, 'e')).toBe('-');
    expect(totalParity(3, 'f')).toBe('+');
    expect(levelSpinWeight(exchangeStatistics(CO2), bend, 0, 'e')).toBe(0);
    expect(levelSpinWeight(exchangeStatistics(CO2), ground3, 2, 'f')).toBe(0);
    // A chain without equivalent nuclei needs no spin: an untabulated nuclide there is no error.
    expect(exchangeStatistics(['7Li', '12C', '14N']).kind).toBe('none');
    expect(() => exchangeStatistics(['7Li', '12C', '7Li'])).toThrow(/no nuclear spin/);
  });
});

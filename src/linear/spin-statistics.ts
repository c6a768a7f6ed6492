import { ScienceError } from '../errors.js';
import { hasZeroNuclearSpin, type LinearSpecies } from './species.js';
import type { LinearLevel, Parity } from './types.js';

/**
 * Nuclear-spin statistics of linear molecules.
 *
 * In a centrosymmetric chain (16O-12C-16O, 1H-12C-12C-1H) the permutation P that reverses the chain exchanges
 * pairs of identical nuclei. The total wavefunction must be symmetric under P when it exchanges an even number of
 * fermion pairs and antisymmetric when odd (Pauli). A rovibronic level of a ground Σg⁺ electronic state is
 * symmetric (s) under P when its total parity is + in a g vibrational state or − in a u state, antisymmetric (a)
 * otherwise (Herzberg, Infrared and Raman Spectra, ch. I.3 and IV.1). Its statistical weight is the number of
 * nuclear-spin functions whose symmetry under P completes the required total symmetry. A pair of nuclei of spin I
 * has (2I+1)(I+1) symmetric and (2I+1)I antisymmetric spin functions; several pairs multiply.
 *
 * Results for the molecules of the library (all derived from the rule above, checked in the tests against what
 * the literature states):
 *   - 16O-12C-16O (16O: I = 0): a levels do not exist. Ground state (g, e): even J only; 00⁰1 (u, e): odd J
 *     only; in 01¹0 (u) the e components have odd J and the f components even J.
 *   - 1H-12C-12C-1H (1H: I = ½; 12C: I = 0): s levels weight 1 (para), a levels weight 3 (ortho): in the ground
 *     state odd J three times as strong as even J.
 *   - Non-centrosymmetric chains (N2O, OCS, HCN, 16O-12C-18O): no exchange symmetry, every level exists with the
 *     same (irrelevant) spin factor, reported as 1.
 * Parity: e levels have total parity +(−1)^J, f levels −(−1)^J (Brown et al., J. Mol. Spectrosc. 55, 500 (1975)).
 */

/** Ground-state nuclear spins I. */
const NUCLEAR_SPINS: Readonly<Record<string, number>> = {
  '1H': 0.5,
  '2H': 1,
  '3H': 0.5,
  '12C': 0,
  '13C': 0.5,
  '14N': 1,
  '15N': 0.5,
  '16O': 0,
  '17O': 2.5,
  '18O': 0,
  '19F': 0.5,
  '32S': 0,
  '33S': 1.5,
  '34S': 0,
  '36S': 0,
};

/**
 * Where the spins come from: the ground-state J^π column of NUBASE2020 (F. G. Kondev et al., Chinese Phys. C 45,
 * 030001 (2021)), values written from memory (well-known textbook values; the table itself was not read).
 */
export const NUCLEAR_SPIN_SOURCE =
  'NUBASE2020 ground-state spins (F. G. Kondev et al., Chinese Phys. C 45, 030001 (2021)); written from memory, not read from the table';

/** Nuclear spin I of a nuclide written as mass number + symbol ("16O", "1H"), or undefined when not tabulated. */
export function nuclearSpin(nuclide: string): number | undefined {
  return NUCLEAR_SPINS[nuclide];
}

export type ExchangeStatistics =
  | { readonly kind: 'none' }
  | {
      readonly kind: 'exchange';
      /** Weight of rovibronic levels symmetric (s) under the exchange; 0 when they do not exist. */
      readonly symmetricWeight: number;
      /** Weight of antisymmetric (a) levels; 0 when they do not exist. */
      readonly antisymmetricWeight: number;
      /** 1-based indices of the modes of u symmetry (σu⁺ and πu). */
      readonly uModes: readonly number[];
    };

/**
 * Modes of u symmetry of a centrosymmetric chain: triatomic X-Y-X: ν2 (πu) and ν3 (σu⁺); tetratomic X-Y-Y-X:
 * ν3 (σu⁺) and ν5 (πu) (Herzberg's numbering, that of HITRAN for CO2 and C2H2).
 */
function uModesOf(atomCount: number): readonly number[] {
  if (atomCount === 3) return [2, 3];
  if (atomCount === 4) return [3, 5];
  throw new ScienceError('INPUT_INVALID', `no mode symmetry table for a centrosymmetric chain of ${atomCount} atoms`, {
    atoms: atomCount,
  });
}

/**
 * Exchange statistics of a chain of nuclides written along the axis (["16O", "12C", "16O"]).
 * Throws INPUT_INVALID for a centrosymmetric chain with a nuclide whose spin is not tabulated.
 */
export function exchangeStatistics(
  chain: readonly string[],
  spinOf: (nuclide: string, position: number) => number | undefined = nuclearSpin,
): ExchangeStatistics {
  const n = chain.length;
  const centrosymmetric = n >= 3 && chain.every((a, i) => a === chain[n - 1 - i]);
  if (!centrosymmetric) return { kind: 'none' };
  // Count spin functions symmetric (sym) and antisymmetric (anti) under P, pair by pair.
  let sym = 1;
  let anti = 0;
  let fermionPairs = 0;
  for (let i = 0; i < Math.floor(n / 2); i++) {
    const nuclide = chain[i] as string;
    const I = spinOf(nuclide, i);
    if (I === undefined) {
      throw new ScienceError('INPUT_INVALID', `no nuclear spin tabulated for ${nuclide}`, { nuclide });
    }
    const s = (2 * I + 1) * (I + 1);
    const a = (2 * I + 1) * I;
    [sym, anti] = [sym * s + anti * a, sym * a + anti * s];
    if (!Number.isInteger(I)) fermionPairs++;
  }
  // Total symmetry required under P: + for an even number of fermion pairs, − for odd.
  const requiredSymmetric = fermionPairs % 2 === 0;
  return {
    kind: 'exchange',
    symmetricWeight: requiredSymmetric ? sym : anti,
    antisymmetricWeight: requiredSymmetric ? anti : sym,
    uModes: uModesOf(n),
  };
}

/** Whether a vibrational level is g (even number of quanta in u modes). */
export function isGerade(level: LinearLevel, uModes: readonly number[]): boolean {
  let u = 0;
  for (const m of uModes) u += level.v[m - 1] ?? 0;
  return u % 2 === 0;
}

/** Total parity of a rotational level: e → (−1)^J, f → −(−1)^J. */
export function totalParity(J: number, parity: Parity): '+' | '-' {
  const even = J % 2 === 0;
  return (parity === 'e') === even ? '+' : '-';
}

/** s or a under the exchange of identical nuclei, for a centrosymmetric chain. */
export function exchangeSymmetry(level: LinearLevel, J: number, parity: Parity, uModes: readonly number[]): 's' | 'a' {
  const plus = totalParity(J, parity) === '+';
  return plus === isGerade(level, uModes) ? 's' : 'a';
}

/**
 * Nuclear-spin statistical weight of one rotational level (J, e/f) of a vibrational level; 0 when the level does
 * not exist (or J < l, or an f component of a Σ level). Non-centrosymmetric chains give 1.
 */
export function levelSpinWeight(stats: ExchangeStatistics, level: LinearLevel, J: number, parity: Parity): number {
  if (!Number.isInteger(J) || J < level.l) return 0;
  if (level.l === 0 && parity === 'f') return 0;
  if (stats.kind === 'none') return 1;
  return exchangeSymmetry(level, J, parity, stats.uModes) === 's' ? stats.symmetricWeight : stats.antisymmetricWeight;
}

/** Whether the rotational level exists at all. */
export function levelExists(stats: ExchangeStatistics, level: LinearLevel, J: number, parity: Parity): boolean {
  return levelSpinWeight(stats, level, J, parity) > 0;
}

/**
 * Which J occur for one parity component of a level: 'all', 'even', 'odd' or 'none'. For exchange statistics
 * with both weights non-zero every J occurs (with alternating weights).
 */
export function allowedJ(
  stats: ExchangeStatistics,
  level: LinearLevel,
  parity: Parity,
): 'all' | 'even' | 'odd' | 'none' {
  const j0 = Math.max(level.l, 2);
  const even = levelExists(stats, level, j0 % 2 === 0 ? j0 : j0 + 1, parity);
  const odd = levelExists(stats, level, j0 % 2 === 1 ? j0 : j0 + 1, parity);
  if (even && odd) return 'all';
  if (even) return 'even';
  if (odd) return 'odd';
  return 'none';
}

/**
 * Spacing, in units of J, between successive existing levels of ONE parity component of a lower level: 2 when
 * every other level is missing (a CO2 ν3 list has lines ≈ 4B apart, not 2B), else 1. With l ≥ 1 in CO2 the e and f
 * components take complementary J, so a branch through one parity steps by 2 while the two together fill every J.
 */
export function branchJStep(stats: ExchangeStatistics, lower: LinearLevel): 1 | 2 {
  const e = allowedJ(stats, lower, 'e');
  const f = lower.l >= 1 ? allowedJ(stats, lower, 'f') : 'none';
  return e === 'all' || f === 'all' ? 1 : 2;
}

/** Statistics per parsed species object (levelExists asks once per rotational level). */
const STATISTICS = new WeakMap<LinearSpecies, ExchangeStatistics>();

/**
 * The exchange statistics of a parsed species: the one rule of this module for every caller (selection rules,
 * predictions, intensities, assignment). A nuclide missing from the spin table counts as I = 0 when it is
 * even-even (species.ts#hasZeroNuclearSpin), so every chain that parses has statistics; any other untabulated
 * nuclide of a centrosymmetric chain is INPUT_INVALID.
 */
export function speciesStatistics(species: LinearSpecies): ExchangeStatistics {
  const known = STATISTICS.get(species);
  if (known) return known;
  const stats = exchangeStatistics(species.formula.split('-'), (nuclide, i) => {
    const I = nuclearSpin(nuclide);
    if (I !== undefined) return I;
    const atom = species.atoms[i];
    return atom && hasZeroNuclearSpin(atom) ? 0 : undefined;
  });
  STATISTICS.set(species, stats);
  return stats;
}

/**
 * True when half of the rotational levels are missing: exchange statistics with one weight zero (a centrosymmetric
 * chain whose exchanged nuclei all have I = 0: 12C16O2, 13C16O2, 12C18O2, 12C32S2).
 */
export function hasMissingLevels(species: LinearSpecies): boolean {
  const stats = speciesStatistics(species);
  return stats.kind === 'exchange' && (stats.symmetricWeight === 0 || stats.antisymmetricWeight === 0);
}

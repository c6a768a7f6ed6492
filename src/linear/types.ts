import { ScienceError } from '../errors.js';

/**
 * Vibrational levels of linear polyatomic molecules.
 *
 * A level is its vibrational quanta `v` in the usual mode order (triatomics: [v1, v2, v3] with v2 the doubly
 * degenerate bend; C2H2: [v1, v2, v3, v4, v5] with v4 and v5 the two bends) and the total vibrational angular
 * momentum `l` (|l|, Herzberg, Infrared and Raman Spectra, ch. II.5). The bending quanta allow l = Σv_bend,
 * Σv_bend − 2, …, 0 or 1 (one bend: l ≤ v2 with l ≡ v2 mod 2).
 */
export interface LinearLevel {
  readonly v: readonly number[];
  readonly l: number;
  /**
   * Ranking index within a Fermi polyad that shares v and l (CO2 [10⁰0, 02⁰0]: r = 1 the upper member, HITRAN
   * 10001; r = 2 the lower, 10002). Absent when the level is not part of such a polyad.
   */
  readonly r?: number;
}

/**
 * Rotationless parity label of a rotational level (Brown et al., J. Mol. Spectrosc. 55, 500 (1975)):
 * e has parity +(−1)^J, f has −(−1)^J. Σ⁺ levels (l = 0) are all e.
 */
export type Parity = 'e' | 'f';

/**
 * Constants of one vibrational level, cm⁻¹. G is the vibrational term G_v of the B[J(J+1) − l²] form (see
 * terms.ts for the whole convention); q is the full l-type doubling coefficient: E(f) − E(e) = q J(J+1) (+ q_J [J(J+1)]²).
 */
export interface LinearLevelConstants {
  readonly G: number;
  readonly B: number;
  readonly D: number;
  readonly H?: number;
  readonly q?: number;
  /** Centrifugal correction of the l-type doubling: E(f) − E(e) = q J(J+1) + q_J [J(J+1)]². */
  readonly qJ?: number;
}

/** Triatomics have 3 modes, the bend the second; C2H2-like tetratomics 5 modes, the bends the fourth and fifth. */
export function bendingModes(modeCount: number): readonly number[] {
  if (modeCount === 3) return [1];
  if (modeCount === 5) return [3, 4];
  throw new ScienceError('INPUT_INVALID', `a linear level has 3 or 5 vibrational quanta, not ${modeCount}`, {
    modes: modeCount,
  });
}

/** Stable identity of a level: quanta joined by commas, then `|l`, e.g. "0,1,0|1" (a Fermi rank adds "|r1"). */
export function levelKey(level: LinearLevel): string {
  return `${level.v.join(',')}|${level.l}${level.r !== undefined ? `|r${level.r}` : ''}`;
}

/** Inverse of levelKey (checks the level). */
export function parseLevelKey(key: string): LinearLevel {
  const m = /^(\d+(?:,\d+)*)\|(\d+)(?:\|r(\d+))?$/.exec(key);
  if (!m) throw new ScienceError('INPUT_INVALID', `not a level key: "${key}"`, { key });
  const level = {
    v: (m[1] as string).split(',').map(Number),
    l: Number(m[2]),
    ...(m[3] !== undefined ? { r: Number(m[3]) } : {}),
  };
  checkLevel(level);
  return level;
}

/** The values of l that the bending quanta allow, descending (Σv_bend, Σv_bend − 2, …). */
export function allowedL(v: readonly number[]): readonly number[] {
  const bend = bendingModes(v.length).reduce((s, i) => s + (v[i] ?? 0), 0);
  const out: number[] = [];
  for (let l = bend; l >= 0; l -= 2) out.push(l);
  return out;
}

/**
 * Throws INPUT_INVALID unless the level is possible: 3 or 5 non-negative integer quanta and an l the bends allow.
 * For C2H2 (two bends) l is the total |l4 ± l5|, which takes the same values as for one bend of v4 + v5 quanta.
 */
export function checkLevel(level: LinearLevel): void {
  const { v, l } = level;
  bendingModes(v.length);
  for (const q of v) {
    if (!Number.isInteger(q) || q < 0 || q > 100) {
      throw new ScienceError('INPUT_INVALID', `vibrational quanta must be integers 0..100, got [${v.join(', ')}]`, {
        v,
      });
    }
  }
  if (!Number.isInteger(l) || l < 0) {
    throw new ScienceError('INPUT_INVALID', `l must be a non-negative integer, got ${l}`, { v, l });
  }
  if (level.r !== undefined && !(Number.isInteger(level.r) && level.r >= 1 && level.r <= 9)) {
    throw new ScienceError('INPUT_INVALID', `the Fermi rank r must be an integer 1..9, got ${level.r}`, {
      v,
      l,
      r: level.r,
    });
  }
  const allowed = allowedL(v);
  if (!allowed.includes(l)) {
    throw new ScienceError(
      'INPUT_INVALID',
      `l = ${l} is not possible in level [${v.join(', ')}]: the bending quanta allow l = ${allowed.join(', ')}`,
      { v, l, allowed },
    );
  }
}

/** Parity components a level has: Σ (l = 0) levels only e (Σ⁺ assumed), l ≥ 1 both. */
export function parityComponents(l: number): readonly Parity[] {
  return l === 0 ? ['e'] : ['e', 'f'];
}

const SUPERSCRIPT = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
function superscript(n: number): string {
  return String(n)
    .split('')
    .map((d) => SUPERSCRIPT[Number(d)])
    .join('');
}

/**
 * The level in the trade's notation: v1 v2^l v3 for triatomics ("01¹0", "00⁰1"; quanta above 9 in parentheses),
 * v1 v2 v3 v4 v5 with the total l as superscript after the bends for C2H2 ("00100⁰", "00011²"); a Fermi rank as a
 * Roman subscript-style suffix after an underscore ("10⁰0_I" for the upper member of CO2's [10⁰0, 02⁰0] dyad).
 */
export function levelLabel(level: LinearLevel): string {
  const q = (n: number): string => (n > 9 ? `(${n})` : String(n));
  const v = level.v;
  const rank = level.r !== undefined ? `_${ROMAN[level.r] ?? level.r}` : '';
  if (v.length === 3) {
    return `${q(v[0] as number)}${q(v[1] as number)}${superscript(level.l)}${q(v[2] as number)}${rank}`;
  }
  return `${v.map(q).join('')}${superscript(level.l)}${rank}`;
}
const ROMAN = ['', 'I', 'II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII', 'IX'];

/** Band label upper–lower in the trade's notation, e.g. "00⁰1–00⁰0". */
export function bandLabel(upper: LinearLevel, lower: LinearLevel): string {
  return `${levelLabel(upper)}–${levelLabel(lower)}`;
}

import { describe, expect, it } from 'vitest';
import type { ScienceError } from '../../src/errors.js';
import { tokenizeAsdf } from '../../src/spectra/jcamp.js';

// The ASCII squeezed difference form of JCAMP-DX (McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988), Table I): SQZ
// letters @ A–I (0…9) and a–i (−1…−9) replace the first digit and carry the sign of an absolute value, DIF letters
// % J–R (0…9) and j–r (−1…−9) start a difference, DUP letters S–Z and s (1…9) give a repeat count. The tokens of
// each line below are decoded by hand from that table.
const caught = (f: () => unknown): ScienceError => {
  try {
    f();
  } catch (e) {
    return e as ScienceError;
  }
  throw new Error('expected a ScienceError');
};
const tok = (s: string) => tokenizeAsdf(s, 7);

describe('ASDF tokens decoded by hand (JCAMP-DX Table I)', () => {
  it('SQZ: every letter is its digit, with the sign of the value', () => {
    expect(tok('@ A B C D E F G H I')).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9].map((value) => ({ kind: 'abs', value })));
    expect(tok('a b c d e f g h i')).toEqual(
      [-1, -2, -3, -4, -5, -6, -7, -8, -9].map((value) => ({ kind: 'abs', value })),
    );
    // "A12" = 112, "j05" = −105 as a difference, "B.5" = 2.5, "@7" = 7.
    expect(tok('A12j05B.5@7')).toEqual([
      { kind: 'abs', value: 112 },
      { kind: 'dif', value: -105 },
      { kind: 'abs', value: 2.5 },
      { kind: 'abs', value: 7 },
    ]);
  });

  it('DIF and DUP letters', () => {
    expect(tok('%JKLMNOPQR')).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9].map((value) => ({ kind: 'dif', value })));
    expect(tok('jklmnopqr')).toEqual([-1, -2, -3, -4, -5, -6, -7, -8, -9].map((value) => ({ kind: 'dif', value })));
    expect(tok('STUVWXYZs')).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9].map((value) => ({ kind: 'dup', value })));
    // A repeat count of more than one digit: "S0" = 10; a DUP never carries a sign.
    expect(tok('A S0')).toEqual([
      { kind: 'abs', value: 1 },
      { kind: 'dup', value: 10 },
    ]);
  });

  it('AFFN and PAC: signs, decimals and separators; exponents only in plain AFFN', () => {
    expect(tok('4000.5 -12 +7,8;9\t1.25e3 2E-2 3e+1')).toEqual(
      [4000.5, -12, 7, 8, 9, 1250, 0.02, 30].map((value) => ({ kind: 'abs', value })),
    );
    // PAC: a sign starts the next value without a space.
    expect(tok('100-5+20')).toEqual([100, -5, 20].map((value) => ({ kind: 'abs', value })));
    // In a compressed line, E and e are the SQZ digits 5 and −5, not exponents.
    expect(tok('A1E2')).toEqual([
      { kind: 'abs', value: 11 },
      { kind: 'abs', value: 52 },
    ]);
    expect(tok('1e5J')).toEqual([
      { kind: 'abs', value: 1 },
      { kind: 'abs', value: -55 },
      { kind: 'dif', value: 1 },
    ]);
    // An exponent must end the number: in "1e2.5" the e is the SQZ digit −5 again, giving 1 and −52.5.
    expect(tok('1e2.5')).toEqual([
      { kind: 'abs', value: 1 },
      { kind: 'abs', value: -52.5 },
    ]);
    expect(tok('2e1234')).toEqual([
      { kind: 'abs', value: 2 },
      { kind: 'abs', value: -51234 },
    ]);
  });

  it('"?" is a missing value, "$$" starts a comment; anything else is refused with its line', () => {
    const missing = tok('1 ? 3');
    expect(missing).toHaveLength(3);
    expect(missing[1]?.kind).toBe('abs');
    expect(missing[1]?.value).toBeNaN();
    expect(tok('1 2 $$ 3 4 A')).toEqual([1, 2].map((value) => ({ kind: 'abs', value })));
    // A lone "$" is not a comment.
    const dollar = caught(() => tok('1 $ 2'));
    expect(dollar.message).toBe('JCAMP-DX line 7: unexpected character "$" in the data');
    expect(dollar.code).toBe('INPUT_INVALID');
    expect(dollar.details).toEqual({ line: 7 });
    expect(caught(() => tok('1 # 2')).message).toBe('JCAMP-DX line 7: unexpected character "#" in the data');
    expect(caught(() => tok('1 - 2')).message).toBe('JCAMP-DX line 7: a number was expected');
    expect(caught(() => tok('1 . 2')).message).toBe('JCAMP-DX line 7: a number was expected');
    expect(caught(() => tok('1 1.2.3')).message).toBe('JCAMP-DX line 7: "1.2.3" is not a number');
    expect(tok('')).toEqual([]);
    expect(tok('  ,; ')).toEqual([]);
  });
});

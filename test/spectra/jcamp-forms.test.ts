import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { type JcampData, type JcampLimits, parseJcamp, tokenizeAsdf } from '../../src/spectra/jcamp.js';
import { type JcampForm, writeJcamp } from '../helpers/jcamp-writer.js';

/**
 * The JCAMP-DX reader (McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988)) on small files written out here: every
 * expected value is decoded by hand from the standard's ASDF table (SQZ @ A–I / a–i, DIF % J–R / j–r, DUP S–Z s),
 * and the round trips go through the test's own writer (test/helpers/jcamp-writer.ts), never through a fit.
 * Refusals are API: the code (INPUT_INVALID), the exact message and the line it names are asserted.
 */

function refusal(text: string, limits?: JcampLimits): ScienceError {
  try {
    parseJcamp(text, limits);
  } catch (e) {
    if (e instanceof ScienceError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}
function expectRefusal(text: string, line: number, message: string, limits?: JcampLimits) {
  const e = refusal(text, limits);
  expect(e.code).toBe('INPUT_INVALID');
  expect(e.message).toBe(`JCAMP-DX line ${line}: ${message}`);
  // A bad value also names its column, so that the service answers it as a bad value (400), not a bad file.
  const column = /^([XY]) value /.exec(message)?.[1];
  expect(e.details).toEqual(column ? { line, column, file: 'JCAMP-DX' } : { line });
}
function spectrum(d: JcampData) {
  if (d.kind !== 'spectrum') throw new Error(`read as ${d.kind}`);
  return d;
}
function peaks(d: JcampData) {
  if (d.kind !== 'peaks') throw new Error(`read as ${d.kind}`);
  return d;
}

/**
 * An (X++(Y..Y)) file: ##TITLE= is line 1, ##JCAMP-DX= 2, ##FIRSTX= 3, ##LASTX= 4, ##NPOINTS= 5, then `extra` lines,
 * ##XYDATA= and the body (the first body line is line 7 without extra lines).
 */
function xyData(firstX: number | string, lastX: number | string, nPoints: number | string, body: string[], extra = '') {
  return [
    '##TITLE=t',
    '##JCAMP-DX=4.24',
    `##FIRSTX=${firstX}`,
    `##LASTX=${lastX}`,
    `##NPOINTS=${nPoints}`,
    ...(extra ? [extra] : []),
    '##XYDATA=(X++(Y..Y))',
    ...body,
    '##END=',
  ].join('\n');
}
const ys = (text: string, limits?: JcampLimits) => Array.from(spectrum(parseJcamp(text, limits)).y);

describe('ASDF decoding written out by hand', () => {
  it('AFFN: exponents of up to three digits belong to the number; zero and a trailing comment are read', () => {
    // 1.5E-12, 2.5e+03 = 2500, 4E1 = 40, 0; the comment's capital letters must not make the line "compressed".
    expect(ys(xyData(10, 13, 4, ['10 1.5E-12 2.5e+03 4E1 0 $$ Bad comment']))).toEqual([1.5e-12, 2500, 40, 0]);
    expect(tokenizeAsdf('10 1E2 $$ Bcomment', 1)).toEqual([
      { kind: 'abs', value: 10 },
      { kind: 'abs', value: 100 },
    ]);
    // A four-digit "exponent" is no exponent: E starts the SQZ value 51234.
    expect(tokenizeAsdf('1 1E1234 2E2', 1).map((t) => t.value)).toEqual([1, 1, 51234, 200]);
  });

  it('E and e are SQZ digits wherever the line is compressed or the E leads a value', () => {
    // "E1" = 51, "e2" = −52: no other SQZ letter on the line, but a leading E is a digit, not an exponent.
    expect(tokenizeAsdf('1 E1e2', 3)).toEqual([
      { kind: 'abs', value: 1 },
      { kind: 'abs', value: 51 },
      { kind: 'abs', value: -52 },
    ]);
    // "A" makes the line compressed, so "2e3" is 2 followed by e3 = −53, then A = 1.
    expect(tokenizeAsdf('1 2e3A', 3).map((t) => t.value)).toEqual([1, 2, -53, 1]);
  });

  it('DUP: a count of 1 repeats nothing; a count that fills the line exactly is accepted', () => {
    expect(ys(xyData(1, 2, 2, ['1 5 S 6']))).toEqual([5, 6]);
    // "5V": 5 then three repeats (V = 4 in all).
    expect(ys(xyData(1, 4, 4, ['1 5V']))).toEqual([5, 5, 5, 5]);
    // A line holding only its X adds nothing.
    expect(ys(xyData(1, 2, 2, ['1 7 8', '3']))).toEqual([7, 8]);
    // Blank lines and lines of comment only are skipped.
    expect(ys(xyData(1, 2, 2, ['1 7', '   ', '$$ note', '2 8']))).toEqual([7, 8]);
  });

  it('refuses broken ASDF with the line and what is wrong', () => {
    expectRefusal(
      xyData(1, 4, 4, ['1 5W']),
      7,
      'DUP count 5 gives more Y values than ##NPOINTS= leaves for this line (4)',
    );
    expectRefusal(xyData(1, 4, 4, ['1 S2']), 7, 'a DUP count with nothing to repeat');
    expectRefusal(xyData(1, 4, 4, ['1 5 S.5']), 7, 'DUP count 1.5 is not a whole number ≥ 1');
    expectRefusal(xyData(1, 4, 4, ['1 1 2 3 4 5']), 7, 'more Y values than ##NPOINTS= leaves for this line (4)');
    // On a later line the budget is what the lines before left: 4 − 2 = 2.
    expectRefusal(xyData(1, 4, 4, ['1 1 2', '3 3 4 5']), 8, 'more Y values than ##NPOINTS= leaves for this line (2)');
    expectRefusal(xyData(1, 4, 4, ['1 J']), 7, 'a DIF value with no value before it');
    expectRefusal(xyData(1, 4, 4, ['1 2 ! 3']), 7, 'unexpected character "!" in the data');
    expectRefusal(xyData(1, 4, 4, ['1 2 3 ##END']), 7, 'unexpected character "#" in the data');
    // A lone "$" is no comment.
    expectRefusal(xyData(1, 4, 4, ['1 2 $ 3']), 7, 'unexpected character "$" in the data');
    expectRefusal(xyData(1, 4, 4, ['J1 2']), 7, 'a data line must start with its X value');
    expectRefusal(xyData(1, 4, 4, [',']), 7, 'a data line must start with its X value');
    // Lines 7 and 8; ##END= is line 9 and the count is checked at the last data line.
    expectRefusal(xyData(1, 5, 5, ['1 1 2', '3 3 4']), 8, '4 Y values read, ##NPOINTS= says 5');
  });

  it('DIF: the Y-value check repeats the last Y; a failed or missing check is refused', () => {
    // A=1, J → 2, J → 3; the next line repeats 3 (C), then J → 4, K → 6.
    expect(ys(xyData(1, 5, 5, ['1 AJJ', '3 CJK']))).toEqual([1, 2, 3, 4, 6]);
    expectRefusal(
      xyData(1, 6, 6, ['1 A J J', '3 D J J']),
      8,
      'DIF Y-value check failed: the line starts with 4 but the line before ended with 3',
    );
    expectRefusal(
      xyData(1, 3, 3, ['1 A J J', '3']),
      8,
      'DIF Y-value check failed: the line starts with undefined but the line before ended with 3',
    );
    // At 0 the check allows 1e-9 absolute, boundary included: A j = 1, 0; the next line repeats 0 as 1e-9.
    expect(ys(xyData(1, 3, 3, ['1 Aj', '2 @.000000001J']))).toEqual([1, 0, 1.000000001]);
    // The check is relative, 1e-9: at 3·10⁹ a check value off by 1 is the same value.
    expect(ys(xyData(1, 3, 3, ['1 C000000000J', '2 C000000002J']))).toEqual([3e9, 3000000001, 3000000003]);
  });
});

describe('the X that starts each line is checked against the grid', () => {
  // FIRSTX 10, LASTX 10.09, 10 points: step 0.01; the second line starts at point 6, X = 10.05. The check allows
  // half a step plus one unit of the last digit written.
  const grid = (secondX: string) => xyData(10, 10.09, 10, ['10.00 1 2 3 4 5', `${secondX} 6 7 8 9 10`]);

  it('accepts X truncated to the digits written, refuses it when the digits say it is wrong', () => {
    expect(ys(grid('10'))).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]); // 0.05 off, allowed 0.005 + 1
    expect(ys(grid('10.0'))).toHaveLength(10); // 0.05 off, allowed 0.005 + 0.1
    expect(ys(grid('10.04'))).toHaveLength(10); // 0.01 off, allowed 0.015
    expect(ys(grid(' 10.04'))).toHaveLength(10);
    expectRefusal(grid('10.00'), 8, 'X = 10 does not continue the data (expected 10.05000000 for point 6)');
    expectRefusal(grid('+10.00'), 8, 'X = 10 does not continue the data (expected 10.05000000 for point 6)');
    expectRefusal(grid('10.07'), 8, 'X = 10.07 does not continue the data (expected 10.05000000 for point 6)');
  });

  it('with XFACTOR the last written digit is worth XFACTOR', () => {
    // X written as integers × 0.01: one unit = 0.01, so 1007 (= 10.07, 0.02 off) exceeds 0.005 + 0.01.
    const f = (x: string) => xyData(10, 10.09, 10, ['1000 1 2 3 4 5', `${x} 6 7 8 9 10`], '##XFACTOR=0.01');
    expect(ys(f('1005'))).toHaveLength(10);
    expect(ys(f('1006'))).toHaveLength(10);
    expectRefusal(f('1007'), 9, 'X = 10.07 does not continue the data (expected 10.05000000 for point 6)');
    expect(Array.from(spectrum(parseJcamp(f('1005'))).x)[9]).toBeCloseTo(10.09, 12);
  });

  it('X exactly at the tolerance passes; at 10⁹ (X in Hz) the check allows 1e-9 of X for rounding', () => {
    // Step 2, second line at point 2 (expected X 0): written 2, off by exactly 1 + 1 (half a step + one unit).
    expect(ys(xyData(-2, 2, 3, ['-2 1', '2 2 3']))).toEqual([1, 2, 3]);
    expectRefusal(
      xyData(-2, 2, 3, ['-2 1', '3 2 3']),
      8,
      'X = 3 does not continue the data (expected 0.000000000 for point 2)',
    );
    // Step 1 at 10⁹: expected 1000000002, written 1000000004: 2 off, allowed 0.5 + 1 + 1.000000002.
    expect(ys(xyData(1e9, 1000000003, 4, ['1000000000 1 2', '1000000004 3 4']))).toEqual([1, 2, 3, 4]);
    expectRefusal(
      xyData(1e9, 1000000003, 4, ['1000000000 1 2', '1000000005 3 4']),
      8,
      'X = 1000000005 does not continue the data (expected 1000000002 for point 3)',
    );
  });
});

describe('labels and the header', () => {
  it('title and units trimmed, comments dropped, loose spellings, indented labels, first of duplicates', () => {
    const text = [
      '##TITLE=  CO band  $$ a comment',
      '##TITLE=second',
      '  ##X_UNITS= MICROMETERS ',
      'see also ##YUNITS=TRANSMITTANCE',
      '##y units=ABSORBANCE',
      '##FIRSTX=1',
      '##LASTX=2',
      '##N Points=2',
      '##XYDATA= ( X++(Y..Y) )',
      '1 7 8',
    ].join('\n'); // no ##END at all
    const d = spectrum(parseJcamp(text));
    expect(d.title).toBe('CO band');
    expect(d.xUnits).toBe('MICROMETERS');
    expect(spectrum(parseJcamp(text.replace('##y units=ABSORBANCE', '##YUNITS=TRANSMITTANCE'))).yUnits).toBe(
      'TRANSMITTANCE',
    );
    expect(d.yUnits).toBe('ABSORBANCE');
    expect(Array.from(d.y)).toEqual([7, 8]);
    expect(d.labels.get('NPOINTS')).toBe('2');
  });

  it('without unit labels: 1/CM and ABSORBANCE; the form may lack its last parenthesis', () => {
    const d = spectrum(parseJcamp('##TITLE=\n##FIRSTX=1\n##LASTX=2\n##NPOINTS=2\n##XYDATA=(X++(Y..Y)\n1 7 8\n##END='));
    expect([d.title, d.xUnits, d.yUnits]).toEqual(['', '1/CM', 'ABSORBANCE']);
  });

  it('a label after the data block ends it; nothing after ##END is read, however ##END is written', () => {
    const d = spectrum(parseJcamp(xyData(1, 2, 2, ['1 7 8', '##$NOTE=after the data'])));
    expect(Array.from(d.y)).toEqual([7, 8]);
    expect(d.labels.get('$NOTE')).toBe('after the data');
    for (const end of ['##END=', '##END', '  ##END', '## END', '##END  ', '##end=']) {
      const t = `##TITLE=t\n##FIRSTX=1\n##LASTX=2\n##NPOINTS=2\n##XYDATA=(X++(Y..Y))\n1 7 8\n${end}\n##ORIGIN=after the end\n2 9`;
      const s = spectrum(parseJcamp(t));
      expect(Array.from(s.y), end).toEqual([7, 8]);
      expect(s.labels.has('ORIGIN'), end).toBe(false);
    }
    // A bare "##ENDNOTE" is no end.
    const t2 = '##TITLE=t\n##ENDNOTE\n##FIRSTX=1\n##LASTX=2\n##NPOINTS=2\n##XYDATA=(X++(Y..Y))\n1 7 8\n##END=';
    expect(ys(t2)).toEqual([7, 8]);
  });

  it('a second data block is not read', () => {
    const t = '##TITLE=t\n##XYPOINTS=(XY..XY)\n1,2\n##PEAK TABLE=(XY..XY)\n5,6\n7,8\n##END=';
    const d = spectrum(parseJcamp(t));
    expect(Array.from(d.x)).toEqual([1]);
  });

  it('refuses a missing title or data block, unsupported forms and bad numeric labels', () => {
    expectRefusal('##XYDATA=(X++(Y..Y))\n1 2 3\n##END=', 1, 'the file does not start with ##TITLE= (is it JCAMP-DX?)');
    expectRefusal('##TITLE=t\n##END=', 2, 'no ##XYDATA=, ##XYPOINTS= or ##PEAK TABLE= block');
    const form = (f: string) => `##TITLE=t\n##FIRSTX=1\n##LASTX=2\n##NPOINTS=2\n##XYDATA=${f}\n1 7 8\n##END=`;
    expectRefusal(form('(XY..XY)'), 5, '##XYDATA=(XY..XY) is not supported (only (X++(Y..Y)))');
    expectRefusal(form('Y(X++(Y..Y))'), 5, '##XYDATA=Y(X++(Y..Y)) is not supported (only (X++(Y..Y)))');
    expectRefusal(form('(X++(Y..Y))Y'), 5, '##XYDATA=(X++(Y..Y))Y is not supported (only (X++(Y..Y)))');
    expectRefusal(xyData('', 2, 2, ['1 7 8']), 1, '##FIRSTX= is required');
    expectRefusal(xyData(1, 2, 2, ['1 7 8']).replace('##LASTX=2\n', ''), 1, '##LASTX= is required');
    expectRefusal(xyData('abc', 2, 2, ['1 7 8']), 1, '##FIRSTX=abc is not a number');
    expectRefusal(xyData(1, 2, 2.5, ['1 7 8']), 1, '##NPOINTS=2.5 must be a whole number ≥ 2');
    expectRefusal(xyData(1, 2, 1, ['1 7']), 1, '##NPOINTS=1 must be a whole number ≥ 2');
    expectRefusal(xyData(1, 2, 'x', ['1 7']), 1, '##NPOINTS=x is not a number');
    expectRefusal(xyData(1, 3, 3, ['1 7 8 9']), 1, '##NPOINTS=3 is more than the 2 points accepted', { maxPoints: 2 });
    expect(ys(xyData(1, 3, 3, ['1 7 8 9']), { maxPoints: 3 })).toEqual([7, 8, 9]);
    // A peak limit does not bound a spectrum.
    expect(ys(xyData(1, 3, 3, ['1 7 8 9']), { maxPeaks: 1 })).toEqual([7, 8, 9]);
  });
});

describe('##XYPOINTS= and ##PEAK TABLE=', () => {
  it('XYPOINTS: factors applied, commas with or without spaces, semicolons, blank lines', () => {
    const t =
      '##TITLE=pts\n##XFACTOR=2\n##YFACTOR=0.001\n##XYPOINTS=(XY..XY)\n1000, 500; 1000.5 ,250\n\n1001,125;\n1002\n##END=';
    const d = spectrum(parseJcamp(t));
    expect(Array.from(d.x)).toEqual([2000, 2001, 2002, 2004]);
    expect(Array.from(d.y)).toEqual([0.5, 0.25, 0.125, Number.NaN]);
    expect([d.title, d.xUnits, d.yUnits]).toEqual(['pts', '1/CM', 'ABSORBANCE']);
  });

  it('PEAK TABLE: pairs by spaces, by semicolons, "?" or no Y, comments, (XYW..XYW) triples', () => {
    const t =
      '##TITLE=pk\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##YFACTOR=2\n##PEAK TABLE=(XY..XY)\n2143.27 0.5; 2147.08 0.4 $$ R(1)\n2139.43 ?\n2150.1\n2160.2 0.1;\n100 1 0.5; 200 2 0.6\n##END=';
    expect(peaks(parseJcamp(t)).peaks).toEqual([
      { x: 2143.27, y: 1 },
      { x: 2147.08, y: 0.8 },
      { x: 2139.43 },
      { x: 2150.1 },
      { x: 2160.2, y: 0.2 },
      { x: 100, y: 2 },
      { x: 200, y: 4 },
    ]);
    // Values separated by runs of spaces, a comment after them.
    const sp = peaks(parseJcamp('##TITLE=s\n##PEAK TABLE=(XY..XY)\n2143.27   0.5  2147.08 0.4 $$ two lines\n##END='));
    expect(sp.peaks).toEqual([
      { x: 2143.27, y: 0.5 },
      { x: 2147.08, y: 0.4 },
    ]);
    const w = peaks(parseJcamp('##TITLE=w\n##PEAK TABLE=(XYW..XYW)\n2143.27 0.5 0.1 2147.08 0.4 0.1\n##END='));
    expect(w.peaks).toEqual([
      { x: 2143.27, y: 0.5 },
      { x: 2147.08, y: 0.4 },
    ]);
  });

  it('refuses odd space-separated values, non-numbers, an empty block, and more pairs than allowed', () => {
    const pk = (body: string) => `##TITLE=t\n##PEAK TABLE=(XY..XY)\n${body}\n##END=`;
    expectRefusal(
      pk('2143.27 0.5\n2143.27 0.5 2147.08'),
      4,
      '3 values cannot be read as 2-value tuples separated by spaces',
    );
    expectRefusal(pk('abc,1'), 3, 'X value "abc" is not a finite number');
    expectRefusal(pk('2143.27,abc'), 3, 'Y value "abc" is not a finite number');
    expectRefusal(pk(''), 2, 'the data block is empty');
    expectRefusal(pk('1,1\n2,2\n3,3'), 5, 'more than 2 peaks', { maxPeaks: 2 });
    expectRefusal(pk('1,1\n2,2\n3,3'), 5, 'more than 2 peaks', { maxPoints: 2 });
    expect(peaks(parseJcamp(pk('1,1\n2,2\n3,3'), { maxPeaks: 3, maxPoints: 1 })).peaks).toHaveLength(3);
    const pts = '##TITLE=t\n##XYPOINTS=(XY..XY)\n1,1\n2,2\n3,3\n##END=';
    // A peak limit does not bound ##XYPOINTS=.
    expect(spectrum(parseJcamp(pts, { maxPeaks: 1, maxPoints: 3 })).x).toHaveLength(3);
    expectRefusal(pts, 5, 'more than 2 points', { maxPoints: 2 });
    expect(spectrum(parseJcamp(pts, { maxPoints: 3 })).x).toHaveLength(3);
  });
});

describe('round trips through the test writer (no fit)', () => {
  // 40 points at 0.05 cm⁻¹ from 2040: a Lorentzian line of height 0.3 on a flat run (repeated values for DUP) and
  // negative values (signed SQZ and DIF letters), quantised to YFACTOR 1e-4.
  const x = Float64Array.from({ length: 40 }, (_, k) => 2040 + 0.05 * k);
  const y = Float64Array.from(x, (v, k) => (k < 8 ? 0.0123 : 0.3 / (1 + ((v - 2041.2) / 0.1) ** 2) - 0.05));
  const quantum = 1e-4;
  const forms: JcampForm[] = ['AFFN', 'PAC', 'SQZ', 'DIF', 'DIFDUP'];

  it.each(forms)('%s, increasing X: every Y to the quantum, X on the grid', (form) => {
    const d = spectrum(parseJcamp(writeJcamp(x, y, form, { yFactor: quantum, perLine: 7 })));
    expect(d.x).toHaveLength(40);
    for (let i = 0; i < 40; i++) {
      // Exact apart from the product integer × 1e-4 (tolerance 1e-12).
      expect(Math.abs((d.y[i] as number) - Math.round((y[i] as number) / quantum) * quantum)).toBeLessThan(1e-12);
      expect(Math.abs((d.x[i] as number) - (x[i] as number))).toBeLessThan(1e-9);
    }
  });

  it.each(forms)('%s, decreasing X with XFACTOR 0.01', (form) => {
    const xr = Float64Array.from(x).reverse();
    const yr = Float64Array.from(y).reverse();
    const d = spectrum(parseJcamp(writeJcamp(xr, yr, form, { yFactor: quantum, xFactor: 0.01, perLine: 6 })));
    for (let i = 0; i < 40; i++) {
      expect(Math.abs((d.y[i] as number) - Math.round((yr[i] as number) / quantum) * quantum)).toBeLessThan(1e-12);
      expect(Math.abs((d.x[i] as number) - (xr[i] as number))).toBeLessThan(1e-9);
    }
  });
});

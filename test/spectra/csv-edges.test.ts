import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { type CsvData, type CsvLimits, parseCsv } from '../../src/spectra/csv.js';

/**
 * Edges of the CSV reader: header names, delimiters, row limits, and refusals with their exact code, message and
 * details (API). Every expected value is written out from the text given.
 */
function refusal(text: string, limits?: CsvLimits) {
  try {
    parseCsv(text, limits);
  } catch (e) {
    if (e instanceof ScienceError) return { code: e.code, message: e.message, details: e.details };
    throw e;
  }
  throw new Error('expected a refusal');
}
const lines = (d: CsvData) => {
  if (d.kind !== 'lines') throw new Error(`read as ${d.kind}`);
  return d;
};
/** 25 positions 0.5 apart from 2000: evenly spaced, as a spectrum's x would be. */
const comb = Array.from({ length: 25 }, (_, i) => 2000 + 0.5 * i);

describe('what makes a line list', () => {
  it('evenly spaced single values are a line list, with or without a trailing comma', () => {
    expect(lines(parseCsv(comb.join('\n'))).lines).toHaveLength(25);
    const d = lines(parseCsv(comb.map((v) => `${v},`).join('\n')));
    expect(d.lines).toHaveLength(25);
    expect(d.lines[24]).toStrictEqual({ position: 2012 });
  });

  it('a header naming a line-list column makes a line list even of evenly spaced positions', () => {
    const d = lines(parseCsv(`position,intensity,remark\n${comb.map((v) => `${v},1,x`).join('\n')}`));
    expect(d.lines[0]).toStrictEqual({ position: 2000, intensity: 1 });
  });

  it('steps of 19 and 21 (exactly 5 % off their mean 20) still count as evenly spaced: a spectrum', () => {
    const x = Array.from({ length: 21 }, (_, i) => 20 * i - (i % 2));
    const d = parseCsv(x.map((v) => `${v},0.1`).join('\n'));
    expect(d.kind).toBe('spectrum');
  });

  it('unknown, absorbance and transmittance columns of a line list are skipped however many', () => {
    const d = lines(parseCsv('position,intensity,note,comment,abs,signal,transmission,%T\n2143.27,1,a,b,1,2,3,4\n'));
    expect(d.lines).toStrictEqual([{ position: 2143.27, intensity: 1 }]);
  });

  it('header names with dots, underscores or dashes, and a unit in brackets', () => {
    const d = lines(parseCsv('Line_Centre [MHz],std.dev,Integrated-Intensity\n115271.2018,0.0005,3\n'));
    // "std.dev" is a synonym of uncertainty (before 2026-12-04 it was left out, and the line fitted without its σ).
    expect(d).toStrictEqual({
      kind: 'lines',
      lines: [{ position: 115271.2018, uncertainty: 0.0005, intensity: 3 }],
      unit: 'MHz',
    });
  });

  it('spaces after the delimiter do not reach the band and branch', () => {
    const d = lines(parseCsv('position, j, band, branch\n2147.0807, 0, 1-0, R\n2139.4264, 1, 1-0, P\n'));
    expect(d.lines[1]).toStrictEqual({ position: 2139.4264, assignment: { band: '1-0', branch: 'P', j: 1 } });
  });

  it('an empty unit in brackets or spaces in the units row is no unit', () => {
    expect(lines(parseCsv('position (  ),intensity\n2143.27,1\n')).unit).toBeUndefined();
  });
});

describe('decimal commas and delimiters', () => {
  it('with ";" a decimal comma, also with an exponent of one or two digits', () => {
    const d = lines(parseCsv('position;intensity\n2143,27;2,5e-3\n2147,08;1,25E-12\n'));
    expect(d.lines).toStrictEqual([
      { position: 2143.27, intensity: 0.0025 },
      { position: 2147.08, intensity: 1.25e-12 },
    ]);
  });

  it('a comma-separated file has no decimal commas, even quoted', () => {
    expect(refusal('position,intensity\n"2143,27",0.5\n')).toStrictEqual({
      code: 'INPUT_INVALID',
      message: 'CSV line 2: position "2143,27" is not a number',
      details: { line: 2, column: 'position' },
    });
  });

  it('indented comment lines are comments', () => {
    const d = lines(parseCsv('position (cm-1)\n   # measured 2026\n2143.27\n  #end\n'));
    expect(d).toStrictEqual({ kind: 'lines', lines: [{ position: 2143.27 }], unit: 'cm-1' });
  });
});

describe('refusals name the line and what is wrong', () => {
  it('an empty x or y cell of a spectrum, and a long row cut at 60 characters', () => {
    const head = 'wavenumber,absorbance\n';
    expect(refusal(`${head}2000,0.1\n,0.5\n`)).toStrictEqual({
      code: 'INPUT_INVALID',
      message: 'CSV line 3: ",0.5" is not a row of numbers',
      details: { line: 3 },
    });
    const long = `2000,${'9'.repeat(70)}x`;
    expect(refusal(`${head}${long}\n`).message).toBe(`CSV line 2: "${long.slice(0, 60)}" is not a row of numbers`);
  });

  it('a non-number cut at 30 characters', () => {
    const cell = `${'1'.repeat(40)}x`;
    expect(refusal(`position,intensity\n${cell},1\n`).message).toBe(
      `CSV line 2: position "${'1'.repeat(30)}" is not a number`,
    );
  });

  it('text after the numbers, or a third row of text before them, is a row that is not a number', () => {
    expect(refusal('2143.27\n2147.08\nend\n')).toStrictEqual({
      code: 'INPUT_INVALID',
      message: 'CSV line 3: position "end" is not a number',
      details: { line: 3, column: 'position' },
    });
    expect(refusal('position\ncm-1\nremark\n2143.27\n').message).toBe('CSV line 3: position "remark" is not a number');
  });

  it('a header with no position column, an empty header row, two columns of one name after a comment', () => {
    expect(refusal('intensity,uncertainty\n0.5,0.001\n')).toStrictEqual({
      code: 'INPUT_INVALID',
      message: 'the CSV header names no position column (position, line, peak, …)',
      details: { header: ['intensity', 'uncertainty'] },
    });
    expect(refusal(';;\n2143,27\n').details).toStrictEqual({ header: [null] });
    expect(refusal('# exported\nposition,line\n2143.27,2147.08\n')).toStrictEqual({
      code: 'INPUT_INVALID',
      message: 'CSV line 2: two columns are named as "position"',
      details: { line: 2 },
    });
  });

  it('nothing but text: what was read is named', () => {
    expect(refusal('a,b\nc,d\n')).toStrictEqual({
      code: 'INPUT_INVALID',
      message: 'the CSV holds no rows of numbers (header a, b; the row under it, c, d, was read as its units)',
      details: {},
    });
  });

  it('an assignment needs band, branch and j; a row fills all three or none', () => {
    const need = {
      code: 'INPUT_INVALID',
      message: 'an assignment needs all three columns: band, branch and j',
      details: {},
    };
    for (const h of ['band', 'branch', 'j', 'band,branch', 'band,j', 'branch,j'])
      expect(
        refusal(
          `position,${h}\n2143.27,${h
            .split(',')
            .map(() => '0')
            .join(',')}\n`,
        ),
        h,
      ).toStrictEqual(need);
    const head = 'position,band,branch,j\n';
    expect(refusal(`${head}2143.27,1-0,,\n`).message).toBe('CSV line 2: branch "" is not P, Q or R');
    expect(refusal(`${head}2143.27,,,3\n`).message).toBe('CSV line 2: band "" is not "v\'-v\'\'" (e.g. 1-0)');
    expect(refusal(`${head}2143.27,,R,\n`).message).toBe('CSV line 2: band "" is not "v\'-v\'\'" (e.g. 1-0)');
    expect(lines(parseCsv(`${head}2143.27,,,\n2147.08,1-0,R,0\n`)).lines).toStrictEqual([
      { position: 2143.27 },
      { position: 2147.08, assignment: { band: '1-0', branch: 'R', j: 0 } },
    ]);
  });
});

describe('row limits', () => {
  it('a header naming any line-list column takes the line limit', () => {
    for (const name of ['position', 'uncertainty', 'intensity', 'band', 'branch', 'j']) {
      expect(refusal(`${name}\n1\n2\n3\n`, { maxRows: 10, maxLines: 2 }), name).toStrictEqual({
        code: 'INPUT_INVALID',
        message: 'CSV line 4: more than 2 rows',
        details: { line: 4, limit: 2 },
      });
    }
  });

  it('single values without a header take the line limit; a spectrum, with or without header, the row limit', () => {
    const limits = { maxRows: 3, maxLines: 2 };
    expect(refusal('2143.27\n2147.08\n2150.85\n', limits).message).toBe('CSV line 3: more than 2 rows');
    expect(parseCsv('wavenumber,absorbance\n1,0.1\n2,0.2\n3,0.3\n', limits).kind).toBe('spectrum');
    expect(lines(parseCsv('1,0.1\n2,0.2\n3,0.3\n', limits)).lines).toHaveLength(3);
  });
});

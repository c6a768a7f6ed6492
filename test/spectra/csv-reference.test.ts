import { describe, expect, it } from 'vitest';
import type { ScienceError } from '../../src/errors.js';
import { parseCsv } from '../../src/spectra/csv.js';

// The CSV reader's rules one by one, on small bodies written here (each rule stated in src/spectra/csv.ts), with the
// refusals' exact messages: a client reads them.
const refusal = (text: string, limits?: { maxRows?: number; maxLines?: number }): ScienceError => {
  try {
    parseCsv(text, limits);
  } catch (e) {
    return e as ScienceError;
  }
  throw new Error('expected a ScienceError');
};
const lines = (text: string) => {
  const d = parseCsv(text);
  if (d.kind !== 'lines') throw new Error(`read as ${d.kind}`);
  return d;
};

describe('CSV position units', () => {
  it.each([
    ['cm-1', 'cm-1'],
    ['cm^-1', 'cm-1'],
    ['1/cm', 'cm-1'],
    ['cm**-1', 'cm-1'],
    ['wavenumbers', 'cm-1'],
    ['cm⁻¹', 'cm-1'],
    ['cm−1', 'cm-1'],
    ['CM -1', 'cm-1'],
    ['MHz', 'MHz'],
    ['ghz', 'GHz'],
    ['THz', 'THz'],
    ['um', 'um'],
    ['µm', 'um'],
    ['micrometers', 'um'],
    ['microns', 'um'],
    ['micron', 'um'],
    ['nm', 'nm'],
    ['nanometers', 'nm'],
  ])('"position (%s)" is read as %s, as is the same unit in a units row', (written, unit) => {
    expect(lines(`position (${written}),intensity\n2143.27,1\n2147.08,2\n`).unit).toBe(unit);
    expect(lines(`position;intensity\n${written};\n2143,27;1\n`).unit).toBe(unit);
    expect(lines(`position [${written}],intensity\n2143.27,1\n`).unit).toBe(unit);
    // After a slash the unit runs to the end of the cell without spaces.
    if (!written.includes(' ')) expect(lines(`intensity,position / ${written}\n1,2143.27\n`).unit).toBe(unit);
  });

  it('an unknown unit is refused by name; an empty unit cell means no unit', () => {
    const e = refusal('position (furlongs),intensity\n1,2\n');
    expect(e.code).toBe('UNIT_INVALID');
    expect(e.message).toBe('the position unit "furlongs" is not one of cm-1, MHz, GHz, THz, um, nm');
    expect(e.details).toEqual({ unit: 'furlongs' });
    expect(lines('position,intensity\n2143.27,1\n').unit).toBeUndefined();
    expect(lines('position;intensity\n ;counts\n2143,27;1\n').unit).toBeUndefined();
    expect(refusal('position;intensity\nMHZ2;\n1;2\n').code).toBe('UNIT_INVALID');
    // A data row whose position is not a number sits where a units row would: the refusal says both readings.
    const bad = refusal('position\nabc\ndef\n');
    expect(bad.code).toBe('UNIT_INVALID');
    expect(bad.message).toContain('read as the row of units');
    expect(bad.message).toContain('its position is not a number');
  });
});

describe('CSV line lists', () => {
  it('quoted cells keep their delimiters and doubled quotes; trailing empty cells and comments are dropped', () => {
    const d = lines('# made by hand\n"position","intensity"\n"2143.27","1.5",,\n\n"2147.08",2\n');
    expect(d.lines).toEqual([
      { position: 2143.27, intensity: 1.5 },
      { position: 2147.08, intensity: 2 },
    ]);
  });

  it('a quoted cell with a comma inside is one cell; a lone value reads as a position', () => {
    const e = refusal('position,band,branch,j\n2143.27,"1-0, hot",R,0\n');
    expect(e.message).toBe('CSV line 2: band "1-0, hot" is not "v\'-v\'\'" (e.g. 1-0)');
    const quote = refusal('position,band,branch,j\n2143.27,"1-""0",R,0\n');
    expect(quote.message).toBe('CSV line 2: band "1-"0" is not "v\'-v\'\'" (e.g. 1-0)');
    expect(lines('2143.27\n2147.08\n').lines).toEqual([{ position: 2143.27 }, { position: 2147.08 }]);
  });

  it('without a header: position, intensity, uncertainty; with spaces as delimiters too', () => {
    expect(lines('2143.27,5,0.001\n2147.08,6,0.002\n').lines).toEqual([
      { position: 2143.27, intensity: 5, uncertainty: 0.001 },
      { position: 2147.08, intensity: 6, uncertainty: 0.002 },
    ]);
    expect(lines('2143.27   5 0.001\n2147.08 6   0.002\n').lines[1]).toEqual({
      position: 2147.08,
      intensity: 6,
      uncertainty: 0.002,
    });
    // Decimal commas only with ";" or tab: with "," the comma splits.
    expect(lines('2143,27\n').lines).toEqual([{ position: 2143, intensity: 27 }]);
    expect(lines('2143,27\t1\n').lines).toEqual([{ position: 2143.27, intensity: 1 }]);
    expect(lines('-2,5e1;1\n').lines).toEqual([{ position: -25, intensity: 1 }]);
  });

  it('assignments: band with an en dash, branch in lower case; partial or malformed ones refused by line', () => {
    const d = lines('position,band,branch,j\n2147.08,1–0,r,1\n2139.43,1-0,P,1\n2100,,,\n');
    expect(d.lines).toEqual([
      { position: 2147.08, assignment: { band: '1-0', branch: 'R', j: 1 } },
      { position: 2139.43, assignment: { band: '1-0', branch: 'P', j: 1 } },
      { position: 2100 },
    ]);
    expect(refusal('position,band,branch\n1,1-0,R\n').message).toBe(
      'an assignment needs all three columns: band, branch and j',
    );
    expect(refusal('position,band,j\n1,1-0,2\n').code).toBe('INPUT_INVALID');
    expect(refusal('position,branch,j\n1,R,2\n').code).toBe('INPUT_INVALID');
    expect(refusal('position,band,branch,j\n1,1-0,S,2\n').message).toBe('CSV line 2: branch "S" is not P, Q or R');
    expect(refusal('position,band,branch,j\n1,1-0,R,2.5\n').message).toBe(
      'CSV line 2: j "2.5" is not a whole number ≥ 0',
    );
    expect(refusal('position,band,branch,j\n1,1-0,R,-1\n').message).toBe(
      'CSV line 2: j "-1" is not a whole number ≥ 0',
    );
    expect(refusal('position,band,branch,j\n1,100-0,R,1\n').message).toBe(
      'CSV line 2: band "100-0" is not "v\'-v\'\'" (e.g. 1-0)',
    );
    expect(lines('position,band,branch,j\n1,12-10,Q,0\n').lines[0]?.assignment).toEqual({
      band: '12-10',
      branch: 'Q',
      j: 0,
    });
  });

  it('refuses a missing or non-numeric position, a bad uncertainty and two columns of one name', () => {
    expect(refusal('position,intensity\n1,2\n,3\n').message).toBe('CSV line 3: the position is missing');
    expect(refusal('position,uncertainty\n1,0.1\n2,abc\n').message).toBe(
      'CSV line 3: uncertainty "abc" is not a number',
    );
    expect(refusal('intensity,position,peak\n1,2,3\n').message).toBe('CSV line 1: two columns are named as "position"');
    expect(refusal('wavenumber,position\n1,2\n').message).toBe('CSV line 1: two columns are named as "position"');
    const none = refusal('intensity,uncertainty\n1,2\n');
    expect(none.message).toBe('the CSV header names no position column (position, line, peak, …)');
    expect(none.details).toEqual({ header: ['intensity', 'uncertainty'] });
    expect(lines('wavenumber,sigma,foo\n2143.27,0.001,x\n').lines).toEqual([{ position: 2143.27, uncertainty: 0.001 }]);
  });

  it('a body without rows of numbers names what it read instead', () => {
    expect(refusal('').message).toBe('the CSV holds no rows of numbers');
    expect(refusal('position,intensity\n').message).toBe(
      'the CSV holds no rows of numbers (header position, intensity)',
    );
    expect(refusal('position,intensity\ncm-1,au\n').message).toBe(
      'the CSV holds no rows of numbers (header position, intensity; the row under it, cm-1, au, was read as its units)',
    );
  });

  it('row limits: a line list stops at maxLines, a spectrum at maxRows, each at its first row too many', () => {
    const list = 'position\n1\n2\n3\n';
    expect(lines(list).lines).toHaveLength(3);
    const e = refusal(list, { maxRows: 100, maxLines: 2 });
    expect(e.message).toBe('CSV line 4: more than 2 rows');
    expect(e.details).toEqual({ line: 4, limit: 2 });
    expect(parseCsv(list, { maxRows: 100, maxLines: 3 }).kind).toBe('lines');
    // One value a row without a header: a line list, so maxLines.
    expect(refusal('1\n2\n3\n', { maxRows: 100, maxLines: 2 }).message).toBe('CSV line 3: more than 2 rows');
    // A spectrum with a header naming absorbance: maxRows.
    const spectrum = 'wavenumber,absorbance\n1,0.1\n2,0.2\n3,0.3\n';
    expect(parseCsv(spectrum, { maxRows: 3, maxLines: 1 }).kind).toBe('spectrum');
    expect(refusal(spectrum, { maxRows: 2, maxLines: 10 }).message).toBe('CSV line 4: more than 2 rows');
    // maxLines defaults to maxRows.
    expect(refusal(list, { maxRows: 2 }).message).toBe('CSV line 4: more than 2 rows');
  });
});

describe('CSV spectra', () => {
  const uniform = (n: number, step: number) =>
    Array.from({ length: n }, (_, i) => `${(2000 + i * step).toFixed(4)},${(0.01 * i).toFixed(3)}`).join('\n');

  it('20 evenly spaced x values without a header make a spectrum; 19, or steps 6 % apart, a line list', () => {
    const s = parseCsv(uniform(20, 0.5));
    expect(s.kind).toBe('spectrum');
    if (s.kind === 'spectrum') {
      expect(s.x[19]).toBe(2009.5);
      expect(s.y[19]).toBeCloseTo(0.19, 12);
      expect(s.yUnit).toBeUndefined();
    }
    expect(parseCsv(uniform(19, 0.5)).kind).toBe('lines');
    // Steps 0.5 with one of 0.53 (6 % above the mean step): not uniform. With 0.52 (within 5 %): uniform.
    const rows = (odd: number) =>
      Array.from({ length: 21 }, (_, i) => `${2000 + i * 0.5 + (i >= 10 ? odd - 0.5 : 0)},1`).join('\n');
    expect(parseCsv(rows(0.535)).kind).toBe('lines');
    expect(parseCsv(rows(0.52)).kind).toBe('spectrum');
    // Decreasing x is uniform too; a constant x is not.
    expect(parseCsv(uniform(25, -0.5)).kind).toBe('spectrum');
    expect(parseCsv(Array.from({ length: 25 }, () => '2000,1').join('\n')).kind).toBe('lines');
  });

  it('a header naming absorbance or transmittance makes a spectrum with that y unit', () => {
    const a = parseCsv('wavenumber,absorbance\n2000,0.1\n2001,0.2\n');
    expect(a).toEqual({
      kind: 'spectrum',
      x: Float64Array.from([2000, 2001]),
      y: Float64Array.from([0.1, 0.2]),
      yUnit: 'absorbance',
    });
    const t = parseCsv('x;%T\n2000;99,5\n2001;98\n');
    expect(t.kind === 'spectrum' && t.yUnit).toBe('transmittance');
    expect(t.kind === 'spectrum' && t.y[0]).toBe(99.5);
    expect(refusal('wavenumber,absorbance\n2000,0.1\n2001\n').message).toBe(
      'CSV line 3: a spectrum needs two columns, x and y',
    );
    expect(refusal('wavenumber,absorbance\n2000,0.1\n2001,oops\n').message).toBe(
      'CSV line 3: "2001,oops" is not a row of numbers',
    );
  });
});

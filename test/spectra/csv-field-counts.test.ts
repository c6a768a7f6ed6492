import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { parseCsv } from '../../src/spectra/csv.js';

/**
 * A row with more fields than its header (or than a header-less list or spectrum can have) is refused with the line
 * and both counts, never cut to the header's width. The usual cause is a spreadsheet export with decimal commas and
 * ',' as the separator, where every number splits in two.
 */
function refusal(text: string): ScienceError {
  try {
    parseCsv(text);
  } catch (e) {
    if (e instanceof ScienceError) return e;
    throw e;
  }
  throw new Error(`read without complaint: ${text.slice(0, 60)}`);
}

describe('CSV rows with more fields than the header', () => {
  it('decimal commas under a two-column header: line 2, 4 fields against 2, decimal commas named', () => {
    const e = refusal('position,uncertainty\n2139,4260,0,002\n2143,2712,0,002\n');
    expect(e.code).toBe('INPUT_INVALID');
    expect(e.message).toMatch(/^CSV line 2: has 4 fields, the header has 2: decimal commas with ',' as the separator/);
    expect(e.details).toMatchObject({ line: 2, fields: 4, allowedFields: 2 });
    expect(e.details.likelyCause).toMatch(/decimal commas/);
  });

  it('a later row that grows is named by its own line (comments and blank lines counted)', () => {
    const e = refusal('# exported\nposition,uncertainty\n\n2139.426,0.002\n2143,2712,0,002\n');
    expect(e.details).toMatchObject({ line: 5, fields: 4, allowedFields: 2 });
  });

  it('an extra text cell is not blamed on decimal commas', () => {
    const e = refusal('position,uncertainty\n2139.426,0.002,see notes\n');
    expect(e.message).toMatch(/has 3 fields, the header has 2: a separator inside a cell/);
    expect(e.details.likelyCause).toBeUndefined();
  });

  it('a spectrum with a header: extra fields refused too', () => {
    const e = refusal('wavenumber,absorbance\n2000,01,0,5\n2000,02,0,6\n');
    expect(e.details).toMatchObject({ line: 2, fields: 4, allowedFields: 2 });
  });

  it('a header-less line list of more than three columns is refused', () => {
    const e = refusal('2139,4260,0,002\n2143,2712,0,002\n');
    expect(e.message).toMatch(/CSV line 1: has 4 fields, without a header a line list has at most 3/);
    expect(e.details.likelyCause).toMatch(/decimal commas/);
    expect(refusal('2139.426;0.5;0.002;7\n').message).toMatch(/name the columns in a header row/);
  });

  it('a header-less single column with decimal commas ("2139,4260") is refused at its split-off "4260"… part', () => {
    const e = refusal('2139,0426\n2143,2712\n');
    expect(e.message).toMatch(/CSV line 1: "0426" is not a number of its own/);
    expect(e.details.likelyCause).toMatch(/decimal commas/);
  });

  it('a header-less spectrum of three columns is refused', () => {
    const rows = Array.from({ length: 30 }, (_, i) => `${2000 + i * 0.01};${0.1 + i * 1e-3};1`).join('\n');
    const e = refusal(rows);
    expect(e.message).toMatch(/CSV line 1: has 3 fields, without a header a spectrum has 2/);
  });

  it('what was read before still reads: trailing delimiters, shorter rows, decimal commas with ";"', () => {
    expect(parseCsv('position,uncertainty,\n2143.27,0.002,\n2147.08\n').kind).toBe('lines');
    expect(parseCsv('position;uncertainty\n2143,27;0,002\n').kind).toBe('lines');
    expect(parseCsv('2143.27,0.5,0.002\n2147.08,0.4\n').kind).toBe('lines');
  });
});

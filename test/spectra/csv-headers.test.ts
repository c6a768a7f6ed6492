import { describe, expect, it } from 'vitest';
import { parseCsv } from '../../src/spectra/csv.js';

/** What a CSV header makes of a file: a spectrum when it names absorbance or transmittance, else a line list. */
const rows = Array.from(
  { length: 30 },
  (_, i) => `${(2140 + i * 0.01).toFixed(2)},${(0.1 + (i % 3) * 0.01).toFixed(2)}`,
);
const body = rows.join('\n');

describe('CSV header: spectrum or line list', () => {
  it.each([
    'position (cm-1),absorbance',
    'position,absorbance',
    'Position [cm-1],Absorbance',
    'x,absorbance',
    'wavenumber,absorbance',
    'line,transmittance',
    'peak,%T',
  ])('"%s" is a spectrum of two columns', (header) => {
    const d = parseCsv(`${header}\n${body}\n`);
    expect(d.kind).toBe('spectrum');
    if (d.kind === 'spectrum') {
      expect(d.x).toHaveLength(30);
      expect(d.x[1]).toBe(2140.01);
      expect(d.y[1]).toBe(0.11);
    }
  });

  it.each(['position,uncertainty', 'position,intensity', 'line,height', 'position,uncertainty,absorbance'])(
    '"%s" stays a line list (a column only lines have, or no absorbance)',
    (header) => {
      expect(parseCsv(`${header}\n${body}\n`).kind).toBe('lines');
    },
  );
});

describe('CSV units of one-column lists and of spectra', () => {
  it.each(['frequency (MHz)', 'frequency / MHz', 'freq [MHz]', 'position (MHz)'])(
    'a single column "%s" keeps its unit although the header holds spaces',
    (header) => {
      const d = parseCsv(`${header}\n115271.2018\n230538.0000\n`);
      expect(d).toMatchObject({ kind: 'lines', unit: 'MHz' });
      if (d.kind === 'lines') expect(d.lines.map((l) => l.position)).toEqual([115271.2018, 230538]);
    },
  );

  it.each([
    ['wavelength (um),absorbance', 'um'],
    ['position [nm],absorbance', 'nm'],
    ['wavenumber (cm-1),transmittance', 'cm-1'],
    ['wavelength,absorbance\num,', 'um'],
  ])('a spectrum "%s" carries xUnit %s', (header, unit) => {
    expect(parseCsv(`${header}\n${body}\n`)).toMatchObject({ kind: 'spectrum', xUnit: unit });
  });

  it('"absorbance,wavenumber": y is read from the absorbance column, x from the other', () => {
    const d = parseCsv(`absorbance,wavenumber\n0.11,2140.01\n0.12,2140.02\n`);
    expect(d.kind).toBe('spectrum');
    if (d.kind === 'spectrum') {
      expect(Array.from(d.x)).toEqual([2140.01, 2140.02]);
      expect(Array.from(d.y)).toEqual([0.11, 0.12]);
    }
  });

  it('a spectrum in MHz is refused: its x is a wavenumber or a wavelength', () => {
    expect(() => parseCsv(`frequency (MHz),absorbance\n${body}\n`)).toThrow(/x unit "MHz" is not one of cm-1, um, nm/);
  });
});

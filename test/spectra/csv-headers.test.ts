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

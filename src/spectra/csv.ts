import { ScienceError } from '../errors.js';

export type CsvData =
  | {
      readonly kind: 'spectrum';
      readonly x: Float64Array;
      readonly y: Float64Array;
      readonly yUnit?: 'absorbance' | 'transmittance';
    }
  | {
      readonly kind: 'lines';
      readonly lines: readonly { position: number; intensity?: number; uncertainty?: number }[];
    };

/**
 * CSV of a spectrum (x, y) or of a line list (position[, intensity[, uncertainty]]): comma, semicolon, tab or
 * white-space separated, an optional header row, "#" comment lines. A header naming "position" (or "line") means a
 * line list, one naming "absorbance" or "transmittance" a spectrum; without a header, many evenly spaced x values
 * mean a spectrum. Errors name the line.
 */
export interface CsvLimits {
  /** Most rows of a spectrum. Default 5 000 000. */
  readonly maxRows?: number;
  /** Most rows of a line list (a header naming positions, or one column). Default: maxRows. */
  readonly maxLines?: number;
}

export function parseCsv(text: string, limits: CsvLimits = {}): CsvData {
  const maxRows = limits.maxRows ?? 5_000_000;
  const maxLines = limits.maxLines ?? maxRows;
  const rows = text.split(/\r\n|\r|\n/);
  let header: string[] | undefined;
  const data: { line: number; cells: number[] }[] = [];
  let delimiter: RegExp | undefined;
  for (let i = 0; i < rows.length; i++) {
    const raw = (rows[i] as string).trim();
    if (raw === '' || raw.startsWith('#')) continue;
    delimiter ??= raw.includes(';') ? /;/ : raw.includes(',') ? /,/ : raw.includes('\t') ? /\t/ : /\s+/;
    const cells = raw.split(delimiter).map((c) => c.trim().replace(/^"|"$/g, ''));
    const nums = cells.map((c) => (c === '' ? Number.NaN : Number(c)));
    if (nums.some((v) => !Number.isFinite(v))) {
      if (data.length === 0 && header === undefined) {
        header = cells.map((c) => c.toLowerCase());
        continue;
      }
      throw new ScienceError('INPUT_INVALID', `CSV line ${i + 1}: "${raw.slice(0, 60)}" is not a row of numbers`, {
        line: i + 1,
      });
    }
    // Counted while reading, so that an oversized body is refused at its first row too many.
    const lineList = /position|line/.test(header?.join(' ') ?? '') || nums.length === 1;
    const limit = lineList ? maxLines : maxRows;
    if (data.length >= limit)
      throw new ScienceError('INPUT_INVALID', `CSV line ${i + 1}: more than ${limit} rows of numbers`, {
        line: i + 1,
        limit,
      });
    data.push({ line: i + 1, cells: nums });
  }
  if (data.length === 0) throw new ScienceError('INPUT_INVALID', 'the CSV holds no rows of numbers', {});
  const width = (data[0] as { cells: number[] }).cells.length;
  for (const r of data) {
    if (r.cells.length !== width) {
      throw new ScienceError(
        'INPUT_INVALID',
        `CSV line ${r.line}: ${r.cells.length} columns where the first row has ${width}`,
        { line: r.line },
      );
    }
  }
  const h = header?.join(' ') ?? '';
  const xs = data.map((r) => r.cells[0] as number);
  const looksLikeLines = /position|line|wavenumber_line/.test(h) || width === 1;
  const looksLikeSpectrum = /absorb|transm|signal|intensity_spectrum/.test(h);
  const uniform = (() => {
    if (xs.length < 20) return false;
    const d = xs.slice(1).map((x, i) => x - (xs[i] as number));
    const mean = d.reduce((s, v) => s + v, 0) / d.length;
    return mean !== 0 && d.every((v) => Math.abs(v - mean) <= 0.05 * Math.abs(mean));
  })();
  if (!looksLikeLines && (looksLikeSpectrum || uniform)) {
    if (width < 2) throw new ScienceError('INPUT_INVALID', 'a spectrum needs two columns, x and y', {});
    return {
      kind: 'spectrum',
      x: Float64Array.from(xs),
      y: Float64Array.from(data, (r) => r.cells[1] as number),
      ...(/transm/.test(h)
        ? { yUnit: 'transmittance' as const }
        : /absorb/.test(h)
          ? { yUnit: 'absorbance' as const }
          : {}),
    };
  }
  return {
    kind: 'lines',
    lines: data.map((r) => ({
      position: r.cells[0] as number,
      ...(width >= 2 ? { intensity: r.cells[1] as number } : {}),
      ...(width >= 3 ? { uncertainty: r.cells[2] as number } : {}),
    })),
  };
}

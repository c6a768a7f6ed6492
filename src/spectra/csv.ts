import { ScienceError } from '../errors.js';
import type { PositionUnit } from '../units.js';

export interface CsvLine {
  readonly position: number;
  readonly uncertainty?: number;
  readonly intensity?: number;
  readonly assignment?: { band: string; branch: 'P' | 'Q' | 'R'; j: number };
  /** The instrument or file the line came from (lines without σ get it from their source's scatter). */
  readonly source?: string;
  /** The caller's name for the line, echoed in the answer. */
  readonly id?: string;
}

export type CsvData =
  | {
      readonly kind: 'spectrum';
      readonly x: Float64Array;
      readonly y: Float64Array;
      readonly yUnit?: 'absorbance' | 'transmittance';
      /** The unit of x, when the header or a units row names it. */
      readonly xUnit?: SpectrumXUnit;
    }
  | {
      readonly kind: 'lines';
      readonly lines: readonly CsvLine[];
      /** The unit of positions and uncertainties, when the header or a units row names it. */
      readonly unit?: PositionUnit;
    };

export type SpectrumXUnit = 'cm-1' | 'um' | 'nm';

/** Bounds checked while reading, so that an oversized body is refused at its first row too many. */
export interface CsvLimits {
  /** Most rows of a spectrum. Default 5 000 000. */
  readonly maxRows?: number;
  /** Most rows of a line list. Default: maxRows. */
  readonly maxLines?: number;
}

type Column =
  | 'position'
  | 'uncertainty'
  | 'intensity'
  | 'band'
  | 'branch'
  | 'j'
  | 'source'
  | 'id'
  | 'x'
  | 'absorbance'
  | 'transmittance';

/**
 * Column names a header may use, compared after lower-casing and removing spaces, dots, underscores, dashes,
 * quotes and a trailing unit ("position (cm-1)", "position / cm-1", "position [MHz]"). The first name is the
 * documented one; the others are accepted synonyms.
 */
export const CSV_COLUMN_NAMES: Readonly<Record<Column, readonly string[]>> = {
  position: [
    'position',
    'line',
    'peak',
    'centre',
    'center',
    'wavenumberline',
    'linecenter',
    'linecentre',
    'nu',
    'frequency',
    'freq',
  ],
  uncertainty: [
    'uncertainty',
    'unc',
    'u',
    'sigma',
    'σ',
    'stdev',
    'stddev',
    'sd',
    'std',
    'error',
    'err',
    'positionuncertainty',
  ],
  intensity: ['intensity', 'int', 'strength', 'area', 'height', 'integratedintensity'],
  band: ['band', 'vibrationalband', 'transition', 'vv'],
  branch: ['branch'],
  j: ['j', 'jlower', 'jlow', "j''", 'j"', 'lowerj'],
  source: ['source', 'instrument', 'spectrometer'],
  id: ['id', 'lineid'],
  x: ['wavenumber', 'wavenumbers', 'x', 'wavelength', 'xvalue'],
  absorbance: ['absorbance', 'abs', 'y', 'signal'],
  transmittance: ['transmittance', 'transmission', '%t'],
};

const LOOKUP = new Map<string, Column>(
  Object.entries(CSV_COLUMN_NAMES).flatMap(([col, names]) => names.map((n) => [n, col as Column] as const)),
);

const UNIT_IN_HEADER = /\s*(?:\(([^)]*)\)|\[([^\]]*)\]|\/\s*(\S+))\s*$/;

function unitOf(raw: string): PositionUnit | undefined {
  const u = raw.trim().toLowerCase().replace(/\s/g, '').replace('µ', 'u').replace('−', '-');
  if (u === '') return undefined;
  if (['cm-1', 'cm^-1', '1/cm', 'cm**-1', 'wavenumbers', 'cm⁻¹'].includes(u)) return 'cm-1';
  if (u === 'mhz') return 'MHz';
  if (u === 'ghz') return 'GHz';
  if (u === 'thz') return 'THz';
  if (u === 'um' || u === 'micrometers' || u === 'microns' || u === 'micron') return 'um';
  if (u === 'nm' || u === 'nanometers') return 'nm';
  return undefined;
}

/** A header cell → its column (or undefined) and the unit written beside it. */
function readHeaderCell(cell: string): { column?: Column; unit?: string; name?: string } {
  const m = UNIT_IN_HEADER.exec(cell);
  const unit = m ? (m[1] ?? m[2] ?? m[3]) : undefined;
  const name = (m ? cell.slice(0, m.index) : cell).toLowerCase().replace(/[\s._\-"`]/g, '');
  const column = LOOKUP.get(name) ?? LOOKUP.get(cell.toLowerCase().replace(/\s/g, ''));
  return { ...(column ? { column } : { name }), ...(unit !== undefined ? { unit } : {}) };
}

function fail(line: number, message: string, details: Record<string, unknown> = {}): never {
  throw new ScienceError('INPUT_INVALID', `CSV line ${line}: ${message}`, { line, ...details });
}

/** Split a row on the delimiter, honouring double-quoted cells; trailing empty cells (a trailing delimiter) go. */
function splitRow(raw: string, delimiter: string): string[] {
  const cells: string[] = [];
  if (delimiter === ' ') cells.push(...raw.split(/\s+/));
  else {
    let cur = '';
    let quoted = false;
    for (let i = 0; i < raw.length; i++) {
      const ch = raw[i] as string;
      if (ch === '"') {
        if (quoted && raw[i + 1] === '"') {
          cur += '"';
          i++;
        } else quoted = !quoted;
      } else if (ch === delimiter && !quoted) {
        cells.push(cur.trim());
        cur = '';
      } else cur += ch;
    }
    cells.push(cur.trim());
  }
  while (cells.length > 1 && cells[cells.length - 1] === '') cells.pop();
  return cells;
}

/** A number cell; with ";" or tab delimiters a decimal comma is read as a decimal point ("2143,27"). */
function numberOf(cell: string, decimalComma: boolean): number {
  const c = decimalComma && /^[+-]?\d*,\d+(?:[eE][+-]?\d+)?$/.test(cell) ? cell.replace(',', '.') : cell;
  if (c === '') return Number.NaN;
  return Number(c);
}

/**
 * CSV of a line list or of a spectrum.
 *
 * A line list is read by the names in its header row, in any order: `position`, `uncertainty`, `intensity`,
 * `band`, `branch`, `j` (synonyms in CSV_COLUMN_NAMES; a unit may follow the name: "position (MHz)"). A row of
 * units may follow the header. `band`, `branch` and `j` together give the line's assignment. Without a header the
 * columns are position[, intensity[, uncertainty]].
 *
 * A spectrum has two columns, x and y, with a header naming absorbance or transmittance, or without a header many
 * evenly spaced x values.
 *
 * Delimiters: ";", tab, "," or spaces, chosen from the first row; with ";" or tab, decimal commas are accepted.
 * Trailing delimiters, blank lines and "#" comment lines are ignored. Errors name the line.
 */
export function parseCsv(text: string, limits: CsvLimits = {}): CsvData {
  const { delimiter, header, unitsRow, data } = readRows(text, limits);
  if (data.length === 0) {
    // Name what was read instead: a second row without numbers is taken as the row of units under the header.
    const read = header
      ? ` (header ${header.cells.join(', ')}${unitsRow ? `; the row under it, ${unitsRow.join(', ')}, was read as its units` : ''})`
      : '';
    throw new ScienceError('INPUT_INVALID', `the CSV holds no rows of numbers${read}`, {});
  }
  const decimalComma = delimiter !== ',';
  if (header !== undefined)
    refuseExtraFields(data, header.cells.length, `the header has ${header.cells.length}`, delimiter);

  const columns = header?.cells.map(readHeaderCell);
  const lineList = isLineList(header, columns, data, decimalComma);
  if (header === undefined) {
    refuseExtraFields(data, lineList ? 3 : 2, lineList ? HEADERLESS_LIST : HEADERLESS_SPECTRUM, delimiter);
    if (delimiter === ',') refuseLeadingZeros(data);
  }
  if (!lineList) {
    const has = (c: Column) => columns?.some((x) => x.column === c) ?? false;
    const yUnit = has('transmittance') ? 'transmittance' : has('absorbance') ? 'absorbance' : undefined;
    // y where the header names it, x the first other column ("absorbance,wavenumber" is read the right way round)
    const y = columns?.findIndex((c) => c.column === 'absorbance' || c.column === 'transmittance') ?? -1;
    const at = y === 0 ? { x: 1, y: 0 } : { x: 0, y: y > 0 ? y : 1 };
    const xUnit = spectrumXUnit(columns?.[at.x]?.unit ?? unitsRow?.[at.x]);
    return readSpectrum(data, decimalComma, yUnit, at, xUnit);
  }
  return readLineList(data, decimalComma, header?.line ?? 1, columns, unitsRow);
}

/** A row of the CSV with its line number (1-based). */
interface CsvRow {
  line: number;
  cells: string[];
}

/**
 * The rows as read: the delimiter chosen from the first row, the header (a first row without numbers), the row of
 * units under it (a second one), and the data rows, refused past the row limit (maxLines once the header names a
 * line list or the first row has one cell, else maxRows). Blank lines and "#" comments are skipped.
 */
function readRows(
  text: string,
  limits: CsvLimits,
): { delimiter: string | undefined; header: CsvRow | undefined; unitsRow: string[] | undefined; data: CsvRow[] } {
  const maxRows = limits.maxRows ?? 5_000_000;
  const maxLines = limits.maxLines ?? maxRows;
  const rows = text.split(/\r\n|\r|\n/);
  let delimiter: string | undefined;
  let header: CsvRow | undefined;
  let unitsRow: string[] | undefined;
  const data: CsvRow[] = [];
  let limit = maxRows;
  for (let i = 0; i < rows.length; i++) {
    const raw = (rows[i] as string).trim();
    if (raw === '' || raw.startsWith('#')) continue;
    delimiter ??= raw.includes(';') ? ';' : raw.includes('\t') ? '\t' : raw.includes(',') ? ',' : ' ';
    const cells = splitRow(raw, delimiter);
    const decimalComma = delimiter !== ',';
    const numeric = cells.filter((c) => c !== '' && Number.isFinite(numberOf(c, decimalComma))).length;
    if (data.length === 0 && numeric === 0) {
      if (header === undefined) {
        header = { line: i + 1, cells: delimiter === ' ' ? joinUnitCells(cells) : cells };
        if (isLineListHeader(cells)) limit = maxLines;
        continue;
      }
      if (unitsRow === undefined) {
        unitsRow = cells;
        continue;
      }
    }
    if (header === undefined && data.length === 0 && cells.length === 1) limit = maxLines;
    if (data.length >= limit) fail(i + 1, `more than ${limit} rows`, { limit });
    data.push({ line: i + 1, cells });
  }
  return { delimiter, header, unitsRow, data };
}

/**
 * Whether the rows are a line list: a header naming line-list columns says so, one naming absorbance or
 * transmittance says not; otherwise one column, or first-column values that are not evenly spaced, make a line list.
 */
function isLineList(
  header: CsvRow | undefined,
  columns: readonly { column?: Column }[] | undefined,
  data: readonly CsvRow[],
  decimalComma: boolean,
): boolean {
  if (header !== undefined && isLineListHeader(header.cells)) return true;
  if (columns?.some((x) => x.column === 'absorbance' || x.column === 'transmittance')) return false;
  return (data[0]?.cells.length ?? 0) === 1 || !looksUniform(data.map((r) => numberOf(r.cells[0] ?? '', decimalComma)));
}

const HEADERLESS_LIST = 'without a header a line list has at most 3 (position, intensity, uncertainty)';
const HEADERLESS_SPECTRUM = 'without a header a spectrum has 2 (x, y)';
const DECIMAL_COMMA_HINT =
  "decimal commas with ',' as the separator? Use ';' or tab as the separator, or decimal points";

/**
 * A row with more fields than the header allows is refused, never cut: with ',' as the separator, decimal commas
 * split every number in two ("2082,0023,0,002" under "position,uncertainty"), and the extra fields would be
 * dropped without a word.
 */
function refuseExtraFields(
  data: readonly CsvRow[],
  allowed: number,
  reference: string,
  delimiter: string | undefined,
): void {
  const row = data.find((r) => r.cells.length > allowed);
  if (row === undefined) return;
  const numeric = row.cells.every((c) => /^[+-]?\d+(?:[eE][+-]?\d+)?$/.test(c));
  const cause =
    delimiter === ',' && numeric
      ? DECIMAL_COMMA_HINT
      : reference.startsWith('the header')
        ? 'a separator inside a cell that is not quoted?'
        : 'name the columns in a header row';
  fail(row.line, `has ${row.cells.length} fields, ${reference}: ${cause}`, {
    fields: row.cells.length,
    allowedFields: allowed,
    ...(delimiter === ',' && numeric ? { likelyCause: 'decimal commas with "," as the separator' } : {}),
  });
}

/** A cell such as "0023" is the decimal part of a number split at its decimal comma, never a number of its own. */
function refuseLeadingZeros(data: readonly CsvRow[]): void {
  for (const r of data) {
    const cell = r.cells.find((c) => /^[+-]?0\d/.test(c));
    if (cell !== undefined)
      fail(r.line, `"${cell.slice(0, 30)}" is not a number of its own (${DECIMAL_COMMA_HINT})`, {
        likelyCause: 'decimal commas with "," as the separator',
      });
  }
}

/**
 * A header of a line list: a column only lines have (uncertainty, intensity, band, branch, j), or a position column
 * without an absorbance or transmittance beside it ("position (cm-1),absorbance" is a spectrum, as README says).
 */
function isLineListHeader(cells: readonly string[]): boolean {
  const cols = cells.map((c) => readHeaderCell(c).column);
  const spectrumY = cols.includes('absorbance') || cols.includes('transmittance');
  return cols.some(
    (c) =>
      (c === 'position' && !spectrumY) ||
      c === 'uncertainty' ||
      c === 'intensity' ||
      c === 'band' ||
      c === 'branch' ||
      c === 'j',
  );
}

/** Many evenly spaced x values (within 5 % of the mean step): a spectrum rather than a line list. */
function looksUniform(xs: readonly number[]): boolean {
  if (xs.length < 20) return false;
  const d = xs.slice(1).map((x, i) => x - (xs[i] as number));
  const mean = d.reduce((s, v) => s + v, 0) / d.length;
  return mean !== 0 && d.every((v) => Math.abs(v - mean) <= 0.05 * Math.abs(mean));
}

/** A header-less single cell split at its spaces: "frequency (MHz)" and "frequency / MHz" stay one name. */
function joinUnitCells(cells: readonly string[]): string[] {
  const out: string[] = [];
  for (const c of cells) {
    const last = out.length - 1;
    if (last >= 0 && (/^[([]/.test(c) || c === '/' || out[last]?.endsWith('/'))) out[last] = `${out[last]} ${c}`;
    else out.push(c);
  }
  return out;
}

/** A spectrum's x unit from its header or units row: a wavenumber or a vacuum wavelength. */
function spectrumXUnit(raw: string | undefined): SpectrumXUnit | undefined {
  if (raw === undefined || raw.trim() === '') return undefined;
  const u = unitOf(raw);
  if (u === 'cm-1' || u === 'um' || u === 'nm') return u;
  throw new ScienceError('UNIT_INVALID', `the spectrum's x unit "${raw}" is not one of cm-1, um, nm`, { unit: raw });
}

function readSpectrum(
  data: readonly CsvRow[],
  decimalComma: boolean,
  yUnit: 'absorbance' | 'transmittance' | undefined,
  at: { readonly x: number; readonly y: number },
  xUnit: SpectrumXUnit | undefined,
): CsvData {
  const x = new Float64Array(data.length);
  const y = new Float64Array(data.length);
  data.forEach((r, k) => {
    if (r.cells.length < 2) fail(r.line, 'a spectrum needs two columns, x and y');
    const a = numberOf(r.cells[at.x] ?? '', decimalComma);
    const b = numberOf(r.cells[at.y] ?? '', decimalComma);
    if (!Number.isFinite(a) || !Number.isFinite(b))
      fail(r.line, `"${r.cells.join(',').slice(0, 60)}" is not a row of numbers`);
    x[k] = a;
    y[k] = b;
  });
  return { kind: 'spectrum', x, y, ...(yUnit ? { yUnit } : {}), ...(xUnit ? { xUnit } : {}) };
}

function readLineList(
  data: readonly CsvRow[],
  decimalComma: boolean,
  headerLine: number,
  columns: readonly { column?: Column; unit?: string }[] | undefined,
  unitsRow: readonly string[] | undefined,
): CsvData {
  const at = lineListColumns(headerLine, columns);
  const p = at.position as number;
  const headerUnit = columns?.[p]?.unit;
  const unit = positionUnit(headerUnit ?? unitsRow?.[p], headerUnit === undefined && unitsRow !== undefined);
  const assigned = at.band !== undefined || at.branch !== undefined || at.j !== undefined;
  if (assigned && (at.band === undefined || at.branch === undefined || at.j === undefined))
    throw new ScienceError('INPUT_INVALID', 'an assignment needs all three columns: band, branch and j', {});
  const lines = data.map((r) => lineOfRow(r, at, assigned, decimalComma));
  return { kind: 'lines', lines, ...(unit ? { unit } : {}) };
}

/** Where each field is: by header name, or position[, intensity[, uncertainty]] without a header. */
function lineListColumns(
  headerLine: number,
  columns: readonly { column?: Column; unit?: string; name?: string }[] | undefined,
): Partial<Record<Column, number>> {
  const at: Partial<Record<Column, number>> = {};
  if (!columns) return { position: 0, intensity: 1, uncertainty: 2 };
  refuseNearMisses(headerLine, columns);
  columns.forEach((c, k) => {
    const col = c.column === 'x' ? 'position' : c.column;
    if (col === undefined || col === 'absorbance' || col === 'transmittance') return;
    if (at[col] !== undefined) fail(headerLine, `two columns are named as "${col}"`);
    at[col] = k;
  });
  if (at.position === undefined) {
    throw new ScienceError('INPUT_INVALID', 'the CSV header names no position column (position, line, peak, …)', {
      header: columns.map((c) => c.column ?? null),
    });
  }
  return at;
}

/**
 * A header name the reader does not know but that is one or two typing slips from one it reads ("uncertainity",
 * "postion", "intesity") is refused naming the column meant: read as an unknown column it would be left out
 * silently, and the lines fitted without their σ. Other unknown columns (a peak picker's "fwhm" or "snr") are not
 * read, as before.
 */
function refuseNearMisses(headerLine: number, columns: readonly { column?: Column; name?: string }[]): void {
  for (const c of columns) {
    if (c.column !== undefined || c.name === undefined || c.name.length < 5) continue;
    const meant = nearestColumnName(c.name);
    if (meant)
      fail(
        headerLine,
        `the column "${c.name}" is not one the reader knows; did you mean "${meant}"? Rename it, or remove the column`,
        { header: c.name, meant },
      );
  }
}

/**
 * The documented or synonym name near `name`: one edit from a name of 4 to 6 characters, two from a longer one (so
 * that a short name of another meaning, "time" beside "line", is not taken for a slip).
 */
function nearestColumnName(name: string): string | undefined {
  for (const known of LOOKUP.keys())
    if (known.length >= 4 && editDistance(name, known) <= (known.length > 6 ? 2 : 1)) return known;
  return undefined;
}

/** Insertions, deletions, substitutions and adjacent swaps that turn a into b (Damerau, optimal string alignment). */
function editDistance(a: string, b: string): number {
  if (Math.abs(a.length - b.length) > 2) return 3;
  let prev2: number[] = [];
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const row = [i];
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min((prev[j] as number) + 1, (row[j - 1] as number) + 1, (prev[j - 1] as number) + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1])
        d = Math.min(d, (prev2[j - 2] as number) + 1);
      row.push(d);
    }
    prev2 = prev;
    prev = row;
  }
  return prev[b.length] as number;
}

/**
 * The position column's unit from its header or units row; refused when given but not one we read. A units row is
 * the first row under the header with no number in it, so a data row whose position is not a number is read as one:
 * the message then says both.
 */
function positionUnit(rawUnit: string | undefined, fromUnitsRow = false): ReturnType<typeof unitOf> {
  if (rawUnit === undefined || rawUnit.trim() === '') return undefined;
  const unit = unitOf(rawUnit);
  if (unit === undefined) {
    const why = fromUnitsRow
      ? `the row under the header has no number in it, so it was read as the row of units, and the position unit "${rawUnit}" is not one of cm-1, MHz, GHz, THz, um, nm; if that row is data, its position is not a number: send numbers (a decimal point, or a decimal comma with ";" or tab between columns)`
      : `the position unit "${rawUnit}" is not one of cm-1, MHz, GHz, THz, um, nm`;
    throw new ScienceError('UNIT_INVALID', why, { unit: rawUnit });
  }
  return unit;
}

/** One row of a line list: position (required), uncertainty, intensity and, when the columns exist, its label. */
function lineOfRow(r: CsvRow, at: Partial<Record<Column, number>>, assigned: boolean, decimalComma: boolean): CsvLine {
  const cell = (k: number | undefined) => (k === undefined ? '' : (r.cells[k] ?? ''));
  const num = (name: Column, required: boolean): number | undefined => {
    const c = cell(at[name]);
    if (c === '') {
      if (required) fail(r.line, `the ${name} is missing`);
      return undefined;
    }
    const v = numberOf(c, decimalComma);
    if (!Number.isFinite(v))
      fail(r.line, `${name} "${c.slice(0, 30)}" is not a number`, {
        column: name,
      });
    return v;
  };
  const position = num('position', true) as number;
  const uncertainty = num('uncertainty', false);
  const intensity = num('intensity', false);
  let assignment: CsvLine['assignment'];
  if (assigned) {
    const band = cell(at.band).replace(/[–−]/g, '-');
    const branch = cell(at.branch).toUpperCase();
    const j = cell(at.j);
    if (band !== '' || branch !== '' || j !== '') {
      if (!/^\d{1,2}-\d{1,2}$/.test(band)) fail(r.line, `band "${band}" is not "v'-v''" (e.g. 1-0)`);
      if (branch !== 'P' && branch !== 'Q' && branch !== 'R') fail(r.line, `branch "${branch}" is not P, Q or R`);
      const jv = Number(j);
      if (!Number.isInteger(jv) || jv < 0) fail(r.line, `j "${j}" is not a whole number ≥ 0`);
      assignment = { band, branch, j: jv };
    }
  }
  const source = cell(at.source).trim();
  const id = cell(at.id).trim();
  if (source.length > 100 || id.length > 100)
    fail(r.line, `a ${source.length > 100 ? 'source' : 'id'} is longer than 100 characters`);
  return {
    position,
    ...(uncertainty !== undefined ? { uncertainty } : {}),
    ...(intensity !== undefined ? { intensity } : {}),
    ...(assignment ? { assignment } : {}),
    ...(source !== '' ? { source } : {}),
    ...(id !== '' ? { id } : {}),
  };
}

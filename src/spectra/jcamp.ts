import { ScienceError } from '../errors.js';

/**
 * A JCAMP-DX reader for infrared spectra (R. S. McDonald and P. A. Wilks, Appl. Spectrosc. 42, 151 (1988); ASDF
 * compression as specified there): ##XYDATA=(X++(Y..Y)) in AFFN, PAC, SQZ, DIF and DUP forms with the DIF
 * Y-value check, ##XYPOINTS=(XY..XY), ##PEAK TABLE=(XY..XY), XFACTOR and YFACTOR, increasing or decreasing X.
 * Labels are matched the way the standard asks: case, spaces, dashes, slashes and underscores do not count.
 * Tables may separate X and Y by a comma or, as many instruments write them, by spaces only. Errors name the line.
 */

export interface JcampSpectrum {
  readonly kind: 'spectrum';
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly xUnits: string;
  readonly yUnits: string;
  readonly title: string;
  readonly labels: ReadonlyMap<string, string>;
}

export interface JcampPeakTable {
  readonly kind: 'peaks';
  readonly peaks: readonly { x: number; y?: number }[];
  readonly xUnits: string;
  readonly yUnits: string;
  readonly title: string;
  readonly labels: ReadonlyMap<string, string>;
}

export type JcampData = JcampSpectrum | JcampPeakTable;

const normaliseLabel = (l: string) => l.replace(/[\s\-/_]/g, '').toUpperCase();

function fail(line: number, message: string): never {
  throw new ScienceError('INPUT_INVALID', `JCAMP-DX line ${line}: ${message}`, { line });
}

/**
 * A value of the data that is not a finite number (1e400, NaN, text), or that overflows once scaled by its ##XFACTOR=
 * or ##YFACTOR=: the file's line and the column are named (`details.column`), so the service answers it as the bad
 * value it is (400 naming the line and value) rather than as a file it cannot read.
 */
function badValue(line: number, column: 'X' | 'Y', text: string, why: string): never {
  throw new ScienceError('INPUT_INVALID', `JCAMP-DX line ${line}: ${column} value "${text}" ${why}`, {
    line,
    column,
    file: 'JCAMP-DX',
  });
}

const SQZ: Record<string, number> = {
  '@': 0,
  A: 1,
  B: 2,
  C: 3,
  D: 4,
  E: 5,
  F: 6,
  G: 7,
  H: 8,
  I: 9,
  a: -1,
  b: -2,
  c: -3,
  d: -4,
  e: -5,
  f: -6,
  g: -7,
  h: -8,
  i: -9,
};
const DIF: Record<string, number> = {
  '%': 0,
  J: 1,
  K: 2,
  L: 3,
  M: 4,
  N: 5,
  O: 6,
  P: 7,
  Q: 8,
  R: 9,
  j: -1,
  k: -2,
  l: -3,
  m: -4,
  n: -5,
  o: -6,
  p: -7,
  q: -8,
  r: -9,
};
const DUP: Record<string, number> = { S: 1, T: 2, U: 3, V: 4, W: 5, X: 6, Y: 7, Z: 8, s: 9 };

type Token = { kind: 'abs' | 'dif' | 'dup'; value: number };

/** Split one data line into tokens: absolute values (AFFN, PAC, SQZ), differences (DIF) and repeat counts (DUP). */
export function tokenizeAsdf(text: string, lineNo: number): Token[] {
  const out: Token[] = [];
  let i = 0;
  const n = text.length;
  // E and e are the SQZ digits 5 and −5 unless the line is plain AFFN and they introduce a short exponent that
  // ends a number (exponents belong to AFFN only).
  const compressed = /[@%A-DF-Za-df-z]/.test(text.replace(/\$\$.*$/, ''));
  while (i < n) {
    const ch = text[i] as string;
    if (ch === ' ' || ch === '\t' || ch === ',' || ch === ';') {
      i++;
      continue;
    }
    if (ch === '?') {
      // A missing value: kept as NaN so that the X grid stays aligned.
      out.push({ kind: 'abs', value: Number.NaN });
      i++;
      continue;
    }
    if (ch === '$' && text[i + 1] === '$') break; // a comment runs to the end of the line
    const start = tokenStart(ch, lineNo);
    i += start.width;
    const end = endOfNumber(text, i, start.kind === 'abs' && start.lead === undefined && !compressed);
    out.push(tokenOf(start, start.digits + text.slice(i, end), lineNo));
    i = end;
  }
  return out;
}

/**
 * How a token starts: its kind, the characters taken and the sign and first digit they carry. A lead character
 * (SQZ, DIF, DUP) is the first digit, its sign the value's sign; an explicit sign is taken; a digit or point
 * starts a plain number.
 */
interface TokenStart {
  readonly kind: Token['kind'];
  readonly lead?: number;
  readonly sign: number;
  readonly digits: string;
  readonly width: number;
}

function tokenStart(ch: string, lineNo: number): TokenStart {
  const led = (kind: Token['kind'], lead: number): TokenStart => ({
    kind,
    lead,
    sign: lead < 0 ? -1 : 1,
    digits: String(Math.abs(lead)),
    width: 1,
  });
  if (ch in SQZ) return led('abs', SQZ[ch] as number);
  if (ch in DIF) return led('dif', DIF[ch] as number);
  if (ch in DUP) return led('dup', DUP[ch] as number);
  if (ch === '+' || ch === '-') return { kind: 'abs', sign: ch === '-' ? -1 : 1, digits: '', width: 1 };
  if (ch === '.' || (ch >= '0' && ch <= '9')) return { kind: 'abs', sign: 1, digits: '', width: 0 };
  fail(lineNo, `unexpected character "${ch}" in the data`);
}

/** Where the digits and points from `i` end; with `exponent`, a short exponent that ends the number is taken too. */
function endOfNumber(text: string, i: number, exponent: boolean): number {
  const n = text.length;
  let end = i;
  while (end < n) {
    const c = text[end] as string;
    if ((c >= '0' && c <= '9') || c === '.') end++;
    else if ((c === 'E' || c === 'e') && exponent && /^[Ee][+-]?\d{1,3}(?=[\s,;]|$)/.test(text.slice(end))) {
      end += text[end + 1] === '+' || text[end + 1] === '-' ? 2 : 1;
    } else break;
  }
  return end;
}

/** The token of the digits read after its start: a repeat count as it is, any other value with its sign. */
function tokenOf(start: TokenStart, digits: string, lineNo: number): Token {
  if (digits === '' || digits === '.') fail(lineNo, 'a number was expected');
  const v = Number(digits);
  if (!Number.isFinite(v)) fail(lineNo, `"${digits}" is not a number`);
  return { kind: start.kind, value: start.kind === 'dup' ? v : start.sign * v };
}

/**
 * Expand tokens into Y values: DIF adds to the last value, DUP repeats the last token n − 1 more times. At most
 * `budget` values are produced: a repeat count is checked against it before anything is repeated.
 */
function expand(tokens: Token[], lineNo: number, budget: number): { values: number[]; endsWithDif: boolean } {
  const values: number[] = [];
  let last: Token | undefined;
  for (const t of tokens) {
    if (t.kind === 'dup') {
      if (!last) fail(lineNo, 'a DUP count with nothing to repeat');
      if (!Number.isInteger(t.value) || t.value < 1) fail(lineNo, `DUP count ${t.value} is not a whole number ≥ 1`);
      if (values.length + t.value - 1 > budget)
        fail(lineNo, `DUP count ${t.value} gives more Y values than ##NPOINTS= leaves for this line (${budget})`);
      for (let k = 1; k < t.value; k++) apply(last);
      continue;
    }
    if (values.length >= budget) fail(lineNo, `more Y values than ##NPOINTS= leaves for this line (${budget})`);
    apply(t);
    last = t;
  }
  return { values, endsWithDif: last?.kind === 'dif' };
  function apply(t: Token) {
    if (t.kind === 'abs') values.push(t.value);
    else {
      if (values.length === 0) fail(lineNo, 'a DIF value with no value before it');
      values.push((values[values.length - 1] as number) + t.value);
    }
  }
}

/** Values in one tuple of a table form: (XY..XY) 2, (XYW..XYW) or (XYM..XYM) 3. */
function tupleWidth(form: string): number {
  const m = /^\(([A-Z]+)\.\./.exec(form);
  return m ? Math.max(2, (m[1] as string).length) : 2;
}

/**
 * The tuples of one line of a table: "x,y x,y", "x, y; x, y" (commas inside a tuple, spaces or semicolons between),
 * or, as many instruments write peak tables, "x y" with only spaces: then consecutive values are grouped by the
 * width of the form.
 */
function tuplesOfLine(line: string, width: number, lineNo: number): string[][] {
  const t = line.replace(/\$\$.*$/, '').trim();
  if (t === '') return [];
  if (t.includes(',')) {
    return t
      .replace(/\s*,\s*/g, ',')
      .split(/[;\s]+/)
      .filter((g) => g !== '')
      .map((g) => g.split(','));
  }
  const groups = t.includes(';') ? t.split(';').map((g) => g.trim()) : [t];
  const out: string[][] = [];
  for (const g of groups.filter((x) => x !== '')) {
    const values = g.split(/\s+/);
    if (groups.length > 1 || values.length <= width) {
      out.push(values);
      continue;
    }
    if (values.length % width !== 0)
      fail(lineNo, `${values.length} values cannot be read as ${width}-value tuples separated by spaces`);
    for (let k = 0; k < values.length; k += width) out.push(values.slice(k, k + width));
  }
  return out;
}

/** One unit of the last decimal place of the X value that starts a data line ("4394" → 1, "4394.2" → 0.1). */
function writtenResolution(line: string): number {
  const m = /^\s*[+-]?\d*(?:\.(\d*))?/.exec(line);
  const decimals = m?.[1]?.length ?? 0;
  return 10 ** -decimals;
}

/** Bounds checked while reading, before anything is allocated for them. */
export interface JcampLimits {
  /** Most points of a spectrum (##NPOINTS, or the pairs of ##XYPOINTS). Default 5 000 000. */
  readonly maxPoints?: number;
  /** Most peaks of a ##PEAK TABLE. Default: maxPoints. */
  readonly maxPeaks?: number;
}

export function parseJcamp(text: string, limits: JcampLimits = {}): JcampData {
  const lines = text.split(/\r\n|\r|\n/);
  const block = readLabels(lines);
  const { labels, dataLabel } = block;
  if (!labels.has('TITLE')) fail(1, 'the file does not start with ##TITLE= (is it JCAMP-DX?)');
  if (dataLabel === undefined) fail(lines.length, 'no ##XYDATA=, ##XYPOINTS= or ##PEAK TABLE= block');
  const num = numberOf(labels);
  const head: DataHead = {
    xFactor: num('XFACTOR', 1),
    yFactor: num('YFACTOR', 1),
    xUnits: labels.get('XUNITS') ?? '1/CM',
    yUnits: labels.get('YUNITS') ?? 'ABSORBANCE',
    title: labels.get('TITLE') ?? '',
    labels,
  };
  const maxPoints = limits.maxPoints ?? 5_000_000;
  if (dataLabel === 'XYPOINTS' || dataLabel === 'PEAKTABLE') {
    const maxPairs = dataLabel === 'PEAKTABLE' ? (limits.maxPeaks ?? maxPoints) : maxPoints;
    return readPairs(lines, { ...block, dataLabel }, head, maxPairs);
  }
  return readXyData(lines, block, head, num, maxPoints);
}

/** The labelled data records before the data block, and where that block starts and ends. */
interface LabelledBlock {
  readonly labels: Map<string, string>;
  readonly dataLabel: 'XYDATA' | 'XYPOINTS' | 'PEAKTABLE' | undefined;
  /** The block's form, e.g. "(X++(Y..Y))", without spaces, upper case. */
  readonly dataForm: string;
  /** First and one-past-last line of the block. */
  readonly dataStart: number;
  readonly dataEnd: number;
}

function readLabels(lines: readonly string[]): LabelledBlock {
  const labels = new Map<string, string>();
  let dataLabel: LabelledBlock['dataLabel'];
  let dataForm = '';
  let dataStart = -1;
  let dataEnd = lines.length;
  for (let i = 0; i < lines.length; i++) {
    const raw = (lines[i] as string).replace(/\$\$.*$/, '');
    // Every labelled data record is "##LABEL=value"; real files also end with a bare "##END".
    const m = /^\s*##([^=]*)=(.*)$/.exec(raw) ?? (/^\s*##\s*END\s*$/i.test(raw) ? ['', 'END', ''] : null);
    if (!m) continue;
    const label = normaliseLabel(m[1] as string);
    const value = (m[2] as string).trim();
    if (dataLabel !== undefined && dataEnd === lines.length) dataEnd = i;
    if (label === 'XYDATA' || label === 'XYPOINTS' || label === 'PEAKTABLE') {
      if (dataLabel !== undefined) break; // a second data block (a link or a second spectrum) is not read
      dataLabel = label;
      dataForm = value.replace(/\s/g, '').toUpperCase();
      dataStart = i + 1;
      dataEnd = lines.length;
      continue;
    }
    if (label === 'END') {
      if (dataLabel !== undefined && dataEnd === lines.length) dataEnd = i;
      break;
    }
    if (!labels.has(label)) labels.set(label, value);
  }
  return { labels, dataLabel, dataForm, dataStart, dataEnd };
}

/** A numeric label's value; a missing one takes the fallback or is refused. */
function numberOf(labels: ReadonlyMap<string, string>): (label: string, fallback?: number) => number {
  return (label, fallback) => {
    const v = labels.get(label);
    if (v === undefined || v === '') {
      if (fallback !== undefined) return fallback;
      fail(1, `##${label}= is required`);
    }
    const x = Number(v);
    if (!Number.isFinite(x)) fail(1, `##${label}=${v} is not a number`);
    return x;
  };
}

/** What every data block is read with. */
interface DataHead {
  readonly xFactor: number;
  readonly yFactor: number;
  readonly xUnits: string;
  readonly yUnits: string;
  readonly title: string;
  readonly labels: Map<string, string>;
}

/** ##XYPOINTS= or ##PEAK TABLE=: X,Y pairs (Y may be "?" or missing in a peak table). */
function readPairs(
  lines: readonly string[],
  block: LabelledBlock & { readonly dataLabel: 'XYPOINTS' | 'PEAKTABLE' },
  head: DataHead,
  maxPairs: number,
): JcampData {
  const { dataLabel, dataStart, dataEnd } = block;
  const { xFactor, yFactor, xUnits, yUnits, title, labels } = head;
  const pairs: { x: number; y?: number }[] = [];
  const width = tupleWidth(block.dataForm);
  for (let i = dataStart; i < dataEnd; i++) {
    for (const fields of tuplesOfLine(lines[i] as string, width, i + 1)) {
      const x = Number(fields[0]);
      const y = fields[1] !== undefined && fields[1] !== '?' ? Number(fields[1]) : undefined;
      if (!Number.isFinite(x)) badValue(i + 1, 'X', String(fields[0]), 'is not a finite number');
      if (y !== undefined && !Number.isFinite(y)) badValue(i + 1, 'Y', String(fields[1]), 'is not a finite number');
      if (!Number.isFinite(x * xFactor))
        badValue(i + 1, 'X', String(fields[0]), `times ##XFACTOR=${xFactor} is not a finite number`);
      if (y !== undefined && !Number.isFinite(y * yFactor))
        badValue(i + 1, 'Y', String(fields[1]), `times ##YFACTOR=${yFactor} is not a finite number`);
      if (pairs.length >= maxPairs)
        fail(i + 1, `more than ${maxPairs} ${dataLabel === 'PEAKTABLE' ? 'peaks' : 'points'}`);
      pairs.push({ x: x * xFactor, ...(y !== undefined ? { y: y * yFactor } : {}) });
    }
  }
  if (pairs.length === 0) fail(dataStart, 'the data block is empty');
  if (dataLabel === 'PEAKTABLE') return { kind: 'peaks', peaks: pairs, xUnits, yUnits, title, labels };
  return {
    kind: 'spectrum',
    x: Float64Array.from(pairs, (p) => p.x),
    y: Float64Array.from(pairs, (p) => p.y ?? Number.NaN),
    xUnits,
    yUnits,
    title,
    labels,
  };
}

/** ##XYDATA=(X++(Y..Y)) in any ASDF form, every line's X checked against the point it starts at. */
function readXyData(
  lines: readonly string[],
  block: LabelledBlock,
  head: DataHead,
  num: (label: string, fallback?: number) => number,
  maxPoints: number,
): JcampData {
  const { dataForm, dataStart, dataEnd } = block;
  // Some writers drop the closing parenthesis: "(X++(Y..Y)".
  if (!/^\(X\+\+\(Y\.\.Y\)\)?$/.test(dataForm))
    fail(dataStart, `##XYDATA=${dataForm} is not supported (only (X++(Y..Y)))`);
  const firstX = num('FIRSTX');
  const lastX = num('LASTX');
  const nPoints = num('NPOINTS');
  if (!Number.isInteger(nPoints) || nPoints < 2) fail(1, `##NPOINTS=${nPoints} must be a whole number ≥ 2`);
  if (nPoints > maxPoints) fail(1, `##NPOINTS=${nPoints} is more than the ${maxPoints} points accepted`);
  const grid = { firstX, deltaX: (lastX - firstX) / (nPoints - 1), nPoints };
  const ys = new Float64Array(nPoints);
  const state = { count: 0, pendingCheck: undefined as number | undefined };
  for (let i = dataStart; i < dataEnd; i++) readDataLine(lines[i] as string, i + 1, grid, head, ys, state);
  if (state.count !== nPoints) fail(dataEnd, `${state.count} Y values read, ##NPOINTS= says ${nPoints}`);
  const x = Float64Array.from({ length: nPoints }, (_, k) => firstX + k * grid.deltaX);
  const { xUnits, yUnits, title, labels } = head;
  return { kind: 'spectrum', x, y: ys, xUnits, yUnits, title, labels };
}

/** One line of an (X++(Y..Y)) block: its X checked, its Y values (after a DIF line's check value) appended. */
function readDataLine(
  line: string,
  lineNo: number,
  grid: { readonly firstX: number; readonly deltaX: number; readonly nPoints: number },
  head: DataHead,
  ys: Float64Array,
  state: { count: number; pendingCheck: number | undefined },
): void {
  const { firstX, deltaX, nPoints } = grid;
  const { xFactor, yFactor } = head;
  const text = line.replace(/\$\$.*$/, '');
  if (text.trim() === '') return;
  const tokens = tokenizeAsdf(text, lineNo);
  const first = tokens[0];
  if (first?.kind !== 'abs') fail(lineNo, 'a data line must start with its X value');
  const x = first.value * xFactor;
  const { pendingCheck } = state;
  // This line may hold the points still missing, plus the repeated Y of a DIF check.
  const budget = nPoints - state.count + (pendingCheck !== undefined ? 1 : 0);
  const { values, endsWithDif } = expand(tokens.slice(1), lineNo, budget);
  let vs = values;
  if (pendingCheck !== undefined) {
    // DIF form: this line's first Y repeats the last Y of the line before (the Y-value check).
    if (vs.length === 0 || Math.abs((vs[0] as number) - pendingCheck) > 1e-9 * Math.max(1, Math.abs(pendingCheck))) {
      fail(
        lineNo,
        `DIF Y-value check failed: the line starts with ${vs[0]} but the line before ended with ${pendingCheck}`,
      );
    }
    vs = vs.slice(1);
  }
  // X of the line must match the point it starts at (within half a step); after a Y-value check, that point is
  // the last one of the line before.
  const expectedX = firstX + (pendingCheck !== undefined ? state.count - 1 : state.count) * deltaX;
  // Writers round or truncate the X that starts a line to the digits they print, so the check allows half a
  // step plus one unit of the last digit written (truncation errs by up to one unit).
  const tolerance = Math.abs(deltaX) * 0.5 + writtenResolution(text) * Math.abs(xFactor) + 1e-9 * Math.abs(expectedX);
  if (Math.abs(x - expectedX) > tolerance) {
    fail(
      lineNo,
      `X = ${x} does not continue the data (expected ${expectedX.toPrecision(10)} for point ${state.count + 1})`,
    );
  }
  for (const v of vs) {
    if (state.count >= nPoints) fail(lineNo, `more Y values than ##NPOINTS=${nPoints}`);
    if (!Number.isFinite(v * yFactor))
      badValue(lineNo, 'Y', String(v), `times ##YFACTOR=${yFactor} is not a finite number`);
    ys[state.count++] = v * yFactor;
  }
  // The last Y of a DIF line is a data point here and is repeated, as a check, at the start of the next line.
  state.pendingCheck = endsWithDif ? (values[values.length - 1] as number) : undefined;
}

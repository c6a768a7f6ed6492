import type { CheckResponse } from '../schemas/checks.js';
import type { FitResponse } from '../schemas/fit.js';
import { roundedDisplay } from './round.js';

/**
 * Results as the tables labs file: the per-line table, the constants table and, for checks, the checks table, as
 * RFC 4180 CSV (comma-separated, CRLF line ends, fields quoted when needed). Numbers keep full precision; the
 * constants table adds the rounded display form beside each value. Units are in the column names, written so that
 * the service's own CSV reader takes the lines table back ("position (cm-1)").
 */

export type Cell = string | number | undefined | null;

/**
 * A text cell that a spreadsheet would read as a formula is written with a leading apostrophe, which shows it as text
 * (common practice against CSV formula injection): one that starts with =, +, -, @ (after leading spaces too, which
 * some spreadsheets trim on import), a tab or a carriage return, such as a line id or source `=HYPERLINK(…)` sent by a
 * caller. Numbers, and text that is a plain number ("-0.5"), are written as they are.
 */
const asText = (s: string): string =>
  /^\s*[=+\-@]|^[\t\r]/.test(s) && !(s.trim() === s && Number.isFinite(Number(s))) ? `'${s}` : s;

const cell = (v: Cell): string => {
  if (v === undefined || v === null) return '';
  const s = typeof v === 'number' ? (Number.isFinite(v) ? String(v) : '') : asText(v);
  return /[",\r\n]/.test(s) ? `"${s.replaceAll('"', '""')}"` : s;
};

export function toCsv(rows: readonly (readonly Cell[])[]): string {
  return `${rows.map((r) => r.map(cell).join(',')).join('\r\n')}\r\n`;
}

export function fitLinesRows(r: FitResponse): Cell[][] {
  return [
    [
      'index',
      'id',
      'species',
      'band',
      'branch',
      'j',
      'position (cm-1)',
      'uncertainty (cm-1)',
      'intensity',
      'source',
      'calculated (cm-1)',
      'residual (cm-1)',
      'studentised residual',
      'status',
      'assignment source',
      'reason',
    ],
    ...r.lines.map((l) => [
      l.index,
      l.id,
      l.assignment?.species,
      l.assignment?.band,
      l.assignment?.branch,
      l.assignment?.j,
      l.position,
      l.uncertainty,
      l.intensity,
      l.source,
      l.calculated,
      l.residual,
      l.studentisedResidual,
      l.status,
      l.assignment?.source,
      l.reason,
    ]),
  ];
}

interface Q {
  value: number;
  uncertainty: number;
  unit: string;
}

/** Band origins, level constants and equilibrium constants, one value a row. */
export function fitConstantsRows(r: FitResponse): Cell[][] {
  const rows: Cell[][] = [];
  const add = (group: string, species: string, of: string, name: string, q: Q | undefined) => {
    if (q)
      rows.push([group, species, of, name, q.value, q.uncertainty, q.unit, roundedDisplay(q.value, q.uncertainty)]);
  };
  for (const b of r.bands) add('band', b.species, b.band, 'origin', b.origin);
  for (const l of r.levels) {
    const of = l.label ?? `v=${l.v}`;
    add('level', l.species, of, 'term', l.term);
    add('level', l.species, of, 'B', l.B);
    add('level', l.species, of, 'D', l.D);
    add('level', l.species, of, 'H', l.H);
    add('level', l.species, of, 'L', l.L);
    add('level', l.species, of, 'M', l.M);
    add('level', l.species, of, 'r', l.r);
    add('level', l.species, of, 'q', l.q);
    add('level', l.species, of, 'qJ', l.qJ);
  }
  for (const e of r.equilibrium) {
    for (const [name, q] of Object.entries(e)) {
      if (name !== 'species' && typeof q === 'object' && q !== null) add('equilibrium', e.species, '', name, q as Q);
    }
  }
  return [['group', 'species', 'band or level', 'name', 'value', 'uncertainty', 'unit', 'display'], ...rows];
}

export function checksRows(r: CheckResponse): Cell[][] {
  return [
    ['check', 'status', 'message', 'measured', 'limit'],
    ...r.checks.map((c) => [c.id, c.status, c.message, JSON.stringify(c.measured), JSON.stringify(c.limit)]),
  ];
}

export type TableName = 'lines' | 'constants' | 'checks';

/** The asked table of a fit or check result; a check without a fit has only its checks table. */
export function resultRows(
  kind: 'fit' | 'check',
  result: FitResponse | CheckResponse,
  table: TableName = 'lines',
): Cell[][] {
  if (kind === 'check') {
    const c = result as CheckResponse;
    if (table === 'checks' || !c.fit) return checksRows(c);
    return table === 'constants' ? fitConstantsRows(c.fit as FitResponse) : fitLinesRows(c.fit as FitResponse);
  }
  const f = result as FitResponse;
  return table === 'constants' ? fitConstantsRows(f) : fitLinesRows(f);
}

export const resultCsv = (kind: 'fit' | 'check', result: FitResponse | CheckResponse, table: TableName = 'lines') =>
  toCsv(resultRows(kind, result, table));

/** Whether an Accept header prefers CSV over JSON (q-values honoured; JSON wins ties and absence). */
export function prefersCsv(accept: string | undefined): boolean {
  if (!accept) return false;
  let csv = -1;
  let json = -1;
  for (const part of accept.split(',')) {
    const [type = '', ...params] = part.trim().toLowerCase().split(';');
    const q = Number(
      params
        .map((p) => p.trim())
        .find((p) => p.startsWith('q='))
        ?.slice(2) ?? '1',
    );
    const weight = Number.isFinite(q) ? q : 0;
    if (type.trim() === 'text/csv') csv = Math.max(csv, weight);
    if (type.trim() === 'application/json' || type.trim() === 'application/*' || type.trim() === '*/*')
      json = Math.max(json, type.trim() === 'application/json' ? weight : weight - 0.001);
  }
  return csv > 0 && csv > json;
}

/** Response headers of every CSV answer: the safety notice and the codes of the fit's warnings (or "none"). */
export const NOTICE_HEADER = 'Branchwise-Notice';
export const WARNINGS_HEADER = 'Branchwise-Warnings';

interface Cautions {
  readonly notice: string;
  readonly warnings: readonly { readonly code: string; readonly message: string }[];
}

/** The cautions a JSON answer carries and its CSV tables leave out: the notice and the fit's warnings. */
function cautionsOf(kind: 'fit' | 'check', result: FitResponse | CheckResponse): Cautions {
  const fit = kind === 'check' ? ((result as CheckResponse).fit as FitResponse | null) : (result as FitResponse);
  return { notice: result.notice, warnings: fit?.warnings ?? [] };
}

/** A header value: printable ASCII only (a warning's message may hold σ or ″, which HTTP headers cannot carry). */
const headerText = (s: string) => s.replace(/[^\x20-\x7e]/g, '?');

/** The two caution headers of a CSV answer: the notice as it is, the distinct warning codes comma-separated. */
export function cautionHeaders(kind: 'fit' | 'check', result: FitResponse | CheckResponse): Record<string, string> {
  const c = cautionsOf(kind, result);
  const codes = [...new Set(c.warnings.map((w) => w.code))];
  return {
    [NOTICE_HEADER]: headerText(c.notice),
    [WARNINGS_HEADER]: codes.length > 0 ? headerText(codes.join(', ')) : 'none',
  };
}

/**
 * The table in CSV, preceded when asked (`?comments=true`) by comment lines: "# notice: …" and one
 * "# warning CODE: message" line per warning. The table below them is the same bytes as without them.
 */
export function resultCsvAnswer(
  kind: 'fit' | 'check',
  result: FitResponse | CheckResponse,
  table: TableName,
  comments: boolean,
): string {
  const csv = resultCsv(kind, result, table);
  if (!comments) return csv;
  const c = cautionsOf(kind, result);
  const oneLine = (s: string) => s.replace(/[\r\n]+/g, ' ');
  const lines = [
    `# notice: ${oneLine(c.notice)}`,
    ...c.warnings.map((w) => `# warning ${oneLine(w.code)}: ${oneLine(w.message)}`),
  ];
  return `${lines.join('\r\n')}\r\n${csv}`;
}

import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { parseArgs } from 'node:util';
import type { z } from 'zod';
import { DEFAULT_CONFIG } from '../services/config.js';
import { type Cell, resultRows, type TableName, toCsv } from '../services/formats/csv-tables.js';
import { roundedDisplay } from '../services/formats/round.js';
import { SOFTWARE } from '../services/provenance.js';
import { nonFiniteLiteral } from '../services/raw-body.js';
import { checkRequestSchema, TolerancesSchema } from '../services/schemas/checks.js';
import { fitRequestSchema } from '../services/schemas/fit.js';
import { PeaksRequestSchema } from '../services/schemas/peaks.js';
import { PredictionRequestSchema } from '../services/schemas/predictions.js';
import { queryTemperature, TEMPERATURE_MESSAGE } from '../services/schemas/query.js';
import { CSV_TYPES, JCAMP_TYPES, textBodyToJson } from '../services/text-bodies.js';
import { runCheck } from '../services/usecases/check.js';
import { runFit } from '../services/usecases/fit.js';
import { runPeaks } from '../services/usecases/peaks.js';
import { runPrediction } from '../services/usecases/predict.js';
import { runReport } from '../services/usecases/report.js';
import { ScienceError } from '../src/errors.js';
import { potentialCommand } from './potential.js';

/**
 * The command-line face: the same use cases as the HTTP service, in-process, on local JSON, CSV and JCAMP-DX
 * files. Exit codes: 0 pass (or success), 1 warn, 2 fail, 3 bad input, 4 usage.
 */
export interface Io {
  readonly out: (s: string) => void;
  readonly err: (s: string) => void;
  readonly isTty: boolean;
}

export const EXIT = { pass: 0, warn: 1, fail: 2, input: 3, usage: 4 } as const;

/** The caution the CLI prints under its help and every table (the services' SAFETY_NOTICE, shortened). */
export const CLI_NOTICE =
  'branchwise computes constants from data; it certifies nothing about the safety or purity of a gas. ' +
  'Follow local codes, the safety data sheets and licensed practice.';

const USAGE = `branchwise — molecular constants from line lists and spectra of diatomic and linear gases

  branchwise fit <file...>     [--species S] [--unit U] [--temperature K] [--format table|json|csv] [--table lines|constants]
                               [--detail lean|full]
  branchwise check <file...>   [--species S] [--tolerances profile.json] [--temperature K] [--format table|json|csv]
                               [--table checks|lines|constants] [--detail lean|full]
  branchwise report <file>     [--species S] [--tolerances profile.json] [--temperature K] [--out report.html]
  branchwise peaks <file...>   [--format table|json|csv]
  branchwise predict [body.json] --species S [--bands 1-0,2-0] [--jmax N] [--temperature K] [--unit U] [--format table|json|csv]
  branchwise potential (--species S | <file>) --vmax N [--format table|json]
  branchwise --version

Files: .json (the body of the matching HTTP endpoint), .csv (a spectrum or a line list), .jdx/.dx/.jcamp (JCAMP-DX).
JSON answers of lists of more than 1 000 lines are lean: each line leaves out the uncertainty, intensity and
assignment the file already holds (assignments the fit made stay); --detail full keeps them, --detail lean asks
for it at any size.
--format csv writes the table alone to stdout; each file's warnings and the caution below go to stderr.
--table picks one table for --format table or csv: lines (each line's residual, status and the reason for a
rejection), constants, or checks; without it the table form prints bands, levels and equilibrium constants (fit)
or the checks (check), and csv the lines (fit) or the checks (check).
A file that cannot be read is reported under its name; the other files are still processed.
Exit status: 0 pass, 1 warn, 2 fail (check, report); 3 bad input; 4 usage.
${CLI_NOTICE}`;

const FORMATS = ['table', 'json', 'csv'] as const;
type Format = (typeof FORMATS)[number];

/** Errors that belong to one input file (or to the tolerance profile): reported under that file's name. */
class FileError extends Error {
  constructor(
    readonly file: string,
    readonly code: string,
    message: string,
  ) {
    super(`${file}: ${message}`);
  }
}

/** Read a file; whatever goes wrong is reported under its name with the reason in words. */
function readText(path: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why =
      code === 'ENOENT'
        ? 'no such file'
        : code === 'EISDIR'
          ? 'is a directory'
          : code === 'EACCES'
            ? 'permission denied'
            : (e as Error).message;
    throw new FileError(path, 'FILE_UNREADABLE', why);
  }
}

/** The tolerance profile of --tolerances: read, parsed and validated on its own, errors under its own name. */
function tolerancesOf(path: string): unknown {
  const text = readText(path);
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    throw new FileError(path, 'INVALID_JSON', `not valid JSON (${(e as Error).message})`);
  }
  const r = TolerancesSchema.safeParse(json);
  if (!r.success) {
    const first = r.error.issues
      .slice(0, 3)
      .map((i) => `${i.path.join('/') || '(profile)'}: ${i.message}`)
      .join('; ');
    throw new FileError(path, 'VALIDATION_FAILED', `not a tolerance profile: ${first}`);
  }
  return r.data;
}

function bodyOf(path: string, extra: Record<string, unknown>): Record<string, unknown> {
  const text = readText(path);
  const ext = extname(path).toLowerCase();
  const query = Object.fromEntries(
    Object.entries(extra)
      .filter(([, v]) => v !== undefined)
      .map(([k, v]) => [k, String(v)]),
  );
  if (ext === '.json') {
    let body: Record<string, unknown>;
    try {
      body = JSON.parse(text) as Record<string, unknown>;
    } catch (e) {
      const literal = nonFiniteLiteral(text);
      if (literal) throw new FileError(path, 'VALIDATION_FAILED', literal.message);
      throw new FileError(path, 'INVALID_JSON', `not valid JSON (${(e as Error).message})`);
    }
    if (extra.species !== undefined) body.species = extra.species;
    return body;
  }
  try {
    if (ext === '.csv') return textBodyToJson(CSV_TYPES[0], text, query);
    if (['.jdx', '.dx', '.jcamp', '.jcm'].includes(ext)) return textBodyToJson(JCAMP_TYPES[0], text, query);
  } catch (e) {
    if (e instanceof ScienceError) throw new FileError(path, e.code, e.message);
    throw e;
  }
  throw new FileError(path, 'INPUT_INVALID', `unknown file type "${ext}" (json, csv, jdx, dx, jcamp)`);
}

function parseOrThrow<T>(schema: z.ZodType<T>, body: unknown, file: string): T {
  const r = schema.safeParse(body);
  if (r.success) return r.data;
  const first = r.error.issues
    .slice(0, 3)
    .map((i) => `${i.path.join('/') || '(body)'}: ${i.message}`)
    .join('; ');
  throw new FileError(file, 'VALIDATION_FAILED', first);
}

const fmt = (v: number | undefined, digits = 6) =>
  v === undefined
    ? ''
    : Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-3 && v !== 0)
      ? v.toExponential(digits - 1)
      : v.toPrecision(digits);
/**
 * A predicted position without an uncertainty, to 12 significant digits in plain notation: six digits (0.01 cm⁻¹
 * at 2000 cm⁻¹, 1 MHz at 115 GHz) are coarser than the lines a lab compares them with.
 */
const exactPosition = (v: number) => String(Number(v.toPrecision(12)));
/** A value rounded to two significant digits of its uncertainty (the JSON and CSV forms keep full precision). */
const q = (x?: { value: number; uncertainty: number }) => (x ? roundedDisplay(x.value, x.uncertainty) : '');

function table(rows: string[][]): string {
  const widths = rows[0]?.map((_, c) => Math.max(...rows.map((r) => (r[c] ?? '').length))) ?? [];
  return rows
    .map((r) =>
      r
        .map((cell, c) => cell.padEnd(widths[c] ?? 0))
        .join('  ')
        .trimEnd(),
    )
    .join('\n');
}

function progress(io: Io, done: number, total: number, name: string): void {
  if (!io.isTty || total < 2) return;
  const width = 24;
  const filled = Math.round((width * done) / total);
  io.err(
    `\r[${'#'.repeat(filled)}${' '.repeat(width - filled)}] ${done}/${total} ${name.slice(0, 40).padEnd(40)}${done === total ? '\n' : ''}`,
  );
}

export function main(argv: readonly string[], io: Io): number {
  let parsed: ReturnType<typeof parseArgs>;
  try {
    parsed = parseArgs({
      args: [...argv],
      allowPositionals: true,
      options: {
        species: { type: 'string' },
        unit: { type: 'string' },
        temperature: { type: 'string' },
        tolerances: { type: 'string' },
        bands: { type: 'string' },
        jmax: { type: 'string' },
        vmax: { type: 'string' },
        format: { type: 'string', default: 'table' },
        table: { type: 'string' },
        detail: { type: 'string' },
        out: { type: 'string', short: 'o' },
        version: { type: 'boolean', short: 'V' },
        help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (e) {
    io.err(`${(e as Error).message}\n\n${USAGE}\n`);
    return EXIT.usage;
  }
  const [command, ...files] = parsed.positionals;
  const v = parsed.values as Record<string, string | boolean | undefined>;
  if (v.version) {
    io.out(`${SOFTWARE.name} ${SOFTWARE.version} (reference library ${SOFTWARE.libraryVersion})\n`);
    return EXIT.pass;
  }
  if (v.help || !command) {
    io.out(`${USAGE}\n`);
    return v.help ? EXIT.pass : EXIT.usage;
  }
  if (!(FORMATS as readonly string[]).includes(String(v.format))) {
    io.err(`--format ${String(v.format)} is not one of ${FORMATS.join(', ')}\n`);
    return EXIT.usage;
  }
  const format = v.format as Format;
  if (v.detail !== undefined && v.detail !== 'lean' && v.detail !== 'full') {
    io.err(`--detail ${String(v.detail)} is not one of lean, full\n`);
    return EXIT.usage;
  }
  const tables: Record<string, readonly TableName[]> = {
    fit: ['lines', 'constants'],
    check: ['checks', 'lines', 'constants'],
  };
  if (v.table !== undefined && !(tables[command] ?? []).includes(v.table as TableName)) {
    io.err(`--table ${String(v.table)} is not one of ${(tables[command] ?? ['(none for this command)']).join(', ')}\n`);
    return EXIT.usage;
  }
  // The rule of ?temperature= (services/schemas/query.ts): a CSV file's temperature that broke it was a 422-like
  // input error, a JSON file's was never read, predict's went to the body's range check.
  if (typeof v.temperature === 'string' && queryTemperature(v.temperature) === undefined) {
    io.err(`--temperature ${v.temperature}: ${TEMPERATURE_MESSAGE}\n`);
    return EXIT.usage;
  }
  try {
    if (command === 'predict') return predict(v, format, io, files[0]);
    if (command === 'potential') {
      if (format === 'csv') {
        io.err('potential has no CSV form: use --format table or json\n');
        return EXIT.usage;
      }
      const r = potentialCommand(v, files);
      io.out(
        format === 'json' ? `${JSON.stringify(r.json, null, 2)}\n` : `${r.text.replace(/\n?$/, '\n')}${CLI_NOTICE}\n`,
      );
      return EXIT.pass;
    }
    if (!['fit', 'check', 'peaks', 'report'].includes(command)) {
      io.err(`unknown command "${command}"\n\n${USAGE}\n`);
      return EXIT.usage;
    }
    if (files.length === 0) {
      io.err(`${command} needs at least one file\n`);
      return EXIT.usage;
    }
    if (command === 'report' && files.length !== 1) {
      io.err('report takes one file\n');
      return EXIT.usage;
    }
    const tolerances = typeof v.tolerances === 'string' ? tolerancesOf(v.tolerances) : undefined;
    if (command === 'report') return report(files[0] as string, v, tolerances, io);

    let worst: number = EXIT.pass;
    const results: unknown[] = [];
    const csvRows: Cell[][] = [];
    files.forEach((file, k) => {
      progress(io, k, files.length, basename(file));
      try {
        const r = runOne(command as 'fit' | 'check' | 'peaks', file, v, tolerances, format, io);
        results.push({ file, ...r.result });
        worst = Math.max(worst, r.exit);
        const rows = r.rows;
        if (format === 'csv') {
          // stdout is the table alone; what qualifies its numbers goes to stderr, as the table form prints it.
          for (const w of warningsOf(r.result)) io.err(`${file}: warning: ${w}\n`);
          // One table for all files: a leading "file" column when there are several.
          const body = csvRows.length === 0 ? rows : rows.slice(1);
          csvRows.push(
            ...(files.length > 1
              ? body.map((row, i) => [csvRows.length === 0 && i === 0 ? 'file' : file, ...row])
              : body),
          );
        }
      } catch (e) {
        if (!(e instanceof FileError || e instanceof ScienceError)) throw e;
        const fileError = e instanceof FileError ? e : new FileError(file, e.code, e.message);
        io.err(`error: ${fileError.message}\n`);
        results.push({ file, error: { code: fileError.code, message: fileError.message } });
        worst = Math.max(worst, EXIT.input);
      }
    });
    progress(io, files.length, files.length, '');
    if (format === 'json') io.out(`${JSON.stringify(files.length === 1 ? results[0] : results, null, 2)}\n`);
    if (format === 'csv' && csvRows.length > 0) io.out(toCsv(csvRows));
    if (format === 'csv') io.err(`${CLI_NOTICE}\n`);
    if (format === 'table') io.out(`${CLI_NOTICE}\n`);
    // A single file that could not be read prints no JSON: its error went to stderr.
    if (format === 'json' && files.length === 1 && (results[0] as { error?: unknown }).error) return EXIT.input;
    return worst;
  } catch (e) {
    if (e instanceof FileError || e instanceof ScienceError || e instanceof SyntaxError) {
      io.err(`error: ${(e as Error).message}\n`);
      return EXIT.input;
    }
    throw e;
  }
}

function predict(v: Record<string, string | boolean | undefined>, format: Format, io: Io, file?: string): number {
  // A .json file is the body of POST /v1/predictions (linear polyatomics: species, levels and { upper, lower } bands).
  const body = file !== undefined ? bodyOf(file, typeof v.species === 'string' ? { species: v.species } : {}) : {};
  if (typeof v.species !== 'string' && typeof body.species !== 'string') {
    throw new ScienceError('INPUT_INVALID', 'predict needs --species (or a .json body with "species")', {});
  }
  const req = parseOrThrow(
    PredictionRequestSchema,
    {
      ...body,
      ...(typeof v.species === 'string' ? { species: v.species } : {}),
      ...(typeof v.bands === 'string' ? { bands: v.bands.split(',') } : {}),
      ...(typeof v.jmax === 'string' ? { jMax: Number(v.jmax) } : {}),
      ...(typeof v.temperature === 'string' ? { temperature: Number(v.temperature) } : {}),
      ...(typeof v.unit === 'string' ? { unit: v.unit } : {}),
    },
    'arguments',
  );
  const r = runPrediction(req);
  const rows: Cell[][] = [
    ['band', 'branch', 'j', `position (${req.unit})`, `uncertainty (${req.unit})`, 'relative intensity'],
    ...r.lines.map((l) => [l.band, l.branch, l.j, l.position.value, l.position.uncertainty, l.relativeIntensity]),
  ];
  if (format === 'json') io.out(`${JSON.stringify(r, null, 2)}\n`);
  else if (format === 'csv') {
    io.out(toCsv(rows));
    io.err(`${CLI_NOTICE}\n`);
  } else
    io.out(
      `${table([['band', 'line', `position (${req.unit})`, 'rel. intensity'], ...r.lines.map((l) => [l.band, `${l.branch}(${l.j})`, l.position.uncertainty === null ? exactPosition(l.position.value) : q({ value: l.position.value, uncertainty: l.position.uncertainty }), fmt(l.relativeIntensity, 3)])])}\n${CLI_NOTICE}\n`,
    );
  return EXIT.pass;
}

function report(file: string, v: Record<string, string | boolean | undefined>, tolerances: unknown, io: Io): number {
  const body = bodyOf(file, {
    species: v.species,
    ...(typeof v.temperature === 'string' ? { temperature: v.temperature } : {}),
  });
  if (typeof v.unit === 'string' && body.lines) body.unit = v.unit;
  const req = parseOrThrow(
    checkRequestSchema(DEFAULT_CONFIG.maxLines),
    { ...body, ...(tolerances ? { tolerances } : {}) },
    file,
  );
  // The report's provenance: this program's versions and the SHA-256 of the file exactly as read.
  const sha256 = createHash('sha256').update(readFileSync(file)).digest('hex');
  const html = runReport(req, { provenance: { software: SOFTWARE, input: { sha256 } } });
  const verdict = /<div class="verdict (pass|warn|fail)" id="verdict">/.exec(html)?.[1] as
    | keyof typeof EXIT
    | undefined;
  if (typeof v.out === 'string') {
    try {
      writeFileSync(v.out, html);
    } catch (e) {
      throw new FileError(v.out, 'FILE_UNWRITABLE', (e as Error).message);
    }
    io.err(`wrote ${v.out}\n`);
  } else io.out(html);
  return verdict ? EXIT[verdict] : EXIT.pass;
}

interface OneResult {
  readonly result: Record<string, unknown>;
  readonly rows: Cell[][];
  readonly exit: number;
}

function runOne(
  command: 'fit' | 'check' | 'peaks',
  file: string,
  v: Record<string, string | boolean | undefined>,
  tolerances: unknown,
  format: Format,
  io: Io,
): OneResult {
  const body = bodyOf(file, {
    species: v.species,
    ...(typeof v.temperature === 'string' ? { temperature: v.temperature } : {}),
  });
  if (typeof v.unit === 'string' && body.lines) body.unit = v.unit;
  const tableName = v.table as TableName | undefined;
  if (command === 'peaks') {
    const r = runPeaks(
      parseOrThrow(
        PeaksRequestSchema,
        { spectrum: body.spectrum, ...(body.peakOptions ? { peakOptions: body.peakOptions } : {}) },
        file,
      ),
    );
    const rows: Cell[][] = [
      ['position (cm-1)', 'uncertainty (cm-1)', 'intensity (cm-1)', 'width (cm-1)', 'height (absorbance)'],
      ...r.peaks.map((p) => [p.position, p.uncertainty, p.intensity, p.width, p.height]),
    ];
    if (format === 'table') {
      io.out(
        `${file}: ${r.peaks.length} peaks, noise ${fmt(r.noise, 3)}\n${table([['position (cm-1)', 'intensity', 'width'], ...r.peaks.map((p) => [roundedDisplay(p.position, p.uncertainty), fmt(p.intensity, 4), fmt(p.width, 3)])])}\n`,
      );
    }
    return { result: r as unknown as Record<string, unknown>, rows, exit: EXIT.pass };
  }
  if (command === 'fit' || command === 'check') setDetail(body, v.detail, format);
  if (command === 'fit') {
    const r = runFit(parseOrThrow(fitRequestSchema(DEFAULT_CONFIG.maxLines), body, file));
    const rows = resultRows('fit', r, tableName ?? 'lines');
    if (format === 'table')
      io.out(
        tableName === undefined
          ? fitTable(file, r)
          : chosenTable(
              `${file}: ${r.statistics.fitted} of ${r.statistics.lines} lines fitted, rms ${fmt(r.statistics.rms, 3)} cm-1`,
              rows,
              r.warnings.map((w) => w.message),
            ),
      );
    return { result: r as unknown as Record<string, unknown>, rows, exit: EXIT.pass };
  }
  const r = runCheck(
    parseOrThrow(checkRequestSchema(DEFAULT_CONFIG.maxLines), { ...body, ...(tolerances ? { tolerances } : {}) }, file),
  );
  const rows = resultRows('check', r, tableName ?? 'checks');
  const warnings = warningsOf(r as unknown as Record<string, unknown>);
  if (format === 'table' && (tableName === undefined || tableName === 'checks')) {
    io.out(
      `${file}: ${r.verdict.toUpperCase()}\n${table([['check', 'status', 'message'], ...r.checks.map((c) => [c.id, c.status, c.message])])}\n${warnings
        .map((w) => `warning: ${w}\n`)
        .join('')}`,
    );
  } else if (format === 'table') io.out(chosenTable(`${file}: ${r.verdict.toUpperCase()}`, rows, warnings));
  return { result: r as unknown as Record<string, unknown>, rows, exit: EXIT[r.verdict] };
}

/**
 * The table --table names, in the table form: the rows of the CSV form aligned in columns (numbers to 10 significant
 * digits, the constants' `display` column rounded to their uncertainties), under the file's summary and over its
 * warnings, so `--table lines` shows each line's residual and status, and the reason for a rejection, in a terminal.
 */
function chosenTable(summary: string, rows: readonly Cell[][], warnings: readonly string[]): string {
  const text = (c: Cell) =>
    c === undefined || c === null ? '' : typeof c === 'number' ? String(Number(c.toPrecision(10))) : c;
  return `${summary}\n${table(rows.map((r) => r.map(text)))}\n${warnings.map((w) => `warning: ${w}\n`).join('')}`;
}

/** The warning messages of a fit, or of the fit inside a check (none for peaks). */
function warningsOf(result: Record<string, unknown>): string[] {
  const fit = (result.fit ?? result) as { warnings?: readonly { message: string }[] };
  return (fit.warnings ?? []).map((w) => w.message);
}

/** Lists longer than this are answered lean in JSON unless --detail full or the file's own options.lean says otherwise. */
export const LEAN_FROM_LINES = 1000;

/**
 * options.lean of a fit or check body: as --detail says (lean, full); otherwise lean for JSON answers of lists of
 * more than LEAN_FROM_LINES lines (the per-line echoes of what the file already holds are most of such an answer),
 * unless the file sets it itself.
 */
function setDetail(body: Record<string, unknown>, detail: string | boolean | undefined, format: Format): void {
  const options = (body.options ?? {}) as Record<string, unknown>;
  if (detail === 'lean' || detail === 'full') body.options = { ...options, lean: detail === 'lean' };
  else if (format === 'json' && Array.isArray(body.lines) && body.lines.length > LEAN_FROM_LINES)
    body.options = { lean: true, ...options };
}

/** The fit as a person reads it: band origins, level constants, equilibrium constants, each rounded to its uncertainty. */
function fitTable(file: string, r: ReturnType<typeof runFit>): string {
  const bands = r.bands.map((b) => [
    b.species,
    b.band,
    q(b.origin),
    String(b.lines),
    `${b.jRange[0] ?? ''}–${b.jRange[1] ?? ''}`,
  ]);
  const hasQ = r.levels.some((l) => l.q);
  // L_v and M_v, and the higher equilibrium constants, only when the fit has them (fitted, not constrained)
  const hasL = r.levels.some((l) => l.L);
  const hasM = r.levels.some((l) => l.M);
  const levels = r.levels.map((l) => [
    l.species,
    l.label ?? `v=${l.v}`,
    q(l.B),
    q(l.D),
    q(l.H),
    ...(hasL ? [q(l.L)] : []),
    ...(hasM ? [q(l.M)] : []),
    ...(hasQ ? [q(l.q)] : []),
  ]);
  const eqKeys = [
    'omega_e',
    'omega_e_x_e',
    'omega_e_y_e',
    'B_e',
    'alpha_e',
    'gamma_e',
    'D_e',
    'beta_e',
    'H_e',
    'r_e',
  ] as const;
  const eq = r.equilibrium.flatMap((e) =>
    eqKeys.flatMap((k) => (e[k] ? [[e.species, k, q(e[k]), e[k]?.unit ?? '']] : [])),
  );
  return [
    `${file}: ${r.statistics.fitted} of ${r.statistics.lines} lines fitted, rms ${fmt(r.statistics.rms, 3)} cm-1`,
    table([['species', 'band', 'origin (cm-1)', 'lines', 'J range'], ...bands]),
    table([
      [
        'species',
        'level',
        'B (cm-1)',
        'D (cm-1)',
        'H (cm-1)',
        ...(hasL ? ['L (cm-1)'] : []),
        ...(hasM ? ['M (cm-1)'] : []),
        ...(hasQ ? ['q (cm-1)'] : []),
      ],
      ...levels,
    ]),
    ...(r.convention ? [`convention: ${r.convention}`] : []),
    ...(eq.length ? [table([['species', 'constant', 'value ± u', 'unit'], ...eq])] : []),
    ...r.warnings.map((w) => `warning: ${w.message}`),
    '',
  ].join('\n');
}

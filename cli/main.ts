import { readFileSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { parseArgs } from 'node:util';
import type { z } from 'zod';
import { DEFAULT_CONFIG } from '../services/config.js';
import { checkRequestSchema } from '../services/schemas/checks.js';
import { fitRequestSchema } from '../services/schemas/fit.js';
import { PeaksRequestSchema } from '../services/schemas/peaks.js';
import { PredictionRequestSchema } from '../services/schemas/predictions.js';
import { CSV_TYPES, JCAMP_TYPES, textBodyToJson } from '../services/text-bodies.js';
import { runCheck } from '../services/usecases/check.js';
import { runFit } from '../services/usecases/fit.js';
import { runPeaks } from '../services/usecases/peaks.js';
import { runPrediction } from '../services/usecases/predict.js';
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

const USAGE = `branchwise — molecular constants from line lists and spectra of diatomic gases

  branchwise fit <file...>     [--species S] [--unit U] [--temperature K] [--format table|json]
  branchwise check <file...>   [--species S] [--tolerances profile.json] [--temperature K] [--format table|json]
  branchwise peaks <file>      [--format table|json]
  branchwise predict --species S [--bands 1-0,2-0] [--jmax N] [--temperature K] [--unit U] [--format table|json]
  branchwise potential (--species S | <file>) --vmax N [--format table|json]

Files: .json (the body of the matching HTTP endpoint), .csv (a spectrum or a line list), .jdx/.dx/.jcamp (JCAMP-DX).
Exit status: 0 pass, 1 warn, 2 fail (check); 3 bad input; 4 usage.
branchwise computes constants from data; it certifies nothing about the safety or purity of a gas.`;

function bodyOf(path: string, extra: Record<string, unknown>): Record<string, unknown> {
  const text = readFileSync(path, 'utf8');
  const ext = extname(path).toLowerCase();
  const query = Object.fromEntries(
    Object.entries(extra)
      .filter(([, v]) => v !== undefined)
      .map(([k, v]) => [k, String(v)]),
  );
  if (ext === '.json') {
    const body = JSON.parse(text) as Record<string, unknown>;
    if (extra.species !== undefined) body.species = extra.species;
    return body;
  }
  if (ext === '.csv') return textBodyToJson(CSV_TYPES[0], text, query);
  if (['.jdx', '.dx', '.jcamp', '.jcm'].includes(ext)) return textBodyToJson(JCAMP_TYPES[0], text, query);
  throw new ScienceError(
    'INPUT_INVALID',
    `${basename(path)}: unknown file type "${ext}" (json, csv, jdx, dx, jcamp)`,
    {},
  );
}

function parseOrThrow<T>(schema: z.ZodType<T>, body: unknown, file: string): T {
  const r = schema.safeParse(body);
  if (r.success) return r.data;
  const first = r.error.issues
    .slice(0, 3)
    .map((i) => `${i.path.join('/') || '(body)'}: ${i.message}`)
    .join('; ');
  throw new ScienceError('INPUT_INVALID', `${file}: ${first}`, {});
}

const fmt = (v: number | undefined, digits = 6) =>
  v === undefined
    ? ''
    : Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-3 && v !== 0)
      ? v.toExponential(digits - 1)
      : v.toPrecision(digits);
const q = (x?: { value: number; uncertainty: number }) => (x ? `${fmt(x.value, 9)} ± ${fmt(x.uncertainty, 2)}` : '');

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
        help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (e) {
    io.err(`${(e as Error).message}\n\n${USAGE}\n`);
    return EXIT.usage;
  }
  const [command, ...files] = parsed.positionals;
  const v = parsed.values as Record<string, string | boolean | undefined>;
  if (v.help || !command) {
    io.out(`${USAGE}\n`);
    return v.help ? EXIT.pass : EXIT.usage;
  }
  const format = v.format === 'json' ? 'json' : 'table';
  try {
    if (command === 'predict') {
      if (typeof v.species !== 'string') throw new ScienceError('INPUT_INVALID', 'predict needs --species', {});
      const req = parseOrThrow(
        PredictionRequestSchema,
        {
          species: v.species,
          ...(typeof v.bands === 'string' ? { bands: v.bands.split(',') } : {}),
          ...(typeof v.jmax === 'string' ? { jMax: Number(v.jmax) } : {}),
          ...(typeof v.temperature === 'string' ? { temperature: Number(v.temperature) } : {}),
          ...(typeof v.unit === 'string' ? { unit: v.unit } : {}),
        },
        'arguments',
      );
      const r = runPrediction(req);
      if (format === 'json') io.out(`${JSON.stringify(r, null, 2)}\n`);
      else {
        io.out(
          `${table([['band', 'line', `position (${req.unit})`, 'uncertainty', 'rel. intensity'], ...r.lines.map((l) => [l.band, `${l.branch}(${l.j})`, fmt(l.position.value, 10), fmt(l.position.uncertainty, 2), fmt(l.relativeIntensity, 3)])])}\n`,
        );
      }
      return EXIT.pass;
    }
    if (command === 'potential') {
      const r = potentialCommand(v, files);
      io.out(format === 'json' ? `${JSON.stringify(r.json, null, 2)}\n` : r.text);
      return EXIT.pass;
    }
    if (!['fit', 'check', 'peaks'].includes(command)) {
      io.err(`unknown command "${command}"\n\n${USAGE}\n`);
      return EXIT.usage;
    }
    if (files.length === 0) {
      io.err(`${command} needs at least one file\n`);
      return EXIT.usage;
    }
    let worst: number = EXIT.pass;
    const results: unknown[] = [];
    files.forEach((file, k) => {
      progress(io, k, files.length, basename(file));
      const extra = {
        species: v.species,
        ...(typeof v.temperature === 'string' ? { temperature: v.temperature } : {}),
      };
      const body = bodyOf(file, extra);
      if (typeof v.unit === 'string' && body.lines) body.unit = v.unit;
      if (command === 'peaks') {
        const r = runPeaks(
          parseOrThrow(
            PeaksRequestSchema,
            { spectrum: body.spectrum, ...(body.peakOptions ? { peakOptions: body.peakOptions } : {}) },
            file,
          ),
        );
        results.push({ file, ...r });
        if (format === 'table') {
          io.out(
            `${file}: ${r.peaks.length} peaks, noise ${fmt(r.noise, 3)}\n${table([['position (cm-1)', 'uncertainty', 'intensity', 'width'], ...r.peaks.map((p) => [fmt(p.position, 10), fmt(p.uncertainty, 2), fmt(p.intensity, 4), fmt(p.width, 3)])])}\n`,
          );
        }
      } else if (command === 'fit') {
        const r = runFit(parseOrThrow(fitRequestSchema(DEFAULT_CONFIG.maxLines), body, file));
        results.push({ file, ...r });
        if (format === 'table') {
          const eq = r.equilibrium.flatMap((e) =>
            (['omega_e', 'omega_e_x_e', 'B_e', 'alpha_e', 'D_e', 'r_e'] as const).flatMap((k) =>
              e[k] ? [[e.species, k, q(e[k]), e[k]?.unit ?? '']] : [],
            ),
          );
          const lv = r.levels.map((l) => [l.species, `v=${l.v}`, `B ${q(l.B)}`, l.D ? `D ${q(l.D)}` : '']);
          io.out(
            `${file}: ${r.statistics.fitted} of ${r.statistics.lines} lines fitted, rms ${fmt(r.statistics.rms, 3)} cm-1\n${table([['species', 'level', 'B', 'D'], ...lv])}\n${eq.length ? `${table([['species', 'constant', 'value ± u', 'unit'], ...eq])}\n` : ''}${r.warnings.map((w) => `warning: ${w.message}\n`).join('')}`,
          );
        }
      } else {
        const tolerances =
          typeof v.tolerances === 'string' ? JSON.parse(readFileSync(v.tolerances, 'utf8')) : undefined;
        const r = runCheck(
          parseOrThrow(
            checkRequestSchema(DEFAULT_CONFIG.maxLines),
            { ...body, ...(tolerances ? { tolerances } : {}) },
            file,
          ),
        );
        results.push({ file, ...r });
        worst = Math.max(worst, EXIT[r.verdict]);
        if (format === 'table') {
          io.out(
            `${file}: ${r.verdict.toUpperCase()}\n${table([['check', 'status', 'message'], ...r.checks.map((c) => [c.id, c.status, c.message])])}\n`,
          );
        }
      }
    });
    progress(io, files.length, files.length, '');
    if (format === 'json') io.out(`${JSON.stringify(files.length === 1 ? results[0] : results, null, 2)}\n`);
    if (format === 'table')
      io.out('branchwise computes constants from data; it certifies nothing about the safety or purity of a gas.\n');
    return worst;
  } catch (e) {
    if (e instanceof ScienceError || e instanceof SyntaxError || (e as NodeJS.ErrnoException).code === 'ENOENT') {
      io.err(`error: ${(e as Error).message}\n`);
      return EXIT.input;
    }
    throw e;
  }
}

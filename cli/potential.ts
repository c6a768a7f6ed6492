import { readFileSync } from 'node:fs';
import { extname } from 'node:path';
import { DEFAULT_CONFIG } from '../services/config.js';
import { potentialRequestSchema } from '../services/schemas/potentials.js';
import { CSV_TYPES, JCAMP_TYPES, textBodyToJson } from '../services/text-bodies.js';
import { runPotential } from '../services/usecases/potential.js';
import { ScienceError } from '../src/errors.js';

/**
 * `branchwise potential`: RKR turning points and the Morse curve, from the library or a JSON body
 * (`--species S --vmax N`), or from a fit of a line list or spectrum file (`branchwise potential scan.csv --vmax N`).
 */
export function potentialCommand(
  values: Record<string, string | boolean | undefined>,
  files: readonly string[],
): { text: string; json: unknown } {
  if (files.length > 1) throw new ScienceError('INPUT_INVALID', 'potential takes at most one file', {});
  const file = files[0];
  let body: Record<string, unknown> = {};
  if (file !== undefined) {
    const text = readFileSync(file, 'utf8');
    const ext = extname(file).toLowerCase();
    const query = typeof values.species === 'string' ? { species: values.species } : {};
    if (ext === '.json') body = JSON.parse(text) as Record<string, unknown>;
    else if (ext === '.csv') body = textBodyToJson(CSV_TYPES[0], text, query);
    else if (['.jdx', '.dx', '.jcamp', '.jcm'].includes(ext)) body = textBodyToJson(JCAMP_TYPES[0], text, query);
    else throw new ScienceError('INPUT_INVALID', `${file}: unknown file type "${ext}" (json, csv, jdx, dx, jcamp)`, {});
  }
  if (typeof values.species === 'string') body.species = values.species;
  if (typeof values.vmax === 'string') body.vMax = Number(values.vmax);
  if (body.vMax === undefined) throw new ScienceError('INPUT_INVALID', 'potential needs --vmax N', {});
  if (body.species === undefined && body.lines === undefined && body.spectrum === undefined) {
    throw new ScienceError('INPUT_INVALID', 'potential needs --species or a file', {});
  }
  const parsed = potentialRequestSchema(DEFAULT_CONFIG.maxLines).safeParse(body);
  if (!parsed.success) {
    const first = parsed.error.issues
      .slice(0, 3)
      .map((i) => `${i.path.join('/') || '(body)'}: ${i.message}`)
      .join('; ');
    throw new ScienceError('INPUT_INVALID', `${file ?? 'arguments'}: ${first}`, {});
  }
  const r = runPotential(parsed.data);
  const f = (x: number, d: number) => x.toFixed(d);
  const u = (x: { value: number; uncertainty: number }, d: number) =>
    x.uncertainty > 0 ? `${f(x.value, d)} ± ${x.uncertainty.toPrecision(2)}` : f(x.value, d);
  const rows = [
    ['v', 'G_v (cm-1)', 'r- (Å)', 'r+ (Å)'],
    ...r.levels.map((l) => [String(l.v), u(l.energy, 4), u(l.rMin, 6), u(l.rMax, 6)]),
  ];
  const widths = rows[0]?.map((_, c) => Math.max(...rows.map((row) => (row[c] ?? '').length))) ?? [];
  const lines = rows.map((row) =>
    row
      .map((cell, c) => cell.padEnd(widths[c] ?? 0))
      .join('  ')
      .trimEnd(),
  );
  const m = r.morse;
  const morse = m
    ? `Morse: D_e ${u(m.D_e, 1)} cm-1, a ${u(m.a, 5)} Å-1, r_e ${u(m.r_e, 6)} Å`
    : 'Morse: not determined';
  const check = r.verification
    ? `Numerov check (RKR points to v = ${r.verification.vTop}): worst |Δ(G_v − G_0)| ${r.verification.worstIntervalError.toExponential(2)} cm-1, worst |ΔB_v/B_v| ${r.verification.worstRotationalRelativeError.toExponential(2)}, v = 0 shift ${r.verification.zeroPointShift.toFixed(4)} cm-1`
    : '';
  const rf = r.refined;
  const refined = rf
    ? [
        `Refined curve (its Numerov levels give back the constants; ${rf.solves} Numerov solves): worst |Δ(G_v − G_0)| ${rf.worstIntervalError.toExponential(2)} cm-1, worst |ΔB_v/B_v| ${rf.worstRotationalRelativeError.toExponential(2)}${rf.withinGoals ? '' : ' (short of 0.01 cm-1 and 1e-4)'}, v = 0 shift ${rf.zeroPointShift.toFixed(4)} cm-1`,
        ...rf.levels.map(
          (l) =>
            `  v = ${l.v}: E_v ${f(l.energy.value, 4)} cm-1, r- ${f(l.rMin.value, 6)} Å, r+ ${f(l.rMax.value, 6)} Å`,
        ),
      ]
    : [];
  const text = [
    `${r.species} (${r.source} constants), first-order RKR turning points`,
    ...lines,
    morse,
    ...(check ? [check] : []),
    ...refined,
    ...r.warnings.map((w) => `warning: ${w.message}`),
  ].join('\n');
  return { text: `${text}\n`, json: r };
}

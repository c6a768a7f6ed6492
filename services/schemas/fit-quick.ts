import { MIN_NORMAL } from './common.js';
import { type FitRequest, MAX_MAGNITUDE, MIN_RELATIVE_UNCERTAINTY } from './fit.js';

type Plain = Record<string, unknown>;

const isPlain = (x: unknown): x is Plain =>
  typeof x === 'object' && x !== null && Object.getPrototypeOf(x) === Object.prototype;

const BAND = /^\d{1,2}-\d{1,2}$/;

/**
 * A line of the commonest form, `{ position, uncertainty?, intensity?, assignment?: { band, branch, j } }`, checked
 * by hand against the rules of LineSchema and AssignmentSchema, and copied in the schema's key order (as zod's
 * output has it). Undefined when the line has any other key or any value the quick check is not sure of: the
 * schema then checks it in its own words.
 */
function quickLine(l: unknown): Plain | undefined {
  if (!isPlain(l)) return undefined;
  let keys = 0;
  const position = l.position;
  if (typeof position !== 'number' || !(position >= MIN_NORMAL && position <= MAX_MAGNITUDE)) return undefined;
  keys++;
  const out: Plain = { position };
  if ('uncertainty' in l) {
    const u = l.uncertainty;
    // At least MIN_RELATIVE_UNCERTAINTY of the position: below it LineSchema's refinement answers.
    if (typeof u !== 'number' || !(u >= MIN_NORMAL && u <= MAX_MAGNITUDE && u >= MIN_RELATIVE_UNCERTAINTY * position))
      return undefined;
    out.uncertainty = u;
    keys++;
  }
  if ('intensity' in l) {
    const i = l.intensity;
    if (typeof i !== 'number' || !(i >= 0 && i <= MAX_MAGNITUDE)) return undefined;
    out.intensity = i;
    keys++;
  }
  if ('assignment' in l) {
    const a = l.assignment;
    if (!isPlain(a) || Object.keys(a).length !== 3) return undefined;
    const { band, branch, j } = a;
    if (typeof band !== 'string' || !BAND.test(band)) return undefined;
    if (branch !== 'P' && branch !== 'Q' && branch !== 'R') return undefined;
    if (typeof j !== 'number' || !Number.isInteger(j) || j < 0 || j > 400) return undefined;
    out.assignment = { band, branch, j };
    keys++;
  }
  return Object.keys(l).length === keys ? out : undefined;
}

/**
 * A fit request validated the quick way: when every line has the commonest form (quickLine), the lines are checked
 * by a loop and the schema validates the rest of the body with the first line in their place (no refinement of the
 * request looks at a line's fields other than `source`, which such lines do not have); the parsed body then carries
 * the lines as checked. zod's element-by-element check of 60 lines took most of the validation's ~0.2 ms. Undefined
 * when the quick way does not apply or the body is refused: the whole schema then says why, in its own words.
 */
export function quickFitRequest(
  body: unknown,
  maxLines: number,
  schema: { safeParse(x: unknown): { success: boolean; data?: unknown } },
): FitRequest | undefined {
  if (!isPlain(body)) return undefined;
  const lines = body.lines;
  if (!Array.isArray(lines) || lines.length < 1 || lines.length > maxLines) return undefined;
  const checked: Plain[] = new Array(lines.length);
  for (let i = 0, n = lines.length; i < n; i++) {
    const l = quickLine(lines[i]);
    if (!l) return undefined;
    checked[i] = l;
  }
  const parsed = schema.safeParse({ ...body, lines: [lines[0]] });
  if (!parsed.success) return undefined;
  return { ...(parsed.data as FitRequest), lines: checked as FitRequest['lines'] };
}

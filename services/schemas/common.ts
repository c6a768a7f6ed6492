import { z } from 'zod';

/**
 * One rule for a bad number, wherever a request carries one (DEVELOPERS.md, "Bad values"): a value that is not a
 * finite JSON number or lies outside its field's stated range is a 400 VALIDATION_FAILED naming the field.
 */
export const MIN_NORMAL = 2.2250738585072014e-308;

/** A request's number: finite (NaN and ±Infinity, e.g. a literal 1e400, refused by name). */
export const realNumber = () =>
  z.number({
    error: (issue) =>
      issue.code === 'invalid_type' && typeof issue.input === 'number'
        ? `expected a finite number, received ${issue.input}`
        : undefined,
  });

/**
 * A number that must be positive: from the smallest normal double up. A subnormal one (below 2.2e-308) keeps fewer
 * than 53 significant bits and its reciprocal overflows: an uncertainty of 1e-320 passed `positive()`, its weight
 * 1/σ² was Infinity and the fit answered 422 "parameters cannot be told apart". The minimum is in the document.
 */
export const positiveNumber = () =>
  realNumber().min(MIN_NORMAL, {
    message: 'expected a positive number, at least 2.2e-308 (a subnormal number carries no precision)',
  });

/** The rounded form of a value with its uncertainty, present only when asked for with `?display=rounded`. */
export const DisplaySchema = z
  .string()
  .optional()
  .describe(
    'with ?display=rounded: the value rounded to two significant digits of its uncertainty, e.g. "2143.27123 ± 0.00046"',
  );

export const QuantitySchema = z
  .object({
    value: z.number(),
    uncertainty: z.number().describe('standard uncertainty, coverage factor k = 1'),
    unit: z.string(),
    display: DisplaySchema,
  })
  .meta({ id: 'Quantity', description: 'A fitted or derived number with its standard uncertainty and unit.' });

export const WarningSchema = z
  .object({
    code: z.string(),
    message: z.string(),
    lines: z.array(z.number().int()).optional().describe('indices of the lines concerned'),
  })
  .meta({ id: 'Warning' });

export const MatrixSchema = z.object({
  parameters: z.array(z.string()),
  matrix: z.array(z.array(z.number())),
});

export const ProblemSchema = z
  .object({
    type: z.string(),
    title: z.string(),
    status: z.number().int(),
    detail: z.string(),
    instance: z.string().optional(),
    code: z.string().optional().describe('stable machine-readable code'),
    errors: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  })
  .catchall(z.unknown())
  .meta({ id: 'Problem', description: 'RFC 9457 problem details.' });

const problem = (description: string) => ({
  description,
  content: { 'application/problem+json': { schema: ProblemSchema } },
});

export const problemResponses = {
  400: problem(
    'malformed request: invalid JSON, forbidden properties, nesting beyond 32 levels; schema violations (VALIDATION_FAILED, `errors` name each field): any number that is not finite (NaN, ±Infinity, 1e400), a string, null or empty where a number is due, outside its stated range, subnormal, or an uncertainty below 1e-15 of its position',
  ),
  413: problem('body larger than the configured limit'),
  415: problem('unsupported media type'),
  422: problem(
    'every value in range, but refused by the science (impossible assignment, too few lines, rank deficiency, constants that give no potential, a result that overflows …)',
  ),
} as const;

import { z } from 'zod';

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
  400: problem('malformed request: invalid JSON, schema violations (with paths), forbidden properties'),
  413: problem('body larger than the configured limit'),
  415: problem('unsupported media type'),
  422: problem('well formed, but refused by the science (impossible assignment, too few lines, rank deficiency …)'),
} as const;

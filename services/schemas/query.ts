import { z } from 'zod';
import { PositionUnitSchema } from './fit.js';

export const TEMPERATURE_MESSAGE =
  'expected a temperature in K from 10 to 6000, written as a decimal number (e.g. 296 or 296.5)';

/**
 * `?temperature=` as a number, or undefined when it is not a decimal number from 10 to 6000 K (the range of
 * `options.temperature`). Checked the same way whatever the body: with a CSV body NaN was a 422 and −5 a 400 that
 * named `options/temperature`; with a JSON body 0 and 99999999 passed.
 */
export function queryTemperature(raw: string): number | undefined {
  if (!/^\d+(\.\d+)?$/.test(raw)) return undefined;
  const t = Number(raw);
  return t >= 10 && t <= 6000 ? t : undefined;
}

/** Query string of the routes that also take JCAMP-DX or CSV bodies (which carry no species of their own). */
export const SpeciesQuerySchema = z.strictObject({
  species: z.string().min(1).max(40).optional().describe('species, for JCAMP-DX and CSV bodies'),
  temperature: z
    .string()
    .refine((t) => queryTemperature(t) !== undefined, { message: TEMPERATURE_MESSAGE })
    .optional()
    .describe('gas temperature in K from 10 to 6000 (a decimal number), for JCAMP-DX and CSV bodies'),
  unit: PositionUnitSchema.optional().describe(
    "for CSV and JCAMP-DX bodies: the unit of the line positions, or of a spectrum's x (cm-1, um or nm), when the file does not name it (a unit the file names must agree)",
  ),
  // The sample of a JCAMP-DX or CSV body, field by field (JSON bodies carry a `sample` object instead).
  'sample.id': z.string().max(200).optional().describe('sample.id, for JCAMP-DX and CSV bodies'),
  'sample.description': z.string().max(2000).optional(),
  'sample.instrument': z.string().max(200).optional(),
  'sample.operator': z.string().max(200).optional(),
  'sample.measuredAt': z.string().max(40).optional().describe('ISO 8601; checked as in the JSON `sample`'),
  'sample.notes': z.string().max(10_000).optional(),
});

/** Query string of /v1/fits and /v1/checks: the species query plus the form of the result. */
export const ResultQuerySchema = SpeciesQuerySchema.extend({
  display: z
    .enum(['rounded'])
    .optional()
    .describe(
      'rounded: every value with an uncertainty also carries `display`, rounded to two significant digits of its uncertainty (the numbers stay full precision)',
    ),
  detail: z
    .enum(['full', 'lean'])
    .optional()
    .describe(
      'lean: each entry of `lines` leaves out what the request already holds (as `options.lean: true` in a JSON body; also for JCAMP-DX and CSV bodies); full: keeps it. Overrides `options.lean` when given',
    ),
  table: z
    .enum(['lines', 'constants', 'checks'])
    .optional()
    .describe('with Accept: text/csv, which table: lines (default), constants, or checks (/v1/checks only)'),
  comments: z
    .enum(['true', 'false'])
    .optional()
    .describe(
      'with Accept: text/csv, true: the table is preceded by comment lines starting "# " (the safety notice, then one "# warning CODE: message" line per warning). Every CSV answer carries them in the Branchwise-Notice and Branchwise-Warnings response headers',
    ),
});

import { z } from 'zod';
import { PositionUnitSchema } from './fit.js';

/** Query string of the routes that also take JCAMP-DX or CSV bodies (which carry no species of their own). */
export const SpeciesQuerySchema = z.strictObject({
  species: z.string().min(1).max(40).optional().describe('species, for JCAMP-DX and CSV bodies'),
  temperature: z
    .string()
    .regex(/^\d+(\.\d+)?$/)
    .optional()
    .describe('gas temperature in K, for JCAMP-DX and CSV bodies'),
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
});

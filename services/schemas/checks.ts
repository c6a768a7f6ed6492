import { z } from 'zod';
import { positiveNumber, realNumber } from './common.js';
import {
  exactlyOne,
  exactlyOneMessage,
  FitSchema,
  fitRequestFields,
  knownReferenceSource,
  MAX_MAGNITUDE,
  unknownKeysOf,
} from './fit.js';
import { provenanceAndSampleFields } from './provenance.js';

const TOLERANCE_KEYS = [
  'identityOrigin',
  'identityB',
  'calibrationOffset',
  'calibrationScalePpm',
  'unexplainedFraction',
  'isotopeRatio',
  'temperature',
  'maxReducedChiSquare',
  'maxRejectedFraction',
  'minCompleteness',
] as const;

/** The answer to an unknown tolerance: the keys a tolerance profile accepts. */
function unknownToleranceKeys(issue: { code?: string; keys?: readonly PropertyKey[] }): string | undefined {
  if (issue.code !== 'unrecognized_keys' || !issue.keys) return undefined;
  const listed = issue.keys.map((k) => `"${String(k)}"`).join(', ');
  return `Unrecognized tolerance key(s) ${listed}: the accepted keys are ${TOLERANCE_KEYS.join(', ')}`;
}

export const TolerancesSchema = z
  .strictObject(
    {
      identityOrigin: positiveNumber().max(MAX_MAGNITUDE).optional().describe('cm-1; default 0.5'),
      identityB: positiveNumber().max(MAX_MAGNITUDE).optional().describe('relative; default 1e-3'),
      calibrationOffset: positiveNumber().max(MAX_MAGNITUDE).optional().describe('cm-1; default 0.05'),
      calibrationScalePpm: positiveNumber().max(MAX_MAGNITUDE).optional().describe('ppm; default 20'),
      unexplainedFraction: realNumber().min(0).max(1).optional().describe('default 0.05 (fail above, warn above half)'),
      isotopeRatio: positiveNumber()
        .max(MAX_MAGNITUDE)
        .optional()
        .describe('relative deviation from natural; default 0.15 (warn above)'),
      temperature: z
        .strictObject({
          expected: positiveNumber().max(10000),
          tolerance: positiveNumber().max(MAX_MAGNITUDE),
        })
        .optional()
        .describe('expected rotational temperature and tolerance, K; default none (reported only)'),
      maxReducedChiSquare: positiveNumber()
        .max(MAX_MAGNITUDE)
        .optional()
        .describe('default 3 (only with line uncertainties)'),
      maxRejectedFraction: realNumber().min(0).max(1).optional().describe('default 0.05'),
      minCompleteness: realNumber().min(0).max(1).optional().describe('default 0.9'),
    } satisfies Record<(typeof TOLERANCE_KEYS)[number], z.ZodType>,
    { error: unknownToleranceKeys },
  )
  .meta({ id: 'Tolerances', description: 'A tolerance profile; every field overrides one documented default.' });

export function checkRequestSchema(maxLines: number) {
  const fields = { ...fitRequestFields(maxLines), tolerances: TolerancesSchema.optional() };
  return z
    .strictObject(fields, { error: unknownKeysOf('a check request', () => Object.keys(fields)) })
    .refine(exactlyOne, exactlyOneMessage)
    .superRefine(knownReferenceSource)
    .meta({ id: 'CheckRequest' });
}
export type CheckRequest = z.output<ReturnType<typeof checkRequestSchema>>;

const StatusSchema = z.enum(['pass', 'warn', 'fail', 'not-evaluated']);

export const CheckResponseSchema = z
  .object({
    verdict: z.enum(['pass', 'warn', 'fail']).describe('the worst status of the evaluated checks'),
    checks: z.array(
      z.object({
        id: z.enum(['identity', 'calibration', 'unexplained-lines', 'isotope-ratio', 'temperature', 'fit-quality']),
        status: StatusSchema,
        measured: z.record(z.string(), z.unknown()),
        limit: z.record(z.string(), z.unknown()),
        message: z.string(),
      }),
    ),
    tolerances: z.record(z.string(), z.unknown()).describe('the profile applied, defaults filled in'),
    fit: FitSchema.nullable().describe('null when no fit could be made (identity then says why)'),
    notice: z.string(),
    ...provenanceAndSampleFields,
  })
  .meta({ id: 'CheckResponse' });
export type CheckResponseWithProvenance = z.input<typeof CheckResponseSchema>;
/** What the check use case computes; the route adds provenance and the sample. */
export type CheckResponse = Omit<CheckResponseWithProvenance, 'software' | 'input' | 'sample'>;

import { z } from 'zod';

/**
 * Who measured what, and which software produced the answer: the fields that let a filed report or a stored
 * JSON response be tied to its sample and to the exact bytes it was computed from (API-CONTRACT.md, additions).
 */

/** An ISO 8601 date-time with a zone (Z or ±hh:mm), or a calendar date. */
const IsoTime = z
  .string()
  .max(40)
  .refine(
    (s) => z.iso.datetime({ offset: true, local: false }).safeParse(s).success || z.iso.date().safeParse(s).success,
    {
      message:
        'measuredAt must be an ISO 8601 date-time with a zone, e.g. "2026-12-02T09:30:00Z", or a date "2026-12-02"',
    },
  );

export const SampleSchema = z
  .strictObject({
    id: z.string().max(200).optional().describe("the lab's sample or cylinder identifier"),
    description: z.string().max(2000).optional(),
    instrument: z.string().max(200).optional(),
    operator: z.string().max(200).optional(),
    measuredAt: IsoTime.optional().describe('when the spectrum was recorded, ISO 8601'),
    notes: z.string().max(10_000).optional(),
  })
  .meta({ id: 'Sample', description: 'Optional description of the sample, echoed in the response and the report.' });
export type Sample = z.output<typeof SampleSchema>;

export const SoftwareSchema = z
  .object({
    name: z.string(),
    version: z.string().describe('version of the service (its package)'),
    libraryVersion: z.string().describe('version of the built-in reference library, with a digest of its values'),
  })
  .meta({ id: 'Software' });

export const InputDigestSchema = z
  .object({
    sha256: z
      .string()
      .regex(/^[0-9a-f]{64}$/)
      .describe('SHA-256 (hex) of the request body exactly as received, before any decoding'),
  })
  .meta({ id: 'InputDigest' });

/** The provenance fields every JSON response carries. */
export const provenanceFields = {
  software: SoftwareSchema,
  input: InputDigestSchema,
};
/** The same, plus the echoed sample, for responses to requests that may carry one. */
export const provenanceAndSampleFields = {
  ...provenanceFields,
  sample: SampleSchema.optional().describe("the request's sample, echoed"),
};

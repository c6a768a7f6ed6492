import { z } from 'zod';
import { TolerancesSchema } from './checks.js';
import { FitOptionsSchema, PeakOptionsSchema, SpeciesStringSchema, SpectrumSchema } from './fit.js';
import { provenanceAndSampleFields, SampleSchema } from './provenance.js';

/**
 * The spectrum body of /v1/fits and /v1/checks is accepted unchanged: `species`, `options` and `tolerances` may be
 * there and are not used to find peaks.
 */
export const PeaksRequestSchema = z
  .strictObject({
    spectrum: SpectrumSchema,
    peakOptions: PeakOptionsSchema.optional(),
    sample: SampleSchema.optional(),
    species: SpeciesStringSchema.optional().describe('accepted as in /v1/fits; not used to find peaks'),
    options: FitOptionsSchema.optional().describe('accepted as in /v1/fits; not used to find peaks'),
    tolerances: TolerancesSchema.optional().describe('accepted as in /v1/checks; not used to find peaks'),
  })
  .meta({ id: 'PeaksRequest' });
export type PeaksRequest = z.output<typeof PeaksRequestSchema>;

export const PeaksResponseSchema = z
  .object({
    peaks: z.array(
      z.object({
        position: z.number().describe('cm-1'),
        uncertainty: z.number().describe('standard uncertainty of the position, cm-1'),
        intensity: z.number().describe('integrated absorbance'),
        width: z.number().describe('full width at half maximum, cm-1'),
        height: z.number().describe('peak absorbance above the baseline'),
        lorentzianFraction: z.number(),
      }),
    ),
    points: z.number().int(),
    noise: z.number().describe('absorbance noise (standard deviation)'),
    step: z.number().describe('median sampling step, cm-1'),
    units: z
      .object({
        position: z.literal('cm-1'),
        uncertainty: z.literal('cm-1'),
        width: z.literal('cm-1'),
        intensity: z.literal('cm-1').describe('absorbance integrated over wavenumber'),
        height: z.literal('absorbance'),
        step: z.literal('cm-1'),
        noise: z.literal('absorbance'),
      })
      .describe('the unit of each peak field and of step and noise (x is converted to cm-1 whatever xUnit was sent)'),
    notice: z.string(),
    ...provenanceAndSampleFields,
  })
  .meta({ id: 'PeaksResponse' });
export type PeaksResponse = Omit<z.input<typeof PeaksResponseSchema>, 'software' | 'input' | 'sample'>;

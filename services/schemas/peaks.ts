import { z } from 'zod';
import { PeakOptionsSchema, SpectrumSchema } from './fit.js';
import { provenanceAndSampleFields, SampleSchema } from './provenance.js';

export const PeaksRequestSchema = z
  .strictObject({
    spectrum: SpectrumSchema,
    peakOptions: PeakOptionsSchema.optional(),
    sample: SampleSchema.optional(),
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
    notice: z.string(),
    ...provenanceAndSampleFields,
  })
  .meta({ id: 'PeaksResponse' });
export type PeaksResponse = Omit<z.input<typeof PeaksResponseSchema>, 'software' | 'input' | 'sample'>;

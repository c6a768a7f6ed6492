import { z } from 'zod';
import { provenanceFields } from './provenance.js';

const LibraryValueSchema = z.object({
  value: z.number(),
  unit: z.string(),
  source: z.string(),
  provenance: z.enum(['published', 'derived', 'low-confidence']),
  note: z.string().optional(),
});

export const SpeciesEntrySchema = z
  .object({
    formula: z.string(),
    name: z.string(),
    state: z.string(),
    reducedMass: z.object({ value: z.number(), uncertainty: z.number(), unit: z.literal('u') }),
    naturalAbundance: z.number().describe('product of the isotopic amount fractions (CIAAW 2013, Meija et al. 2016)'),
    derivedFrom: z.string().optional(),
    hazard: z.string(),
    constants: z.record(z.string(), LibraryValueSchema),
  })
  .meta({ id: 'SpeciesEntry' });
const SpeciesEntryResponseSchema = SpeciesEntrySchema.extend(provenanceFields).meta({ id: 'SpeciesEntryResponse' });

export const SpeciesListSchema = z
  .object({ species: z.array(SpeciesEntrySchema), notice: z.string(), ...provenanceFields })
  .meta({ id: 'SpeciesList' });
export { SpeciesEntryResponseSchema };
export const SpeciesParamsSchema = z.object({ formula: z.string().min(1).max(40) });

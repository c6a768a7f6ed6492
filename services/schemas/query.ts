import { z } from 'zod';

/** Query string of the routes that also take JCAMP-DX or CSV bodies (which carry no species of their own). */
export const SpeciesQuerySchema = z.strictObject({
  species: z.string().min(1).max(40).optional().describe('species, for JCAMP-DX and CSV bodies'),
  temperature: z
    .string()
    .regex(/^\d+(\.\d+)?$/)
    .optional()
    .describe('gas temperature in K, for JCAMP-DX and CSV bodies'),
});

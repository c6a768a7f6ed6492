import { z } from 'zod';
import { POSITION_UNITS } from '../../src/units.js';
import { SpeciesStringSchema } from './fit.js';
import { provenanceAndSampleFields, SampleSchema } from './provenance.js';

const CONSTANTS = [
  'omega_e',
  'omega_e_x_e',
  'omega_e_y_e',
  'omega_e_z_e',
  'B_e',
  'alpha_e',
  'gamma_e',
  'D_e',
  'beta_e',
  'H_e',
] as const;
const ConstantValue = z.strictObject({ value: z.number(), uncertainty: z.number().min(0).optional() });

export const PredictionRequestSchema = z
  .strictObject({
    species: SpeciesStringSchema,
    constants: z
      .strictObject({
        values: z.partialRecord(z.enum(CONSTANTS), ConstantValue),
        covariance: z
          .strictObject({
            names: z.array(z.enum(CONSTANTS)).min(1).max(CONSTANTS.length),
            matrix: z.array(z.array(z.number()).max(CONSTANTS.length)).max(CONSTANTS.length),
          })
          .optional(),
      })
      .optional()
      .describe('equilibrium constants in cm-1 (default: the reference library)'),
    bands: z
      .array(z.string().regex(/^\d{1,2}-\d{1,2}$/))
      .min(1)
      .max(20)
      .default(['1-0'])
      .describe('bands "v\'-v\'\'"; "0-0" for pure rotation'),
    jMax: z.number().int().min(0).max(200).default(30),
    temperature: z.number().min(10).max(6000).default(296).describe('K, for relative intensities'),
    unit: z.enum(POSITION_UNITS).default('cm-1'),
    sample: SampleSchema.optional(),
  })
  .meta({ id: 'PredictionRequest' });
export type PredictionRequest = z.output<typeof PredictionRequestSchema>;

/** A predicted position: its uncertainty is null when a constant it rests on has none (library values). */
const PredictedQuantitySchema = z
  .object({
    value: z.number(),
    uncertainty: z
      .number()
      .nullable()
      .describe('standard uncertainty (k = 1); null when a constant it rests on has no published uncertainty'),
    unit: z.string(),
  })
  .meta({ id: 'PredictedQuantity' });

export const PredictionResponseSchema = z
  .object({
    species: z.string(),
    source: z.enum(['library', 'caller']),
    constants: z.array(
      z.object({
        name: z.string(),
        value: z.number(),
        uncertainty: z.number().nullable().describe('null when the value has no published uncertainty (never 0)'),
      }),
    ),
    lines: z.array(
      z.object({
        band: z.string(),
        branch: z.enum(['P', 'Q', 'R']),
        j: z.number().int(),
        position: PredictedQuantitySchema.describe('in the requested unit'),
        wavenumber: PredictedQuantitySchema,
        relativeIntensity: z.number(),
        lowerEnergy: z.number(),
      }),
    ),
    notice: z.string(),
    ...provenanceAndSampleFields,
  })
  .meta({ id: 'PredictionResponse' });
export type PredictionResponse = Omit<z.input<typeof PredictionResponseSchema>, 'software' | 'input' | 'sample'>;

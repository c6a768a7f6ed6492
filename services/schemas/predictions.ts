import { z } from 'zod';
import { positiveNumber, realNumber } from './common.js';
import { LinearLevelSchema, MAX_MAGNITUDE, PositionUnitSchema, SpeciesStringSchema } from './fit.js';
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
/** Largest magnitude of a caller's constant, its uncertainty or a linear level's term (cm-1): ω_e of H2 is 4401. */
const MAX_CONSTANT = 1e6;
const finite = realNumber().min(-MAX_CONSTANT).max(MAX_CONSTANT);
const uncertainty = realNumber().min(0).max(MAX_CONSTANT).optional();
const ConstantValue = z.strictObject({ value: finite, uncertainty });
/**
 * ω_e and B_e are positive for any bound diatomic (a harmonic frequency and h/(8π²c μ r_e²)), D_e ≥ 0 (4B_e³/ω_e² to
 * first order): a negative ω_e or a B_e ≤ 0 gave 200 with negative positions or inverted branches. The range is in the
 * document, and a value outside it is a 400 naming `constants/values/<name>/value`.
 */
const PositiveConstantValue = z.strictObject({ value: positiveNumber().max(MAX_CONSTANT), uncertainty });
const NonNegativeConstantValue = z.strictObject({ value: realNumber().min(0).max(MAX_CONSTANT), uncertainty });
const ConstantValues = z.strictObject(
  Object.fromEntries(
    CONSTANTS.map((name) => [
      name,
      (name === 'omega_e' || name === 'B_e'
        ? PositiveConstantValue
        : name === 'D_e'
          ? NonNegativeConstantValue
          : ConstantValue
      ).optional(),
    ]),
  ) as Record<(typeof CONSTANTS)[number], z.ZodOptional<typeof ConstantValue>>,
);

/** Constants of one level of a linear polyatomic molecule, cm⁻¹, in the convention of the fit responses. */
export const LinearLevelConstantsSchema = z
  .strictObject({
    v: LinearLevelSchema.shape.v,
    l: LinearLevelSchema.shape.l,
    rank: LinearLevelSchema.shape.rank,
    G: finite.describe('G_v of F = G_v + B[J(J+1) − l²] − …'),
    B: positiveNumber().max(1000),
    D: finite.default(0),
    H: finite.optional(),
    q: finite.optional().describe('l ≥ 1: E(f) − E(e) = q J(J+1) + q_J [J(J+1)]²'),
    qJ: finite.optional(),
  })
  .meta({ id: 'LinearLevelConstants' });

export const PredictionRequestSchema = z
  .strictObject({
    species: SpeciesStringSchema,
    constants: z
      .strictObject({
        values: ConstantValues,
        covariance: z
          .strictObject({
            names: z.array(z.enum(CONSTANTS)).min(1).max(CONSTANTS.length),
            matrix: z
              .array(z.array(realNumber().min(-MAX_MAGNITUDE).max(MAX_MAGNITUDE)).max(CONSTANTS.length))
              .max(CONSTANTS.length)
              .describe('covariance of the named constants, cm-2; its diagonal (the variances) ≥ 0')
              .superRefine((m, ctx) => {
                // A variance below zero has no square root: it came back as 422 "constants/0/uncertainty is NaN".
                m.forEach((row, i) => {
                  const v = row[i];
                  if (v !== undefined && v < 0)
                    ctx.addIssue({
                      code: 'custom',
                      path: [i, i],
                      message: `expected a variance ≥ 0 on the diagonal, received ${v}`,
                    });
                });
              }),
          })
          .optional(),
      })
      .optional()
      .describe('equilibrium constants in cm-1 (default: the reference library)'),
    bands: z
      .array(
        z.union([
          z.string().regex(/^\d{1,2}-\d{1,2}$/),
          z.strictObject({ upper: LinearLevelSchema, lower: LinearLevelSchema }),
        ]),
      )
      .min(1)
      .max(20)
      .default(['1-0'])
      .describe(
        'diatomic: bands "v\'-v\'\'" ("0-0" for pure rotation); linear polyatomic: { upper: { v, l }, lower: { v, l } }',
      ),
    levels: z
      .array(LinearLevelConstantsSchema)
      .min(1)
      .max(40)
      .optional()
      .describe(
        'linear polyatomic: the constants of every level the bands join (cm-1); absent: the reference library, with its sources (and, when no bands are sent, every infrared band it holds for the species)',
      ),
    jMax: z.number().int().min(0).max(200).default(30),
    temperature: realNumber().min(10).max(6000).default(296).describe('K, for relative intensities'),
    unit: PositionUnitSchema.default('cm-1'),
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
        status: z
          .enum(['read', 'read-secondary', 'derived', 'recalled'])
          .optional()
          .describe('linear library values: read from the source, from a secondary copy, derived, or recalled'),
        source: z.string().optional().describe('linear library values: key(s) of `sources`, joined by "+"'),
      }),
    ),
    sources: z
      .record(z.string(), z.object({ cite: z.string(), address: z.string() }))
      .optional()
      .describe('linear library predictions: the publications the values come from, by key'),
    lines: z.array(
      z.object({
        band: z.string(),
        branch: z.enum(['P', 'Q', 'R']),
        j: z.number().int(),
        position: PredictedQuantitySchema.describe('in the requested unit'),
        wavenumber: PredictedQuantitySchema,
        relativeIntensity: z.number(),
        lowerEnergy: z.number(),
        upper: LinearLevelSchema.optional().describe('linear polyatomic'),
        lower: LinearLevelSchema.optional().describe('linear polyatomic'),
        upperJ: z.number().int().optional().describe("linear polyatomic: J'"),
        parity: z.enum(['e', 'f']).optional().describe('linear polyatomic: e/f component of the lower level'),
        upperParity: z.enum(['e', 'f']).optional().describe('linear polyatomic: e/f component of the upper level'),
      }),
    ),
    convention: z.string().optional().describe('linear polyatomic: the term-value and e/f convention'),
    notice: z.string(),
    ...provenanceAndSampleFields,
  })
  .meta({ id: 'PredictionResponse' });
export type PredictionResponse = Omit<z.input<typeof PredictionResponseSchema>, 'software' | 'input' | 'sample'>;

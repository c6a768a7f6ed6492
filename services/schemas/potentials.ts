import { z } from 'zod';
import { QuantitySchema, WarningSchema } from './common.js';
import { fitRequestFields } from './fit.js';
import { PredictionRequestSchema } from './predictions.js';
import { provenanceAndSampleFields } from './provenance.js';

/** Largest vMax the service accepts (the Numerov check solves vMax + 1 levels on 6000 points). */
export const MAX_POTENTIAL_V = 60;

const potentialFields = (maxLines: number) => ({
  ...fitRequestFields(maxLines),
  constants: PredictionRequestSchema.shape.constants,
  vMax: z.number().int().min(0).max(MAX_POTENTIAL_V).describe('highest vibrational level to give turning points for'),
  vData: z
    .number()
    .int()
    .min(0)
    .max(MAX_POTENTIAL_V)
    .optional()
    .describe(
      'with constants: the highest vibrational level the data behind them reached (vMax above it is warned about, above 2·vData + 3 refused)',
    ),
  verify: z
    .boolean()
    .default(true)
    .describe('solve the radial equation on the RKR curve (Numerov) and report the differences'),
  refine: z
    .boolean()
    .optional()
    .describe(
      'correct the curve until its Numerov levels give back G_v − G_0 and B_v, and give its turning points (default: as verify)',
    ),
});

const oneSource = (b: {
  lines?: unknown;
  spectrum?: unknown;
  constants?: unknown;
  vData?: unknown;
  species?: unknown;
}) => {
  const fromData = b.lines !== undefined || b.spectrum !== undefined;
  if (fromData)
    return b.constants === undefined && b.vData === undefined && !(b.lines !== undefined && b.spectrum !== undefined);
  return b.species !== undefined;
};

export function potentialRequestSchema(maxLines: number) {
  return z
    .strictObject(potentialFields(maxLines))
    .refine(oneSource, {
      message:
        'give either "species" with optional "constants" (default: the reference library), or a line list ("lines" or "spectrum", as for /v1/fits) without "constants" and "vData"',
      path: ['constants'],
    })
    .meta({ id: 'PotentialRequest' });
}
export type PotentialRequest = z.output<ReturnType<typeof potentialRequestSchema>>;

const Point = z.object({ r: z.number().describe('Å'), energy: z.number().describe('cm-1 above the minimum') });

export const PotentialResponseSchema = z
  .object({
    species: z.string(),
    source: z.enum(['library', 'caller', 'fit']),
    reducedMass: QuantitySchema,
    hbar2Over2mu: z.number().describe('ħ²/2μ in cm-1 Å² (CODATA 2018, AME2020 masses)'),
    vMax: z.number().int(),
    vData: z.number().int().optional().describe('highest vibrational level the data reached, when known'),
    levels: z.array(
      z.object({
        v: z.number().int(),
        energy: QuantitySchema.describe('G_v above the potential minimum, cm-1'),
        rMin: QuantitySchema.describe('inner turning point, Å'),
        rMax: QuantitySchema.describe('outer turning point, Å'),
        B: QuantitySchema.describe('B_v from the constants, cm-1'),
      }),
    ),
    morse: z
      .object({
        D_e: QuantitySchema.describe('well depth ω_e²/(4ω_e x_e), cm-1'),
        a: QuantitySchema.describe('range parameter √(ω_e x_e / (ħ²/2μ)), Å-1'),
        r_e: QuantitySchema.describe('√((ħ²/2μ)/B_e), Å'),
      })
      .optional(),
    curves: z.object({
      rkr: z.array(Point).describe('turning points every quarter level, in order of r'),
      morse: z.array(Point).describe('the Morse curve over the same range'),
    }),
    verification: z
      .object({
        vTop: z.number().describe('highest v of the RKR points the radial equation was solved on'),
        grid: z.object({ from: z.number(), to: z.number(), step: z.number(), points: z.number().int() }),
        zeroPointShift: z.number().describe('E_0(Numerov) − G(0), cm-1: the constant first-order RKR leaves out'),
        levels: z.array(
          z.object({
            v: z.number().int(),
            energy: z.number(),
            intervalError: z.number().describe('(E_v − E_0) − (G_v − G_0), cm-1'),
            B: z.number(),
            rotationalRelativeError: z.number(),
          }),
        ),
        worstIntervalError: z.number(),
        worstRotationalRelativeError: z.number(),
      })
      .optional(),
    refined: z
      .object({
        vTop: z.number().describe('highest v of the RKR points of the curve'),
        start: z
          .enum(['identity', 'finite-difference'])
          .describe(
            "the levels' response to a correction, first taken as the identity or (when that fell short) measured",
          ),
        solves: z.number().int().describe('Numerov solves made in all'),
        rounds: z
          .array(z.object({ worstIntervalError: z.number(), worstRotationalRelativeError: z.number() }))
          .describe('worst residuals after each round of the kept run; the first is the first-order curve'),
        grid: z.object({ from: z.number(), to: z.number(), step: z.number(), points: z.number().int() }),
        zeroPointShift: z.number().describe("E_0 − G_0 of the refined curve, cm-1 (Dunham's Y00)"),
        levels: z.array(
          z.object({
            v: z.number().int(),
            energy: QuantitySchema.describe('E_v above the refined curve’s minimum, cm-1 (σ that of G_v)'),
            rMin: QuantitySchema.describe('inner turning point of the refined curve at E_v, Å (σ of first order)'),
            rMax: QuantitySchema.describe('outer turning point of the refined curve at E_v, Å (σ of first order)'),
            intervalError: z.number().describe('(E_v − E_0) − (G_v − G_0), cm-1'),
            B: z.number().describe('C⟨1/r²⟩ of the refined curve, cm-1'),
            rotationalRelativeError: z.number(),
          }),
        ),
        worstIntervalError: z.number(),
        worstRotationalRelativeError: z.number(),
        withinGoals: z.boolean().describe('intervals within 0.01 cm-1 and B_v within 1e-4 relative'),
      })
      .optional()
      .describe(
        'the RKR curve corrected (inverted-perturbation idea) until its quantum levels give back the constants; absent when verify or refine is false',
      ),
    warnings: z.array(WarningSchema),
    notice: z.string(),
    ...provenanceAndSampleFields,
  })
  .meta({ id: 'PotentialResponse' });
export type PotentialResponse = Omit<z.input<typeof PotentialResponseSchema>, 'software' | 'input' | 'sample'>;

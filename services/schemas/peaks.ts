import { z } from 'zod';
import { TolerancesSchema } from './checks.js';
import {
  FitOptionsSchema,
  MAX_MAGNITUDE,
  MAX_SPECTRUM_POINTS,
  PeakOptionsSchema,
  SpeciesStringSchema,
  SpectrumSchema,
} from './fit.js';
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

/** True when every element is a number within ±MAX_MAGNITUDE (what z.number().min().max() accepts). */
function boundedNumbers(values: unknown): values is number[] {
  if (!Array.isArray(values)) return false;
  // An indexed loop: for…of over a 10⁶-element array took about four times as long.
  for (let i = 0, n = values.length; i < n; i++) {
    const v: unknown = values[i];
    if (typeof v !== 'number' || !(v >= -MAX_MAGNITUDE && v <= MAX_MAGNITUDE)) return false;
  }
  return true;
}

/**
 * A peaks request validated the quick way: when x and y are arrays of equal length within the limits whose elements
 * the schema would accept, a plain loop checks them and the schema validates the rest of the body with seven points
 * in their place (zod checks a 10⁶-point spectrum element by element in ~0.3 s); the parsed body then carries the
 * arrays as sent. Undefined when the quick way does not apply or the body is refused: the whole schema then says
 * why, in its own words.
 */
export function quickPeaksRequest(body: unknown): PeaksRequest | undefined {
  const spectrum = (body as { spectrum?: { x?: unknown; y?: unknown } } | null)?.spectrum;
  const { x, y } = spectrum ?? {};
  const quick =
    boundedNumbers(x) && boundedNumbers(y) && x.length === y.length && x.length >= 7 && x.length <= MAX_SPECTRUM_POINTS;
  if (!quick) return undefined;
  const shell = { ...(body as object), spectrum: { ...spectrum, x: x.slice(0, 7), y: y.slice(0, 7) } };
  const parsed = PeaksRequestSchema.safeParse(shell);
  return parsed.success ? { ...parsed.data, spectrum: { ...parsed.data.spectrum, x, y } } : undefined;
}

/** PeaksRequestSchema.safeParse, the quick way when it applies (quickPeaksRequest): the same data, the same issues. */
export function parsePeaksRequest(body: unknown): ReturnType<typeof PeaksRequestSchema.safeParse> {
  const quick = quickPeaksRequest(body);
  return quick ? { success: true, data: quick } : PeaksRequestSchema.safeParse(body);
}

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

import { z } from 'zod';
import type { PositionUnit } from '../../src/units.js';
import {
  DisplaySchema,
  MatrixSchema,
  MIN_NORMAL,
  positiveNumber,
  QuantitySchema,
  realNumber,
  WarningSchema,
} from './common.js';
import { provenanceAndSampleFields, SampleSchema } from './provenance.js';

/** Zod schemas of POST /v1/fits: the single source of the wire format, of its validation and of the OpenAPI. */

export const SpeciesStringSchema = z
  .string()
  .min(1)
  .max(60)
  .describe(
    'diatomic: element symbols in order, each optionally preceded by its mass number ("12C16O", "H35Cl", "1H-79Br"; a digit always belongs to the symbol after it). Linear polyatomic: the atoms along the axis joined by "-", each optionally preceded by its mass number ("16O-12C-16O", "14N-14N-16O", "1H-12C-14N", "1H-12C-12C-1H"), or an everyday formula CO2, N2O, OCS, HCN, C2H2, CS2 where a single digit AFTER a symbol is a count and digits BEFORE a symbol are its mass number, applied to every atom of that element ("13CO2" = 16O-13C-16O, "C18O2" = 18O-12C-18O, "DCN" = 2H-12C-14N). Responses echo the hyphenated form.',
  );

/** A vibrational level of a linear polyatomic molecule. */
export const LinearLevelSchema = z
  .strictObject({
    v: z
      .array(z.number().int().min(0).max(100))
      .min(3)
      .max(5)
      .describe('vibrational quanta: [v1, v2, v3] for triatomics (v2 the bend), [v1, v2, v3, v4, v5] for C2H2'),
    l: z
      .number()
      .int()
      .min(0)
      .max(100)
      .describe('vibrational angular momentum |l| (≤ the bending quanta, same parity as them)'),
    rank: z
      .number()
      .int()
      .min(1)
      .max(9)
      .optional()
      .describe(
        'rank within a Fermi polyad sharing v and l, 1 the highest (CO2 10001: 1, 10002: 2; label suffix _I, _II)',
      ),
  })
  .meta({ id: 'LinearLevel' });

/**
 * A line's assignment: diatomic `{ band, branch, j }` or linear polyatomic `{ upper, lower, branch, j, parity? }`.
 * One object with both sets of keys (not a union) so that a schema error names its field ("assignment/branch");
 * which set a line must use (band, or upper and lower) is checked by the use case (422 ASSIGNMENT_INVALID).
 */
export const AssignmentSchema = z
  .strictObject({
    band: z
      .string()
      .regex(/^\d{1,2}-\d{1,2}$/, {
        error: (iss) =>
          typeof iss.input === 'string' && /^\d{1,2}[‐‑‒–—−]\d{1,2}$/.test(iss.input)
            ? `band "${iss.input}" is written with a dash; write the plain hyphen-minus "-", e.g. "1-0"`
            : 'band must be "v\'-v\'\'" (upper-lower, each 0 to 99), e.g. "1-0"',
      })
      .optional()
      .describe('diatomic: v\'-v\'\' (upper-lower), e.g. "1-0", "2-0", "0-0" for pure rotation'),
    upper: LinearLevelSchema.optional().describe('linear polyatomic: the upper level (instead of band)'),
    lower: LinearLevelSchema.optional().describe('linear polyatomic: the lower level (instead of band)'),
    branch: z.enum(['P', 'Q', 'R']),
    j: z.number().int().min(0).max(400).describe("lower-state J (J'')"),
    parity: z
      .enum(['e', 'f'])
      .optional()
      .describe('linear polyatomic: e/f component of the lower level; needed only when both levels have l ≥ 1'),
    species: SpeciesStringSchema.optional().describe('needed only when lines of several isotopologues are mixed'),
  })
  .meta({ id: 'Assignment' });

/** A caller's name for a line, echoed in the response and printed in the report's line table. */
export const LineIdSchema = z
  .union([z.string().min(1).max(100), z.number().int()])
  .describe("the caller's identifier of the line (echoed); the report numbers lines from 1 without it");

/**
 * Largest magnitude of a position, uncertainty, intensity or spectrum value: far beyond any real one (30 000 cm⁻¹
 * is 9·10⁸ MHz), and small enough that sums of squares over the largest request stay finite.
 */
export const MAX_MAGNITUDE = 1e12;

/** Smallest uncertainty a line may state, as a fraction of its position (about 5 units in the last place). */
export const MIN_RELATIVE_UNCERTAINTY = 1e-15;

const ASSIGNMENT_KEYS = new Set(['band', 'branch', 'j', 'species']);

/**
 * The answer to an unknown key in a line: the keys a line has, and where an assignment goes when its keys were put
 * on the line itself (as in a CSV row).
 */
function unknownLineKeys(issue: { code?: string; keys?: readonly PropertyKey[] }): string | undefined {
  if (issue.code !== 'unrecognized_keys' || !issue.keys) return undefined;
  const keys = issue.keys.map(String);
  const listed = keys.map((k) => `"${k}"`).join(', ');
  const hint = keys.some((k) => ASSIGNMENT_KEYS.has(k))
    ? '; an assignment goes in its own object: "assignment": {"band": "1-0", "branch": "P", "j": 1}'
    : '';
  return `Unrecognized key(s) ${listed}: a line has position, uncertainty, intensity, id, source and assignment${hint}`;
}

/**
 * The answer to an unknown key of an object with a fixed set of keys (a request, its options): the keys it has, so a
 * misspelt or misplaced key says what to write instead.
 */
export function unknownKeysOf(what: string, keys: () => readonly string[]) {
  return (issue: { code?: string; keys?: readonly PropertyKey[] }): string | undefined => {
    if (issue.code !== 'unrecognized_keys' || !issue.keys) return undefined;
    const listed = issue.keys.map((k) => `"${String(k)}"`).join(', ');
    return `Unrecognized key(s) ${listed}: ${what} has ${keys().join(', ')}`;
  };
}

export const LineSchema = z
  .strictObject(
    {
      id: LineIdSchema.optional(),
      position: positiveNumber().max(MAX_MAGNITUDE).describe('line position in the request unit'),
      uncertainty: positiveNumber()
        .max(MAX_MAGNITUDE)
        .optional()
        .describe(
          'standard uncertainty in the request unit; at least 1e-15 of the position (a double resolves the position to about 2e-16 of it)',
        ),
      intensity: realNumber().min(0).max(MAX_MAGNITUDE).optional().describe('any linear scale'),
      source: z
        .string()
        .min(1)
        .max(100)
        .optional()
        .describe(
          'label of the instrument or file the line came from: lines without an uncertainty get σ from the scatter of their source; stated σ that disagree with the other sources are rescaled per source (UNCERTAINTY_RESCALED); the offset of each source that the shared levels determine (against the source of most weight when only relative offsets are determined) is reported in SOURCE_MEAN_RESIDUALS, which names the source that lies off beyond 3σ, and a source whose bands share no level or loop with those of another source is named in SOURCE_OFFSET_UNIDENTIFIABLE; an offset beyond 3σ (or any, with options.fitSourceOffsets) is carried in the fit as a parameter, keeping it out of the band origins and constants, and the offset of every source against the reference source is in sourceOffsets; the calibration check does not pass while the sources disagree',
        ),
      assignment: AssignmentSchema.optional(),
    },
    { error: unknownLineKeys },
  )
  .superRefine((line, ctx) => {
    // Below ~5 units in the last place of its position an uncertainty cannot be meant (2139.4218 cm-1 is resolved to
    // 4.5e-13); its weight then swamps every other line's (σ = 1e-30 among 0.002: 422 "cannot be told apart").
    const u = line.uncertainty;
    const floor = MIN_RELATIVE_UNCERTAINTY * line.position;
    if (u === undefined || !(u >= MIN_NORMAL && u < floor)) return;
    const step = 10 ** (Math.floor(Math.log10(floor)) - 1);
    const shown = Number((Math.ceil(floor / step) * step).toPrecision(2));
    ctx.addIssue({
      code: 'custom',
      path: ['uncertainty'],
      message: `uncertainty ${u} is below 1e-15 of the position ${line.position}, finer than a double resolves it: send at least ${shown}`,
    });
  })
  .meta({ id: 'Line' });

const fitOptionsShape = {
  uncertaintyMode: z
    .enum(['a-posteriori', 'absolute'])
    .optional()
    .describe(
      'a-posteriori (default): stated uncertainties are relative weights and the covariance is scaled by χ²/(n−p) (scaled down only on 10 or more degrees of freedom when every line states its σ, else the stated σ stand: UNCERTAINTY_MODE_CHANGED); absolute: line uncertainties taken as given, and a χ² improbable for its degrees of freedom is warned of (CHI_SQUARE_HIGH, CHI_SQUARE_LOW)',
    ),
  rejectionThreshold: realNumber()
    .min(0)
    .max(1000)
    .optional()
    .describe(
      'externally studentised residual beyond which a line is rejected (default 4; raised to the two-sided normal quantile of 0.25/n for n lines when that is larger, i.e. from about 4 000 lines; 0 turns rejection off)',
    ),
  maxRejectedFraction: realNumber()
    .min(0)
    .max(0.5)
    .optional()
    .describe('largest fraction of the lines that outlier rejection may take out (default 0.2)'),
  termSignificance: positiveNumber()
    .lt(0.5)
    .optional()
    .describe('F-test p-value below which an added term is kept (default 0.01)'),
  maxCentrifugalOrder: z
    .number()
    .int()
    .min(1)
    .max(5)
    .optional()
    .describe('1 = B, 2 = D, 3 = H, 4 = L, 5 = M (default 5)'),
  massReducedDunham: z.boolean().optional().describe('also fit U_kl across isotopologues (default false)'),
  temperature: realNumber()
    .min(10)
    .max(6000)
    .optional()
    .describe('gas temperature in K for the Boltzmann weights of automatic assignment (default 296)'),
  maxOffset: realNumber()
    .min(0)
    .max(5)
    .optional()
    .describe(
      'largest instrument wavenumber offset searched by automatic assignment, cm-1 (default 0.5; linear polyatomic species 1.2)',
    ),
  lean: z
    .boolean()
    .optional()
    .describe(
      'true: each entry of `lines` leaves out what the request already holds (uncertainty, intensity, an assignment the caller gave), keeping index, id and position to match lines by; smaller answers for large lists (default false)',
    ),
  structureBand: z
    .string()
    .regex(/^\d{1,2}-\d{1,2}$/)
    .optional()
    .describe('band to number when a species without reference constants is assigned from its structure (default 1-0)'),
  fitSourceOffsets: z
    .boolean()
    .optional()
    .describe(
      "lines of two or more sources (diatomic fits): true carries each source's wavenumber offset against the reference source as a fitted parameter, so band origins and constants are free of it and their σ include its uncertainty; false never; default: carried when an offset lies more than 3σ from zero (the answer's sourceOffsets says which). Lines of one instrument whose bands fix the absolute scale (a loop of bands, a pure-rotation band): the same for their common offset (scaleOffset)",
    ),
  referenceSource: z
    .string()
    .min(1)
    .max(200)
    .optional()
    .describe(
      "the line source that the other sources' offsets are measured against (sourceOffsets); must be the source of at least one line; default: the source with most fitted lines",
    ),
};

export const FitOptionsSchema = z
  .strictObject(fitOptionsShape, { error: unknownKeysOf('options', () => Object.keys(fitOptionsShape)) })
  .meta({ id: 'FitOptions' });

/** Most points of a spectrum in one request. */
export const MAX_SPECTRUM_POINTS = 5_000_000;

/** Spellings of the spectrum's x unit that instruments and JCAMP-DX files use, each read as one of cm-1, um, nm. */
const X_UNIT_SPELLINGS = {
  'cm-1': 'cm-1',
  '1/cm': 'cm-1',
  '1/CM': 'cm-1',
  'cm^-1': 'cm-1',
  'cm⁻¹': 'cm-1',
  'CM-1': 'cm-1',
  wavenumber: 'cm-1',
  wavenumbers: 'cm-1',
  WAVENUMBERS: 'cm-1',
  um: 'um',
  µm: 'um',
  μm: 'um',
  micrometers: 'um',
  micrometres: 'um',
  microns: 'um',
  MICROMETERS: 'um',
  nm: 'nm',
  nanometers: 'nm',
  nanometres: 'nm',
  NANOMETERS: 'nm',
} as const satisfies Record<string, 'cm-1' | 'um' | 'nm'>;
type XUnitSpelling = keyof typeof X_UNIT_SPELLINGS;

export const XUnitSchema = z
  .enum(Object.keys(X_UNIT_SPELLINGS) as [XUnitSpelling, ...XUnitSpelling[]])
  .default('cm-1')
  .transform((spelling) => X_UNIT_SPELLINGS[spelling])
  .describe('wavenumber (cm-1, also written 1/cm, cm^-1, wavenumbers), or vacuum wavelength (um, µm; nm)');

/** Spellings of a line list's unit: the spectrum's x-unit spellings and the frequency units of pure rotation. */
const POSITION_UNIT_SPELLINGS = {
  ...X_UNIT_SPELLINGS,
  MHz: 'MHz',
  GHz: 'GHz',
  THz: 'THz',
} as const satisfies Record<string, PositionUnit>;
type PositionUnitSpelling = keyof typeof POSITION_UNIT_SPELLINGS;

export const PositionUnitSchema = z
  .enum(Object.keys(POSITION_UNIT_SPELLINGS) as [PositionUnitSpelling, ...PositionUnitSpelling[]])
  .transform((spelling): PositionUnit => POSITION_UNIT_SPELLINGS[spelling])
  .describe(
    'unit of line positions and uncertainties: wavenumber (cm-1, also written 1/cm, cm^-1, wavenumbers), frequency (MHz, GHz, THz) or vacuum wavelength (um, µm; nm); default cm-1',
  );

export const SpectrumSchema = z
  .strictObject({
    x: z
      .array(realNumber().min(-MAX_MAGNITUDE).max(MAX_MAGNITUDE))
      .min(7)
      .max(MAX_SPECTRUM_POINTS)
      .describe(
        'abscissa, increasing or decreasing; in a wavelength unit (xUnit um or nm) each x is at least 1e-8 µm or 1e-5 nm (a wavenumber up to 1e12 cm-1)',
      ),
    y: z.array(realNumber().min(-MAX_MAGNITUDE).max(MAX_MAGNITUDE)).min(7).max(MAX_SPECTRUM_POINTS),
    yUnit: z
      .enum(['absorbance', 'transmittance'])
      .default('absorbance')
      .describe('transmittance as a fraction or in per cent'),
    xUnit: XUnitSchema,
  })
  .refine((s) => s.x.length === s.y.length, { message: 'x and y must have the same number of points', path: ['y'] })
  .superRefine((s, ctx) => {
    // A wavelength becomes the wavenumber 1e4/x (um) or 1e7/x (nm): it must be positive and give a wavenumber up to
    // MAX_MAGNITUDE cm-1. A subnormal x in um overflowed to Infinity and came back as a 422 "point 5 is not a finite
    // number", 0 or a negative x as a 422 from the conversion; they are bad values of the field (400 naming it).
    if (s.xUnit !== 'um' && s.xUnit !== 'nm') return;
    const least = (s.xUnit === 'um' ? 1e4 : 1e7) / MAX_MAGNITUDE;
    let named = 0;
    s.x.forEach((x, i) => {
      if (x >= least || named >= 5) return;
      named++;
      ctx.addIssue({
        code: 'custom',
        path: ['x', i],
        message: `a vacuum wavelength in ${s.xUnit} must be at least ${least} (a wavenumber up to ${MAX_MAGNITUDE} cm-1), received ${x}`,
      });
    });
  })
  .meta({ id: 'Spectrum' });

export const PeakOptionsSchema = z
  .strictObject({
    threshold: realNumber()
      .min(2)
      .max(1000)
      .optional()
      .describe('detection threshold in noise standard deviations (default 6)'),
    shape: z
      .enum(['gaussian', 'lorentzian', 'voigt'])
      .optional()
      .describe('line shape fitted (default voigt: pseudo-Voigt)'),
  })
  .meta({ id: 'PeakOptions' });

/** The fields of a fit request; `lines` or `spectrum`, exactly one (checked by fitRequestSchema). */
export function fitRequestFields(maxLines: number) {
  return {
    species: SpeciesStringSchema.optional(),
    unit: PositionUnitSchema.optional(),
    lines: z.array(LineSchema).min(1).max(maxLines).optional(),
    spectrum: SpectrumSchema.optional().describe(
      'a spectrum instead of lines: peaks are found, then assigned and fitted',
    ),
    peakOptions: PeakOptionsSchema.optional(),
    options: FitOptionsSchema.optional(),
    sample: SampleSchema.optional(),
  };
}

const exactlyOne = (b: { lines?: unknown; spectrum?: unknown }) =>
  (b.lines === undefined) !== (b.spectrum === undefined);
const exactlyOneMessage = { message: 'give either "lines" or "spectrum", not both and not neither', path: ['lines'] };

/** options.referenceSource, when sent, must be the `source` of a line of the request. */
function knownReferenceSource(
  b: {
    lines?: readonly { source?: string | undefined }[] | undefined;
    options?: { referenceSource?: string | undefined } | undefined;
  },
  ctx: z.core.$RefinementCtx,
): void {
  const ref = b.options?.referenceSource;
  if (ref === undefined || b.lines?.some((l) => l.source === ref)) return;
  const known = [...new Set((b.lines ?? []).flatMap((l) => (l.source !== undefined ? [l.source] : [])))].sort();
  ctx.addIssue({
    code: 'custom',
    path: ['options', 'referenceSource'],
    message: `"${ref}" is the source of no line; the lines' sources are ${known.length > 0 ? known.map((k) => `"${k}"`).join(', ') : 'none'}`,
  });
}

export function fitRequestSchema(maxLines: number) {
  const fields = fitRequestFields(maxLines);
  return z
    .strictObject(fields, { error: unknownKeysOf('a fit request', () => Object.keys(fields)) })
    .refine(exactlyOne, exactlyOneMessage)
    .superRefine(knownReferenceSource)
    .meta({ id: 'FitRequest' });
}
export type FitRequest = z.output<ReturnType<typeof fitRequestSchema>>;
export { exactlyOne, exactlyOneMessage, knownReferenceSource };

const Q = QuantitySchema;

export const LineOutcomeSchema = z.object({
  index: z.number().int(),
  id: LineIdSchema.optional(),
  position: z.number().describe('cm-1'),
  uncertainty: z
    .number()
    .optional()
    .describe(
      'standard uncertainty of the position, cm-1: as sent, or from the peak fit; absent when none was given or in a lean answer',
    ),
  intensity: z.number().optional().describe('as sent'),
  source: z
    .string()
    .optional()
    .describe('the instrument or file the line came from, as sent (absent in a lean answer)'),
  assignment: z
    .object({
      band: z.string().describe('diatomic "v\'-v\'\'"; linear polyatomic: the band label, e.g. "00⁰1–00⁰0"'),
      branch: z.enum(['P', 'Q', 'R']),
      j: z.number().int(),
      species: z.string(),
      source: z.enum(['given', 'auto']),
      upper: LinearLevelSchema.optional().describe('linear polyatomic: the upper level'),
      lower: LinearLevelSchema.optional().describe('linear polyatomic: the lower level'),
      parity: z.enum(['e', 'f']).optional().describe('linear polyatomic: e/f component of the lower level'),
      upperParity: z.enum(['e', 'f']).optional().describe('linear polyatomic: e/f component of the upper level'),
      upperJ: z.number().int().optional().describe("linear polyatomic: J'"),
    })
    .optional(),
  calculated: z.number().optional(),
  residual: z.number().optional().describe('observed − calculated, cm-1'),
  studentisedResidual: z.number().optional(),
  status: z.enum(['fitted', 'rejected', 'unassigned']),
  reason: z.string().optional(),
});

export const EquilibriumSchema = z
  .object({
    species: z.string(),
    omega_e: Q.optional(),
    omega_e_x_e: Q.optional(),
    omega_e_y_e: Q.optional(),
    B_e: Q.optional(),
    alpha_e: Q.optional(),
    gamma_e: Q.optional(),
    D_e: Q.optional(),
    beta_e: Q.optional(),
    H_e: Q.optional(),
    r_e: Q.optional(),
  })
  .meta({ id: 'EquilibriumConstants' });

const NamedQuantity = z.object({
  name: z.string(),
  value: z.number(),
  uncertainty: z.number(),
  unit: z.string(),
  species: z.string().optional(),
  display: DisplaySchema,
});

const TermConstraintSchema = z
  .object({
    parameter: z.string(),
    key: z.string().describe('the parameter key in the model'),
    species: z.string(),
    prior: Q,
    basis: z.string().describe('where the prior value and its uncertainty come from'),
  })
  .describe('a term the lines cannot determine, carried as a constrained parameter with this prior')
  .meta({ id: 'TermConstraint' });

const DunhamFitSchema = z.object({
  species: z.string(),
  parameters: z.array(NamedQuantity),
  covariance: MatrixSchema,
  statistics: z.object({
    degreesOfFreedom: z.number().int(),
    rms: z.number(),
    reducedChiSquare: z.number().nullable(),
  }),
  terms: z.array(z.string()),
  constrained: z.array(TermConstraintSchema).optional(),
});

const CalibrationSchema = z
  .object({
    offset: Q.describe('observed − reference at `centre` (the weighted centre of the matched lines)'),
    scale: Q.optional().describe('relative scale error in ppm, when the lines span at least 1 % of the centre'),
    centre: z.number().describe('wavenumber at which the offset is quoted'),
    lines: z.number().int(),
    reference: z.string(),
  })
  .describe(
    "the assignment's search estimate: observed − library positions regressed on an offset and a scale only, the library's missing higher terms (γ_e, β_e, H_e …) left in the scatter and the covariance scaled by it a posteriori, so it is biased when the library lacks terms and its σ reflects that misfit; POST /v1/checks reports the calibration to use (checks[calibration]: the same regression with the missing terms carried as priors and the lines' own σ)",
  );

const NumberingEvidenceSchema = z
  .object({
    label: z.string(),
    originSlot: z.number().int(),
    alignment: z.number().int(),
    lines: z.number().int(),
    origin: z.number().optional(),
    lowerB: z.number().optional(),
    reducedChiSquare: z.number(),
    differenceIntercept: z
      .object({ value: z.number(), uncertainty: z.number() })
      .optional()
      .describe('Δ₂F″ extrapolated to J = −½, cm-1 (zero for a right numbering)'),
    lineAtOrigin: z.boolean().describe('a line lies where this numbering puts the band origin'),
    boltzmannScatter: z.number().optional().describe('rms of ln(I/(S·ν)) about one line in E″, both branches'),
    kratzerRatio: z
      .number()
      .optional()
      .describe(
        'D_e / (4B_e³/ω_e²), D_e from D″ through Dunham’s β_e; 1 for a right numbering of a ¹Σ state (0: constants no bound ¹Σ state has)',
      ),
    kratzerUncertainty: z.number().optional().describe('relative standard uncertainty of kratzerRatio'),
    score: z.number().describe('evidence against, χ²-like units; lower is better'),
    parts: z.object({
      positions: z.number(),
      differences: z.number(),
      origin: z.number(),
      intensities: z.number(),
      kratzer: z.number(),
    }),
  })
  .meta({ id: 'NumberingEvidence' });

export const AssignmentReportSchema = z
  .object({
    method: z.enum(['given', 'reference', 'structure']),
    species: z.array(z.string()).describe('isotopologues assigned against'),
    identification: z
      .array(
        z.object({
          species: z.string(),
          name: z.string(),
          score: z.number(),
          matched: z.number().int(),
          predicted: z.number().int(),
          offset: z.number(),
        }),
      )
      .optional()
      .describe('library molecules ranked by how well they explain the lines, when no species was declared'),
    calibration: CalibrationSchema.optional(),
    bands: z.array(
      z.object({
        species: z.string(),
        band: z.string(),
        predicted: z.number().int().describe('lines strong enough to start the band from, in the window'),
        matched: z.number().int(),
        offsets: z
          .array(z.object({ source: z.string().optional(), offset: z.number(), own: z.boolean() }))
          .optional()
          .describe(
            "offset (observed − reference, cm-1) the band was first matched with, per source; own: found by the band's own vote rather than its source's",
          ),
        bestOffset: z
          .object({ offset: z.number(), matches: z.number().int() })
          .optional()
          .describe('for a band predicted but not found: the best offset its own lines find, and how many they match'),
      }),
    ),
    numbering: z
      .object({
        chosen: NumberingEvidenceSchema,
        runnersUp: z.array(NumberingEvidenceSchema),
        margin: z.number().nullable().describe('runner-up score minus chosen score; at least 9 to be reported'),
      })
      .optional()
      .describe('method structure: the evidence for the chosen numbering of the band and against the runners-up'),
    unexplained: z
      .array(
        z.object({
          index: z.number().int(),
          id: LineIdSchema.optional(),
          position: z.number(),
          intensity: z.number().optional(),
        }),
      )
      .describe('lines that no band explains: possible impurities or noise; never fitted'),
  })
  .meta({ id: 'AssignmentReport' });

/** The fit itself: the body of a /v1/fits response, and `fit` in a /v1/checks response. */
const LevelVSchema = z
  .union([z.number().int(), z.array(z.number().int())])
  .describe('diatomic: v; linear polyatomic: the quanta [v1, v2, v3] (or five for C2H2)');

const fitFields = {
  species: z.array(
    z.object({
      formula: z.string(),
      reducedMass: Q.optional().describe('diatomic species'),
      mass: Q.optional().describe('linear polyatomic species: molecular mass, u (AME2020)'),
    }),
  ),
  convention: z
    .string()
    .optional()
    .describe('linear polyatomic fits: the term-value formula and e/f sign convention the constants belong to'),
  lines: z.array(LineOutcomeSchema),
  bands: z.array(
    z.object({
      species: z.string(),
      band: z.string(),
      origin: Q.optional().describe('linear polyatomic: ν₀ = G_v′ − G_v″ of the B[J(J+1) − l²] form'),
      lines: z.number().int().describe('lines of this band in the fit (rejected lines not counted)'),
      jRange: z.array(z.number().int()).describe('lowest and highest J″ of those lines'),
      upper: LinearLevelSchema.optional().describe('linear polyatomic'),
      lower: LinearLevelSchema.optional().describe('linear polyatomic'),
      label: z.string().optional().describe('linear polyatomic: the band in the trade notation, e.g. "00⁰1–00⁰0"'),
      kind: z.enum(['parallel', 'perpendicular']).optional().describe('linear polyatomic: Δl = 0 or ±1'),
    }),
  ),
  levels: z.array(
    z.object({
      species: z.string(),
      v: LevelVSchema,
      l: z.number().int().optional().describe('linear polyatomic: vibrational angular momentum'),
      rank: z.number().int().optional().describe('linear polyatomic: rank within a Fermi polyad'),
      label: z.string().optional().describe('linear polyatomic: the level in the trade notation, e.g. "01¹0"'),
      term: Q.extend({ relativeTo: z.union([z.number().int(), z.string()]) }).optional(),
      B: Q.optional().describe(
        'always present for diatomic levels; absent for a linear level seen only through l-type transitions',
      ),
      D: Q.optional().describe(
        'diatomic: D_v of E_v(J) = T_v + B_v x − D_v x² + H_v x³ + L_v x⁴ + M_v x⁵, x = J(J+1), cm-1 (positive for a normal molecule); H_v, L_v, M_v only when the model carries them (model.levelTerms); linear polyatomic: the formula in `convention`',
      ),
      H: Q.optional().describe('H_v, the x³ term (sign as in the formula of D)'),
      L: Q.optional().describe('L_v, the x⁴ term (sign as in the formula of D)'),
      M: Q.optional().describe('M_v, the x⁵ term (pure-rotation lines to high J)'),
      r: Q.optional().describe(
        'effective bond length of this level from B_v, Å (absent when B_v is not positive); not r_e',
      ),
      q: Q.optional().describe('linear polyatomic, l ≥ 1: l-type doubling, E(f) − E(e) = q J(J+1) + q_J [J(J+1)]²'),
      qJ: Q.optional().describe('linear polyatomic, l ≥ 1: centrifugal correction of the l-type doubling'),
      parity: z
        .enum(['e', 'f'])
        .optional()
        .describe('linear polyatomic: the only component seen (q undetermined, B is its effective B)'),
    }),
  ),
  equilibrium: z.array(EquilibriumSchema),
  parameters: z.array(NamedQuantity),
  covariance: MatrixSchema,
  correlation: MatrixSchema,
  statistics: z.object({
    lines: z.number().int(),
    assigned: z.number().int(),
    fitted: z.number().int(),
    rejected: z.number().int(),
    unassigned: z.number().int(),
    parameters: z.number().int(),
    degreesOfFreedom: z.number().int(),
    rms: z.number(),
    reducedChiSquare: z.number().nullable(),
    conditionNumber: z.number().nullable(),
    uncertaintyMode: z.enum(['a-posteriori', 'absolute']),
  }),
  model: z.object({
    levelTerms: z.array(
      z.object({ species: z.string(), v: LevelVSchema, l: z.number().int().optional(), terms: z.array(z.string()) }),
    ),
    selection: z.string(),
    constraints: z
      .array(TermConstraintSchema)
      .describe('terms carried with a prior because the lines cannot determine them; their σ is in the covariance'),
  }),
  dunham: z.array(DunhamFitSchema),
  massReducedDunham: DunhamFitSchema.optional(),
  combinationDifferences: z.array(
    z.object({
      species: z.string(),
      band: z.string(),
      kind: z.enum(['lower', 'upper']),
      v: LevelVSchema,
      level: z.string().optional().describe('linear polyatomic: the level label'),
      points: z.array(
        z.object({ j: z.number().int(), value: z.number(), uncertainty: z.number(), residual: z.number() }),
      ),
      B: Q,
      D: Q.optional(),
      H: Q.optional(),
      L: Q.optional(),
      M: Q.optional(),
      rms: z.number(),
      degreesOfFreedom: z.number().int(),
      fitted: Q.describe('B of the same level from the full fit'),
      deviation: z.number().describe('|B_cd − B_fit| in combined standard uncertainties'),
    }),
  ),
  scatter: z
    .array(
      z.object({
        group: z.string(),
        by: z.enum(['source', 'band', 'pooled']),
        lines: z.number().int(),
        sigma: z.number().describe('cm-1'),
      }),
    )
    .optional()
    .describe('σ estimated from the residual scatter (robust) for the lines sent without an uncertainty'),
  sourceOffsets: z
    .object({
      reference: z.string().describe('the source the offsets are measured against (options.referenceSource)'),
      applied: z
        .boolean()
        .describe(
          "true: the offsets were carried in the fit, so band origins, levels and constants are free of them and their σ include the offsets' uncertainty; a line's calculated position includes its source's offset",
        ),
      basis: z
        .enum(['flagged', 'flagged, reference unverified', 'asked', 'not flagged', 'not asked'])
        .describe(
          "flagged: an offset lay beyond 3σ and was carried; flagged, reference unverified: beyond 3σ but resting on a loop of bands alone, which cannot tell the reference's own miscalibration from the other's, so not carried (SOURCE_OFFSET_NOT_CARRIED); asked / not asked: options.fitSourceOffsets",
        ),
      sources: z.array(
        z.object({
          source: z.string(),
          lines: z.number().int().describe('fitted lines of this source'),
          offset: Q.optional().describe(
            "this source's positions minus the reference's, cm-1 (0 for the reference); absent when no level or loop of bands shared with the other sources determines it",
          ),
        }),
      ),
    })
    .optional()
    .describe("lines of two or more sources: each source's wavenumber offset against the reference source"),
  scaleOffset: z
    .object({
      offset: Q.describe(
        "the lines' positions minus the absolute scale their bands fix, cm-1: each band of a loop (such as 2-0 against 1-0 + 2-1) holds it once, so the loop closes at it instead of 0; a pure-rotation band extrapolates to it at J = 0",
      ),
      applied: z
        .boolean()
        .describe(
          "true: carried in the fit, so band origins, levels and constants are free of it and their σ include its uncertainty; a line's calculated position includes it",
        ),
      basis: z
        .enum(['flagged', 'asked', 'not flagged', 'not asked', 'too large'])
        .describe(
          'flagged: beyond 3σ from 0, carried (warning SCALE_OFFSET); not flagged: reported only; too large: beyond 3σ but over 1 cm-1, which no calibration explains (a band numbered or labelled wrong), not carried; asked / not asked: options.fitSourceOffsets',
        ),
      bands: z.array(z.string()).describe('the bands whose lines fixed it'),
    })
    .optional()
    .describe(
      "lines of one instrument (one source, or none named) whose bands fix the absolute wavenumber scale: the offset common to every line, the instrument's calibration as the lines themselves show it",
    ),
  crossChecks: z.array(
    z.object({
      species: z.string(),
      id: z.string(),
      description: z.string(),
      formula: z.string(),
      value: Q,
      fitted: Q.optional(),
      approximation: z.literal(true),
    }),
  ),
  assignment: AssignmentReportSchema,
  spectrum: z
    .object({ points: z.number().int(), peaks: z.number().int(), noise: z.number(), step: z.number() })
    .optional()
    .describe('when a spectrum was sent: how many points, how many peaks found, the absorbance noise and the step'),
  warnings: z.array(WarningSchema),
  notice: z.string().describe('safety caution: the service certifies nothing about a gas'),
};

export const FitSchema = z.object(fitFields).meta({ id: 'Fit' });
/** The fit without provenance (what the use cases compute; nested in check responses). */
export type FitResponse = z.input<typeof FitSchema>;

export const FitResponseSchema = z.object({ ...fitFields, ...provenanceAndSampleFields }).meta({ id: 'FitResponse' });
export type FitResponseWithProvenance = z.input<typeof FitResponseSchema>;

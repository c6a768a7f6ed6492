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

const LinearLibraryValueSchema = z.object({
  value: z.number(),
  uncertainty: z.number().nullable().describe('1σ; null when the source gives none (never 0)'),
  unit: z.literal('cm-1'),
  status: z.enum(['read', 'read-secondary', 'derived', 'recalled']),
  source: z.string().describe('key(s) of `sources`, joined by "+"'),
  note: z.string().optional(),
});

export const LinearSpeciesEntrySchema = z
  .object({
    formula: z.string().describe('the chain along the axis, mass numbers first ("16O-12C-16O")'),
    aliases: z.array(z.string()),
    name: z.string(),
    kind: z.literal('linear'),
    mass: z.object({ value: z.number(), uncertainty: z.number(), unit: z.literal('u') }),
    naturalAbundance: z.number().describe('product of the isotopic amount fractions (CIAAW 2013, Meija et al. 2016)'),
    modes: z.array(z.string()),
    hazard: z.string(),
    levels: z.array(
      z.object({
        v: z.array(z.number().int()),
        l: z.number().int(),
        rank: z.number().int().optional(),
        label: z.string(),
        databaseLabel: z.string(),
        name: z.string(),
        G: LinearLibraryValueSchema,
        B: LinearLibraryValueSchema,
        D: LinearLibraryValueSchema,
        H: LinearLibraryValueSchema.optional(),
        q: LinearLibraryValueSchema.optional(),
        qJ: LinearLibraryValueSchema.optional().describe('l ≥ 1: E(f) − E(e) = q J(J+1) + q_J [J(J+1)]²'),
        note: z.string().optional(),
      }),
    ),
    otherModes: z.array(z.object({ mode: z.string(), centre: LinearLibraryValueSchema })).optional(),
    sources: z.record(z.string(), z.object({ cite: z.string(), address: z.string() })),
  })
  .meta({ id: 'LinearSpeciesEntry' });

const SpeciesEntryResponseSchema = z
  .union([
    SpeciesEntrySchema.extend({ notice: z.string(), ...provenanceFields }),
    LinearSpeciesEntrySchema.extend({ notice: z.string(), ...provenanceFields }),
  ])
  .meta({ id: 'SpeciesEntryResponse' });

export const SpeciesListSchema = z
  .object({
    species: z.array(SpeciesEntrySchema),
    linear: z.array(LinearSpeciesEntrySchema).describe('the linear polyatomic library (CO2, N2O, OCS, HCN, C2H2, …)'),
    notice: z.string(),
    ...provenanceFields,
  })
  .meta({ id: 'SpeciesList' });
export { SpeciesEntryResponseSchema };
export const SpeciesParamsSchema = z.object({ formula: z.string().min(1).max(40) });

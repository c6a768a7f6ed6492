import type { FastifyInstance, FastifyRequest } from 'fastify';
import { GraphQLScalarType } from 'graphql';
import mercurius from 'mercurius';
import type { z } from 'zod';
import { ScienceError } from '../../src/errors.js';
import type { Config } from '../config.js';
import { HttpProblem, nonFiniteProblem, scienceProblem } from '../errors.js';
import { SAFETY_NOTICE } from '../notice.js';
import { jobSize } from '../pool.js';
import { stamped } from '../provenance.js';
import { checkRequestSchema } from '../schemas/checks.js';
import { fitRequestSchema } from '../schemas/fit.js';
import { PeaksRequestSchema } from '../schemas/peaks.js';
import { potentialRequestSchema } from '../schemas/potentials.js';
import { PredictionRequestSchema } from '../schemas/predictions.js';
import { NonFiniteResult } from '../usecases/finite.js';
import { getDiatomicSpeciesEntry, getLinearSpecies, listSpecies } from '../usecases/species.js';

const JSONScalar = new GraphQLScalarType({
  name: 'JSON',
  serialize: (v) => v,
  parseValue: (v) => v,
});

/** GraphQL sends absent optional fields as null; zod expects them absent (so that defaults apply). */
function dropNulls(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(dropNulls);
  if (v && typeof v === 'object') {
    return Object.fromEntries(
      Object.entries(v as Record<string, unknown>)
        .filter(([, x]) => x !== null && x !== undefined)
        .map(([k, x]) => [k, dropNulls(x)]),
    );
  }
  return v;
}

function badInput(error: z.ZodError): never {
  const errors = error.issues.map((i) => ({ path: i.path.join('/') || '(input)', message: i.message }));
  throw new mercurius.ErrorWithProps('input does not match the schema', { code: 'VALIDATION_FAILED', errors }, 200);
}

/** Run a use case, turning science errors into GraphQL errors with the REST problem's code and fields. */
async function guarded<T>(f: () => T | Promise<T>): Promise<T> {
  try {
    return await f();
  } catch (e) {
    const p =
      e instanceof ScienceError
        ? scienceProblem(e)
        : e instanceof NonFiniteResult
          ? nonFiniteProblem(e)
          : e instanceof HttpProblem
            ? e.problem
            : undefined;
    if (!p) throw e;
    const { detail, ...rest } = p;
    throw new mercurius.ErrorWithProps(detail, rest, 200);
  }
}

/** The part of mercurius's context the resolvers read: the HTTP request, for its body digest. */
interface Ctx {
  readonly reply: { readonly request: FastifyRequest };
}

export function resolvers(config: Config, app: FastifyInstance) {
  const schema = fitRequestSchema(config.maxLines);
  const potentialSchema = potentialRequestSchema(config.maxLines);
  const checkSchema = checkRequestSchema(config.maxLines);
  return {
    JSON: JSONScalar,
    // A library entry carries the caution too, as GET /v1/species/{formula} does.
    SpeciesEntry: { notice: () => SAFETY_NOTICE },
    LinearSpeciesEntry: { notice: () => SAFETY_NOTICE },
    Query: {
      fit: async (_: unknown, args: { input: unknown }, ctx: Ctx) => {
        const parsed = schema.safeParse(dropNulls(args.input));
        if (!parsed.success) badInput(parsed.error);
        const body = parsed.data;
        const r = await guarded(() => app.pool.run<object>({ kind: 'fit', body }, jobSize(body)));
        return stamped(ctx.reply.request, r, body.sample);
      },
      check: async (_: unknown, args: { input: unknown; tolerances?: unknown }, ctx: Ctx) => {
        const raw = dropNulls({
          ...(args.input as object),
          ...(args.tolerances != null ? { tolerances: args.tolerances } : {}),
        });
        const parsed = checkSchema.safeParse(raw);
        if (!parsed.success) badInput(parsed.error);
        const body = parsed.data;
        const r = await guarded(() => app.pool.run<object>({ kind: 'check', body }, jobSize(body)));
        return stamped(ctx.reply.request, r, body.sample);
      },
      peaks: (_: unknown, args: { spectrum: unknown; peakOptions?: unknown }) => {
        const parsed = PeaksRequestSchema.safeParse(
          dropNulls({ spectrum: args.spectrum, peakOptions: args.peakOptions }),
        );
        if (!parsed.success) badInput(parsed.error);
        const body = parsed.data;
        return guarded(() => app.pool.run({ kind: 'peaks', body, peakThreads: config.peakThreads }, jobSize(body)));
      },
      predict: async (_: unknown, args: { input: unknown }, ctx: Ctx) => {
        const input = dropNulls(args.input) as Record<string, unknown>;
        const { levelBands, ...rest } = input;
        const merged = Array.isArray(levelBands)
          ? { ...rest, bands: [...(Array.isArray(rest.bands) ? rest.bands : []), ...levelBands] }
          : levelBands !== undefined
            ? { ...rest, bands: levelBands }
            : rest;
        const parsed = PredictionRequestSchema.safeParse(merged);
        if (!parsed.success) badInput(parsed.error);
        const body = parsed.data;
        const r = await guarded(() => app.pool.run<object>({ kind: 'predict', body }, 1));
        return stamped(ctx.reply.request, r, body.sample);
      },
      potential: (_: unknown, args: { input: unknown }) => {
        const parsed = potentialSchema.safeParse(dropNulls(args.input));
        if (!parsed.success) badInput(parsed.error);
        const body = parsed.data;
        return guarded(() => app.pool.run({ kind: 'potential', body }, Math.max(jobSize(body), 1)));
      },
      species: (_: unknown, args: { formula?: string | null }) =>
        guarded(() => (args.formula ? [getDiatomicSpeciesEntry(args.formula)] : listSpecies().species)),
      linearSpecies: (_: unknown, args: { formula?: string | null }) =>
        guarded(() => (args.formula ? [getLinearSpecies(args.formula)] : listSpecies().linear)),
    },
  };
}

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { EMPTY_SHA256, SOFTWARE } from '../../services/provenance.js';
import { CheckResponseSchema } from '../../services/schemas/checks.js';
import { FitResponseSchema } from '../../services/schemas/fit.js';
import { SpeciesEntryResponseSchema } from '../../services/schemas/species.js';
import { compiledSerializer } from '../../services/serializer.js';
import { runCheck } from '../../services/usecases/check.js';
import { assertFinite } from '../../services/usecases/finite.js';
import { runFit } from '../../services/usecases/fit.js';
import { getSpecies } from '../../services/usecases/species.js';
import { CO_DATABASE as real } from '../helpers/co-database.js';

/**
 * Production answers are written by serialisers compiled from the zod schemas (services/serializer.ts), not by
 * JSON.stringify. Here both write the same answers of the use cases, computed from real data (the CO database lines
 * of test/fixtures/co-database-lines/, HITRAN2020), and the texts must hold the same members with the same values,
 * number for number (compared with Object.is after parsing, so a digit lost or added shows), nothing dropped.
 */

/** The path of the first difference between two parsed JSON values (numbers compared with Object.is), or undefined. */
function firstDifference(a: unknown, b: unknown, path = ''): string | undefined {
  if (typeof a !== 'object' || a === null || typeof b !== 'object' || b === null)
    return Object.is(a, b) ? undefined : `${path || '/'}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`;
  if (Array.isArray(a) !== Array.isArray(b)) return `${path}: array vs object`;
  const ka = Object.keys(a).sort();
  const kb = Object.keys(b).sort();
  if (ka.join() !== kb.join()) return `${path}: keys ${ka.join()} vs ${kb.join()}`;
  for (const k of ka) {
    const d = firstDifference((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}/${k}`);
    if (d) return d;
  }
  return undefined;
}

function sameAsJson(schema: z.ZodType, result: object): void {
  // As the routes send it: with the provenance of services/provenance.ts.
  const answer = { ...result, software: SOFTWARE, input: { sha256: EMPTY_SHA256 } };
  const compiled = compiledSerializer(schema)(answer);
  const plain = JSON.stringify(answer);
  expect(firstDifference(JSON.parse(compiled), JSON.parse(plain))).toBeUndefined();
  // Same bytes apart from the order of members: the same length.
  expect(compiled.length).toBe(plain.length);
}

const assigned = real.lines.map((l) => ({
  position: l.position,
  uncertainty: l.uncertainty,
  assignment: { band: l.band, branch: l.branch, j: l.j },
}));

describe('the compiled serialiser writes what JSON.stringify writes, on answers from real CO lines', () => {
  it(`fit of the ${real.lines.length} assigned database lines`, () => {
    sameAsJson(FitResponseSchema, assertFinite(runFit({ species: 'CO', lines: assigned })));
  });
  it('the same, lean, with display strings absent and ids present', () => {
    const lines = assigned.slice(0, 80).map((l, i) => ({ ...l, id: `L${i}` }));
    sameAsJson(FitResponseSchema, assertFinite(runFit({ species: 'CO', lines, options: { lean: true } })));
  });
  it('fit of the 1-0 lines sent bare (assigned by the service; unassigned lines and notes included)', () => {
    const bare = real.lines.filter((l) => l.band === '1-0').map((l) => ({ position: l.position }));
    sameAsJson(FitResponseSchema, assertFinite(runFit({ species: 'CO', lines: bare })));
  });
  it('check of the 1-0 and 2-0 lines', () => {
    const lines = assigned.filter((l) => l.assignment.band === '1-0' || l.assignment.band === '2-0');
    sameAsJson(CheckResponseSchema, assertFinite(runCheck({ species: 'CO', lines })));
  });
  it('check of lines no band explains: the fit is null (a union of an object and null in the schema)', () => {
    const answer = assertFinite(
      runCheck({ species: 'CO', lines: [{ position: 1000 }, { position: 1100 }, { position: 1200 }] }),
    );
    expect(answer.fit).toBeNull();
    sameAsJson(CheckResponseSchema, answer);
  });
  it('fit of the CO2 example with numeric line ids: levels with v as an array (integer | integer[] in the schema)', () => {
    const co2 = JSON.parse(readFileSync(new URL('../../examples/co2-nu3-assigned.json', import.meta.url), 'utf8'));
    const lines = (co2.lines as object[]).map((l, i) => ({ ...l, id: i }));
    const answer = assertFinite(runFit({ ...co2, lines }));
    expect(Array.isArray(answer.levels[0]?.v)).toBe(true);
    sameAsJson(FitResponseSchema, answer);
  });
  it('library entry of CO2 (published values without an uncertainty are null)', () => {
    const entry = getSpecies('CO2');
    expect(JSON.stringify(entry)).toContain('"uncertainty":null');
    sameAsJson(SpeciesEntryResponseSchema, entry);
  });
});

describe('numbers at the edges are written as JSON.stringify writes them', () => {
  const schema = z.object({ values: z.array(z.number()), maybe: z.number().nullable(), n: z.number().int() });
  const values = [
    0,
    -0,
    0.1 + 0.2,
    1 / 3,
    5e-324,
    2.2250738585072014e-308,
    1e21,
    1e-7,
    123456789012345680000,
    -1.5e300,
  ];
  it.each(values)('%s', (x) => {
    const data = { values: [x], maybe: null, n: 7 };
    expect(compiledSerializer(schema)(data)).toBe(JSON.stringify(data));
  });
  it('Infinity becomes null in both; NaN throws in the compiled form (every answer passes assertFinite first)', () => {
    expect(compiledSerializer(schema)({ values: [Infinity], maybe: -Infinity, n: 1 })).toBe(
      JSON.stringify({ values: [Infinity], maybe: -Infinity, n: 1 }),
    );
    expect(() => compiledSerializer(schema)({ values: [Number.NaN], maybe: null, n: 1 })).toThrow(/NaN/);
    expect(() => assertFinite({ values: [Number.NaN] })).toThrow(/values\/0/);
  });
  it('members the schema does not name are left out (the checked app refuses them: response-schemas.test.ts)', () => {
    expect(compiledSerializer(schema)({ values: [], maybe: 1, n: 2, extra: 'x' })).toBe(
      '{"values":[],"maybe":1,"n":2}',
    );
  });
});

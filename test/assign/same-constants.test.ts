import { readFileSync, writeFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';

/**
 * The assignment and fit pipeline gives the same answer after a restructuring or a speed-up: real 12C16O database
 * lines (test/fixtures/co-database-lines/, HITRAN2020) sent without their assignments, with and without their
 * uncertainties, against what the code gave before the assignment loop was split into stages (commit c4b4ab0),
 * stored in test/fixtures/co-database-lines/pipeline-before.json.
 *
 * Compared: every line's label and status (exactly), every fitted parameter and Dunham coefficient within 1e-4 of
 * its own uncertainty, every uncertainty within 1e-5 relative: a reordering of floating-point sums moves the last
 * bits, never a digit anyone reads. (The bars were 1e-6 and 1e-8 until the kernel reduced each band's rows to a
 * triangle before its QR: a different order of the same orthogonal transformations, which moved values by up to
 * 4e-5 of their σ (T_2 − T_0) and the σ of the highest centrifugal terms, the worst-conditioned, by up to 2e-6
 * relative (M_1 without σ, Y34 3.7e-7 with); a wrong line or weight moves them by far more.) A change meant to alter the answer (a better assignment, a new uncertainty
 * rule) rewrites the stored file with `UPDATE_PIPELINE_FIXTURE=1 npx vitest run test/assign/same-constants.test.ts`
 * and says so in its commit.
 */
interface DbLine {
  position: number;
  uncertainty: number;
}
interface Param {
  name: string;
  species?: string;
  value: number;
  uncertainty: number;
}
interface Summary {
  labels: (string | null)[];
  statuses: string[];
  parameters: Param[];
  dunham: Param[];
}
const dir = new URL('../fixtures/co-database-lines/', import.meta.url);
const db = JSON.parse(readFileSync(new URL('lines.json', dir), 'utf8')) as { lines: DbLine[] };
const storedFile = new URL('pipeline-before.json', dir);

function summary(withSigma: boolean): Summary {
  const peaks = db.lines.map((l) => ({ position: l.position, ...(withSigma ? { uncertainty: l.uncertainty } : {}) }));
  const r = analyseLineList(peaks, parseSpecies('12C16O')).result;
  const param = (p: Param): Param => ({
    name: p.name,
    ...(p.species ? { species: p.species } : {}),
    value: p.value,
    uncertainty: p.uncertainty,
  });
  return {
    labels: r.lines.map((l) =>
      l.assignment ? `${l.assignment.band} ${l.assignment.branch}(${l.assignment.j}) ${l.assignment.source}` : null,
    ),
    statuses: r.lines.map((l) => l.status),
    parameters: r.parameters.map(param),
    dunham: (r.dunham ?? []).flatMap((d) => d.parameters.map(param)),
  };
}

const now = { withSigma: summary(true), withoutSigma: summary(false) };
if (process.env.UPDATE_PIPELINE_FIXTURE === '1') writeFileSync(storedFile, `${JSON.stringify(now, null, 1)}\n`);
const stored = JSON.parse(readFileSync(storedFile, 'utf8')) as typeof now;

function expectSameParameters(got: readonly Param[], want: readonly Param[]) {
  expect(got.map((p) => `${p.species ?? ''} ${p.name}`)).toEqual(want.map((p) => `${p.species ?? ''} ${p.name}`));
  got.forEach((p, i) => {
    const w = want[i] as Param;
    expect(Math.abs(p.value - w.value), `${p.name}`).toBeLessThanOrEqual(1e-4 * w.uncertainty);
    expect(Math.abs(p.uncertainty / w.uncertainty - 1), `σ of ${p.name}`).toBeLessThanOrEqual(1e-5);
  });
}

describe('the pipeline gives the stored answer on real CO database lines sent unassigned', () => {
  for (const key of ['withSigma', 'withoutSigma'] as const) {
    it(`${key === 'withSigma' ? 'with' : 'without'} their uncertainties: labels, statuses, parameters and Dunham coefficients`, () => {
      const got = now[key];
      const want = stored[key];
      expect(got.labels).toEqual(want.labels);
      expect(got.statuses).toEqual(want.statuses);
      expect(got.parameters.length).toBeGreaterThan(10);
      expectSameParameters(got.parameters, want.parameters);
      expectSameParameters(got.dunham, want.dunham);
    });
  }
});

import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * Assigned lines sent twice. The lines are the real 12C16O 1-0 lines J ≤ 15 of test/fixtures/co-database-lines
 * (positions and uncertainties as published), at the `npm start` defaults.
 */
const app = useApp();
const lines = CO_DATABASE.lines
  .filter((l) => l.band === '1-0' && l.j <= 15)
  .map((l) => ({
    position: l.position,
    uncertainty: l.uncertainty,
    assignment: { band: l.band, branch: l.branch, j: l.j },
  }));
const postFit = (body: object) =>
  app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', ...body } });
type W = { code: string; message: string; lines?: number[] };

describe('duplicated assigned lines', () => {
  it('the same band, assignment and position twice: LINES_DUPLICATED names each copy and its original', async () => {
    const n = lines.length;
    const r = await postFit({ lines: [...lines, ...lines.slice(0, 5)] });
    expect(r.statusCode).toBe(200);
    const w = (r.json().warnings as W[]).find((x) => x.code === 'LINES_DUPLICATED');
    expect(w?.lines).toEqual([n, n + 1, n + 2, n + 3, n + 4]);
    expect(w?.message).toMatch(
      /^5 line\(s\) repeat an earlier line's assignment and position .* count twice in the fit/,
    );
    expect(w?.message).toContain(`lines ${n} (= 0), ${n + 1} (= 1)`);
  });

  it('a list without copies carries no such warning', async () => {
    const r = await postFit({ lines });
    expect(r.statusCode).toBe(200);
    const codes = (r.json().warnings as W[]).map((x) => x.code);
    expect(codes).not.toContain('LINES_DUPLICATED');
    expect(codes).not.toContain('TRANSITION_CLAIMED_TWICE');
  });

  it('the same assignment again 0.5 cm-1 away: rejected, and named as two lines claiming one transition', async () => {
    const first = lines[0] as (typeof lines)[number];
    const conflict = { ...first, position: first.position + 0.5 };
    const r = await postFit({ lines: [...lines, conflict] });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.lines[lines.length].status).toBe('rejected');
    const w = (j.warnings as W[]).find((x) => x.code === 'TRANSITION_CLAIMED_TWICE');
    expect(w?.lines).toEqual([0, lines.length]);
    const label = `1-0 ${first.assignment.branch}(${first.assignment.j})`;
    expect(w?.message).toMatch(
      new RegExp(`^2 lines claim 12C-16O ${label.replace(/[()]/g, '\\$&')} at different positions`),
    );
    expect(w?.message).toMatch(new RegExp(`line ${lines.length} at [0-9.]+ cm-1 \\(rejected\\)`));
  });
});

import { describe, expect, it } from 'vitest';
import { useListeningApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * Through the service as `npm start` runs it (defaults, real socket): the 494 real 12C16O database lines of
 * test/fixtures/co-database-lines (source named in its SOURCE.md), assigned, σ as published, 0-0/1-0/2-1 named
 * "ftir-A" and 2-0/3-0 "laser-B". With each source judged as one σ group the service rejected 70 lines (57 of 0-0)
 * against 10 for the same lines without sources; the check is against that same request without sources.
 */
const { port } = useListeningApp();
const sourceOf = (band: string) => (['0-0', '1-0', '2-1'].includes(band) ? 'ftir-A' : 'laser-B');

async function postFit(withSources: boolean) {
  const lines = CO_DATABASE.lines.map((l) => ({
    position: l.position,
    uncertainty: l.uncertainty,
    ...(withSources ? { source: sourceOf(l.band) } : {}),
    assignment: { band: l.band, branch: l.branch, j: l.j },
  }));
  const r = await fetch(`http://127.0.0.1:${port()}/v1/fits`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ species: 'CO', lines }),
  });
  expect(r.status).toBe(200);
  return (await r.json()) as {
    lines: { index: number; status: string }[];
    sourceOffsets?: { applied: boolean };
  };
}

describe('POST /v1/fits, real CO list from two instruments with stated σ', () => {
  it('rejects no more lines than without sources, no 0-0 line, and carries no offset', async () => {
    const alone = (await postFit(false)).lines.filter((l) => l.status === 'rejected').length;
    const r = await postFit(true);
    const rejected = r.lines.filter((l) => l.status === 'rejected');
    expect(rejected.length, `${rejected.length} rejected against ${alone}`).toBeLessThanOrEqual(alone);
    expect(rejected.filter((l) => CO_DATABASE.lines[l.index]?.band === '0-0')).toEqual([]);
    expect(r.sourceOffsets?.applied).toBe(false);
  });
});

import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * The sourceOffsets answer and the referenceSource option at the `npm start` defaults, on the 494 real 12C16O
 * database lines of test/fixtures/co-database-lines (source named in its SOURCE.md): 0-0, 1-0 and 2-1 from
 * "ftir-A", 2-0 and 3-0 from "laser-B", no σ, laser-B moved by +0.002 cm-1 (the test's own shift: the check is
 * against it and against the fit of the unshifted list).
 */
const app = useApp();
const lines = (shift: number) =>
  CO_DATABASE.lines.map((l) => {
    const source = ['0-0', '1-0', '2-1'].includes(l.band) ? 'ftir-A' : 'laser-B';
    return {
      position: l.position + (source === 'laser-B' ? shift : 0),
      source,
      assignment: { band: l.band, branch: l.branch, j: l.j },
    };
  });
type Band = { band: string; origin: { value: number; uncertainty: number } };
type Offsets = {
  reference: string;
  applied: boolean;
  basis: string;
  sources: { source: string; lines: number; offset?: { value: number; uncertainty: number; unit: string } }[];
};

describe('sourceOffsets and options.referenceSource', () => {
  it('REST: laser-B +0.002 is flagged and carried; the 2-0 origin stays within 2σ of the unshifted fit', async () => {
    const post = (payload: Record<string, unknown>) => app().inject({ method: 'POST', url: '/v1/fits', payload });
    const [r, r0] = await Promise.all([
      post({ species: 'CO', lines: lines(0.002) }),
      post({ species: 'CO', lines: lines(0) }),
    ]);
    expect(r.statusCode).toBe(200);
    const so = r.json().sourceOffsets as Offsets;
    expect(so).toMatchObject({ reference: 'ftir-A', applied: true, basis: 'flagged' });
    const b = so.sources.find((s) => s.source === 'laser-B');
    expect(b?.offset?.unit).toBe('cm-1');
    expect(Math.abs((b?.offset?.value as number) - 0.002)).toBeLessThan(3 * (b?.offset?.uncertainty as number));
    expect(so.sources.reduce((n, s) => n + s.lines, 0)).toBe(r.json().statistics.fitted);
    const o = (r.json().bands as Band[]).find((x) => x.band === '2-0')?.origin;
    const o0 = (r0.json().bands as Band[]).find((x) => x.band === '2-0')?.origin;
    expect(Math.abs((o?.value as number) - (o0?.value as number))).toBeLessThan(2 * (o?.uncertainty as number));
    expect(r0.json().sourceOffsets).toMatchObject({ applied: false, basis: 'not flagged' });
  });

  it('GraphQL: the same field, with the reference named by the caller', async () => {
    const query = `query($lines: [LineInput!]!) { fit(input: { species: "CO", lines: $lines, options: { referenceSource: "laser-B", fitSourceOffsets: true } }) {
      sourceOffsets { reference applied basis sources { source lines offset { value uncertainty unit } } } } }`;
    const r = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query, variables: { lines: lines(0.002) } },
    });
    expect(r.statusCode).toBe(200);
    const so = r.json().data?.fit?.sourceOffsets as Offsets;
    expect(so, r.body.slice(0, 400)).toMatchObject({ reference: 'laser-B', applied: true });
    expect(so.sources[0]).toMatchObject({ source: 'laser-B', offset: { value: 0, uncertainty: 0 } });
    // Not asked: the 0-0 lines fix ftir-A's own scale and say laser-B is the one off, so it is not carried.
    const auto = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: query.replace(', fitSourceOffsets: true', ''), variables: { lines: lines(0.002) } },
    });
    expect(auto.json().data?.fit?.sourceOffsets).toMatchObject({
      applied: false,
      basis: 'flagged, reference unverified',
    });
  });

  it('an unknown reference source is a 400 problem naming options.referenceSource', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: 'CO', lines: lines(0), options: { referenceSource: 'laser-C' } },
    });
    expect(r.statusCode).toBe(400);
    expect(r.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(r.body).toMatch(/options\/referenceSource|options\.referenceSource/);
    expect(r.body).toMatch(/laser-C/);
  });
});

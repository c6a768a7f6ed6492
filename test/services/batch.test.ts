import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { assignedFitBody } from '../helpers/requests.js';

const app = useApp();

describe('NDJSON batches', () => {
  it('streams one result a line, in order, with problems for the bad lines and the rest unharmed', async () => {
    const good = assignedFitBody('HCl', ['1-0'], 8, 0.002, 1);
    const co = assignedFitBody('CO', ['1-0'], 12, 0.001, 2);
    const lines = [JSON.stringify(good), '{not json', JSON.stringify({ species: 'HCl' }), '', JSON.stringify(co)];
    const r = await app().inject({
      method: 'POST',
      url: '/v1/batch/fits',
      payload: lines.join('\n'),
      headers: { 'content-type': 'application/x-ndjson' },
    });
    expect(r.statusCode).toBe(200);
    expect(r.headers['content-type']).toMatch(/application\/x-ndjson/);
    const out = r.body
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l));
    // index is the zero-based input line, blank lines counted; line is the 1-based line number an editor shows.
    expect(out.map((o) => [o.index, o.line, o.status])).toEqual([
      [0, 1, 200],
      [1, 2, 400],
      [2, 3, 400],
      [4, 5, 200],
    ]);
    expect(out[0].result.species[0].formula).toBe('1H-35Cl');
    expect(out[3].result.species[0].formula).toBe('12C-16O');
    expect(out[2].problem.code).toBe('VALIDATION_FAILED');
    // The same code as a single endpoint gives a body that is not JSON.
    const single = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: '{not json',
      headers: { 'content-type': 'application/json' },
    });
    expect(single.json().code).toBe('INVALID_JSON');
    expect(out[1].problem).toMatchObject({ code: 'INVALID_JSON', type: single.json().type, status: 400 });
  });
  it('checks in batch give verdicts', async () => {
    const good = assignedFitBody('CO', ['1-0'], 12, 0.001, 3);
    const r = await app().inject({
      method: 'POST',
      url: '/v1/batch/checks',
      payload: `${JSON.stringify(good)}\n${JSON.stringify({ ...good, species: 'HCl' })}\n`,
      headers: { 'content-type': 'application/x-ndjson' },
    });
    const out = r.body
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l));
    expect(out).toHaveLength(2);
    expect(['pass', 'warn', 'fail']).toContain(out[0].result.verdict);
    expect(out[1].status).toBe(200);
    expect(out[1].result.verdict).toBe('fail');
  });
  it('a batch of 300 requests completes in order (bounded: one at a time)', async () => {
    const one = JSON.stringify(assignedFitBody('HCl', ['1-0'], 6, 0.002, 4));
    const r = await app().inject({
      method: 'POST',
      url: '/v1/batch/fits',
      payload: Array.from({ length: 300 }, () => one).join('\n'),
      headers: { 'content-type': 'application/x-ndjson' },
    });
    const out = r.body
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as { index: number; status: number });
    expect(out.map((o) => o.index)).toEqual(Array.from({ length: 300 }, (_, i) => i));
    expect(out.every((o) => o.status === 200)).toBe(true);
  });
});

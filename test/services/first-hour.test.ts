import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';

/** What a newcomer meets in the first hour: answers that name the real problem. */
const app = useApp();

describe('a JSON array or a `query` field sent to a REST route', () => {
  it('is a schema error of that route, not a refused GraphQL batch', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: [] });
    expect(r.statusCode).toBe(400);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(r.json().code).toBe('VALIDATION_FAILED');
    expect(r.json().detail).not.toMatch(/GraphQL|batched/i);
  });
  it('a long `query` string in a fit body is reported as an unknown key of the fit', async () => {
    const body = { query: 'x'.repeat(50_000), species: 'CO', lines: [{ position: 2143.27 }] };
    const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().code).toBe('VALIDATION_FAILED');
    expect(r.json().detail).toMatch(/query/);
  });
  it('a batched GraphQL request is still refused on /graphql', async () => {
    const r = await app().inject({ method: 'POST', url: '/graphql', payload: [{ query: '{ species { formula } }' }] });
    expect(r.statusCode).toBe(400);
    expect(r.json().code).toBe('GRAPHQL_REFUSED');
  });
});

describe('a JSON line with its assignment written as in a CSV row', () => {
  it('is told where the assignment goes', async () => {
    const body = { species: 'CO', lines: [{ position: 2139.4261, band: '1-0', branch: 'P', j: 1 }] };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().code).toBe('VALIDATION_FAILED');
    expect(r.json().detail).toContain('"band", "branch", "j"');
    expect(r.json().detail).toContain('"assignment": {');
  });
  it('an unknown key that is no assignment lists the keys a line has', async () => {
    const body = { species: 'CO', lines: [{ wavenumber: 2139.4261 }] };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().detail).toMatch(/"wavenumber".*a line has position, uncertainty/);
    expect(r.json().detail).not.toContain('"assignment": {');
  });
});

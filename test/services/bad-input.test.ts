import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { useApp } from '../helpers/app.js';
import { assignedFitBody } from '../helpers/requests.js';

const app = useApp();
const good = assignedFitBody('HCl', ['1-0'], 8, 0.002, 7);

async function post(payload: unknown, headers: Record<string, string> = { 'content-type': 'application/json' }) {
  const r = await app().inject({
    method: 'POST',
    url: '/v1/fits',
    payload: typeof payload === 'string' ? payload : JSON.stringify(payload),
    headers,
  });
  return r;
}

function expectProblem(r: Awaited<ReturnType<typeof post>>, status: number) {
  expect(r.statusCode).toBe(status);
  expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
  const p = r.json();
  expect(p).toMatchObject({ status, type: expect.any(String), title: expect.any(String), detail: expect.any(String) });
  expect(JSON.stringify(p)).not.toMatch(/at .*\.ts:\d+/); // no stack traces
  return p;
}

describe('bad input gets RFC 9457 problem+json, never a 5xx', () => {
  it('invalid JSON → 400', async () => {
    expectProblem(await post('{"lines": [ {"position": 1,'), 400);
  });
  it('wrong content type → 415', async () => {
    expectProblem(await post('lines=1', { 'content-type': 'application/x-www-form-urlencoded' }), 415);
  });
  it('schema errors list their paths', async () => {
    const p = expectProblem(
      await post({ lines: [{ position: 'x' }, { position: 1, assignment: { band: '1-0', branch: 'S', j: 1 } }] }),
      400,
    );
    const paths = p.errors.map((e: { path: string }) => e.path);
    expect(paths).toContain('lines/0/position');
    expect(paths).toContain('lines/1/assignment/branch');
  });
  it('unknown fields are refused (strict schemas)', async () => {
    const p = expectProblem(await post({ ...good, colour: 'red' }), 400);
    expect(p.detail).toMatch(/colour|unrecognized/i);
  });
  it('non-finite numbers (1e999 parses to Infinity) → 400', async () => {
    expectProblem(await post('{"species":"HCl","lines":[{"position":1e999}]}'), 400);
  });
  it.each([0, -0.001])('non-positive uncertainty %s → 400', async (u) => {
    const p = expectProblem(
      await post({ ...good, lines: good.lines.map((l, i) => (i === 2 ? { ...l, uncertainty: u } : l)) }),
      400,
    );
    expect(p.errors[0].path).toBe('lines/2/uncertainty');
  });
  it('too few lines for the parameters → 422 FIT_TOO_FEW_LINES', async () => {
    const p = expectProblem(await post({ ...good, lines: good.lines.slice(0, 2) }), 422);
    expect(p.code).toBe('FIT_TOO_FEW_LINES');
  });
  it.each([
    [{ band: '1-0', branch: 'P', j: 0 }, 'ASSIGNMENT_INVALID', 422],
    [{ band: '1-0', branch: 'Q', j: 2 }, 'ASSIGNMENT_INVALID', 422],
    [{ band: '0-1', branch: 'R', j: 2 }, 'ASSIGNMENT_INVALID', 422],
    [{ band: '1-0', branch: 'R', j: -1 }, 'VALIDATION_FAILED', 400],
    [{ band: '1-0', branch: 'X', j: 1 }, 'VALIDATION_FAILED', 400],
    [{ band: 'one-zero', branch: 'R', j: 1 }, 'VALIDATION_FAILED', 400],
    [{ band: '1-0', branch: 'R', j: 1.5 }, 'VALIDATION_FAILED', 400],
  ])('impossible assignment %j → %s', async (assignment, code, status) => {
    const p = expectProblem(await post({ ...good, lines: [...good.lines, { position: 2900, assignment }] }), status);
    expect(p.code).toBe(code);
  });
  it('unknown species and isotopes → 422 naming them', async () => {
    const p = expectProblem(await post({ ...good, species: 'H36Cl' }), 422);
    expect(p.code).toBe('SPECIES_UNKNOWN_ISOTOPE');
    expect(p.detail).toMatch(/36Cl/);
    expect((await post({ ...good, species: 'Qq' })).json().code).toBe('SPECIES_UNKNOWN_ELEMENT');
  });
  it('prototype pollution attempts → 400, and Object.prototype stays clean', async () => {
    expectProblem(await post('{"species":"HCl","lines":[],"__proto__":{"polluted":true}}'), 400);
    expectProblem(await post('{"species":"HCl","lines":[],"constructor":{"prototype":{"polluted":true}}}'), 400);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
  it('deeply nested bodies → 400', async () => {
    const deep = `${'['.repeat(5000)}${']'.repeat(5000)}`;
    const p = expectProblem(await post(`{"species":"HCl","lines":${deep}}`), 400);
    expect(p.detail).toMatch(/nested|lines/);
  });
  it('an unknown unit → 400 listing the allowed ones', async () => {
    const p = expectProblem(await post({ ...good, unit: 'furlong' }), 400);
    expect(p.detail).toMatch(/cm-1/);
  });
  it('assigned lines without any species: identified from their labels, or 422 saying what to add', async () => {
    const r = await post({ lines: good.lines });
    expect(r.statusCode).toBe(200);
    expect(r.json().species.map((s: { formula: string }) => s.formula)).toEqual(['1H-35Cl']);
    expect(r.json().warnings.find((w: { code: string }) => w.code === 'SPECIES_FROM_LABELS')?.message).toMatch(
      /hydrogen chloride/,
    );
    // The same labels on positions shifted by 40 cm-1: no molecule predicts them there.
    const shifted = good.lines.map((l) => ({ ...l, position: l.position + 40 }));
    const p = expectProblem(await post({ lines: shifted }), 422);
    expect(p.code).toBe('SPECIES_UNIDENTIFIED');
    expect(p.detail).toMatch(/give "species"/);
  });
  it('an unknown route → 404 problem+json', async () => {
    const r = await app().inject({ method: 'GET', url: '/v1/nothing' });
    expectProblem(r, 404);
  });
  it('more lines than the configured limit → 400; a body over the size limit → 413', async () => {
    const small = await buildApp({ config: { ...DEFAULT_CONFIG, maxLines: 5, bodyLimit: 4096 } });
    const many = await small.inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { ...good, lines: good.lines.slice(0, 6) },
    });
    expect(many.statusCode).toBe(400);
    const big = await small.inject({
      method: 'POST',
      url: '/v1/fits',
      payload: JSON.stringify({ ...good, species: 'x'.repeat(5000) }),
      headers: { 'content-type': 'application/json' },
    });
    expect(big.statusCode).toBe(413);
    expect(big.headers['content-type']).toMatch(/problem\+json/);
    await small.close();
  });
});

describe('a compressed body (no content coding is decoded)', () => {
  it('gzip or deflate, small or past OFFLOAD_BYTES, JSON or CSV: 415 naming the coding, not a parse error of its bytes', async () => {
    const json = JSON.stringify(good);
    for (const text of [json, `${json.slice(0, -1)}${' '.repeat(DEFAULT_CONFIG.offloadBytes)}}`])
      for (const [coding, type] of [
        ['gzip', 'application/json'],
        ['deflate', 'application/json'],
        ['gzip', 'text/csv'],
      ] as const) {
        const r = await app().inject({
          method: 'POST',
          url: '/v1/fits?species=HCl',
          payload: gzipSync(text),
          headers: { 'content-type': type, 'content-encoding': coding },
        });
        const p = expectProblem(r, 415);
        expect(p.code).toBe('UNSUPPORTED_MEDIA_TYPE');
        expect(p.detail).toContain(coding);
      }
  });

  it('"identity" is no coding: the body is read as sent', async () => {
    const r = await post(good, { 'content-type': 'application/json', 'content-encoding': 'identity' });
    expect(r.statusCode).toBe(200);
  });
});

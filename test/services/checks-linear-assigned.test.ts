import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';

/** Checks and reports of an ASSIGNED linear list (the README CO2 ν3 example), defaults of `npm start`. */
const app = useApp();
const example = JSON.parse(readFileSync('examples/co2-nu3-assigned.json', 'utf8')) as {
  species: string;
  lines: { position: number; uncertainty?: number; assignment: unknown }[];
};
type Check = { id: string; status: string; measured: Record<string, unknown> };
const check = (body: unknown) => app().inject({ method: 'POST', url: '/v1/checks', payload: body as object });

describe('POST /v1/checks with an assigned CO2 list', () => {
  it('passes identity, calibration and unexplained lines, and fits with the given assignments', async () => {
    const r = await check(example);
    expect(r.statusCode).toBe(200);
    const body = r.json();
    const by = (id: string) => (body.checks as Check[]).find((c) => c.id === id) as Check;
    expect(by('identity').status).toBe('pass');
    expect(by('identity').measured.species).toBe('16O-12C-16O');
    expect(by('calibration').status).toBe('pass');
    expect(by('unexplained-lines').measured.lines).toBe(0);
    expect(body.fit.species[0].formula).toBe('16O-12C-16O');
    expect(body.fit.lines.every((l: { assignment: { source: string } }) => l.assignment.source === 'given')).toBe(true);
  });

  it('measures a calibration offset of +0.010 cm-1 put on every line within 3σ', async () => {
    const shifted = { ...example, lines: example.lines.map((l) => ({ ...l, position: l.position + 0.01 })) };
    const body = (await check(shifted)).json();
    const cal = (body.checks as Check[]).find((c) => c.id === 'calibration') as Check;
    const offset = cal.measured.offset as { value: number; uncertainty: number };
    expect(Math.abs(offset.value - 0.01)).toBeLessThan(3 * offset.uncertainty);
    expect(offset.uncertainty).toBeLessThan(0.005);
  });

  it('writes the report of the same body (200 text/html naming the chain)', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/reports', payload: example as object });
    expect(r.statusCode).toBe(200);
    expect(r.headers['content-type']).toContain('text/html');
    expect(r.body).toContain('16O-12C-16O');
  });
});

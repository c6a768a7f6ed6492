import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * The lab's list from two instruments at the `npm start` defaults: the 494 real 12C16O database lines of
 * test/fixtures/co-database-lines (source named in its SOURCE.md), 0-0, 1-0 and 2-1 from "ftir-A", 2-0 and 3-0
 * from "laser-B", no σ, laser-B moved by +0.002 cm-1 (the test's own shift: the check is against it).
 */
const app = useApp();
type W = { code: string; message: string; lines?: number[] };

describe('two instruments, one shifted', () => {
  it('the warning names laser-B with its offset, and only its lines', async () => {
    const lines = CO_DATABASE.lines.map((l) => {
      const source = ['0-0', '1-0', '2-1'].includes(l.band) ? 'ftir-A' : 'laser-B';
      return {
        position: l.position + (source === 'laser-B' ? 0.002 : 0),
        source,
        assignment: { band: l.band, branch: l.branch, j: l.j },
      };
    });
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines } });
    expect(r.statusCode).toBe(200);
    const w = (r.json().warnings as W[]).find((x) => x.code === 'SOURCE_MEAN_RESIDUALS');
    expect(w?.message).toMatch(/; laser-B lies off zero beyond 3 standard errors/);
    const m = /laser-B ([-+]\d\.\d+) ± (\d\.\d+) cm-1;/.exec(w?.message ?? '');
    expect(m, w?.message).not.toBeNull();
    const [, value = '', sigma = ''] = m as RegExpExecArray;
    expect(Math.abs(Number(value) - 0.002)).toBeLessThan(4 * Number(sigma) + 0.00004);
    expect(w?.lines?.every((i) => lines[i]?.source === 'laser-B')).toBe(true);
    // The offset is carried in the fit: the warning's figures are said to be of the fit before it was.
    expect(r.json().sourceOffsets.applied).toBe(true);
    expect(w?.message).toMatch(/These figures are of the fit before the offset was carried/);
  });
});

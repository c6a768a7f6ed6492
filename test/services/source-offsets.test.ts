import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import { seededNormal } from '../helpers/random.js';

/**
 * Two instruments: the real 12C16O 1-0 lines J ≤ 20 of test/fixtures/co-database-lines as a "laser" source (their
 * published σ), and J 10–40 as an "ftir" source, σ 0.002 cm⁻¹, seeded Gaussian noise of that σ and a calibration
 * offset of `shift` cm⁻¹. `npm start` defaults.
 */
const app = useApp();
const band = CO_DATABASE.lines.filter((l) => l.band === '1-0');
function twoInstruments(shift: number) {
  const z = seededNormal(5);
  const line = (l: (typeof band)[number]) => ({ band: l.band, branch: l.branch, j: l.j });
  return [
    ...band
      .filter((l) => l.j <= 20)
      .map((l) => ({ position: l.position, uncertainty: l.uncertainty, source: 'laser', assignment: line(l) })),
    ...band
      .filter((l) => l.j >= 10 && l.j <= 40)
      .map((l) => ({
        position: Number((l.position + shift + 0.002 * z()).toFixed(4)),
        uncertainty: 0.002,
        source: 'ftir',
        assignment: line(l),
      })),
  ];
}
type W = { code: string; message: string; lines?: number[] };

describe('lines from two sources', () => {
  it('an offset of +0.010 cm-1 between them: each source mean residual reported, the offset one named', async () => {
    const lines = twoInstruments(0.01);
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines } });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    const w = (j.warnings as W[]).find((x) => x.code === 'SOURCE_MEAN_RESIDUALS');
    expect(w, JSON.stringify(j.warnings.map((x: W) => x.code))).toBeDefined();
    const m = /ftir \+(\d\.\d+) ± (\d\.\d+) cm-1 \((\d+) lines\)/.exec(w?.message ?? '');
    expect(m, w?.message).not.toBeNull();
    const [, mean = '', se = '', n = ''] = m as RegExpExecArray;
    expect(Number(n)).toBe(lines.filter((l) => l.source === 'ftir').length);
    // The laser lines (σ 1e-5) pin the band, so the ftir mean is the offset: within 4 standard errors of 0.010.
    expect(Math.abs(Number(mean) - 0.01)).toBeLessThan(4 * Number(se));
    expect(w?.message).toMatch(
      /ftir lies off zero beyond 3 standard errors: a calibration offset between instruments\?/,
    );
    expect(w?.message).toMatch(/laser [-+]?\d\.\d+ ± \d\.\d+ cm-1 \(\d+ lines\)/);
    // each line echoes its source
    expect(j.lines.map((l: { source?: string }) => l.source)).toEqual(lines.map((l) => l.source));
  });

  it('without an offset nothing is said, and a lean answer leaves the source out', async () => {
    const lines = twoInstruments(0);
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: 'CO', lines, options: { lean: true } },
    });
    expect(r.statusCode).toBe(200);
    expect((r.json().warnings as W[]).map((x) => x.code)).not.toContain('SOURCE_MEAN_RESIDUALS');
    expect(r.json().lines.some((l: { source?: string }) => l.source !== undefined)).toBe(false);
  });
});

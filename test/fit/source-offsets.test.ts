import { describe, expect, it } from 'vitest';
import { type FitResult, fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import { seededNormal } from '../helpers/random.js';

/**
 * A list from two instruments with a calibration offset between them. The lines are the 494 real 12C16O database
 * lines of test/fixtures/co-database-lines (source named in its SOURCE.md): 0-0, 1-0 and 2-1 as "ftir-A", 2-0 and
 * 3-0 as "laser-B", and laser-B's positions moved by a known shift. The check is against that shift, which the
 * test itself applies (outside the fit). Real lines carry every higher-order term of the molecule, so the
 * generator is never the fitted model.
 */
const iso = parseSpecies('12C-16O');
const masses = new Map([[iso.formula, reducedMass(iso)]]);
type Db = (typeof CO_DATABASE.lines)[number];
const sourceOf = (l: Db) => (['0-0', '1-0', '2-1'].includes(l.band) ? 'ftir-A' : 'laser-B');
function toLine(l: Db, position: number, source: string, uncertainty?: number): LineInput {
  const [upper, lower] = l.band.split('-').map(Number) as [number, number];
  return {
    position,
    ...(uncertainty !== undefined ? { uncertainty } : {}),
    source,
    assignment: { species: iso.formula, band: { upper, lower }, branch: l.branch, j: l.j, source: 'given' },
  } as LineInput;
}
const fitCo = (lines: readonly LineInput[]) => fitLineList(lines, masses);
const offsetWarning = (r: FitResult) => r.warnings.find((w) => w.code === 'SOURCE_MEAN_RESIDUALS');
function reported(r: FitResult, source: string): { value: number; sigma: number } | undefined {
  const m = new RegExp(`(?:determines|share): (?:[^;]*, )?${source} ([-+]\\d\\.\\d+) ± (\\d\\.\\d+) cm-1`).exec(
    offsetWarning(r)?.message ?? '',
  );
  return m ? { value: Number(m[1]), sigma: Number(m[2]) } : undefined;
}

describe('two sources of the real CO list, laser-B shifted', () => {
  for (const withSigma of [false, true]) {
    for (const shift of [0.0005, -0.0005, 0.002, -0.002, 0.01, -0.01]) {
      it(`shift ${shift} cm-1 ${withSigma ? 'with' : 'without'} σ: laser-B named, offset within 4σ of the shift`, () => {
        const lines = CO_DATABASE.lines.map((l) =>
          toLine(
            l,
            l.position + (sourceOf(l) === 'laser-B' ? shift : 0),
            sourceOf(l),
            withSigma ? l.uncertainty : undefined,
          ),
        );
        const r = fitCo(lines);
        const w = offsetWarning(r);
        expect(w?.message).toMatch(/; laser-B lies off zero beyond 3 standard errors/);
        // What a shift of 0.01 leaks into ftir-A's estimate stays below 1 % of it.
        const a = reported(r, 'ftir-A');
        if (a) expect(Math.abs(a.value)).toBeLessThan(0.01 * Math.abs(shift));
        const laserLines = lines.flatMap((l, i) => (l.source === 'laser-B' ? [i] : []));
        expect(w?.lines?.every((i) => laserLines.includes(i))).toBe(true);
        const o = reported(r, 'laser-B');
        expect(o, w?.message).toBeDefined();
        expect(Math.abs((o?.value as number) - shift)).toBeLessThan(4 * (o?.sigma as number) + 0.02 * Math.abs(shift));
      });
    }
    it(`no shift ${withSigma ? 'with' : 'without'} σ: nothing said of the sources`, () => {
      const lines = CO_DATABASE.lines.map((l) =>
        toLine(l, l.position, sourceOf(l), withSigma ? l.uncertainty : undefined),
      );
      const codes = fitCo(lines).warnings.map((w) => w.code);
      expect(codes).not.toContain('SOURCE_MEAN_RESIDUALS');
      expect(codes).not.toContain('SOURCE_OFFSET_UNIDENTIFIABLE');
    });
  }
});

describe('sources that cover different bands', () => {
  it('3-0 from laser-B only, sharing no loop with ftir-A (1-0): both named as only as good as their calibration', () => {
    const lines = CO_DATABASE.lines
      .filter((l) => l.band === '1-0' || l.band === '3-0')
      .map((l) => toLine(l, l.position + (l.band === '3-0' ? 0.01 : 0), l.band === '3-0' ? 'laser-B' : 'ftir-A'));
    const r = fitCo(lines);
    const codes = r.warnings.map((w) => w.code);
    expect(codes).not.toContain('SOURCE_MEAN_RESIDUALS');
    const u = r.warnings.filter((w) => w.code === 'SOURCE_OFFSET_UNIDENTIFIABLE').map((w) => w.message);
    expect(u.some((m) => /band 3-0 of source laser-B .*only as good as the calibration of laser-B/.test(m))).toBe(true);
    expect(u.some((m) => /band 1-0 of source ftir-A /.test(m))).toBe(true);
  });

  it('3-0 alone from laser-B beside a closed set from ftir-A: laser-B named, ftir-A not', () => {
    const lines = CO_DATABASE.lines
      .filter((l) => l.band !== '2-0')
      .map((l) => toLine(l, l.position + (l.band === '3-0' ? 0.01 : 0), l.band === '3-0' ? 'laser-B' : 'ftir-A'));
    const u = fitCo(lines).warnings.filter((w) => w.code === 'SOURCE_OFFSET_UNIDENTIFIABLE');
    expect(u.map((w) => w.message.slice(0, 30))).toEqual(['band 3-0 of source laser-B can']);
  });

  it('one source only: no source warning', () => {
    const lines = CO_DATABASE.lines.map((l) => toLine(l, l.position + 0.002, 'ftir-A'));
    const codes = fitCo(lines).warnings.map((w) => w.code);
    expect(codes.filter((c) => c.startsWith('SOURCE_'))).toEqual([]);
  });
});

describe('pulls of the fitted offset over 200 seeded trials', () => {
  // 1-0, 2-1 (ftir-A, σ 0.0005 cm-1) and 2-0 (laser-B, σ 0.001 cm-1, shifted +0.002) with J ≤ 25, the real positions
  // plus Gaussian noise of that σ. A common shift of both is absorbed by the origins (G(1) + δ, G(2) + 2δ), so only
  // the relative offset is determined: against ftir-A, the source with most weight. Required: 1σ coverage 0.60–0.76, 2σ coverage ≥ 0.92 (binomial SD ≈ 0.033 at 200).
  const base = CO_DATABASE.lines.filter((l) => ['1-0', '2-1', '2-0'].includes(l.band) && l.j <= 25);
  for (const withSigma of [true, false]) {
    it(`${withSigma ? 'with' : 'without'} σ`, () => {
      const z = seededNormal(withSigma ? 11 : 12);
      const pulls: number[] = [];
      for (let t = 0; t < 200; t++) {
        const lines = base.map((l) => {
          const s = l.band === '2-0' ? 0.001 : 0.0005;
          const shift = l.band === '2-0' ? 0.002 : 0;
          return toLine(
            l,
            l.position + shift + s * z(),
            l.band === '2-0' ? 'laser-B' : 'ftir-A',
            withSigma ? s : undefined,
          );
        });
        const o = reported(fitCo(lines), 'laser-B');
        expect(o).toBeDefined();
        pulls.push(((o?.value as number) - 0.002) / (o?.sigma as number));
      }
      const within = (k: number) => pulls.filter((p) => Math.abs(p) <= k).length / pulls.length;
      if (process.env.SHOW_PULLS) console.log(withSigma, within(1), within(2), pulls.length);
      expect(within(1)).toBeGreaterThanOrEqual(0.6);
      expect(within(1)).toBeLessThanOrEqual(0.76);
      expect(within(2)).toBeGreaterThanOrEqual(0.92);
    }, 600_000);
  }
});

import { readFileSync } from 'node:fs';
// jcampconverter 10.0.2 serves as the oracle: an independent, widely used reader, in the last version released
// under MIT (11 and later are CC-BY-NC-SA-4.0). It is a dev dependency only, never used by the service.
import { convert } from 'jcampconverter';
import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { type JcampData, parseJcamp } from '../../src/spectra/jcamp.js';

/**
 * The JCAMP-DX reader on real files written by other programs (test/fixtures/jcamp-corpus/README.md says where
 * each comes from). Point counts are checked against each file's own ##NPOINTS=; values against the oracle.
 */
const dir = 'test/fixtures/jcamp-corpus/';
const read = (f: string) => readFileSync(dir + f, 'utf8');

interface OracleSpectrum {
  data: { x: number[]; y: number[] };
}
/** The first block with data, as the oracle reads it (LINK files have their blocks in `flatten`). */
function oracle(text: string): OracleSpectrum {
  const r = convert(text) as unknown as { flatten: { spectra?: OracleSpectrum[] }[] };
  const s = r.flatten.find((e) => (e.spectra?.length ?? 0) > 0)?.spectra?.[0];
  if (!s) throw new Error('the oracle found no data');
  return s;
}
const xy = (d: JcampData) =>
  d.kind === 'peaks'
    ? { x: d.peaks.map((p) => p.x), y: d.peaks.map((p) => p.y ?? Number.NaN) }
    : { x: Array.from(d.x), y: Array.from(d.y) };

/** Relative agreement: both readers multiply the same decimal text by the same factors (tolerance 1e-12). */
function expectSameValues(a: number[], b: number[]) {
  expect(a.length).toBe(b.length);
  const worst = a.reduce((m, v, i) => Math.max(m, Math.abs(v - (b[i] as number)) / Math.max(1, Math.abs(v))), 0);
  expect(worst).toBeLessThan(1e-12);
}

const CORPUS: [file: string, kind: JcampData['kind'], points: number][] = [
  ['pktab1.jdx', 'peaks', 46],
  ['pktab2.jdx', 'peaks', 23],
  ['mactab1.jdx', 'peaks', 23],
  ['blckpkt1-blocks1-3.jdx', 'peaks', 44],
  ['difdup_example.jdx', 'spectrum', 53],
  ['pacdec1-excerpt.jdx', 'spectrum', 220],
  ['fixdec1-excerpt.jdx', 'spectrum', 90],
  ['xyinc1-excerpt.jdx', 'spectrum', 50],
];

describe('JCAMP-DX reader on real-world files', () => {
  it.each(CORPUS)(
    '%s: a %s of the ##NPOINTS= the file declares (%i), values as the oracle reads them',
    (f, kind, n) => {
      const text = read(f);
      const d = parseJcamp(text);
      expect(d.kind).toBe(kind);
      const ours = xy(d);
      expect(ours.x).toHaveLength(n);
      const ref = oracle(text).data;
      expectSameValues(ours.x, ref.x);
      expectSameValues(ours.y, ref.y);
    },
  );

  it('a peak table of "x y" pairs separated by spaces gives the same peaks as "x,y" (not twice as many x-only peaks)', () => {
    const original = read('pktab1.jdx');
    const spaced = original.replace(/(\d),(\d)/g, '$1 $2');
    expect(spaced).not.toBe(original);
    const a = parseJcamp(original);
    const b = parseJcamp(spaced);
    expect(b.kind).toBe('peaks');
    expect(xy(b)).toEqual(xy(a));
    expect(xy(b).x).toHaveLength(46);
  });

  it('a peak table of one "x y" pair a line (38 peaks stay 38 peaks)', () => {
    const peaks = Array.from({ length: 38 }, (_, k) => `${(2000 + 3.1 * k).toFixed(2)} ${(0.01 * (k + 1)).toFixed(3)}`);
    const text = `##TITLE=pairs\n##JCAMP-DX=4.24\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##PEAK TABLE=(XY..XY)\n${peaks.join('\n')}\n##END=\n`;
    const d = parseJcamp(text);
    expect(d.kind === 'peaks' && d.peaks.length).toBe(38);
    expect(d.kind === 'peaks' && d.peaks[37]).toEqual({ x: 2114.7, y: 0.38 });
  });

  it('"##END" without "=" ends the file like "##END="', () => {
    for (const f of ['pktab2.jdx', 'pacdec1-excerpt.jdx']) {
      const text = read(f);
      const bare = text.replace(/##END=/g, '##END');
      expect(bare).not.toBe(text);
      expect(xy(parseJcamp(bare))).toEqual(xy(parseJcamp(text)));
    }
  });

  it('X values written truncated to whole numbers are accepted (FIRSTX 4000.60, lines start "4000", "3989", …)', () => {
    const text = read('pacdec1-excerpt.jdx')
      .replace('##FIRSTX=4000.00', '##FIRSTX=4000.60')
      .replace('##LASTX=3781.00', '##LASTX=3781.60');
    const d = parseJcamp(text);
    const base = parseJcamp(read('pacdec1-excerpt.jdx'));
    expect(d.kind === 'spectrum' && d.x[0]).toBeCloseTo(4000.6, 9);
    expect(xy(d).y).toEqual(xy(base).y);
  });

  it('the X check still catches a lost data line (one line of 11 values removed, ##NPOINTS= unchanged)', () => {
    const text = read('pacdec1-excerpt.jdx').replace(/^3945 .*\n/m, '');
    expect(() => parseJcamp(text)).toThrow(ScienceError);
    expect(() => parseJcamp(text)).toThrow(/does not continue/);
  });
});

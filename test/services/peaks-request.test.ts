import { describe, expect, it } from 'vitest';
import { jsonDepth } from '../../services/raw-body.js';
import { PeaksRequestSchema, parsePeaksRequest } from '../../services/schemas/peaks.js';
import { findPeaks } from '../../src/spectra/peaks.js';
import { useApp } from '../helpers/app.js';

type Body = ReturnType<typeof body>;

/** A body of n points with the optional keys the route accepts. */
function body(n: number): { spectrum: { x: unknown[]; y: unknown[]; [k: string]: unknown }; [k: string]: unknown } {
  return {
    spectrum: {
      x: Array.from({ length: n }, (_, i) => 2000 + 0.01 * i),
      y: Array.from({ length: n }, (_, i) => 0.1 * Math.sin(i)),
    },
    peakOptions: { threshold: 5 },
    species: 'CO',
  };
}

describe('the large-body parse of a peaks request (arrays checked by a loop)', () => {
  it('a valid body parses to exactly what the schema gives (defaults applied, arrays as sent)', () => {
    const b = body(500);
    const fast = parsePeaksRequest(b);
    expect(fast.success).toBe(true);
    expect(fast.data).toEqual(PeaksRequestSchema.parse(b));
    expect(fast.data?.spectrum.xUnit).toBe('cm-1');
    expect(fast.data?.spectrum.x).toHaveLength(500);
  });

  it.each([
    [
      'a string among the numbers',
      (b: Body) => {
        b.spectrum.y[100] = '0.5';
      },
    ],
    [
      'a value beyond ±1e12',
      (b: Body) => {
        b.spectrum.x[499] = 2e12;
      },
    ],
    [
      'null in y',
      (b: Body) => {
        b.spectrum.y[0] = null;
      },
    ],
    [
      'x longer than y',
      (b: Body) => {
        b.spectrum.x.push(2100);
      },
    ],
    [
      'an unknown key in the spectrum',
      (b: Body) => {
        b.spectrum.z = [1];
      },
    ],
    [
      'an unknown key at the top',
      (b: Body) => {
        b.extra = true;
      },
    ],
    [
      'a bad option',
      (b: Body) => {
        b.peakOptions = { threshold: 0.5 };
      },
    ],
  ] as [string, (b: Body) => void][])('%s: refused with the same issues as the schema', (_, spoil) => {
    const b = body(500);
    spoil(b);
    const fast = parsePeaksRequest(b);
    const full = PeaksRequestSchema.safeParse(b);
    expect(full.success).toBe(false);
    expect(fast.success).toBe(false);
    expect(fast.error?.issues).toEqual(full.error?.issues);
  });

  it('six points and a body without a spectrum are refused as the schema refuses them', () => {
    for (const b of [body(6), { peakOptions: {} }, null, []]) {
      expect(parsePeaksRequest(b).error?.issues).toEqual(PeaksRequestSchema.safeParse(b).error?.issues);
    }
  });
});

describe('JSON depth of a large body', () => {
  it('numbers in arrays add no depth; objects inside arrays still do, and a forbidden key among them is refused', () => {
    expect(jsonDepth({ spectrum: { x: [1, 2, 3], y: [4, 5, 6] } })).toBe(3);
    expect(jsonDepth([1, [2, [3, [4]]]])).toBe(4);
    expect(jsonDepth({ lines: [{ position: 1 }, { position: 2, assignment: { j: 1 } }] })).toBe(4);
    expect(() => jsonDepth({ lines: [1, JSON.parse('{"__proto__": {"a": 1}}')] })).toThrow(/__proto__/);
  });
});

describe('POST /v1/peaks below the offload size (the route validator takes the quick way too)', () => {
  const app = useApp();
  const x = Array.from({ length: 400 }, (_, i) => 2000 + 0.05 * i);
  const y = x.map((v) => 0.002 * Math.sin(37 * v) + 0.4 / (1 + ((v - 2010) / 0.1) ** 2));

  it('a valid spectrum answers the peaks findPeaks gives for it', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/peaks', payload: { spectrum: { x, y } } });
    expect(r.statusCode, r.body).toBe(200);
    expect(r.json().peaks).toEqual(findPeaks(x, y).peaks);
  });

  it.each([
    ['a string in y', { x, y: y.map((v, i) => (i === 7 ? 'a' : v)) }, 'spectrum/y/7'],
    ['x longer than y', { x: [...x, 2100], y }, 'spectrum/y'],
    ['a value beyond ±1e12', { x: x.map((v, i) => (i === 3 ? 1e13 : v)), y }, 'spectrum/x/3'],
  ])('%s: 400 problem+json naming the element, as the schema words it', async (_, spectrum, path) => {
    const r = await app().inject({ method: 'POST', url: '/v1/peaks', payload: { spectrum } });
    expect(r.statusCode).toBe(400);
    expect(r.headers['content-type']).toMatch(/application\/problem\+json/);
    const issue = PeaksRequestSchema.safeParse({ spectrum }).error?.issues[0];
    expect(issue).toBeDefined();
    expect(r.body).toContain(path);
    expect(r.body).toContain(JSON.stringify(issue?.message).slice(1, -1));
  });
});

import { describe, expect, it } from 'vitest';
import { jsonDepth } from '../../services/raw-body.js';
import { PeaksRequestSchema, parsePeaksRequest } from '../../services/schemas/peaks.js';

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

import { describe, expect, it } from 'vitest';
import { jsonDepth, MAX_JSON_DEPTH } from '../../services/raw-body.js';
import { seededRandom } from '../helpers/random.js';

/** The depth written out plainly (recursion; JSON's definition: a scalar adds nothing, a container one level). */
function plainDepth(v: unknown): number {
  if (v === null || typeof v !== 'object') return 0;
  const inner = Array.isArray(v) ? v : Object.values(v);
  return 1 + inner.reduce((m: number, x) => Math.max(m, plainDepth(x)), 0);
}

/** A random JSON value: objects and arrays up to `depth` levels, scalars of every JSON kind. */
function randomJson(rand: () => number, depth: number): unknown {
  const r = rand();
  if (depth === 0 || r < 0.3) return [1.5, 'x', null, true, -0][Math.floor(rand() * 5)];
  const n = Math.floor(rand() * 4);
  if (r < 0.65) return Array.from({ length: n }, () => randomJson(rand, depth - 1));
  return Object.fromEntries(Array.from({ length: n }, (_, i) => [`k${i}`, randomJson(rand, depth - 1)]));
}

function nested(levels: number): unknown {
  let v: unknown = 0;
  for (let i = 0; i < levels; i++) v = i % 2 ? { a: v } : [v];
  return v;
}

describe('jsonDepth (the parser guard of every JSON body)', () => {
  it('gives the plain recursive depth on 500 seeded random values, called one after another', () => {
    const rand = seededRandom(20261204);
    for (let t = 0; t < 500; t++) {
      const v = randomJson(rand, 1 + Math.floor(rand() * 12));
      expect(jsonDepth(v)).toBe(plainDepth(v));
    }
  });

  it('counts to the limit exactly and stops past it, also after a deep value was seen', () => {
    expect(jsonDepth(nested(MAX_JSON_DEPTH))).toBe(MAX_JSON_DEPTH);
    expect(jsonDepth(nested(MAX_JSON_DEPTH + 1))).toBe(MAX_JSON_DEPTH + 1);
    expect(jsonDepth(nested(100_000))).toBeGreaterThan(MAX_JSON_DEPTH);
    // The stacks kept between calls are empty again: a shallow value right after gets its own depth.
    expect(jsonDepth({ lines: [{ position: 1 }] })).toBe(3);
    expect(jsonDepth(7)).toBe(0);
  });

  it('refuses an own "__proto__" or "constructor" key at any depth, and is usable after the throw', () => {
    expect(() => jsonDepth([[JSON.parse('{"a":{"constructor":{}}}')]])).toThrow(/constructor/);
    expect(() => jsonDepth({ lines: [JSON.parse('{"__proto__":1}')] })).toThrow(/__proto__/);
    expect(jsonDepth({ a: [[]] })).toBe(3);
  });
});

import { describe, expect, it } from 'vitest';
import { fitBody } from '../../bench/fit-body.js';
import { fitRequestSchema } from '../../services/schemas/fit.js';
import { quickFitRequest } from '../../services/schemas/fit-quick.js';
import { useApp } from '../helpers/app.js';

const MAX = 1000;
const schema = fitRequestSchema(MAX);
type Body = { lines: Record<string, unknown>[]; [k: string]: unknown };
const base = (): Body => JSON.parse(fitBody());

type Line = Record<string, unknown>;
const line = (b: Body, i: number): Line => b.lines[i] as Line;

/** One change to a copy of the 60-line body. */
function variant(change: (b: Body) => void): Body {
  const b = base();
  change(b);
  return b;
}
const setLine = (key: string, value: unknown) =>
  variant((b) => {
    line(b, 7)[key] = value;
  });
const setAssignment = (key: string, value: unknown) =>
  variant((b) => {
    (line(b, 7).assignment as Line)[key] = value;
  });

// The reference is zod's own parse of the whole body (LineSchema element by element), compared as values and as
// serialised text, so that key order is checked too.
describe('a fit request whose lines are checked by a loop (schemas/fit-quick.ts)', () => {
  const accepted: [string, Body][] = [
    ['the 60-line bench body', base()],
    [
      'intensities and a line without uncertainty',
      variant((b) => {
        line(b, 0).intensity = 0;
        line(b, 1).intensity = 3.5;
        delete line(b, 2).uncertainty;
      }),
    ],
    [
      'an unassigned line, keys in another order, options and a unit',
      variant((b) => {
        b.lines[3] = { uncertainty: 0.002, position: line(b, 3).position };
        b.lines[4] = { assignment: { j: 4, branch: 'P', band: '1-0' }, position: line(b, 4).position };
        b.options = { rejectionThreshold: 4 };
        b.unit = 'cm-1';
      }),
    ],
    [
      'an uncertainty exactly at 1e-15 of the position',
      variant((b) => {
        line(b, 5).uncertainty = 1e-15 * (line(b, 5).position as number);
      }),
    ],
  ];
  for (const [name, b] of accepted) {
    it(`${name}: the quick way applies and gives exactly zod's result`, () => {
      const quick = quickFitRequest(b, MAX, schema);
      expect(quick).toBeDefined();
      const zod = schema.parse(b);
      expect(quick).toEqual(zod);
      expect(JSON.stringify(quick)).toBe(JSON.stringify(zod));
    });
  }

  const declined: [string, Body][] = [
    ['a line id', setLine('id', 'a')],
    ['a line source', setLine('source', 'lab')],
    ['an unknown line key', setLine('wavenumber', 1)],
    ['a band written with an en dash', setAssignment('band', '1–0')],
    ['an assignment species', setAssignment('species', 'CO')],
    ['j above 400', setAssignment('j', 401)],
    ['a fractional j', setAssignment('j', 1.5)],
    ['a branch S', setAssignment('branch', 'S')],
    ['an uncertainty below 1e-15 of the position', setLine('uncertainty', 1e-13)],
    ['a subnormal uncertainty', setLine('uncertainty', 1e-320)],
    ['a negative position', setLine('position', -1)],
    ['a position as a string', setLine('position', '2100')],
    ['a negative intensity', setLine('intensity', -1)],
    [
      'a line that is an array',
      variant((b) => {
        b.lines[7] = [] as unknown as Line;
      }),
    ],
    [
      'more lines than the limit',
      variant((b) => {
        b.lines = Array.from({ length: MAX + 1 }, () => line(b, 0));
      }),
    ],
    [
      'an unknown request key (checked by the schema on the rest)',
      variant((b) => {
        b.tolerance = 1;
      }),
    ],
    [
      'a spectrum beside the lines',
      variant((b) => {
        b.spectrum = { x: [1], y: [1] };
      }),
    ],
  ];
  for (const [name, b] of declined) {
    it(`${name}: the quick way declines, so the schema answers in its own words`, () => {
      expect(quickFitRequest(b, MAX, schema)).toBeUndefined();
    });
  }
  it('an id or source is still accepted by the schema (the decline is not a refusal)', () => {
    expect(schema.safeParse((declined[0] as [string, Body])[1]).success).toBe(true);
    expect(schema.safeParse((declined[1] as [string, Body])[1]).success).toBe(true);
  });
});

describe('POST /v1/fits with the quick check', () => {
  const app = useApp();
  it('refuses an en-dash band with the schema message, and answers the bench body', async () => {
    const bad = setAssignment('band', '1–0');
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: bad });
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('is written with a dash');
    const ok = await app().inject({ method: 'POST', url: '/v1/fits', payload: base() });
    expect(ok.statusCode).toBe(200);
    expect(ok.json().lines).toHaveLength(60);
  });
});

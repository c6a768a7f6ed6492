import { describe, expect, it } from 'vitest';
import { readLines } from '../../../src/fit/observations.js';
import type { LineInput } from '../../../src/fit/types.js';
import { thrown } from '../../helpers/thrown.js';

// Stage 1a on its own: every line checked, assigned lines turned into observations. Expected values are written
// out by hand here (J′ = J″ + 1 for R, J″ − 1 for P; weight 1/σ²). Computed inside `it` (mutation testing).

const masses = new Map([['12C-16O', { value: 6.856208638, uncertainty: 1e-9 }]]);
const line = (position: number, branch: 'P' | 'R', j: number, extra: Partial<LineInput> = {}): LineInput => ({
  position,
  assignment: { species: '12C-16O', band: { upper: 1, lower: 0 }, branch, j, source: 'given' },
  ...extra,
});

describe('readLines', () => {
  it('assigned lines become observations in input order with J′, J″, v′, v″ and weight 1/σ² (1 without σ)', () => {
    const input: LineInput[] = [
      line(2147.08, 'R', 1, { uncertainty: 0.002 }),
      { position: 2150 },
      line(2139.43, 'P', 1),
      line(2135.55, 'P', 2, { uncertainty: 0.5 }),
    ];
    const r = readLines(input, masses);
    expect(r.observations).toEqual([
      { index: 0, species: '12C-16O', upperV: 1, lowerV: 0, upperJ: 2, lowerJ: 1, position: 2147.08, weight: 250000 },
      { index: 2, species: '12C-16O', upperV: 1, lowerV: 0, upperJ: 0, lowerJ: 1, position: 2139.43, weight: 1 },
      { index: 3, species: '12C-16O', upperV: 1, lowerV: 0, upperJ: 1, lowerJ: 2, position: 2135.55, weight: 4 },
    ]);
    expect([0, 1, 2, 3].map((i) => r.transitions.get(i) !== undefined)).toEqual([true, false, true, true]);
    expect(r.transitions.get(2)?.branch).toBe('P');
    expect(r.transitions.get(4)).toBeUndefined();
  });

  it.each([
    [0, 'uncertainty 0 must be positive and finite'],
    [-0.001, 'uncertainty -0.001 must be positive and finite'],
    [Number.NaN, 'uncertainty NaN must be positive and finite'],
    [Number.POSITIVE_INFINITY, 'uncertainty Infinity must be positive and finite'],
  ])('an uncertainty of %s is refused with the line index (INPUT_INVALID)', (u, why) => {
    const input = [line(2147.08, 'R', 1), line(2150.8, 'R', 2, { uncertainty: u })];
    const e = thrown(() => readLines(input, masses));
    expect(e.code).toBe('INPUT_INVALID');
    expect(e.message).toBe(`line 1: ${why}`);
    expect(e.details).toEqual({ line: 1, uncertainty: u });
  });

  it('an unassigned line with a bad σ is refused too, before any position is read', () => {
    const e = thrown(() => readLines([{ position: -5 }, { position: 2000, uncertainty: 0 }], masses));
    expect(e.message).toBe('line 1: uncertainty 0 must be positive and finite');
  });

  it.each([0, -1, Number.NaN, Number.POSITIVE_INFINITY])('a position of %s is refused (INPUT_INVALID)', (p) => {
    const e = thrown(() => readLines([line(2147.08, 'R', 1), { position: p }], masses));
    expect(e.code).toBe('INPUT_INVALID');
    expect(e.message).toBe(`line 1: position ${p} must be positive and finite`);
    expect(e.details).toEqual({ line: 1 });
  });

  it('an invalid assignment keeps its code and details and gains the line index', () => {
    const e = thrown(() => readLines([line(2147.08, 'R', 1), line(2139.43, 'P', 0)], masses));
    expect(e.code).toBe('ASSIGNMENT_INVALID');
    expect(e.message).toBe('line 1: P(0) of band 1-0: P(0) does not exist: J′ would be −1');
    expect(e.details).toEqual({ band: '1-0', branch: 'P', j: 0, line: 1 });
  });

  it('a species without a mass is SPECIES_INVALID; no assigned line at all is FIT_NO_ASSIGNED_LINES', () => {
    const other: LineInput = {
      position: 2100,
      assignment: { species: '13C-16O', band: { upper: 1, lower: 0 }, branch: 'R', j: 0, source: 'given' },
    };
    const e = thrown(() => readLines([line(2147.08, 'R', 1), other], masses));
    expect(e.code).toBe('SPECIES_INVALID');
    expect(e.message).toBe('line 1: species 13C-16O has no mass');
    expect(e.details).toEqual({ line: 1 });
    const none = thrown(() => readLines([{ position: 2100 }, { position: 2101, uncertainty: 0.1 }], masses));
    expect(none.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(none.message).toBe('no line carries an assignment, so there is nothing to fit');
    expect(none.details).toEqual({ lines: 2 });
  });
});

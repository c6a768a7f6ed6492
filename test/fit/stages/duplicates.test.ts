import { describe, expect, it } from 'vitest';
import type { Warning } from '../../../src/fit/types.js';
import { checkDuplicates } from '../../../src/fit/warnings.js';
import type { Observation } from '../../../src/models/linear-model.js';

// checkDuplicates names a line as a copy of the EARLIEST line of its transition within 1e-9 (relative) of its
// position. The index by sorted positions must give exactly what a scan of every earlier distinct line gives.

const line = (index: number, j: number, position: number): Observation => ({
  index,
  species: '12C-16O',
  upperV: 1,
  lowerV: 0,
  upperJ: j + 1,
  lowerJ: j,
  position,
  weight: 1,
});

/** The rule written the plain way: each line against every distinct line met before it, in order. */
function copiesByScan(obs: readonly Observation[]): string[] {
  const byTransition = new Map<number, Observation[]>();
  for (const o of obs) byTransition.set(o.lowerJ, [...(byTransition.get(o.lowerJ) ?? []), o]);
  const copies: string[] = [];
  for (const g of byTransition.values()) {
    const distinct: Observation[] = [];
    for (const o of g) {
      const first = distinct.find((d) => Math.abs(d.position - o.position) <= 1e-9 * Math.abs(o.position));
      if (first === undefined) distinct.push(o);
      else copies.push(`${o.index} (= ${first.index})`);
    }
  }
  return copies;
}

function copiesFound(obs: readonly Observation[], rejected = new Map<number, string>()): Warning[] {
  const warnings: Warning[] = [];
  checkDuplicates(obs, rejected, warnings);
  return warnings;
}

describe('checkDuplicates', () => {
  it('a line within tolerance of two earlier lines is named a copy of the earlier one, not the nearer one', () => {
    const x = 2143.27;
    const obs = [
      line(0, 3, x),
      line(1, 3, x * (1 + 1.5e-9)),
      line(2, 3, x * (1 + 0.8e-9)),
      line(3, 3, x * (1 + 1.5e-9)),
    ];
    const w = copiesFound(obs).find((x) => x.code === 'LINES_DUPLICATED');
    expect(w?.lines).toEqual([2, 3]);
    expect(w?.message).toContain('lines 2 (= 0), 3 (= 1)');
  });

  it('agrees with the plain scan on 300 seeded lists of clustered positions (several transitions, up to 400 lines)', () => {
    let s = 11;
    const u = () => {
      s = (s * 1103515245 + 12345) % 2147483648;
      return s / 2147483648;
    };
    for (let trial = 0; trial < 300; trial++) {
      const n = 2 + Math.floor(u() * 400);
      const transitions = 1 + Math.floor(u() * 5);
      const spread = [0, 5e-10, 1e-9, 3e-9, 1e-6][trial % 5] as number;
      const obs = Array.from({ length: n }, (_, i) => {
        const j = Math.floor(u() * transitions);
        // Positions on a coarse grid (exact repeats) plus a jitter around the tolerance.
        const base = 1000 + 2 * j + Math.floor(u() * 6) * 1e-6;
        return line(i, j, base * (1 + (u() - 0.5) * 2 * spread));
      });
      const expected = copiesByScan(obs);
      const w = copiesFound(obs).find((x) => x.code === 'LINES_DUPLICATED');
      if (expected.length === 0) expect(w).toBeUndefined();
      else {
        expect(w?.lines?.length).toBe(expected.length);
        expect(w?.message).toContain(expected.slice(0, 10).join(', '));
      }
    }
  });

  it('lines claiming one transition at different positions, one rejected, are listed in the order met', () => {
    const obs = [line(0, 5, 2150.1), line(1, 5, 2150.4), line(2, 5, 2150.1)];
    const w = copiesFound(obs, new Map([[1, 'studentised residual 9.00 exceeds 4.00']]));
    const twice = w.find((x) => x.code === 'TRANSITION_CLAIMED_TWICE');
    expect(twice?.lines).toEqual([0, 1]);
    expect(twice?.message).toMatch(
      /^2 lines claim .* line 0 at 2150\.1000 cm-1, line 1 at 2150\.4000 cm-1 \(rejected\)/,
    );
    expect(w.find((x) => x.code === 'LINES_DUPLICATED')?.lines).toEqual([2]);
  });
});

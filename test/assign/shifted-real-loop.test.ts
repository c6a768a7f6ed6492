import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { fitLineList } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * A miscalibrated instrument: the real 12C16O lines of 1-0, 2-1 and 2-0 (test/fixtures/co-database-lines, HITRAN2020)
 * every one shifted by +0.03 cm⁻¹ and sent unassigned, with and without their σ. Unshifted, every line was numbered
 * right; shifted, the whole 2-1 band (96 lines) was left: it is predicted through the levels 1-0 and 2-0 fixed, and
 * those levels took the shift up once each, so their difference lacked it; and the inner fits, without the offset,
 * spread the loop's misfit (0.03 cm⁻¹) over lines whose σ is 1e-6 (2-0: 41 of 106 kept). Now the seeds of such a
 * band span the fitted place and the reference with its voted offset, and the inner fits carry one instrument's
 * scale offset as the final fit does.
 */
const lines = CO_DATABASE.lines.filter((l) => ['1-0', '2-1', '2-0'].includes(l.band));

function analysed(shift: number, withSigma: boolean) {
  const peaks = lines.map((l) => ({
    position: l.position + shift,
    ...(withSigma ? { uncertainty: l.uncertainty } : {}),
  }));
  const r = analyseLineList(peaks, parseSpecies('CO'), {}).result;
  let right = 0;
  let wrong = 0;
  r.lines.forEach((o, i) => {
    const l = lines[i];
    if (!o.assignment || !l) return;
    if (o.assignment.band === l.band && o.assignment.branch === l.branch && o.assignment.j === l.j) right++;
    else wrong++;
  });
  return { r, right, wrong };
}

describe('the real CO list shifted by +0.03 cm⁻¹, sent unassigned (HITRAN2020 positions)', () => {
  for (const withSigma of [false, true])
    it(`numbers every line right, ${withSigma ? 'with' : 'without'} σ, and finds the shift (before: 2-1 left whole)`, () => {
      const { r, right, wrong } = analysed(0.03, withSigma);
      expect(wrong).toBe(0);
      expect(right).toBe(lines.length);
      expect(r.bands.find((b) => b.band === '2-1')?.lines).toBe(96);
      const s = r.scaleOffset;
      expect(s?.applied).toBe(true);
      expect(Math.abs((s?.offset.value as number) - 0.03)).toBeLessThan(5 * (s?.offset.uncertainty as number) + 1e-6);
    });
});

describe('a loop that misses by more than any calibration (a band labelled wrong)', () => {
  it('is reported as too large, not carried, and the warning points at the labels', () => {
    const co = parseSpecies('12C-16O');
    const masses = new Map([[co.formula, reducedMass(co)]]);
    // The 2-1 lines labelled one J too low: the loop 1-0 + 2-1 − 2-0 then misses by several cm⁻¹.
    const input = lines.map((l) => {
      const [upper, lower] = l.band.split('-').map(Number) as [number, number];
      const j = l.band === '2-1' && l.branch === 'R' && l.j > 0 ? l.j - 1 : l.j;
      return {
        position: l.position,
        assignment: { species: co.formula, band: { upper, lower }, branch: l.branch, j, source: 'given' as const },
      };
    });
    const r = fitLineList(input, masses);
    // Measured: 1.43 ± 0.09 cm-1 (R(J) of 2-1 numbered J − 1).
    expect(r.scaleOffset?.basis).toBe('too large');
    expect(r.scaleOffset?.applied).toBe(false);
    expect(Math.abs(r.scaleOffset?.offset.value as number)).toBeGreaterThan(1);
    expect(r.warnings.find((w) => w.code === 'SCALE_OFFSET')?.message).toMatch(/labelled wrong/);
  });
});

import { describe, expect, it } from 'vitest';
import { assignByStructure, MIN_MARGIN } from '../../src/assign/structure.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * The numbering from structure alone as one call, on a short real band: the 12C16O fundamental to J = 9 (HITRAN2020
 * positions and σ, Gordon et al., JQSRT 277, 107949 (2022), in test/fixtures/co-database-lines; B″ of Gendriesch et
 * al. 2009 from the same fixture). Kept apart from structure-stages.test.ts so that the mutation runs of the growth
 * stages need not run it for every mutant (it calls every stage).
 */
const co = parseSpecies('12C16O');
const BAND10 = { upper: 1, lower: 0 } as const;
/** MHz per cm⁻¹: c = 299 792 458 m/s (exact, SI). */
const MHZ_PER_CM = 29979.2458;

function coBand(jMax: number) {
  const lines = CO_DATABASE.lines.filter((l) => l.band === '1-0' && l.j <= jMax);
  const p = lines.filter((l) => l.branch === 'P').sort((a, b) => b.j - a.j);
  const r = lines.filter((l) => l.branch === 'R').sort((a, b) => a.j - b.j);
  return [...p, ...r];
}

describe('numbering a real band from its structure', () => {
  it('the real CO fundamental to J = 9 with its σ: decisive, every line right', () => {
    const lines = coBand(9);
    const s = assignByStructure(
      lines.map((l) => ({ position: l.position, uncertainty: l.uncertainty })),
      co.formula,
      reducedMass(co),
      BAND10,
    );
    expect(s).toMatchObject({ decisive: true, fitsUncertainties: true, ownEvidence: true });
    expect(s?.margin).toBeGreaterThanOrEqual(MIN_MARGIN);
    expect(s?.assigned.size).toBe(lines.length);
    for (const [i, t] of s?.assigned ?? []) expect(t).toEqual({ branch: lines[i]?.branch, j: lines[i]?.j });
    expect(s?.evidence[0]?.lineAtOrigin).toBe(false);
    // Band origin of 12C16O 1-0: 2143.2711 cm⁻¹ (from memory), within 0.001.
    expect(s?.evidence[0]?.origin).toBeCloseTo(2143.2711, 3);
    // The published B″ (Gendriesch et al. 2009) within 1e-5 cm⁻¹ from nineteen lines.
    expect(s?.evidence[0]?.lowerB).toBeCloseTo((CO_DATABASE.published.B_v_MHz.value[0] as number) / MHZ_PER_CM, 5);
    // The runner-up is another band origin.
    expect(s?.evidence[1]?.origin).not.toBeCloseTo(s?.evidence[0]?.origin as number, 1);
  });

  it('no progression of six lines: nothing', () => {
    const lines = coBand(2).map((l) => ({ position: l.position }));
    expect(assignByStructure(lines, co.formula, reducedMass(co), BAND10)).toBeUndefined();
  });
});

import { describe, expect, it } from 'vitest';
import { type LabelledLine, speciesFromLabels } from '../../src/assign/identify.js';
import { ScienceError } from '../../src/errors.js';
import { CO_12_16, HBR_1_79, HCL_1_35, uniformStream } from '../helpers/independent-lines.js';
import { isotopologue, scan } from '../helpers/scan-scenarios.js';

/**
 * Assigned lines sent without a species: the species from their labels. Lines from the independent generator
 * (test/helpers/independent-lines.ts, published constant sets with their higher terms; isotopologues by mass
 * scaling in scan-scenarios.ts), labelled with the generator's truth and no species. Required: the molecule is
 * named and every line gets its own isotopologue; labels that fit no molecule are refused with what to add.
 */
function labelled(parts: Parameters<typeof scan>[0]['parts'], seed: number) {
  const s = scan({
    parts,
    temperature: 296,
    sigma: 0.002,
    withUncertainties: false,
    withIntensities: false,
    missing: 0.1,
    spurious: 0,
    detection: 1e-3,
    seed,
  });
  const lines: LabelledLine[] = s.lines.map((l, index) => {
    const t = s.truth[index] as NonNullable<(typeof s.truth)[number]>;
    const [upper, lower] = t.band.split('-').map(Number) as [number, number];
    return { index, position: l.position, band: { upper, lower }, branch: t.branch, j: t.j };
  });
  return { lines, truth: s.truth };
}

const H37CL = isotopologue(HCL_1_35, ['1H', '35Cl'], ['1H', '37Cl']);
const C13O = isotopologue(CO_12_16, ['12C', '16O'], ['13C', '16O']);
const H81BR = isotopologue(HBR_1_79, ['1H', '79Br'], ['1H', '81Br']);

describe('the species of assigned lines sent without one, from their labels', () => {
  const cases: [string, Parameters<typeof scan>[0]['parts'], string][] = [
    [
      'HCl fundamental, both chlorine isotopes (J″ ≤ 10)',
      [
        { molecule: HCL_1_35, abundance: 0.758, bands: [{ upper: 1, lower: 0, jMax: 10 }] },
        { molecule: H37CL, abundance: 0.242, bands: [{ upper: 1, lower: 0, jMax: 10 }] },
      ],
      'hydrogen chloride',
    ],
    [
      'CO fundamental with 13C16O (J″ ≤ 25)',
      [
        { molecule: CO_12_16, abundance: 0.986, bands: [{ upper: 1, lower: 0, jMax: 25 }] },
        { molecule: C13O, abundance: 0.011, bands: [{ upper: 1, lower: 0, jMax: 25 }] },
      ],
      'carbon monoxide',
    ],
    [
      'HBr fundamental, both bromine isotopes 0.1–0.4 cm⁻¹ apart (J″ ≤ 8)',
      [
        { molecule: HBR_1_79, abundance: 0.507, bands: [{ upper: 1, lower: 0, jMax: 8 }] },
        { molecule: H81BR, abundance: 0.493, bands: [{ upper: 1, lower: 0, jMax: 8 }] },
      ],
      'hydrogen bromide',
    ],
  ];
  for (const [name, parts, molecule] of cases) {
    it(`${name}: the molecule, and each line's isotopologue as generated`, () => {
      const { lines, truth } = labelled(parts, 3);
      const f = speciesFromLabels(lines);
      expect(f.name).toBe(molecule);
      // The rule: three lines and half of them near the library's positions of their labels (measured: HCl 25 of
      // 36 — the library's HCl lacks γ_e, 0.5 cm⁻¹ at J = 11 — CO 79 of 79, HBr 26 of 28).
      expect(f.explained / lines.length).toBeGreaterThanOrEqual(0.5);
      let right = 0;
      for (const l of lines) if (f.isotopologueOf.get(l.index) === truth[l.index]?.species) right++;
      expect(right).toBe(lines.length);
    });
  }

  it('labels that fit no molecule: SPECIES_UNIDENTIFIED saying what to add', () => {
    const u = uniformStream(5);
    const lines: LabelledLine[] = Array.from({ length: 12 }, (_, index) => ({
      index,
      position: 1800 + 1500 * u(),
      band: { upper: 1, lower: 0 },
      branch: index % 2 === 0 ? ('P' as const) : ('R' as const),
      j: 1 + index,
    }));
    try {
      speciesFromLabels(lines);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ScienceError);
      expect((e as ScienceError).code).toBe('SPECIES_UNIDENTIFIED');
      expect((e as ScienceError).message).toMatch(/give "species"/);
    }
  });
});

import { describe, expect, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import {
  CO_12_16,
  HBR_1_79,
  HCL_1_35,
  independentLines,
  type MoleculeConstants,
} from '../helpers/independent-lines.js';

/**
 * γ_e, β_e and H_e recovered with their signs from generated multi-band data (1-0, 2-0, 3-0 and the hot band 2-1)
 * made by the independent generator from full constant sets (sources in test/helpers/independent-lines.ts), and
 * r_e at the precision the fit claims. Each recovered constant must lie within 4σ of the generating value (a
 * 4σ bar fails a correct fit with probability 6e-5 per value) and be determined (|value| > 10σ), so its sign is
 * the data's, not noise.
 */
// K = h/(8π² c m_u), cm⁻¹ u Å², CODATA 2018 values written out here.
const K = ((6.62607015e-34 / (8 * Math.PI ** 2 * 299792458 * 1.6605390666e-27)) * 1e20) / 100;

const cases: [MoleculeConstants, number, number, number][] = [
  // molecule, J″ max, σ (cm⁻¹), μ (u, REFERENCE-DATA §2c from AME2020)
  [HCL_1_35, 20, 2e-4, 0.9795925391],
  [CO_12_16, 60, 1e-4, 6.8562086379],
  [HBR_1_79, 16, 5e-4, 0.9951169115],
];

describe.each(cases)('%s: four bands, higher terms recovered', (molecule, jMax, sigma, mu) => {
  const { lines } = independentLines({
    molecule,
    bands: [
      { upper: 1, lower: 0, jMax },
      { upper: 2, lower: 0, jMax },
      { upper: 3, lower: 0, jMax },
      { upper: 2, lower: 1, jMax },
    ],
    sigma,
    seed: 4242,
  });
  const masses = new Map([[molecule.formula, reducedMass(parseSpecies(molecule.formula))]]);
  // Fitted inside each test, so that mutation testing sees the fit (see test/MUTANTS.md).
  const fitted = () => fitLineList(lines as LineInput[], masses);
  const c = molecule.constants;

  it.each(['gamma_e', 'beta_e', 'H_e', 'B_e', 'alpha_e', 'D_e'] as const)('%s: sign, within 4σ, determined', (k) => {
    const q = fitted().equilibrium[0]?.[k];
    const truth = c[k].value;
    expect(q, k).toBeDefined();
    expect(Math.sign(q?.value as number)).toBe(Math.sign(truth));
    expect(Math.abs((q?.value as number) - truth)).toBeLessThan(4 * (q?.uncertainty as number));
    expect(Math.abs(q?.value as number)).toBeGreaterThan(10 * (q?.uncertainty as number));
  });

  it('r_e within 4σ of √(K/(μ B_e)) of the generating B_e, with σ(r_e) below 1e-6 Å', () => {
    const eq = fitted().equilibrium[0];
    const truth = Math.sqrt(K / (mu * c.B_e.value));
    const q = eq?.r_e;
    expect(q?.uncertainty as number).toBeLessThan(1e-6);
    expect(Math.abs((q?.value as number) - truth)).toBeLessThan(4 * (q?.uncertainty as number));
  });

  it('the reduced mass is reported with its AME2020 uncertainty', () => {
    const r = fitted();
    const m = r.species[0]?.reducedMass;
    expect(Math.abs((m?.value as number) - mu)).toBeLessThan(1e-10);
    expect(m?.uncertainty as number).toBeGreaterThan(1e-11);
    expect(m?.uncertainty as number).toBeLessThan(2e-10);
  });
});

describe('r_e of CO against Huber & Herzberg', () => {
  it('equals the tabulated 1.128323 Å to its published digits (± 0.6e-6 Å) when fitted from HH-constant data', () => {
    const { lines } = independentLines({
      molecule: CO_12_16,
      bands: [
        { upper: 1, lower: 0, jMax: 40 },
        { upper: 2, lower: 0, jMax: 40 },
        { upper: 2, lower: 1, jMax: 40 },
      ],
      sigma: 5e-5,
      seed: 7,
    });
    const r = fitLineList(lines as LineInput[], new Map([['12C-16O', reducedMass(parseSpecies('12C-16O'))]]));
    const re = r.equilibrium[0]?.r_e;
    expect(re?.uncertainty as number).toBeLessThan(1e-7);
    expect(Math.abs((re?.value as number) - 1.128323)).toBeLessThan(0.6e-6);
  });
});

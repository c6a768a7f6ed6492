import { describe, expect, it } from 'vitest';
import { predictLines } from '../../src/qa/predictions.js';
import { parseSpecies } from '../../src/species/parse.js';
import { seededNormal } from '../helpers/random.js';

// HCl constants of Huber & Herzberg with invented but plausible uncertainties and correlations, as a fit would
// report them; the propagated uncertainty of every position must match a Monte Carlo sample of the same covariance.
const names = ['omega_e', 'omega_e_x_e', 'B_e', 'alpha_e', 'D_e'] as const;
const values = [2990.9463, 52.8186, 10.593416, 0.307181, 5.3194e-4];
const sd = [0.02, 0.008, 2e-4, 1e-4, 2e-7];
const rho = [
  [1, 0.9, 0, 0, 0],
  [0.9, 1, 0, 0, 0],
  [0, 0, 1, 0.8, 0.6],
  [0, 0, 0.8, 1, 0.4],
  [0, 0, 0.6, 0.4, 1],
];
const cov = rho.map((row, i) => row.map((r, j) => r * (sd[i] as number) * (sd[j] as number)));

/** Cholesky factor of a small symmetric positive-definite matrix. */
function cholesky(a: number[][]): number[][] {
  const n = a.length;
  const l = a.map(() => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = (a[i] as number[])[j] as number;
      for (let k = 0; k < j; k++) s -= ((l[i] as number[])[k] as number) * ((l[j] as number[])[k] as number);
      (l[i] as number[])[j] = i === j ? Math.sqrt(s) : s / ((l[j] as number[])[j] as number);
    }
  }
  return l;
}

describe('predictions', () => {
  const species = parseSpecies('HCl');
  const constants = {
    values: Object.fromEntries(names.map((n, i) => [n, { value: values[i] as number }])),
    covariance: { names: [...names], matrix: cov },
  };
  const bands = [
    { upper: 1, lower: 0 },
    { upper: 2, lower: 0 },
  ];
  const r = predictLines(species, constants, { bands, jMax: 15 });

  it('propagated uncertainties agree with 4000 Monte Carlo draws of the covariance within 5 %', () => {
    const L = cholesky(cov);
    const z = seededNormal(99);
    const draws = 4000;
    const sums = new Float64Array(r.lines.length);
    const sq = new Float64Array(r.lines.length);
    for (let d = 0; d < draws; d++) {
      const e = names.map(() => z());
      const x = values.map((v, i) => v + (L[i] as number[]).reduce((s, lij, j) => s + lij * (e[j] as number), 0));
      const p = predictLines(
        species,
        { values: Object.fromEntries(names.map((n, i) => [n, { value: x[i] as number }])) },
        { bands, jMax: 15 },
      );
      p.lines.forEach((l, k) => {
        const dv = l.wavenumber.value - (r.lines[k]?.wavenumber.value as number);
        sums[k] = (sums[k] as number) + dv;
        sq[k] = (sq[k] as number) + dv * dv;
      });
    }
    r.lines.forEach((l, k) => {
      const mean = (sums[k] as number) / draws;
      const mcSd = Math.sqrt((sq[k] as number) / draws - mean * mean);
      expect(Math.abs(mcSd / (l.wavenumber.uncertainty as number) - 1)).toBeLessThan(0.05);
    });
  });

  it('reproduces the derived H35Cl 1-0 lines of REFERENCE-DATA §5f (HH constants with ω_e z_e = −0.0122, derived there) to 1e-4 cm⁻¹', () => {
    const hh = predictLines(
      species,
      {
        values: {
          omega_e: { value: 2990.9463 },
          omega_e_x_e: { value: 52.8186 },
          omega_e_y_e: { value: 0.2243 },
          omega_e_z_e: { value: -0.0122 },
          B_e: { value: 10.593416 },
          alpha_e: { value: 0.307181 },
          D_e: { value: 5.3194e-4 },
        },
      },
      { bands: [{ upper: 1, lower: 0 }], jMax: 10 },
    );
    const get = (b: string, j: number) => hh.lines.find((l) => l.branch === b && l.j === j)?.wavenumber.value as number;
    expect(Math.abs(get('R', 0) - 2906.2402)).toBeLessThan(1e-4);
    expect(Math.abs(get('R', 9) - 3058.8559)).toBeLessThan(1e-4);
    expect(Math.abs(get('P', 1) - 2865.0996)).toBeLessThan(1e-4);
    expect(Math.abs(get('P', 10) - 2651.662)).toBeLessThan(1e-4);
  });

  it('relative intensities peak near J = √(kT/2hcB) − ½ ≈ 3 for HCl at 296 K (common practice estimate)', () => {
    const lib = predictLines(species, undefined, { bands: [{ upper: 1, lower: 0 }], jMax: 15, temperature: 296 });
    const strongest = [...lib.lines].sort((a, b) => b.relativeIntensity - a.relativeIntensity)[0];
    expect(strongest?.relativeIntensity).toBe(1);
    expect(Math.abs((strongest?.j as number) - 3)).toBeLessThanOrEqual(1);
    expect(lib.source).toBe('library');
  });
});

describe('library values without an uncertainty', () => {
  it('give null uncertainties, never 0; a caller value with its uncertainty gives a number', () => {
    const hcl = parseSpecies('H35Cl');
    const lib = predictLines(hcl, undefined, { bands: [{ upper: 1, lower: 0 }], jMax: 3 });
    expect(lib.source).toBe('library');
    expect(lib.constants.every((c) => c.uncertainty === null)).toBe(true);
    expect(lib.lines.every((l) => l.wavenumber.uncertainty === null)).toBe(true);
    const caller = predictLines(
      hcl,
      { values: { omega_e: { value: 2990.9463, uncertainty: 0.01 }, B_e: { value: 10.59341, uncertainty: 1e-4 } } },
      { bands: [{ upper: 1, lower: 0 }], jMax: 3 },
    );
    expect(caller.lines.every((l) => (l.wavenumber.uncertainty as number) > 0)).toBe(true);
    // One constant without an uncertainty makes every line that depends on it unknown, not exact.
    const mixed = predictLines(
      hcl,
      { values: { omega_e: { value: 2990.9463, uncertainty: 0.01 }, B_e: { value: 10.59341 } } },
      { bands: [{ upper: 1, lower: 0 }], jMax: 3 },
    );
    expect(mixed.lines.every((l) => l.wavenumber.uncertainty === null)).toBe(true);
    expect(mixed.constants.find((c) => c.name === 'omega_e')?.uncertainty).toBeCloseTo(0.01, 12);
  });
});

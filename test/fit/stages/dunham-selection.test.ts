import { describe, expect, it } from 'vitest';
import { dunhamTermPlan, fitDunhamForSpecies, fitMassReduced } from '../../../src/fit/dunham-stage.js';
import type { UncertaintyMode } from '../../../src/fit/engine.js';
import type { Warning } from '../../../src/fit/types.js';
import type { Observation } from '../../../src/models/linear-model.js';
import {
  CO_12_16,
  type CustomaryConstants,
  HCL_1_35,
  type IndependentListOptions,
  type MoleculeConstants,
} from '../../helpers/independent-lines.js';
import { generated } from './observations-of.js';

// Stage 5 on its own (the forward selection of Dunham terms, the constrained terms, the neglected-term warnings and
// the mass-reduced fit), on lines of the independent generator: its own term values and J bookkeeping, with the
// higher terms of the published constant sets (sources in test/helpers/independent-lines.ts). Every fit is made
// inside `it` (mutation testing, test/MUTANTS.md). Tolerances: a fitted constant within 4σ of the generating value
// (a correct fit fails that with probability 6e-5 per value).

const term = (k: number, l: number) => ({ k, l });

/** Levels of every v up to vMax fitted to the given centrifugal order (what stage 3 would pass on). */
function ordersFor(species: string, vMax: number, order: number): Map<string, number> {
  return new Map(Array.from({ length: vMax + 1 }, (_, v) => [`${species}|${v}`, order] as const));
}

function lines(
  molecule: MoleculeConstants,
  bands: IndependentListOptions['bands'],
  sigma: number,
  extra: Partial<IndependentListOptions> = {},
  species?: string,
): Observation[] {
  const { obs } = generated({ molecule, bands, sigma, seed: 83, ...extra });
  return species ? obs.map((o) => ({ ...o, species })) : obs;
}

function stage(
  species: string,
  obs: readonly Observation[],
  orders: ReadonlyMap<string, number>,
  mode: UncertaintyMode = 'a-posteriori',
) {
  const warnings: Warning[] = [];
  const r = fitDunhamForSpecies(species, obs, mode, 0.01, orders, warnings);
  return { r, warnings };
}

const paramOf = (r: ReturnType<typeof stage>['r'], name: string) => r?.report.parameters.find((p) => p.name === name);

/** |fitted − truth| < 4σ. */
function within4Sigma(q: { value: number; uncertainty: number } | undefined, truth: number, what: string) {
  expect(q, what).toBeDefined();
  expect(Math.abs((q?.value as number) - truth), what).toBeLessThan(4 * (q?.uncertainty as number));
}

const HCL3 = [1, 2, 3].map((u) => ({ upper: u, lower: 0, jMax: 30 }));

describe('forward selection of Dunham terms', () => {
  it('H³⁵Cl 1-0, 2-0, 3-0 to J″ = 30 (σ 2e-4): Y12, Y21, Y03 added in that order, Y04 constrained; γ_e, β_e, H_e with their signs', () => {
    const obs = lines(HCL_1_35, HCL3, 2e-4, { override: { omega_e_z_e: 0 } });
    const { r, warnings } = stage('1H-35Cl', obs, ordersFor('1H-35Cl', 3, 3));
    // Y40 follows the fitted Y30 as a prior (the library's ω_e z_e ± 50 %), L_e (Y04) follows H_e.
    expect(r?.report.terms).toEqual(['Y10', 'Y20', 'Y30', 'Y01', 'Y11', 'Y02', 'Y12', 'Y21', 'Y03', 'Y40', 'Y04']);
    expect(r?.report.constrained?.map((c) => c.parameter)).toEqual(['Y40', 'Y04']);
    const c = HCL_1_35.constants;
    // Y_kl of the customary expansion (test/helpers/independent-lines.ts): Y30 = ω_e y_e, Y21 = γ_e, Y12 = −β_e,
    // Y03 = H_e, exactly (the generator's E(v, J) is that sum term by term).
    within4Sigma(paramOf(r, 'Y10'), c.omega_e.value, 'ω_e');
    within4Sigma(paramOf(r, 'Y20'), -c.omega_e_x_e.value, 'ω_e x_e');
    within4Sigma(paramOf(r, 'Y30'), c.omega_e_y_e.value, 'ω_e y_e');
    within4Sigma(paramOf(r, 'Y01'), c.B_e.value, 'B_e');
    within4Sigma(paramOf(r, 'Y11'), -c.alpha_e.value, 'α_e');
    within4Sigma(paramOf(r, 'Y02'), -c.D_e.value, 'D_e');
    within4Sigma(paramOf(r, 'Y21'), c.gamma_e.value, 'γ_e');
    within4Sigma(paramOf(r, 'Y12'), -c.beta_e.value, 'β_e');
    within4Sigma(paramOf(r, 'Y03'), c.H_e.value, 'H_e');
    // Determined: each added term is more than 10σ from zero, so its sign is the data's.
    for (const n of ['Y21', 'Y12', 'Y03']) {
      const q = paramOf(r, n);
      expect(Math.abs(q?.value as number), n).toBeGreaterThan(10 * (q?.uncertainty as number));
    }
    // The two warnings: ω_e z_e at the library's value (Huber & Herzberg −0.0122 cm⁻¹, from memory) ± 50 %, and the
    // constrained L_e, each named with what it moves.
    expect(warnings.map((w) => w.code)).toEqual(['TERMS_CONSTRAINED', 'TERMS_CONSTRAINED']);
    expect(warnings[0]?.message).toBe(
      '1H-35Cl: the uncertainties of ω_e, ω_e x_e and ω_e y_e include that of ω_e z_e (Y40), which the lines cannot determine and which is constrained to -0.0122 ± 0.00610 cm-1 (ω_e z_e of the reference library, ± 50 %)',
    );
    expect(warnings[1]?.message).toMatch(
      /^1H-35Cl: the uncertainties of D_e and H_e include that of L_e \(Y04\), which the lines cannot determine and which is constrained to /,
    );
    // The report: species on every parameter, covariance p × p with σ² on its diagonal, statistics of the fit.
    const p = r?.report.parameters ?? [];
    expect(p.every((x) => x.species === '1H-35Cl' && x.unit === 'cm-1')).toBe(true);
    const m = r?.report.covariance.matrix ?? [];
    expect(m).toHaveLength(p.length);
    for (const [i, x] of p.entries()) {
      expect(m[i]).toHaveLength(p.length);
      expect(Math.sqrt(m[i]?.[i] as number)).toBeCloseTo(x.uncertainty, 15);
    }
    expect(r?.report.statistics.degreesOfFreedom).toBe(obs.length - 9);
    const chi = r?.report.statistics.reducedChiSquare as number;
    // χ²/ν of a correct model on noise of the stated σ: 1 ± a few √(2/ν) (ν ≈ 170).
    expect(Math.abs(chi - 1)).toBeLessThan(4 * Math.sqrt(2 / (obs.length - 9)));
  });

  it('¹²C¹⁶O 1-0, 2-0, 3-0 (σ 1e-4): Y21 is added before Y12 (the smaller p first), then Y03', () => {
    const obs = lines(CO_12_16, HCL3, 1e-4);
    const { r } = stage('12C-16O', obs, ordersFor('12C-16O', 3, 3));
    expect(r?.report.terms).toEqual(['Y10', 'Y20', 'Y30', 'Y01', 'Y11', 'Y02', 'Y21', 'Y12', 'Y03', 'Y40', 'Y04']);
    const c = CO_12_16.constants;
    within4Sigma(paramOf(r, 'Y21'), c.gamma_e.value, 'γ_e');
    within4Sigma(paramOf(r, 'Y12'), -c.beta_e.value, 'β_e');
    within4Sigma(paramOf(r, 'Y03'), c.H_e.value, 'H_e');
    within4Sigma(paramOf(r, 'Y30'), c.omega_e_y_e.value, 'ω_e y_e');
  });

  it('noise too large for any higher term: the base alone, its next terms constrained, none selected', () => {
    // σ = 0.05 cm⁻¹: γ_e (5e-7 × u² × x ≈ 5e-3 at J = 20, v = 3) and β_e are far below the noise.
    const obs = lines(
      CO_12_16,
      HCL3.map((b) => ({ ...b, jMax: 20 })),
      0.05,
      { override: { omega_e_y_e: 0 } },
    );
    const { r } = stage('12C-16O', obs, ordersFor('12C-16O', 3, 2));
    expect(r?.report.terms.slice(0, 6)).toEqual(['Y10', 'Y20', 'Y30', 'Y01', 'Y11', 'Y02']);
    expect(r?.report.constrained?.map((c) => c.parameter)).toEqual(['Y40', 'Y21', 'Y12', 'Y03']);
  });
});

describe('forward selection: which candidates are ready', () => {
  it('H³⁵Cl with L_e and no H_e, fitted to L: Y03 must come in before Y04 can be tried; both determined', () => {
    const obs = lines(HCL_1_35, HCL3, 2e-4, { override: { omega_e_z_e: 0, H_e: 0, L_e: -5e-12 } });
    const { r, warnings } = stage('1H-35Cl', obs, ordersFor('1H-35Cl', 3, 4));
    expect(r?.report.terms).toEqual(['Y10', 'Y20', 'Y30', 'Y01', 'Y11', 'Y02', 'Y12', 'Y21', 'Y03', 'Y04', 'Y40']);
    // Every rotational term determined by the lines; only Y40, one beyond the fitted Y30, constrained.
    expect(r?.report.constrained?.map((c) => c.parameter)).toEqual(['Y40']);
    expect(warnings.map((w) => w.code)).toEqual(['TERMS_CONSTRAINED']);
    within4Sigma(paramOf(r, 'Y04'), -5e-12, 'L_e');
    within4Sigma(paramOf(r, 'Y03'), 0, 'H_e');
  });

  it('five lines, base of four terms: a fifth term would leave no degree of freedom and is not tried', () => {
    // 1-0 to J″ = 2: P(1), P(2), R(0), R(1), R(2); fitted to D: base Y10, Y01, Y11, Y02; candidate Y12 not tried.
    const obs = lines(CO_12_16, [{ upper: 1, lower: 0, jMax: 2 }], 1e-3);
    expect(obs).toHaveLength(5);
    for (const mode of ['a-posteriori', 'absolute'] as const) {
      const { r } = stage('12C-16O', obs, ordersFor('12C-16O', 1, 2), mode);
      expect(r?.report.terms, mode).toEqual(['ΔG_1/2', 'Y01', 'Y11', 'Y02', 'Y21', 'Y12', 'Y03']);
      expect(
        r?.report.constrained?.map((c) => c.parameter),
        mode,
      ).toEqual(['Y21', 'Y12', 'Y03']);
    }
  });
});

describe('dunhamTermPlan edge cases', () => {
  it('one level only: Y01 (and Y02 when fitted to D) and no Y11; a species without lines: Y01 alone', () => {
    const obs = lines(CO_12_16, [{ upper: 0, lower: 0, jMax: 10 }], 1e-4);
    const one = dunhamTermPlan(obs, ordersFor('12C-16O', 0, 2), '12C-16O');
    expect(one.base).toEqual([term(0, 1), term(0, 2)]);
    expect([one.nLevels, one.nVib]).toEqual([1, 0]);
    expect(one.candidates).toEqual([]);
    const none = dunhamTermPlan(obs, new Map(), '1H-35Cl');
    expect(none.base).toEqual([term(0, 1)]);
    expect([none.nLevels, none.nVib, none.levels]).toEqual([0, 0, []]);
  });
});

describe('one vibrational interval: what the band origin is called', () => {
  it('2-1 gives ΔG_3/2, 3-1 gives ΔG(1→3)/2, and 1-0 with pure rotation in v = 2 (three levels, one interval) the plain label', () => {
    const hot = stage('12C-16O', lines(CO_12_16, [{ upper: 2, lower: 1, jMax: 20 }], 1e-3), new Map());
    expect(hot.r?.report.terms[0]).toBe('ΔG_3/2');
    // ΔG_3/2 = G(2) − G(1) = ω_e − 4ω_e x_e + ω_e y_e (2.5³ − 1.5³) = 2169.81358 − 53.15324 + 0.010511 × 12.25
    // = 2116.78910 cm⁻¹ (Huber & Herzberg constants, hand calculation), within 4σ + 0.01 (the terms it neglects).
    const dg = hot.r?.report.parameters[0];
    const c = CO_12_16.constants;
    const want = c.omega_e.value - 4 * c.omega_e_x_e.value + c.omega_e_y_e.value * (2.5 ** 3 - 1.5 ** 3);
    expect(want).toBeCloseTo(2116.7891, 4);
    expect(Math.abs((dg?.value as number) - want)).toBeLessThan(4 * (dg?.uncertainty as number) + 0.01);
    const far = stage('12C-16O', lines(CO_12_16, [{ upper: 3, lower: 1, jMax: 20 }], 1e-3), new Map());
    expect(far.r?.report.terms[0]).toBe('ΔG(1→3)/2');
    const mixed = stage(
      '12C-16O',
      lines(
        CO_12_16,
        [
          { upper: 1, lower: 0, jMax: 20 },
          { upper: 2, lower: 2, jMax: 20 },
        ],
        1e-3,
      ),
      new Map(),
    );
    expect(mixed.r?.report.terms[0]).toBe('ΔG (one vibrational interval)');
  });
});

describe('too few lines', () => {
  // ¹²C¹⁶O 1-0 to J″ = 1: P(1), R(0), R(1). The base Y10, Y01, Y11 has as many parameters as lines.
  const three = () => lines(CO_12_16, [{ upper: 1, lower: 0, jMax: 1 }], 1e-3);

  it('as many lines as base terms: a-posteriori gives no equilibrium constants, and says why', () => {
    const obs = three();
    expect(obs).toHaveLength(3);
    const { r, warnings } = stage('12C-16O', obs, new Map());
    expect(r).toBeUndefined();
    expect(warnings).toEqual([
      {
        code: 'EQUILIBRIUM_UNDETERMINED',
        message:
          '12C-16O: the Dunham fit has no degrees of freedom left, so its uncertainties cannot be estimated; equilibrium constants are omitted',
      },
    ]);
  });

  it('the same in absolute mode: fitted, with the library priors for the terms next to the base', () => {
    const { r } = stage('12C-16O', three(), new Map(), 'absolute');
    expect(r?.report.terms).toEqual(['ΔG_1/2', 'Y01', 'Y11', 'Y21', 'Y02']);
    expect(r?.report.statistics.degreesOfFreedom).toBe(0);
  });

  it('two lines for three base terms: the highest base term is dropped until the fit is determined', () => {
    // P(1) and R(0) only: ΔG and one B. R(0) = ΔG + 2B, P(1) = ΔG − 2B (Dunham Y10 + Y01 x with B_0 = B_1).
    const obs = three().filter((o) => !(o.lowerJ === 1 && o.upperJ === 2));
    expect(obs).toHaveLength(2);
    const { r } = stage('12C-16O', obs, new Map(), 'absolute');
    // The base loses Y11; Y02 is then carried with the library's D_e (the only prior that Y10 and Y01 allow).
    expect(r?.report.terms).toEqual(['ΔG_1/2', 'Y01', 'Y02']);
    const [r0, p1] = [obs.find((o) => o.lowerJ === 0), obs.find((o) => o.lowerJ === 1)] as [Observation, Observation];
    // Two lines and one prior for three terms: solved exactly. R(0) = Y10 + 2Y01 + 4Y02, P(1) = Y10 − 2Y01 − 4Y02,
    // so Y10 = (R0 + P1)/2 and Y01 = (R0 − P1)/4 − 2Y02, with Y02 = −D_e of the library (−6.12147e-6 cm⁻¹).
    expect(r?.report.parameters[2]?.value).toBeCloseTo(-6.12147e-6, 12);
    expect(r?.report.parameters[0]?.value).toBeCloseTo((r0.position + p1.position) / 2, 8);
    expect(r?.report.parameters[1]?.value).toBeCloseTo((r0.position - p1.position) / 4 + 2 * 6.12147e-6, 10);
  });
});

describe('which higher terms are said to be neglected', () => {
  it('pure rotation in v = 0 and v = 1 of a species the library lacks: no prior can be formed, three warnings', () => {
    // No vibrational interval, no library ω_e: no κ, so neither γ_e nor β_e nor H_e can be given a prior.
    const obs = lines(
      CO_12_16,
      [
        { upper: 0, lower: 0, jMax: 25 },
        { upper: 1, lower: 1, jMax: 25 },
      ],
      0.01,
      {},
      '24Mg-16O',
    );
    const { r, warnings } = stage('24Mg-16O', obs, ordersFor('24Mg-16O', 1, 2));
    expect(r?.report.terms).toEqual(['Y01', 'Y11', 'Y02']);
    expect(r?.report).not.toHaveProperty('constrained');
    expect(warnings).toEqual([
      {
        code: 'VIBRATION_NEEDS_TWO_INTERVALS',
        message:
          '24Mg-16O: ω_e and ω_e x_e need two or more vibrational intervals (e.g. a fundamental and an overtone); the band origin is ΔG, not ω_e',
      },
      {
        code: 'HIGHER_TERMS_NEGLECTED',
        message: '24Mg-16O: B_e and α_e from two vibrational levels (B_e = B_0 + α_e/2) neglect γ_e and higher terms',
      },
      {
        code: 'HIGHER_TERMS_NEGLECTED',
        message: '24Mg-16O: D_e is taken as the same in every level (β_e not determined)',
      },
    ]);
    // The equilibrium set: every term determined, with the fit's covariance.
    expect(r?.set.keys).toEqual(['0,1', '1,1', '0,2']);
    within4Sigma(paramOf(r, 'Y01'), CO_12_16.constants.B_e.value, 'B_e');
  });

  it('1-0 of ¹²C¹⁶O: γ_e, β_e and H_e constrained (scale priors from the fitted Y10, Y01, Y11, Y02), so no neglect is reported', () => {
    const obs = lines(CO_12_16, [{ upper: 1, lower: 0, jMax: 30 }], 1e-3);
    const { r, warnings } = stage('12C-16O', obs, ordersFor('12C-16O', 1, 2));
    expect(r?.report.terms).toEqual(['ΔG_1/2', 'Y01', 'Y11', 'Y02', 'Y21', 'Y12', 'Y03']);
    const constrained = r?.report.constrained ?? [];
    expect(constrained.map((c) => [c.parameter, c.key, c.species, c.prior.unit])).toEqual([
      ['Y21', '12C-16O|Y|2,1', '12C-16O', 'cm-1'],
      ['Y12', '12C-16O|Y|1,2', '12C-16O', 'cm-1'],
      ['Y03', '12C-16O|Y|0,3', '12C-16O', 'cm-1'],
    ]);
    // The scale prior of γ_e is 0 ± 5 (B/ω)|Y11| with the fitted ΔG_1/2 as ω (2143.27, not the library's 2169.81).
    const g = constrained[0];
    const kappa = CO_12_16.constants.B_e.value / 2143.27;
    expect(g?.prior.value).toBe(0);
    expect(
      Math.abs((g?.prior.uncertainty as number) / (5 * kappa * CO_12_16.constants.alpha_e.value) - 1),
    ).toBeLessThan(2e-3);
    expect(warnings.map((w) => w.code)).toEqual([
      'VIBRATION_NEEDS_TWO_INTERVALS',
      'TERMS_CONSTRAINED',
      'TERMS_CONSTRAINED',
      'TERMS_CONSTRAINED',
    ]);
    expect(warnings[1]?.message).toMatch(
      /^12C-16O: the uncertainties of B_e and α_e include that of γ_e \(Y21\), which the lines cannot determine and which is constrained to 0 ± 7\.\d\de-5 cm-1 \(not determined by the lines: 0 ± 5 \(B_e\/ω_e\) \|Y11\| \(Dunham ordering\)\)$/,
    );
    expect(warnings[2]?.message).toMatch(/^12C-16O: the uncertainties of D_e include that of −β_e \(Y12\), /);
    expect(warnings[3]?.message).toMatch(/^12C-16O: the uncertainties of D_e include that of H_e \(Y03\), /);
    // The equilibrium set leaves the constrained terms out.
    expect(r?.set.keys).toEqual(['1,0', '0,1', '1,1', '0,2']);
  });

  it('1-0 and 2-0 of ¹²C¹⁶O: two intervals, no interval warning; ω_e y_e constrained', () => {
    const obs = lines(
      CO_12_16,
      [
        { upper: 1, lower: 0, jMax: 30 },
        { upper: 2, lower: 0, jMax: 30 },
      ],
      1e-3,
    );
    const { r, warnings } = stage('12C-16O', obs, ordersFor('12C-16O', 2, 2));
    expect(warnings.every((w) => w.code === 'TERMS_CONSTRAINED')).toBe(true);
    expect(r?.report.constrained?.map((c) => c.parameter)).toContain('Y30');
    const y30 = r?.report.constrained?.find((c) => c.parameter === 'Y30');
    // ω_e y_e of the library (Huber & Herzberg 0.010511 cm⁻¹), ± 50 %.
    expect(y30?.prior.value).toBe(0.010511);
    expect(y30?.basis).toBe('ω_e y_e of the reference library, ± 50 %');
    expect(warnings.find((w) => w.message.includes('(Y30)'))?.message).toMatch(
      /^12C-16O: the uncertainties of ω_e and ω_e x_e include that of ω_e y_e \(Y30\), which the lines cannot determine and which is constrained to 0\.0105 ± 0\.00526 cm-1 \(ω_e y_e of the reference library, ± 50 %\)$/,
    );
  });

  it('a prior keeps its stated σ when the lines understate theirs tenfold (a-posteriori: the prior is weighted on the fit’s scale)', () => {
    // Reported σ ten times too small: χ²/ν ≈ 100. γ_e cannot be determined from one band, so its uncertainty is its
    // prior's σ (5κ|Y11| ≈ 7.9e-5), not ten times more or less.
    const obs = lines(CO_12_16, [{ upper: 1, lower: 0, jMax: 30 }], 1e-3, { reportedSigmaFactor: 0.1 });
    const { r } = stage('12C-16O', obs, ordersFor('12C-16O', 1, 2));
    expect(r?.report.statistics.reducedChiSquare as number).toBeGreaterThan(50);
    const prior = r?.report.constrained?.[0]?.prior.uncertainty as number;
    const fitted = paramOf(r, 'Y21')?.uncertainty as number;
    expect(fitted / prior).toBeGreaterThan(0.8);
    expect(fitted / prior).toBeLessThanOrEqual(1);
  });
});

/** Constants of another isotopologue by first-order Born–Oppenheimer scaling: Y_kl ∝ μ^−(k/2 + l). */
function scaled(c: CustomaryConstants, muFrom: number, muTo: number): CustomaryConstants {
  const rho = Math.sqrt(muFrom / muTo);
  const s = (x: { value: number }, power: number) => ({ value: x.value * rho ** power, source: 'mass-scaled here' });
  return {
    omega_e: s(c.omega_e, 1),
    omega_e_x_e: s(c.omega_e_x_e, 2),
    omega_e_y_e: s(c.omega_e_y_e, 3),
    B_e: s(c.B_e, 2),
    alpha_e: s(c.alpha_e, 3),
    gamma_e: s(c.gamma_e, 4),
    D_e: s(c.D_e, 4),
    beta_e: s(c.beta_e, 5),
    H_e: s(c.H_e, 6),
  };
}

describe('fitMassReduced', () => {
  // μ of H³⁵Cl and H³⁷Cl, u (shared/REFERENCE-DATA.md §2c, from AME2020 atomic masses).
  const MU35 = 0.9795925391;
  const MU37 = 0.9810772945;
  const masses = new Map([
    ['1H-35Cl', { value: MU35, uncertainty: 0 }],
    ['1H-37Cl', { value: MU37, uncertainty: 0 }],
  ]);
  const noZ = { ...HCL_1_35.constants, omega_e_z_e: { value: 0, source: 'left out here' } };
  const h37: MoleculeConstants = { formula: '1H-37Cl', constants: scaled(noZ, MU35, MU37) };
  const h35: MoleculeConstants = { formula: '1H-35Cl', constants: noZ };
  // H³⁷Cl first with one band (two levels), H³⁵Cl with three (four levels): the plan follows the richer one.
  const both = () => [
    ...lines(h37, [{ upper: 1, lower: 0, jMax: 20 }], 2e-4),
    ...lines(
      h35,
      HCL3.map((b) => ({ ...b, jMax: 20 })),
      2e-4,
    ),
  ];

  it('U_kl = Y_kl μ^(k/2+l) of the generating constants within 4σ, the plan of the isotopologue with more levels', () => {
    const warnings: Warning[] = [];
    const r = fitMassReduced(both(), masses, 'a-posteriori', 0.01, ordersFor('1H-35Cl', 3, 3), warnings);
    expect(warnings).toEqual([]);
    expect(r?.species).toBe('all');
    expect(r?.terms.slice(0, 6)).toEqual(['U10', 'U20', 'U30', 'U01', 'U11', 'U02']);
    const c = noZ;
    const u = (name: string) => r?.parameters.find((p) => p.name === name);
    within4Sigma(u('U10'), c.omega_e.value * MU35 ** 0.5, 'U10');
    within4Sigma(u('U20'), -c.omega_e_x_e.value * MU35, 'U20');
    within4Sigma(u('U01'), c.B_e.value * MU35, 'U01');
    within4Sigma(u('U11'), -c.alpha_e.value * MU35 ** 1.5, 'U11');
    within4Sigma(u('U02'), -c.D_e.value * MU35 ** 2, 'U02');
    // B_e μ of H³⁵Cl, hand value: 10.593416 × 0.9795925391 = 10.37723… cm⁻¹ u.
    expect(c.B_e.value * MU35).toBeCloseTo(10.377232, 5);
    expect(u('U01')?.unit).toBe('cm-1 u^1');
    expect(r?.statistics.degreesOfFreedom).toBe(both().length - (r?.terms.length as number));
    expect(r?.covariance.parameters).toEqual(r?.terms);
  });

  it('the richer isotopologue sets the plan whichever comes first', () => {
    const first35 = () => [
      ...lines(
        h35,
        HCL3.map((b) => ({ ...b, jMax: 20 })),
        2e-4,
      ),
      ...lines(h37, [{ upper: 1, lower: 0, jMax: 20 }], 2e-4),
    ];
    const a = fitMassReduced(first35(), masses, 'a-posteriori', 0.01, ordersFor('1H-35Cl', 3, 3), []);
    const b = fitMassReduced(both(), masses, 'a-posteriori', 0.01, ordersFor('1H-35Cl', 3, 3), []);
    expect(a?.terms).toEqual(b?.terms);
    expect(a?.terms.slice(0, 3)).toEqual(['U10', 'U20', 'U30']);
  });

  it('as many lines as terms: no mass-reduced fit in a-posteriori mode, and the warning says why', () => {
    const obs = lines(h35, [{ upper: 1, lower: 0, jMax: 1 }], 1e-3);
    const warnings: Warning[] = [];
    expect(fitMassReduced(obs, masses, 'a-posteriori', 0.01, new Map(), warnings)).toBeUndefined();
    expect(warnings).toEqual([
      { code: 'MASS_REDUCED_INDETERMINATE', message: 'the mass-reduced Dunham fit has no degrees of freedom left' },
    ]);
    const abs: Warning[] = [];
    const r = fitMassReduced(obs, masses, 'absolute', 0.01, new Map(), abs);
    expect(abs).toEqual([]);
    expect(r?.terms).toEqual(['U10', 'U01', 'U11']);
    expect(r?.species).toBe('all');
  });
});

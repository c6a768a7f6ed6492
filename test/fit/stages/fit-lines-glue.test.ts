import { describe, expect, it } from 'vitest';
import { fitLineListDetailed, type LineInput } from '../../../src/fit/fit-lines.js';
import { CO_12_16, type IndependentListOptions, independentLines } from '../../helpers/independent-lines.js';

// The pipeline's glue (src/fit/fit-lines.ts), second part: the wording of the constraint warning (one basis per
// kind, level numbers of two digits folded to _v), the selection rule as reported in each mode, and the mode turned
// absolute when no degree of freedom is left. Lines of the independent generator (¹²C¹⁶O, Huber & Herzberg
// constants from memory), sometimes relabelled as a species the reference library lacks. Computed inside `it`.

const MU_CO = { value: 6.856208638, uncertainty: 1e-9 };
/** A species the reference library does not hold (its lines here are CO's). */
const OTHER = '24Mg-16O';

function lines(bands: IndependentListOptions['bands'], sigma: number, species?: string, seed = 93): LineInput[] {
  const l = independentLines({ molecule: CO_12_16, bands, sigma, seed }).lines as LineInput[];
  if (!species) return l;
  return l.map((x) => (x.assignment ? { ...x, assignment: { ...x.assignment, species } } : x)) as LineInput[];
}

describe('the TERMS_CONSTRAINED warning of the level fit', () => {
  it('hot band 11-10 of a species the library lacks, fitted to B: one Kratzer basis for B_10 and B_11, written B_v', () => {
    const l = lines([{ upper: 11, lower: 10, jMax: 20 }], 0.01, OTHER);
    const { result } = fitLineListDetailed(l, new Map([[OTHER, MU_CO]]), {
      maxCentrifugalOrder: 1,
      levelsOnly: true,
    });
    const w = result.warnings.find((x) => x.code === 'TERMS_CONSTRAINED');
    const c = result.model.constraints;
    expect(c.map((x) => x.parameter)).toEqual(['D_10', 'D_11']);
    expect(w?.message).toBe(
      `centrifugal terms the lines cannot determine (term test p ≥ 0.01) are constrained, their uncertainty carried into the covariance: ${c.map((x) => `D_${x.parameter.slice(2)} = ${x.prior.value.toExponential(2)} ± ${x.prior.uncertainty.toExponential(2)} cm-1`).join(', ')} (Kratzer D ≈ 4B³/ω_e² with B_v and ω_e ≈ the fitted vibrational interval, ± 50 %)`,
    );
    // Kratzer with ω ≈ G(11) − G(10) = ω_e − 22ω_e x_e + … ≈ 1877 cm⁻¹ (Huber & Herzberg, hand calculation) and
    // B_10 ≈ B_e − 10.5α_e = 1.7475: D ≈ 4 × 1.7475³/1877² ≈ 6.06e-6 cm⁻¹, within 1 %.
    const omega = 2169.81358 - 22 * 13.28831 + 0.010511 * (11.5 ** 3 - 10.5 ** 3);
    const b10 = 1.93128087 - 10.5 * 0.01750441;
    expect(Math.abs((c[0]?.prior.value as number) / ((4 * b10 ** 3) / omega ** 2) - 1)).toBeLessThan(0.01);
  });

  it('two species, one the library holds and one it lacks: two bases, each once, joined by "; "', () => {
    const l = [
      ...lines([{ upper: 1, lower: 0, jMax: 15 }], 0.01),
      ...lines([{ upper: 1, lower: 0, jMax: 15 }], 0.01, OTHER, 94),
    ];
    const { result } = fitLineListDetailed(
      l,
      new Map([
        ['12C-16O', MU_CO],
        [OTHER, MU_CO],
      ]),
      { maxCentrifugalOrder: 1, levelsOnly: true },
    );
    const w = result.warnings.find((x) => x.code === 'TERMS_CONSTRAINED');
    expect(result.model.constraints.map((x) => x.parameter)).toEqual([
      'D_0(12C-16O)',
      'D_1(12C-16O)',
      `D_0(${OTHER})`,
      `D_1(${OTHER})`,
    ]);
    expect(
      w?.message.endsWith(
        '(D_e of the reference library, ± 50 %; Kratzer D ≈ 4B³/ω_e² with B_v and ω_e ≈ the fitted vibrational interval, ± 50 %)',
      ),
    ).toBe(true);
  });

  it('no term left to constrain: no TERMS_CONSTRAINED warning at all', () => {
    // Pure rotation of a species the library lacks, fitted to B: no ω_e, so no Kratzer D can be formed.
    const l = lines([{ upper: 0, lower: 0, jMax: 10 }], 0.01, OTHER);
    const { result } = fitLineListDetailed(l, new Map([[OTHER, MU_CO]]), { maxCentrifugalOrder: 1 });
    expect(result.model.constraints).toEqual([]);
    expect(result.warnings.map((x) => x.code)).not.toContain('TERMS_CONSTRAINED');
  });
});

describe('modes', () => {
  it('absolute mode: the selection rule names the χ²-difference test; a-posteriori names the F test', () => {
    const l = lines(
      [
        { upper: 1, lower: 0, jMax: 20 },
        { upper: 2, lower: 0, jMax: 20 },
      ],
      0.001,
    );
    const masses = new Map([['12C-16O', MU_CO]]);
    const abs = fitLineListDetailed(l, masses, { uncertaintyMode: 'absolute' }).result;
    expect(abs.statistics.uncertaintyMode).toBe('absolute');
    expect(abs.model.selection).toBe(
      'centrifugal and Dunham terms added while a χ²-difference test gives p < 0.01; the next term beyond them constrained by a prior',
    );
    const post = fitLineListDetailed(l, masses).result;
    expect(post.model.selection).toBe(
      'centrifugal and Dunham terms added while an F test gives p < 0.01; the next term beyond them constrained by a prior',
    );
  });

  it('lines with σ that leave no degree of freedom: the mode turns absolute, and the warning says why', () => {
    // 1-0 to J″ = 1: P(1), R(0), R(1) for T_1 − T_0, B_0, B_1.
    const l = lines([{ upper: 1, lower: 0, jMax: 1 }], 0.001);
    expect(l).toHaveLength(3);
    const { result } = fitLineListDetailed(l, new Map([['12C-16O', MU_CO]]), { levelsOnly: true });
    expect(result.statistics.uncertaintyMode).toBe('absolute');
    expect(result.statistics.degreesOfFreedom).toBe(0);
    expect(result.warnings.find((x) => x.code === 'UNCERTAINTY_MODE_CHANGED')?.message).toBe(
      'no degrees of freedom are left to scale the covariance a posteriori: the line uncertainties are taken as absolute',
    );
  });
});

describe('more of the glue', () => {
  it('absolute mode with no degree of freedom stays absolute without a mode warning', () => {
    const l = lines([{ upper: 1, lower: 0, jMax: 1 }], 0.001);
    const { result } = fitLineListDetailed(l, new Map([['12C-16O', MU_CO]]), {
      levelsOnly: true,
      uncertaintyMode: 'absolute',
    });
    expect(result.statistics.uncertaintyMode).toBe('absolute');
    expect(result.statistics.degreesOfFreedom).toBe(0);
    expect(result.warnings.map((x) => x.code)).not.toContain('UNCERTAINTY_MODE_CHANGED');
  });

  it('two species: each Dunham fit holds its own lines only (its degrees of freedom count them)', () => {
    const l = [
      ...lines(
        [
          { upper: 1, lower: 0, jMax: 20 },
          { upper: 2, lower: 0, jMax: 20 },
        ],
        0.001,
      ),
      ...lines([{ upper: 1, lower: 0, jMax: 15 }], 0.001, OTHER, 95),
    ];
    const { result } = fitLineListDetailed(
      l,
      new Map([
        ['12C-16O', MU_CO],
        [OTHER, MU_CO],
      ]),
    );
    const co = result.dunham.find((d) => d.species === '12C-16O');
    const other = result.dunham.find((d) => d.species === OTHER);
    // 82 lines of CO (41 per band), 31 of the other; each fit's ν = its lines − its selected terms.
    const selected = (d: typeof co) => (d?.terms.length as number) - (d?.constrained?.length ?? 0);
    expect(co?.statistics.degreesOfFreedom).toBe(82 - selected(co));
    expect(other?.statistics.degreesOfFreedom).toBe(31 - selected(other));
    // And B_e of CO from its own lines: within 4σ of Huber & Herzberg's 1.93128087 cm⁻¹, σ below 1e-4.
    const be = result.equilibrium.find((e) => e.species === '12C-16O')?.B_e;
    expect(be?.uncertainty as number).toBeLessThan(1e-4);
    expect(Math.abs((be?.value as number) - 1.93128087)).toBeLessThan(4 * (be?.uncertainty as number));
  });

  it('a Dunham fit with nothing constrained adds nothing to the list of constraints', () => {
    // Pure rotation in v = 0 and 1 of a species the library lacks, fitted to D: no ω_e, so no Dunham prior.
    const l = lines(
      [
        { upper: 0, lower: 0, jMax: 30 },
        { upper: 1, lower: 1, jMax: 30 },
      ],
      1e-4,
      OTHER,
    );
    const { result } = fitLineListDetailed(l, new Map([[OTHER, MU_CO]]));
    expect(result.dunham).toHaveLength(1);
    expect(result.dunham[0]).not.toHaveProperty('constrained');
    for (const c of result.model.constraints) expect(typeof c.parameter).toBe('string');
    expect(result.model.constraints.every((c) => !c.parameter.startsWith('Y'))).toBe(true);
  });

  it('stated σ rescaled per group: the level fit that follows uses the rescaled weights (χ²/ν near 1)', () => {
    // 1-0 right (σ 0.001 stated and true), 2-0 stating 0.001 for a scatter of 0.01: 2-0 is rescaled about tenfold.
    const good = lines([{ upper: 1, lower: 0, jMax: 25 }], 0.001);
    const bad = lines([{ upper: 2, lower: 0, jMax: 25 }], 0.01, undefined, 96).map((x) => ({
      ...x,
      uncertainty: 0.001,
    }));
    const { result } = fitLineListDetailed([...good, ...bad], new Map([['12C-16O', MU_CO]]), { levelsOnly: true });
    expect(result.warnings.map((x) => x.code)).toContain('UNCERTAINTY_RESCALED');
    // Without the rescaled weights χ²/ν would be about (51 + 51 × 100)/102 ≈ 50.
    expect(result.statistics.reducedChiSquare as number).toBeLessThan(2);
  });
});

describe('withoutChecks (the inner fits of automatic assignment)', () => {
  it('the same lines, parameters and constraints; only the warnings of the checks and of constrained terms go', () => {
    // B only on 1-0 to J 15: D is constrained (TERMS_CONSTRAINED); the first line sent again: LINES_DUPLICATED.
    const base = lines([{ upper: 1, lower: 0, jMax: 15 }], 0.01);
    const first = base.find((x) => x.assignment) as LineInput;
    const l = [...base, { ...first }];
    const masses = new Map([['12C-16O', MU_CO]]);
    const opts = { maxCentrifugalOrder: 1, levelsOnly: true };
    const full = fitLineListDetailed(l, masses, opts).result;
    const lean = fitLineListDetailed(l, masses, { ...opts, withoutChecks: true }).result;
    const codes = (r: typeof full) => r.warnings.map((w) => w.code);
    expect(codes(full)).toContain('TERMS_CONSTRAINED');
    expect(codes(full)).toContain('LINES_DUPLICATED');
    expect(codes(lean)).not.toContain('TERMS_CONSTRAINED');
    expect(codes(lean)).not.toContain('LINES_DUPLICATED');
    // Every warning left is one the full fit gives too, in the same order.
    expect(codes(full).filter((c) => codes(lean).includes(c))).toEqual(codes(lean));
    expect(lean.lines).toEqual(full.lines);
    expect(lean.parameters).toEqual(full.parameters);
    expect(lean.model.constraints).toEqual(full.model.constraints);
    expect(lean.statistics).toEqual(full.statistics);
  });
});

import { inverse, Matrix, SingularValueDecomposition } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import {
  correlationOf,
  isRankDeficient,
  nestedFTest,
  reducedChiSquare,
  rmsResidual,
  type SolvedModel,
  solveModel,
  solveModelWithPriors,
  studentisedResiduals,
  toRows,
  withLeverages,
} from '../../src/fit/engine.js';
import { termTest } from '../../src/fit/term-test.js';
import type { LinearModel, Observation, Parameter } from '../../src/models/linear-model.js';
import { NORRIS, PONTIUS, type StrdDataset } from '../fixtures/nist-strd/datasets.js';

// The fit engine (weighted solve, a-posteriori or absolute scaling, studentised residuals, term tests) against
// outside values: NIST StRD certified results (test/fixtures/nist-strd), leave-one-out refits and the hat matrix
// computed here with ml-matrix 6.15.1, and F and χ² tail probabilities from SciPy 1.17.1 (scipy.stats.f.sf,
// scipy.stats.chi2.sf). The model is a plain polynomial written here, not one of src/models. Computed inside `it`.

function polynomial(degree: number): LinearModel {
  const parameters: Parameter[] = Array.from({ length: degree + 1 }, (_, k) => ({
    key: `c${k}`,
    name: `c${k}`,
    unit: '1',
    kind: 'Y',
    k,
    l: 0,
  }));
  // The lower J carries x: a test-only convention of this model.
  return { parameters, coefficient: (p, o) => o.lowerJ ** (p.k as number) };
}

function observationsOf(d: StrdDataset, weight = 1): Observation[] {
  return d.y.map((y, i) => ({
    index: i,
    species: 'X',
    upperV: 1,
    lowerV: 0,
    upperJ: 0,
    lowerJ: (d.x[0] as readonly number[])[i] as number,
    position: y,
    weight,
  }));
}

function solved(model: LinearModel, obs: Observation[], mode: 'a-posteriori' | 'absolute', lev = true): SolvedModel {
  const r = solveModel(model, obs, mode, lev);
  if (isRankDeficient(r)) throw new Error('rank deficient');
  return r;
}

/** Log relative error (digits in agreement), as the StRD measure them. */
const lre = (v: number, c: number) => -Math.log10(Math.abs((v - c) / c));

describe('solveModel against NIST StRD certified values', () => {
  it('Norris (linear): values to 11 digits, a-posteriori σ to 10, residual SD² = χ²/ν', () => {
    const fit = solved(polynomial(1), observationsOf(NORRIS), 'a-posteriori');
    expect(fit.degreesOfFreedom).toBe(34);
    NORRIS.certified.forEach((c, j) => {
      expect(lre(fit.values[j] as number, c)).toBeGreaterThanOrEqual(11);
    });
    NORRIS.certifiedSd.forEach((c, j) => {
      expect(lre(Math.sqrt(fit.covariance[j * 2 + j] as number), c)).toBeGreaterThanOrEqual(10);
    });
    expect(lre(Math.sqrt(reducedChiSquare(fit) as number), NORRIS.residualSd)).toBeGreaterThanOrEqual(10);
    expect(fit.conditionNumber).toBeGreaterThan(1);
    expect(fit.leverages.length).toBe(36);
  });

  it('absolute mode with σ = the residual SD (weight 1/s²) gives the same σ unscaled; χ²/ν = 1', () => {
    const w = 1 / NORRIS.residualSd ** 2;
    const fit = solved(polynomial(1), observationsOf(NORRIS, w), 'absolute');
    NORRIS.certifiedSd.forEach((c, j) => {
      expect(lre(Math.sqrt(fit.covariance[j * 2 + j] as number), c)).toBeGreaterThanOrEqual(10);
    });
    expect(Math.abs((reducedChiSquare(fit) as number) - 1)).toBeLessThan(1e-10);
    // The same data with weight 1 in absolute mode: σ smaller by the residual SD (0.8848).
    const unit = solved(polynomial(1), observationsOf(NORRIS), 'absolute');
    expect(
      lre(Math.sqrt(unit.covariance[0] as number) * NORRIS.residualSd, NORRIS.certifiedSd[0] as number),
    ).toBeGreaterThan(10);
  });

  it('Pontius (quadratic in x up to 3e6): values to 10 digits; the covariance is symmetric', () => {
    const fit = solved(polynomial(2), observationsOf(PONTIUS), 'a-posteriori');
    PONTIUS.certified.forEach((c, j) => {
      expect(lre(fit.values[j] as number, c)).toBeGreaterThanOrEqual(10);
    });
    PONTIUS.certifiedSd.forEach((c, j) => {
      expect(lre(Math.sqrt(fit.covariance[j * 3 + j] as number), c)).toBeGreaterThanOrEqual(9);
    });
    expect(fit.covariance[1]).toBe(fit.covariance[3]);
    const corr = correlationOf(fit.covariance, 3);
    for (let i = 0; i < 3; i++) {
      expect(corr[i * 3 + i]).toBeCloseTo(1, 14);
      for (let j = 0; j < 3; j++) {
        const expected =
          (fit.covariance[i * 3 + j] as number) /
          Math.sqrt((fit.covariance[i * 3 + i] as number) * (fit.covariance[j * 3 + j] as number));
        expect(corr[i * 3 + j]).toBeCloseTo(expected, 14);
      }
    }
    expect(toRows(fit.covariance, 3)).toEqual([0, 1, 2].map((i) => Array.from(fit.covariance.slice(i * 3, i * 3 + 3))));
  });
});

describe('studentised residuals by their definition', () => {
  it('tᵢ = eᵢ√wᵢ / (s₍ᵢ₎√(1 − hᵢᵢ)), s₍ᵢ₎ from the refit without line i, hᵢᵢ from ml-matrix (1e-9 relative)', () => {
    // Norris with one line pulled off by 5 and unequal weights.
    const obs = observationsOf(NORRIS).map((o, i) => ({
      ...o,
      weight: 0.5 + (i % 4) * 0.5,
      position: i === 10 ? o.position + 5 : o.position,
    }));
    const model = polynomial(1);
    const fit = solved(model, obs, 'a-posteriori');
    const t = studentisedResiduals(fit);
    const n = obs.length;
    const aw = new Matrix(n, 2);
    for (let i = 0; i < n; i++) {
      const o = obs[i] as Observation;
      aw.set(i, 0, Math.sqrt(o.weight));
      aw.set(i, 1, Math.sqrt(o.weight) * o.lowerJ);
    }
    const hat = aw.mmul(inverse(aw.transpose().mmul(aw))).mmul(aw.transpose());
    for (let i = 0; i < n; i++) {
      const o = obs[i] as Observation;
      const without = solved(
        model,
        obs.filter((_, k) => k !== i),
        'a-posteriori',
        false,
      );
      const s2i = without.chiSquare / without.degreesOfFreedom;
      const e = o.position - ((fit.values[0] as number) + (fit.values[1] as number) * o.lowerJ);
      const expected = (e * Math.sqrt(o.weight)) / Math.sqrt(s2i * (1 - hat.get(i, i)));
      expect(Math.abs((t[i] as number) / expected - 1), `line ${i}`).toBeLessThan(1e-9);
    }
    expect(Math.abs(t[10] as number)).toBeGreaterThan(5);
  });

  it('a line that alone determines a parameter (leverage 1) gets a finite t near 0, the others theirs', () => {
    // Norris's straight line plus a parameter that only line 0 carries: line 0 is fitted exactly, h₀₀ = 1.
    const base = polynomial(1);
    const own: Parameter = { key: 'own', name: 'own', unit: '1', kind: 'Y', k: 9, l: 0 };
    const model: LinearModel = {
      parameters: [...base.parameters, own],
      coefficient: (p, o) => (p.key === 'own' ? (o.index === 0 ? 1 : 0) : base.coefficient(p, o)),
    };
    const fit = solved(model, observationsOf(NORRIS), 'a-posteriori');
    expect(fit.leverages[0]).toBeCloseTo(1, 12);
    const t = studentisedResiduals(fit);
    expect([...t].every((v) => Number.isFinite(v))).toBe(true);
    expect(Math.abs(t[0] as number)).toBeLessThan(1e-3);
    // The others as the straight line without line 0 gives them (1e-9 relative).
    const rest = studentisedResiduals(solved(base, observationsOf(NORRIS).slice(1), 'a-posteriori'));
    for (let i = 1; i < t.length; i++)
      expect(Math.abs((t[i] as number) / (rest[i - 1] as number) - 1)).toBeLessThan(1e-9);
  });

  it('are all 0 without leverages or with fewer than two degrees of freedom', () => {
    const obs = observationsOf(NORRIS);
    expect([...studentisedResiduals(solved(polynomial(1), obs, 'a-posteriori', false))].every((v) => v === 0)).toBe(
      true,
    );
    const three = obs.slice(0, 3);
    const fit = solved(polynomial(1), three, 'a-posteriori');
    expect(fit.degreesOfFreedom).toBe(1);
    expect([...studentisedResiduals(fit)]).toEqual([0, 0, 0]);
  });
});

describe('edge cases of solveModel', () => {
  it('no parameters: residuals are the positions, χ² = Σ w y², ν = n', () => {
    const obs = observationsOf(NORRIS, 2).slice(0, 4);
    const fit = solved({ parameters: [], coefficient: () => 0 }, obs, 'a-posteriori');
    expect([...fit.residuals]).toEqual(obs.map((o) => o.position));
    expect(fit.chiSquare).toBeCloseTo(2 * obs.reduce((s, o) => s + o.position ** 2, 0), 10);
    expect(fit.degreesOfFreedom).toBe(4);
    expect(fit.conditionNumber).toBe(1);
    expect(fit.leverages.length).toBe(4);
    expect(rmsResidual(fit)).toBeCloseTo(Math.sqrt(obs.reduce((s, o) => s + o.position ** 2, 0) / 4), 12);
  });

  it('fewer lines than parameters: every parameter in one group; a dependent pair named', () => {
    const obs = observationsOf(NORRIS).slice(0, 2);
    const r = solveModel(polynomial(2), obs, 'a-posteriori');
    expect(isRankDeficient(r)).toBe(true);
    if (isRankDeficient(r)) expect(r.groups.map((g) => g.map((p) => p.name))).toEqual([['c0', 'c1', 'c2']]);
    const twin: LinearModel = {
      parameters: polynomial(1).parameters.concat([{ key: 'twin', name: 'twin', unit: '1', kind: 'Y', k: 1, l: 0 }]),
      coefficient: (p, o) => o.lowerJ ** (p.k as number),
    };
    const d = solveModel(twin, observationsOf(NORRIS), 'a-posteriori');
    expect(isRankDeficient(d)).toBe(true);
    if (isRankDeficient(d)) expect(d.groups.map((g) => g.map((p) => p.name).sort())).toEqual([['c1', 'twin']]);
  });

  it('rms residual of an empty fit is 0; reduced χ² without degrees of freedom is null', () => {
    const fit = { residuals: new Float64Array(0), degreesOfFreedom: 0, chiSquare: 3 } as unknown as SolvedModel;
    expect(rmsResidual(fit)).toBe(0);
    expect(reducedChiSquare(fit)).toBeNull();
    expect(reducedChiSquare({ ...fit, degreesOfFreedom: 2 })).toBe(1.5);
  });
});

describe('term tests at their stated distributions (SciPy values)', () => {
  const model = (chiSquare: number, degreesOfFreedom: number) => ({ chiSquare, degreesOfFreedom }) as SolvedModel;

  it('nested F test: F = ((χ²_s − χ²_b)/q)/(χ²_b/ν_b) with its tail on (q, ν_b) degrees of freedom', () => {
    // F = 14 on (1, 28): scipy.stats.f.sf(14, 1, 28) = 0.0008362665150490412; F = 20 on (3, 40): 4.446272742117727e-08.
    expect(Math.abs(nestedFTest(model(30, 29), model(20, 28)) / 0.0008362665150490412 - 1)).toBeLessThan(1e-9);
    expect(Math.abs(nestedFTest(model(50, 43), model(20, 40)) / 4.446272742117727e-8 - 1)).toBeLessThan(1e-9);
    expect(termTest(model(30, 29), model(20, 28), 'a-posteriori')).toBe(nestedFTest(model(30, 29), model(20, 28)));
  });

  it('nested F test: 1 when nothing is added or nothing is left; a perfect bigger fit is 0 or 1', () => {
    expect(nestedFTest(model(30, 28), model(20, 28))).toBe(1);
    expect(nestedFTest(model(30, 27), model(20, 28))).toBe(1);
    expect(nestedFTest(model(30, 1), model(0, 0))).toBe(1);
    expect(nestedFTest(model(30, 3), model(0, 2))).toBe(0);
    expect(nestedFTest(model(0, 3), model(0, 2))).toBe(1);
  });

  it('absolute mode: Δχ² against χ² with q degrees of freedom; 1 when nothing is added', () => {
    // scipy.stats.chi2.sf(10, 1) = 0.001565402258002549; chi2.sf(7.5, 3) = 0.0575584519726364.
    expect(Math.abs(termTest(model(30, 29), model(20, 28), 'absolute') / 0.001565402258002549 - 1)).toBeLessThan(1e-9);
    expect(Math.abs(termTest(model(27.5, 31), model(20, 28), 'absolute') / 0.0575584519726364 - 1)).toBeLessThan(1e-9);
    expect(termTest(model(30, 28), model(20, 28), 'absolute')).toBe(1);
    expect(termTest(model(30, 27), model(20, 28), 'absolute')).toBe(1);
    // A bigger model that fits worse (rounding) is no evidence for its terms.
    expect(termTest(model(20, 29), model(20.5, 28), 'absolute')).toBe(1);
  });
});

describe('priors as pseudo-observations, against an augmented solve with ml-matrix', () => {
  function augmented(obs: Observation[], prior: { value: number; sigma: number }, weight: number) {
    const n = obs.length;
    const a = new Matrix(n + 1, 2);
    const y = new Matrix(n + 1, 1);
    const w: number[] = [];
    obs.forEach((o, i) => {
      a.set(i, 0, 1);
      a.set(i, 1, o.lowerJ);
      y.set(i, 0, o.position);
      w.push(o.weight);
    });
    a.set(n, 1, 1);
    y.set(n, 0, prior.value);
    w.push(weight);
    const aw = a.clone();
    const yw = y.clone();
    for (let i = 0; i <= n; i++) {
      const s = Math.sqrt(w[i] as number);
      aw.set(i, 0, aw.get(i, 0) * s);
      aw.set(i, 1, aw.get(i, 1) * s);
      yw.set(i, 0, yw.get(i, 0) * s);
    }
    const cov = inverse(aw.transpose().mmul(aw));
    const x = cov.mmul(aw.transpose().mmul(yw));
    let chi = 0;
    for (let i = 0; i <= n; i++)
      chi += (w[i] as number) * (y.get(i, 0) - a.get(i, 0) * x.get(0, 0) - a.get(i, 1) * x.get(1, 0)) ** 2;
    return { x, cov, chi };
  }

  it.each([
    ['absolute', 1],
    ['a-posteriori', 0.78],
  ] as const)(
    'Norris with the slope held at 1 ± 0.001 (%s, prior scale %f): values, covariance, χ², ν',
    (mode, scale) => {
      const obs = observationsOf(NORRIS);
      const prior = { key: 'c1', value: 1, sigma: 0.001 };
      const fit = solveModelWithPriors(polynomial(1), obs, [prior], mode, scale);
      if (isRankDeficient(fit)) throw new Error('rank deficient');
      const ref = augmented(obs, prior, (mode === 'absolute' ? 1 : scale) / 0.001 ** 2);
      expect(fit.degreesOfFreedom).toBe(35);
      expect(fit.residuals.length).toBe(36);
      expect(fit.leverages.length).toBe(36);
      expect(Math.abs(fit.chiSquare / ref.chi - 1)).toBeLessThan(1e-9);
      const s2 = mode === 'absolute' ? 1 : ref.chi / 35;
      for (let j = 0; j < 2; j++) {
        expect(Math.abs((fit.values[j] as number) / ref.x.get(j, 0) - 1)).toBeLessThan(1e-9);
        for (let k = 0; k < 2; k++)
          expect(Math.abs((fit.covariance[j * 2 + k] as number) / (ref.cov.get(j, k) * s2) - 1)).toBeLessThan(1e-8);
      }
      // The residuals are those of the lines under the constrained values.
      const o = obs[5] as Observation;
      const r5 = o.position - ((fit.values[0] as number) + (fit.values[1] as number) * o.lowerJ);
      expect(Math.abs((fit.residuals[5] as number) - r5)).toBeLessThan(1e-9);
    },
  );

  it('two priors in absolute mode (the prior scale ignored): values, leverages of the lines, no condition number', () => {
    const obs = observationsOf(NORRIS).slice(0, 6);
    const priors = [
      { key: 'c0', value: -0.3, sigma: 0.05 },
      { key: 'c1', value: 1.002, sigma: 0.0005 },
    ];
    const fit = solveModelWithPriors(polynomial(1), obs, priors, 'absolute', 5);
    if (isRankDeficient(fit)) throw new Error('rank deficient');
    // Reference: the 6 lines plus the rows [1, 0] and [0, 1] weighted 1/σ², solved with ml-matrix.
    const rows = [
      ...obs.map((o) => [1, o.lowerJ, o.position, o.weight]),
      [1, 0, -0.3, 1 / 0.05 ** 2],
      [0, 1, 1.002, 1 / 0.0005 ** 2],
    ];
    const aw = new Matrix(
      rows.map(([a, b, , w]) => [(a as number) * Math.sqrt(w as number), (b as number) * Math.sqrt(w as number)]),
    );
    const yw = new Matrix(rows.map(([, , y, w]) => [(y as number) * Math.sqrt(w as number)]));
    const cov = inverse(aw.transpose().mmul(aw));
    const x = cov.mmul(aw.transpose().mmul(yw));
    const hat = aw.mmul(cov).mmul(aw.transpose());
    for (let j = 0; j < 2; j++) expect(Math.abs((fit.values[j] as number) / x.get(j, 0) - 1)).toBeLessThan(1e-9);
    expect(Math.abs((fit.covariance[3] as number) / cov.get(1, 1) - 1)).toBeLessThan(1e-8);
    expect(fit.degreesOfFreedom).toBe(6);
    for (let i = 0; i < 6; i++) expect(Math.abs((fit.leverages[i] as number) - hat.get(i, i))).toBeLessThan(1e-9);
    expect(fit.conditionNumber).toBeNaN();
    // As many rows as parameters is solvable: one line and one prior determine a line's two coefficients.
    const square = solveModelWithPriors(
      polynomial(1),
      obs.slice(0, 1),
      [priors[1] as (typeof priors)[number]],
      'absolute',
    );
    expect(isRankDeficient(square)).toBe(false);
    // A prior cannot lift a dependency: a duplicated column stays rank deficient, named by its parameters.
    const twin: LinearModel = {
      parameters: polynomial(1).parameters.concat([{ key: 'twin', name: 'twin', unit: '1', kind: 'Y', k: 1, l: 0 }]),
      coefficient: (q, o) => o.lowerJ ** (q.k as number),
    };
    const dep = solveModelWithPriors(twin, obs, [{ key: 'c0', value: 0, sigma: 1 }], 'absolute');
    expect(isRankDeficient(dep)).toBe(true);
    if (isRankDeficient(dep)) expect(dep.groups.map((g) => g.map((q) => q.name).sort())).toEqual([['c1', 'twin']]);
  });

  it('a prior on a parameter the model lacks is an error; too few rows are rank deficient', () => {
    const obs = observationsOf(NORRIS);
    expect(() => solveModelWithPriors(polynomial(1), obs, [{ key: 'c7', value: 1, sigma: 1 }], 'absolute')).toThrow(
      'prior on c7, which the model does not hold',
    );
    const r = solveModelWithPriors(polynomial(2), obs.slice(0, 1), [{ key: 'c1', value: 1, sigma: 1 }], 'absolute');
    expect(isRankDeficient(r)).toBe(true);
    if (isRankDeficient(r)) expect(r.groups.map((g) => g.map((q) => q.name))).toEqual([['c0', 'c1', 'c2']]);
  });
});

describe('more edges of the engine', () => {
  it('studentised residuals at exactly two degrees of freedom follow the definition', () => {
    const obs = observationsOf(NORRIS).slice(0, 4);
    const model = polynomial(1);
    const fit = solved(model, obs, 'a-posteriori');
    expect(fit.degreesOfFreedom).toBe(2);
    const t = studentisedResiduals(fit);
    const without = solved(model, obs.slice(1), 'a-posteriori', false);
    const o = obs[0] as Observation;
    const e = o.position - ((fit.values[0] as number) + (fit.values[1] as number) * o.lowerJ);
    const h = fit.leverages[0] as number;
    expect(Math.abs((t[0] as number) / (e / Math.sqrt((without.chiSquare / 1) * (1 - h))) - 1)).toBeLessThan(1e-9);
  });

  it('leverages by default; a square system is solved exactly with ν = 0 and an a-posteriori scale of NaN', () => {
    const obs = observationsOf(NORRIS).slice(0, 2);
    const fit = solveModel(polynomial(1), obs, 'a-posteriori');
    if (isRankDeficient(fit)) throw new Error('rank deficient');
    expect(fit.leverages.length).toBe(2);
    expect(fit.degreesOfFreedom).toBe(0);
    const [a, b] = obs as [Observation, Observation];
    const slope = (b.position - a.position) / (b.lowerJ - a.lowerJ);
    expect(Math.abs((fit.values[1] as number) / slope - 1)).toBeLessThan(1e-12);
    expect([...fit.covariance].every(Number.isNaN)).toBe(true);
  });

  it('a parameter of zero variance has correlation 1 with itself and 0 with the others', () => {
    expect([...correlationOf(new Float64Array([0, 0, 0, 4]), 2)]).toEqual([1, 0, 0, 1]);
  });
});

describe('lines of repeated transitions, solved over their distinct transitions (rowsByTransition)', () => {
  // A model whose row depends on the transition only may be solved over one row per transition; the answers must be
  // those of the kernel merging the identical rows itself (the same model without the flag), bit for bit.
  function repeatedLines(n: number, transitions: number): Observation[] {
    let s = 17;
    const u = () => {
      s = (s * 1103515245 + 12345) % 2147483648;
      return s / 2147483648;
    };
    return Array.from({ length: n }, (_, i) => {
      const j = i < transitions ? i : Math.floor(u() * transitions);
      return {
        index: i,
        species: 'X',
        upperV: 1,
        lowerV: 0,
        upperJ: j + 1,
        lowerJ: j,
        position: 3 + 0.5 * j - 0.01 * j * j + (u() - 0.5) * 0.02,
        weight: 1 / (0.005 + 0.02 * u()) ** 2,
      };
    });
  }
  const flagged = (m: LinearModel): LinearModel => ({ ...m, rowsByTransition: true });
  const bits = (f: SolvedModel) => ({
    values: Array.from(f.values),
    covariance: Array.from(f.covariance),
    residuals: Array.from(f.residuals),
    leverages: Array.from(f.leverages),
    chiSquare: f.chiSquare,
    degreesOfFreedom: f.degreesOfFreedom,
    conditionNumber: f.conditionNumber,
  });

  it.each([
    [150, 40, 'merged'],
    [150, 76, 'not merged: more than half the rows distinct'],
    [40, 10, 'not merged: under 64 rows'],
  ])('%i lines of %i transitions (%s): solveModel gives the same bits', (n, t) => {
    const obs = repeatedLines(n, t);
    for (const mode of ['a-posteriori', 'absolute'] as const) {
      const plain = solveModel(polynomial(2), obs, mode);
      const byTransition = solveModel(flagged(polynomial(2)), obs, mode);
      if (isRankDeficient(plain) || isRankDeficient(byTransition)) throw new Error('rank deficient');
      expect(bits(byTransition)).toEqual(bits(plain));
    }
  });

  it.each([
    [150, 40],
    [130, 64],
    [130, 65],
  ])(
    '%i lines of %i transitions with two priors (merged up to 64 transitions): solveModelWithPriors gives the same bits',
    (n, t) => {
      const obs = repeatedLines(n, t);
      const priors = [
        { key: 'c2', value: -0.01, sigma: 0.002 },
        { key: 'c1', value: 0.5, sigma: 0.05 },
      ];
      for (const mode of ['a-posteriori', 'absolute'] as const) {
        const plain = solveModelWithPriors(polynomial(3), obs, priors, mode, 0.7);
        const byTransition = solveModelWithPriors(flagged(polynomial(3)), obs, priors, mode, 0.7);
        if (isRankDeficient(plain) || isRankDeficient(byTransition)) throw new Error('rank deficient');
        expect(bits(byTransition)).toEqual(bits(plain));
        expect(byTransition.residuals.length).toBe(n);
      }
    },
  );
});

describe('a trial fit completed with its leverages (withLeverages)', () => {
  it("gives the hat-matrix diagonal of ml-matrix (1e-9) and the full fit's condition number; a full fit needs none", () => {
    // Norris's straight line with unequal weights, solved as a trial (no leverages, no condition number).
    const obs = observationsOf(NORRIS).map((o, i) => ({ ...o, weight: 0.5 + (i % 4) * 0.5 }));
    const model = polynomial(1);
    const trial = solved(model, obs, 'a-posteriori', false);
    expect(trial.leverages.length).toBe(0);
    const done = withLeverages(trial);
    if (!done) throw new Error('the trial fit was not completed');
    const n = obs.length;
    const aw = new Matrix(n, 2);
    for (let i = 0; i < n; i++) {
      const o = obs[i] as Observation;
      aw.set(i, 0, Math.sqrt(o.weight));
      aw.set(i, 1, Math.sqrt(o.weight) * o.lowerJ);
    }
    const hat = aw.mmul(inverse(aw.transpose().mmul(aw))).mmul(aw.transpose());
    expect(done.leverages.length).toBe(n);
    for (let i = 0; i < n; i++) expect(Math.abs((done.leverages[i] as number) - hat.get(i, i))).toBeLessThan(1e-9);
    // Σ hᵢᵢ = p (the trace of a projection).
    expect(done.leverages.reduce((a, h) => a + h, 0)).toBeCloseTo(2, 9);
    const full = solved(model, obs, 'a-posteriori');
    expect(done.conditionNumber).toBeCloseTo(full.conditionNumber, 6);
    // The completed fit's condition number (computed when first read) is ml-matrix's: the ratio of the extreme
    // singular values of the weighted design with unit-norm columns.
    const scaled = new Matrix(n, 2);
    for (let j = 0; j < 2; j++) {
      const norm = Math.hypot(...aw.getColumn(j));
      for (let i = 0; i < n; i++) scaled.set(i, j, aw.get(i, j) / norm);
    }
    const sv = new SingularValueDecomposition(scaled).diagonal;
    expect(done.conditionNumber / (Math.max(...sv) / Math.min(...sv)) - 1).toBeLessThan(1e-9);
    expect({ ...done }.conditionNumber).toBe(done.conditionNumber);
    expect(Array.from(done.values)).toEqual(Array.from(trial.values));
    // A fit solved with its leverages has nothing to complete.
    expect(withLeverages(full)).toBeUndefined();
  });
});

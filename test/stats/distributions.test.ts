import { describe, expect, it } from 'vitest';
import {
  chiSquareCdf,
  chiSquareSurvival,
  fDistributionSurvival,
  incompleteBeta,
  logGamma,
  studentTTwoSided,
} from '../../src/stats/distributions.js';
import { normalTwoSided, normalTwoSidedQuantile } from '../../src/stats/normal.js';
import { MAD_TO_SIGMA, robustSigma } from '../../src/stats/robust.js';

// Fast reference checks of the special functions behind every significance test, against SciPy 1.17.1
// (scipy.special.gammaln, scipy.special.betainc, scipy.stats.f/t/chi2/norm), computed for this test. Points are
// chosen on both sides of each algorithm's switch (reflection below ½, the two continued-fraction branches of
// I_x(a, b), series and continued fraction of the incomplete gamma). Tolerance 1e-10 relative unless stated.
const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe('special functions against SciPy', () => {
  it.each([
    [0.3, 1.0957979948180756],
    [0.5, 0.5723649429247],
    [2.5, 0.2846828704729192],
    [7, 6.579251212010101],
    [10, 12.801827480081469],
    [100.5, 361.43554046777757],
  ])('ln Γ(%f) = %f', (x, v) => {
    expect(rel(logGamma(x), v)).toBeLessThan(1e-10);
  });

  it('ln Γ(1) = ln Γ(2) = 0 (within 1e-13)', () => {
    expect(Math.abs(logGamma(1))).toBeLessThan(1e-13);
    expect(Math.abs(logGamma(2))).toBeLessThan(1e-13);
  });

  it.each([
    [0.1, 2, 3, 0.05230000000000001],
    [0.5, 2, 3, 0.6875],
    [0.9, 2, 3, 0.9963],
    [0.2, 0.5, 14, 0.9867807769972896],
    [0.95, 14, 0.5, 0.23490569838256387],
    [0.3, 10, 10, 0.032553356881300934],
    [0.7, 10, 10, 0.967446643118699],
  ])('I_%f(%f, %f) = %f', (x, a, b, v) => {
    expect(rel(incompleteBeta(x, a, b), v)).toBeLessThan(1e-10);
  });

  it('I_x is 0 at x ≤ 0 and 1 at x ≥ 1', () => {
    expect([
      incompleteBeta(0, 2, 3),
      incompleteBeta(-1, 2, 3),
      incompleteBeta(1, 2, 3),
      incompleteBeta(2, 2, 3),
    ]).toEqual([0, 0, 1, 1]);
  });

  it.each([
    [7.2, 1, 28, 0.01209860584072053],
    [8.0, 1, 28, 0.008547967611993666],
    [2.5, 3, 50, 0.07011582357841852],
    [0.5, 4, 10, 0.736775548696845],
    [30, 2, 5, 0.001641124840903045],
  ])('P(F > %f; %i, %i) = %f', (f, d1, d2, v) => {
    expect(rel(fDistributionSurvival(f, d1, d2), v)).toBeLessThan(1e-10);
  });

  // The end points are exact whatever the parameters: at a = 1e306 the general formula has ln Γ(a + b) − ln Γ(a) =
  // ∞ − ∞ (NaN), so only the end-point rules can give I_0 = 0 and I_1 = 1 there. ln Γ(1e306) overflows to ∞ by
  // hand: (a − ½) ln(a + 6.5) ≈ 1e306 × 704.6 > 1.8e308.
  it('I_0 = 0 and I_1 = 1 exactly, also where ln Γ of the parameters overflows', () => {
    expect(logGamma(1e306)).toBe(Number.POSITIVE_INFINITY);
    expect(incompleteBeta(0, 1e306, 2)).toBe(0);
    expect(incompleteBeta(1, 2, 1e306)).toBe(1);
    expect(incompleteBeta(0, 3, 1e306)).toBe(0);
    expect(incompleteBeta(1, 1e306, 3)).toBe(1);
  });

  // Far above the mean the lower tail is 1 to double precision (Q(1000, 10000) < e^-6000 by the Chernoff bound
  // exp(−k/2·(x/k − 1 − ln(x/k))) with x/k = 10: exp(−1000·(9 − ln 10)) ≈ e^-6697); the series of P(a, x) would need
  // about x − a = 9000 terms to get there and is not used there.
  it('P(χ² ≤ x) = 1 far above the mean (x = 20 000, k = 2000) and just above it (x = 2 100, k = 2000)', () => {
    expect(chiSquareCdf(20000, 2000)).toBe(1);
    // SciPy 1.17.1 scipy.stats.chi2.cdf(2100, 2000) = 0.9413288886226819 (mpmath 1.3.0 gammainc at 40 digits agrees);
    // tolerance 1e-9 relative.
    expect(rel(chiSquareCdf(2100, 2000), 0.9413288886226819)).toBeLessThan(1e-9);
  });

  it('P(F > f) = 1 for f ≤ 0, however negative', () => {
    expect(fDistributionSurvival(0, 2, 5)).toBe(1);
    expect(fDistributionSurvival(-1, 2, 5)).toBe(1);
    expect(fDistributionSurvival(-10, 2, 5)).toBe(1);
  });

  it('robust σ = 1.4826 × median |x − median x| away from zero: [100, 101, 102, 104, 107] → MAD 2', () => {
    // 1/Φ⁻¹(3/4) = 1/0.6744897501960817 (scipy.stats.norm.ppf(0.75)) = 1.482602218505602.
    expect(Math.abs(MAD_TO_SIGMA - 1.482602218505602)).toBeLessThan(1e-6);
    expect(Math.abs(robustSigma([100, 101, 102, 104, 107]) - 2 * MAD_TO_SIGMA)).toBeLessThan(1e-12);
    expect(Math.abs(robustSigma([-50, -47, -46, -45, -40, -44]) - 1.5 * MAD_TO_SIGMA)).toBeLessThan(1e-12);
  });

  it.each([
    [1.0, 5, 0.3632174676491229],
    [2.0, 10, 0.07338803477074037],
    [3.5, 30, 0.0014768074376442532],
    [0.2, 2, 0.8599719915971991],
  ])('P(|T| > %f; ν = %i) = %f', (t, nu, v) => {
    expect(rel(studentTTwoSided(t, nu), v)).toBeLessThan(1e-10);
  });

  it.each([
    [0.5, 1, 0.47950012218695337],
    [1.0, 4, 0.9097959895689501],
    [3.0, 2, 0.22313016014842982],
    [10, 3, 0.01856613546304325],
    [30, 10, 0.000856641210775301],
    [100, 80, 0.064570368921133],
    [0.01, 6, 0.9999999792446357],
  ])('P(χ² > %f; k = %i) = %f', (x, k, v) => {
    expect(rel(chiSquareSurvival(x, k), v)).toBeLessThan(1e-10);
  });

  // Lower tail computed directly (SciPy 1.17.1 scipy.stats.chi2.cdf), down to values 1 − Q cannot hold.
  it.each([
    [0.5, 62, 2.0699045209492092e-53],
    [30, 62, 0.0001973131496882521],
    [3, 2, 0.7768698398515702],
    [100, 62, 0.9984059726813936],
    [0.001, 1, 0.02522712063003961],
    [0.01, 6, 2.0755364366551777e-8],
  ])('P(χ² ≤ %f; k = %i) = %f', (x, k, v) => {
    expect(rel(chiSquareCdf(x, k), v)).toBeLessThan(1e-10);
  });

  it('P(χ² ≤ 0) = 0 and P(χ² ≤ x) + P(χ² > x) = 1', () => {
    expect(chiSquareCdf(0, 5)).toBe(0);
    expect(chiSquareCdf(-1, 5)).toBe(0);
    for (const [x, k] of [
      [3, 5],
      [40, 20],
      [5000, 4000],
    ] as const)
      expect(chiSquareCdf(x, k) + chiSquareSurvival(x, k)).toBeCloseTo(1, 14);
  });

  // Large arguments, as a 5 000-line list gives (SciPy 1.17.1, scipy.special.gammaln/betainc,
  // scipy.stats.f.sf/chi2.sf; ln Γ(1e-8) from mpmath 1.3.0 loggamma at 30 digits). Here the algorithm's switches
  // decide the value, not only the speed: the continued fraction on the wrong side of (a + 1)/(a + b + 2), or the
  // series of the incomplete gamma far above x = a + 1, has not converged within its iteration cap, and the Lanczos
  // sum without the reflection loses digits near x = 0. Tolerance 1e-10 relative.
  it.each([
    ['ln Γ(1e-8)', () => logGamma(1e-8), 18.42068073818021],
    ['ln Γ(0.01)', () => logGamma(0.01), 4.599479878042022],
    ['I_0.49(5000, 5000)', () => incompleteBeta(0.49, 5000, 5000), 0.02274203232457461],
    ['I_0.51(5000, 5000)', () => incompleteBeta(0.51, 5000, 5000), 0.9772579676754254],
    ['I_0.2(2000, 8000)', () => incompleteBeta(0.2, 2000, 8000), 0.5019947438067547],
    ['I_0.21(2000, 8000)', () => incompleteBeta(0.21, 2000, 8000), 0.9933328163637958],
    ['I_0.999(9000, 3)', () => incompleteBeta(0.999, 9000, 3), 0.006204747457271053],
    ['I_0.5(200, 300)', () => incompleteBeta(0.5, 200, 300), 0.9999964565197356],
    // Tiny values from small b: only the continued fraction on the side where x lies gives them to 1e-10; the other
    // side's 1 − (1 − I) loses them to cancellation (SciPy betainc, and mpmath 1.3.0 at 40 digits, agree).
    ['I_0.3(1.5, 1e-8)', () => incompleteBeta(0.3, 1.5, 1e-8), 1.347988948434668e-9],
    ['I_0.5(2.5, 1e-6)', () => incompleteBeta(0.5, 2.5, 1e-6), 1.1283144164836605e-7],
    ['I_0.6(3, 2e-7)', () => incompleteBeta(0.6, 3, 2e-7), 2.725815097132746e-8],
    ['P(F > 3.84; 1, 10000)', () => fDistributionSurvival(3.84, 1, 10000), 0.050071258425244305],
    ['P(F > 1.2; 30, 5000)', () => fDistributionSurvival(1.2, 30, 5000), 0.20901704392819062],
    ['P(χ² > 10000; k = 10000)', () => chiSquareSurvival(10000, 10000), 0.49811936596618267],
    ['P(χ² > 10300; k = 10000)', () => chiSquareSurvival(10300, 10000), 0.017638117447345406],
    ['P(χ² > 9700; k = 10000)', () => chiSquareSurvival(9700, 10000), 0.98374920482229],
    ['P(χ² > 2500; k = 2000)', () => chiSquareSurvival(2500, 2000), 1.074008023138619e-13],
  ] as const)('%s with large arguments or near zero', (_name, f, v) => {
    expect(rel(f(), v)).toBeLessThan(1e-10);
  });

  // χ² of a whole fit of a long list (up to 150 000 lines are accepted): near x = k the expansions need about
  // 8.6·√(k/2) terms, and a fixed cap of 1000 left P(χ² > 150 000; k = 150 000) wrong in its fourth digit
  // (0.49965 for 0.49951) and P(χ² > 2 000 000; k = 2 000 000) at 0.66 for 0.4999.
  // SciPy 1.17.1 scipy.stats.chi2.sf; tolerance 1e-9 relative (1e-8 at two million degrees of freedom, where
  // ln Γ(a) ≈ 2.7e7 leaves about 1e-9 of its relative precision in the exponent).
  it.each([
    [150000, 150000, 0.49951442288376924, 1e-9],
    [151000, 150000, 0.034157993013351075, 1e-9],
    [149000, 150000, 0.9662700043763771, 1e-9],
    [1999999, 2000000, 0.5000664904042621, 1e-8],
    [2000001, 2000000, 0.4996675481737283, 1e-8],
  ])('P(χ² > %f; k = %i) = %f for the χ² of a long list', (x, k, v, tol) => {
    expect(rel(chiSquareSurvival(x, k), v)).toBeLessThan(tol);
  });

  it('P(χ² > x) = 1 for x ≤ 0', () => {
    expect(chiSquareSurvival(0, 3)).toBe(1);
    expect(chiSquareSurvival(-2, 3)).toBe(1);
  });

  it.each([
    [0.5, 0.6170750774519738],
    [1.0, 0.31731050786291415],
    [1.959963984540054, 0.05],
    [3.0, 0.0026997960632601866],
    [4.0, 6.334248366623973e-5],
    [6.0, 1.973175290075389e-9],
  ])('P(|Z| > %f) = %f', (z, v) => {
    expect(rel(normalTwoSided(z), v)).toBeLessThan(1e-9);
  });

  it.each([
    [0.3173105078629141, 1.0],
    [0.05, 1.9599639845400545],
    [0.01, 2.575829303548901],
    [5e-5, 4.0556269811224],
    [1e-9, 6.1094102048693975],
  ])('the z with P(|Z| > z) = %f is %f (to 1e-9), the same when asked twice', (p, z) => {
    expect(Math.abs(normalTwoSidedQuantile(p) - z)).toBeLessThan(1e-9);
    expect(normalTwoSidedQuantile(p)).toBe(normalTwoSidedQuantile(p));
  });
});

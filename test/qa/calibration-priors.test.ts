import { describe, expect, it } from 'vitest';
import { calibrateAgainstLibrary } from '../../src/qa/calibration.js';

// The priors of the nuisance terms, checked where they matter: few lines, so that the offset, the scale and their
// uncertainties depend on the prior widths. The expected values come from the weighted least squares written out
// below (normal equations solved by Gaussian elimination), with the priors of the documented rule: each Dunham
// term the constants lack next to one they have, Y_kl with Y_{k−1,l} given, enters with mean 0 and σ = 5κ|Y_{k−1,l}|,
// κ = B_e/ω_e (the scale priors of src/fit/truncation.ts, SCALE_PRIOR_FACTOR = 5).
//
// Constants (invented): Y10 = 2000, Y20 = −10, Y01 = 2, Y11 = −0.02 cm⁻¹: κ = 1e-3, so ω_e y_e (Y30) has σ =
// 5·1e-3·10 = 0.05 and γ_e (Y21) σ = 5·1e-3·0.02 = 1e-4 cm⁻¹; no D_e, so neither β_e nor H_e.
const Y = new Map([
  ['1,0', 2000],
  ['2,0', -10],
  ['0,1', 2],
  ['1,1', -0.02],
]);
const basis = (k: number, l: number, v: number, j: number) => (v + 0.5) ** k * (j * (j + 1)) ** l;
const E = (v: number, j: number) =>
  2000 * basis(1, 0, v, j) - 10 * basis(2, 0, v, j) + 2 * basis(0, 1, v, j) - 0.02 * basis(1, 1, v, j);
// The "true" molecule has ω_e y_e = 0.02 and γ_e = 5e-5 the constants lack.
const trueE = (v: number, j: number) => E(v, j) + 0.02 * basis(3, 0, v, j) + 5e-5 * basis(2, 1, v, j);

/** Solves the symmetric system A x = b (Gaussian elimination with partial pivoting); returns x and A⁻¹. */
function solve(A: number[][], b: number[]): { x: number[]; inverse: number[][] } {
  const n = b.length;
  const M = A.map((row, i) => [...row, b[i] as number, ...Array.from({ length: n }, (_, k) => (k === i ? 1 : 0))]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(M[r]?.[c] as number) > Math.abs(M[p]?.[c] as number)) p = r;
    [M[c], M[p]] = [M[p] as number[], M[c] as number[]];
    const pivot = M[c] as number[];
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const row = M[r] as number[];
      const f = (row[c] as number) / (pivot[c] as number);
      for (let k = c; k < 2 * n + 1; k++) row[k] = (row[k] as number) - f * (pivot[k] as number);
    }
  }
  return {
    x: M.map((row, i) => (row[n] as number) / (row[i] as number)),
    inverse: M.map((row, i) => row.slice(n + 1).map((v) => v / (row[i] as number))),
  };
}

describe('calibration with few lines: the nuisance priors set the uncertainties', () => {
  it('offset, scale and their σ equal the weighted least squares with the priors 0 ± 0.05 (Y30), 0 ± 1e-4 (Y21) (1e-9)', () => {
    // Five lines: R(0), P(2), R(4) of 1-0 and R(1), P(3) of 2-0, σ = 0.01, 0.02, 0.01, 0.03, 0.01 cm⁻¹; offset
    // 0.03 cm⁻¹ and scale +10 ppm about the weighted centre of the reference positions.
    const spec: [number, number, number, number, number][] = [
      [1, 1, 0, 0, 0.01],
      [1, 1, 0, 2, 0.02],
      [1, 5, 0, 4, 0.01],
      [2, 2, 0, 1, 0.03],
      [2, 2, 0, 3, 0.01],
    ];
    const refs = spec.map(([u, ju, l, jl]) => E(u, ju) - E(l, jl));
    const w = spec.map((s) => 1 / s[4] ** 2);
    const centre = refs.reduce((a, r, i) => a + (w[i] as number) * r, 0) / w.reduce((a, x) => a + x, 0);
    const pts = spec.map(([u, ju, l, jl, sigma]) => {
      const t = trueE(u, ju) - trueE(l, jl);
      return { observed: t + 0.03 + 10e-6 * (t - centre), sigma, upperV: u, upperJ: ju, lowerV: l, lowerJ: jl };
    });
    // Rows: [1, ref − centre, Δbasis30, Δbasis21] with weight 1/σ², then the two prior rows.
    const rows: { x: number[]; y: number; w: number }[] = pts.map((p, i) => ({
      x: [
        1,
        (refs[i] as number) - centre,
        basis(3, 0, p.upperV, p.upperJ) - basis(3, 0, p.lowerV, p.lowerJ),
        basis(2, 1, p.upperV, p.upperJ) - basis(2, 1, p.lowerV, p.lowerJ),
      ],
      y: p.observed - (refs[i] as number),
      w: 1 / p.sigma ** 2,
    }));
    rows.push({ x: [0, 0, 1, 0], y: 0, w: 1 / 0.05 ** 2 }, { x: [0, 0, 0, 1], y: 0, w: 1 / 1e-4 ** 2 });
    const A = [0, 1, 2, 3].map((a) =>
      [0, 1, 2, 3].map((b) => rows.reduce((s, r) => s + r.w * (r.x[a] as number) * (r.x[b] as number), 0)),
    );
    const b = [0, 1, 2, 3].map((a) => rows.reduce((s, r) => s + r.w * (r.x[a] as number) * r.y, 0));
    const { x, inverse } = solve(A, b);
    const sOffset = Math.sqrt(inverse[0]?.[0] as number);
    const sScale = Math.sqrt(inverse[1]?.[1] as number) * 1e6;

    const r = calibrateAgainstLibrary(pts, Y, 'invented constants', 1e6);
    if (!r) throw new Error('no calibration');
    expect(r.nuisance).toEqual(['ω_e y_e', 'γ_e']);
    expect(Math.abs(r.centre - centre)).toBeLessThan(1e-9);
    expect(Math.abs(r.offset.value - (x[0] as number))).toBeLessThan(1e-9);
    expect(Math.abs(r.offset.uncertainty / sOffset - 1)).toBeLessThan(1e-9);
    expect(Math.abs((r.scale?.value as number) - (x[1] as number) * 1e6)).toBeLessThan(1e-6);
    expect(Math.abs((r.scale?.uncertainty as number) / sScale - 1)).toBeLessThan(1e-9);
    // The priors matter here: without them (very wide), σ(offset) would differ by more than 10 %.
    const wide = [0, 1, 2, 3].map((a) =>
      [0, 1, 2, 3].map(
        (c) =>
          rows.slice(0, 5).reduce((s, q) => s + q.w * (q.x[a] as number) * (q.x[c] as number), 0) +
          (a === c && a >= 2 ? 1e-12 : 0),
      ),
    );
    const loose = Math.sqrt(solve(wide, [0, 0, 0, 0]).inverse[0]?.[0] as number);
    expect(Math.abs(loose / sOffset - 1)).toBeGreaterThan(0.1);
    // And the same σ with a scale limit of 20 ppm: the scale is now reported as undetermined, with that σ.
    const r20 = calibrateAgainstLibrary(pts, Y, 'invented constants', 20);
    if (!r20) throw new Error('no calibration');
    if (sScale > 20 / 3) {
      expect(r20.scale).toBeUndefined();
      expect(Math.abs((r20.scaleUndetermined as number) / sScale - 1)).toBeLessThan(1e-9);
    } else {
      expect(Math.abs((r20.scale?.uncertainty as number) / sScale - 1)).toBeLessThan(1e-9);
    }
  });
});

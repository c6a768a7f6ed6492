import { describe, expect, it } from 'vitest';
import { solveCount, solveLeastSquares } from '../../src/linalg/least-squares.js';
import { seededRandom } from '../helpers/random.js';

// Repeated design rows (a transition measured again) are merged exactly before the factorisation: Σᵢ wᵢ(yᵢ − xβ)²
// = W(ȳ − xβ)² + a constant, with W = Σwᵢ and ȳ = Σwᵢyᵢ / W. The merge is a documented step of the kernel, so a
// system with repeats must give, bit for bit, what the same kernel gives on the rows merged by hand (the sums are
// taken here in row order, as the kernel documents). The unmerged factorisation agrees only to rounding (1e-15),
// which these bitwise checks tell apart. Everything is computed inside `it` (mutation testing).

interface System {
  rows: number;
  cols: number;
  design: Float64Array;
  y: Float64Array;
  w: Float64Array;
}

/** `distinct` rows of a design drawn from `fill`, each repeated to `rows` rows in a seeded order, weights and y seeded. */
function repeatedSystem(
  rows: number,
  cols: number,
  distinct: number,
  seed: number,
  fill: (g: number, j: number) => number,
): System & { group: Int32Array } {
  const u = seededRandom(seed);
  const design = new Float64Array(rows * cols);
  const y = new Float64Array(rows);
  const w = new Float64Array(rows);
  const group = new Int32Array(rows);
  for (let i = 0; i < rows; i++) {
    // Every distinct row appears at least once (the first `distinct` rows), then in a scrambled order.
    const g = i < distinct ? i : Math.floor(u() * distinct);
    group[i] = g;
    for (let j = 0; j < cols; j++) design[j * rows + i] = fill(g, j);
    w[i] = 0.3 + 2.7 * u();
    y[i] = 1.7 + 0.37 * g - 0.011 * g * g + (u() - 0.5) / Math.sqrt(w[i] as number);
  }
  return { rows, cols, design, y, w, group };
}

/** The same rows merged by hand: the first row of each group, Σw and Σwy/Σw summed in row order. */
function mergedByHand(s: System & { group: Int32Array }, distinct: number): System {
  const { rows: n, cols: p } = s;
  const design = new Float64Array(distinct * p);
  const w = new Float64Array(distinct);
  const wy = new Float64Array(distinct);
  const seen = new Set<number>();
  for (let i = 0; i < n; i++) {
    const g = s.group[i] as number;
    if (!seen.has(g)) {
      seen.add(g);
      for (let j = 0; j < p; j++) design[j * distinct + g] = s.design[j * n + i] as number;
    }
    w[g] = (w[g] as number) + (s.w[i] as number);
    wy[g] = (wy[g] as number) + (s.w[i] as number) * (s.y[i] as number);
  }
  const y = new Float64Array(distinct);
  for (let g = 0; g < distinct; g++) y[g] = (wy[g] as number) / (w[g] as number);
  return { rows: distinct, cols: p, design, y, w };
}

const solve = (s: System, leverage = false) =>
  solveLeastSquares({ rows: s.rows, cols: s.cols, design: s.design, observations: s.y, weights: s.w, leverage });

function expectBitwiseEqual(a: Float64Array, b: Float64Array) {
  expect(a.length).toBe(b.length);
  for (let k = 0; k < a.length; k++) expect(Object.is(a[k], b[k]), `element ${k}: ${a[k]} vs ${b[k]}`).toBe(true);
}

describe('repeated design rows are merged exactly before the factorisation', () => {
  it('256 rows of 16 distinct cubic rows: coefficients and covariance bit for bit those of the 16 merged rows', () => {
    const s = repeatedSystem(256, 4, 16, 11, (g, j) => (g * 3 - 20) ** j);
    const full = solve(s, true);
    const byHand = solve(mergedByHand(s, 16), true);
    expectBitwiseEqual(full.coefficients, byHand.coefficients);
    expectBitwiseEqual(full.covariance, byHand.covariance);
    expect(full.conditionNumber).toBe(byHand.conditionNumber);
    // Each row's leverage is its share of the merged row's: hᵢ = h_g wᵢ / W_g (1e-14 relative, rounding of the share).
    const h = full.leverages as Float64Array;
    const hg = byHand.leverages as Float64Array;
    const W = mergedByHand(s, 16).w;
    for (let i = 0; i < s.rows; i++) {
      const g = s.group[i] as number;
      const want = ((hg[g] as number) * (s.w[i] as number)) / (W[g] as number);
      expect(Math.abs((h[i] as number) - want)).toBeLessThanOrEqual(1e-14 * want);
    }
  });

  it('the smallest list that is merged (64 rows, 16 parameters, 32 distinct rows: exactly half) is merged', () => {
    // 64 rows is the documented lower limit, 4 rows per parameter the second and at most half the rows distinct the
    // third: this list sits on all three.
    const u = seededRandom(3);
    const table = Array.from({ length: 32 * 16 }, () => u() - 0.5);
    const s = repeatedSystem(64, 16, 32, 5, (g, j) => table[g * 16 + j] as number);
    expect(new Set(s.group).size).toBe(32);
    const full = solve(s);
    const byHand = solve(mergedByHand(s, 32));
    expectBitwiseEqual(full.coefficients, byHand.coefficients);
    expectBitwiseEqual(full.covariance, byHand.covariance);
  });

  it('a repeated row whose copies all weigh 0 drops out: finite result, equal to the list without it, leverage 0', () => {
    const s = repeatedSystem(200, 3, 20, 17, (g, j) => (g - 10) ** j);
    const dropped = new Set<number>();
    for (let i = 0; i < s.rows; i++)
      if (s.group[i] === 7) {
        s.w[i] = 0;
        dropped.add(i);
      }
    expect(dropped.size).toBeGreaterThan(3);
    const r = solve(s, true);
    // The same list with those rows removed (200 − k rows, still merged): 1e-12 relative (stated tolerance).
    const keep = [...Array(s.rows).keys()].filter((i) => !dropped.has(i));
    const m = keep.length;
    const design = new Float64Array(m * s.cols);
    for (let j = 0; j < s.cols; j++)
      for (const [k, i] of keep.entries()) design[j * m + k] = s.design[j * s.rows + i] as number;
    const y = Float64Array.from(keep, (i) => s.y[i] as number);
    const w = Float64Array.from(keep, (i) => s.w[i] as number);
    const ref = solveLeastSquares({ rows: m, cols: s.cols, design, observations: y, weights: w, leverage: true });
    for (let j = 0; j < s.cols; j++) {
      const e = ref.coefficients[j] as number;
      expect(Math.abs((r.coefficients[j] as number) - e)).toBeLessThan(1e-12 * Math.abs(e));
    }
    expect(Math.abs(r.chiSquare - ref.chiSquare)).toBeLessThan(1e-10 * ref.chiSquare);
    const h = r.leverages as Float64Array;
    for (const i of dropped) expect(h[i]).toBe(0);
    expect(h.reduce((a, x) => a + x, 0)).toBeCloseTo(s.cols, 10);
  });

  it('every solve is counted once (the counter `npm run bench` reads)', () => {
    const s = repeatedSystem(10, 2, 10, 1, (g, j) => g ** j);
    const before = solveCount.value;
    solve(s);
    solve(s);
    expect(solveCount.value - before).toBe(2);
  });
});

describe('column pivoting picks the column with the largest remaining norm (Businger & Golub 1965)', () => {
  it('c0 = e₁, c1 = (1, 0.1, 0), c2 = (0.3, 1, 0): c2 is pivoted second, so c1 is the one named dependent', () => {
    // After unit scaling all norms are 1 and c0 is pivoted first (ties keep the first). The parts of the columns
    // orthogonal to c0 have norms 0.1/√1.01 = 0.0995 (c1) and 1/√1.09 = 0.958 (c2), worked by hand: c2 comes next,
    // and c1 = 0.97 c0 + 0.1 (0.3, 1, 0) is the column the other two determine. Without the norm downdate the tie
    // would keep c1 and name c2.
    const design = new Float64Array([1, 0, 0, 1, 0.1, 0, 0.3, 1, 0]);
    const r = solveLeastSquares({ rows: 3, cols: 3, design, observations: new Float64Array([1, 2, 0]) });
    expect(r.rank).toBe(2);
    expect(r.dependencies).toHaveLength(1);
    const g = r.dependencies[0] as readonly number[];
    expect(g[0]).toBe(1);
    expect([...g].sort()).toEqual([0, 1, 2]);
  });
});

describe('rows are grouped by their entries, compared exactly', () => {
  it('0 and −0 are the same entry: a straight line through x ∈ {±0, 1, 2, 3} is merged to 4 rows and fits in closed form', () => {
    // 128 rows, columns (1, x), x cycling through 0, 1, 2, 3 with every other 0 written as −0.
    const n = 128;
    const u = seededRandom(7);
    const design = new Float64Array(2 * n);
    const plus = new Float64Array(2 * n);
    const y = new Float64Array(n);
    const w = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const x = i % 4;
      design[i] = 1;
      design[n + i] = x === 0 && i % 8 === 0 ? -0 : x;
      plus[i] = 1;
      plus[n + i] = x;
      y[i] = 2 + 0.5 * x + 0.01 * (u() - 0.5);
      w[i] = 1 + u();
    }
    const counted = solveCount.value;
    const r = solveLeastSquares({ rows: n, cols: 2, design, observations: y, weights: w, leverage: true });
    const r0 = solveLeastSquares({ rows: n, cols: 2, design: plus, observations: y, weights: w, leverage: true });
    expect(solveCount.value - counted).toBe(2);
    // Bit for bit the design written with +0 only: the −0 rows joined the groups of the +0 rows.
    expect([...r.coefficients]).toEqual([...r0.coefficients]);
    expect([...(r.leverages ?? [])]).toEqual([...(r0.leverages ?? [])]);
    // Weighted straight line in closed form: slope = Σw(x−x̄)(y−ȳ) / Σw(x−x̄)², intercept = ȳ − slope·x̄.
    let sw = 0;
    let sx = 0;
    let sy = 0;
    for (let i = 0; i < n; i++) {
      sw += w[i] as number;
      sx += (w[i] as number) * (plus[n + i] as number);
      sy += (w[i] as number) * (y[i] as number);
    }
    const xm = sx / sw;
    const ym = sy / sw;
    let sxy = 0;
    let sxx = 0;
    for (let i = 0; i < n; i++) {
      const dx = (plus[n + i] as number) - xm;
      sxy += (w[i] as number) * dx * ((y[i] as number) - ym);
      sxx += (w[i] as number) * dx * dx;
    }
    const slope = sxy / sxx;
    expect(r.coefficients[1]).toBeCloseTo(slope, 12);
    expect(r.coefficients[0]).toBeCloseTo(ym - slope * xm, 12);
    // Leverages of a straight line: hᵢ = wᵢ (1/Σw + (xᵢ − x̄)² / Σw(x−x̄)²), summing to 2.
    const h0 = (w[0] as number) * (1 / sw + xm ** 2 / sxx);
    expect(r.leverages?.[0]).toBeCloseTo(h0, 12);
  });
});

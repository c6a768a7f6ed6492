/**
 * Gauss–Legendre nodes and weights on [0, 1]. The nodes are the roots of the Legendre polynomial P_n found by
 * Newton's method from the usual cosine estimates, with P_n and P_n′ from the three-term recurrence (Abramowitz &
 * Stegun 25.4.29; Golub & Welsch, Math. Comp. 23, 221 (1969) for the same rule by another route).
 */
export interface QuadratureRule {
  readonly nodes: Float64Array;
  readonly weights: Float64Array;
}

const cache = new Map<number, QuadratureRule>();

export function gaussLegendreUnit(n: number): QuadratureRule {
  const hit = cache.get(n);
  if (hit) return hit;
  if (!Number.isInteger(n) || n < 1 || n > 512) throw new RangeError(`Gauss–Legendre order ${n} outside 1…512`);
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < Math.ceil(n / 2); i++) {
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let iter = 0; iter < 100; iter++) {
      let p0 = 1;
      let p1 = x;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      const pn = n === 1 ? x : p1;
      const pm = n === 1 ? 1 : p0;
      dp = (n * (x * pn - pm)) / (x * x - 1);
      const dx = pn / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-16) break;
    }
    const w = 2 / ((1 - x * x) * dp * dp);
    // Map [−1, 1] → [0, 1]: u = (1 ± x)/2, weight halves.
    nodes[i] = (1 - x) / 2;
    nodes[n - 1 - i] = (1 + x) / 2;
    weights[i] = w / 2;
    weights[n - 1 - i] = w / 2;
  }
  const rule = { nodes, weights };
  cache.set(n, rule);
  return rule;
}

/**
 * Bound levels of the one-dimensional radial equation −C ψ″ + V(r) ψ = E ψ (J = 0, C = ħ²/2μ in cm⁻¹ Å²) on a
 * uniform grid by Numerov's method (B. Numerov, Astron. Nachr. 230, 359 (1927); J. W. Cooley, Math. Comp. 15, 363
 * (1961) for its use on diatomic potentials), with ψ = 0 at both ends of the grid.
 *
 * Each level is found by bisection on the node count of the outward solution: by the Sturm oscillation theorem
 * the number of sign changes equals the number of eigenvalues below the trial energy, so level v is where the count
 * steps from v to v + 1. The wavefunction is then built from an outward and an inward solution joined at the outer
 * classical turning point, and B_v = C ⟨1/r²⟩.
 */
export interface RadialGrid {
  /** First and last grid points, Å (r > 0). */
  readonly from: number;
  readonly to: number;
  /** Grid step, Å. */
  readonly step: number;
}

export interface RadialLevel {
  readonly v: number;
  /** Eigenvalue, cm⁻¹, on the energy scale of V. */
  readonly energy: number;
  /** C ⟨ψ|1/r²|ψ⟩, cm⁻¹. */
  readonly rotational: number;
}

export function solveRadialLevels(
  potential: (r: number) => number,
  hbar2Over2mu: number,
  grid: RadialGrid,
  count: number,
  /** Near guesses of the levels (e.g. those of a slightly different curve): the bisection starts in a bracket of
   *  ±1 cm⁻¹ about each, widened eightfold until it holds, instead of from the bottom of the well to the top. */
  guesses?: readonly number[],
): RadialLevel[] {
  const n = Math.floor((grid.to - grid.from) / grid.step) + 1;
  if (!(grid.from > 0) || n < 10 || n > 2_000_000)
    throw new RangeError('radial grid must start at r > 0 with 10…2e6 points');
  const h = grid.step;
  const r = new Float64Array(n);
  const V = new Float64Array(n);
  let vMin = Number.POSITIVE_INFINITY;
  for (let i = 0; i < n; i++) {
    r[i] = grid.from + i * h;
    V[i] = potential(r[i] as number);
    vMin = Math.min(vMin, V[i] as number);
  }
  const k = (h * h) / (12 * hbar2Over2mu);
  // Numerov's recurrence changes sign (spurious nodes) once k(V − E) passes 1: a steep extrapolated wall is held at
  // vMin + 0.5/k, where k(V − E) ≤ ½ for every E ≥ vMin (for a 6000-point grid ≳ 10⁹ cm⁻¹, deep under any level).
  const wallCap = vMin + 0.5 / k;
  for (let i = 0; i < n; i++) if (!((V[i] as number) <= wallCap)) V[i] = wallCap;
  const vCap = Math.min(V[0] as number, V[n - 1] as number);
  const t = new Float64Array(n);

  const nodesBelow = (E: number): number => {
    for (let i = 0; i < n; i++) t[i] = k * ((V[i] as number) - E);
    let y0 = 0;
    let y1 = 1e-30;
    let nodes = 0;
    for (let i = 1; i < n - 1; i++) {
      let y2 = ((2 + 10 * (t[i] as number)) * y1 - (1 - (t[i - 1] as number)) * y0) / (1 - (t[i + 1] as number));
      if ((y2 < 0 && y1 > 0) || (y2 > 0 && y1 < 0) || y2 === 0) nodes++;
      if (Math.abs(y2) > 1e150) {
        y1 *= 1e-150;
        y2 *= 1e-150;
      }
      y0 = y1;
      y1 = y2;
    }
    return nodes;
  };

  const out: RadialLevel[] = [];
  for (let v = 0; v < count; v++) {
    let lo = v === 0 ? vMin : (out[v - 1] as RadialLevel).energy;
    let hi = vCap;
    if (nodesBelow(hi) <= v) break; // no more bound levels inside the grid
    const guess = guesses?.[v];
    if (guess !== undefined && Number.isFinite(guess) && guess > lo && guess < hi)
      [lo, hi] = bracketNear(guess, lo, hi, v);
    for (let it = 0; it < 200 && hi - lo > 1e-11 * Math.max(1, Math.abs(hi)); it++) {
      const mid = 0.5 * (lo + hi);
      if (nodesBelow(mid) <= v) lo = mid;
      else hi = mid;
    }
    const E = 0.5 * (lo + hi);
    out.push({ v, energy: E, rotational: hbar2Over2mu * inverseSquareMean(E) });
  }
  return out;

  /** [lo, hi] ⊂ [floor, ceiling] about `guess` with nodesBelow(lo) ≤ v < nodesBelow(hi) (floor and ceiling are). */
  function bracketNear(guess: number, floor: number, ceiling: number, v: number): [number, number] {
    let lo = floor;
    let hi = ceiling;
    for (let w = 1; w < ceiling - floor; w *= 8) {
      const a = Math.max(lo, guess - w);
      const b = Math.min(hi, guess + w);
      if (a > lo && nodesBelow(a) > v) hi = a;
      else if (b < hi && nodesBelow(b) <= v) lo = b;
      else return [a, b];
    }
    return [lo, hi];
  }

  function inverseSquareMean(E: number): number {
    for (let i = 0; i < n; i++) t[i] = k * ((V[i] as number) - E);
    let m = n - 2;
    while (m > 1 && (V[m] as number) > E) m--;
    m = Math.min(m + 1, n - 3);
    const psi = new Float64Array(n);
    psi[1] = 1e-30;
    for (let i = 1; i < m + 1; i++) {
      psi[i + 1] =
        ((2 + 10 * (t[i] as number)) * (psi[i] as number) - (1 - (t[i - 1] as number)) * (psi[i - 1] as number)) /
        (1 - (t[i + 1] as number));
      if (Math.abs(psi[i + 1] as number) > 1e150) for (let j = 0; j <= i + 1; j++) psi[j] = (psi[j] as number) * 1e-150;
    }
    const join = psi[m] as number;
    const inward = new Float64Array(n);
    inward[n - 2] = 1e-30;
    for (let i = n - 2; i > m; i--) {
      inward[i - 1] =
        ((2 + 10 * (t[i] as number)) * (inward[i] as number) - (1 - (t[i + 1] as number)) * (inward[i + 1] as number)) /
        (1 - (t[i - 1] as number));
      if (Math.abs(inward[i - 1] as number) > 1e150)
        for (let j = i - 1; j < n; j++) inward[j] = (inward[j] as number) * 1e-150;
    }
    const scale = join / (inward[m] as number);
    let num = 0;
    let den = 0;
    for (let i = 0; i < n; i++) {
      const y = i <= m ? (psi[i] as number) : (inward[i] as number) * scale;
      const ri = r[i] as number;
      num += (y * y) / (ri * ri);
      den += y * y;
    }
    return num / den;
  }
}

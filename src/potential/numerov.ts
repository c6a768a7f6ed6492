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
  const g = numerovGrid(potential, hbar2Over2mu, grid);
  const out: RadialLevel[] = [];
  for (let v = 0; v < count; v++) {
    const floor = v === 0 ? g.vMin : (out[v - 1] as RadialLevel).energy;
    if (nodesBelow(g, g.vCap) <= v) break; // no more bound levels inside the grid
    const E = levelEnergy(g, v, floor, guesses?.[v]);
    out.push({ v, energy: E, rotational: hbar2Over2mu * inverseSquareMean(g, E) });
  }
  return out;
}

/** The potential sampled on the grid, with what Numerov's recurrence needs. */
interface NumerovGrid {
  readonly n: number;
  readonly r: Float64Array;
  /** V(r), with a steep extrapolated wall held at vMin + 0.5/k. */
  readonly V: Float64Array;
  /** h²/(12C). */
  readonly k: number;
  readonly vMin: number;
  /** The lower of V at the two ends: no bound level above it fits inside the grid. */
  readonly vCap: number;
  /** Scratch for k(V − E). */
  readonly t: Float64Array;
}

function numerovGrid(potential: (r: number) => number, hbar2Over2mu: number, grid: RadialGrid): NumerovGrid {
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
  return { n, r, V, k, vMin, vCap, t: new Float64Array(n) };
}

/** k(V − E) at every grid point, into the grid's scratch array. */
function scaledDepth(g: NumerovGrid, E: number): Float64Array {
  const { n, V, k, t } = g;
  for (let i = 0; i < n; i++) t[i] = k * ((V[i] as number) - E);
  return t;
}

/** Sign changes of the outward solution at energy E: the number of levels below E (Sturm). */
function nodesBelow(g: NumerovGrid, E: number): number {
  const { n } = g;
  const t = scaledDepth(g, E);
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
}

/** Level v by bisection on the node count, between `floor` (the level below) and the top of the grid's well. */
function levelEnergy(g: NumerovGrid, v: number, floor: number, guess: number | undefined): number {
  let lo = floor;
  let hi = g.vCap;
  if (guess !== undefined && Number.isFinite(guess) && guess > lo && guess < hi)
    [lo, hi] = bracketNear(g, guess, lo, hi, v);
  for (let it = 0; it < 200 && hi - lo > 1e-11 * Math.max(1, Math.abs(hi)); it++) {
    const mid = 0.5 * (lo + hi);
    if (nodesBelow(g, mid) <= v) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** [lo, hi] ⊂ [floor, ceiling] about `guess` with nodesBelow(lo) ≤ v < nodesBelow(hi) (floor and ceiling are). */
function bracketNear(g: NumerovGrid, guess: number, floor: number, ceiling: number, v: number): [number, number] {
  let lo = floor;
  let hi = ceiling;
  for (let w = 1; w < ceiling - floor; w *= 8) {
    const a = Math.max(lo, guess - w);
    const b = Math.min(hi, guess + w);
    if (a > lo && nodesBelow(g, a) > v) hi = a;
    else if (b < hi && nodesBelow(g, b) <= v) lo = b;
    else return [a, b];
  }
  return [lo, hi];
}

/** ⟨1/r²⟩ of the level at E: outward and inward solutions joined one point beyond the outer turning point. */
function inverseSquareMean(g: NumerovGrid, E: number): number {
  const { n, r, V } = g;
  const t = scaledDepth(g, E);
  let m = n - 2;
  while (m > 1 && (V[m] as number) > E) m--;
  m = Math.min(m + 1, n - 3);
  const psi = outwardSolution(t, m);
  const inward = inwardSolution(t, m);
  const scale = (psi[m] as number) / (inward[m] as number);
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

/** Numerov's recurrence outwards from ψ(r₀) = 0 up to point m + 1, rescaled when it grows past 10¹⁵⁰. */
function outwardSolution(t: Float64Array, m: number): Float64Array {
  const psi = new Float64Array(t.length);
  psi[1] = 1e-30;
  for (let i = 1; i < m + 1; i++) {
    psi[i + 1] =
      ((2 + 10 * (t[i] as number)) * (psi[i] as number) - (1 - (t[i - 1] as number)) * (psi[i - 1] as number)) /
      (1 - (t[i + 1] as number));
    if (Math.abs(psi[i + 1] as number) > 1e150) for (let j = 0; j <= i + 1; j++) psi[j] = (psi[j] as number) * 1e-150;
  }
  return psi;
}

/** Numerov's recurrence inwards from ψ(r_max) = 0 down to point m, rescaled when it grows past 10¹⁵⁰. */
function inwardSolution(t: Float64Array, m: number): Float64Array {
  const n = t.length;
  const inward = new Float64Array(n);
  inward[n - 2] = 1e-30;
  for (let i = n - 2; i > m; i--) {
    inward[i - 1] =
      ((2 + 10 * (t[i] as number)) * (inward[i] as number) - (1 - (t[i + 1] as number)) * (inward[i + 1] as number)) /
      (1 - (t[i - 1] as number));
    if (Math.abs(inward[i - 1] as number) > 1e150)
      for (let j = i - 1; j < n; j++) inward[j] = (inward[j] as number) * 1e-150;
  }
  return inward;
}

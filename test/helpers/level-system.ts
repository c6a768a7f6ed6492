import { seededRandom } from './random.js';

/**
 * A level model of `levels` vibrational levels of one species, each with T (but level 0, the origin of the scale),
 * B, D and H (columns scaled as a fit scales them: J(J+1)ᵏ · 10⁻³ᵏ), and lines of the bands `bands` (upper, lower)
 * for J″ 0 … jMax in P and R; positions from constants of our own choosing plus noise of σ 0.002 (weights 1/σ², every
 * tenth line 4× less certain).
 */
export function levelSystem(bands: readonly (readonly [number, number])[], levels: number, jMax: number, seed: number) {
  const u = seededRandom(seed);
  const per = 4;
  const tCol = (v: number) => (v === 0 ? -1 : v - 1);
  const cols = levels - 1 + per * levels;
  const termCol = (v: number, k: number) => levels - 1 + per * v + k;
  const rowsList: { upper: number; lower: number; ju: number; jl: number }[] = [];
  for (const [upper, lower] of bands)
    for (let jl = 0; jl <= jMax; jl++) {
      rowsList.push({ upper, lower, ju: jl + 1, jl });
      if (jl > 0) rowsList.push({ upper, lower, ju: jl - 1, jl });
    }
  const rows = rowsList.length;
  const design = new Float64Array(rows * cols);
  const y = new Float64Array(rows);
  const w = new Float64Array(rows);
  const term = (v: number, j: number) => {
    const x = j * (j + 1);
    return 2140 * v - 13 * v * v + (1.93 - 0.0175 * v) * x - 6.1e-6 * x * x + 5e-12 * x ** 3;
  };
  rowsList.forEach(({ upper, lower, ju, jl }, i) => {
    if (tCol(upper) >= 0) design[tCol(upper) * rows + i] = 1;
    if (tCol(lower) >= 0) design[tCol(lower) * rows + i] = -1;
    for (let k = 1; k < per; k++) {
      design[termCol(upper, k) * rows + i] = (ju * (ju + 1)) ** k * 1e-3 ** (k - 1);
      const at = termCol(lower, k) * rows + i;
      design[at] = (design[at] as number) - (jl * (jl + 1)) ** k * 1e-3 ** (k - 1);
    }
    const sigma = i % 10 === 0 ? 0.004 : 0.002;
    w[i] = 1 / sigma ** 2;
    y[i] = term(upper, ju) - term(lower, jl) + sigma * (u() + u() + u() - 1.5) * 2;
  });
  // Column k = 0 of each level is unused here (its T is the origin column): drop the all-zero columns.
  const keep: number[] = [];
  for (let j = 0; j < cols; j++) if (design.subarray(j * rows, (j + 1) * rows).some((x) => x !== 0)) keep.push(j);
  const packed = new Float64Array(rows * keep.length);
  keep.forEach((j, c) => {
    packed.set(design.subarray(j * rows, (j + 1) * rows), c * rows);
  });
  return { rows, cols: keep.length, design: packed, y, w };
}

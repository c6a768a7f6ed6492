import { seededNormal } from './random.js';

/**
 * Closed-form line profiles for tests of the peak finder, written here and sharing nothing with src/: Gaussian
 * h·exp(−4 ln2 u²), Lorentzian h/(1 + 4u²), u = (x − c)/w with w the FWHM, and their linear mix (a pseudo-Voigt of
 * Lorentzian share η); areas by the closed forms h·w·√(π/(4 ln 2)) and π·h·w/2; and the Fisher matrix of a fit of
 * such lines with a linear baseline, from the derivatives written out below, for Cramér–Rao bounds.
 */
export interface Line {
  c: number;
  h: number;
  w: number;
  eta: number;
}

export const K_GAUSS = Math.sqrt(Math.PI / (4 * Math.LN2)); // 1.0644670 (area of a unit Gaussian of unit FWHM)
export const area = (l: Line) => l.h * l.w * ((1 - l.eta) * K_GAUSS + (l.eta * Math.PI) / 2);

export function lineAt(l: Line, x: number): number {
  const u = (x - l.c) / l.w;
  return l.h * ((1 - l.eta) * Math.exp(-4 * Math.LN2 * u * u) + l.eta / (1 + 4 * u * u));
}

/** x from `from` in `n` steps; absorbance = lines + a0 + a1 (x − from) + seeded white noise σ. */
export function makeSpectrum(
  lines: Line[],
  opts: { from: number; step: number; n: number; sigma: number; seed: number; a0?: number; a1?: number },
) {
  const z = seededNormal(opts.seed);
  const x = Array.from({ length: opts.n }, (_, i) => opts.from + i * opts.step);
  const y = x.map(
    (v) =>
      (opts.a0 ?? 0) +
      (opts.a1 ?? 0) * (v - opts.from) +
      lines.reduce((s, l) => s + lineAt(l, v), 0) +
      opts.sigma * z(),
  );
  return { x, y };
}

/**
 * Cramér–Rao standard deviations of (c, h, w[, η]) of one line fitted with a local linear baseline a + b(x − x0)
 * over the points within ±2 FWHM of the line (the finder's window reaches 4 half widths out), white noise σ:
 * the square roots of the diagonal of (JᵀJ/σ²)⁻¹, J the derivatives of the model at the true values.
 *   ∂/∂c = h[(1−η)·8ln2·u·G + η·8u·L²]/w,  ∂/∂h = (1−η)G + ηL,  ∂/∂w = h[(1−η)·8ln2·u²·G + η·8u²·L²]/w,
 *   ∂/∂η = h(L − G),  ∂/∂a = 1,  ∂/∂b = x − x0;  G = exp(−4 ln2 u²), L = 1/(1 + 4u²).
 */
export function cramerRao(l: Line, x: readonly number[], sigma: number, freeEta: boolean) {
  const pts = x.filter((v) => Math.abs(v - l.c) <= 2 * l.w);
  const x0 = pts[0] as number;
  const rows = pts.map((v) => {
    const u = (v - l.c) / l.w;
    const G = Math.exp(-4 * Math.LN2 * u * u);
    const L = 1 / (1 + 4 * u * u);
    const r = [
      (l.h * ((1 - l.eta) * 8 * Math.LN2 * u * G + l.eta * 8 * u * L * L)) / l.w,
      (1 - l.eta) * G + l.eta * L,
      (l.h * ((1 - l.eta) * 8 * Math.LN2 * u * u * G + l.eta * 8 * u * u * L * L)) / l.w,
    ];
    if (freeEta) r.push(l.h * (L - G));
    r.push(1, v - x0);
    return r;
  });
  const q = (rows[0] as number[]).length;
  // Augmented [F | I], Gauss–Jordan with partial pivoting.
  const a = Array.from({ length: q }, (_, i) => [
    ...Array.from(
      { length: q },
      (_, j) => rows.reduce((s, r) => s + (r[i] as number) * (r[j] as number), 0) / sigma ** 2,
    ),
    ...Array.from({ length: q }, (_, j) => (i === j ? 1 : 0)),
  ]);
  for (let col = 0; col < q; col++) {
    let piv = col;
    for (let i = col + 1; i < q; i++) if (Math.abs(a[i]?.[col] as number) > Math.abs(a[piv]?.[col] as number)) piv = i;
    [a[col], a[piv]] = [a[piv] as number[], a[col] as number[]];
    const p = a[col] as number[];
    const d = p[col] as number;
    for (let j = 0; j < 2 * q; j++) p[j] = (p[j] as number) / d;
    for (let i = 0; i < q; i++) {
      if (i === col) continue;
      const row = a[i] as number[];
      const f = row[col] as number;
      for (let j = 0; j < 2 * q; j++) row[j] = (row[j] as number) - f * (p[j] as number);
    }
  }
  const sd = (k: number) => Math.sqrt((a[k] as number[])[q + k] as number);
  return { c: sd(0), h: sd(1), w: sd(2), eta: freeEta ? sd(3) : 0 };
}

/**
 * (JᵀJ)⁻¹ per unit noise variance for several lines sharing η, with a linear baseline a + b(x − x0) over exactly the
 * points given (x0 the first): the same derivatives as above, summed for η. Returns the variance of each centre.
 */
export function centreVariances(lines: readonly Line[], pts: readonly number[], freeEta: boolean): number[] {
  const x0 = pts[0] as number;
  const rows = pts.map((v) => {
    const r: number[] = [];
    let dEta = 0;
    for (const l of lines) {
      const u = (v - l.c) / l.w;
      const G = Math.exp(-4 * Math.LN2 * u * u);
      const L = 1 / (1 + 4 * u * u);
      r.push(
        (l.h * ((1 - l.eta) * 8 * Math.LN2 * u * G + l.eta * 8 * u * L * L)) / l.w,
        (1 - l.eta) * G + l.eta * L,
        (l.h * ((1 - l.eta) * 8 * Math.LN2 * u * u * G + l.eta * 8 * u * u * L * L)) / l.w,
      );
      dEta += l.h * (L - G);
    }
    if (freeEta) r.push(dEta);
    r.push(1, v - x0);
    return r;
  });
  const inv = invert(rows);
  return lines.map((_, k) => (inv[3 * k] as number[])[3 * k] as number);
}

/** (RᵀR)⁻¹ by Gauss–Jordan with partial pivoting. */
export function invert(rows: readonly number[][]): number[][] {
  const q = (rows[0] as number[]).length;
  const a = Array.from({ length: q }, (_, i) => [
    ...Array.from({ length: q }, (_, j) => rows.reduce((s, r) => s + (r[i] as number) * (r[j] as number), 0)),
    ...Array.from({ length: q }, (_, j) => (i === j ? 1 : 0)),
  ]);
  for (let col = 0; col < q; col++) {
    let piv = col;
    for (let i = col + 1; i < q; i++) if (Math.abs(a[i]?.[col] as number) > Math.abs(a[piv]?.[col] as number)) piv = i;
    [a[col], a[piv]] = [a[piv] as number[], a[col] as number[]];
    const p = a[col] as number[];
    const d = p[col] as number;
    for (let j = 0; j < 2 * q; j++) p[j] = (p[j] as number) / d;
    for (let i = 0; i < q; i++) {
      if (i === col) continue;
      const row = a[i] as number[];
      const f = row[col] as number;
      for (let j = 0; j < 2 * q; j++) row[j] = (row[j] as number) - f * (p[j] as number);
    }
  }
  return a.map((r) => r.slice(q));
}

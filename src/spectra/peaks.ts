import { ScienceError } from '../errors.js';
import { solveLeastSquares } from '../linalg/least-squares.js';

/**
 * Peak finding in an absorption spectrum: transmittance to absorbance, a piecewise-linear baseline through
 * low percentiles of long segments, the noise from the median absolute deviation of first differences, candidate
 * peaks from local maxima and from minima of the smoothed second derivative (shoulders of blends), then a
 * Levenberg–Marquardt fit of pseudo-Voigt profiles (Gaussian, Lorentzian or both; P. Thompson, D. E. Cox and
 * J. B. Hastings, J. Appl. Cryst. 20, 79 (1987)) with a local linear baseline, blended lines fitted together.
 * Position uncertainties come from the fit's covariance scaled by the measured noise.
 */

export type LineShape = 'gaussian' | 'lorentzian' | 'voigt';

export interface PeakOptions {
  readonly yUnit?: 'absorbance' | 'transmittance';
  /** Detection threshold in noise standard deviations. Default 6. */
  readonly threshold?: number;
  /** Default 'voigt' (pseudo-Voigt with a free Lorentzian share). */
  readonly shape?: LineShape;
  /** Most peaks returned (the strongest). Default 20 000. */
  readonly maxPeaks?: number;
}

export interface Peak {
  /** cm⁻¹ (the x unit of the input). */
  readonly position: number;
  readonly uncertainty: number;
  /** Integrated absorbance (area), a linear intensity scale. */
  readonly intensity: number;
  /** Peak absorbance above the baseline. */
  readonly height: number;
  /** Full width at half maximum. */
  readonly width: number;
  /** Lorentzian share of the pseudo-Voigt (0 Gaussian, 1 Lorentzian). */
  readonly lorentzianFraction: number;
}

export interface PeakResult {
  readonly peaks: Peak[];
  /** Noise standard deviation of the absorbance. */
  readonly noise: number;
  readonly points: number;
  /** Sampling step (median). */
  readonly step: number;
}

const LN2x4 = 4 * Math.LN2;

function pv(x: number, c: number, h: number, w: number, eta: number): number {
  const u = (x - c) / w;
  return h * ((1 - eta) * Math.exp(-LN2x4 * u * u) + eta / (1 + 4 * u * u));
}

/** Area of a pseudo-Voigt of height h and FWHM w. */
function pvArea(h: number, w: number, eta: number): number {
  return h * w * ((1 - eta) * Math.sqrt(Math.PI / LN2x4) + (eta * Math.PI) / 2);
}

function quantile(values: Float64Array, q: number): number {
  const s = Float64Array.from(values).sort();
  const k = Math.min(s.length - 1, Math.max(0, Math.floor(q * (s.length - 1))));
  return s[k] as number;
}

export function findPeaks(xIn: ArrayLike<number>, yIn: ArrayLike<number>, options: PeakOptions = {}): PeakResult {
  const n = xIn.length;
  if (n !== yIn.length) throw new ScienceError('INPUT_INVALID', `x has ${n} points but y has ${yIn.length}`, {});
  if (n < 7) throw new ScienceError('INPUT_INVALID', `a spectrum needs at least 7 points, not ${n}`, {});
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(xIn[i] as number) || !Number.isFinite(yIn[i] as number)) {
      throw new ScienceError('INPUT_INVALID', `point ${i} is not a finite number`, { point: i });
    }
  }
  // Increasing x.
  const reversed = (xIn[n - 1] as number) < (xIn[0] as number);
  const x = new Float64Array(n);
  const a = new Float64Array(n);
  let maxY = Number.NEGATIVE_INFINITY;
  for (let i = 0; i < n; i++) maxY = Math.max(maxY, yIn[i] as number);
  const percent = options.yUnit === 'transmittance' && maxY > 1.5;
  for (let i = 0; i < n; i++) {
    const k = reversed ? n - 1 - i : i;
    x[i] = xIn[k] as number;
    const y = yIn[k] as number;
    a[i] = options.yUnit === 'transmittance' ? -Math.log10(Math.max(percent ? y / 100 : y, 1e-6)) : y;
  }
  for (let i = 1; i < n; i++) {
    if (!((x[i] as number) > (x[i - 1] as number))) {
      throw new ScienceError(
        'INPUT_INVALID',
        `x must be strictly monotonic; it is not at point ${reversed ? n - 1 - i : i}`,
        { point: i },
      );
    }
  }
  const steps = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) steps[i - 1] = (x[i] as number) - (x[i - 1] as number);
  const step = quantile(steps, 0.5);

  // Baseline: the 20th percentile of segments, joined by straight lines.
  const seg = Math.max(64, Math.round(n / 100));
  const centres: number[] = [];
  const levels: number[] = [];
  for (let s = 0; s < n; s += seg) {
    const e = Math.min(n, s + seg);
    centres.push(0.5 * ((x[s] as number) + (x[e - 1] as number)));
    levels.push(quantile(a.subarray(s, e), 0.2));
  }
  const r = new Float64Array(n);
  let ci = 0;
  for (let i = 0; i < n; i++) {
    const xi = x[i] as number;
    while (ci + 1 < centres.length - 1 && (centres[ci + 1] as number) < xi) ci++;
    let base: number;
    if (centres.length === 1) base = levels[0] as number;
    else {
      const x0 = centres[ci] as number;
      const x1 = centres[ci + 1] as number;
      const t = (xi - x0) / (x1 - x0);
      base = (levels[ci] as number) + t * ((levels[ci + 1] as number) - (levels[ci] as number));
    }
    r[i] = (a[i] as number) - base;
  }
  // Noise, first estimate: 1.4826 · MAD of first differences / √2 in segments of 32 points, the 25th percentile
  // of the segments (lines raise the others). The final figure comes from the fit residuals below.
  const d = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) d[i - 1] = (r[i] as number) - (r[i - 1] as number);
  const segNoise: number[] = [];
  for (let s0 = 0; s0 + 8 <= d.length; s0 += 32) {
    const part = d.slice(s0, Math.min(d.length, s0 + 32));
    const med = quantile(part, 0.5);
    for (let i = 0; i < part.length; i++) part[i] = Math.abs((part[i] as number) - med);
    segNoise.push((1.4826 * quantile(part, 0.5)) / Math.SQRT2);
  }
  const noise0 = Math.max(segNoise.length > 0 ? quantile(Float64Array.from(segNoise), 0.25) : 0, 1e-12);

  // Candidates: local maxima above the threshold. Shoulders of blends are found later, in the fit residuals.
  const thr = (options.threshold ?? 6) * noise0;
  const halfWidthAt = (i: number) => {
    const h = (r[i] as number) / 2;
    let lo = i;
    while (lo > 0 && (r[lo] as number) > h && i - lo < 200) lo--;
    let hi = i;
    while (hi < n - 1 && (r[hi] as number) > h && hi - i < 200) hi++;
    return Math.max(1, 0.5 * (hi - lo));
  };
  const cand: number[] = [];
  for (let i = 1; i < n - 1; i++) {
    const v = r[i] as number;
    if (!(v >= thr && v >= (r[i - 1] as number) && v > (r[i + 1] as number))) continue;
    // Noise splits the top of a line into several maxima: within one half-width, only the highest counts.
    const last = cand[cand.length - 1];
    if (last !== undefined && i - last <= halfWidthAt(last)) {
      if (v > (r[last] as number)) cand[cand.length - 1] = i;
      continue;
    }
    cand.push(i);
  }

  // Width estimate per candidate: half-height crossings, in samples.
  const halfWidth = cand.map(halfWidthAt);

  // Group candidates that overlap (closer than 3 half-widths) and fit each group.
  const fitted: FittedProfile[] = [];
  let rss = 0;
  let dof = 0;
  const shape = options.shape ?? 'voigt';
  let g = 0;
  while (g < cand.length) {
    let e = g;
    while (
      e + 1 < cand.length &&
      (cand[e + 1] as number) - (cand[e] as number) < 3 * Math.max(halfWidth[e] as number, halfWidth[e + 1] as number)
    )
      e++;
    let members = cand.slice(g, e + 1);
    let widths = halfWidth.slice(g, e + 1);
    const hw = Math.max(...widths);
    // The window reaches 4 half-widths out, but never past half-way to the next candidate outside the group.
    const prev = g > 0 ? (cand[g - 1] as number) : Number.NEGATIVE_INFINITY;
    const next = e + 1 < cand.length ? (cand[e + 1] as number) : Number.POSITIVE_INFINITY;
    const first = members[0] as number;
    const last = members[members.length - 1] as number;
    const lo = Math.max(0, Math.floor(first - 4 * hw), Math.ceil(0.5 * (prev + first)));
    const hi = Math.min(n - 1, Math.ceil(last + 4 * hw), Math.floor(0.5 * (last + next)));
    // Fit; while a profile comes out weaker than the threshold or on top of another, drop it and fit again.
    let f = fitGroup(x, r, lo, hi, members, widths, step, shape);
    for (;;) {
      // A member whose profile left the window or went negative is dropped first, then the weakest duplicate.
      let weak = f.profiles.findIndex((p) => !p.valid);
      if (weak < 0) {
        weak = f.profiles.findIndex(
          (p, k) =>
            p.height < thr ||
            f.profiles.some(
              (q, k2) =>
                k2 !== k &&
                Math.abs(q.position - p.position) < 0.25 * Math.min(p.width, q.width) &&
                q.height >= p.height,
            ),
        );
      }
      if (weak < 0 || members.length === 1) break;
      members = members.filter((_, k) => k !== weak);
      widths = widths.filter((_, k) => k !== weak);
      f = fitGroup(x, r, lo, hi, members, widths, step, shape);
    }
    // Blends: where the residual keeps a peak above the threshold, add a profile there, and keep it when the fit
    // improves by more than 25 noise variances per half-width and by 30 %, and the new profile is at least a tenth
    // of the tallest (a pseudo-Voigt's small misfit to a true line shape must not grow phantom lines). One addition
    // per group: a second one mostly fits line-shape misfit.
    for (let add = 0; add < 1 && f.profiles.every((p) => p.valid); add++) {
      let best = -1;
      // The pseudo-Voigt misses a true Voigt by about 1 % of its height (Thompson, Cox & Hastings): a residual
      // below 5 % of the tallest profile is line-shape misfit, not a line.
      let bestRes = Math.max(thr, 0.05 * Math.max(...f.profiles.map((p) => p.height)));
      for (let i = lo; i <= hi; i++) {
        const res = (r[i] as number) - f.model(x[i] as number);
        if (res > bestRes) {
          bestRes = res;
          best = i;
        }
      }
      if (best < 0) break;
      const trialMembers = [...members, best].sort((a, b) => a - b);
      const trialWidths = trialMembers.map((m) => widths[members.indexOf(m)] ?? Math.max(...widths));
      const t = fitGroup(x, r, lo, hi, trialMembers, trialWidths, step, shape);
      const tallest = Math.max(...t.profiles.map((p) => p.height));
      const ok =
        t.profiles.every((p) => p.valid && p.height >= Math.max(thr, 0.1 * tallest)) &&
        f.rss - t.rss > Math.max(25 * noise0 * noise0 * Math.max(1, hw), 0.3 * f.rss);
      if (!ok) break;
      members = trialMembers;
      widths = trialWidths;
      f = t;
    }
    fitted.push(...f.profiles.filter((p) => p.valid && p.height >= thr));
    rss += f.rss;
    dof += f.dof;
    g = e + 1;
  }
  // Final noise from the pooled fit residuals (a-posteriori), which also scales every position uncertainty.
  const noise = dof > 0 ? Math.sqrt(rss / dof) : noise0;
  // Profiles far wider or narrower than the typical line are baseline structure or noise, not lines.
  const medianWidth =
    fitted.length > 0
      ? quantile(
          Float64Array.from(fitted, (p) => p.width),
          0.5,
        )
      : 0;
  // So are profiles that sit on the ends of the spectrum, where the baseline is least known.
  const x0 = x[0] as number;
  const x1 = x[n - 1] as number;
  const lines = fitted.filter(
    (p) =>
      (fitted.length < 5 || (p.width <= 4 * medianWidth && p.width >= 0.25 * medianWidth)) &&
      p.position - x0 > 0.5 * p.width &&
      x1 - p.position > 0.5 * p.width,
  );
  const peaks: Peak[] = lines.map((p) => ({
    position: p.position,
    uncertainty: Number.isFinite(p.varianceUnit) ? Math.sqrt(p.varianceUnit) * noise : step,
    intensity: p.intensity,
    height: p.height,
    width: p.width,
    lorentzianFraction: p.lorentzianFraction,
  }));
  peaks.sort((p, q) => p.position - q.position);
  const max = options.maxPeaks ?? 20_000;
  const kept =
    peaks.length > max
      ? [...peaks]
          .sort((p, q) => q.height - p.height)
          .slice(0, max)
          .sort((p, q) => p.position - q.position)
      : peaks;
  return { peaks: kept, noise, points: n, step };
}

interface FittedProfile {
  /** False when the profile left its window, or its height or width is not positive. */
  valid: boolean;
  position: number;
  /** Variance of the position per unit noise variance, (JᵀJ)⁻¹ at the centre. */
  varianceUnit: number;
  intensity: number;
  height: number;
  width: number;
  lorentzianFraction: number;
}

/**
 * Levenberg–Marquardt fit of m pseudo-Voigt profiles plus a linear baseline to r[lo..hi]. Parameters: per peak
 * centre, height, FWHM; one shared Lorentzian share η (fixed for Gaussian or Lorentzian shapes); baseline a, b.
 */
function fitGroup(
  x: Float64Array,
  r: Float64Array,
  lo: number,
  hi: number,
  members: readonly number[],
  halfWidths: readonly number[],
  step: number,
  shape: LineShape,
): { profiles: FittedProfile[]; rss: number; dof: number; model: (x: number) => number } {
  const m = members.length;
  const npts = hi - lo + 1;
  const freeEta = shape === 'voigt';
  const p0: number[] = [];
  members.forEach((i, k) => {
    p0.push(x[i] as number, r[i] as number, Math.max(2 * (halfWidths[k] as number) * step, step));
  });
  const etaIndex = p0.length;
  p0.push(shape === 'lorentzian' ? 1 : shape === 'gaussian' ? 0 : 0.5);
  const baseIndex = p0.length;
  p0.push(0, 0);
  const x0 = x[lo] as number;
  const np = p0.length;
  const free = p0.map((_, j) => j !== etaIndex || freeEta);
  const model = (p: readonly number[], xi: number) => {
    let v = (p[baseIndex] as number) + (p[baseIndex + 1] as number) * (xi - x0);
    const eta = Math.min(1, Math.max(0, p[etaIndex] as number));
    for (let k = 0; k < m; k++)
      v += pv(xi, p[3 * k] as number, p[3 * k + 1] as number, Math.abs(p[3 * k + 2] as number), eta);
    return v;
  };
  const chi = (p: readonly number[]) => {
    let s = 0;
    for (let i = lo; i <= hi; i++) s += ((r[i] as number) - model(p, x[i] as number)) ** 2;
    return s;
  };
  let p = [...p0];
  let lambda = 1e-3;
  let current = chi(p);
  const freeIdx = free.flatMap((f, j) => (f ? [j] : []));
  const q = freeIdx.length;
  if (npts <= q) {
    // Too few points in the window to fit these profiles: nothing comes of it.
    return { profiles: [], rss: 0, dof: 0, model: () => 0 };
  }
  let jac = new Float64Array(0);
  for (let iter = 0; iter < 60; iter++) {
    // Analytic Jacobian of the pseudo-Voigt sum and the baseline, column-major over the free parameters.
    jac = new Float64Array(npts * q);
    const res = new Float64Array(npts);
    const col = new Int32Array(np).fill(-1);
    freeIdx.forEach((j, c) => {
      col[j] = c;
    });
    const eta = Math.min(1, Math.max(0, p[etaIndex] as number));
    for (let i = 0; i < npts; i++) {
      const xi = x[lo + i] as number;
      let v = (p[baseIndex] as number) + (p[baseIndex + 1] as number) * (xi - x0);
      let dEta = 0;
      for (let k = 0; k < m; k++) {
        const c = p[3 * k] as number;
        const h = p[3 * k + 1] as number;
        const w = Math.abs(p[3 * k + 2] as number);
        const u = (xi - c) / w;
        const G = Math.exp(-LN2x4 * u * u);
        const L = 1 / (1 + 4 * u * u);
        const shapeValue = (1 - eta) * G + eta * L;
        v += h * shapeValue;
        const dShapeDu = -(1 - eta) * 2 * LN2x4 * u * G - eta * 8 * u * L * L;
        jac[(col[3 * k] as number) * npts + i] = (-h * dShapeDu) / w;
        jac[(col[3 * k + 1] as number) * npts + i] = shapeValue;
        jac[(col[3 * k + 2] as number) * npts + i] = (-h * dShapeDu * u) / w;
        dEta += h * (L - G);
      }
      if ((col[etaIndex] as number) >= 0) jac[(col[etaIndex] as number) * npts + i] = dEta;
      jac[(col[baseIndex] as number) * npts + i] = 1;
      jac[(col[baseIndex + 1] as number) * npts + i] = xi - x0;
      res[i] = (r[lo + i] as number) - v;
    }
    // Damped step: augment J with √λ·diag(‖J_c‖) rows (Marquardt's scaling).
    const aug = new Float64Array((npts + q) * q);
    const rhs = new Float64Array(npts + q);
    rhs.set(res);
    for (let c = 0; c < q; c++) {
      let nrm = 0;
      for (let i = 0; i < npts; i++) {
        const v = jac[c * npts + i] as number;
        aug[c * (npts + q) + i] = v;
        nrm += v * v;
      }
      aug[c * (npts + q) + npts + c] = Math.sqrt(lambda * Math.max(nrm, 1e-300));
    }
    const sol = solveLeastSquares({
      rows: npts + q,
      cols: q,
      design: aug,
      observations: rhs,
      rankTolerance: 1e-13,
      conditionNumber: false,
    });
    if (sol.rankDeficient) break;
    const trial = [...p];
    freeIdx.forEach((j, c) => {
      trial[j] = (p[j] as number) + (sol.coefficients[c] as number);
    });
    // A step that throws a profile out of its window or below a third of a sample wide is refused like a worse one.
    let inside = true;
    for (let k = 0; k < m; k++) {
      const c = trial[3 * k] as number;
      const w = Math.abs(trial[3 * k + 2] as number);
      if (c < (x[lo] as number) || c > (x[hi] as number) || w < 0.3 * step || w > (x[hi] as number) - (x[lo] as number))
        inside = false;
    }
    const next = inside ? chi(trial) : Number.POSITIVE_INFINITY;
    if (next < current) {
      const improvement = (current - next) / Math.max(current, 1e-300);
      p = trial;
      current = next;
      lambda = Math.max(lambda / 10, 1e-12);
      if (improvement < 1e-8) break;
    } else {
      lambda *= 10;
      if (lambda > 1e8) break;
    }
  }
  // (JᵀJ)⁻¹ per unit noise variance; scaled by the pooled noise by the caller.
  const cov = solveLeastSquares({
    rows: npts,
    cols: q,
    design: jac,
    observations: new Float64Array(npts),
    conditionNumber: false,
  });
  const eta = Math.min(1, Math.max(0, p[etaIndex] as number));
  const profiles: FittedProfile[] = [];
  for (let k = 0; k < m; k++) {
    const c = p[3 * k] as number;
    const h = p[3 * k + 1] as number;
    const w = Math.abs(p[3 * k + 2] as number);
    const ci = freeIdx.indexOf(3 * k);
    profiles.push({
      valid: h > 0 && c >= (x[lo] as number) && c <= (x[hi] as number) && w >= 0.3 * step,
      position: c,
      varianceUnit: cov.rankDeficient ? Number.NaN : (cov.covariance[ci * q + ci] as number),
      intensity: pvArea(h, w, eta),
      height: h,
      width: w,
      lorentzianFraction: eta,
    });
  }
  const final = [...p];
  return { profiles, rss: current, dof: Math.max(0, npts - q), model: (xi: number) => model(final, xi) };
}

import { type Quantity, quantity } from '../derive/quantity.js';
import { ScienceError } from '../errors.js';
import {
  type DetailedFit,
  type FitOptions,
  fitLineListDetailed,
  type LineInput,
  type Warning,
} from '../fit/fit-lines.js';
import { solveLeastSquares } from '../linalg/least-squares.js';
import { formatBand, type Transition, transitionKey, transitionLabel } from '../models/transitions.js';
import type { Isotopologue } from '../species/parse.js';
import type { MassValue } from '../species/reduced-mass.js';
import { type CandidateLine, type CandidateOptions, candidateLines } from './candidates.js';
import { type Competition, matchLines, type ObservedPeak, type Prediction } from './match.js';
import { estimateOffset, median } from './offset.js';

/**
 * Automatic assignment of a line list against the reference library (SCIENCE.md §6): predict every plausible band
 * and isotopologue in the observed window; estimate the instrument's offset by voting; match one-to-one within
 * tolerances; fit; re-predict from the fitted levels and grow outwards in J a few lines at a time; withdraw what
 * the fit rejects and bands too thin to be real; estimate offset and scale against the reference positions.
 * Lines that nothing explains stay unassigned and never enter the fit.
 */

export interface PeakInput {
  /** cm⁻¹. */
  readonly position: number;
  readonly uncertainty?: number;
  readonly intensity?: number;
  /** A given assignment anchors the automatic ones. */
  readonly assignment?: Transition & { readonly source: 'given' | 'auto' };
}

export interface AssignOptions extends CandidateOptions {
  /** Largest instrument offset searched, cm⁻¹. Default 0.5. */
  readonly maxOffset?: number;
  /** Fewest automatically assigned lines a band needs to be kept. Default 4. */
  readonly minLinesPerBand?: number;
  readonly fit?: FitOptions;
}

export interface Calibration {
  /** Observed − reference at the band centre. */
  readonly offset: Quantity;
  /** Relative scale error (observed = reference × (1 + scale) + …), when the span allows. */
  readonly scale?: Quantity;
  readonly centre: number;
  readonly lines: number;
  readonly reference: string;
}

export interface BandSummary {
  readonly species: string;
  readonly band: string;
  readonly predicted: number;
  readonly matched: number;
}

export interface AssignResult {
  readonly fit: DetailedFit;
  readonly lines: readonly LineInput[];
  /** Why a line is unassigned or how a competition was decided, by line index. */
  readonly notes: ReadonlyMap<number, string>;
  readonly calibration?: Calibration;
  readonly bands: readonly BandSummary[];
  readonly unexplained: readonly number[];
  readonly warnings: readonly Warning[];
}

const bandKey = (c: { species: string; band: { upper: number; lower: number } }) =>
  `${c.species}|${formatBand(c.band)}`;
/** Lines the reference constants predict reliably enough to start from, before any fit (J″ ≤ this). */
const START_J = 12;
/** How far past the highest matched J a fitted band may reach in one step (at least; half the reach beyond). */
const GROWTH_J = 3;

export function assignAndFit(
  peaks: readonly PeakInput[],
  species: readonly { iso: Isotopologue; abundance: number }[],
  masses: ReadonlyMap<string, MassValue>,
  options: AssignOptions = {},
): AssignResult {
  const warnings: Warning[] = [];
  const notes = new Map<number, string>();
  const positions = peaks.map((p) => p.position);
  const lo = Math.min(...positions) - 1;
  const hi = Math.max(...positions) + 1;
  const cands = candidateLines(species, lo, hi, options);
  const given = peaks.flatMap((p, index) => (p.assignment ? [{ index, t: p.assignment }] : []));
  const givenKeys = new Set(given.map((g) => transitionKey(g.t)));
  const free: ObservedPeak[] = peaks.flatMap((p, index) =>
    p.assignment
      ? []
      : [{ index, position: p.position, ...(p.intensity !== undefined ? { intensity: p.intensity } : {}) }],
  );
  const sigmas = peaks.filter((p) => p.uncertainty !== undefined).map((p) => p.uncertainty as number);
  const typicalSigma = sigmas.length > 0 ? median(sigmas) : 0.005;

  const lineInputs = (auto: ReadonlyMap<number, CandidateLine>): LineInput[] =>
    peaks.map((p, index) => {
      const base = {
        position: p.position,
        ...(p.uncertainty !== undefined ? { uncertainty: p.uncertainty } : {}),
        ...(p.intensity !== undefined ? { intensity: p.intensity } : {}),
      };
      if (p.assignment) return { ...base, assignment: p.assignment };
      const c = auto.get(index);
      if (!c) return base;
      return {
        ...base,
        assignment: { species: c.species, band: c.band, branch: c.branch, j: c.j, source: 'auto' as const },
      };
    });

  if (cands.length === 0) {
    warnings.push({
      code: 'NO_BAND_IN_WINDOW',
      message: `no band of ${species.map((s) => s.iso.formula).join(', ')} is predicted between ${lo.toFixed(1)} and ${hi.toFixed(1)} cm-1`,
    });
    return finish(new Map());
  }

  // Offset by voting of the strongest predictions against the free peaks.
  const strong = [...cands]
    .sort((a, b) => b.intensity - a.intensity)
    .filter((c) => c.j <= START_J)
    .slice(0, 80);
  const maxOffset = options.maxOffset ?? 0.5;
  const est = estimateOffset(
    strong,
    free.map((p) => p.position),
    maxOffset,
    0.06,
  );
  const offset = est?.offset ?? 0;
  const tolRef = Math.min(Math.max(4 * (est?.spread ?? 0.05), 0.03), 0.3);
  if (est && est.runnerUpVotes > 0.7 * est.votes) {
    warnings.push({
      code: 'OFFSET_AMBIGUOUS',
      message: `the instrument offset is ambiguous: a second value explains nearly as many lines as ${offset.toFixed(3)} cm-1`,
    });
  }

  const banned = new Set<string>();
  let auto = new Map<number, CandidateLine>();
  let detailed: DetailedFit | undefined;
  let competitions: Competition[] = [];
  for (let iter = 0; iter < 40; iter++) {
    const reach = new Map<string, number>();
    for (const c of auto.values()) reach.set(bandKey(c), Math.max(reach.get(bandKey(c)) ?? 0, c.j));
    for (const g of given) reach.set(bandKey(g.t), Math.max(reach.get(bandKey(g.t)) ?? 0, g.t.j));
    const scale = intensityScales(auto, peaks);
    const preds: Prediction[] = [];
    const byKey = new Map<string, CandidateLine>();
    for (const c of cands) {
      const key = transitionKey(c);
      if (givenKeys.has(key)) continue;
      const bk = bandKey(c);
      const r = reach.get(bk);
      const fitted = detailed?.predict(c);
      let position: number;
      let tolerance: number;
      if (fitted && r !== undefined) {
        if (c.j > r + Math.max(GROWTH_J, Math.floor(r / 2))) continue;
        position = fitted.value;
        tolerance = 5 * Math.sqrt(fitted.variance + (detailed?.scale ?? 1) * typicalSigma * typicalSigma) + 1e-4;
      } else {
        if (c.j > (r ?? START_J) + GROWTH_J) continue;
        position = c.position + offset;
        tolerance = tolRef * (1 + (c.j / 20) ** 2);
      }
      const k = scale.get(bk);
      byKey.set(key, c);
      preds.push({ key, position, tolerance, ...(k !== undefined ? { intensity: k * c.intensity } : {}) });
    }
    const m = matchLines(preds, free);
    const next = new Map<number, CandidateLine>();
    for (const x of m.matches) {
      if (banned.has(`${x.peak.index}|${x.prediction.key}`)) continue;
      next.set(x.peak.index, byKey.get(x.prediction.key) as CandidateLine);
    }
    competitions = m.competitions;
    pruneThinBands(next, options.minLinesPerBand ?? 4);
    if (next.size === 0 && given.length === 0) break;
    const fit = tryFit(lineInputs(next));
    if (!fit) break;
    // Auto-assigned lines the fit rejects are withdrawn for good (a chance coincidence or a blend).
    let withdrawn = 0;
    for (const l of fit.result.lines) {
      const c = next.get(l.index);
      if (c && l.status === 'rejected') {
        banned.add(`${l.index}|${transitionKey(c)}`);
        next.delete(l.index);
        notes.set(
          l.index,
          `automatic assignment to ${transitionLabel(c)} withdrawn: ${l.reason ?? 'rejected by the fit'}`,
        );
        withdrawn++;
      }
    }
    const same = withdrawn === 0 && sameAssignments(auto, next);
    auto = next;
    detailed = withdrawn > 0 ? (tryFit(lineInputs(auto)) ?? fit) : fit;
    if (same) break;
  }
  for (const c of competitions) {
    if (auto.has(c.peak)) continue;
    const winner = auto.get(c.winner);
    if (winner)
      notes.set(
        c.peak,
        `competed with line ${c.winner} for ${transitionLabel(winner)}; residual and intensity decided for line ${c.winner}`,
      );
  }
  return finish(auto, detailed);

  function tryFit(lines: LineInput[]): DetailedFit | undefined {
    try {
      return fitLineListDetailed(lines, masses, { ...(options.fit ?? {}), levelsOnly: true });
    } catch (e) {
      if (
        e instanceof ScienceError &&
        (e.code === 'FIT_TOO_FEW_LINES' || e.code === 'FIT_RANK_DEFICIENT' || e.code === 'FIT_NO_ASSIGNED_LINES')
      ) {
        return undefined;
      }
      throw e;
    }
  }

  function finish(autoMap: ReadonlyMap<number, CandidateLine>, fitted?: DetailedFit): AssignResult {
    const lines = lineInputs(autoMap);
    void fitted;
    const fit = fitLineListDetailed(lines, masses, options.fit ?? {});
    const unexplained = peaks.flatMap((p, i) => (p.assignment || autoMap.has(i) ? [] : [i]));
    if (unexplained.length > 0) {
      warnings.push({
        code: 'LINES_UNEXPLAINED',
        message: `${unexplained.length} line(s) are explained by no band of ${species.map((s) => s.iso.formula).join(', ')}; they stay unassigned and out of the fit`,
        lines: unexplained,
      });
    }
    const counts = new Map<string, BandSummary>();
    for (const c of cands) {
      const k = bandKey(c);
      const b = counts.get(k) ?? { species: c.species, band: formatBand(c.band), predicted: 0, matched: 0 };
      counts.set(k, { ...b, predicted: b.predicted + 1 });
    }
    for (const c of autoMap.values()) {
      const b = counts.get(bandKey(c));
      if (b) counts.set(bandKey(c), { ...b, matched: b.matched + 1 });
    }
    const calibration = estimateCalibration(autoMap, peaks, species[0]?.iso.formula);
    return {
      fit,
      lines,
      notes,
      ...(calibration ? { calibration } : {}),
      bands: [...counts.values()].filter((b) => b.matched > 0 || b.predicted >= 3),
      unexplained,
      warnings,
    };
  }
}

function sameAssignments(a: ReadonlyMap<number, CandidateLine>, b: ReadonlyMap<number, CandidateLine>): boolean {
  if (a.size !== b.size) return false;
  for (const [k, v] of a) if (b.get(k) !== v) return false;
  return true;
}

/** Bands with fewer automatically assigned lines than the minimum are more likely coincidences than bands. */
function pruneThinBands(auto: Map<number, CandidateLine>, min: number): void {
  const count = new Map<string, number>();
  for (const c of auto.values()) count.set(bandKey(c), (count.get(bandKey(c)) ?? 0) + 1);
  for (const [i, c] of auto) if ((count.get(bandKey(c)) ?? 0) < min) auto.delete(i);
}

/** Per band, the median ratio of observed to predicted intensity over the matched lines (three or more). */
function intensityScales(auto: ReadonlyMap<number, CandidateLine>, peaks: readonly PeakInput[]): Map<string, number> {
  const ratios = new Map<string, number[]>();
  for (const [i, c] of auto) {
    const obs = peaks[i]?.intensity;
    if (obs === undefined || !(obs > 0)) continue;
    const k = bandKey(c);
    const list = ratios.get(k) ?? [];
    list.push(obs / c.intensity);
    ratios.set(k, list);
  }
  const out = new Map<string, number>();
  for (const [k, r] of ratios) if (r.length >= 3) out.set(k, median(r));
  return out;
}

function estimateCalibration(
  auto: ReadonlyMap<number, CandidateLine>,
  peaks: readonly PeakInput[],
  mainSpecies: string | undefined,
): Calibration | undefined {
  const pts: CalibrationPoint[] = [];
  for (const [i, c] of auto) {
    if (c.species !== mainSpecies || c.j > 20) continue;
    const p = peaks[i] as PeakInput;
    pts.push({
      reference: c.position,
      observed: p.position,
      ...(p.uncertainty !== undefined ? { uncertainty: p.uncertainty } : {}),
    });
  }
  return calibrationFromPoints(pts, `reference-library positions of ${mainSpecies}`);
}

export interface CalibrationPoint {
  readonly reference: number;
  readonly observed: number;
  readonly uncertainty?: number;
}

/**
 * Offset and scale of the wavenumber axis against reference positions: a weighted linear regression of
 * observed − reference on (reference − centre), covariance scaled a posteriori. The offset is reported at the
 * centre of the lines, where it is least correlated with the scale; the scale only when the lines span at least
 * 1 % of the centre (otherwise the two cannot be told apart).
 */
export function calibrationFromPoints(pts: readonly CalibrationPoint[], reference: string): Calibration | undefined {
  if (pts.length < 3) return undefined;
  const w = pts.map((p) => 1 / (p.uncertainty ?? 1) ** 2);
  let sw = 0;
  let swx = 0;
  pts.forEach((p, i) => {
    sw += w[i] as number;
    swx += (w[i] as number) * p.reference;
  });
  const centre = swx / sw;
  const xs = pts.map((p) => p.reference);
  const span = Math.max(...xs) - Math.min(...xs);
  const withScale = span >= 0.01 * centre && pts.length >= 4;
  const n = pts.length;
  const cols = withScale ? 2 : 1;
  const design = new Float64Array(n * cols);
  pts.forEach((p, i) => {
    design[i] = 1;
    if (withScale) design[n + i] = p.reference - centre;
  });
  const r = solveLeastSquares({
    rows: n,
    cols,
    design,
    observations: Float64Array.from(pts, (p) => p.observed - p.reference),
    weights: Float64Array.from(w),
  });
  if (r.rankDeficient) return undefined;
  const s2 = n > cols ? r.chiSquare / (n - cols) : 1;
  const sd = (j: number) => Math.sqrt(s2 * (r.covariance[j * cols + j] as number));
  return {
    offset: quantity(r.coefficients[0] as number, sd(0), 'cm-1'),
    ...(withScale ? { scale: quantity((r.coefficients[1] as number) * 1e6, sd(1) * 1e6, 'ppm') } : {}),
    centre,
    lines: n,
    reference,
  };
}

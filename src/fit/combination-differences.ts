import { type Quantity, quantity } from '../derive/quantity.js';
import { solveLeastSquares } from '../linalg/least-squares.js';
import { floats } from '../linalg/small-arrays.js';
import { CENTRIFUGAL_SIGN, MAX_CENTRIFUGAL_ORDER } from '../models/level-model.js';
import type { Observation } from '../models/linear-model.js';
import { BandTable } from './band-table.js';
import type { UncertaintyMode } from './engine.js';

/**
 * Combination differences (Herzberg, Spectra of Diatomic Molecules, §III.2): lines sharing an upper level give
 * Δ₂F″(J) = R(J−1) − P(J+1) = F″(J+1) − F″(J−1); lines sharing a lower level give Δ₂F′(J) = R(J) − P(J) =
 * F′(J+1) − F′(J−1). Each depends on one level's rotational constants only, not on the band origin or the other
 * level, so fitting them is a model-independent check of an assignment and of B″ and B′.
 */

export interface CombinationPoint {
  readonly j: number;
  readonly value: number;
  readonly uncertainty: number;
  readonly residual: number;
}

export interface CombinationDifferenceFit {
  readonly species: string;
  readonly band: string;
  /** "lower": Δ₂F″, the lower level's constants; "upper": Δ₂F′. */
  readonly kind: 'lower' | 'upper';
  readonly v: number;
  readonly points: readonly CombinationPoint[];
  readonly B: Quantity;
  readonly D?: Quantity;
  readonly H?: Quantity;
  readonly L?: Quantity;
  readonly M?: Quantity;
  readonly rms: number;
  readonly degreesOfFreedom: number;
}

interface Mean {
  value: number;
  variance: number;
}

/** Weighted mean of repeated measurements of one line (variance 1/Σw). */
function mean(obs: readonly Observation[]): Mean {
  let sw = 0;
  let swx = 0;
  for (const o of obs) {
    sw += o.weight;
    swx += o.weight * o.position;
  }
  return { value: swx / sw, variance: 1 / sw };
}

/**
 * A combination-difference fit and the standard uncertainty its B would have with the lines' own σ taken as they
 * are (s² = 1), whatever the uncertainty mode: what a comparison must not undercut (see cross-checks.ts).
 */
export interface CombinationDifferenceResult {
  readonly fit: CombinationDifferenceFit;
  readonly statedUncertaintyOfB: number;
}

export function fitCombinationDifferences(
  observations: readonly Observation[],
  orderOf: (species: string, v: number) => number,
  mode: UncertaintyMode,
): CombinationDifferenceResult[] {
  const out: CombinationDifferenceResult[] = [];
  for (const g of bandBranches(observations)) {
    const band = `${g.upper}-${g.lower}`;
    const { lowerPts, upperPts } = differencePoints(g);
    for (const [kind, pts, v] of [
      ['lower', lowerPts, g.lower],
      ['upper', upperPts, g.upper],
    ] as const) {
      const fit = fitDifferences(pts, Math.min(orderOf(g.species, v), MAX_CENTRIFUGAL_ORDER), mode);
      if (fit) {
        const { statedUncertaintyOfB, ...rest } = fit;
        out.push({ fit: { species: g.species, band, kind, v, ...rest }, statedUncertaintyOfB });
      }
    }
  }
  return out;
}

/** The R and P lines of one band of one species, by J″. */
interface BandBranches {
  readonly species: string;
  readonly upper: number;
  readonly lower: number;
  readonly r: Map<number, Observation[]>;
  readonly p: Map<number, Observation[]>;
}

/** The lines of each vibrational band (pure rotation left out), in the order the bands first appear. */
function bandBranches(observations: readonly Observation[]): Iterable<BandBranches> {
  const groups = new BandTable<BandBranches>((o) => ({
    species: o.species,
    upper: o.upperV,
    lower: o.lowerV,
    r: new Map(),
    p: new Map(),
  }));
  for (const o of observations) {
    if (o.upperV === o.lowerV) continue;
    const g = groups.of(o);
    const branch = o.upperJ === o.lowerJ + 1 ? g.r : g.p;
    const list = branch.get(o.lowerJ);
    if (list) list.push(o);
    else branch.set(o.lowerJ, [o]);
  }
  return groups.inOrder;
}

/** Δ₂F″(J) = R(J−1) − P(J+1) and Δ₂F′(J) = R(J) − P(J) of one band, each line the weighted mean of its repeats. */
function differencePoints(g: BandBranches): {
  lowerPts: { j: number; m: Mean }[];
  upperPts: { j: number; m: Mean }[];
} {
  const lowerPts: { j: number; m: Mean }[] = [];
  const upperPts: { j: number; m: Mean }[] = [];
  // Every J from 1 up to one past the highest J″ seen: a difference needs a line at J − 1, J or J + 1.
  let top = 0;
  for (const j of g.r.keys()) top = Math.max(top, j + 1);
  for (const j of g.p.keys()) top = Math.max(top, j + 1);
  for (let j = 1; j <= top; j++) {
    const rPrev = g.r.get(j - 1);
    const pNext = g.p.get(j + 1);
    if (rPrev && pNext) {
      const a = mean(rPrev);
      const b = mean(pNext);
      lowerPts.push({ j, m: { value: a.value - b.value, variance: a.variance + b.variance } });
    }
    const rj = g.r.get(j);
    const pj = g.p.get(j);
    if (rj && pj) {
      const a = mean(rj);
      const b = mean(pj);
      upperPts.push({ j, m: { value: a.value - b.value, variance: a.variance + b.variance } });
    }
  }
  return { lowerPts, upperPts };
}

function fitDifferences(
  pts: readonly { j: number; m: Mean }[],
  wantedOrder: number,
  mode: UncertaintyMode,
): (Omit<CombinationDifferenceFit, 'species' | 'band' | 'kind' | 'v'> & { statedUncertaintyOfB: number }) | undefined {
  const n = pts.length;
  // Keep at least two degrees of freedom, so that the check can say something.
  const order = Math.min(wantedOrder, n - 2);
  if (order < 1) return undefined;
  const { design, values, weights } = differenceSystem(pts, order);
  const r = solveLeastSquares({
    rows: n,
    cols: order,
    design,
    observations: values,
    weights,
    // Neither the condition number nor leverages are reported for a combination-difference fit.
    conditionNumber: false,
  });
  if (r.rankDeficient) return undefined;
  const dof = n - order;
  const s2 = mode === 'absolute' ? 1 : r.chiSquare / dof;
  const q = (l: number) =>
    quantity(r.coefficients[l] as number, Math.sqrt(s2 * (r.covariance[l * order + l] as number)), 'cm-1');
  let ss = 0;
  for (const e of r.residuals) ss += e * e;
  return {
    points: pts.map((p, i) => ({
      j: p.j,
      value: p.m.value,
      uncertainty: Math.sqrt(p.m.variance * s2),
      residual: r.residuals[i] as number,
    })),
    B: q(0),
    ...(order >= 2 ? { D: q(1) } : {}),
    ...(order >= 3 ? { H: q(2) } : {}),
    ...(order >= 4 ? { L: q(3) } : {}),
    ...(order >= 5 ? { M: q(4) } : {}),
    rms: Math.sqrt(ss / n),
    degreesOfFreedom: dof,
    statedUncertaintyOfB: Math.sqrt(r.covariance[0] as number),
  };
}

/**
 * The weighted system of the differences, column-major: Δ₂F(J) = Σ_l sign_l [(x′)^l − (x″)^l] c_l with x′ =
 * (J+1)(J+2) and x″ = (J−1)J (c_1 = B, c_2 = D, …, the level model's signs), weights 1/variance of each difference.
 */
function differenceSystem(
  pts: readonly { j: number; m: Mean }[],
  order: number,
): { design: Float64Array<ArrayBuffer>; values: Float64Array<ArrayBuffer>; weights: Float64Array<ArrayBuffer> } {
  const n = pts.length;
  const design = floats(n * order);
  // Plain loops: Float64Array.from with a map function is many times slower.
  const values = floats(n);
  const weights = floats(n);
  for (let i = 0; i < n; i++) {
    const pt = pts[i] as (typeof pts)[number];
    const xu = (pt.j + 1) * (pt.j + 2);
    const xl = (pt.j - 1) * pt.j;
    for (let l = 1; l <= order; l++)
      design[(l - 1) * n + i] = (CENTRIFUGAL_SIGN[l - 1] as number) * (xu ** l - xl ** l);
    values[i] = pt.m.value;
    weights[i] = 1 / pt.m.variance;
  }
  return { design, values, weights };
}

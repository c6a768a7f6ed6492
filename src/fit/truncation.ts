import { type Quantity, quantity } from '../derive/quantity.js';
import type { DunhamTerm } from '../models/dunham.js';
import {
  levelModel,
  levelParameters,
  levelStructure,
  MAX_CENTRIFUGAL_ORDER,
  ROTATIONAL_KINDS,
} from '../models/level-model.js';
import { constantsFor } from '../species/library.js';
import { parseSpecies } from '../species/parse.js';
import {
  isRankDeficient,
  type Prior,
  reducedChiSquare,
  type SolvedModel,
  solveModelWithPriors,
  type UncertaintyMode,
} from './engine.js';
import type { LevelSelection } from './level-selection.js';

/**
 * Honest uncertainties with an incomplete model (SCIENCE.md §9, option (a)). A term the lines cannot determine is
 * still physically there: H_v of HCl below J ≈ 12, ω_e y_e with two vibrational intervals, γ_e with two levels.
 * Leaving it out biases what it correlates with by more than the statistical σ. So the next term beyond the ones
 * the term test kept is carried as a constrained parameter: a prior value ± σ from the reference library or from
 * a Dunham relation, fitted as a pseudo-observation (`solveModelWithPriors`), its uncertainty propagated into the
 * covariance of every fitted constant. Where the lines do carry information on the term the data dominate the
 * prior; where they carry none the prior's σ flows into the constants it correlates with.
 *
 * Prior uncertainties (stated, conservative):
 * - a relation or library value without uncertainty: ± 50 % of its value (the Kratzer and H_e relations hold to a
 *   few per cent for CO and the hydrogen halides; the margin covers molecules where they do not);
 * - no value at all (γ_e and ω_e y_e of most molecules): 0 ± 5 κ |Y_{k−1,l}|, κ = B_e/ω_e, Dunham's ordering
 *   parameter (each step in k scales a coefficient by about κ);
 * - β_e without a library value: its relation to D_e, ω_e x_e, α_e, B_e, ω_e (betaPrior), σ on the bracket. At 0 ±
 *   5κ|Y02| it sat 0.8σ from H³⁵Cl's β_e and biased B_e and D_e of short lists by half their σ.
 */
export interface TermConstraint {
  /** Parameter name, e.g. "H_0" or "Y30". */
  readonly parameter: string;
  /** Parameter key in the model (e.g. "1H-35Cl|H|0"). */
  readonly key: string;
  readonly species: string;
  readonly prior: Quantity;
  /** Where the prior comes from. */
  readonly basis: string;
}

/** Relative σ of a prior taken from a relation or a library value without uncertainty. */
export const RELATION_PRIOR_FRACTION = 0.5;
/** Width of a scale prior in units of κ |Y_{k−1,l}|. */
export const SCALE_PRIOR_FACTOR = 5;

interface Reference {
  omega_e?: number;
  omega_e_x_e?: number;
  omega_e_y_e?: number;
  omega_e_z_e?: number;
  B_e?: number;
  alpha_e?: number;
  gamma_e?: number;
  D_e?: number;
  beta_e?: number;
  H_e?: number;
}

/** The library's constants per species formula, looked up once (the library never changes). */
const references = new Map<string, Reference>();

/** Customary constants of the species from the reference library (empty when it has none). */
export function referenceOf(species: string): Reference {
  let known = references.get(species);
  if (!known) {
    known = lookUpReference(species);
    references.set(species, known);
  }
  return { ...known };
}

function lookUpReference(species: string): Reference {
  let entry: ReturnType<typeof constantsFor>;
  try {
    entry = constantsFor(parseSpecies(species));
  } catch {
    return {};
  }
  const out: Reference = {};
  const c = entry?.constants ?? {};
  for (const k of [
    'omega_e',
    'omega_e_x_e',
    'omega_e_y_e',
    'omega_e_z_e',
    'B_e',
    'alpha_e',
    'gamma_e',
    'D_e',
    'beta_e',
    'H_e',
  ] as const) {
    const x = (c as Record<string, { value: number } | undefined>)[k];
    if (x) out[k] = x.value;
  }
  return out;
}

/** H_e ≈ 2 D_e (12 B_e² − α_e ω_e) / (3 ω_e²) (Dunham relation for a Morse-like potential; SCIENCE.md §9). */
export const hFromRelation = (D: number, B: number, alpha: number, omega: number): number =>
  (2 * D * (12 * B * B - alpha * omega)) / (3 * omega * omega);
/** Kratzer: D_e ≈ 4 B_e³ / ω_e². */
export const kratzerD = (B: number, omega: number): number => (4 * B ** 3) / omega ** 2;

/**
 * Width of the prior of a high-order centrifugal term without a Dunham estimate (M_v next to L_v always; L_v next
 * to H_v when α_e or ω_e is unknown), in units of κ_v² times the size of the term below it: 0 ± 10 κ_v² max(|X|,
 * σ_X), κ_v = B_v/ω_e, the rotational analogue of the scale prior of the Dunham terms. Each power of x scales the
 * coefficient by about κ² times a number of order one to ten (¹²C¹⁶O v = 0: D/B ≈ 4κ², H/D ≈ 1.2κ², L/H ≈ −8κ², the
 * last from a fit of the database pure-rotation lines to J = 80, which this covers at 0.8σ). M_v is not centred on
 * Dunham's M_e: that needs a3, and its bracket cancels as L_e's does (see lFromPotential), so its sign is not known.
 * Measured on a CO-like ground state with L and M (test/fit/high-order-priors.test.ts, lines to J = 50 fitted to H)
 * with this prior on L_v: 1σ coverage 0.635–0.675, mean pulls −0.3 to −0.43; with 5κ² H_0 1σ 0.18 (mean −1.2).
 * L_v now takes Dunham's estimate (lPrior) where the library or the levels give α_e and ω_e.
 */
export const HIGH_ORDER_PRIOR_FACTOR = 10;

/** A level-model prior with what the report says of it. */
type LevelPrior = Prior & { name: string; species: string; basis: string };

/** What the priors of one species' levels are formed from: the fitted values, the library's constants, ω_e. */
interface LevelPriorContext {
  readonly species: string;
  readonly fit: SolvedModel;
  readonly levels: readonly number[];
  readonly ref: Reference;
  readonly omega: number | undefined;
  readonly omegaBasis: string;
  readonly multi: boolean;
  value(key: string): number | undefined;
}

/**
 * Stage 3b: constrain the next centrifugal term of every level (D when only B was kept, H when D was, L when H
 * was, M when L was), re-solving the kept model with the priors. Levels fitted to M (the model's highest term)
 * are left alone. Returns the selection unchanged when no prior can be formed.
 */
export function constrainLevelModel(
  level: LevelSelection,
  mode: UncertaintyMode,
): { level: LevelSelection; constraints: TermConstraint[] } {
  const fit = level.fit;
  const obs = fit.observations;
  const structure = levelStructure(obs);
  const value = (key: string) => {
    const i = fit.model.parameters.findIndex((p) => p.key === key);
    return i < 0 ? undefined : (fit.values[i] as number);
  };
  const priors: LevelPrior[] = [];
  const widened = new Map(level.orders);
  for (const s of structure.species) {
    const ref = referenceOf(s);
    const levels = structure.levels.get(s) as readonly number[];
    const omega = omegaOf(s, ref, levels, structure.reference.get(s) as ReadonlyMap<number, number>, value);
    const context = { species: s, fit, levels, ref, ...omega, multi: structure.species.length > 1, value };
    for (const v of levels) {
      const order = level.orders.get(`${s}|${v}`) ?? 1;
      if (order >= MAX_CENTRIFUGAL_ORDER) continue;
      const prior = nextTermPrior(context, v, order);
      if (!prior) continue;
      priors.push(prior);
      widened.set(`${s}|${v}`, order + 1);
    }
  }
  if (priors.length === 0) return { level, constraints: [] };
  const params = levelParameters(structure, widened);
  const constrained = solveModelWithPriors(levelModel(params), obs, priors, mode, reducedChiSquare(fit) ?? 1);
  if (isRankDeficient(constrained)) return { level, constraints: [] };
  return {
    level: { fit: constrained, orders: level.orders },
    constraints: priors.map((p) => ({
      parameter: p.name,
      key: p.key,
      species: p.species,
      prior: quantity(p.value, p.sigma, 'cm-1'),
      basis: p.basis,
    })),
  };
}

/**
 * ω_e: the library's, else the largest fitted vibrational interval per quantum (ΔG ≈ ω_e − 2ω_e x_e: a few per cent
 * low, well inside the prior's 50 %), else undefined.
 */
function omegaOf(
  s: string,
  ref: Reference,
  levels: readonly number[],
  refLevel: ReadonlyMap<number, number>,
  value: (key: string) => number | undefined,
): { omega: number | undefined; omegaBasis: string } {
  if (ref.omega_e !== undefined) return { omega: ref.omega_e, omegaBasis: 'ω_e from the reference library' };
  let omega: number | undefined;
  for (const v of levels) {
    const r = refLevel.get(v) as number;
    const t = value(`${s}|T|${v}`);
    if (t !== undefined && v !== r) {
      const perQuantum = t / (v - r);
      if (omega === undefined || perQuantum > omega) omega = perQuantum;
    }
  }
  return { omega, omegaBasis: 'ω_e ≈ the fitted vibrational interval' };
}

/** The prior on the term after level v's highest fitted one (`order`), or undefined when none can be formed. */
function nextTermPrior(c: LevelPriorContext, v: number, order: number): LevelPrior | undefined {
  const s = c.species;
  const B = c.value(`${s}|B|${v}`) as number;
  const name = (kind: string) => `${kind}_${v}${c.multi ? `(${s})` : ''}`;
  const prior = (kind: string, e: DunhamEstimate): LevelPrior => ({
    key: `${s}|${kind}|${v}`,
    value: e.value,
    sigma: e.sigma,
    name: name(kind),
    species: s,
    basis: e.basis,
  });
  if (order === 1) {
    const d = dPrior(c.ref, B, v, c.omega, c.omegaBasis);
    return d ? prior('D', d) : undefined;
  }
  if (order === 2) {
    // H_v varies little with v (H_v = H_e + O(κ H_e)): one H_e for every level, from the library's equilibrium
    // constants when it has them all, else from the lowest level with a fitted D.
    const h = hPrior(s, c.ref, c.levels, c.value, c.omega, c.omegaBasis);
    return h ? prior('H', h) : undefined;
  }
  const dunhamL =
    order === 3 ? lPrior(c.ref, B, c.omega, c.omegaBasis, alphaFromLevels(s, v, c.levels, c.value)) : undefined;
  if (dunhamL) return prior('L', dunhamL);
  const scaled = scalePrior(c, v, order, B);
  return scaled ? prior(ROTATIONAL_KINDS[order] as string, scaled) : undefined;
}

/** D_v next to B_v: the library's D_e, else Kratzer's 4B³/ω_e², ± 50 %. */
function dPrior(
  ref: Reference,
  B: number,
  v: number,
  omega: number | undefined,
  omegaBasis: string,
): DunhamEstimate | undefined {
  const D = ref.D_e ?? (omega !== undefined ? kratzerD(B, omega) : undefined);
  if (D === undefined || !(D > 0)) return undefined;
  return {
    value: D,
    sigma: RELATION_PRIOR_FRACTION * D,
    basis:
      ref.D_e !== undefined
        ? 'D_e of the reference library, ± 50 %'
        : `Kratzer D ≈ 4B³/ω_e² with B_${v} and ${omegaBasis}, ± 50 %`,
  };
}

/** L_v or M_v without a Dunham estimate: 0 ± 10 (B_v/ω_e)² max(|X|, σ_X), X the term below (HIGH_ORDER_PRIOR_FACTOR). */
function scalePrior(c: LevelPriorContext, v: number, order: number, B: number): DunhamEstimate | undefined {
  const { fit, omega, species: s } = c;
  const below = ROTATIONAL_KINDS[order - 1] as string;
  const i = fit.model.parameters.findIndex((p) => p.key === `${s}|${below}|${v}`);
  if (i < 0 || omega === undefined || !(omega > 0)) return undefined;
  const size = Math.max(
    Math.abs(fit.values[i] as number),
    Math.sqrt(Math.max(fit.covariance[i * (fit.model.parameters.length + 1)] as number, 0)),
  );
  const kappa = B / omega;
  const sigma = HIGH_ORDER_PRIOR_FACTOR * kappa * kappa * size;
  if (!(sigma > 0) || !Number.isFinite(sigma)) return undefined;
  return {
    value: 0,
    sigma,
    basis: `not determined by the lines: 0 ± 10 (B_v/ω_e)² |${below}_v| (Dunham ordering, ${c.omegaBasis})`,
  };
}

interface DunhamEstimate {
  readonly value: number;
  readonly sigma: number;
  readonly basis: string;
}

/** α_e ≈ B_v − B_{v+1} (or B_{v−1} − B_v) from the fitted level constants, when a neighbouring level was fitted. */
function alphaFromLevels(
  s: string,
  v: number,
  vs: readonly number[],
  value: (key: string) => number | undefined,
): number | undefined {
  const here = value(`${s}|B|${v}`);
  const up = vs.includes(v + 1) ? value(`${s}|B|${v + 1}`) : undefined;
  if (here !== undefined && up !== undefined) return here - up;
  const down = vs.includes(v - 1) ? value(`${s}|B|${v - 1}`) : undefined;
  return here !== undefined && down !== undefined ? down - here : undefined;
}

/**
 * L_e from Dunham's potential coefficients, to leading order in κ = B_e/ω_e: the x⁴ coefficient of the rotating
 * oscillator's energy min_ρ [a0 ρ²(1 + a1 ρ + a2 ρ²) + B x (1 + ρ)⁻²], ρ = (r − r_e)/r_e, a0 = ω_e²/(4B_e):
 *   L_e = −16 B_e⁷ P / ω_e⁶,  P = 9a1² + 36a1 − 4a2 + 52,
 * with a1 = −1 − α_e ω_e/(6B_e²) (from Y11) and a2 = 2Y20/(3B_e) + 5a1²/4, Y20 = −ω_e x_e (from Y20). The same
 * expansion gives Kratzer's D_e = 4B³/ω² and Dunham's H_e = 16B⁵(3 + a1)/ω⁴ (= the H_e relation of SCIENCE.md §9),
 * so it is the Dunham/Kratzer-type estimate one order further (series worked out for this project; derivation in
 * DEVELOPERS.md). P is a difference of terms of order 50–100 that cancels to a few units (¹²C¹⁶O 2.3, H³⁵Cl 2.5;
 * a Morse potential, a2 = 7a1²/12, gives P = (20/3)a1² + 36a1 + 52 ≥ 3.4: L_e < 0 for every Morse-like
 * potential), so the prior's σ is stated on P: max(½|P|, 1) (a 1–2 % error in a1 or a2), and max(|P|, 2) when
 * ω_e x_e is unknown and a2 is taken from the Morse form. ¹²C¹⁶O: L_e = −3.6e-17 cm⁻¹ against −3.65e-17 from a
 * fit of the database pure-rotation lines to x⁵ (test/fit/high-order-priors.test.ts).
 */
export function lFromPotential(B: number, omega: number, a1: number, a2: number): number {
  const p = 9 * a1 * a1 + 36 * a1 - 4 * a2 + 52;
  return (-16 * B ** 7 * p) / omega ** 6;
}

function lPrior(
  ref: Reference,
  Bv: number,
  omega: number | undefined,
  omegaBasis: string,
  fittedAlpha: number | undefined,
): DunhamEstimate | undefined {
  const B = ref.B_e ?? Bv;
  const alpha = ref.alpha_e ?? fittedAlpha;
  if (omega === undefined || !(omega > 0) || alpha === undefined || !(B > 0)) return undefined;
  const a1 = -1 - (alpha * omega) / (6 * B * B);
  const morse = ref.omega_e_x_e === undefined;
  const a2 = morse ? (7 * a1 * a1) / 12 : (-2 * (ref.omega_e_x_e as number)) / (3 * B) + (5 * a1 * a1) / 4;
  const p = 9 * a1 * a1 + 36 * a1 - 4 * a2 + 52;
  const unit = (16 * B ** 7) / omega ** 6;
  const sigmaP = morse ? Math.max(Math.abs(p), 2) : Math.max(0.5 * Math.abs(p), 1);
  const value = -unit * p;
  if (!Number.isFinite(value) || !(unit > 0)) return undefined;
  return {
    value,
    sigma: unit * sigmaP,
    basis: `L_v ≈ L_e = −16B_e⁷P/ω_e⁶, P = 9a1² + 36a1 − 4a2 + 52 = ${p.toPrecision(3)} (Dunham's a1 from α_e${ref.alpha_e !== undefined ? ' of the library' : ' of the fitted B_v'}, a2 from ${morse ? 'the Morse form 7a1²/12' : 'ω_e x_e of the library'}; ${omegaBasis}), σ_P = ${sigmaP.toPrecision(2)}`,
  };
}

function hPrior(
  s: string,
  ref: Reference,
  vs: readonly number[],
  value: (key: string) => number | undefined,
  omega: number | undefined,
  omegaBasis: string,
): { value: number; sigma: number; basis: string } | undefined {
  if (ref.H_e !== undefined)
    return {
      value: ref.H_e,
      sigma: RELATION_PRIOR_FRACTION * Math.abs(ref.H_e),
      basis: 'H_e of the reference library, ± 50 %',
    };
  if (ref.D_e !== undefined && ref.B_e !== undefined && ref.alpha_e !== undefined && ref.omega_e !== undefined) {
    const H = hFromRelation(ref.D_e, ref.B_e, ref.alpha_e, ref.omega_e);
    return {
      value: H,
      sigma: RELATION_PRIOR_FRACTION * Math.abs(H),
      basis: 'H_v ≈ H_e ≈ 2D_e(12B_e² − α_e ω_e)/(3ω_e²) (Dunham relation) from the reference library, ± 50 %',
    };
  }
  const v0 = vs.find((v) => (value(`${s}|D|${v}`) ?? 0) > 0);
  if (v0 === undefined) return undefined;
  const B = value(`${s}|B|${v0}`) as number;
  const D = value(`${s}|D|${v0}`) as number;
  const next = vs.find((x) => x === v0 + 1);
  const Bn = next === undefined ? undefined : value(`${s}|B|${next}`);
  const alpha = ref.alpha_e ?? (Bn !== undefined ? B - Bn : undefined);
  const w = omega ?? Math.sqrt((4 * B ** 3) / D);
  const H = hFromRelation(D, B, alpha ?? 0, w);
  if (!Number.isFinite(H) || H === 0) return undefined;
  const fraction = alpha === undefined ? 1 : RELATION_PRIOR_FRACTION;
  return {
    value: H,
    sigma: fraction * Math.abs(H),
    basis: `H_v ≈ H_e ≈ 2D(12B² − α_e ω_e)/(3ω_e²) (Dunham relation) with the fitted B_${v0}, D_${v0}, ${alpha === undefined ? 'α_e unknown (taken as 0, ± 100 %)' : `α_e ${ref.alpha_e !== undefined ? 'of the library' : 'from the fitted B_v'}, ± 50 %`} and ${omega !== undefined ? omegaBasis : 'ω_e from Kratzer'}`,
  };
}

/**
 * Priors for the Dunham terms next to the kept ones that a real molecule has: Y30 (ω_e y_e) next to Y20, Y21 (γ_e)
 * next to Y11, Y12 (−β_e) next to Y02, Y02 (−D_e) when no level fitted D, Y03 (H_e) next to Y02 and Y04 (L_e) next
 * to Y03. Library values where it has them (± 50 %), the H_e relation for Y03, Dunham's L_e estimate for Y04, a
 * scale prior 0 ± 5κ|Y_{k−1,l}| otherwise.
 */
export function dunhamPriors(
  species: string,
  terms: readonly DunhamTerm[],
  values: ReadonlyMap<string, number>,
): DunhamPrior[] {
  const ref = referenceOf(species);
  const y = (k: number, l: number) => values.get(`${k},${l}`);
  const known: KnownTerms = {
    species,
    ref,
    has: (k, l) => terms.some((t) => t.k === k && t.l === l),
    y,
    omega: y(1, 0) ?? ref.omega_e,
    B: y(0, 1) ?? ref.B_e,
  };
  return [...neighbourPriors(known), ...centrifugalDunhamPriors(known)];
}

type DunhamPrior = Prior & { term: DunhamTerm; basis: string };

/** The kept Dunham terms, their fitted values ("k,l"), the library entry, and ω_e and B_e (fitted, else library). */
interface KnownTerms {
  readonly species: string;
  readonly ref: Reference;
  has(k: number, l: number): boolean;
  y(k: number, l: number): number | undefined;
  readonly omega: number | undefined;
  readonly B: number | undefined;
}

/** Y30, Y21, Y12 next to Y20, Y11, Y02: the library's value ± 50 %, else 0 ± 5κ|Y_{k−1,l}|. */
function neighbourPriors({ species, ref, has, y, omega, B }: KnownTerms): DunhamPrior[] {
  const kappa = omega !== undefined && B !== undefined && omega > 0 ? B / omega : undefined;
  const out: DunhamPrior[] = [];
  const add = (k: number, l: number, libValue: number | undefined, libName: string) => {
    if (!has(k - 1, l) || has(k, l)) return;
    const key = `${species}|Y|${k},${l}`;
    if (libValue !== undefined && libValue !== 0) {
      out.push({
        key,
        value: libValue,
        sigma: RELATION_PRIOR_FRACTION * Math.abs(libValue),
        term: { k, l },
        basis: `${libName} of the reference library, ± 50 %`,
      });
      return;
    }
    const lower = y(k - 1, l);
    if (kappa === undefined || lower === undefined) return;
    out.push({
      key,
      value: 0,
      sigma: SCALE_PRIOR_FACTOR * kappa * Math.abs(lower),
      term: { k, l },
      basis: `not determined by the lines: 0 ± 5 (B_e/ω_e) |Y${k - 1}${l}| (Dunham ordering)`,
    });
  };
  add(3, 0, ref.omega_e_y_e, 'ω_e y_e');
  // One further in the vibrational column when the lines fixed ω_e y_e too: four levels fit Y10, Y20, Y30 with no
  // freedom left, and without a prior on Y40 its truncation error was in no σ (real CO v = 0–3 gave ω_e 355σ from
  // Huber & Herzberg at σ 2e-6 cm⁻¹; with the prior 0.6σ at σ 1e-3). Not in the rotational columns: there the
  // extrapolation to v = −½ is short, and a Y31 prior of 5κ|Y21| made B_e of three-level fits over-cover (1σ 0.86
  // over 200 H³⁵Cl fits, test/fit/pulls.test.ts).
  add(4, 0, ref.omega_e_z_e, 'ω_e z_e');
  add(2, 1, ref.gamma_e, 'γ_e');
  if (ref.beta_e === undefined && !has(1, 2) && has(0, 2)) {
    const b = betaPrior(species, y, omega, B);
    if (b) {
      out.push(b);
      return out;
    }
  }
  add(1, 2, ref.beta_e !== undefined ? -ref.beta_e : undefined, 'β_e');
  return out;
}

/**
 * Y12 = −β_e from the relation β_e = D_e (8 ω_e x_e/ω_e − 5 α_e/B_e − α_e² ω_e/(24 B_e³)) with the fitted D_e,
 * ω_e x_e, α_e, B_e, ω_e. The bracket cancels (H³⁵Cl −0.014 of terms near 0.14; ¹²C¹⁶O −1.8e-4 of terms near
 * 0.049), so σ is stated on the bracket: max(½|bracket|, 5 % of 8 ω_e x_e/ω_e).
 */
function betaPrior(
  species: string,
  y: (k: number, l: number) => number | undefined,
  omega: number | undefined,
  B: number | undefined,
): DunhamPrior | undefined {
  const D = -(y(0, 2) ?? 0);
  const x = -(y(2, 0) ?? Number.NaN);
  const alpha = -(y(1, 1) ?? Number.NaN);
  if (omega === undefined || B === undefined || !(D > 0) || !(omega > 0) || !(B > 0)) return undefined;
  const first = (8 * x) / omega;
  const bracket = first - (5 * alpha) / B - (alpha * alpha * omega) / (24 * B ** 3);
  if (!Number.isFinite(bracket)) return undefined;
  const sigma = D * Math.max(0.5 * Math.abs(bracket), 0.05 * Math.abs(first));
  return {
    key: `${species}|Y|1,2`,
    value: -D * bracket,
    sigma,
    term: { k: 1, l: 2 },
    basis: 'β_e ≈ D_e(8ω_e x_e/ω_e − 5α_e/B_e − α_e²ω_e/(24B_e³)), σ on the bracket',
  };
}

/** Y02 (−D_e) when no level fitted D, Y03 (H_e) next to Y02, Y04 (L_e) next to Y03. */
function centrifugalDunhamPriors(known: KnownTerms): DunhamPrior[] {
  const { species, ref, has, y, omega, B } = known;
  const out: DunhamPrior[] = [];
  if (!has(0, 2) && has(0, 1) && omega !== undefined && B !== undefined) {
    const D = ref.D_e ?? kratzerD(B, omega);
    out.push({
      key: `${species}|Y|0,2`,
      value: -D,
      sigma: RELATION_PRIOR_FRACTION * D,
      term: { k: 0, l: 2 },
      basis: ref.D_e !== undefined ? 'D_e of the reference library, ± 50 %' : 'Kratzer D_e ≈ 4B_e³/ω_e², ± 50 %',
    });
  }
  if (has(0, 2) && !has(0, 3)) {
    const h = hePrior(known);
    if (h) out.push(h);
  }
  if (has(0, 3) && !has(0, 4) && B !== undefined) {
    const fittedAlpha = y(1, 1);
    const l = lPrior(ref, B, omega, 'ω_e of the fit', fittedAlpha === undefined ? undefined : -fittedAlpha);
    if (l) out.push({ key: `${species}|Y|0,4`, value: l.value, sigma: l.sigma, term: { k: 0, l: 4 }, basis: l.basis });
  }
  return out;
}

/** Y03 from the library's H_e, else the H_e relation with the fitted D_e (and α_e, ω_e, B_e). */
function hePrior({ species, ref, y, omega, B }: KnownTerms): DunhamPrior | undefined {
  const D = -(y(0, 2) as number);
  const alpha = -(y(1, 1) ?? -(ref.alpha_e ?? 0));
  if (omega === undefined || B === undefined || !(D > 0)) return undefined;
  const H = ref.H_e ?? hFromRelation(D, B, alpha, omega);
  if (!Number.isFinite(H) || H === 0) return undefined;
  return {
    key: `${species}|Y|0,3`,
    value: H,
    sigma: RELATION_PRIOR_FRACTION * Math.abs(H),
    term: { k: 0, l: 3 },
    basis: 'H_e ≈ 2D_e(12B_e² − α_e ω_e)/(3ω_e²) (Dunham relation), ± 50 %',
  };
}

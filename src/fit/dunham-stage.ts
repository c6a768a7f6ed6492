import { quantity, subCovariance } from '../derive/quantity.js';
import { type DunhamTerm, dunhamModel, dunhamName, dunhamParameters, massReducedParameters } from '../models/dunham.js';
import { levelStructure } from '../models/level-model.js';
import type { LinearModel, Observation } from '../models/linear-model.js';
import type { MassValue } from '../species/reduced-mass.js';
import {
  isRankDeficient,
  reducedChiSquare,
  rmsResidual,
  type SolvedModel,
  solveModel,
  solveModelWithPriors,
  toRows,
  type UncertaintyMode,
} from './engine.js';
import { termTest } from './term-test.js';
import { dunhamPriors, type TermConstraint } from './truncation.js';
import type { DunhamFit, Warning } from './types.js';

/** The customary constant each constrained Dunham term is, and the reported constants it moves. */
const SYMBOL: Record<string, string> = {
  Y30: 'ω_e y_e',
  Y40: 'ω_e z_e',
  Y21: 'γ_e',
  Y12: '−β_e',
  Y02: '−D_e',
  Y03: 'H_e',
  Y04: 'L_e',
};
const AFFECTS: Record<string, string> = {
  Y30: 'ω_e and ω_e x_e',
  Y40: 'ω_e, ω_e x_e and ω_e y_e',
  Y21: 'B_e and α_e',
  Y12: 'D_e',
  Y02: 'B_e and α_e',
  Y03: 'D_e',
  Y04: 'D_e and H_e',
};

/** A number for a message: exponent form for the very small and the very large, three digits otherwise. */
export function formatValue(x: number): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a < 1e-3 || a >= 1e5 ? x.toExponential(2) : x.toPrecision(3);
}

/* Stage 5: Dunham fits of the kept lines, per isotopologue (and optionally one mass-reduced fit across them). */

/** Dunham terms the level structure can determine, and the candidates the term test may add. */
export function dunhamTermPlan(obs: readonly Observation[], orders: ReadonlyMap<string, number>, species: string) {
  const structure = levelStructure(obs);
  const vs = structure.levels.get(species) ?? [];
  const ref = structure.reference.get(species) as ReadonlyMap<number, number>;
  const nLevels = vs.length;
  const components = new Set(vs.map((v) => ref.get(v))).size;
  const nVib = nLevels - components;
  let maxOrder = 1;
  for (const v of vs) maxOrder = Math.max(maxOrder, orders.get(`${species}|${v}`) ?? 1);
  const base: DunhamTerm[] = [];
  for (let k = 1; k <= Math.min(nVib, 4); k++) base.push({ k, l: 0 });
  base.push({ k: 0, l: 1 });
  if (nLevels >= 2) base.push({ k: 1, l: 1 });
  if (maxOrder >= 2) base.push({ k: 0, l: 2 });
  const candidates: DunhamTerm[] = [];
  for (let l = 1; l <= Math.min(maxOrder, 4); l++) {
    for (let k = 0; k <= Math.min(nLevels - 1, 3); k++) {
      if (base.some((b) => b.k === k && b.l === l)) continue;
      candidates.push({ k, l });
    }
  }
  return { base, candidates, nLevels, nVib, levels: vs };
}

/**
 * Forward selection of Dunham terms: at each step, among the candidates whose lower-order neighbours are already
 * in (Y_{k−1,l} for k > 0, Y_{0,l−1} for k = 0), add the one with the smallest term-test p-value while p < alpha.
 */
function selectDunham(
  obs: readonly Observation[],
  base: DunhamTerm[],
  candidates: DunhamTerm[],
  mode: UncertaintyMode,
  alpha: number,
  build: (terms: readonly DunhamTerm[]) => LinearModel,
): { fit: SolvedModel; terms: DunhamTerm[] } | undefined {
  let terms = [...base];
  let fit = solveModel(build(terms), obs, mode, false);
  // Should the base be indeterminate (a structure the plan did not foresee), drop its highest terms until it is not.
  while (isRankDeficient(fit) && terms.length > 1) {
    terms = terms.slice(0, -1);
    fit = solveModel(build(terms), obs, mode, false);
  }
  if (isRankDeficient(fit)) return undefined;
  let current = fit;
  let pool = [...candidates];
  for (;;) {
    const ready = pool.filter((c) =>
      c.k > 0 ? terms.some((t) => t.k === c.k - 1 && t.l === c.l) : terms.some((t) => t.k === 0 && t.l === c.l - 1),
    );
    let best: { term: DunhamTerm; fit: SolvedModel; p: number } | undefined;
    for (const c of ready) {
      const trial = [...terms, c];
      if (trial.length >= obs.length) continue;
      const f = solveModel(build(trial), obs, mode, false);
      if (isRankDeficient(f)) continue;
      const pv = termTest(current, f, mode);
      if (!best || pv < best.p) best = { term: c, fit: f, p: pv };
    }
    if (!best || best.p >= alpha) break;
    terms = [...terms, best.term];
    current = best.fit;
    pool = pool.filter((c) => c !== best.term);
  }
  return { fit: current, terms };
}

function reportOf(species: string, fit: SolvedModel, rename: ReadonlyMap<string, string> = new Map()): DunhamFit {
  const p = fit.model.parameters.length;
  const nameOf = (x: { name: string }) => rename.get(x.name) ?? x.name;
  return {
    species,
    parameters: fit.model.parameters.map((par, i) => ({
      name: nameOf(par),
      value: fit.values[i] as number,
      uncertainty: Math.sqrt(fit.covariance[i * p + i] as number),
      unit: par.unit,
      ...(par.species ? { species: par.species } : {}),
    })),
    covariance: { parameters: fit.model.parameters.map(nameOf), matrix: toRows(fit.covariance, p) },
    statistics: {
      degreesOfFreedom: fit.degreesOfFreedom,
      rms: rmsResidual(fit),
      reducedChiSquare: reducedChiSquare(fit),
    },
    terms: fit.model.parameters.map(nameOf),
  };
}

/**
 * With one vibrational interval, between levels a < b, the fitted Y10 is ΔG/(b − a), not ω_e: for adjacent levels
 * ΔG_{a+½} = G(a+1) − G(a) = ω_e − 2ω_e x_e(a+1) + …, a few per cent below ω_e. Name it so.
 */
function singleIntervalLabel(levels: readonly number[]): string {
  if (levels.length !== 2) return 'ΔG (one vibrational interval)';
  const [a, b] = levels as [number, number];
  return b - a === 1 ? `ΔG_${2 * a + 1}/2` : `ΔG(${a}→${b})/${b - a}`;
}

export function fitDunhamForSpecies(
  species: string,
  obs: readonly Observation[],
  mode: UncertaintyMode,
  alpha: number,
  orders: ReadonlyMap<string, number>,
  warnings: Warning[],
  /** Applied to the final fit (the covariance widened by source offsets carried in the fit). */
  adjust?: (fit: SolvedModel) => SolvedModel,
) {
  const plan = dunhamTermPlan(obs, orders, species);
  if (plan.nLevels < 2) {
    warnings.push({
      code: 'EQUILIBRIUM_NEEDS_TWO_LEVELS',
      message: `${species}: lines of one vibrational level give B_v, D_v of that level only; B_e and α_e need two or more levels`,
    });
    return undefined;
  }
  const sel = selectDunham(obs, plan.base, plan.candidates, mode, alpha, (terms) =>
    dunhamModel(dunhamParameters(species, terms, false)),
  );
  if (!sel) return undefined;
  if (sel.fit.degreesOfFreedom === 0 && mode === 'a-posteriori') {
    warnings.push({
      code: 'EQUILIBRIUM_UNDETERMINED',
      message: `${species}: the Dunham fit has no degrees of freedom left, so its uncertainties cannot be estimated; equilibrium constants are omitted`,
    });
    return undefined;
  }
  const { fit: unadjusted, terms, constrained } = withDunhamPriors(species, obs, sel, mode);
  const fit = adjust ? adjust(unadjusted) : unadjusted;
  const isConstrained = (k: number, l: number) => constrained.has(`${k},${l}`);
  warnings.push(...neglectedTermWarnings(species, plan, sel.terms, isConstrained));
  const constraints: TermConstraint[] = [...constrained.values()].map((p) => ({
    parameter: dunhamName('Y', p.term),
    key: p.key,
    species,
    prior: quantity(p.value, p.sigma, 'cm-1'),
    basis: p.basis,
  }));
  warnings.push(...constraints.map((c) => constrainedTermWarning(species, c)));
  const label = plan.nVib === 1 ? singleIntervalLabel(plan.levels) : undefined;
  const rename = new Map(label ? [['Y10', label]] : []);
  const report = {
    ...reportOf(species, fit, rename),
    ...(constraints.length > 0 ? { constrained: constraints } : {}),
  };
  // Equilibrium constants are read from the determined terms only (a constrained term is the prior, not a result),
  // with the covariance that already carries the constrained terms' uncertainty.
  const keep = terms.flatMap((t, i) => (isConstrained(t.k, t.l) ? [] : [i]));
  const p = terms.length;
  const set = {
    keys: keep.map((i) => `${(terms[i] as DunhamTerm).k},${(terms[i] as DunhamTerm).l}`),
    values: keep.map((i) => fit.values[i] as number),
    covariance: subCovariance(fit.covariance, p, keep),
  };
  return { report, set };
}

function constrainedTermWarning(species: string, c: TermConstraint): Warning {
  return {
    code: 'TERMS_CONSTRAINED',
    message: `${species}: the uncertainties of ${AFFECTS[c.parameter] ?? 'the equilibrium constants'} include that of ${SYMBOL[c.parameter] ?? c.parameter} (${c.parameter}), which the lines cannot determine and which is constrained to ${formatValue(c.prior.value)} ± ${formatValue(c.prior.uncertainty)} cm-1 (${c.basis})`,
  };
}

type DunhamSelection = NonNullable<ReturnType<typeof selectDunham>>;
type DunhamPrior = ReturnType<typeof dunhamPriors>[number];

/** The selected Dunham terms with the next ones carried as priors, when any can be formed and the fit stands. */
function withDunhamPriors(
  species: string,
  obs: readonly Observation[],
  sel: DunhamSelection,
  mode: UncertaintyMode,
): { fit: SolvedModel; terms: readonly DunhamTerm[]; constrained: Map<string, DunhamPrior> } {
  const values = new Map(sel.terms.map((t, i) => [`${t.k},${t.l}`, sel.fit.values[i] as number]));
  const priors = dunhamPriors(species, sel.terms, values);
  if (priors.length > 0) {
    const wider = [...sel.terms, ...priors.map((p) => p.term)];
    const c = solveModelWithPriors(
      dunhamModel(dunhamParameters(species, wider, false)),
      obs,
      priors,
      mode,
      reducedChiSquare(sel.fit) ?? 1,
      false,
    );
    if (!isRankDeficient(c)) {
      return { fit: c, terms: wider, constrained: new Map(priors.map((p) => [`${p.term.k},${p.term.l}`, p] as const)) };
    }
  }
  return { fit: sel.fit, terms: sel.terms, constrained: new Map() };
}

/** Which higher terms the equilibrium constants neglect, given the levels and intervals the lines reach. */
function neglectedTermWarnings(
  species: string,
  plan: ReturnType<typeof dunhamTermPlan>,
  selected: readonly DunhamTerm[],
  isConstrained: (k: number, l: number) => boolean,
): Warning[] {
  const has = (k: number, l: number) => selected.some((t) => t.k === k && t.l === l);
  const warnings: Warning[] = [];
  if (plan.nVib < 2) {
    warnings.push({
      code: 'VIBRATION_NEEDS_TWO_INTERVALS',
      message: `${species}: ω_e and ω_e x_e need two or more vibrational intervals (e.g. a fundamental and an overtone); the band origin is ΔG, not ω_e`,
    });
  } else if (!has(3, 0) && !isConstrained(3, 0)) {
    warnings.push({
      code: 'HIGHER_TERMS_NEGLECTED',
      message: `${species}: ω_e and ω_e x_e from two vibrational intervals neglect ω_e y_e`,
    });
  }
  if (plan.nLevels === 2 && !isConstrained(2, 1)) {
    warnings.push({
      code: 'HIGHER_TERMS_NEGLECTED',
      message: `${species}: B_e and α_e from two vibrational levels (B_e = B_0 + α_e/2) neglect γ_e and higher terms`,
    });
  }
  if (has(0, 2) && !has(1, 2) && !isConstrained(1, 2)) {
    warnings.push({
      code: 'HIGHER_TERMS_NEGLECTED',
      message: `${species}: D_e is taken as the same in every level (β_e not determined)`,
    });
  }
  return warnings;
}

export function fitMassReduced(
  obs: readonly Observation[],
  masses: ReadonlyMap<string, MassValue>,
  mode: UncertaintyMode,
  alpha: number,
  orders: ReadonlyMap<string, number>,
  warnings: Warning[],
  adjust?: (fit: SolvedModel) => SolvedModel,
): (DunhamFit & { species: 'all' }) | undefined {
  // The richest isotopologue sets the plan; the F test decides the rest.
  const structure = levelStructure(obs);
  let best = structure.species[0] as string;
  for (const s of structure.species) {
    if ((structure.levels.get(s)?.length ?? 0) > (structure.levels.get(best)?.length ?? 0)) best = s;
  }
  const plan = dunhamTermPlan(obs, orders, best);
  const mu = new Map([...masses].map(([k, v]) => [k, v.value]));
  const sel = selectDunham(obs, plan.base, plan.candidates, mode, alpha, (terms) =>
    dunhamModel(massReducedParameters(terms), mu),
  );
  if (!sel) {
    warnings.push({
      code: 'MASS_REDUCED_INDETERMINATE',
      message: 'the mass-reduced Dunham model could not be determined from these lines',
    });
    return undefined;
  }
  if (sel.fit.degreesOfFreedom === 0 && mode === 'a-posteriori') {
    warnings.push({
      code: 'MASS_REDUCED_INDETERMINATE',
      message: 'the mass-reduced Dunham fit has no degrees of freedom left',
    });
    return undefined;
  }
  return { ...reportOf('all', adjust ? adjust(sel.fit) : sel.fit), species: 'all' };
}

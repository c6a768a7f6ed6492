import { ScienceError } from '../../src/errors.js';
import { assignLinearLines, type LinearAssignResult } from '../../src/linear/assign.js';
import {
  fitLinearLines,
  type LinearFitResult,
  type LinearLevelResult,
  type LinearLineInput,
  type LinearLTypeLevelResult,
} from '../../src/linear/fit.js';
import { LINEAR_REFERENCE } from '../../src/linear/reference.js';
import { isLinearSpeciesString, type LinearSpecies, parseLinearSpecies } from '../../src/linear/species.js';
import type { LinearAssignment } from '../../src/linear/transitions.js';
import type { LinearLevel } from '../../src/linear/types.js';
import { toWavenumber } from '../../src/units.js';
import { SAFETY_NOTICE } from '../notice.js';
import type { FitRequest, FitResponse } from '../schemas/fit.js';
import { withAutomaticLinearAssignment } from './linear-assign.js';
import { peaksOf } from './peaks.js';

/** A level as the wire writes it ({ v, l, rank? }) and as src/linear holds it ({ v, l, r? }). */
export interface WireLevel {
  v: number[];
  l: number;
  rank?: number;
}
export const fromWire = (w: Readonly<WireLevel>): LinearLevel => ({
  v: [...w.v],
  l: w.l,
  ...(w.rank !== undefined ? { r: w.rank } : {}),
});
export const toWire = (x: LinearLevel): WireLevel => ({
  v: [...x.v],
  l: x.l,
  ...(x.r !== undefined ? { rank: x.r } : {}),
});

type Line = NonNullable<FitRequest['lines']>[number];
type Assignment = NonNullable<Line['assignment']>;
export const isLinearAssignment = (a: Line['assignment']): a is Assignment & { upper: WireLevel; lower: WireLevel } =>
  a !== undefined && a.upper !== undefined && a.lower !== undefined;

/** A linear assignment as src/linear takes it, from the wire form. */
export function assignmentFromWire(a: Assignment & { upper: WireLevel; lower: WireLevel }): LinearAssignment {
  return {
    upper: fromWire(a.upper),
    lower: fromWire(a.lower),
    branch: a.branch,
    j: a.j,
    ...(a.parity !== undefined ? { parity: a.parity } : {}),
  };
}

/**
 * Whether a fit request is about a linear polyatomic molecule: its species (declared or on an assignment) is a
 * chain or an everyday formula of src/linear/species.ts, or an assignment names upper and lower levels.
 */
export function isLinearFitRequest(req: FitRequest): boolean {
  if (req.species !== undefined && isLinearSpeciesString(req.species)) return true;
  return (req.lines ?? []).some(
    (l) =>
      isLinearAssignment(l.assignment) ||
      (l.assignment?.species !== undefined && isLinearSpeciesString(l.assignment.species)),
  );
}

/** The one linear species of a request (all lines of one isotopologue). */
function speciesOf(req: FitRequest): LinearSpecies {
  const named = new Set<string>();
  if (req.species !== undefined) named.add(parseLinearSpecies(req.species).formula);
  for (const l of req.lines ?? []) {
    if (l.assignment?.species !== undefined) named.add(parseLinearSpecies(l.assignment.species).formula);
  }
  if (named.size === 0) {
    throw new ScienceError(
      'SPECIES_UNIDENTIFIED',
      'a fit of linear polyatomic assignments needs "species" (e.g. "CO2", "16O-12C-16O")',
      {},
    );
  }
  if (named.size > 1) {
    throw new ScienceError(
      'INPUT_INVALID',
      `a linear polyatomic fit takes the lines of one isotopologue; this request names ${[...named].join(', ')}`,
      { species: [...named] },
    );
  }
  return parseLinearSpecies([...named][0] as string);
}

/** What the peak finder saw when a spectrum was sent (the diatomic response's `spectrum`). */
export interface SpectrumSummary {
  readonly points: number;
  readonly peaks: number;
  readonly noise: number;
  readonly step: number;
}

/**
 * A linear request as a line list: a spectrum sent instead of lines is turned into its peaks (position, the peak
 * finder's σ and integrated intensity, in cm⁻¹), which then go through automatic assignment and the fit like an
 * unassigned list. Requests with lines come back as they are.
 */
export function asLineRequest<R extends FitRequest>(req: R): { req: R; spectrum?: SpectrumSummary } {
  if (!req.spectrum) return { req };
  const found = peaksOf(req.spectrum, req.peakOptions);
  if (found.peaks.length === 0) {
    throw new ScienceError(
      'FIT_NO_ASSIGNED_LINES',
      `no peak stands above the detection threshold in the ${found.points}-point spectrum`,
      { points: found.points, noise: found.noise },
    );
  }
  const { spectrum: _s, peakOptions: _p, ...rest } = req;
  return {
    req: {
      ...rest,
      unit: 'cm-1',
      lines: found.peaks.map((p) => ({ position: p.position, uncertainty: p.uncertainty, intensity: p.intensity })),
    } as R,
    spectrum: { points: found.points, peaks: found.peaks.length, noise: found.noise, step: found.step },
  };
}

/** POST /v1/fits (and GraphQL `fit`, the CLI) for linear polyatomic molecules: lines (assigned or not) or a spectrum. */
export function runLinearFit(sent: FitRequest): FitResponse {
  const { req, spectrum } = asLineRequest(sent);
  const groups = isotopologueGroups(req);
  if (groups) return runIsotopologueFits(req, groups);
  const species = speciesOf(req);
  const unit = req.unit ?? 'cm-1';
  const lines: LinearLineInput[] = (req.lines ?? []).map((l, index) => {
    const c = toWavenumber(l.position, unit, l.uncertainty);
    const a = l.assignment;
    if (a !== undefined && (!isLinearAssignment(a) || a.band !== undefined)) {
      throw new ScienceError(
        'ASSIGNMENT_INVALID',
        `line ${index}: ${species.formula} is a linear polyatomic: write its assignment as { "upper": { "v": [..], "l": l }, "lower": { … }, "branch", "j" }, not as a band string`,
        { line: index },
      );
    }
    return {
      position: c.value,
      ...(c.uncertainty !== undefined ? { uncertainty: c.uncertainty } : {}),
      ...(l.source !== undefined ? { source: l.source } : {}),
      ...(a !== undefined ? { assignment: assignmentFromWire(a) } : {}),
    };
  });
  const {
    temperature: _t,
    maxOffset: _m,
    structureBand: _s,
    lean: _l,
    massReducedDunham: _u,
    fitSourceOffsets: _f,
    referenceSource: _r,
    ...options
  } = req.options ?? {};
  // No assignment at all: the library's bands are assigned first (services/usecases/linear-assign.ts).
  const auto = withAutomaticLinearAssignment(
    species.formula,
    lines,
    (req.lines ?? []).map((l) => l.intensity),
    {
      ...(req.options?.temperature !== undefined ? { temperature: req.options.temperature } : {}),
      ...(req.options?.maxOffset !== undefined ? { maxOffset: req.options.maxOffset } : {}),
    },
  );
  const others = otherIsotopologueLines(req, species.formula, auto.lines, auto.automatic);
  if (others) return withSpectrum(others, spectrum);
  const result = fitLinearLines(species, auto.lines, options);
  const response = presentLinearFit(req, result, auto.automatic, auto.result);
  return withSpectrum(response, spectrum);
}

function withSpectrum(r: FitResponse, spectrum: SpectrumSummary | undefined): FitResponse {
  return spectrum ? { ...r, spectrum } : r;
}

/** The molecule of a chain, mass numbers dropped ("16O-13C-16O" → "O-C-O"). */
const moleculeOf = (chain: string) =>
  chain
    .split('-')
    .map((a) => a.replace(/^\d+/, ''))
    .join('-');

/**
 * An unlabelled list of one molecule often holds its rarer isotopologues too (13C16O2 beside 12C16O2 at 1 %): the
 * lines the declared species left unassigned are assigned against the library's other isotopologues of the same
 * molecule, each kept when its numbering check passes with at least 6 lines; the list is then fitted per species
 * (runIsotopologueFits) with those lines marked automatic. Undefined when the list carried labels, when fewer than
 * 6 lines were left, or when no other isotopologue explains them.
 */
function otherIsotopologueLines(
  req: FitRequest,
  formula: string,
  lines: readonly LinearLineInput[],
  automatic: ReadonlySet<number>,
): FitResponse | undefined {
  const sent = req.lines ?? [];
  if (sent.some((l) => l.assignment !== undefined)) return undefined;
  let left = lines.flatMap((l, i) => (l.assignment ? [] : [i]));
  if (left.length < 6) return undefined;
  const found = new Map<number, { species: string; assignment: LinearAssignment }>();
  for (const ref of LINEAR_REFERENCE) {
    if (ref.formula === formula || moleculeOf(ref.formula) !== moleculeOf(formula) || left.length < 6) continue;
    const r = assignLinearLines(
      ref.formula,
      left.map((i) => lines[i] as LinearLineInput),
      req.options?.maxOffset !== undefined ? { maxOffset: req.options.maxOffset } : {},
    );
    const taken = r.lines.filter((l) => l.assignment);
    if (taken.length < 6 || r.numbering.length === 0 || !r.numbering.every((n) => n.ok)) continue;
    for (const l of taken) {
      found.set(left[l.index] as number, { species: ref.formula, assignment: l.assignment as LinearAssignment });
    }
    left = left.filter((i) => !found.has(i));
  }
  if (found.size === 0) return undefined;
  const labelled: FitRequest = {
    ...req,
    species: formula,
    lines: sent.map((l, i) => {
      const a = found.get(i)?.assignment ?? lines[i]?.assignment;
      if (!a) return l;
      return {
        ...l,
        assignment: {
          ...(found.has(i) ? { species: found.get(i)?.species } : {}),
          upper: toWire(a.upper),
          lower: toWire(a.lower),
          branch: a.branch,
          j: a.j,
          ...(a.parity !== undefined ? { parity: a.parity } : {}),
        },
      };
    }),
  } as FitRequest;
  const fit = runLinearFit(labelled);
  const auto = (i: number) => automatic.has(i) || found.has(i);
  return {
    ...fit,
    lines: fit.lines.map((l) =>
      l.assignment && auto(l.index) ? { ...l, assignment: { ...l.assignment, source: 'auto' as const } } : l,
    ),
    assignment: { ...fit.assignment, method: 'reference' },
  };
}

function presentLinearFit(
  req: FitRequest,
  r: LinearFitResult,
  automatic: ReadonlySet<number> = new Set(),
  assigned?: LinearAssignResult,
): FitResponse {
  const s = r.species.formula;
  const reqLines = req.lines ?? [];
  return {
    species: [{ formula: s, mass: r.species.mass }],
    convention: r.convention,
    lines: r.lines.map((l) => {
      const sent = reqLines[l.index];
      const a = l.assignment;
      return {
        index: l.index,
        ...(sent?.id !== undefined ? { id: sent.id } : {}),
        position: l.position,
        ...(sent?.uncertainty !== undefined && req.options?.lean !== true ? { uncertainty: lines0(req, l.index) } : {}),
        ...(sent?.intensity !== undefined && req.options?.lean !== true ? { intensity: sent.intensity } : {}),
        ...(a
          ? {
              assignment: {
                band: a.band,
                branch: a.branch,
                j: a.j,
                species: s,
                source: automatic.has(l.index) ? ('auto' as const) : ('given' as const),
                upper: toWire(a.upper),
                lower: toWire(a.lower),
                parity: a.lowerParity,
                upperParity: a.upperParity,
                upperJ: a.upperJ,
              },
            }
          : {}),
        ...(l.calculated !== undefined ? { calculated: l.calculated } : {}),
        ...(l.residual !== undefined ? { residual: l.residual } : {}),
        ...(l.studentisedResidual !== undefined ? { studentisedResidual: l.studentisedResidual } : {}),
        status: l.status,
        ...(l.reason !== undefined ? { reason: l.reason } : {}),
      };
    }),
    bands: r.bands.map((b) => ({
      species: s,
      band: b.label,
      ...(b.origin ? { origin: b.origin } : {}),
      lines: b.lines,
      jRange: [...b.jRange],
      upper: toWire(b.upper),
      lower: toWire(b.lower),
      label: b.label,
      kind: b.kind,
    })),
    levels: [...r.levels, ...r.lTypeLevels.map((l): Partial<LinearLevelResult> & LinearLTypeLevelResult => l)].map(
      (l) => {
        const level = { v: l.v, l: l.l, ...(keyRank(l.key) !== undefined ? { r: keyRank(l.key) } : {}) };
        return {
          species: s,
          v: [...l.v],
          l: l.l,
          ...(level.r !== undefined ? { rank: level.r } : {}),
          label: l.label,
          ...(l.term ? { term: { ...l.term, relativeTo: l.term.relativeTo } } : {}),
          ...(l.B ? { B: l.B } : {}),
          ...(l.D ? { D: l.D } : {}),
          ...(l.H ? { H: l.H } : {}),
          ...(l.q ? { q: l.q } : {}),
          ...(l.qJ ? { qJ: l.qJ } : {}),
          ...(l.parity ? { parity: l.parity } : {}),
        };
      },
    ),
    equilibrium: [],
    parameters: r.parameters.map((p) => ({
      name: p.name,
      value: p.value,
      uncertainty: p.uncertainty,
      unit: p.unit,
      species: s,
    })),
    covariance: { parameters: [...r.covariance.parameters], matrix: r.covariance.matrix.map((x) => [...x]) },
    correlation: { parameters: [...r.correlation.parameters], matrix: r.correlation.matrix.map((x) => [...x]) },
    statistics: { ...r.statistics },
    model: {
      levelTerms: r.model.levelTerms.map((t) => {
        const lv = r.levels.find((l) => l.key === t.level);
        return { species: s, v: [...(lv?.v ?? [])], l: lv?.l ?? 0, terms: [...t.terms] };
      }),
      selection: r.model.selection,
      constraints: r.model.constraints.map((c) => ({ ...c, species: s })),
    },
    dunham: [],
    combinationDifferences: r.combinationDifferences.map((c) => {
      const lv = r.levels.find((l) => l.label === c.level);
      return {
        species: s,
        band: c.band,
        kind: c.kind,
        v: [...(lv?.v ?? [])],
        level: c.level,
        points: c.points.map((p) => ({ ...p })),
        B: c.B,
        ...(c.D ? { D: c.D } : {}),
        rms: c.rms,
        degreesOfFreedom: c.degreesOfFreedom,
        fitted: c.fitted,
        deviation: c.deviation,
      };
    }),
    crossChecks: [],
    ...(r.scatter ? { scatter: r.scatter.map((g) => ({ ...g })) } : {}),
    assignment: assignmentReport(req, r, automatic, assigned),
    warnings: r.warnings.map((w) => ({
      code: w.code,
      message: w.message,
      ...(w.lines ? { lines: [...w.lines] } : {}),
    })),
    notice: SAFETY_NOTICE,
  };
}

/**
 * How the lines got their assignments: 'reference' when the library's bands assigned some (with each band's
 * predicted and matched lines), else 'given'; the lines left unassigned are the unexplained ones.
 */
function assignmentReport(
  req: FitRequest,
  r: LinearFitResult,
  automatic: ReadonlySet<number>,
  assigned: LinearAssignResult | undefined,
): FitResponse['assignment'] {
  const s = r.species.formula;
  const sent = req.lines ?? [];
  return {
    method: automatic.size > 0 ? 'reference' : 'given',
    species: [s],
    bands: (assigned?.bands ?? [])
      .filter((b) => b.predicted > 0)
      .map((b) => ({ species: s, band: b.label, predicted: b.predicted, matched: b.assigned })),
    unexplained: r.lines
      .filter((l) => l.status === 'unassigned')
      .map((l) => {
        const line = sent[l.index];
        return {
          index: l.index,
          ...(line?.id !== undefined ? { id: line.id } : {}),
          position: l.position,
          ...(line?.intensity !== undefined ? { intensity: line.intensity } : {}),
        };
      }),
  };
}

function keyRank(key: string): number | undefined {
  const m = /\|r(\d+)$/.exec(key);
  return m ? Number(m[1]) : undefined;
}

/** The uncertainty of line i in cm⁻¹ (converted like its position). */
function lines0(req: FitRequest, i: number): number | undefined {
  const l = req.lines?.[i];
  if (!l) return undefined;
  return toWavenumber(l.position, req.unit ?? 'cm-1', l.uncertainty).uncertainty;
}

/**
 * The lines of a request that names several isotopologues of linear molecules (on `assignment.species`; lines
 * without one belong to the declared `species`), grouped by chain in order of first appearance; undefined when
 * the request names one at most.
 */
function isotopologueGroups(req: FitRequest): Map<string, number[]> | undefined {
  const lines = req.lines ?? [];
  const declared = req.species !== undefined ? parseLinearSpecies(req.species).formula : undefined;
  const named = lines.map((l) =>
    l.assignment?.species !== undefined ? parseLinearSpecies(l.assignment.species).formula : declared,
  );
  const distinct = new Set(named.filter((x): x is string => x !== undefined));
  const missing = named.indexOf(undefined);
  // Lines that name a species beside lines that do not, and no declared species: which one the others belong to
  // is not said (fitting them as the named one would fit another molecule's lines).
  if (distinct.size <= 1 && !(distinct.size === 1 && missing >= 0)) return undefined;
  if (missing >= 0) {
    throw new ScienceError(
      'SPECIES_UNIDENTIFIED',
      `line ${missing}: other lines name ${[...distinct].join(', ')}; a line without "assignment.species" belongs to the declared "species", and none is declared`,
      { line: missing },
    );
  }
  const groups = new Map<string, number[]>();
  named.forEach((f, i) => {
    groups.set(f as string, [...(groups.get(f as string) ?? []), i]);
  });
  return groups;
}

/**
 * Several isotopologues in one request (12C16O2 and 13C16O2 ν3 in one list): each species gets its own fit and its
 * own constants (independent fits per isotopologue, SCIENCE.md §3), answered as one response. Lines keep their
 * request index; parameters and the covariance carry the species before each name ("16O-13C-16O B(0,0,0|0)"), the
 * covariance is block-diagonal (the fits share no parameter); statistics add up (χ²/ν over the summed degrees of
 * freedom, rms over every fitted line).
 */
function runIsotopologueFits(req: FitRequest, groups: ReadonlyMap<string, readonly number[]>): FitResponse {
  const sent = req.lines ?? [];
  const parts = [...groups].map(([formula, indices]) => {
    const sub: FitRequest = {
      ...req,
      species: formula,
      lines: indices.map((i) => {
        const l = sent[i] as Line;
        if (!l.assignment) return l;
        const { species: _s, ...a } = l.assignment;
        return { ...l, assignment: a };
      }),
    };
    return { formula, indices, fit: runLinearFit(sub) };
  });
  const back = (indices: readonly number[]) => (i: number) => indices[i] as number;
  const named = (formula: string, name: string) => `${formula} ${name}`;
  const lines = parts
    .flatMap(({ indices, fit }) => fit.lines.map((l) => ({ ...l, index: back(indices)(l.index) })))
    .sort((a, b) => a.index - b.index);
  const names = parts.flatMap(({ formula, fit }) => fit.covariance.parameters.map((n) => named(formula, n)));
  const blocks = (pick: (f: FitResponse) => { matrix: number[][] }) => {
    const out: number[][] = names.map(() => names.map(() => 0));
    let at = 0;
    for (const { fit } of parts) {
      const m = pick(fit).matrix;
      m.forEach((row, i) => {
        row.forEach((x, j) => {
          (out[at + i] as number[])[at + j] = x;
        });
      });
      at += m.length;
    }
    return out;
  };
  const stats = parts.map((p) => p.fit.statistics);
  const sum = (k: 'lines' | 'assigned' | 'fitted' | 'rejected' | 'unassigned' | 'parameters' | 'degreesOfFreedom') =>
    stats.reduce((t, x) => t + x[k], 0);
  const dof = sum('degreesOfFreedom');
  const fitted = sum('fitted');
  const chi = stats.every((x) => x.reducedChiSquare !== null)
    ? stats.reduce((t, x) => t + (x.reducedChiSquare as number) * x.degreesOfFreedom, 0)
    : null;
  const first = (parts[0] as { fit: FitResponse }).fit;
  return {
    ...first,
    species: parts.flatMap((p) => p.fit.species),
    lines,
    bands: parts.flatMap((p) => p.fit.bands),
    levels: parts.flatMap((p) => p.fit.levels),
    parameters: parts.flatMap(({ formula, fit }) =>
      fit.parameters.map((x) => ({ ...x, name: named(formula, x.name) })),
    ),
    covariance: { parameters: names, matrix: blocks((f) => f.covariance) },
    correlation: { parameters: names, matrix: blocks((f) => f.correlation as { matrix: number[][] }) },
    statistics: {
      ...first.statistics,
      lines: sum('lines'),
      assigned: sum('assigned'),
      fitted,
      rejected: sum('rejected'),
      unassigned: sum('unassigned'),
      parameters: sum('parameters'),
      degreesOfFreedom: dof,
      rms: Math.sqrt(stats.reduce((t, x) => t + x.rms * x.rms * x.fitted, 0) / Math.max(1, fitted)),
      reducedChiSquare: chi !== null && dof > 0 ? chi / dof : null,
      conditionNumber: stats.some((x) => x.conditionNumber !== null)
        ? Math.max(...stats.map((x) => x.conditionNumber ?? 0))
        : null,
    },
    model: {
      levelTerms: parts.flatMap((p) => p.fit.model.levelTerms),
      selection: parts.map((p) => `${p.formula}: ${p.fit.model.selection}`).join(' '),
      constraints: parts.flatMap((p) => p.fit.model.constraints ?? []),
    },
    combinationDifferences: parts.flatMap((p) => p.fit.combinationDifferences),
    ...(parts.some((p) => p.fit.scatter)
      ? {
          scatter: parts.flatMap(({ formula, fit }) =>
            (fit.scatter ?? []).map((g) => ({ ...g, group: `${formula} ${g.group}` })),
          ),
        }
      : {}),
    assignment: {
      method: parts.some((p) => p.fit.assignment.method === 'reference') ? 'reference' : 'given',
      species: parts.map((p) => p.formula),
      bands: parts.flatMap((p) => p.fit.assignment.bands),
      unexplained: parts
        .flatMap(({ indices, fit }) => fit.assignment.unexplained.map((u) => ({ ...u, index: back(indices)(u.index) })))
        .sort((a, b) => a.index - b.index),
    },
    warnings: parts.flatMap(({ formula, indices, fit }) =>
      fit.warnings.map((w) => ({
        ...w,
        message: `${formula}: ${w.message}`,
        ...(w.lines ? { lines: w.lines.map(back(indices)) } : {}),
      })),
    ),
  };
}

import type { CrossCheck, EquilibriumConstants } from '../derive/equilibrium.js';
import type { Quantity } from '../derive/quantity.js';
import type { Branch, Transition } from '../models/transitions.js';
import type { CombinationDifferenceFit } from './combination-differences.js';
import type { UncertaintyMode } from './engine.js';
import type { TermConstraint } from './truncation.js';
import type { ScatterEstimate, ScatterGroup, ScatterReuse } from './weights.js';

/** The types a line-list fit takes and returns (the stages in src/fit/ each fill a part of FitResult). */

export interface LineInput {
  /** Position in cm⁻¹. */
  readonly position: number;
  /** Standard uncertainty in cm⁻¹. */
  readonly uncertainty?: number;
  readonly intensity?: number;
  /** A label of the instrument or file the line came from; scatter is estimated per source. */
  readonly source?: string;
  readonly assignment?: Transition & { readonly source: 'given' | 'auto' };
}

export interface FitOptions {
  /** Default 'a-posteriori'. */
  readonly uncertaintyMode?: UncertaintyMode;
  /** Studentised-residual threshold for rejecting a line; 0 turns rejection off. Default 4. */
  readonly rejectionThreshold?: number;
  /** Most lines that may be rejected, as a fraction of the assigned lines. Default 0.2. */
  readonly maxRejectedFraction?: number;
  /** p-value below which an added term counts as supported by the data (F test). Default 0.01. */
  readonly termSignificance?: number;
  /** Highest centrifugal term of the level model: 1 = B, 2 = D, 3 = H, 4 = L, 5 = M. Default 5. */
  readonly maxCentrifugalOrder?: number;
  /** Also fit one mass-reduced Dunham model (U_kl) across isotopologues. Default false. */
  readonly massReducedDunham?: boolean;
  /**
   * Fit the level model only, skipping Dunham, combination differences and cross-checks (for the inner loop of
   * automatic assignment). Default false.
   */
  readonly levelsOnly?: boolean;
  /**
   * Skip the checks that only add warnings (repeats, duplicates, source offsets, scale and quality, constrained
   * terms): for the inner fits of automatic assignment, which read the lines, levels and predictions only. The
   * lines, parameters and everything else are those of the full fit. Default false.
   */
  readonly withoutChecks?: boolean;
  /**
   * An earlier fit's scatter estimate for the lines without σ, reused while their groups stand (see
   * weights.ts#ScatterReuse; for the inner loop of automatic assignment, whose list grows a few lines a round).
   */
  readonly reuseScatter?: ScatterReuse;
  /**
   * Carry each source's wavenumber offset (against the reference source) as a nuisance parameter of the fit, so
   * that band origins and constants are free of it and their σ include its uncertainty: true always (with two or
   * more sources), false never; default: when an offset lies beyond SOURCE_OFFSET_FLAG standard errors.
   */
  readonly fitSourceOffsets?: boolean;
  /** The source the others' offsets are measured against. Default: the source with most fitted lines. */
  readonly referenceSource?: string;
}

/** Each source's wavenumber offset against the reference source (present with lines of two or more sources). */
export interface SourceOffsetReport {
  readonly reference: string;
  /** Whether the offsets were carried in the fit (band origins and constants are then free of them). */
  readonly applied: boolean;
  /**
   * Why: 'flagged' (an offset beyond 3σ), 'flagged, reference unverified' (not carried: a loop of bands alone
   * determines it, see source-offsets.ts#referenceVouched) or 'not flagged' by default; 'asked' / 'not asked' with
   * fitSourceOffsets
   * (asked but not applied: no offset is determined by the lines).
   */
  readonly basis: 'flagged' | 'flagged, reference unverified' | 'asked' | 'not flagged' | 'not asked';
  readonly sources: readonly {
    readonly source: string;
    /** Lines of this source in the fit. */
    readonly lines: number;
    /** Offset (this source's positions minus the reference's) and σ; absent when the lines cannot determine it. */
    readonly offset?: Quantity;
  }[];
}

/**
 * The additive offset common to every line of a one-instrument list, when its bands fix the absolute scale (a loop of
 * bands such as 2-0 against 1-0 + 2-1, or a pure-rotation band): fit-lines.ts stage 8, loop-offset.ts.
 */
export interface ScaleOffsetReport {
  /** The lines' positions minus the scale the loop fixes, cm⁻¹. */
  readonly offset: Quantity;
  /** Whether it was carried in the fit (band origins and constants are then free of it). */
  readonly applied: boolean;
  /**
   * 'flagged' (beyond 3σ, carried), 'not flagged' (reported only), 'too large' (beyond 3σ but over 1 cm⁻¹: a band
   * labelled wrong, not carried), 'asked' / 'not asked' (fitSourceOffsets).
   */
  readonly basis: 'flagged' | 'asked' | 'not flagged' | 'not asked' | 'too large';
  /** The bands whose lines fixed it. */
  readonly bands: readonly string[];
}

export interface Warning {
  readonly code: string;
  readonly message: string;
  readonly lines?: readonly number[];
}

export type LineStatus = 'fitted' | 'rejected' | 'unassigned';

export interface LineOutcome {
  readonly index: number;
  readonly position: number;
  /** The intensity sent with the line, echoed. */
  readonly intensity?: number;
  readonly assignment?: {
    readonly band: string;
    readonly branch: Branch;
    readonly j: number;
    readonly species: string;
    readonly source: 'given' | 'auto';
  };
  readonly calculated?: number;
  readonly residual?: number;
  readonly studentisedResidual?: number;
  readonly status: LineStatus;
  readonly reason?: string;
}

export interface NamedQuantity extends Quantity {
  readonly name: string;
  readonly species?: string;
}

export interface Statistics {
  readonly lines: number;
  readonly assigned: number;
  readonly fitted: number;
  readonly rejected: number;
  readonly unassigned: number;
  readonly parameters: number;
  readonly degreesOfFreedom: number;
  readonly rms: number;
  readonly reducedChiSquare: number | null;
  readonly conditionNumber: number | null;
  readonly uncertaintyMode: UncertaintyMode;
}

export interface DunhamFit {
  readonly species: string;
  readonly parameters: readonly NamedQuantity[];
  readonly covariance: { readonly parameters: readonly string[]; readonly matrix: readonly (readonly number[])[] };
  readonly statistics: {
    readonly degreesOfFreedom: number;
    readonly rms: number;
    readonly reducedChiSquare: number | null;
  };
  readonly terms: readonly string[];
  /** Terms carried with a prior (not determined by the lines), when any. */
  readonly constrained?: readonly TermConstraint[];
}

export interface FitResult {
  readonly species: readonly { readonly formula: string; readonly reducedMass: Quantity }[];
  readonly lines: readonly LineOutcome[];
  readonly bands: readonly {
    readonly species: string;
    readonly band: string;
    readonly origin?: Quantity;
    readonly lines: number;
    readonly jRange: readonly [number, number];
  }[];
  readonly levels: readonly {
    readonly species: string;
    readonly v: number;
    readonly term?: Quantity & { readonly relativeTo: number };
    readonly B: Quantity;
    readonly D?: Quantity;
    readonly H?: Quantity;
    readonly L?: Quantity;
    readonly M?: Quantity;
    readonly r?: Quantity;
  }[];
  readonly equilibrium: readonly ({ readonly species: string } & EquilibriumConstants)[];
  readonly parameters: readonly NamedQuantity[];
  readonly covariance: { readonly parameters: readonly string[]; readonly matrix: readonly (readonly number[])[] };
  readonly correlation: { readonly parameters: readonly string[]; readonly matrix: readonly (readonly number[])[] };
  readonly statistics: Statistics;
  readonly model: {
    readonly levelTerms: readonly { readonly species: string; readonly v: number; readonly terms: readonly string[] }[];
    readonly selection: string;
    /** Terms the lines cannot determine, carried as constrained parameters with a prior (see truncation.ts). */
    readonly constraints: readonly TermConstraint[];
  };
  readonly dunham: readonly DunhamFit[];
  readonly massReducedDunham?: DunhamFit & { readonly species: 'all' };
  readonly combinationDifferences: readonly (CombinationDifferenceFit & {
    readonly fitted: Quantity;
    readonly deviation: number;
  })[];
  readonly crossChecks: readonly ({ readonly species: string } & CrossCheck)[];
  /**
   * Line uncertainties estimated from the scatter of the residuals, per band or per source, for the lines sent
   * without one (absent when every line came with its uncertainty).
   */
  readonly scatter?: readonly ScatterGroup[];
  /** Per-source offsets against a reference source, with lines of two or more sources. */
  readonly sourceOffsets?: SourceOffsetReport;
  readonly scaleOffset?: ScaleOffsetReport;
  readonly warnings: readonly Warning[];
}

/** What the automatic assignment needs besides the result: predictions of the fitted level model. */
export interface DetailedFit {
  readonly result: FitResult;
  /**
   * Position and variance of a transition predicted by the fitted level model, when both its levels were fitted
   * (and, for a vibrational band, lie in one connected set of levels); otherwise undefined.
   */
  predict(t: Transition): { value: number; variance: number } | undefined;
  /** s² = χ²/(n−p) of the level fit (1 when undefined). */
  readonly scale: number;
  /**
   * Standard uncertainty (cm⁻¹) a line of this transition would carry in the fit: its own σ when it has one,
   * otherwise the scatter estimated for its source, its band, or all lines without σ; in every case scaled by √s²
   * (a-posteriori mode). Use it with `predict(t).variance` for tolerances: |obs − pred| ≤ k √(σ² + var).
   */
  lineSigma(t: Transition, own?: { readonly uncertainty?: number; readonly source?: string }): number;
  /** The scatter estimate of the lines without σ, when there were such lines (for `FitOptions.reuseScatter`). */
  readonly scatterEstimate?: ScatterEstimate;
  /**
   * The scatter the selected level fit leaves on its lines without σ (weights.ts#scatterOfFit), for the next fit of a
   * grown list to reuse (`FitOptions.reuseScatter`) without estimating afresh; undefined when it cannot be measured.
   */
  scatterOfResiduals(): ScatterEstimate | undefined;
}

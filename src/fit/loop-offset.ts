import { quantity } from '../derive/quantity.js';
import type { SolvedModel, UncertaintyMode } from './engine.js';
import { type AbsoluteOffset, absoluteOffset } from './source-offsets.js';
import type { DetailedFit, FitResult, LineInput, ScaleOffsetReport, Warning } from './types.js';

/**
 * Stage 8 for the lines of one instrument: the additive offset of its wavenumber scale, when the bands fix it (a loop
 * such as 2-0 against 1-0 + 2-1 closes at the offset instead of 0; a pure-rotation band extrapolates to it at J = 0).
 * The lines cannot absorb such an offset into the band origins, so a fit without it leaves the loop's misfit in the
 * residuals of whole bands: residuals of one sign per band, a scatter many times the lines' σ, band origins off by
 * several of their σ (held-out scans with an offset of 0.1–0.16 cm⁻¹ and a loop: rms 0.03–0.05 cm⁻¹ for σ 5e-4, the
 * 1-0 origin 2–4 σ off). Beyond SOURCE_OFFSET_FLAG σ, or when the caller asks (fitSourceOffsets), it is carried as a
 * parameter: positions corrected, the stages run again, every covariance widened by the offset's variance.
 */

/** What a pass of the fit gives this stage (fit-lines.ts#fitPass). */
export interface OffsetPass {
  readonly detailed: DetailedFit;
  readonly selected: SolvedModel;
  readonly mode: UncertaintyMode;
}

/** The carried offset as fitPass takes it: one "source" holding every line. */
export interface CarriedScaleOffset {
  readonly fitted: readonly string[];
  readonly covariance: readonly (readonly number[])[];
  readonly sourceOf: (line: number) => string | undefined;
}

const EVERY_LINE = 'every line';

/** Most passes with the offset carried (the first estimate is refined on the corrected lines). */
const MAX_PASSES = 3;

/**
 * The first pass with the scale offset reported, and carried when flagged or asked. `flag` is the bar in σ,
 * `asked` options.fitSourceOffsets, `refit` one pass of the stages on corrected positions with the offset carried.
 */
export function withScaleOffset(
  input: readonly LineInput[],
  first: OffsetPass,
  flag: number,
  asked: boolean | undefined,
  refit: (corrected: readonly LineInput[], carried: CarriedScaleOffset) => OffsetPass,
): DetailedFit {
  const found = absoluteOffset(first.selected, first.mode);
  if (!found) return first.detailed;
  const flagged = Math.abs(found.value) > flag * found.uncertainty;
  const plausible = Math.abs(found.value) <= PLAUSIBLE_OFFSET;
  const basis =
    asked !== undefined
      ? asked
        ? 'asked'
        : 'not asked'
      : !flagged
        ? 'not flagged'
        : plausible
          ? 'flagged'
          : 'too large';
  if (!(asked ?? (flagged && plausible))) {
    const report = scaleOffsetReport(found, false, basis);
    const warnings = flagged ? [scaleOffsetWarning(found, false, plausible)] : [];
    return withReport(first.detailed, report, warnings);
  }
  const carried = carryScaleOffset(input, found, refit);
  const d = carried.pass.detailed;
  const delta = carried.offset.value;
  const lines = d.result.lines.map((l) => ({
    ...l,
    position: input[l.index]?.position as number,
    ...(l.calculated !== undefined ? { calculated: l.calculated + delta } : {}),
  }));
  // Predictions on the scale the lines were sent on, as `calculated` is (automatic assignment places lines by them).
  const variance = carried.offset.uncertainty ** 2;
  const predict: DetailedFit['predict'] = (t) => {
    const p = d.predict(t);
    return p && { value: p.value + delta, variance: p.variance + variance };
  };
  const report = scaleOffsetReport(carried.offset, true, basis);
  const warnings = flagged ? [scaleOffsetWarning(carried.offset, true, plausible)] : [];
  return withReport({ ...d, predict, result: { ...d.result, lines } }, report, warnings);
}

/**
 * Largest common offset carried without the caller's word, cm⁻¹. An instrument's calibration is off by hundredths to
 * tenths of a cm⁻¹ (the assignment searches ±0.5 by default); a loop that misses by more says a band is numbered or
 * labelled wrong, and carrying that would spread the error over every band.
 */
const PLAUSIBLE_OFFSET = 1;

/** Positions corrected by δ and the pass repeated until δ has settled to 1 % of its σ (at most MAX_PASSES). */
function carryScaleOffset(
  input: readonly LineInput[],
  start: AbsoluteOffset,
  refit: (corrected: readonly LineInput[], carried: CarriedScaleOffset) => OffsetPass,
): { pass: OffsetPass; offset: AbsoluteOffset } {
  let offset = start;
  for (let k = 1; ; k++) {
    const corrected = input.map((l) => ({ ...l, position: l.position - offset.value }));
    const carried = { fitted: [EVERY_LINE], covariance: [[offset.uncertainty ** 2]], sourceOf: () => EVERY_LINE };
    const pass = refit(corrected, carried);
    if (k >= MAX_PASSES) return { pass, offset };
    const again = absoluteOffset(pass.selected, pass.mode);
    if (!again) return { pass, offset };
    const settled =
      Math.abs(again.value) < 0.01 * again.uncertainty && Math.abs(again.uncertainty / offset.uncertainty - 1) < 0.01;
    if (settled) return { pass, offset };
    offset = { ...again, value: offset.value + again.value };
  }
}

function scaleOffsetReport(o: AbsoluteOffset, applied: boolean, basis: ScaleOffsetReport['basis']): ScaleOffsetReport {
  return { offset: quantity(o.value, o.uncertainty, 'cm-1'), applied, basis, bands: o.bands };
}

function withReport(d: DetailedFit, scaleOffset: ScaleOffsetReport, warnings: readonly Warning[]): DetailedFit {
  const result: FitResult = { ...d.result, scaleOffset, warnings: [...d.result.warnings, ...warnings] };
  return { ...d, result };
}

function scaleOffsetWarning(o: AbsoluteOffset, applied: boolean, plausible: boolean): Warning {
  const z = Math.abs(o.value) / o.uncertainty;
  const what = `the bands ${o.bands.join(', ')} fix the absolute wavenumber scale (a loop of bands, or a pure-rotation band), and their lines hold a common offset of ${o.value.toPrecision(4)} ± ${o.uncertainty.toPrecision(2)} cm-1 (${z.toFixed(1)}σ from 0)`;
  if (!plausible && !applied)
    return {
      code: 'SCALE_OFFSET',
      message: `${what}: more than ${PLAUSIBLE_OFFSET} cm-1, which no calibration explains; a band is probably numbered or labelled wrong (check the loop's bands), so it was not carried (options.fitSourceOffsets true carries it)`,
    };
  return {
    code: 'SCALE_OFFSET',
    message: applied
      ? `${what}: the instrument's calibration, or a shift common to every line; it was carried in the fit, so band origins, levels and constants are free of it and their σ include its uncertainty (scaleOffset; options.fitSourceOffsets false leaves it in)`
      : `${what}: the instrument's calibration, or a shift common to every line; it was not carried (options.fitSourceOffsets false), so the band origins hold it and the bands' residuals show it`,
  };
}

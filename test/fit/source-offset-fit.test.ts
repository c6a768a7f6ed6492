import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { type FitResult, fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * A source offset carried in the fit, on the 494 real 12C16O database lines of test/fixtures/co-database-lines
 * (source named in its SOURCE.md): 0-0, 1-0 and 2-1 as "ftir-A", 2-0 and 3-0 as "laser-B", laser-B moved by a
 * shift the test applies itself. The check is against the fits of the unshifted list (the same real lines): once
 * the offset is carried, the 2-0 origin must lie within 3σ of the uncarried one, σ being the carried fit's, and
 * agree with the carried one.
 */
const iso = parseSpecies('12C-16O');
const masses = new Map([[iso.formula, reducedMass(iso)]]);
type Db = (typeof CO_DATABASE.lines)[number];
const sourceOf = (l: Db) => (['0-0', '1-0', '2-1'].includes(l.band) ? 'ftir-A' : 'laser-B');
function coLines(shift: number, withSigma: boolean): LineInput[] {
  return CO_DATABASE.lines.map((l) => {
    const [upper, lower] = l.band.split('-').map(Number) as [number, number];
    return {
      position: l.position + (sourceOf(l) === 'laser-B' ? shift : 0),
      ...(withSigma ? { uncertainty: l.uncertainty } : {}),
      source: sourceOf(l),
      assignment: { species: iso.formula, band: { upper, lower }, branch: l.branch, j: l.j, source: 'given' },
    } as LineInput;
  });
}
const origin20 = (r: FitResult) =>
  r.bands.find((b) => b.band === '2-0')?.origin as { value: number; uncertainty: number };
const offsetOf = (r: FitResult, s: string) => r.sourceOffsets?.sources.find((x) => x.source === s);

describe('real CO list from two sources: the offset carried in the fit', () => {
  for (const withSigma of [false, true]) {
    const base = fitLineList(coLines(0, withSigma), masses);
    const carriedBase = fitLineList(coLines(0, withSigma), masses, { fitSourceOffsets: true });
    it(`${withSigma ? 'with' : 'without'} σ, unshifted: reported, not flagged, not carried; fit unchanged`, () => {
      expect(base.sourceOffsets?.applied).toBe(false);
      expect(base.sourceOffsets?.basis).toBe('not flagged');
      expect(base.sourceOffsets?.reference).toBe('ftir-A');
      const { sourceOffsets: _a, ...asked } = fitLineList(coLines(0, withSigma), masses, { fitSourceOffsets: false });
      const { sourceOffsets: _b, ...auto } = base;
      expect(auto).toEqual(asked);
    });
    for (const shift of [0.0005, -0.0005, 0.002, -0.002, 0.01, -0.01]) {
      it(`${withSigma ? 'with' : 'without'} σ, laser-B ${shift > 0 ? '+' : ''}${shift}: flagged, carried, 2-0 origin as the unshifted list's`, () => {
        const lines = coLines(shift, withSigma);
        const r = fitLineList(lines, masses);
        expect(r.sourceOffsets).toMatchObject({ reference: 'ftir-A', applied: true, basis: 'flagged' });
        expect(offsetOf(r, 'ftir-A')?.offset?.value).toBe(0);
        const o = offsetOf(r, 'laser-B');
        expect(o?.lines).toBeGreaterThan(150);
        expect(Math.abs((o?.offset?.value as number) - shift)).toBeLessThan(3 * (o?.offset?.uncertainty as number));
        const b = origin20(r);
        const b0 = origin20(base);
        // Against the unshifted fit, within 3σ: the real list carries its own disagreement between laser-B's bands
        // (2-0, 3-0) and the loop through ftir-A's, −1.0 ± 0.4 × 10⁻⁶ cm⁻¹ with σ as stated (measured, 2.5σ, below
        // the 3σ flag), which the carried offset takes up with the shift.
        expect(Math.abs(b.value - b0.value), `${b.value} ± ${b.uncertainty} vs ${b0.value}`).toBeLessThan(
          3 * b.uncertainty,
        );
        // Against the unshifted list with its offset carried too: the shift is taken up whole.
        const b1 = origin20(carriedBase);
        expect(Math.abs(b.value - b1.value), `${b.value} vs ${b1.value}`).toBeLessThan(0.05 * b.uncertainty);
        // Positions as sent; position − calculated is still the residual.
        for (const l of r.lines) {
          expect(l.position).toBe(lines[l.index]?.position);
          if (l.calculated !== undefined && l.residual !== undefined)
            expect(Math.abs(l.position - l.calculated - l.residual)).toBeLessThan(1e-9);
        }
        expect(r.warnings.some((w) => w.code === 'SOURCE_MEAN_RESIDUALS')).toBe(true);
      });
    }
    it(`${withSigma ? 'with' : 'without'} σ, +0.002 not carried (asked not to): the 2-0 origin is off by far more than 2σ`, () => {
      const r = fitLineList(coLines(0.002, withSigma), masses, { fitSourceOffsets: false });
      expect(r.sourceOffsets).toMatchObject({ applied: false, basis: 'not asked' });
      // Against the unshifted fit's σ (the missed shift also inflates the a-posteriori σ of this fit).
      const b0 = origin20(base);
      expect(Math.abs(origin20(r).value - b0.value)).toBeGreaterThan(20 * b0.uncertainty);
    });
  }

  // Bands from v = 0 only (1-0, 2-0, 3-0: no loop, no pure rotation), each split between the sources by the parity
  // of J: a shift common to all lines is then an origin change, only the relative offset is determined, and naming
  // the other source the reference gives the same fit on laser-B's scale (ftir-A's offset −δ, origins moved by δ).
  // With a loop or a pure-rotation band the lines fix the absolute scale and the reference is taken as calibrated
  // (DEVELOPERS.md, "source offsets"), so there the choice changes more than the sign.
  it('the caller names laser-B the reference: ftir-A carries the opposite offset, origins on laser-B’s scale', () => {
    const cold = CO_DATABASE.lines
      .filter((l) => ['1-0', '2-0', '3-0'].includes(l.band))
      .map((l) => {
        const [upper, lower] = l.band.split('-').map(Number) as [number, number];
        const source = l.j % 2 === 0 ? 'ftir-A' : 'laser-B';
        return {
          position: l.position + (source === 'laser-B' ? 0.002 : 0),
          source,
          assignment: { species: iso.formula, band: { upper, lower }, branch: l.branch, j: l.j, source: 'given' },
        } as LineInput;
      });
    const byA = fitLineList(cold, masses, { referenceSource: 'ftir-A' });
    const byB = fitLineList(cold, masses, { referenceSource: 'laser-B' });
    expect(byA.sourceOffsets).toMatchObject({ reference: 'ftir-A', applied: true });
    expect(byB.sourceOffsets).toMatchObject({ reference: 'laser-B', applied: true });
    expect(byB.sourceOffsets?.sources[0]?.source).toBe('laser-B');
    const a = offsetOf(byB, 'ftir-A')?.offset;
    const b = offsetOf(byA, 'laser-B')?.offset;
    expect(Math.abs((b?.value as number) - 0.002)).toBeLessThan(3 * (b?.uncertainty as number));
    expect(Math.abs((a?.value as number) + (b?.value as number))).toBeLessThan(1e-3 * (b?.uncertainty as number));
    const shifted = origin20(byB);
    expect(Math.abs(shifted.value - (origin20(byA).value + (b?.value as number)))).toBeLessThan(
      1e-3 * shifted.uncertainty,
    );
  });

  // No 0-0 lines: the loop 2-0 against 1-0 + 2-1 alone determines 2δ(ftir-A) − δ(laser-B), so an offset against
  // either source holds that source's own miscalibration. Shift ftir-A: flagged, not carried, warned; carried as
  // asked once the calibrated laser-B is named the reference, the 2-0 origin then near the unshifted list's.
  it('a loop alone, ftir-A shifted +0.002: not carried by default; carried against laser-B when asked', () => {
    const loopOnly = (shift: number) =>
      coLines(0, false)
        .filter((l) => l.assignment?.band.upper !== 0)
        .map((l) => (l.source === 'ftir-A' ? { ...l, position: l.position + shift } : l));
    const r = fitLineList(loopOnly(0.002), masses);
    expect(r.sourceOffsets).toMatchObject({ applied: false, basis: 'flagged, reference unverified' });
    expect(r.warnings.some((w) => w.code === 'SOURCE_OFFSET_NOT_CARRIED')).toBe(true);
    const named = fitLineList(loopOnly(0.002), masses, { referenceSource: 'laser-B', fitSourceOffsets: true });
    expect(named.sourceOffsets).toMatchObject({ reference: 'laser-B', applied: true, basis: 'asked' });
    const a = offsetOf(named, 'ftir-A')?.offset;
    expect(Math.abs((a?.value as number) - 0.002)).toBeLessThan(3 * (a?.uncertainty as number));
    const b = origin20(named);
    // Against the unshifted list fitted the same way. Measured 2.2σ (2.4σ against its default fit): the shifted
    // first pass rejects other lines than the unshifted one and the passes stop at 3, so the bar here is 3σ.
    const b0 = origin20(fitLineList(loopOnly(0), masses, { referenceSource: 'laser-B', fitSourceOffsets: true }));
    expect(Math.abs(b.value - b0.value), `${b.value} ± ${b.uncertainty} vs ${b0.value}`).toBeLessThan(
      3 * b.uncertainty,
    );
  });

  it('a reference source no line has is an input error naming the field', () => {
    let thrown: unknown;
    try {
      fitLineList(coLines(0, false), masses, { referenceSource: 'laser-C' });
    } catch (e) {
      thrown = e;
    }
    expect(thrown).toBeInstanceOf(ScienceError);
    expect((thrown as ScienceError).code).toBe('INPUT_INVALID');
    expect((thrown as ScienceError).details.field).toBe('referenceSource');
  });

  it('one source: no sourceOffsets in the result', () => {
    const lines = coLines(0, false).map(({ source: _s, ...l }) => l);
    expect(fitLineList(lines, masses).sourceOffsets).toBeUndefined();
  });
});

import { describe, expect, it } from 'vitest';
import {
  type AssignContext,
  bandReach,
  beyondWindow,
  type CandidateRef,
  explained,
  fitDroppingThinBands,
  fittedPrediction,
  type LoopState,
  lineInputs,
  matchRound,
  noteCompetitions,
  nothingAssigned,
  type OffsetVotes,
  type PeakInput,
  pairKey,
  predictionOf,
  prepareAssignment,
  pruneImplausibleBands,
  type ResidualStatistics,
  type RoundModel,
  referenceDunham,
  referencePrediction,
  residualStatistics,
  stillProposed,
  tryFit,
  voteOffsets,
  widenSeeds,
  withdrawRejected,
  withdrawStrayBands,
  withinReach,
} from '../../src/assign/assign-lines.js';
import type { CandidateLine } from '../../src/assign/candidates.js';
import type { DetailedFit } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE, type CoDatabaseLine } from '../helpers/co-database.js';

// The stages of the automatic assignment that read its context (src/assign/assign-lines.ts), called directly on a
// context prepared from real 12C16O lines (test/fixtures/co-database-lines: HITRAN2020, Gordon et al., JQSRT 277,
// 107949 (2022)), with offsets, residual statistics and fits made by hand where the stage only reads them: the
// expected tolerances are the formulas of SCIENCE.md §6 worked out here. Everything runs inside `it`.

const CO = '12C-16O';
const BK = '12C-16O|1-0';

const band = (b: string, jMax: number, jMin = 0) =>
  CO_DATABASE.lines.filter((l) => l.band === b && l.j <= jMax && l.j >= jMin);

function coContext(peaks: readonly PeakInput[], options = {}): AssignContext {
  const iso = parseSpecies('12C16O');
  return prepareAssignment(peaks, [{ iso, abundance: 1 }], new Map([[iso.formula, reducedMass(iso)]]), options);
}

const fundamental = (jMax = 10, sigma?: number) =>
  coContext(
    band('1-0', jMax).map((l) => ({ position: l.position, ...(sigma !== undefined ? { uncertainty: sigma } : {}) })),
  );

/** The candidate of a transition in the context, as the stages take it. */
function ref(ctx: AssignContext, upper: number, lower: number, branch: 'P' | 'R', j: number): CandidateRef {
  const ci = ctx.cands.findIndex(
    (c) => c.band.upper === upper && c.band.lower === lower && c.branch === branch && c.j === j,
  );
  if (ci < 0) throw new Error('no such candidate');
  const b = ctx.candBand[ci] as number;
  return { c: ctx.cands[ci] as CandidateLine, ci, band: b, bk: ctx.bands[b] as string };
}

/** Offsets fixed by hand: every band and source the same. */
const fixed = (offset: number, tolerance: number, established = false): OffsetVotes => ({
  bySource: new Map(),
  perBand: new Map(),
  of: () => ({ offset, tolerance, own: false, ...(established ? { established } : {}) }),
});

const stats = (shift: number, scatter: number, sigmaFactor: number): ResidualStatistics => ({
  of: () => ({ shift, scatter, sigmaFactor }),
});

/** The fixture's lines assigned to their published labels among the context's candidates. */
function published(ctx: AssignContext, lines: readonly CoDatabaseLine[]): Map<number, CandidateLine> {
  const auto = new Map<number, CandidateLine>();
  lines.forEach((l, i) => {
    const [u, lo] = l.band.split('-').map(Number) as [number, number];
    auto.set(i, ref(ctx, u, lo, l.branch, l.j).c);
  });
  return auto;
}

describe('the prepared context', () => {
  it('sources numbered by first appearance among the free lines; −1 for a given line of a source no free line has', () => {
    const lines = band('1-0', 3);
    const peaks: PeakInput[] = lines.map((l, i) => ({ position: l.position, source: i % 2 ? 'b' : 'a' }));
    peaks.push({
      position: 2200,
      source: 'c',
      assignment: { species: CO, band: { upper: 1, lower: 0 }, branch: 'R', j: 13, source: 'given' },
    });
    const ctx = coContext(peaks);
    expect(ctx.sources).toEqual(['a', 'b']);
    expect([...ctx.sourceNumbers]).toEqual([...lines.map((_, i) => i % 2), -1]);
    expect(ctx.freeBySource.get('b')?.map((p) => p.index)).toEqual([1, 3, 5]);
    expect(ctx.given.map((g) => g.index)).toEqual([lines.length]);
    expect(ctx.typicalSigma).toBeUndefined();
    expect(ctx.maxOffset).toBe(0.5);
    expect(ctx.minLines).toBe(4);
    // The window is the lines' range widened by 1 cm⁻¹.
    expect(ctx.hi).toBe(2201);
  });

  it('the typical σ is the median of the σ sent (lines without one not counted)', () => {
    const lines = band('1-0', 3);
    const ctx = coContext(
      lines.map((l, i) => ({ position: l.position, ...(i < 3 ? { uncertainty: [3e-3, 1e-3, 2e-3][i] } : {}) })),
    );
    expect(ctx.typicalSigma).toBe(2e-3);
  });

  it('candidates of each band by J″, ties in list order (P and R of one J″), up to J″ 150 by default', () => {
    const ctx = fundamental();
    ctx.bandCands.forEach((list, b) => {
      const mine = ctx.cands
        .map((c, i) => ({ j: c.j, i, b: ctx.candBand[i] }))
        .filter((x) => x.b === b)
        .sort((x, y) => x.j - y.j || x.i - y.i)
        .map((x) => x.i);
      expect([...list]).toEqual(mine);
    });
    // 1-0 P(100) of 12C16O near 1585.5 cm⁻¹: ν₀ − (B₁ + B₀) J + (B₁ − B₀) J² with ν₀ = 2143.27 (from memory) and
    // B₀, B₁ of Gendriesch et al. 2009 (fixture SOURCE.md): 2143.27 − 3.8276 × 100 − 0.0175 × 10⁴.
    const b0 = 57635.968019 / 29979.2458;
    const b1 = 57111.24312 / 29979.2458;
    const p100 = 2143.27 - (b0 + b1) * 100 + (b1 - b0) * 100 ** 2;
    expect(p100).toBeGreaterThan(1580);
    expect(p100).toBeLessThan(1590);
    const far = coContext([p100 - 3, p100 + 3].map((position) => ({ position })));
    expect(far.cands.some((c) => c.band.upper === 1 && c.branch === 'P' && c.j > 80)).toBe(true);
    const capped = coContext(
      [p100 - 3, p100 + 3].map((position) => ({ position })),
      { maxJ: 80 },
    );
    expect(capped.cands.some((c) => c.j > 80)).toBe(false);
  });
});

describe('reference predictions (bands not yet fitted)', () => {
  it('the reference position plus the offset; tolerance × (1 + (J″/20)²); seeds reach J″ ≤ 4 + 3', () => {
    const ctx = fundamental();
    const o = fixed(0.05, 0.1);
    const r2 = ref(ctx, 1, 0, 'R', 2);
    const p = referencePrediction(ctx, o, r2, undefined, '');
    expect(p?.position).toBe(r2.c.position + 0.05);
    expect(p?.tolerance).toBeCloseTo(0.101, 14); // 0.1 × (1 + 0.01)
    expect(p?.tier).toBe(1);
    // R(7): 7 ≤ 4 + 3, tolerance 0.1 × (1 + 0.35²) = 0.11225; R(8) and P(8) beyond.
    expect(referencePrediction(ctx, o, ref(ctx, 1, 0, 'R', 7), undefined, '')?.tolerance).toBeCloseTo(0.11225, 14);
    expect(referencePrediction(ctx, o, ref(ctx, 1, 0, 'R', 8), undefined, '')).toBeUndefined();
    expect(referencePrediction(ctx, o, ref(ctx, 1, 0, 'P', 8), undefined, '')).toBeUndefined();
    // With reach 5 the limit is 8.
    expect(referencePrediction(ctx, o, ref(ctx, 1, 0, 'R', 8), 5, '')?.tolerance).toBeCloseTo(0.1 * (1 + 0.16), 14);
    expect(referencePrediction(ctx, o, ref(ctx, 1, 0, 'R', 9), 5, '')).toBeUndefined();
    // A candidate that may not seed is never placed from the reference.
    ctx.seedable[r2.ci] = false;
    expect(referencePrediction(ctx, o, r2, undefined, '')).toBeUndefined();
  });

  it('gap pass: any J″, past the seeds with the vote tolerance itself, refused above a fifth of the line spacing', () => {
    const ctx = fundamental(25);
    ctx.wide = true;
    const spacing = ctx.spacing.get(BK) as number;
    // About 2B = 3.84 cm⁻¹ (B₀ = 1.9225 cm⁻¹, fixture SOURCE.md).
    expect(spacing).toBeGreaterThan(3.7);
    expect(spacing).toBeLessThan(3.95);
    const r20 = ref(ctx, 1, 0, 'R', 20);
    expect(referencePrediction(ctx, fixed(0, 0.1), r20, undefined, '')?.tolerance).toBe(0.1);
    expect(referencePrediction(ctx, fixed(0, 0.2 * spacing), r20, undefined, '')?.tolerance).toBe(0.2 * spacing);
    expect(referencePrediction(ctx, fixed(0, 0.2 * spacing * 1.001), r20, undefined, '')).toBeUndefined();
    // J″ = 7 is still a seed (≤ 4 + 3): widened by (1 + (7/20)²), and not held to the spacing.
    const r7 = referencePrediction(ctx, fixed(0, 0.8), ref(ctx, 1, 0, 'R', 7), undefined, '');
    expect(r7?.tolerance).toBeCloseTo(0.8 * 1.1225, 14);
    const r8 = referencePrediction(ctx, fixed(0, 0.1), ref(ctx, 1, 0, 'R', 8), undefined, '');
    expect(r8?.tolerance).toBe(0.1);
  });
});

describe('fitted predictions (a band the fit has reached)', () => {
  it('inside the reach: the fitted value plus the band shift, tolerance √((5σ_model + 1e-6)² + (5·scatter)²)', () => {
    const ctx = fundamental();
    const r5 = ref(ctx, 1, 0, 'R', 5);
    const fitted = { value: r5.c.position + 0.01, variance: 1e-6 };
    const p = fittedPrediction(ctx, fixed(0.05, 0.1), stats(0.001, 0.002, 1.5), r5, fitted, 10, { name: '', n: 0 });
    const model = 5 * 1e-3 + 1e-6;
    expect(p?.position).toBe(fitted.value + 0.001);
    expect(p?.tolerance).toBeCloseTo(Math.hypot(model, 0.01), 10);
    expect(p?.withSigma?.model).toBeCloseTo(model, 10);
    expect(p?.withSigma?.perSigma).toBe(7.5);
    expect(p?.tier).toBeUndefined();
  });

  it('past the reach: the distance to the reference prediction with its offset widens the tolerance', () => {
    const ctx = fundamental(25);
    const r12 = ref(ctx, 1, 0, 'R', 12);
    const fitted = { value: r12.c.position + 0.01, variance: 1e-6 };
    const p = fittedPrediction(ctx, fixed(0.05, 0.1), stats(0.001, 0.002, 1.5), r12, fitted, 10, { name: '', n: 0 });
    // second = |0.01 + 0.001 − 0.05| = 0.039.
    const model = Math.hypot(5e-3, 0.039) + 1e-6;
    expect(p?.withSigma?.model).toBeCloseTo(model, 10);
    expect(p?.tolerance).toBeCloseTo(Math.hypot(model, 0.01), 10);
    // At the reach itself (J″ = r) no second opinion.
    const at = fittedPrediction(ctx, fixed(0.05, 0.1), stats(0.001, 0.002, 1.5), r12, fitted, 12, { name: '', n: 0 });
    expect(at?.withSigma?.model).toBeCloseTo(5e-3 + 1e-6, 10);
  });

  it('more than 3 past the reach only while the model is as sharp as four times the noise (ten times in the gap pass)', () => {
    const ctx = fundamental(25);
    const r14 = ref(ctx, 1, 0, 'R', 14);
    const src = { name: '', n: 0 };
    const at = (sd: number, r = 10) =>
      fittedPrediction(
        ctx,
        fixed(0.0, 0.1),
        stats(0, 0.002, 1),
        r14,
        { value: r14.c.position, variance: sd * sd },
        r,
        src,
      );
    // noise = scatter 0.002: σ_model 0.0079 < 0.008 passes, 0.0081 does not.
    expect(at(0.0079)).toBeDefined();
    expect(at(0.0081)).toBeUndefined();
    // J″ = 13 = r + 3 is not held to it.
    const r13 = ref(ctx, 1, 0, 'R', 13);
    expect(
      fittedPrediction(
        ctx,
        fixed(0, 0.1),
        stats(0, 0.002, 1),
        r13,
        { value: r13.c.position, variance: 0.0081 ** 2 },
        10,
        src,
      ),
    ).toBeDefined();
    // Beyond max(3, r) past the reach (J″ 21 for r = 10): none, except in the gap pass.
    const r21 = ref(ctx, 1, 0, 'R', 21);
    const f21 = { value: r21.c.position, variance: 1e-8 };
    expect(fittedPrediction(ctx, fixed(0, 0.1), stats(0, 0.002, 1), r21, f21, 10, src)).toBeUndefined();
    ctx.wide = true;
    expect(at(0.0081)).toBeDefined();
    expect(at(0.0199)).toBeDefined();
    expect(at(0.0201)).toBeUndefined();
    expect(fittedPrediction(ctx, fixed(0, 0.1), stats(0, 0.002, 1), r21, f21, 10, src)).toBeDefined();
  });

  it('the noise is the larger of the scatter and the σ factor × the typical σ of the list; none without either', () => {
    // Every line σ = 0.01: noise = max(0.002, 1.5 × 0.01) = 0.015, so σ_model up to 0.06 passes.
    const ctx = fundamental(25, 0.01);
    expect(ctx.typicalSigma).toBe(0.01);
    const r14 = ref(ctx, 1, 0, 'R', 14);
    const src = { name: '', n: 0 };
    const at = (sd: number, st = stats(0, 0.002, 1.5)) =>
      fittedPrediction(ctx, fixed(0, 0.1), st, r14, { value: r14.c.position, variance: sd * sd }, 10, src);
    expect(at(0.059)).toBeDefined();
    expect(at(0.061)).toBeUndefined();
    // Without σ and with no scatter the model is not held back (only by the spacing).
    const bare = fundamental(25);
    const b14 = ref(bare, 1, 0, 'R', 14);
    expect(
      fittedPrediction(
        bare,
        fixed(0, 0.1),
        stats(0, 0, 1),
        b14,
        { value: b14.c.position, variance: 0.01 ** 2 },
        10,
        src,
      ),
    ).toBeDefined();
  });

  it('a tolerance above a quarter of the line spacing tells nothing; a perfect model keeps a floor of 1e-4 spacing, for lines with σ too', () => {
    const ctx = fundamental();
    const spacing = ctx.spacing.get(BK) as number;
    const r5 = ref(ctx, 1, 0, 'R', 5);
    const src = { name: '', n: 0 };
    const withSd = (sd: number) =>
      fittedPrediction(ctx, fixed(0, 0.1), stats(0, 0, 1), r5, { value: r5.c.position, variance: sd * sd }, 10, src);
    // 5 σ + 1e-6 against 0.25 × spacing.
    expect(withSd((0.25 * spacing - 1e-6) / 5 - 1e-9)).toBeDefined();
    expect(withSd((0.25 * spacing - 1e-6) / 5 + 1e-9)).toBeUndefined();
    const perfect = withSd(0);
    expect(perfect?.tolerance).toBeCloseTo(1e-4 * spacing, 15);
    // Lines with σ keep the same floor (a database's stated σ is a lower bound): 1e-4 spacing, not the model's 1e-6.
    expect(perfect?.withSigma?.model).toBeCloseTo(1e-4 * spacing, 15);
    expect(perfect?.withSigma?.model).toBeGreaterThan(1e-6);
    // A model wider than the floor keeps its own width.
    const wide = withSd(1e-4);
    expect(wide?.withSigma?.model).toBeCloseTo(5 * 1e-4 + 1e-6, 12);
  });
});

describe('which candidates a round looks at', () => {
  it('reach per band: the highest J″ assigned, automatic or given; −1 for a band without lines', () => {
    const lines = band('1-0', 10);
    const ctx = fundamental();
    const auto = new Map([
      [0, ref(ctx, 1, 0, 'R', 6).c],
      [1, ref(ctx, 1, 0, 'P', 3).c],
    ]);
    const reach = bandReach(ctx, auto);
    const b10 = ref(ctx, 1, 0, 'R', 0).band;
    expect(reach[b10]).toBe(6);
    expect([...reach].filter((r, b) => b !== b10 && r !== -1)).toEqual([]);
    // A given P(9) of 1-0 raises it to 9.
    const withGiven = coContext(
      lines.map((l) => ({
        position: l.position,
        ...(l.branch === 'P' && l.j === 9
          ? {
              assignment: {
                species: CO,
                band: { upper: 1, lower: 0 },
                branch: 'P' as const,
                j: 9,
                source: 'given' as const,
              },
            }
          : {}),
      })),
    );
    expect(bandReach(withGiven, new Map())[ref(withGiven, 1, 0, 'R', 0).band]).toBe(9);
    expect(bandReach(withGiven, auto)[ref(withGiven, 1, 0, 'R', 0).band]).toBe(9);
  });

  it('within reach: per band the candidates up to r + max(3, r) (J″ 8 when unfitted: 4 + 4), every one in the gap pass', () => {
    const ctx = fundamental();
    const reach = new Int32Array(ctx.bands.length).fill(-1);
    const b10 = ref(ctx, 1, 0, 'R', 0).band;
    reach[b10] = 10;
    const limit = (b: number) => (b === b10 ? 20 : 8);
    const expected = ctx.cands.flatMap((c, ci) => (c.j <= limit(ctx.candBand[ci] as number) ? [ci] : []));
    expect([...withinReach(ctx, reach)]).toEqual(expected);
    ctx.wide = true;
    expect([...withinReach(ctx, reach)]).toEqual(ctx.cands.map((_, ci) => ci));
  });
});

describe('judging lines the fit rejected', () => {
  const predicting = (variance: number | undefined) =>
    ({ predict: () => (variance === undefined ? undefined : { value: 0, variance }) }) as unknown as DetailedFit;

  it('explained when |residual − shift| ≤ √((5σ_model)² + (5·scatter)²), or 5·factor·σ for a line with σ', () => {
    const ctx = fundamental();
    const c = ref(ctx, 1, 0, 'R', 2).c;
    const st = stats(0.001, 0.002, 1.5);
    const tol = Math.hypot(5e-3, 0.01);
    const ex = (residual: number | undefined, cx = ctx, fit = predicting(1e-6)) =>
      explained(cx, fit, st, c, { index: 3, ...(residual !== undefined ? { residual } : {}) });
    expect(ex(0.001 + tol * 0.999)).toBe(true);
    expect(ex(0.001 - tol * 0.999)).toBe(true);
    expect(ex(0.001 + tol * 1.001)).toBe(false);
    expect(ex(0.001 - tol * 1.001)).toBe(false);
    expect(ex(undefined)).toBe(false);
    expect(ex(0.001, ctx, predicting(undefined))).toBe(false);
    // Lines with σ = 0.004: tolerance √(0.005² + (5 × 1.5 × 0.004)²) = √(0.005² + 0.03²).
    const withSigma = fundamental(10, 0.004);
    const ts = Math.hypot(5e-3, 0.03);
    expect(ex(0.001 + ts * 0.999, withSigma)).toBe(true);
    expect(ex(0.001 + ts * 1.001, withSigma)).toBe(false);
  });

  it('a perfect model keeps lines within 1e-4 of the line spacing (noise-free database positions)', () => {
    const ctx = fundamental();
    const c = ref(ctx, 1, 0, 'R', 2).c;
    const floor = 1e-4 * (ctx.spacing.get(BK) as number);
    const ex = (residual: number) => explained(ctx, predicting(0), stats(0, 0, 1), c, { index: 3, residual });
    expect(ex(floor * 0.99)).toBe(true);
    expect(ex(floor * 1.01)).toBe(false);
  });

  it('withdrawRejected: rejected and unexplained lines go with a note and a ban; explained or fitted ones stay', () => {
    const ctx = fundamental();
    const lines = band('1-0', 10);
    const next = published(ctx, lines);
    const fit = {
      result: {
        lines: [
          { index: 0, status: 'rejected', residual: 0.5, reason: 'studentised residual 9.0 exceeds 4.00' },
          { index: 1, status: 'rejected', residual: 0.5 },
          { index: 2, status: 'rejected', residual: 1e-9 },
          { index: 3, status: 'fitted', residual: 0.5 },
        ],
        levels: [],
      },
      predict: () => ({ value: 0, variance: 1e-10 }),
      lineSigma: () => Number.NaN,
    } as unknown as DetailedFit;
    const banned: LoopState['banned'] = new Map();
    const c0 = next.get(0) as CandidateLine;
    const c1 = next.get(1) as CandidateLine;
    expect(withdrawRejected(ctx, fit, next, banned, 7)).toBe(2);
    expect(next.has(0)).toBe(false);
    expect(next.has(1)).toBe(false);
    expect(next.has(2)).toBe(true);
    expect(next.has(3)).toBe(true);
    const l0 = lines[0] as CoDatabaseLine;
    expect(ctx.notes.get(0)).toBe(
      `automatic assignment to 12C-16O 1-0 ${l0.branch}(${l0.j}) withdrawn: studentised residual 9.0 exceeds 4.00`,
    );
    const l1 = lines[1] as CoDatabaseLine;
    expect(ctx.notes.get(1)).toBe(
      `automatic assignment to 12C-16O 1-0 ${l1.branch}(${l1.j}) withdrawn: rejected by the fit`,
    );
    expect(banned.get(pairKey(ctx, 0, c0))).toEqual({ at: 7, count: 1 });
    // Withdrawn again later: the count grows.
    next.set(1, c1);
    withdrawRejected(ctx, fit, next, banned, 9);
    expect(banned.get(pairKey(ctx, 1, c1))).toEqual({ at: 9, count: 2 });
    expect(pairKey(ctx, 1, c1)).toBe(ctx.cands.length + ctx.cands.indexOf(c1));
  });

  it('withdrawStrayBands: a band whose fitted B_v is far from the reference loses every automatic line for good', () => {
    const ctx = fundamental();
    const lines = band('1-0', 10);
    const next = published(ctx, lines);
    const far = {
      result: { levels: [{ species: CO, v: 0, B: { value: 2.5 } }] },
    } as unknown as DetailedFit;
    const banned: LoopState['banned'] = new Map();
    const c4 = next.get(4) as CandidateLine;
    expect(withdrawStrayBands(ctx, far, next, banned, 2)).toBe(21);
    expect(next.size).toBe(0);
    expect(banned.get(pairKey(ctx, 4, c4))).toEqual({ at: 2, count: 3 });
    const l4 = lines[4] as CoDatabaseLine;
    expect(ctx.notes.get(4)).toBe(
      `automatic assignment to 12C-16O 1-0 ${l4.branch}(${l4.j}) withdrawn: its band's fitted constants are far from the reference ones (chance coincidences)`,
    );
    // B_0 as published (57 635.968019 MHz, Gendriesch et al. 2009): nothing withdrawn.
    const good = {
      result: { levels: [{ species: CO, v: 0, B: { value: 57635.968019 / 29979.2458 } }] },
    } as unknown as DetailedFit;
    const again = published(ctx, lines);
    expect(withdrawStrayBands(ctx, good, again, new Map(), 2)).toBe(0);
    expect(again.size).toBe(21);
  });
});

describe('the second pass and the notes', () => {
  it('widenSeeds: with 8 or more lines left, weak candidates of bands sharing a fitted level may seed', () => {
    const ctx = fundamental(); // 21 free lines
    const fitted = { result: { levels: [{ species: CO, v: 1 }] } } as unknown as DetailedFit;
    const hot = ref(ctx, 2, 1, 'R', 3);
    const fundamentalR3 = ref(ctx, 1, 0, 'R', 3);
    expect(ctx.seedable[hot.ci]).toBe(false);
    // 13 of 21 assigned: 8 left.
    const auto = new Map([...Array(13).keys()].map((i) => [i, fundamentalR3.c]));
    expect(widenSeeds(ctx, auto, fitted)).toBe(true);
    expect(ctx.seedable[hot.ci]).toBe(true);
    // A band with neither level fitted (3-2) stays out.
    const ctx2 = fundamental();
    const far = ctx2.cands.findIndex((c) => c.band.upper === 3 && c.band.lower === 2);
    if (far >= 0) {
      widenSeeds(ctx2, new Map(), fitted);
      expect(ctx2.seedable[far]).toBe(false);
    }
    // 14 assigned, 7 left: nothing widened.
    const ctx3 = fundamental();
    const auto14 = new Map([...Array(14).keys()].map((i) => [i, fundamentalR3.c]));
    expect(widenSeeds(ctx3, auto14, fitted)).toBe(false);
    expect(ctx3.seedable[ref(ctx3, 2, 1, 'R', 3).ci]).toBe(false);
    // The upper level counts too: v = 2 fitted lets 2-1 in.
    const ctx4 = fundamental();
    const upper = { result: { levels: [{ species: CO, v: 2 }] } } as unknown as DetailedFit;
    expect(widenSeeds(ctx4, new Map(), upper)).toBe(true);
    expect(ctx4.seedable[ref(ctx4, 2, 1, 'R', 3).ci]).toBe(true);
    // Another species' level does not.
    const ctx5 = fundamental();
    const other = { result: { levels: [{ species: '13C-16O', v: 1 }] } } as unknown as DetailedFit;
    expect(widenSeeds(ctx5, new Map(), other)).toBe(false);
  });

  it('noteCompetitions: an unassigned loser gets a note naming the winner and its label', () => {
    const ctx = fundamental();
    const c = ref(ctx, 1, 0, 'R', 2).c;
    const state = {
      auto: new Map([[3, c]]),
      competitions: [
        { peak: 5, winner: 3, prediction: 'x' },
        { peak: 3, winner: 5, prediction: 'y' },
        { peak: 6, winner: 7, prediction: 'z' },
        { peak: 4, winner: 3, prediction: 'w' },
      ],
    } as unknown as LoopState;
    state.auto.set(4, ref(ctx, 1, 0, 'R', 3).c);
    noteCompetitions(ctx, state);
    expect([...ctx.notes]).toEqual([
      [5, 'competed with line 3 for 12C-16O 1-0 R(2); residual and intensity decided for line 3'],
    ]);
  });

  it('beyondWindow: the offset found past maxOffset (up to 4× it, under 0.45 × spacing) and a maxOffset reaching it', () => {
    const lines = band('1-0', 10);
    const at = (maxOffset: number, minLinesPerBand = 4) => {
      const ctx = coContext(
        lines.map((l) => ({ position: l.position + 0.8 })),
        { maxOffset, minLinesPerBand },
      );
      const strong = ctx.cands.filter(
        (c, i) => ctx.seedable[i] && c.j <= 4 && c.band.upper === 1 && c.band.lower === 0,
      );
      return { ctx, strong, r: beyondWindow(ctx, BK, strong) };
    };
    const { r, strong } = at(0.5);
    expect(strong).toHaveLength(9);
    expect(r?.matches).toBe(9);
    expect(Math.abs((r?.offset ?? 0) - 0.8)).toBeLessThan(1e-3);
    expect(r?.reach).toBe(0.9);
    // Found within maxOffset: nothing to suggest.
    expect(at(0.9).r).toBeUndefined();
    // maxOffset 0.3: 4 × 0.3 = 1.2 reaches 0.8; maxOffset 0.19: 0.76 does not.
    expect(at(0.3).r?.reach).toBe(0.9);
    expect(at(0.19).r).toBeUndefined();
    // maxOffset 2: 0.45 × spacing (≈ 1.7) is below it: no wider search.
    expect(at(2).r).toBeUndefined();
    // More lines needed than found.
    expect(at(0.5, 10).r).toBeUndefined();
    expect(at(0.5, 9).r?.matches).toBe(9);
  });
});

describe('one round: predictions and matches', () => {
  const noModel = (ctx: AssignContext, scale = new Map<string, number>()): RoundModel => ({
    reach: new Int32Array(ctx.bands.length).fill(-1),
    scale,
    residuals: undefined,
    detailed: undefined,
  });
  const src = { name: '', n: 0 };

  it('without a fit: the reference placement, keyed by the candidate number; none for a given transition', () => {
    const ctx = fundamental();
    const r2 = ref(ctx, 1, 0, 'R', 2);
    const p = predictionOf(ctx, fixed(0.05, 0.1), noModel(ctx), r2.ci, src);
    expect(p).toEqual({ key: String(r2.ci), position: r2.c.position + 0.05, tolerance: 0.1 * 1.01, tier: 1 });
    // Beyond the seeds: nothing placed, nothing returned.
    expect(predictionOf(ctx, fixed(0.05, 0.1), noModel(ctx), ref(ctx, 1, 0, 'R', 8).ci, src)).toBeUndefined();
    const lines = band('1-0', 10);
    const given = coContext(
      lines.map((l) => ({
        position: l.position,
        ...(l.branch === 'R' && l.j === 2
          ? {
              assignment: {
                species: CO,
                band: { upper: 1, lower: 0 },
                branch: 'R' as const,
                j: 2,
                source: 'given' as const,
              },
            }
          : {}),
      })),
    );
    const g2 = ref(given, 1, 0, 'R', 2);
    expect(predictionOf(given, fixed(0.05, 0.1), noModel(given), g2.ci, src)).toBeUndefined();
  });

  it('reach 0 (only J″ = 0 assigned) reaches J″ 3, not the J″ 7 of a band without lines', () => {
    const ctx = fundamental();
    const m = noModel(ctx);
    const r0 = ref(ctx, 1, 0, 'R', 0);
    m.reach[r0.band] = 0;
    expect(predictionOf(ctx, fixed(0, 0.1), m, ref(ctx, 1, 0, 'R', 3).ci, src)).toBeDefined();
    expect(predictionOf(ctx, fixed(0, 0.1), m, ref(ctx, 1, 0, 'R', 4).ci, src)).toBeUndefined();
    const near = [...withinReach(ctx, m.reach)];
    expect(near).toContain(ref(ctx, 1, 0, 'R', 3).ci);
    expect(near).not.toContain(ref(ctx, 1, 0, 'R', 4).ci);
  });

  it("intensity: the band's own scale, else the main band's with a ×20 limit, none for a band its positions establish", () => {
    const ctx = fundamental();
    const r2 = ref(ctx, 1, 0, 'R', 2);
    const own = predictionOf(ctx, fixed(0, 0.1), noModel(ctx, new Map([[`${BK}@`, 4]])), r2.ci, src);
    expect(own?.intensity).toBe(4 * r2.c.intensity);
    expect(own?.intensityRatioLimit).toBeUndefined();
    const cls = predictionOf(ctx, fixed(0, 0.1), noModel(ctx, new Map([['#ir@', 3]])), r2.ci, src);
    expect(cls?.intensity).toBe(3 * r2.c.intensity);
    expect(cls?.intensityRatioLimit).toBe(20);
    const est = predictionOf(ctx, fixed(0, 0.1, true), noModel(ctx, new Map([['#ir@', 3]])), r2.ci, src);
    expect(est?.intensity).toBeUndefined();
    expect(est?.intensityRatioLimit).toBeUndefined();
    // The established band still uses its own scale once it has one.
    const both = predictionOf(ctx, fixed(0, 0.1, true), noModel(ctx, new Map([[`${BK}@`, 4]])), r2.ci, src);
    expect(both?.intensity).toBe(4 * r2.c.intensity);
    const none = predictionOf(ctx, fixed(0, 0.1), noModel(ctx), r2.ci, src);
    expect(none && 'intensity' in none).toBe(false);
    expect(none && 'intensityRatioLimit' in none).toBe(false);
  });

  it("a source that keeps its bands' views: the same predictions, each band looked up once per round", () => {
    const ctx = fundamental();
    const model = noModel(ctx, new Map([['#ir@', 3]]));
    const kept = { name: '', n: 0, bands: [] };
    const r2 = ref(ctx, 1, 0, 'R', 2);
    const r3 = ref(ctx, 1, 0, 'R', 3);
    expect(predictionOf(ctx, fixed(0.05, 0.1), model, r2.ci, kept)).toEqual(
      predictionOf(ctx, fixed(0.05, 0.1), model, r2.ci, src),
    );
    expect(kept.bands[r2.band]).toMatchObject({ bk: BK, offset: { offset: 0.05 }, scale: 3, borrowed: true });
    // Kept for the round: a later candidate of the band is placed with the view made first (offset 0.05, not 0.2).
    expect(predictionOf(ctx, fixed(0.2, 0.1), model, r3.ci, kept)?.position).toBe(r3.c.position + 0.05);
    expect(predictionOf(ctx, fixed(0.2, 0.1), model, r3.ci, src)?.position).toBe(r3.c.position + 0.2);
  });

  it('with a fit: the fitted placement; where it runs out in the gap pass, the reference placement instead', () => {
    const ctx = fundamental(25);
    const r12 = ref(ctx, 1, 0, 'R', 12);
    const sharp = { predict: () => ({ value: r12.c.position + 0.002, variance: 1e-8 }) } as unknown as DetailedFit;
    const m: RoundModel = { ...noModel(ctx), residuals: stats(0, 0.001, 1), detailed: sharp };
    m.reach[r12.band] = 10;
    const p = predictionOf(ctx, fixed(0, 0.1), m, r12.ci, src);
    expect(p?.position).toBe(r12.c.position + 0.002);
    expect(p?.tier).toBeUndefined();
    // A fit too uncertain for the spacing places nothing, except through the reference in the gap pass.
    const vague = { predict: () => ({ value: r12.c.position, variance: 1 }) } as unknown as DetailedFit;
    const mv: RoundModel = { ...m, detailed: vague };
    expect(predictionOf(ctx, fixed(0, 0.1), mv, r12.ci, src)).toBeUndefined();
    ctx.wide = true;
    const wide = predictionOf(ctx, fixed(0.01, 0.1), mv, r12.ci, src);
    expect(wide?.tier).toBe(1);
    expect(wide?.position).toBe(r12.c.position + 0.01);
    expect(wide?.tolerance).toBe(0.1);
    // A band fitted through other bands (both levels known, no line yet): predicted from the fit from J″ 4 on.
    ctx.wide = false;
    const r6 = ref(ctx, 1, 0, 'R', 6);
    const m0: RoundModel = { ...m, reach: new Int32Array(ctx.bands.length).fill(-1) };
    expect(predictionOf(ctx, fixed(0, 0.1), m0, r6.ci, src)?.tier).toBeUndefined();
    // Without residual statistics the fit is not used: the reference placement.
    const noStats: RoundModel = { ...m, residuals: undefined };
    expect(predictionOf(ctx, fixed(0, 0.1), noStats, ref(ctx, 1, 0, 'R', 5).ci, src)?.tier).toBe(1);
  });

  it('matchRound: the seeds J″ ≤ 7 matched to their published labels; a banned pair stays out; no competition', () => {
    const lines = band('1-0', 10);
    const ctx = coContext(lines.map((l) => ({ position: l.position + 0.02 })));
    const offsets = voteOffsets(
      ctx.cands.filter((c, i) => ctx.seedable[i] && c.j <= 4),
      ctx.freeBySource,
      ctx.maxOffset,
      ctx.minLines,
    );
    const state: LoopState = {
      auto: new Map(),
      detailed: undefined,
      detailedIsOfAuto: false,
      competitions: [],
      swept: false,
      banned: new Map(),
      twinSwaps: new Set(),
      twinPhase: false,
    };
    const { next, competitions } = matchRound(ctx, offsets, state, 0);
    expect(competitions).toEqual([]);
    const want = lines.flatMap((l, i) => (l.j <= 7 ? [[i, `${l.branch}(${l.j})`]] : []));
    expect(
      [...next].map(([i, c]) => [i, `${c.branch}(${c.j})`]).sort((a, b) => (a[0] as number) - (b[0] as number)),
    ).toEqual(want);
    // Ban line 3's pair for good: it is left out.
    const c3 = next.get(3) as CandidateLine;
    state.banned.set(pairKey(ctx, 3, c3), { at: 0, count: 3 });
    const again = matchRound(ctx, offsets, state, 5);
    expect(again.next.has(3)).toBe(false);
    expect(again.next.size).toBe(next.size - 1);
    // A second peak on R(0) loses it: one competition, naming both.
    const r0 = lines.findIndex((l) => l.branch === 'R' && l.j === 0);
    const dup = coContext([
      ...lines.map((l) => ({ position: l.position + 0.02 })),
      { position: (lines[r0]?.position as number) + 0.025 },
    ]);
    const d = matchRound(dup, offsets, { ...state, banned: new Map() }, 0);
    expect(d.competitions).toHaveLength(1);
    expect(d.competitions[0]?.winner).toBe(r0);
    expect(d.competitions[0]?.peak).toBe(lines.length);
  });

  it("a round passed the last round's matches applies the bans anew; they stand while fit and assignment do", () => {
    const lines = band('1-0', 10);
    const ctx = coContext(lines.map((l) => ({ position: l.position + 0.02 })));
    const offsets = voteOffsets(
      ctx.cands.filter((c, i) => ctx.seedable[i] && c.j <= 4),
      ctx.freeBySource,
      ctx.maxOffset,
      ctx.minLines,
    );
    const state: LoopState = {
      auto: new Map(),
      detailed: undefined,
      detailedIsOfAuto: false,
      competitions: [],
      swept: false,
      banned: new Map(),
      twinSwaps: new Set(),
      twinPhase: false,
    };
    const first = matchRound(ctx, offsets, state, 0);
    expect(stillProposed(first.proposed, state)).toBe(true);
    const c3 = first.next.get(3) as CandidateLine;
    state.banned.set(pairKey(ctx, 3, c3), { at: 0, count: 3 });
    const reused = matchRound(ctx, offsets, state, 5, first.proposed);
    const fresh = matchRound(ctx, offsets, state, 5);
    expect(reused.next.has(3)).toBe(false);
    expect([...reused.next]).toEqual([...fresh.next]);
    expect(reused.competitions).toEqual(fresh.competitions);
    // Another assignment (the same pairs in another order, or one pair more) or another fit: made afresh.
    const auto = new Map([...first.next].reverse());
    expect(stillProposed(first.proposed, { ...state, auto })).toBe(false);
    expect(stillProposed(first.proposed, { ...state, auto: first.next })).toBe(false);
    expect(stillProposed(fresh.proposed, { ...state, detailed: {} as DetailedFit })).toBe(false);
    expect(stillProposed(undefined, state)).toBe(false);
  });
});

describe('stage edge cases', () => {
  it('a round whose fit fails (a band of one line) drops its thinnest band and fits the rest', () => {
    const f = band('1-0', 10);
    const one = band('3-0', 0).filter((l) => l.branch === 'R'); // 3-0 R(0) alone
    const lines = [...f, ...one];
    const ctx = coContext(lines.map((l) => ({ position: l.position })));
    const next = published(ctx, lines);
    const fit = fitDroppingThinBands(ctx, next, undefined);
    expect(fit).toBeDefined();
    expect(next.size).toBe(21);
    expect([...next.values()].every((c) => c.band.upper === 1)).toBe(true);
  });

  it('withdrawStrayBands takes only the stray band: 2-1 with a wrong B_2, not 1-0 beside it', () => {
    const lines = [...band('1-0', 6), ...band('2-1', 6)];
    const ctx = coContext(lines.map((l) => ({ position: l.position })));
    const next = published(ctx, lines);
    const levels = [
      { species: CO, v: 0, B: { value: 57635.968019 / 29979.2458 } },
      { species: CO, v: 1, B: { value: 57111.24312 / 29979.2458 } },
      { species: CO, v: 2, B: { value: 2.5 } },
    ];
    const fit = { result: { levels } } as unknown as DetailedFit;
    expect(withdrawStrayBands(ctx, fit, next, new Map(), 0)).toBe(13);
    expect(next.size).toBe(13);
    expect([...next.values()].every((c) => c.band.upper === 1 && c.band.lower === 0)).toBe(true);
  });

  it('widenSeeds: nothing to widen when every candidate of the fitted level already seeds', () => {
    // In 2100–2190 cm⁻¹ every candidate with v = 0 is a seed (1-0, J″ ≤ 11).
    const ctx = fundamental();
    const v0 = { result: { levels: [{ species: CO, v: 0 }] } } as unknown as DetailedFit;
    const before = [...ctx.seedable];
    expect(widenSeeds(ctx, new Map(), v0)).toBe(false);
    expect(ctx.seedable).toEqual(before);
  });

  it('nothingAssigned: the best of several bands is named, and a band whose strong lines find no peak at all', () => {
    // The natural mixture; three peaks on predicted 13C16O 1-0 lines and one on the real 12C16O R(5): the best band
    // is 13C16O's (the first band in the list is 12C16O's).
    const species = [
      { iso: parseSpecies('12C16O'), abundance: 0.986 },
      { iso: parseSpecies('13C16O'), abundance: 0.011 },
      { iso: parseSpecies('12C18O'), abundance: 0.002 },
    ];
    const masses = new Map(species.map((x) => [x.iso.formula, reducedMass(x.iso)]));
    const probe = prepareAssignment([{ position: 2080 }, { position: 2170 }], species, masses, {});
    const at = (j: number) =>
      probe.cands.find(
        (c) => c.species === '13C-16O' && c.band.upper === 1 && c.band.lower === 0 && c.branch === 'R' && c.j === j,
      )?.position as number;
    const r5 = band('1-0', 5).find((l) => l.branch === 'R' && l.j === 5)?.position as number;
    const ctx = prepareAssignment(
      [at(0), at(1), at(2), r5].map((position) => ({ position })),
      species,
      masses,
      {},
    );
    const e = nothingAssigned(ctx);
    expect(e.code).toBe('FIT_NO_ASSIGNED_LINES');
    expect(
      e.message.startsWith(
        'nothing matches the declared species 12C-16O, 13C-16O, 12C-18O: its best band in the window, 13C-16O 1-0, finds only 3 of its ',
      ),
    ).toBe(true);
    // Four peaks midway between CO 1-0 lines (1.9 cm⁻¹ from each): strong lines, but no offset at all.
    const mid = (j: number) =>
      ((band('1-0', 10).find((l) => l.branch === 'R' && l.j === j)?.position as number) +
        (band('1-0', 10).find((l) => l.branch === 'R' && l.j === j + 1)?.position as number)) /
      2;
    const none = coContext([mid(0), mid(1), mid(2), mid(3)].map((position) => ({ position })));
    expect(nothingAssigned(none).message).toMatch(
      /^nothing matches the declared species 12C-16O: its best band in the window, 12C-16O 1-0, finds only 0 of its \d+ strongest predicted lines at any offset within ±0\.5 cm-1, and a band needs 4$/,
    );
  });

  it('tryFit counts the assigned lines only: 29 of them and 6 unassigned still fit B and D only', () => {
    const lines = band('1-0', 14); // 29 lines
    const extra = band('1-0', 17, 15).slice(0, 6);
    const ctx = coContext([...lines, ...extra].map((l) => ({ position: l.position, uncertainty: 1e-6 })));
    const auto = published(ctx, lines);
    const f = tryFit(ctx, lineInputs(ctx, auto));
    expect((f?.result.levels.find((l) => l.v === 0) as unknown as Record<string, unknown>)?.H).toBeUndefined();
  });
});

describe('fits of a round and their residual statistics', () => {
  it('tryFit: B and D only below 30 assigned lines; undefined when nothing is assigned', () => {
    const lines = band('1-0', 14); // 29 lines
    const ctx = coContext(lines.map((l) => ({ position: l.position })));
    const auto = published(ctx, lines);
    const fit = tryFit(ctx, lineInputs(ctx, auto));
    const v0 = fit?.result.levels.find((l) => l.v === 0) as unknown as Record<string, unknown>;
    expect(v0?.B).toBeDefined();
    expect(v0?.H).toBeUndefined();
    expect(tryFit(ctx, lineInputs(ctx, new Map()))).toBeUndefined();
    // The order cap of the options is kept: maxCentrifugalOrder 1 fits B only.
    const bOnly = coContext(
      lines.map((l) => ({ position: l.position })),
      { fit: { maxCentrifugalOrder: 1 } },
    );
    const f1 = tryFit(bOnly, lineInputs(bOnly, published(bOnly, lines)));
    expect((f1?.result.levels[0] as unknown as Record<string, unknown>)?.D).toBeUndefined();
  });

  it('residual statistics of a band without σ: median shift, scatter ≥ the robust σ of its residuals, factor 1', () => {
    const lines = band('1-0', 12); // 25 lines
    const ctx = coContext(lines.map((l) => ({ position: l.position })));
    const auto = published(ctx, lines);
    const fit = tryFit(ctx, lineInputs(ctx, auto)) as DetailedFit;
    const r = fit.result.lines.filter((l) => l.status === 'fitted').map((l) => l.residual as number);
    expect(r.length).toBeGreaterThanOrEqual(8);
    const med = (xs: number[]) => {
      const s = [...xs].sort((a, b) => a - b);
      const m = s.length >> 1;
      return s.length % 2 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
    };
    const shift = med(r);
    const robust = 1.4826 * med(r.map((x) => Math.abs(x - shift - med(r.map((y) => y - shift)))));
    const b10 = ref(ctx, 1, 0, 'R', 0).band;
    const st = residualStatistics(ctx, fit, auto).of(b10, 0);
    expect(st.shift).toBeCloseTo(shift, 15);
    const lineSigma = fit.lineSigma({ species: CO, band: { upper: 1, lower: 0 }, branch: 'R', j: 0 }, {});
    expect(st.scatter).toBeCloseTo(
      Number.isFinite(lineSigma) && lineSigma > 0 ? Math.max(lineSigma, robust) : robust,
      15,
    );
    expect(st.scatter).toBeGreaterThanOrEqual(robust);
    expect(st.sigmaFactor).toBe(1);
    // A band without fitted lines: no shift, the pooled scatter (floor: the fit's σ for it when finite).
    const b21 = ref(ctx, 2, 1, 'R', 0).band;
    const other = residualStatistics(ctx, fit, auto).of(b21, 0);
    expect(other.shift).toBe(0);
    expect(other.scatter).toBeGreaterThanOrEqual(robust);
  });

  it("with σ: the factor is at least 1 and at least the fit's own σ for that σ over it", () => {
    const lines = band('1-0', 12);
    const ctx = coContext(lines.map((l) => ({ position: l.position, uncertainty: 1e-3 })));
    const auto = published(ctx, lines);
    const fit = tryFit(ctx, lineInputs(ctx, auto)) as DetailedFit;
    const b10 = ref(ctx, 1, 0, 'R', 0).band;
    const st = residualStatistics(ctx, fit, auto).of(b10, 0);
    const t = { species: CO, band: { upper: 1, lower: 0 }, branch: 'R' as const, j: 0 };
    const scaled = fit.lineSigma(t, { uncertainty: 1e-3 });
    expect(st.sigmaFactor).toBeGreaterThanOrEqual(1);
    if (Number.isFinite(scaled) && scaled > 0) expect(st.sigmaFactor).toBeGreaterThanOrEqual(scaled / 1e-3 - 1e-12);
    // No line without σ: the scatter of lines without σ falls back to 0.01 cm⁻¹ (or the fit's σ when larger).
    expect(st.scatter).toBeGreaterThanOrEqual(0.01);
    // Asked twice: the same object (computed once per band and source).
    const rs = residualStatistics(ctx, fit, auto);
    expect(rs.of(b10, 0)).toBe(rs.of(b10, 0));
  });
});

describe('residual statistics worked out by hand (a fit made by hand: residuals and σ chosen here)', () => {
  const med = (xs: number[]) => {
    const v = [...xs].sort((a, b) => a - b);
    const m = v.length >> 1;
    return v.length % 2 ? (v[m] as number) : ((v[m - 1] as number) + (v[m] as number)) / 2;
  };
  /** 1 / Φ⁻¹(3/4) = 1.482602218505602 (Φ⁻¹(0.75) = 0.6744897501960817, normal quantile, from memory). */
  const K = 1 / 0.6744897501960817;
  const robust = (xs: number[]) => {
    const m = med(xs);
    return K * med(xs.map((x) => Math.abs(x - m)));
  };

  it("per band and source: median shift (3 lines or more), scatter and σ factor from own, pooled or the fit's σ", () => {
    // 1-0 J″ ≤ 10 (21 lines): lines 0–17 from source "a" without σ, lines 18–20 from "b" with σ = 0.002.
    const lines = band('1-0', 10);
    const peaks: PeakInput[] = lines.map((l, i) => ({
      position: l.position,
      source: i < 18 ? 'a' : 'b',
      ...(i < 18 ? {} : { uncertainty: 0.002 }),
    }));
    const ctx = coContext(peaks);
    const auto = published(ctx, lines);
    const rA = Array.from({ length: 18 }, (_, i) => 0.001 * ((i % 5) - 2) + 0.0005 + 1e-5 * i);
    const rB = [0.004, -0.002, 0.001];
    const fitLines = lines.map((_, i) => ({
      index: i,
      status: i === 16 ? 'rejected' : 'fitted',
      ...(i === 17 ? {} : { residual: i < 18 ? (rA[i] as number) : (rB[i - 18] as number) }),
    }));
    const calls: string[] = [];
    const fit = {
      result: { lines: fitLines, levels: [] },
      lineSigma: (t: { band: { upper: number } }, own?: { uncertainty?: number; source?: string }) => {
        calls.push(`${t.band.upper}|${own?.source ?? '-'}|${own?.uncertainty ?? '-'}`);
        if (t.band.upper === 2) return Number.POSITIVE_INFINITY;
        if (own?.uncertainty !== undefined) return own.uncertainty;
        return own?.source === 'b' ? 0.004 : 0.0001;
      },
    } as unknown as DetailedFit;
    const st = residualStatistics(ctx, fit, auto);
    const b10 = ref(ctx, 1, 0, 'R', 0).band;
    const b21 = ref(ctx, 2, 1, 'R', 0).band;
    // Source a: the 16 usable residuals (line 16 rejected, line 17 without residual).
    const a = rA.slice(0, 16);
    const shiftA = med(a);
    const pooledR = a.map((r) => r - shiftA);
    // Source b: 3 lines, shift their median 0.001; z = (r − 0.001) / 0.002 = 1.5, −1.5, 0 → robust σ K × 1.5.
    const zB = rB.map((r) => (r - 0.001) / 0.002);
    const factor = robust(zB);
    expect(factor).toBeCloseTo(K * 1.5, 12);
    const sa = st.of(b10, 0);
    expect(sa.shift).toBeCloseTo(shiftA, 15);
    // 16 ≥ 8 lines: its own robust σ, above the fit's 1e-4.
    expect(sa.scatter).toBeCloseTo(robust(pooledR), 15);
    // No σ in group a: the pooled σ (0.002) is typical; the fit's σ for it is 0.002 (ratio 1); pooled z (3 ≥ 3).
    expect(sa.sigmaFactor).toBeCloseTo(factor, 12);
    const sb = st.of(b10, 1);
    expect(sb.shift).toBeCloseTo(0.001, 15);
    // Group b has no line without σ: pooled robust σ of a, but the fit says 0.004 for source b.
    expect(sb.scatter).toBe(Math.max(0.004, robust(pooledR)));
    expect(sb.sigmaFactor).toBeCloseTo(factor, 12);
    // A band without lines: no shift, pooled scatter (the fit's σ is infinite there: not used).
    const s21 = st.of(b21, 0);
    expect(s21.shift).toBe(0);
    expect(s21.scatter).toBeCloseTo(robust(pooledR), 15);
    expect(s21.sigmaFactor).toBeCloseTo(factor, 12);
    // The fit was asked per source by name, and at the typical σ.
    expect(calls).toContain('1|a|-');
    expect(calls).toContain('1|b|-');
    expect(calls).toContain('1|b|0.002');
    expect(calls).toContain('1|a|0.002');
  });

  it("the fit's σ for lines with σ raises the factor when it exceeds the scatter of their z", () => {
    const lines = band('1-0', 10);
    const peaks: PeakInput[] = lines.map((l) => ({ position: l.position, uncertainty: 0.001 }));
    const ctx = coContext(peaks);
    const auto = published(ctx, lines);
    // z = r / 0.001 = −0.5 (11 lines), +0.5 (10): robust σ of z is 0, so the factor floor 1 holds.
    const fitLines = lines.map((_, i) => ({ index: i, status: 'fitted', residual: i % 2 ? 0.0005 : -0.0005 }));
    const mk = (k: number) =>
      ({
        result: { lines: fitLines, levels: [] },
        lineSigma: (_t: unknown, own?: { uncertainty?: number }) => (own?.uncertainty ?? 0.0002) * k,
      }) as unknown as DetailedFit;
    const b10 = ref(ctx, 1, 0, 'R', 0).band;
    expect(residualStatistics(ctx, mk(1), auto).of(b10, 0).sigmaFactor).toBe(1);
    expect(residualStatistics(ctx, mk(3), auto).of(b10, 0).sigmaFactor).toBeCloseTo(3, 12);
    // No line without σ: the scatter falls back to 0.01 cm⁻¹, below the fit's 0.0002 × 60.
    expect(residualStatistics(ctx, mk(1), auto).of(b10, 0).scatter).toBe(0.01);
    expect(residualStatistics(ctx, mk(60), auto).of(b10, 0).scatter).toBeCloseTo(0.012, 15);
    // Eight or more z: the group's own robust σ of z counts: z = −2, 0, 2 (7 lines each), median 0, MAD 2.
    const wide = fitLines.map((l, i) => ({ ...l, residual: 0.002 * ((i % 3) - 1) }));
    const fw = { ...mk(1), result: { lines: wide, levels: [] } } as unknown as DetailedFit;
    expect(residualStatistics(ctx, fw, auto).of(b10, 0).sigmaFactor).toBeCloseTo(K * 2, 12);
  });
});

describe('bands dropped for their intensity', () => {
  it("a band ×100 off the main band's intensity scale goes, with a note, unless its positions establish it", () => {
    const f = band('1-0', 6); // 13 lines
    const h = band('2-1', 2); // P(1), P(2), R(0)–R(2): 5 lines
    const build = (source?: string) => {
      const iso = parseSpecies('12C16O');
      const peaks0 = [...f, ...h].map((l) => ({ position: l.position, ...(source ? { source } : {}) }));
      const ctx0 = prepareAssignment(peaks0, [{ iso, abundance: 1 }], new Map([[iso.formula, reducedMass(iso)]]), {});
      const auto = published(ctx0, [...f, ...h]);
      // Observed intensity = candidate intensity × 2 (1-0) or × 200 (2-1).
      const peaks = [...f, ...h].map((l, i) => ({
        position: l.position,
        intensity: (auto.get(i) as CandidateLine).intensity * (i < f.length ? 2 : 200),
        ...(source ? { source } : {}),
      }));
      const ctx = prepareAssignment(peaks, [{ iso, abundance: 1 }], new Map([[iso.formula, reducedMass(iso)]]), {});
      return { ctx, auto: published(ctx, [...f, ...h]) };
    };
    const { ctx, auto } = build();
    pruneImplausibleBands(ctx, fixed(0, 0.1), auto);
    expect(auto.size).toBe(13);
    expect([...ctx.intensityLeftOut.keys()]).toEqual([13, 14, 15, 16, 17]);
    const l = h[0] as CoDatabaseLine;
    expect(ctx.intensityLeftOut.get(13)).toBe(
      `left out for its intensity: a match for 12C-16O 2-1 ${l.branch}(${l.j}) by position, but that band's observed-to-predicted intensity ratio is ×100 that of the main band (more than ×20 either way), so it was taken for a coincidence`,
    );
    const s = build('scan');
    pruneImplausibleBands(s.ctx, fixed(0, 0.1), s.auto);
    expect(s.ctx.intensityLeftOut.get(13)).toContain('that of the main band of source "scan" (more than');
    const kept = build();
    pruneImplausibleBands(kept.ctx, fixed(0, 0.1, true), kept.auto);
    expect(kept.auto.size).toBe(18);
    expect(kept.ctx.intensityLeftOut.size).toBe(0);
  });
});

describe('reference constants', () => {
  it('the library Dunham coefficients of 12C16O: Y01 ≈ B_e, Y11 ≈ −α_e, Y10 ≈ ω_e (Huber & Herzberg 1979, from memory; 1e-3 relative)', () => {
    const ref0 = referenceDunham([{ iso: parseSpecies('12C16O') }]);
    const y = ref0.get(CO);
    expect(y).toBeDefined();
    expect(Math.abs((y?.get('0,1') as number) / 1.93128 - 1)).toBeLessThan(1e-3);
    expect(Math.abs((y?.get('1,1') as number) / -0.0175044 - 1)).toBeLessThan(1e-3);
    expect(Math.abs((y?.get('1,0') as number) / 2169.81 - 1)).toBeLessThan(1e-3);
    expect(ref0.size).toBe(1);
  });
});

import { describe, expect, it } from 'vitest';
import {
  ambiguousOffsetWarnings,
  bandKey,
  baseInputs,
  bestBandOffset,
  calibrationFromPoints,
  candidateIndex,
  claimedByOthers,
  classScale,
  countNear,
  estimateCalibration,
  freePeaks,
  groupBy,
  intensityScales,
  isBanned,
  isNear,
  lineSpacings,
  type OffsetVotes,
  outOfReach,
  type PeakInput,
  pruneThinBands,
  ratioText,
  repeatedPositions,
  resolveDoublets,
  round,
  sameAssignments,
  seedFilter,
  signed,
  strayBands,
  strayingScales,
  thinnestBand,
  transitionOfBand,
  voteOffsets,
  wavelengthHint,
  widenedOffsets,
} from '../../src/assign/assign-lines.js';
import type { CandidateLine } from '../../src/assign/candidates.js';
import type { DetailedFit } from '../../src/fit/fit-lines.js';
import type { Branch } from '../../src/models/transitions.js';
import { CO_DATABASE } from '../helpers/co-database.js';

// Fast checks of the stages of the automatic assignment (src/assign/assign-lines.ts), each on a small input built by
// hand whose right answer is worked out here: positions of real 12C16O lines (test/fixtures/co-database-lines,
// HITRAN2020, Gordon et al., JQSRT 277, 107949 (2022)) with their published labels, or line lists made from term
// values computed in this file. Everything is computed inside `it` (mutation testing switches mutants per test).

const CO = '12C-16O';

/** A candidate line built by hand (the intensity is only used for ranking). */
function cand(
  species: string,
  upper: number,
  lower: number,
  branch: Branch,
  j: number,
  position: number,
  intensity = 1,
): CandidateLine {
  return { species, band: { upper, lower }, branch, j, position, lowerEnergy: 0, intensity };
}

/** The real 12C16O line of the fixture with this label (cm⁻¹). */
function coLine(band: string, branch: 'P' | 'R', j: number): number {
  const l = CO_DATABASE.lines.find((x) => x.band === band && x.branch === branch && x.j === j);
  if (!l) throw new Error(`no ${band} ${branch}(${j}) in the fixture`);
  return l.position;
}

/** Candidates of the real CO fundamental, P(1)–P(n) and R(0)–R(n−1), from the fixture's positions. */
function coFundamental(n: number, shared = { upper: 1, lower: 0 }): CandidateLine[] {
  const out: CandidateLine[] = [];
  for (let j = 0; j < n; j++) {
    out.push({ ...cand(CO, 1, 0, 'R', j, coLine('1-0', 'R', j), 10 - j / 2), band: shared });
    out.push({ ...cand(CO, 1, 0, 'P', j + 1, coLine('1-0', 'P', j + 1), 10 - j / 2), band: shared });
  }
  return out;
}

describe('small rules of the assignment', () => {
  it('reach: a band of reach r may take J″ up to r + max(3, r) in one round', () => {
    // r = 2: 2 + max(3, 2) = 5; r = 3: 6; r = 4: 4 + 4 = 8; r = 7: 14; r = 10: 20; r = 0: 3.
    const cases: [number, number][] = [
      [2, 5],
      [3, 6],
      [4, 8],
      [7, 14],
      [10, 20],
      [0, 3],
    ];
    for (const [r, last] of cases) {
      expect(outOfReach(last, r), `r = ${r}, J = ${last}`).toBe(false);
      expect(outOfReach(last + 1, r), `r = ${r}, J = ${last + 1}`).toBe(true);
    }
  });

  it('numbers as the messages print them: signed to 3 decimals, ratios to 3 digits or as 1/x, rounding to 1e-5', () => {
    expect(signed(0)).toBe('+0.000');
    expect(signed(0.1234)).toBe('+0.123');
    expect(signed(-0.25)).toBe('-0.250');
    expect(ratioText(25)).toBe('25.0');
    expect(ratioText(1)).toBe('1.00');
    expect(ratioText(0.04)).toBe('1/25.0');
    expect(ratioText(0.5)).toBe('1/2.00');
    expect(round(0.123456789)).toBe(0.12346);
    expect(round(-0.000004)).toBe(-0);
  });

  it('band keys "species|v′-v″", and back to a transition of the band', () => {
    expect(bandKey({ species: CO, band: { upper: 2, lower: 1 } })).toBe('12C-16O|2-1');
    expect(transitionOfBand('12C-16O|2-1')).toEqual({
      species: CO,
      band: { upper: 2, lower: 1 },
      branch: 'R',
      j: 0,
    });
    expect(transitionOfBand('12C-16O')).toBeUndefined();
    expect(transitionOfBand('12C-16O|2-x')).toBeUndefined();
    expect(transitionOfBand('12C-16O|x-0')).toBeUndefined();
    expect(transitionOfBand('12C-16O|1.5-0')).toBeUndefined();
  });

  it('a withdrawn pair is banned for 4 rounds, and for good after its third withdrawal', () => {
    const banned = new Map([
      [1, { at: 10, count: 1 }],
      [2, { at: 0, count: 3 }],
    ]);
    expect(isBanned(banned, 1, 10)).toBe(true);
    expect(isBanned(banned, 1, 13)).toBe(true);
    expect(isBanned(banned, 1, 14)).toBe(false);
    expect(isBanned(banned, 2, 100)).toBe(true);
    expect(isBanned(banned, 3, 0)).toBe(false);
    expect(isBanned(new Map([[1, { at: 0, count: 2 }]]), 1, 4)).toBe(false);
  });

  it('wavelength hint only for windows inside 0.5–50, with the wavenumbers 10⁴/x the lines would have', () => {
    expect(wavelengthHint(0.49, 10)).toBe('');
    expect(wavelengthHint(1, 50.01)).toBe('');
    // 10⁴ / 50 = 200.0, 10⁴ / 0.5 = 20 000.0.
    expect(wavelengthHint(0.5, 50)).toBe(
      ' between 0.50 and 50.00 cm-1; read as wavelengths in µm the lines would lie at 200.0–20000.0 cm-1: if they are, send "unit": "um"',
    );
    // 4.6 µm (the CO fundamental): 10⁴ / 4.8 = 2083.3, 10⁴ / 4.6 = 2173.9.
    expect(wavelengthHint(4.6, 4.8)).toContain('at 2083.3–2173.9 cm-1');
  });
});

describe('the lines as the matcher and the fit take them', () => {
  const peaks: PeakInput[] = [
    { position: 2147.081134, uncertainty: 1e-6, intensity: 3, source: 'a' },
    { position: 2143.0 },
    {
      position: 2139.426073,
      assignment: { species: CO, band: { upper: 1, lower: 0 }, branch: 'P', j: 1, source: 'given' },
      intensity: 0,
    },
  ];

  it('free peaks: the lines without assignment, with σ and intensity when sent', () => {
    expect(freePeaks(peaks)).toStrictEqual([
      { index: 0, position: 2147.081134, intensity: 3, sigma: 1e-6 },
      { index: 1, position: 2143.0 },
    ]);
  });

  it('fit inputs: every line, given assignment kept, nothing added', () => {
    const inputs = baseInputs(peaks);
    expect(inputs).toStrictEqual([
      { position: 2147.081134, uncertainty: 1e-6, intensity: 3, source: 'a' },
      { position: 2143.0 },
      { position: 2139.426073, intensity: 0, assignment: peaks[2]?.assignment },
    ]);
    expect(Object.keys(inputs[1] ?? {})).toEqual(['position']);
  });

  it('repeated positions: the later copies of a position sent before, in index order', () => {
    const p = [1, 2, 1, 3, 2, 1].map((position) => ({ position }));
    expect(repeatedPositions(p, [0, 1, 2, 3, 4, 5])).toEqual([2, 4, 5]);
    expect(repeatedPositions(p, [0, 1, 3])).toEqual([]);
    expect(repeatedPositions(p, [5, 2])).toEqual([5, 2]);
  });
});

describe('candidates: seeds, band numbers, line spacing', () => {
  it('seeds: at least the floor × the strongest line of their class (infrared and pure rotation apart)', () => {
    const c = [
      cand(CO, 1, 0, 'R', 0, 2147, 2),
      cand(CO, 1, 0, 'R', 30, 2230, 2e-4), // exactly 1e-4 × 2: kept (≥)
      cand(CO, 2, 1, 'R', 0, 2120, 1.9e-4), // below: not a seed
      cand(CO, 0, 0, 'R', 0, 3.8, 1e-6), // the strongest rotational line
      cand(CO, 0, 0, 'R', 40, 150, 1e-10), // exactly 1e-4 × 1e-6 of its own class: kept
      cand(CO, 0, 0, 'R', 50, 190, 0.9e-10),
    ];
    expect(seedFilter(c, 1e-4)).toEqual([true, true, false, true, true, false]);
    // A higher floor; the rotational lines are not ranked against the infrared ones (they would all drop).
    expect(seedFilter(c, 0.5)).toEqual([true, false, false, true, false, false]);
  });

  it('band numbers in order of first appearance, candidates per band by J″, given transitions marked', () => {
    const b10 = { upper: 1, lower: 0 };
    const c = [
      cand(CO, 1, 0, 'R', 2, 2154.6),
      { ...cand(CO, 1, 0, 'P', 1, 2139.4), band: b10 },
      { ...cand(CO, 1, 0, 'R', 0, 2147.1), band: b10 },
      cand('13C-16O', 1, 0, 'R', 0, 2100.1),
      cand(CO, 2, 1, 'R', 1, 2124.3),
      cand(CO, 1, 0, 'R', 1, 2150.9),
    ];
    const given = [{ t: { species: CO, band: { upper: 1, lower: 0 }, branch: 'R' as const, j: 1 } }];
    const ix = candidateIndex(c, given);
    expect(ix.bands).toEqual(['12C-16O|1-0', '13C-16O|1-0', '12C-16O|2-1']);
    expect([...ix.candBand]).toEqual([0, 0, 0, 1, 2, 0]);
    // Band 0 by J″: P(1) (index 1) and R(1) (index 5) share J″ = 1, index order breaks the tie; R(0) is J″ 0.
    expect(ix.bandCands.map((m) => [...m])).toEqual([[2, 1, 5, 0], [3], [4]]);
    expect([...ix.candGiven]).toEqual([0, 0, 0, 0, 0, 1]);
    expect(ix.candIndex.get(c[4] as CandidateLine)).toBe(4);
    expect([...candidateIndex(c, []).candGiven]).toEqual([0, 0, 0, 0, 0, 0]);
  });

  it('line spacing: the median step between neighbouring J″ of one branch (real CO 1-0, P(1)–P(6), R(0)–R(5))', () => {
    const c = coFundamental(6);
    // A second band on its own: two R lines 4 apart, plus a Q(2) line alone (no Q neighbour: no step; nor is it a
    // neighbour of R(1)).
    c.push(
      cand('13C-16O', 1, 0, 'R', 0, 2100),
      cand('13C-16O', 1, 0, 'R', 1, 2104),
      cand('13C-16O', 1, 0, 'Q', 2, 2090),
    );
    // A band with a single line has no spacing.
    c.push(cand(CO, 3, 0, 'R', 0, 6354));
    const ix = candidateIndex(c, []);
    const steps: number[] = [];
    for (let j = 0; j < 5; j++) steps.push(coLine('1-0', 'R', j + 1) - coLine('1-0', 'R', j));
    for (let j = 1; j < 6; j++) steps.push(coLine('1-0', 'P', j) - coLine('1-0', 'P', j + 1));
    steps.sort((a, b) => a - b);
    const med = ((steps[4] as number) + (steps[5] as number)) / 2;
    const s = lineSpacings({ cands: c, ...ix });
    expect(s.get('12C-16O|1-0')).toBeCloseTo(med, 9);
    // About 2B ≈ 3.8 cm⁻¹ (B₀ = 1.9225 cm⁻¹, Gendriesch et al. 2009 via the fixture's SOURCE.md).
    expect(med).toBeGreaterThan(3.7);
    expect(med).toBeLessThan(3.95);
    expect(s.get('13C-16O|1-0')).toBe(4);
    expect(s.has('12C-16O|3-0')).toBe(false);
    expect(s.size).toBe(2);
  });

  it('line spacing: of two candidates of one J″ and branch the later position counts', () => {
    const c = [cand(CO, 1, 0, 'R', 0, 10), cand(CO, 1, 0, 'R', 1, 13), cand(CO, 1, 0, 'R', 1, 14)];
    expect(lineSpacings({ cands: c, ...candidateIndex(c, []) }).get('12C-16O|1-0')).toBe(4);
  });
});

describe('offsets by voting', () => {
  it('countNear / isNear: predictions shifted by the offset with a peak within the tolerance, claimed peaks left out', () => {
    const sorted = Float64Array.from([100.1, 200.13, 300.2, 400.05]);
    const preds = [100, 200, 300, 400, 500].map((position) => ({ position }));
    // Offset 0.1, tolerance 0.03: 100.1 (0), 200.13 (0.03, on the edge: counts), 300.2 (0.1: no), 400.05 (0.05: no).
    expect(countNear(preds, sorted, 0.1, 0.03)).toBe(2);
    expect(countNear(preds, sorted, 0.1, 0.1)).toBe(4);
    expect(countNear(preds, sorted, 0.1, 0.1, Float64Array.from([200.12]), 0.01)).toBe(3);
    expect(countNear(preds, sorted, 0.1, 0.1, Float64Array.from([200.1]), 0.02)).toBe(4);
    // Two peaks near one prediction count once.
    expect(countNear([{ position: 10 }], Float64Array.from([10, 10.01]), 0, 0.05)).toBe(1);
    expect(isNear(sorted, 300.25, 0.05)).toBe(true);
    expect(isNear(sorted, 300.26, 0.05)).toBe(false);
    expect(isNear(sorted, 400.1, 0.04)).toBe(false);
    expect(isNear(sorted, 500, 50)).toBe(false);
    expect(isNear(new Float64Array(0), 1, 1)).toBe(false);
    // Strictly inside the window, and exactly on its upper edge (1.25 + 0.25 = 1.5, exact in binary).
    expect(isNear(sorted, 300.22, 0.05)).toBe(true);
    expect(isNear(Float64Array.from([1.5]), 1.25, 0.25)).toBe(true);
  });

  it('claimed: where the other bands put their seeds at the offset, sorted', () => {
    const seeds = [cand(CO, 1, 0, 'R', 0, 30), cand('13C-16O', 1, 0, 'R', 0, 20), cand(CO, 2, 1, 'R', 0, 10)];
    expect([...claimedByOthers(seeds, '12C-16O|1-0', 0.5)]).toEqual([10.5, 20.5]);
  });

  it('a band of 10 lines 0.1 above their predictions, among 3 spurious peaks: offset 0.1, tolerance floor 0.03', () => {
    const seeds = coFundamental(5); // P(1)–P(5), R(0)–R(4)
    const peaks = [
      ...seeds.map((c, i) => ({ index: i, position: c.position + 0.1 })),
      { index: 10, position: 2145.0 },
      { index: 11, position: 2152.2 },
      { index: 12, position: 2130.0 },
    ];
    const v = voteOffsets(seeds, new Map([['', peaks]]), 0.5, 4);
    const s = v.bySource.get('');
    expect(s?.offset).toBeCloseTo(0.1, 9);
    // All differences equal: spread 0, tolerance max(4 × 0, 0.03) = 0.03.
    expect(s?.tolerance).toBe(0.03);
    expect(s?.own).toBe(false);
    expect(s?.ambiguous).toBe(false);
    const band = v.of('12C-16O|1-0', '');
    expect(band.offset).toBeCloseTo(0.1, 9);
    expect(band.own).toBe(false);
    // All 10 strong lines on peaks no other band claims: ≥ 2 × 4 and ≥ 60 %: established by its positions.
    expect(band.established).toBe(true);
    // A band and a source not voted on fall back to the source, then to offset 0 ± 0.1.
    expect(v.of('13C-16O|1-0', '')).toBe(s);
    expect(v.of('12C-16O|1-0', 'other')).toEqual({ offset: 0, tolerance: 0.1, own: false, ambiguous: false });
  });

  it('a band measured against another calibration keeps its own offset; an ambiguous source is flagged', () => {
    // Band A (the real CO fundamental, 12 lines) at +0.1; band B (hand-made, 8 lines 10 cm⁻¹ apart) at −0.3.
    const a = coFundamental(6);
    const b = Array.from({ length: 8 }, (_, j) => cand('13C-16O', 1, 0, 'R', j, 2000 + 10 * j, 5));
    const peaks = [
      ...a.map((c, i) => ({ index: i, position: c.position + 0.1 })),
      ...b.map((c, i) => ({ index: 100 + i, position: c.position - 0.3 })),
    ];
    const v = voteOffsets([...a, ...b], new Map([['s', peaks]]), 0.5, 4);
    const own = v.of('13C-16O|1-0', 's');
    expect(own.own).toBe(true);
    expect(own.offset).toBeCloseTo(-0.3, 9);
    expect(own.tolerance).toBe(0.03);
    expect(v.of('12C-16O|1-0', 's').own).toBe(false);
    expect(v.of('12C-16O|1-0', 's').offset).toBeCloseTo(0.1, 9);
    // Votes (weight √intensity): band A's 12 lines of intensity 7.5–10 weigh ≈ 35, band B's 8 of intensity 5 weigh
    // 8 √5 ≈ 17.9 < 0.7 × 35: not ambiguous.
    expect(v.bySource.get('s')?.ambiguous).toBe(false);
    const w = ambiguousOffsetWarnings(v);
    expect(w).toEqual([]);
    // Band B twice as strong (intensity 20, √20 × 8 ≈ 35.8 against ≈ 35): now the runner-up is within 0.7.
    const b2 = b.map((c) => ({ ...c, intensity: 20 }));
    const v2 = voteOffsets([...a, ...b2], new Map([['s', peaks]]), 0.5, 4);
    expect(v2.bySource.get('s')?.ambiguous).toBe(true);
    expect(ambiguousOffsetWarnings(v2).map((x) => x.code)).toEqual(['OFFSET_AMBIGUOUS']);
    expect(ambiguousOffsetWarnings(v2)[0]?.message).toContain('of source "s"');
  });

  it('too few strong lines for a band of its own: it takes the source offset (fewer than minLines voters)', () => {
    const a = coFundamental(6);
    const b = Array.from({ length: 3 }, (_, j) => cand('13C-16O', 1, 0, 'R', j, 2000 + 10 * j, 5));
    const peaks = [
      ...a.map((c, i) => ({ index: i, position: c.position + 0.1 })),
      ...b.map((c, i) => ({ index: 100 + i, position: c.position - 0.3 })),
    ];
    const v = voteOffsets([...a, ...b], new Map([['', peaks]]), 0.5, 4);
    expect(v.of('13C-16O|1-0', '').own).toBe(false);
    expect(v.of('13C-16O|1-0', '').offset).toBeCloseTo(0.1, 9);
    expect(v.of('13C-16O|1-0', '').established).toBeUndefined();
  });

  it('best offset of a band: rounded to 1e-5, with the number of its lines it then matches', () => {
    const seeds = coFundamental(4);
    const free = seeds.slice(0, 6).map((c, i) => ({ index: i, position: c.position - 0.123456 }));
    const best = bestBandOffset(seeds, free, 0.5);
    expect(best).toEqual({ offset: -0.12346, matches: 6 });
    // A seventh peak 0.05 off that offset is outside the tolerance (spread 0: the floor 0.03).
    const seventh = [...free, { index: 6, position: (seeds[6] as CandidateLine).position - 0.123456 + 0.05 }];
    expect(bestBandOffset(seeds, seventh, 0.5)?.matches).toBe(6);
    expect(bestBandOffset(seeds, free, 0.1)).toBeUndefined();
  });
});

describe("offset votes: the thresholds of a band's own offset and of a band its positions establish", () => {
  /** A hand-made band of n lines 5 cm⁻¹ apart from `start`, intensity 1. */
  const grid = (species: string, start: number, n: number, intensity = 1) =>
    Array.from({ length: n }, (_, j) => cand(species, 1, 0, 'R', j, start + 5 * j, intensity));
  const peaksAt = (cands: CandidateLine[], offsets: number[], from = 0) =>
    cands.map((c, i) => ({ index: from + i, position: c.position + (offsets[i] ?? 0) }));

  it('own offset only with n ≥ minLines, n ≥ (lines at the source offset) + 3 and n ≥ 2 × them; at equality it is taken', () => {
    // Main band (20 lines at +0.1) sets the source offset. Band B (13C, 12 lines): k at +0.1, m at −0.3, rest no peak.
    const main = grid(CO, 1000, 20, 4);
    const run = (k: number, m: number, minLines: number) => {
      const b = grid('13C-16O', 2000, 12);
      const offs = b.map((_, i) => (i < k ? 0.1 : i < k + m ? -0.3 : 99));
      const peaks = [
        ...peaksAt(
          main,
          main.map(() => 0.1),
        ),
        ...peaksAt(b, offs, 100).filter((_, i) => i < k + m),
      ];
      return voteOffsets([...main, ...b], new Map([['', peaks]]), 0.5, minLines).of('13C-16O|1-0', '');
    };
    // withSource 3, n 6, minLines 6: 6 ≥ 6, 6 ≥ 3 + 3, 6 ≥ 2 × 3: own.
    expect(run(3, 6, 6).own).toBe(true);
    expect(run(3, 6, 6).offset).toBeCloseTo(-0.3, 9);
    // n 6 < minLines 7: not own.
    expect(run(3, 6, 7).own).toBe(false);
    // withSource 4, n 7: 7 ≥ 4 + 3 but 7 < 8: not own.
    expect(run(4, 7, 4).own).toBe(false);
    // withSource 1, n 3 (minLines 3): 3 ≥ 2 × 1 but 3 < 1 + 3: not own.
    expect(run(1, 3, 3).own).toBe(false);
    // withSource 0, n 4, minLines 4: own (4 ≥ 4, 4 ≥ 3, 4 ≥ 0).
    expect(run(0, 4, 4).own).toBe(true);
  });

  it('a band of exactly minLines strong lines may have its own offset', () => {
    const main = grid(CO, 1000, 20, 4);
    const b = grid('13C-16O', 2000, 4);
    const peaks = [
      ...peaksAt(
        main,
        main.map(() => 0.1),
      ),
      ...peaksAt(
        b,
        b.map(() => -0.3),
        100,
      ),
    ];
    const o = voteOffsets([...main, ...b], new Map([['', peaks]]), 0.5, 4).of('13C-16O|1-0', '');
    expect(o.own).toBe(true);
  });

  it('established: at least 2 × minLines and at least 60 % of its strong lines on peaks no other band predicts', () => {
    const run = (n: number, onPeaks: number, minLines: number) => {
      const b = grid(CO, 1000, n);
      const peaks = peaksAt(
        b,
        b.map(() => 0.1),
      ).filter((_, i) => i < onPeaks);
      return voteOffsets(b, new Map([['', peaks]]), 0.5, minLines).of('12C-16O|1-0', '').established === true;
    };
    // 8 of 10 with minLines 4: 8 ≥ 8 and 8 ≥ 6.
    expect(run(10, 8, 4)).toBe(true);
    expect(run(10, 7, 4)).toBe(false);
    // 6 of 10 with minLines 3: 6 ≥ 6 and 6 ≥ 0.6 × 10; 6 of 11: 6 < 6.6.
    expect(run(10, 6, 3)).toBe(true);
    expect(run(11, 6, 3)).toBe(false);
  });

  it('the strongest voters count: 30 per band, 80 per source (weak lines listed first do not decide)', () => {
    // One band of 61 lines: the first 31 weak (0.25) with peaks at −0.2, then 30 strong (1) with peaks at +0.1.
    const weak = grid(CO, 1000, 31, 0.25);
    const strong = grid(CO, 2000, 30, 1);
    const band = [...weak, ...strong];
    const peaks = peaksAt(
      band,
      band.map((_, i) => (i < 31 ? -0.2 : 0.1)),
    );
    const v = voteOffsets(band, new Map([['', peaks]]), 0.5, 4);
    expect(v.of('12C-16O|1-0', '').offset).toBeCloseTo(0.1, 9);
    expect(v.of('12C-16O|1-0', '').own).toBe(false);
    // 180 lines: 100 weak (0.81, weight 0.9) first at −0.2, then 80 strong (1) at +0.1: all of them would vote −0.2
    // (90 against 80); the 80 strongest vote +0.1.
    const w2 = grid(CO, 1000, 100, 0.81);
    const s2 = grid('13C-16O', 3000, 80, 1);
    const all = [...w2, ...s2];
    const v2 = voteOffsets(
      all,
      new Map([
        [
          '',
          peaksAt(
            all,
            all.map((_, i) => (i < 100 ? -0.2 : 0.1)),
          ),
        ],
      ]),
      0.5,
      4,
    );
    expect(v2.bySource.get('')?.offset).toBeCloseTo(0.1, 9);
  });

  it('a source where no strong line finds a peak: offset 0, tolerance 4 × 0.05 = 0.2', () => {
    const b = grid(CO, 1000, 10);
    const v = voteOffsets(b, new Map([['', [{ index: 0, position: 3 }]]]), 0.5, 4);
    expect(v.bySource.get('')).toEqual({ offset: 0, tolerance: 0.2, own: false, ambiguous: false });
  });

  it('gap pass: a source with minLines assigned keeps its votes; any other votes again over the seeds of every J″', () => {
    // Real CO 1-0 lines J″ 12–20 only, 0.05 high: the low-J vote finds nothing.
    const lines = CO_DATABASE.lines.filter((l) => l.band === '1-0' && l.j >= 12 && l.j <= 20);
    const c = lines.map((l) => cand(CO, 1, 0, l.branch, l.j, l.position));
    const seeds = c.filter((x) => x.j <= 4);
    expect(seeds).toEqual([]);
    const byA = lines.map((l, i) => ({ index: i, position: l.position + 0.05 }));
    const byB = lines.map((l, i) => ({ index: 100 + i, position: l.position - 0.07 }));
    const freeBySource = new Map([
      ['a', byA],
      ['b', byB],
    ]);
    const peaks: PeakInput[] = [];
    for (const p of byA) peaks[p.index] = { position: p.position, source: 'a' };
    for (const p of byB) peaks[p.index] = { position: p.position, source: 'b' };
    const first = voteOffsets(seeds, freeBySource, 0.5, 4);
    expect(first.bySource.get('a')?.offset).toBe(0);
    const ctx = { peaks, freeBySource, cands: c, seedable: c.map(() => true), maxOffset: 0.5, minLines: 4 };
    type Ctx = Parameters<typeof widenedOffsets>[0];
    // Four lines of source a assigned: a keeps the first votes; b votes again.
    const auto = new Map([0, 1, 2, 3].map((i) => [i, c[i] as CandidateLine]));
    const w = widenedOffsets(ctx as unknown as Ctx, first, auto);
    expect(w.bySource.get('a')).toBe(first.bySource.get('a'));
    expect(w.bySource.get('b')?.offset).toBeCloseTo(-0.07, 9);
    expect(w.of('12C-16O|1-0', 'b').offset).toBeCloseTo(-0.07, 9);
    expect(w.of('12C-16O|1-0', 'zz')).toEqual({ offset: 0, tolerance: 0.1, own: false, ambiguous: false });
    // Every source with enough lines: the first votes themselves.
    const both = new Map([...auto, ...[100, 101, 102, 103].map((i) => [i, c[i - 100] as CandidateLine] as const)]);
    expect(widenedOffsets(ctx as unknown as Ctx, first, both)).toBe(first);
    // Only seedable candidates vote: with none seedable, b finds nothing.
    const none = widenedOffsets({ ...ctx, seedable: c.map(() => false) } as unknown as Ctx, first, auto);
    expect(none.bySource.get('b')?.offset).toBe(0);
  });
});

describe('bands: thinnest, too thin, same assignment', () => {
  it('thinnest band, and bands under the minimum dropped unless given lines anchor them', () => {
    const a = [0, 1, 2, 3, 4].map((j) => cand(CO, 1, 0, 'R', j, 2147 + 4 * j));
    const b = [0, 1].map((j) => cand(CO, 2, 1, 'R', j, 2120 + 4 * j));
    const auto = new Map<number, CandidateLine>();
    a.forEach((c, i) => {
      auto.set(i, c);
    });
    b.forEach((c, i) => {
      auto.set(10 + i, c);
    });
    expect(thinnestBand(auto)).toBe('12C-16O|2-1');
    expect(thinnestBand(new Map())).toBe('');
    const kept = new Map(auto);
    pruneThinBands(kept, 3, []);
    expect([...kept.keys()]).toEqual([0, 1, 2, 3, 4]);
    // One given line of 2-1 brings it to 3: kept.
    const anchored = new Map(auto);
    pruneThinBands(anchored, 3, [{ t: { species: CO, band: { upper: 2, lower: 1 } } }]);
    expect(anchored.size).toBe(7);
    // One given line and one automatic line of 2-1 are 2 < 3: dropped.
    const short = new Map([[10, b[0] as CandidateLine]]);
    pruneThinBands(short, 3, [{ t: { species: CO, band: { upper: 2, lower: 1 } } }]);
    expect(short.size).toBe(0);
    const strict = new Map(auto);
    pruneThinBands(strict, 6, []);
    expect(strict.size).toBe(0);
    const exact = new Map(auto);
    pruneThinBands(exact, 5, []);
    expect(exact.size).toBe(5);
  });

  it('same assignments: same lines to the same candidate objects', () => {
    const c1 = cand(CO, 1, 0, 'R', 0, 2147);
    const c2 = cand(CO, 1, 0, 'R', 1, 2151);
    expect(sameAssignments(new Map([[1, c1]]), new Map([[1, c1]]))).toBe(true);
    expect(sameAssignments(new Map([[1, c1]]), new Map([[1, c2]]))).toBe(false);
    expect(sameAssignments(new Map([[1, c1]]), new Map([[2, c1]]))).toBe(false);
    expect(
      sameAssignments(
        new Map([[1, c1]]),
        new Map([
          [1, c1],
          [2, c2],
        ]),
      ),
    ).toBe(false);
  });

  it('groupBy keeps the order of first appearance and of the members', () => {
    expect([...groupBy(['b1', 'a1', 'b2', 'c1', 'a2'], (s) => s[0] as string)]).toEqual([
      ['b', ['b1', 'b2']],
      ['a', ['a1', 'a2']],
      ['c', ['c1']],
    ]);
  });
});

describe('intensity scales', () => {
  /** Band 1-0 (4 lines, ratio median 2), 2-1 (3 lines at 100× its prediction), 13C (2 lines), one rotational band. */
  function scene() {
    const auto = new Map<number, CandidateLine>();
    const peaks: PeakInput[] = [];
    const add = (c: CandidateLine, obs: number | undefined, source?: string) => {
      auto.set(peaks.length, c);
      peaks.push({
        position: c.position,
        ...(obs !== undefined ? { intensity: obs } : {}),
        ...(source ? { source } : {}),
      });
    };
    // 1-0: ratios 2, 2, 3, 3 → median 2.5; a line without intensity and one at 0 do not count.
    add(cand(CO, 1, 0, 'R', 0, 2147, 1), 2);
    add(cand(CO, 1, 0, 'R', 1, 2151, 2), 4);
    add(cand(CO, 1, 0, 'R', 2, 2155, 1), 3);
    add(cand(CO, 1, 0, 'R', 3, 2158, 0.5), 1.5);
    add(cand(CO, 1, 0, 'R', 4, 2162, 1), undefined);
    add(cand(CO, 1, 0, 'R', 5, 2165, 1), 0);
    // 2-1: ratios 240, 250, 260 → 250 = 100 × 2.5 (beyond ×20 of the main band).
    add(cand(CO, 2, 1, 'R', 0, 2120, 0.25), 60);
    add(cand(CO, 2, 1, 'R', 1, 2124, 0.25), 62.5);
    add(cand(CO, 2, 1, 'R', 2, 2128, 0.25), 65);
    // 13C16O: two lines only, no scale of its own.
    add(cand('13C-16O', 1, 0, 'R', 0, 2100, 0.01), 5);
    add(cand('13C-16O', 1, 0, 'R', 1, 2104, 0.01), 5);
    // Pure rotation: its own class (ratios 3, 3, 3).
    add(cand(CO, 0, 0, 'R', 0, 3.8, 1), 3);
    add(cand(CO, 0, 0, 'R', 1, 7.7, 1), 3);
    add(cand(CO, 0, 0, 'R', 2, 11.5, 1), 3);
    // The same 1-0 band in another source, 3 lines at ratio 50.
    add(cand(CO, 1, 0, 'R', 6, 2169, 1), 50, 'b');
    add(cand(CO, 1, 0, 'R', 7, 2172, 1), 50, 'b');
    add(cand(CO, 1, 0, 'R', 8, 2176, 1), 50, 'b');
    return { auto, peaks };
  }

  it('per band and source the median observed/predicted ratio (3 lines or more); per class that of the band with most lines', () => {
    const { auto, peaks } = scene();
    const s = intensityScales(auto, peaks);
    expect(s.get('12C-16O|1-0@')).toBe(2.5);
    expect(s.get('12C-16O|2-1@')).toBe(250);
    expect(s.has('13C-16O|1-0@')).toBe(false);
    expect(s.get('#ir@')).toBe(2.5);
    expect(s.get('#rot@')).toBe(3);
    expect(s.get('12C-16O|1-0@b')).toBe(50);
    expect(s.get('#ir@b')).toBe(50);
    expect(s.size).toBe(7);
    expect(classScale(s, cand(CO, 3, 0, 'R', 0, 6350), '')).toBe(2.5);
    expect(classScale(s, cand(CO, 1, 1, 'R', 0, 3.8), '')).toBe(3);
    expect(classScale(s, cand(CO, 1, 0, 'R', 0, 2147), 'c')).toBeUndefined();
  });

  it('a band whose ratio strays more than ×20 from the main band of its class and source', () => {
    const { auto, peaks } = scene();
    const st = strayingScales(auto, peaks);
    expect([...st.keys()]).toEqual(['12C-16O|2-1@']);
    const b = st.get('12C-16O|2-1@');
    expect(b?.bk).toBe('12C-16O|2-1');
    expect(b?.source).toBe('');
    expect(b?.ratio).toBeCloseTo(100, 9);
    // Exactly ×20 is not beyond: 2-1 at 12.5 / 0.25 = 50 = 20 × 2.5.
    for (const [i, c] of auto) if (c.band.upper === 2) peaks[i] = { position: c.position, intensity: 12.5 };
    expect(strayingScales(auto, peaks).size).toBe(0);
    // 1/20.1 of it is.
    for (const [i, c] of auto) {
      if (c.band.upper === 2) peaks[i] = { position: c.position, intensity: (0.25 * 2.5) / 20.1 };
    }
    const low = strayingScales(auto, peaks).get('12C-16O|2-1@');
    expect(low?.ratio).toBeCloseTo(1 / 20.1, 9);
  });
});

describe('isotopologue doublets (labels kept or swapped by the predicted splitting and the abundance ratio)', () => {
  const a = cand('1H-35Cl', 1, 0, 'R', 3, 2963.3, 0.75);
  const b = cand('1H-37Cl', 1, 0, 'R', 3, 2961.2 + 1.9, 0.25); // predicted 0.2 below a (hand-made splitting)

  it('peaks labelled the wrong way round by position are swapped', () => {
    const auto = new Map([
      [0, a],
      [1, b],
    ]);
    // Peak 0 at 2963.1 and peak 1 at 2963.3: observed −0.2 against predicted +0.2 (a − b): swap.
    resolveDoublets(auto, [{ position: 2963.1 }, { position: 2963.3 }]);
    expect(auto.get(0)).toBe(b);
    expect(auto.get(1)).toBe(a);
    // Right way round: kept.
    const kept = new Map([
      [0, a],
      [1, b],
    ]);
    resolveDoublets(kept, [{ position: 2963.3 }, { position: 2963.1 }]);
    expect(kept.get(0)).toBe(a);
  });

  it('the intensity ratio (ln σ 0.3) decides when the positions cannot', () => {
    // Equal positions: position terms equal; intensities 1 and 3 against expected 3 : 1 (ln 3): swap.
    const auto = new Map([
      [0, a],
      [1, b],
    ]);
    resolveDoublets(auto, [
      { position: 2963.2, intensity: 1 },
      { position: 2963.2, intensity: 3 },
    ]);
    expect(auto.get(0)).toBe(b);
    const kept = new Map([
      [0, a],
      [1, b],
    ]);
    resolveDoublets(kept, [
      { position: 2963.2, intensity: 3 },
      { position: 2963.2, intensity: 1 },
    ]);
    expect(kept.get(0)).toBe(a);
  });

  it('positions against intensities: the splitting weighs (Δ/5 % of it)², the ln-ratio (Δ/0.3)²', () => {
    // a − b predicted +0.2; intensities expected 3 : 1 (ln 3).
    // Positions right (observed +0.2), intensities reversed: keep = (2 ln 3 / 0.3)² ≈ 53.6, swap = (0.4 / 0.01)² =
    // 1600: kept.
    const kept = new Map([
      [0, a],
      [1, b],
    ]);
    resolveDoublets(kept, [
      { position: 2963.3, intensity: 1 },
      { position: 2963.1, intensity: 3 },
    ]);
    expect(kept.get(0)).toBe(a);
    // σ = 0.05 sets the scale; observed +0.15: keep = 1 + 53.6, swap = (0.35 / 0.05)² = 49: swapped.
    const swapped = new Map([
      [0, a],
      [1, b],
    ]);
    resolveDoublets(swapped, [
      { position: 2963.25, intensity: 1, uncertainty: 0.05 },
      { position: 2963.1, intensity: 3, uncertainty: 0.05 },
    ]);
    expect(swapped.get(0)).toBe(b);
  });

  it('intensities count only when both peaks and both candidates have one above 0', () => {
    // Positions say swap (observed −0.2 against +0.2); one peak without intensity: still swapped.
    const one = new Map([
      [0, a],
      [1, b],
    ]);
    resolveDoublets(one, [{ position: 2963.1, intensity: 1 }, { position: 2963.3 }]);
    expect(one.get(0)).toBe(b);
    // A candidate of intensity 0: the ratio is not used, positions decide.
    for (const zero of [
      [{ ...a, intensity: 0 }, b],
      [a, { ...b, intensity: 0 }],
    ] as const) {
      const m = new Map<number, CandidateLine>([
        [0, zero[0]],
        [1, zero[1]],
      ]);
      resolveDoublets(m, [
        { position: 2963.1, intensity: 1 },
        { position: 2963.3, intensity: 3 },
      ]);
      expect(m.get(0)).toBe(zero[1]);
    }
  });

  it('no doublet: one species, other transitions, more than 1 cm⁻¹ apart, or three lines', () => {
    const far = cand('1H-37Cl', 1, 0, 'R', 3, 2961.2, 0.25); // 2.1 apart: beyond 1 cm⁻¹
    const auto = new Map([
      [0, a],
      [1, far],
    ]);
    resolveDoublets(auto, [{ position: 2961.2 }, { position: 2963.3 }]);
    expect(auto.get(0)).toBe(a);
    const same = cand('1H-35Cl', 1, 0, 'R', 3, 2963.1);
    const one = new Map([
      [0, a],
      [1, same],
    ]);
    resolveDoublets(one, [{ position: 2963.1 }, { position: 2963.3 }]);
    expect(one.get(0)).toBe(a);
    const other = cand('1H-37Cl', 1, 0, 'P', 3, 2963.1); // P(3), not R(3)
    const o = new Map([
      [0, a],
      [1, other],
    ]);
    resolveDoublets(o, [{ position: 2963.1 }, { position: 2963.3 }]);
    expect(o.get(0)).toBe(a);
    const jOther = cand('1H-37Cl', 1, 0, 'R', 4, 2963.1);
    const oj = new Map([
      [0, a],
      [1, jOther],
    ]);
    resolveDoublets(oj, [{ position: 2963.1 }, { position: 2963.3 }]);
    expect(oj.get(0)).toBe(a);
    const bandOther = cand('1H-37Cl', 2, 1, 'R', 3, 2963.1);
    const ob = new Map([
      [0, a],
      [1, bandOther],
    ]);
    resolveDoublets(ob, [{ position: 2963.1 }, { position: 2963.3 }]);
    expect(ob.get(0)).toBe(a);
  });
});

describe('stray bands: fitted B_v against the reference B_v = Σ Y_k1 (v + ½)^k', () => {
  // Reference: B_e = 1.93128087 cm⁻¹, α_e = 0.01750441 cm⁻¹ (12C16O; Huber & Herzberg 1979, from memory), so
  // B_0 = 1.92252867, B_1 = 1.90502426. Published B_0 = 57 635.968019 MHz / 29 979.2458 MHz per cm⁻¹ = 1.9225287
  // (Gendriesch et al. 2009, fixture SOURCE.md): the reference agrees to 1e-6 relative.
  const ref = new Map([
    [
      CO,
      new Map([
        ['0,1', 1.93128087],
        ['1,1', -0.01750441],
        ['1,0', 2169.8], // not a B term: ignored
      ]),
    ],
  ]);
  const fitWith = (levels: { v: number; B: number; species?: string }[]) =>
    ({
      result: {
        levels: levels.map((l) => ({ species: l.species ?? CO, v: l.v, B: { value: l.B } })),
      },
    }) as unknown as DetailedFit;
  const auto = new Map([
    [0, cand(CO, 1, 0, 'R', 0, 2147)],
    [1, cand(CO, 1, 0, 'P', 1, 2139)],
  ]);

  it('the published B_0, B_1 are no stray; 1.1 % off is, 0.9 % off is not', () => {
    const b0 = 57635.968019 / 29979.2458;
    const b1 = 57111.24312 / 29979.2458;
    expect(
      strayBands(
        fitWith([
          { v: 0, B: b0 },
          { v: 1, B: b1 },
        ]),
        auto,
        ref,
      ).size,
    ).toBe(0);
    expect([
      ...strayBands(
        fitWith([
          { v: 0, B: b0 },
          { v: 1, B: b1 * 1.011 },
        ]),
        auto,
        ref,
      ),
    ]).toEqual(['12C-16O|1-0']);
    expect([
      ...strayBands(
        fitWith([
          { v: 0, B: b0 * 0.989 },
          { v: 1, B: b1 },
        ]),
        auto,
        ref,
      ),
    ]).toEqual(['12C-16O|1-0']);
    expect(
      strayBands(
        fitWith([
          { v: 0, B: b0 * 1.009 },
          { v: 1, B: b1 * 0.991 },
        ]),
        auto,
        ref,
      ).size,
    ).toBe(0);
    // Another species' level, or a species without reference constants, is not compared.
    expect(strayBands(fitWith([{ v: 1, B: 1.5, species: '13C-16O' }]), auto, ref).size).toBe(0);
    expect(strayBands(fitWith([{ v: 1, B: 1.5 }]), auto, new Map()).size).toBe(0);
    expect(strayBands(fitWith([{ v: 1, B: 1.5 }]), new Map(), ref).size).toBe(0);
  });

  it('B_v uses (v + ½)^k: a Y21 term (γ_e) moves B_1 by γ_e × 2.25', () => {
    const withGamma = new Map([[CO, new Map([...(ref.get(CO) ?? []), ['2,1', 0.001]])]]);
    // B_1 = 1.93128087 − 0.01750441 × 1.5 + 0.001 × 2.25 = 1.90727426; 1.90727426 × 0.995 passes, × 0.985 does not.
    const b1 = 1.93128087 - 0.01750441 * 1.5 + 0.001 * 2.25;
    expect(strayBands(fitWith([{ v: 1, B: b1 * 0.995 }]), auto, withGamma).size).toBe(0);
    expect(strayBands(fitWith([{ v: 1, B: b1 * 0.985 }]), auto, withGamma).size).toBe(1);
    // 1.9252 is 1.06 % above the plain B_1 = 1.90502426 (stray) but 0.94 % above B_1 with γ_e (not).
    expect(strayBands(fitWith([{ v: 1, B: 1.9252 }]), auto, ref).size).toBe(1);
    expect(strayBands(fitWith([{ v: 1, B: 1.9252 }]), auto, withGamma).size).toBe(0);
  });
});

describe('calibration: offset and scale of the wavenumber axis', () => {
  it('exact points: offset at the weighted centre and the scale in ppm, both with zero scatter', () => {
    // observed = reference × (1 + 5e-6) + 0.01 over 2000–2150: at the centre 2075, offset 0.01 + 5e-6 × 2075.
    const refs = [2000, 2050, 2100, 2150];
    const pts = refs.map((reference) => ({ reference, observed: reference * (1 + 5e-6) + 0.01 }));
    const c = calibrationFromPoints(pts, 'test');
    expect(c?.centre).toBeCloseTo(2075, 9);
    expect(c?.offset.value).toBeCloseTo(0.01 + 5e-6 * 2075, 9);
    expect(c?.offset.unit).toBe('cm-1');
    expect(c?.scale?.value).toBeCloseTo(5, 5);
    expect(c?.scale?.unit).toBe('ppm');
    expect(c?.offset.uncertainty).toBeLessThan(1e-9);
    expect(c?.lines).toBe(4);
    expect(c?.reference).toBe('test');
  });

  it('noisy points: the straight-line fit and its a-posteriori σ by the textbook formulas', () => {
    // x = reference − centre; y = observed − reference. Ordinary least squares on 5 points, worked out here.
    const refs = [2000, 2040, 2080, 2120, 2160];
    const noise = [0.002, -0.001, -0.002, 0.0015, -0.0005];
    const pts = refs.map((reference, i) => ({ reference, observed: reference + 0.02 + (noise[i] as number) }));
    const xs = refs.map((r) => r - 2080);
    const ys = noise.map((e) => 0.02 + e);
    const n = 5;
    const my = ys.reduce((s, y) => s + y, 0) / n;
    const sxx = xs.reduce((s, x) => s + x * x, 0);
    const sxy = xs.reduce((s, x, i) => s + x * (ys[i] as number), 0);
    const slope = sxy / sxx;
    const rss = ys.reduce((s, y, i) => s + (y - my - slope * (xs[i] as number)) ** 2, 0);
    const s2 = rss / (n - 2);
    const c = calibrationFromPoints(pts, 'r');
    expect(c?.centre).toBeCloseTo(2080, 9);
    expect(c?.offset.value).toBeCloseTo(my, 12);
    expect(c?.offset.uncertainty).toBeCloseTo(Math.sqrt(s2 / n), 12);
    expect(c?.scale?.value).toBeCloseTo(slope * 1e6, 6);
    expect(c?.scale?.uncertainty).toBeCloseTo(Math.sqrt(s2 / sxx) * 1e6, 6);
  });

  it('weights 1/σ²: the centre is the weighted mean; a narrow span or 3 points give no scale; 2 points nothing', () => {
    const pts = [
      { reference: 2000, observed: 2000.01, uncertainty: 0.001 },
      { reference: 2100, observed: 2100.01, uncertainty: 0.002 },
      { reference: 2010, observed: 2010.012, uncertainty: 0.001 },
      { reference: 2005, observed: 2005.008, uncertainty: 0.001 },
    ];
    // Weights 1e6, 2.5e5, 1e6, 1e6: centre (2000 + 0.25 × 2100 + 2010 + 2005) / 3.25.
    const centre = (2000 + 0.25 * 2100 + 2010 + 2005) / 3.25;
    const c = calibrationFromPoints(pts, 'w');
    expect(c?.centre).toBeCloseTo(centre, 9);
    expect(c?.scale).toBeDefined();
    // Three points: the offset only (weighted mean of 0.01, 0.01, 0.012 with weights 1, 0.25, 1), σ from the scatter.
    const three = calibrationFromPoints(pts.slice(0, 3), 'w');
    expect(three?.scale).toBeUndefined();
    const w = [1, 0.25, 1];
    const y = [0.01, 0.01, 0.012];
    const mean = (1 * 0.01 + 0.25 * 0.01 + 1 * 0.012) / 2.25;
    expect(three?.offset.value).toBeCloseTo(mean, 12);
    const chi = w.reduce((s, wi, i) => s + wi * 1e6 * ((y[i] as number) - mean) ** 2, 0);
    expect(three?.offset.uncertainty).toBeCloseTo(Math.sqrt((chi / 2) * (1 / 2.25e6)), 12);
    // Span 19 cm⁻¹ < 1 % of the centre (≈ 20): no scale even with 4 points.
    const narrow = [2000, 2005, 2012, 2019].map((r) => ({ reference: r, observed: r + 0.01 }));
    expect(calibrationFromPoints(narrow, 'n')?.scale).toBeUndefined();
    // Span 21 > 1 % of 2010.25: a scale.
    const wide = [2000, 2005, 2015, 2021].map((r) => ({ reference: r, observed: r + 0.01 }));
    expect(calibrationFromPoints(wide, 'n')?.scale?.value).toBeCloseTo(0, 6);
    expect(calibrationFromPoints(pts.slice(0, 2), 'w')).toBeUndefined();
    // One point repeated: rank deficient for the scale? No: span 0 → offset only; its σ with n − 1 = 2.
    const same = [1, 2, 3].map(() => ({ reference: 2000, observed: 2000.01 }));
    expect(calibrationFromPoints(same, 's')?.offset.value).toBeCloseTo(0.01, 12);
  });

  it('a span of exactly 1 % of the centre gives a scale (1990–2010 about 2000)', () => {
    const pts = [1990, 1995, 2005, 2010].map((reference) => ({ reference, observed: reference + 0.01 }));
    expect(calibrationFromPoints(pts, 'e')?.scale).toBeDefined();
  });

  it('from an assignment with σ: the lines weigh 1/σ² (centre the weighted mean of the references)', () => {
    const auto = new Map<number, CandidateLine>();
    const peaks: PeakInput[] = [];
    const sig = [0.001, 0.002, 0.001, 0.004];
    [0, 1, 2, 3].forEach((j, i) => {
      const x = coLine('1-0', 'R', j);
      auto.set(i, cand(CO, 1, 0, 'R', j, x));
      peaks.push({ position: x + 0.02, uncertainty: sig[i] as number });
    });
    const w = sig.map((s) => 1 / (s * s));
    const centre =
      [0, 1, 2, 3].reduce((acc, j, i) => acc + (w[i] as number) * coLine('1-0', 'R', j), 0) /
      w.reduce((a, b) => a + b, 0);
    expect(estimateCalibration(auto, peaks, CO)?.centre).toBeCloseTo(centre, 9);
  });

  it('from an assignment: lines of the main species up to J″ = 20 only', () => {
    const auto = new Map<number, CandidateLine>();
    const peaks: PeakInput[] = [];
    const add = (c: CandidateLine, obs: number, uncertainty?: number) => {
      auto.set(peaks.length, c);
      peaks.push({ position: obs, ...(uncertainty !== undefined ? { uncertainty } : {}) });
    };
    for (const j of [0, 1, 2, 20]) add(cand(CO, 1, 0, 'R', j, coLine('1-0', 'R', j)), coLine('1-0', 'R', j) + 0.02);
    add(cand(CO, 1, 0, 'R', 21, coLine('1-0', 'R', 21)), coLine('1-0', 'R', 21) + 5);
    add(cand('13C-16O', 1, 0, 'R', 0, 2100), 2105);
    const c = estimateCalibration(auto, peaks, CO);
    expect(c?.lines).toBe(4);
    expect(c?.offset.value).toBeCloseTo(0.02, 9);
    expect(c?.reference).toBe('reference-library positions of 12C-16O');
    expect(estimateCalibration(auto, peaks, 'other')).toBeUndefined();
  });
});

describe('ambiguous-offset warnings', () => {
  it('one per ambiguous source, naming it (none for the unnamed source)', () => {
    const votes = {
      bySource: new Map([
        ['', { offset: 0.123, tolerance: 0.03, own: false, ambiguous: true }],
        ['b', { offset: -0.5, tolerance: 0.03, own: false, ambiguous: false }],
        ['c', { offset: 0.0104, tolerance: 0.03, own: false, ambiguous: true }],
      ]),
      perBand: new Map(),
      of: () => ({ offset: 0, tolerance: 0.1, own: false }),
    } as OffsetVotes;
    expect(ambiguousOffsetWarnings(votes)).toEqual([
      {
        code: 'OFFSET_AMBIGUOUS',
        message: 'the instrument offset is ambiguous: a second value explains nearly as many lines as 0.123 cm-1',
      },
      {
        code: 'OFFSET_AMBIGUOUS',
        message:
          'the instrument offset of source "c" is ambiguous: a second value explains nearly as many lines as 0.010 cm-1',
      },
    ]);
  });
});

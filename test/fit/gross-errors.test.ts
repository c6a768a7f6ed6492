import { describe, expect, it } from 'vitest';
import { type FitResult, fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { screenGrossErrors } from '../../src/fit/gross-errors.js';
import { selectLevelModel } from '../../src/fit/level-selection.js';
import { MIN_SCATTER_GROUP } from '../../src/fit/weights.js';
import type { Observation } from '../../src/models/linear-model.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import { CO_12_16, independentLines, uniformStream } from '../helpers/independent-lines.js';
import { PullTally, tallyBandsAndLevels } from '../helpers/pulls.js';

/**
 * One gross error (a mislabelled line: J off by one, or the wrong branch) must not take good lines out with it.
 * The scale estimates (per group of stated σ, per band for lines without σ) start from a fit of all lines; before
 * gross errors were screened out of it (src/fit/gross-errors.ts), one J + 1 label in the real CO database list bent
 * that fit so far that the groups' scales came out 100–400 times too large, and the fit then rejected 30 good lines
 * instead of 10 (with the stated σ) and 50 instead of 24 (without σ); the level constants moved by up to 9 of their σ.
 *
 * Real data: the ¹²C¹⁶O database lines of test/fixtures/co-database-lines (HITRAN2020, see its SOURCE.md), sent
 * with their assignments. Synthetic data: the independent generator (test/helpers/independent-lines.ts, CO with
 * ω_e y_e, γ_e, β_e, H_e: not the level model the fit uses), 1–2 mislabels per list.
 */
const iso = parseSpecies('12C-16O');
const masses = new Map([[iso.formula, reducedMass(iso)]]);

type Label = { band: string; branch: 'P' | 'R'; j: number };
const indexOf = (l: Label) =>
  CO_DATABASE.lines.findIndex((x) => x.band === l.band && x.branch === l.branch && x.j === l.j);

function databaseInput(withSigma: boolean): LineInput[] {
  return CO_DATABASE.lines.map((l) => {
    const [upper, lower] = l.band.split('-').map(Number) as [number, number];
    return {
      position: l.position,
      ...(withSigma ? { uncertainty: l.uncertainty } : {}),
      assignment: { species: iso.formula, band: { upper, lower }, branch: l.branch, j: l.j, source: 'given' },
    };
  });
}

/** The list with each named line given a wrong label (`to`), and the input indices of those lines. */
function mislabelled(lines: readonly LineInput[], errors: readonly { from: Label; to: Partial<Label> }[]) {
  const out = [...lines];
  const bad = errors.map(({ from, to }) => {
    const i = indexOf(from);
    const line = out[i] as LineInput;
    const a = line.assignment as NonNullable<LineInput['assignment']>;
    out[i] = { ...line, assignment: { ...a, branch: to.branch ?? a.branch, j: to.j ?? a.j } };
    return i;
  });
  return { lines: out, bad };
}

const rejectedGood = (r: FitResult, bad: readonly number[]) =>
  r.lines.filter((l, i) => l.status === 'rejected' && !bad.includes(i)).length;

/** Largest |Δ|/σ of the B_v, D_v, H_v and band origins of `r` against those of `ref` (σ of `ref`). */
function largestShift(r: FitResult, ref: FitResult): number {
  let z = 0;
  const q = (a?: { value: number }, b?: { value: number; uncertainty: number }) => {
    if (a && b) z = Math.max(z, Math.abs(a.value - b.value) / b.uncertainty);
  };
  for (const lv of r.levels) {
    const c = ref.levels.find((x) => x.v === lv.v);
    q(lv.B, c?.B);
    q(lv.D, c?.D);
    q(lv.H, c?.H);
  }
  for (const b of r.bands) q(b.origin, ref.bands.find((x) => x.band === b.band)?.origin);
  return z;
}

const R10 = { band: '1-0', branch: 'R', j: 10 } as const;
const CASES: { name: string; errors: { from: Label; to: Partial<Label> }[] }[] = [
  { name: '1-0 R(10) sent as R(11)', errors: [{ from: R10, to: { j: 11 } }] },
  { name: '1-0 R(10) sent as P(10)', errors: [{ from: R10, to: { branch: 'P' } }] },
  { name: '0-0 R(20) sent as R(21)', errors: [{ from: { band: '0-0', branch: 'R', j: 20 }, to: { j: 21 } }] },
  { name: '2-1 R(5) sent as R(6)', errors: [{ from: { band: '2-1', branch: 'R', j: 5 }, to: { j: 6 } }] },
  { name: '2-0 P(15) sent as P(14)', errors: [{ from: { band: '2-0', branch: 'P', j: 15 }, to: { j: 14 } }] },
  { name: '3-0 R(12) sent as R(13)', errors: [{ from: { band: '3-0', branch: 'R', j: 12 }, to: { j: 13 } }] },
  {
    name: 'two: 1-0 R(10) as R(11), 2-1 R(5) as R(6)',
    errors: [
      { from: R10, to: { j: 11 } },
      { from: { band: '2-1', branch: 'R', j: 5 }, to: { j: 6 } },
    ],
  },
];
/**
 * Where the good lines' fate is the clean list's only up to the lines that are missing: with its stated σ the clean
 * list rejects 10 lines, the same list without 1-0 R(10), 2-0 P(15) and 3-0 R(12) rejects 5 (seven of the ten are
 * a cascade at studentised residuals 4.0–4.2 against a threshold of 4.00: 2-0 R(29)–R(35) and 3-0 P(32), which
 * three lines fewer keep below it); with those three mislabelled the fit rejects the same 5 and the three
 * (measured 2026-12-04).
 */
const FRAGILE: { name: string; errors: { from: Label; to: Partial<Label> }[] }[] = [
  {
    name: 'three: 1-0 R(10) as R(11), 2-0 P(15) as P(14), 3-0 R(12) as R(13)',
    errors: [
      { from: R10, to: { j: 11 } },
      { from: { band: '2-0', branch: 'P', j: 15 }, to: { j: 14 } },
      { from: { band: '3-0', branch: 'R', j: 12 }, to: { j: 13 } },
    ],
  },
];

describe('screenGrossErrors on the real CO database lines (stated σ as weights)', () => {
  const observations = (lines: readonly LineInput[]): Observation[] =>
    lines.map((l, index) => {
      const a = l.assignment as NonNullable<LineInput['assignment']>;
      const s = l.uncertainty as number;
      return {
        index,
        species: a.species,
        upperV: a.band.upper,
        lowerV: a.band.lower,
        upperJ: a.branch === 'R' ? a.j + 1 : a.j - 1,
        lowerJ: a.j,
        position: l.position,
        weight: 1 / (s * s),
      };
    });
  const refit = (obs: readonly Observation[]) => selectLevelModel(obs, 6, 'a-posteriori', 0.01);
  const groupOf = (o: Observation) => `${o.upperV}-${o.lowerV}|${Math.round(-Math.log10(1 / Math.sqrt(o.weight)))}`;

  it('the clean list: nothing found, the first fit handed back as it was', () => {
    const first = refit(observations(databaseInput(true)));
    const s = screenGrossErrors(first, refit, groupOf, MIN_SCATTER_GROUP);
    // Its worst line (3-0 R(38), 36 robust σ of the pooled scale: its small group has no scale of its own) is a
    // candidate, but leaving it out moves the other lines' scale by 1 %: a heavy tail, not a gross error.
    expect(s.gross.size).toBe(0);
    expect(s.level).toBe(first);
  });

  it('one J + 1 label: exactly that line found, and the fit without it', () => {
    const { lines, bad } = mislabelled(databaseInput(true), [{ from: R10, to: { j: 11 } }]);
    const s = screenGrossErrors(refit(observations(lines)), refit, groupOf, MIN_SCATTER_GROUP);
    expect([...s.gross]).toEqual(bad);
    expect(s.level.fit.observations.some((o) => o.index === bad[0])).toBe(false);
    expect(s.level.fit.observations).toHaveLength(lines.length - 1);
  });
});

describe('one to three mislabelled lines in the real CO database list', () => {
  for (const withSigma of [true, false]) {
    const mode = withSigma ? 'with the stated σ' : 'without σ';
    it(`${mode}: the good lines rejected as in the clean list (±2), the mislabels rejected, constants within 0.5σ`, () => {
      const input = databaseInput(withSigma);
      const clean = fitLineList(input, masses);
      const nClean = clean.lines.filter((l) => l.status === 'rejected').length;
      // Measured 2026-12-04: 10 with the stated σ, 24 without (before the screen: 30–36 and 37–50 with one mislabel).
      expect(nClean).toBe(withSigma ? 10 : 24);
      for (const c of CASES) {
        const { lines, bad } = mislabelled(input, c.errors);
        const r = fitLineList(lines, masses);
        expect(Math.abs(rejectedGood(r, bad) - nClean), c.name).toBeLessThanOrEqual(2);
        for (const i of bad) expect(r.lines[i]?.status, c.name).toBe('rejected');
        // Measured at most 0.26σ (before: 1.4–7.2σ).
        expect(largestShift(r, clean), c.name).toBeLessThan(0.5);
      }
    });

    it(`${mode}: the good lines' fate is that of the list without the mislabelled lines`, () => {
      const input = databaseInput(withSigma);
      for (const c of [...CASES, ...FRAGILE]) {
        const { lines, bad } = mislabelled(input, c.errors);
        const r = fitLineList(lines, masses);
        const without = fitLineList(
          input.filter((_, i) => !bad.includes(i)),
          masses,
        );
        const nWithout = without.lines.filter((l) => l.status === 'rejected').length;
        expect(Math.abs(rejectedGood(r, bad) - nWithout), c.name).toBeLessThanOrEqual(2);
        for (const i of bad) expect(r.lines[i]?.status, c.name).toBe('rejected');
        expect(largestShift(r, without), c.name).toBeLessThan(0.5);
      }
    });
  }
});

describe('200 synthetic lists with 1–2 mislabelled lines each', () => {
  const C = CO_12_16.constants;
  /** 1-0 (σ 0.0005) and 2-0 (σ 0.002), J″ ≤ 24; with σ: the fundamental's stated 30× too large (two groups). */
  function list(seed: number, withSigma: boolean): LineInput[] {
    const common = { molecule: CO_12_16, withUncertainties: withSigma } as const;
    return [
      ...independentLines({
        ...common,
        bands: [{ upper: 1, lower: 0, jMax: 24 }],
        sigma: 0.0005,
        reportedSigmaFactor: 30,
        seed,
      }).lines,
      ...independentLines({ ...common, bands: [{ upper: 2, lower: 0, jMax: 24 }], sigma: 0.002, seed: seed + 50_000 })
        .lines,
    ] as LineInput[];
  }
  /** 1 or 2 lines relabelled at random (J + 1, J − 1, or the other branch): errors of 2B–4BJ, 4–100 cm⁻¹. */
  function spoil(lines: LineInput[], seed: number): number[] {
    const u = uniformStream(seed * 7919 + 13);
    const count = 1 + Math.floor(u() * 2);
    const bad: number[] = [];
    while (bad.length < count) {
      const i = Math.floor(u() * lines.length);
      const line = lines[i] as LineInput;
      const a = line.assignment as NonNullable<LineInput['assignment']>;
      const kind = u();
      const to =
        kind < 0.4
          ? { ...a, j: a.j + 1 }
          : kind < 0.8
            ? { ...a, j: a.j - 1 }
            : { ...a, branch: a.branch === 'P' ? ('R' as const) : ('P' as const) };
      if (bad.includes(i) || to.j < (to.branch === 'P' ? 1 : 0)) continue;
      lines[i] = { ...line, assignment: to };
      bad.push(i);
    }
    return bad;
  }

  for (const withSigma of [true, false]) {
    const mode = withSigma ? 'stated σ in two disagreeing groups' : 'no σ (estimated per band)';
    it(`${mode}: constants covered (1σ 0.60–0.76, 2σ 0.92–0.99), mislabels rejected, good lines as without them`, () => {
      const tally = new PullTally();
      let same = 0;
      let worst = 0;
      let kept = 0;
      for (let seed = 1; seed <= 200; seed++) {
        const lines = list(seed, withSigma);
        const bad = spoil(lines, seed);
        const r = fitLineList(lines, masses);
        const without = fitLineList(
          lines.filter((_, i) => !bad.includes(i)),
          masses,
        );
        const d = Math.abs(rejectedGood(r, bad) - without.lines.filter((l) => l.status === 'rejected').length);
        if (d === 0) same++;
        worst = Math.max(worst, d);
        kept += bad.filter((i) => r.lines[i]?.status !== 'rejected').length;
        tallyBandsAndLevels(tally, r, C);
      }
      if (process.env.PULLS_LOG)
        console.info(tally.table(), `\nas without the mislabels: ${same} of 200, worst ${worst}`);
      const s = tally.summary();
      // Nominal 0.683 and 0.954; measured 2026-12-04 (8 quantities × 200 lists): with σ 0.701 / 0.949, without σ
      // 0.706 / 0.948.
      expect(s.within1).toBeGreaterThan(0.6);
      expect(s.within1).toBeLessThan(0.76);
      expect(s.within2).toBeGreaterThanOrEqual(0.92);
      expect(s.within2).toBeLessThan(0.99);
      expect(Math.abs(s.mean)).toBeLessThan(0.35);
      expect(kept).toBe(0);
      // Good lines rejected, against the same list without the mislabelled lines: measured identical in 200 and
      // 198 of 200 lists (at most 1 apart); before the screen 193 and 194 (up to 4 apart).
      expect(worst).toBeLessThanOrEqual(1);
      expect(same).toBeGreaterThanOrEqual(196);
    });
  }
});

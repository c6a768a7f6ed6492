import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import type { PeakInput } from '../../src/assign/assign-lines.js';
import { runChecks } from '../../src/qa/checks.js';
import { parseSpecies } from '../../src/species/parse.js';
import { type CoDatabaseLine as DbLine, CO_DATABASE as fixture } from '../helpers/co-database.js';

/**
 * Real database lines of 12C16O (test/fixtures/co-database-lines/: HITRAN2020, Gordon et al., JQSRT 277, 107949
 * (2022)) with parts missing, sent without assignments and with the species declared as "CO" (the natural mixture):
 * the saturated band centre cut out, only high J, random subsets, two scans whose intensities were normalised
 * separately. Shares are counted over every line sent: correct (12C16O and the published band, branch and J), wrong
 * (any other label), unassigned. Required: ≥ 98 % correct and none wrong (issue #12). The shares measured before the
 * gap pass, per-source intensity scales and position-established bands are in each comment (after: all 100 %).
 */
const band = (b: string) => fixture.lines.filter((l) => l.band === b);
const fundamental = band('1-0');
const overtone = band('2-0');
const positionsOnly = (l: DbLine): PeakInput => ({ position: l.position });

function shares(lines: readonly DbLine[], peakOf: (l: DbLine, i: number) => PeakInput) {
  const peaks = lines.map(peakOf);
  const a = analyseLineList(peaks, parseSpecies('CO'));
  let correct = 0;
  let wrong = 0;
  const misses: string[] = [];
  a.result.lines.forEach((r, i) => {
    const l = lines[i] as DbLine;
    const t = r.assignment;
    if (!t) misses.push(`${l.band} ${l.branch}(${l.j}) unassigned: ${a.notes.get(i) ?? ''}`);
    else if (/^12C-?16O$/.test(t.species) && t.band === l.band && t.branch === l.branch && t.j === l.j) correct++;
    else {
      wrong++;
      misses.push(`${l.band} ${l.branch}(${l.j}) as ${t.species} ${t.band} ${t.branch}(${t.j})`);
    }
  });
  return { a, peaks, n: lines.length, correct, wrong, why: misses.slice(0, 20).join('; ') };
}

function expectNearlyAll(s: ReturnType<typeof shares>) {
  expect(s.wrong, s.why).toBe(0);
  expect(s.correct / s.n, s.why).toBeGreaterThanOrEqual(0.98);
}

/** A seeded generator (LCG, Numerical Recipes constants) and Box–Muller normal deviates. */
function generator(seed: number) {
  let s = seed >>> 0;
  const uniform = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s + 0.5) / 2 ** 32;
  };
  const normal = () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
  return { uniform, normal };
}

describe('bands with gaps (real CO lines, declared "CO")', () => {
  it('the fundamental with its saturated centre cut out (J = 3–14 dropped, 92 lines): all assigned, QA passes', () => {
    // Before: 5 of 92 correct (P(1), P(2), R(0)–R(2)), 87 unassigned, 0 wrong; /v1/checks failed. After: 92 of 92.
    const lines = fundamental.filter((l) => l.j < 3 || l.j > 14);
    const s = shares(lines, positionsOnly);
    expectNearlyAll(s);
    const report = runChecks(s.peaks, parseSpecies('CO'), s.a);
    expect(report.checks.find((c) => c.id === 'unexplained-lines')?.status).toBe('pass');
  });

  it('only J ≥ 15 of the fundamental (87 lines) and only J ≥ 10 of the overtone (87 lines)', () => {
    // Before: both refused (422 FIT_NO_ASSIGNED_LINES, naming a 12C18O or 13C16O band as best). After: 87 of 87 each.
    expectNearlyAll(
      shares(
        fundamental.filter((l) => l.j >= 15),
        positionsOnly,
      ),
    );
    expectNearlyAll(
      shares(
        overtone.filter((l) => l.j >= 10),
        positionsOnly,
      ),
    );
  });

  it('fundamental and overtone with J ≤ 9 dropped (184 lines) and with J = 20–35 dropped (158 lines)', () => {
    // Before: 422 for the first; 78 of 158 correct for the second (80 unassigned, 0 wrong). After: 184/184, 158/158.
    const both = [...fundamental, ...overtone];
    expectNearlyAll(
      shares(
        both.filter((l) => l.j > 9),
        positionsOnly,
      ),
    );
    expectNearlyAll(
      shares(
        both.filter((l) => l.j < 20 || l.j > 35),
        positionsOnly,
      ),
    );
  });
});

describe('sparse random subsets of the fundamental and overtone (fixed seeds, positions moved by σ = 0.002 cm⁻¹)', () => {
  // Before (same seeds, with σ / without): 30 lines 422 / 422; 44 lines 10 / 5 correct; 60 lines (seed 1) 11 / 11;
  // 60 lines (seed 3) 34 / 21; 121 lines 121 / 121; never a wrong label. After: every line correct in all ten runs.
  const cases = [
    { seed: 5, n: 30 },
    { seed: 2, n: 44 },
    { seed: 1, n: 60 },
    { seed: 3, n: 60 },
    { seed: 4, n: 121 },
  ];
  for (const { seed, n } of cases) {
    it(`${n} lines drawn with seed ${seed}, with and without their σ`, () => {
      const g = generator(seed);
      const pool = [...fundamental, ...overtone].map((l) => ({ l, key: g.uniform() }));
      const lines = pool
        .sort((a, b) => a.key - b.key)
        .slice(0, n)
        .map((x) => x.l);
      const noise = lines.map(() => 0.002 * g.normal());
      const moved = (l: DbLine, i: number) => l.position + (noise[i] as number);
      expectNearlyAll(shares(lines, (l, i) => ({ position: moved(l, i), uncertainty: 0.002 })));
      expectNearlyAll(shares(lines, (l, i) => ({ position: moved(l, i) })));
    });
  }
});

describe('two scans whose intensities were normalised separately (fundamental and overtone, 222 lines)', () => {
  // Intensities written out here, not from src/: Hönl–London factor |m| × Boltzmann factor exp(−c₂E″/kT) × ν at
  // 296 K with E″ = B J″(J″+1), B = 1.9225 cm⁻¹ (12C16O B_0, Huber & Herzberg, from memory), c₂ = 1.4387769 cm K
  // (CODATA 2018); each band divided by its own strongest line, as two scans normalised apiece. The overtone is then
  // about 100× stronger than the library predicts against the fundamental (band-strength ratio ~1e-2, common practice).
  const c2 = 1.4387769;
  const raw = (l: DbLine) =>
    (l.branch === 'R' ? l.j + 1 : l.j) * Math.exp((-c2 * 1.9225 * l.j * (l.j + 1)) / 296) * l.position;
  const normalised = (ls: readonly DbLine[]) => {
    const top = Math.max(...ls.map(raw));
    return new Map(ls.map((l) => [l, raw(l) / top]));
  };
  const scale = new Map([...normalised(fundamental), ...normalised(overtone)]);
  const lines = [...fundamental, ...overtone];
  const intensity = (l: DbLine) => scale.get(l) as number;

  it('labelled with their source: intensities compared within a scan only, every line assigned', () => {
    // Before: 106 of 222 (the overtone); all 116 fundamental lines refused for their intensity. After: 222 of 222.
    const s = shares(lines, (l) => ({ position: l.position, intensity: intensity(l), source: l.band }));
    expectNearlyAll(s);
    expect(s.a.result.warnings.map((w) => w.code)).not.toContain('INTENSITY_SCALE_DIFFERS');
  });

  it('without sources: every line assigned by position, with a warning naming the intensity scale', () => {
    // Before: 106 of 222, the 116 fundamental lines "explained by no band". After: 222 of 222 and one warning.
    const s = shares(lines, (l) => ({ position: l.position, intensity: intensity(l) }));
    expectNearlyAll(s);
    const w = s.a.result.warnings.find((x) => x.code === 'INTENSITY_SCALE_DIFFERS');
    expect(w?.message).toMatch(/intensit.*normalised separately/);
  });
});

describe('a line left out for its intensity says so', () => {
  it('seven overtone lines sent on the fundamental’s scale (×100 too strong): noted as left out for their intensity', () => {
    // The fundamental with intensities written out as above, plus 2-0 P(1)–P(3), R(0)–R(3) on the same raw scale
    // (the library predicts the overtone ~1e-2 of the fundamental, common practice): too few overtone lines for
    // their positions alone to establish the band, so the intensity test decides. Before: "explained by no band".
    const c2 = 1.4387769;
    const raw = (l: DbLine) =>
      (l.branch === 'R' ? l.j + 1 : l.j) * Math.exp((-c2 * 1.9225 * l.j * (l.j + 1)) / 296) * l.position;
    const extra = overtone.filter((l) => l.j <= 3);
    const lines = [...fundamental, ...extra];
    const a = analyseLineList(
      lines.map((l) => ({ position: l.position, intensity: raw(l) })),
      parseSpecies('CO'),
    );
    const leftOut = lines.map((_, i) => i).filter((i) => i >= fundamental.length);
    for (const i of leftOut) {
      expect(a.result.lines[i]?.assignment).toBeUndefined();
      expect(a.notes.get(i)).toMatch(/^left out for its intensity: .*2-0/);
    }
    const w = a.result.warnings.find((x) => x.code === 'LINES_LEFT_OUT_FOR_INTENSITY');
    expect(w?.lines).toEqual(leftOut);
    const noBand = a.result.warnings.find((x) => x.code === 'LINES_UNEXPLAINED');
    expect(noBand?.lines ?? []).not.toContain(fundamental.length);
  });
});

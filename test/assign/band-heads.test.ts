import { afterAll, describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { edgeCandidates, labelChiSquare, type PeakInput, widestTolerance } from '../../src/assign/assign-lines.js';
import { candidateLines } from '../../src/assign/candidates.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import {
  type BandRequest,
  CO_12_16,
  HBR_1_79,
  HCL_1_35,
  independentLines,
  type MoleculeConstants,
  uniformStream,
} from '../helpers/independent-lines.js';

/**
 * Lines at and around R-branch heads (B′ < B″: R(J) turns back past J_head ≈ (B′ + B″)/2(B″ − B′) − 1, so R(J) and
 * R(≈2J_head − J) close in on one another), sent without assignments. Every line is compared with its truth: right
 * (its own label), wrong (another label), left (no label). The rule: right, or left with a reason, never wrong.
 *
 * Data not made here: the real 12C16O database lines (test/fixtures/co-database-lines/, HITRAN2020, Gordon et al.,
 * JQSRT 277, 107949 (2022)), and lists from the independent generator (test/helpers/independent-lines.ts: its own
 * term values from Huber & Herzberg's constants with ω_e y_e, γ_e, β_e and H_e, recalled from memory as its sources
 * say, which differ from the library's), with Gaussian noise of σ = 1e-3 cm⁻¹ unless said otherwise.
 */

interface Counts {
  right: number;
  wrong: number;
  left: number;
}
interface Truth {
  band: string;
  branch: string;
  j: number;
}

const measured: string[] = [];

function count(
  name: string,
  peaks: readonly PeakInput[],
  truth: readonly Truth[],
  species: string,
): Counts & { misses: string[]; reasons: Map<string, string> } {
  const a = analyseLineList(peaks, parseSpecies(species));
  const out = { right: 0, wrong: 0, left: 0, misses: [] as string[], reasons: new Map<string, string>() };
  a.result.lines.forEach((r, i) => {
    const t = truth[i] as Truth;
    const label = `${t.band} ${t.branch}(${t.j})`;
    const x = r.assignment;
    if (!x) {
      out.left++;
      out.misses.push(`${label} left`);
      out.reasons.set(label, a.notes.get(i) ?? r.reason ?? '');
    } else if (x.band === t.band && x.branch === t.branch && x.j === t.j) out.right++;
    else {
      out.wrong++;
      out.misses.push(`${label} as ${x.band} ${x.branch}(${x.j})`);
    }
  });
  measured.push(`${name}: right ${out.right}, wrong ${out.wrong}, left ${out.left}`);
  return out;
}

const countsOf = (c: Counts): Counts => ({ right: c.right, wrong: c.wrong, left: c.left });

interface ListOptions {
  readonly molecule: MoleculeConstants;
  readonly bands: readonly BandRequest[];
  readonly seed: number;
  readonly sigma?: number;
  /** Send each line's σ. */
  readonly withSigma: boolean;
  /** Half the lines (at random) from a second instrument: σ × 3 and +0.004 cm⁻¹, labelled by source. */
  readonly twoInstruments?: boolean;
  /** Lines left out of the list. */
  readonly drop?: (t: Truth) => boolean;
}

/** A generated list sorted by position, with its truth. */
function generated(o: ListOptions): { peaks: PeakInput[]; truth: Truth[] } {
  const sigma = o.sigma ?? 1e-3;
  const pick = uniformStream(o.seed + 77);
  const rows: { peak: PeakInput; truth: Truth }[] = [];
  o.bands.forEach((b, k) => {
    const a = independentLines({ molecule: o.molecule, bands: [b], sigma, seed: o.seed * 31 + k, unassigned: true });
    const second = independentLines({
      molecule: o.molecule,
      bands: [{ ...b, offset: 0.004 }],
      sigma: 3 * sigma,
      seed: o.seed * 37 + k,
      unassigned: true,
    });
    a.lines.forEach((l, i) => {
      const g = a.truth[i];
      const fromB = o.twoInstruments === true && pick() < 0.5;
      const truth = { band: g?.band ?? '', branch: g?.branch ?? '', j: g?.j ?? -1 };
      if (o.drop?.(truth)) return;
      const s = fromB ? 3 * sigma : sigma;
      rows.push({
        peak: {
          position: fromB ? (second.lines[i]?.position ?? Number.NaN) : l.position,
          ...(o.withSigma ? { uncertainty: s } : {}),
          ...(o.twoInstruments ? { source: fromB ? 'B' : 'A' } : {}),
        },
        truth,
      });
    });
  });
  rows.sort((x, y) => x.peak.position - y.peak.position);
  return { peaks: rows.map((r) => r.peak), truth: rows.map((r) => r.truth) };
}

afterAll(() => {
  console.info(measured.join('\n'));
});

describe('real 12C16O database lines near the 2-0 and 3-0 R heads, sent without assignments', () => {
  const truth = CO_DATABASE.lines.map((l) => ({ band: l.band, branch: l.branch, j: l.j }));
  for (const withSigma of [true, false]) {
    for (const species of ['12C16O', 'CO']) {
      it(`species ${species}, ${withSigma ? 'with' : 'without'} σ: 494 right, 0 wrong, 0 left`, () => {
        // Before: with σ, 3-0 R(34) and R(40) (8e-5 and 1.3e-4 cm⁻¹ off the band's smooth fit, 8 and 13 times
        // their stated σ) were left unassigned without a note: 492 / 0 / 2. Without σ: 494 / 0 / 0 already.
        const peaks = CO_DATABASE.lines.map((l) => ({
          position: l.position,
          ...(withSigma ? { uncertainty: l.uncertainty } : {}),
        }));
        const c = count(`real CO, ${species}, ${withSigma ? 'σ' : 'no σ'}`, peaks, truth, species);
        expect(countsOf(c), c.misses.join('; ')).toEqual({ right: 494, wrong: 0, left: 0 });
      });
    }
  }

  it('the 3-0 band alone with σ (95 lines, R(0)–R(48) through the head at R(34)): 95 right', () => {
    const lines = CO_DATABASE.lines.filter((l) => l.band === '3-0');
    const c = count(
      'real CO 3-0 alone, σ',
      lines.map((l) => ({ position: l.position, uncertainty: l.uncertainty })),
      lines.map((l) => ({ band: l.band, branch: l.branch, j: l.j })),
      'CO',
    );
    expect(countsOf(c), c.misses.join('; ')).toEqual({ right: 95, wrong: 0, left: 0 });
  });
});

describe('generated overtones through their R heads (σ 1e-3 cm⁻¹): with σ, without σ, two instruments', () => {
  const CO: BandRequest[] = [
    { upper: 2, lower: 0, jMax: 70 },
    { upper: 3, lower: 0, jMax: 60 },
  ];
  const HX: BandRequest[] = [
    { upper: 2, lower: 0, jMax: 20 },
    { upper: 3, lower: 0, jMax: 16 },
  ];
  // Measured per seed 1, 2, 3 (right / wrong / left). CO: 2-0 head at R(51), 3-0 at R(34); HCl 2-0 at R(15), 3-0 at
  // R(10); HBr 2-0 at R(16), 3-0 at R(10).
  const cases: [
    string,
    MoleculeConstants,
    string,
    BandRequest[],
    Omit<ListOptions, 'molecule' | 'bands' | 'seed'>,
    Counts[],
  ][] = [
    ['CO 2-0 + 3-0, σ', CO_12_16, 'CO', CO, { withSigma: true }, [{ right: 262, wrong: 0, left: 0 }]],
    ['CO 2-0 + 3-0, no σ', CO_12_16, 'CO', CO, { withSigma: false }, [{ right: 262, wrong: 0, left: 0 }]],
    // Instrument B's σ (3e-3) left 2-0 R(50) and R(51), 0.011 cm⁻¹ apart, within each other's reach in seed 1
    // (260 / 0 / 2) until the stated σ of a source's bands were rescaled band by band (src/fit/stated-scale.ts).
    [
      'CO 2-0 + 3-0, two instruments',
      CO_12_16,
      'CO',
      CO,
      { withSigma: true, twoInstruments: true },
      [
        { right: 262, wrong: 0, left: 0 },
        { right: 262, wrong: 0, left: 0 },
        { right: 262, wrong: 0, left: 0 },
      ],
    ],
    // HCl and HBr: before, 2-0 R(20) and P(20) were left (72 / 0 / 2): R(20) until the reference's second opinion
    // counted only the change of its disagreement from the band's reach (7.3 cm⁻¹ at R(19) already; the library has
    // no γ_e, β_e, H_e), P(20), the lowest line, until candidates were drawn from beyond the window's edges too (the
    // library places it more than 1 cm⁻¹ below the lowest line).
    ['HCl 2-0 + 3-0, σ', HCL_1_35, 'HCl', HX, { withSigma: true }, [{ right: 74, wrong: 0, left: 0 }]],
    ['HCl 2-0 + 3-0, no σ', HCL_1_35, 'HCl', HX, { withSigma: false }, [{ right: 74, wrong: 0, left: 0 }]],
    // Further past the heads (2-0 to J = 24, 3-0 to J = 18): 80 / 0 / 6 before (2-0 P and R of J = 22–24 left).
    // The fundamentals to J = 22: 44 / 0 / 1 before (P(22), the lowest line, left).
    [
      'HCl 2-0 to J 24 + 3-0 to J 18, σ',
      HCL_1_35,
      'HCl',
      [
        { upper: 2, lower: 0, jMax: 24 },
        { upper: 3, lower: 0, jMax: 18 },
      ],
      { withSigma: true },
      [{ right: 86, wrong: 0, left: 0 }],
    ],
    [
      'HCl 1-0 to J 22, σ',
      HCL_1_35,
      'HCl',
      [{ upper: 1, lower: 0, jMax: 22 }],
      { withSigma: true },
      [{ right: 45, wrong: 0, left: 0 }],
    ],
    [
      'HBr 1-0 to J 22, no σ',
      HBR_1_79,
      'HBr',
      [{ upper: 1, lower: 0, jMax: 22 }],
      { withSigma: false },
      [{ right: 45, wrong: 0, left: 0 }],
    ],
    // The library has no γ_e: its 3-0 drifts 0.04 cm⁻¹ at R(0) to 0.4 at R(3), and the band, its lines split over
    // two offsets, was not found in one seed in three (41/0/33) until a band that finds too few lines at one offset
    // may vote with a J-dependent drift (src/assign/drift.ts).
    [
      'HCl 2-0 + 3-0, two instruments',
      HCL_1_35,
      'HCl',
      HX,
      { withSigma: true, twoInstruments: true },
      [
        { right: 74, wrong: 0, left: 0 },
        { right: 74, wrong: 0, left: 0 },
        { right: 74, wrong: 0, left: 0 },
      ],
    ],
    ['HBr 2-0 + 3-0, σ', HBR_1_79, 'HBr', HX, { withSigma: true }, [{ right: 74, wrong: 0, left: 0 }]],
    ['HBr 2-0 + 3-0, no σ', HBR_1_79, 'HBr', HX, { withSigma: false }, [{ right: 74, wrong: 0, left: 0 }]],
    [
      'HBr 2-0 + 3-0, two instruments',
      HBR_1_79,
      'HBr',
      HX,
      { withSigma: true, twoInstruments: true },
      [
        { right: 74, wrong: 0, left: 0 },
        { right: 74, wrong: 0, left: 0 },
        { right: 74, wrong: 0, left: 0 },
      ],
    ],
  ];
  for (const [name, molecule, species, bands, options, expected] of cases) {
    it(`${name}: none wrong (${expected.map((e) => `${e.right}/${e.wrong}/${e.left}`).join(', ')})`, () => {
      expected.forEach((e, k) => {
        const seed = k + 1;
        const g = generated({ molecule, bands, seed, ...options });
        const c = count(`${name}, seed ${seed}`, g.peaks, g.truth, species);
        expect(c.wrong, c.misses.join('; ')).toBe(0);
        expect(countsOf(c), c.misses.join('; ')).toEqual(e);
      });
    });
  }
});

describe('pairs closer than their uncertainty, and a pair with one line missing', () => {
  // Near-coincident R lines of the generated 12C16O overtones (positions from the generator's constants): 3-0 R(0)
  // and R(68) 0.0071 cm⁻¹ apart, 2-0 R(50) and R(51) 0.011, R(28) and R(73) 0.017.
  const wide: BandRequest[] = [{ upper: 2, lower: 0, jMax: 75 }];
  const head3: BandRequest[] = [{ upper: 3, lower: 0, jMax: 70 }];
  const pairNote = /left unassigned: 12C-16O \d-0 R\(\d+\) and 12C-16O \d-0 R\(\d+\) are predicted 0\.0\d+ cm-1 apart/;

  it('σ = 0.01 cm⁻¹, with and without σ, seeds 1–3: none wrong; each line left names the pair', () => {
    // Before the rule: 14 wrong over these 12 lists, each an exchanged pair (3-0 R(0)/R(68) in seeds 1 and 3, 2-0
    // R(28)/R(73) in seed 3), 0 left. Now 0 wrong, 2 to 6 left per list.
    for (const seed of [1, 2, 3]) {
      for (const withSigma of [true, false]) {
        for (const [name, bands] of [
          ['2-0 to R(75)', wide],
          ['3-0 to R(70)', head3],
        ] as const) {
          const g = generated({ molecule: CO_12_16, bands, seed, sigma: 0.01, withSigma });
          const c = count(
            `CO ${name}, σ 0.01 ${withSigma ? 'given' : 'not given'}, seed ${seed}`,
            g.peaks,
            g.truth,
            'CO',
          );
          expect(c.wrong, c.misses.join('; ')).toBe(0);
          expect(c.right, c.misses.join('; ')).toBeGreaterThanOrEqual(g.peaks.length - 6);
          for (const [label, why] of c.reasons) expect(why, label).toMatch(pairNote);
        }
      }
    }
  });

  it('2-0 without R(51), σ = 0.003: its partner R(50) is right or left with the pair named, never taken as R(51)', () => {
    // Before: seed 3 gave R(50) the label R(51) (1 wrong, with and without σ). Measured now: seeds 1 and 3 leave
    // R(50) (0.011 cm⁻¹ = 3.7σ from R(51)'s prediction), seed 2 assigns it right, and so does seed 1 without σ,
    // where the final fit places R(50) alone on it (src/assign/fill.ts; R(51) reaches no free line there).
    const left: number[] = [];
    for (const seed of [1, 2, 3]) {
      for (const withSigma of [true, false]) {
        const g = generated({
          molecule: CO_12_16,
          bands: wide,
          seed,
          sigma: 0.003,
          withSigma,
          drop: (t) => t.branch === 'R' && t.j === 51,
        });
        const c = count(
          `CO 2-0 without R(51), σ 0.003 ${withSigma ? 'given' : 'not given'}, seed ${seed}`,
          g.peaks,
          g.truth,
          'CO',
        );
        expect(c.wrong, c.misses.join('; ')).toBe(0);
        for (const [label, why] of c.reasons) {
          expect(label).toBe('2-0 R(50)');
          expect(why).toMatch(/R\(50\) and 12C-16O 2-0 R\(51\)|R\(51\) and 12C-16O 2-0 R\(50\)/);
        }
        left.push(c.left);
      }
    }
    expect(left).toEqual([1, 0, 0, 0, 1, 1]);
  });
});

describe('the χ² a label leaves a line (labelChiSquare), worked by hand', () => {
  const pr = { key: '1', position: 100, tolerance: 0.005 };
  it('(Δ/s)² + 2 ln s with s = tolerance / 5; undefined beyond the tolerance', () => {
    expect(labelChiSquare(pr, { index: 0, position: 100.001 }) as number).toBeCloseTo(1 + 2 * Math.log(0.001), 9);
    expect(labelChiSquare(pr, { index: 0, position: 99.995 }) as number).toBeCloseTo(25 + 2 * Math.log(0.001), 9);
    expect(labelChiSquare(pr, { index: 0, position: 100.0051 })).toBeUndefined();
  });
  it('a line with σ: s = √(model² + (perSigma σ)²) / 5', () => {
    const withSigma = { ...pr, withSigma: { model: 0.003, perSigma: 5 } };
    const s = Math.hypot(0.003, 0.005) / 5;
    const got = labelChiSquare(withSigma, { index: 0, position: 100.002, sigma: 0.001 }) as number;
    expect(got).toBeCloseTo((0.002 / s) ** 2 + 2 * Math.log(s), 9);
  });
  it('intensities: 12.5 (ln ratio)² added; beyond the ratio limit undefined', () => {
    const withIntensity = { ...pr, intensity: 1 };
    const base = 2 * Math.log(0.001);
    expect(labelChiSquare(withIntensity, { index: 0, position: 100, intensity: 2 }) as number).toBeCloseTo(
      base + 12.5 * Math.log(2) ** 2,
      9,
    );
    expect(labelChiSquare(withIntensity, { index: 0, position: 100, intensity: 9 })).toBeUndefined();
    expect(labelChiSquare(withIntensity, { index: 0, position: 100, intensity: 0 })).toBeUndefined();
  });
  it('widestTolerance: the largest of the tolerances, a prediction for lines with σ at the largest σ', () => {
    const preds = [pr, { key: '2', position: 101, tolerance: 0.002, withSigma: { model: 0.001, perSigma: 5 } }];
    expect(widestTolerance(preds, 0)).toBe(0.005);
    expect(widestTolerance(preds, 0.002)).toBeCloseTo(Math.hypot(0.001, 0.01), 15);
  });
});

describe('candidates beyond the window edges (edgeCandidates)', () => {
  it('lie within 25 cm⁻¹ outside [lo, hi], on the intensity scale of the candidates inside', () => {
    const species = [{ iso: parseSpecies('H35Cl'), abundance: 1 }];
    const options = { minRelativeIntensity: 0, maxJ: 150 };
    const inner = candidateLines(species, 5100, 5800, options);
    const edge = edgeCandidates(species, 5100, 5800, {}, inner);
    expect(edge.length).toBeGreaterThan(0);
    for (const c of edge) {
      expect(c.position < 5100 || c.position > 5800).toBe(true);
      expect(c.position).toBeGreaterThanOrEqual(5100 - 25);
      expect(c.position).toBeLessThanOrEqual(5800 + 25);
    }
    // One call over the whole span gives the same ratios between lines inside and beyond the window.
    const all = candidateLines(species, 5100 - 25, 5800 + 25, options);
    const key = (c: { band: { upper: number }; branch: string; j: number; species: string }) =>
      `${c.species} ${c.band.upper} ${c.branch}${c.j}`;
    const inAll = new Map(all.map((c) => [key(c), c.intensity]));
    const first = inner[0] as (typeof inner)[number];
    for (const c of edge) {
      expect(c.intensity / first.intensity).toBeCloseTo(
        (inAll.get(key(c)) as number) / (inAll.get(key(first)) as number),
        12,
      );
    }
    expect(edgeCandidates(species, 5100, 5800, {}, [])).toEqual([]);
  });
});

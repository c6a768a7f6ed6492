import { afterAll, describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { heldoutScan, type ScanScore, scoreScan, sweepOptions } from '../helpers/heldout-scans.js';

/**
 * Held-out scans (test/helpers/heldout-scans.ts: its own Dunham constants to the H and L terms, each value's source
 * named there; every isotopologue at natural abundance; the real 12C16O database positions; hot bands, overtones,
 * Herman–Wallis intensities, a detection limit, blends, lost lines, spurious peaks, an offset up to ±0.2 cm⁻¹,
 * one or two instruments, σ sent or not, intensities sent or not; nothing of src/models or the library), seeds
 * 1–30 of the sweep as they come (no seed chosen), the temperature sent with odd seeds only. Counted per peak:
 * right, wrong (another species, band, branch or J than any transition under it), left; the "clear" lines (one
 * transition, 5× above the detection limit, abundance ≥ 1e-3) a person would assign without doubt. Pulls: test/assign/heldout-pulls.test.ts.
 * The full sweep (240 seeds, npx tsx scripts/heldout-sweep.ts 240) measured on this change, before → after:
 * clear lines assigned right 64.0 % → 85.6 %, wrong 790 → 619 of ~46 000 peaks; without a temperature but with
 * intensities 36.3 % → 84.6 % (the temperature read from the intensities, src/assign/temperature.ts). The drift vote
 * (src/assign/drift.ts) and the final fit that withdraws a band rather than refuse the list, same sweep: 85.6 % →
 * 88.7 %, wrong 619 → 570, scans refused 9 → 0; every CO class unchanged to the line. The temperature read from
 * the cold band holding most intensity (not most lines): 88.7 % → 90.7 %, wrong 570 → 543.
 * The generator's H19F given a Y40 (fitted to the real band origins, from memory: its 3-0 origin 2.09 cm⁻¹ and 2-0
 * 0.52 cm⁻¹ below the library's) made the sweep harder: 90.73 % → 89.85 %, HF 2+3 one instrument 100 % → 52.2 %;
 * seeds 1–30 88.3 % → 86.1 %. A band that finds nothing within the window then searching beyond it, as far as its
 * library origin is uncertain (src/assign/reach.ts): 89.85 % → 90.75 %, wrong 510 → 511, HF 2+3 one instrument back
 * to 100 %, every CO, HCl and HBr class unchanged to the line; seeds 1–30 86.1 % → 88.5 %, wrong 0.87 %.
 * Thresholds, measured on seeds 1–30 (see the table printed): stated beside each.
 */
const SEEDS = Array.from({ length: 30 }, (_, i) => i + 1);
const rows: string[] = [];
afterAll(() => console.info(rows.join('\n')));

interface Outcome {
  readonly seed: number;
  readonly score?: ScanScore;
}

function run(seed: number): Outcome {
  const o = sweepOptions(seed);
  const scan = heldoutScan(o);
  try {
    const r = analyseLineList(scan.peaks, parseSpecies(o.molecule), seed % 2 ? { temperature: o.temperature } : {});
    const score = scoreScan(scan.truth, r.result.lines);
    rows.push(
      `seed ${seed} ${o.molecule} Δv ${o.deltaV.join('+')} ${o.b ? 'two instruments' : 'one'} T ${o.temperature}: right ${score.right} wrong ${score.wrong} left ${score.left} clear ${score.clearRight}/${score.clear}`,
    );
    return { seed, score };
  } catch (e) {
    rows.push(`seed ${seed} ${o.molecule}: ${(e as Error).message.slice(0, 120)}`);
    return { seed };
  }
}

describe('held-out scans of CO, HCl, HBr and HF (30 seeds)', () => {
  const outcomes = SEEDS.map(run);
  const sum = (k: keyof ScanScore) => outcomes.reduce((s, o) => s + ((o.score?.[k] as number | undefined) ?? 0), 0);

  it('assigns the clear lines: ≥ 87 % of them right over the 30 scans (measured 88.5 % with the generator’s real-like H19F origins, 86.1 % before bands searched beyond the window for them, 88.3 % with the library’s origins; 84.3 % before the drift vote, 68.2 % before the temperature was read)', () => {
    const share = sum('clearRight') / sum('clear');
    rows.push(`clear lines right ${sum('clearRight')} / ${sum('clear')} = ${(100 * share).toFixed(1)} %`);
    expect(share).toBeGreaterThanOrEqual(0.87);
  });

  it('numbers few lines wrong: ≤ 1.5 % of the lines assigned (measured 0.87 %; 0.86 % with the library’s H19F origins, 1.73 % before the drift vote, 2.43 % before that), ≤ 5 % of spurious peaks taken (3.67 %)', () => {
    const wrong = sum('wrong') / (sum('right') + sum('wrong'));
    rows.push(
      `wrong ${sum('wrong')} of ${sum('right') + sum('wrong')} assigned; spurious taken ${sum('spuriousTaken')} / ${sum('spurious')}`,
    );
    expect(wrong).toBeLessThanOrEqual(0.015);
    expect(sum('spuriousTaken') / sum('spurious')).toBeLessThanOrEqual(0.05);
  });

  it('fails none of the 30 scans outright (seed 18, an HF 1-0 + 2-0 list of 23 peaks, failed until bands could vote with a drift: src/assign/drift.ts)', () => {
    expect(outcomes.filter((o) => !o.score).map((o) => o.seed)).toEqual([]);
  });
});

import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { heldoutScan, type PeakTruth, sweepOptions, type Transition } from '../helpers/heldout-scans.js';

// The last stage of the automatic assignment (src/assign/fill.ts): lines the final fit places alone on a free line
// are added. The class it is for: clear lines in the middle of a band whose neighbours (J − 1 and J + 1 of the same
// branch) are assigned, left unassigned by the rounds. Scans of test/helpers/heldout-scans.ts (its own Dunham
// constants, natural isotopologues, one or two instruments, spurious and lost lines; nothing shared with the
// library): H⁷⁹Br/H⁸¹Br at 700–1 400 K, one instrument and two interleaved. Measured on these four scans without the
// stage: 57 such gaps and 7 lines wrong; with it 30 and 4, the stage placing 61 lines, one of them wrong (seed 35:
// a weak 3-2 R(20) line where 2-1 R(8) is predicted, 0.0009 cm⁻¹ off; a coincidence positions alone cannot tell).

interface Outcome {
  gaps: number;
  wrong: number;
  placed: number;
  placedWrong: number;
}

const label = (t: Transition) => `${t.species}|${t.band}|${t.branch}`;

function outcome(seed: number): Outcome {
  const o = sweepOptions(seed);
  const scan = heldoutScan(o);
  const a = analyseLineList(scan.peaks, parseSpecies(o.molecule), seed % 2 ? { temperature: o.temperature } : {});
  const out = a.result.lines;
  const right = new Set<string>();
  let wrong = 0;
  let placed = 0;
  let placedWrong = 0;
  scan.truth.forEach((t: PeakTruth, i) => {
    const line = out[i];
    const got = line?.status === 'fitted' ? line.assignment : undefined;
    const atEnd = /^assigned at the end/.test(a.notes.get(i) ?? '');
    if (atEnd) placed++;
    if (!got) return;
    const x = t.transitions[0];
    const same =
      x !== undefined &&
      t.transitions.length === 1 &&
      got.species === x.species &&
      got.band === x.band &&
      got.branch === x.branch &&
      got.j === x.j;
    if (same) right.add(`${label(x)}|${x.j}`);
    else if (t.transitions.length === 1) wrong++;
    if (atEnd && !t.transitions.some((y) => label(y) === `${got.species}|${got.band}|${got.branch}` && y.j === got.j))
      placedWrong++;
  });
  let gaps = 0;
  for (const t of scan.truth) {
    const x = t.transitions[0];
    if (!t.clear || t.transitions.length !== 1 || !x || right.has(`${label(x)}|${x.j}`)) continue;
    if (right.has(`${label(x)}|${x.j - 1}`) && right.has(`${label(x)}|${x.j + 1}`)) gaps++;
  }
  return { gaps, wrong, placed, placedWrong };
}

describe('lines the final fit places alone are assigned', () => {
  it('HBr scans at 700–1 400 K (held-out seeds 11, 35, 82, 185): half the interior gaps close, few placed wrong', () => {
    const all = [11, 35, 82, 185].map(outcome);
    const sum = (k: keyof Outcome) => all.reduce((s, x) => s + x[k], 0);
    expect(sum('placed')).toBeGreaterThanOrEqual(40);
    expect(sum('placedWrong')).toBeLessThanOrEqual(2);
    expect(sum('gaps')).toBeLessThanOrEqual(35);
    expect(sum('wrong')).toBeLessThanOrEqual(5);
  });
});

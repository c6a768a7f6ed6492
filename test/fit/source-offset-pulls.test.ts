import { describe, it } from 'vitest';
import { fitLineList, type LineInput } from '../../src/fit/fit-lines.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { dunhamTerm, isotopologues, MOLECULES, type Molecule, normals, uniforms } from '../helpers/heldout-scans.js';
import { expectCoverage, pullSummary } from '../helpers/pulls.js';

/**
 * Pulls of a source offset carried in the fit, and of the 2-0 band origin it would otherwise bias. The lines come
 * from test/helpers/heldout-scans.ts, which imports nothing from src/: its Dunham coefficients of ¹²C¹⁶O and
 * H³⁵Cl (Huber & Herzberg ω_e, ω_e x_e, ω_e y_e, B_e, α_e, D_e, with γ_e, β_e, H_e and L_e; the values and their
 * sources are named beside each coefficient there), so the generator is a Dunham expansion and not the level
 * model the fit uses. One instrument ("ftir-A", σ_A) records 1-0 and 2-1, a second ("laser-B", σ_B) records 2-0
 * and is shifted by a known amount; the loop 2-0 against 1-0 + 2-1 and the shared levels fix the shift against
 * ftir-A. Each trial draws fresh noise; the offset is asked for (fitSourceOffsets: true), so every trial carries
 * it, whatever the 3σ flag says. Required coverage over ≥ 200 trials: |pull| ≤ 1 in 0.60–0.76 and ≤ 2 in ≥ 0.92
 * (normal: 0.683, 0.954; 0.60 and 0.76 lie 2.5 binomial SD from 0.683 at n = 200).
 */
interface Setup {
  readonly molecule: Molecule;
  readonly jMax: number;
  readonly sigmaA: number;
  readonly sigmaB: number;
  readonly shift: number;
}

const TRIALS = 200;

function parentOf(molecule: Molecule) {
  const parent = isotopologues(MOLECULES[molecule]).sort((x, y) => y.abundance - x.abundance)[0];
  if (!parent) throw new Error(`no isotopologue of ${molecule}`);
  return parent;
}

function trialLines(s: Setup, seed: number, withSigma: boolean): LineInput[] {
  const parent = parentOf(s.molecule);
  const noise = normals(uniforms(seed));
  const out: LineInput[] = [];
  for (const [upper, lower, source] of [
    [1, 0, 'ftir-A'],
    [2, 1, 'ftir-A'],
    [2, 0, 'laser-B'],
  ] as const) {
    const sigma = source === 'ftir-A' ? s.sigmaA : s.sigmaB;
    for (const branch of ['P', 'R'] as const)
      for (let j = branch === 'P' ? 1 : 0; j <= s.jMax; j++) {
        const jUp = branch === 'R' ? j + 1 : j - 1;
        const exact = dunhamTerm(parent.y, upper, jUp) - dunhamTerm(parent.y, lower, j);
        out.push({
          position: exact + sigma * noise() + (source === 'laser-B' ? s.shift : 0),
          ...(withSigma ? { uncertainty: sigma } : {}),
          source,
          assignment: { species: parent.formula, band: { upper, lower }, branch, j, source: 'given' },
        } as LineInput);
      }
  }
  return out;
}

function pulls(s: Setup, withSigma: boolean) {
  const parent = parentOf(s.molecule);
  const iso = parseSpecies(parent.formula);
  const masses = new Map([[iso.formula, reducedMass(iso)]]);
  const origin = dunhamTerm(parent.y, 2, 0) - dunhamTerm(parent.y, 0, 0);
  const offset: number[] = [];
  const band: number[] = [];
  for (let t = 0; t < TRIALS; t++) {
    const r = fitLineList(trialLines(s, 7919 * (t + 1), withSigma), masses, { fitSourceOffsets: true });
    const o = r.sourceOffsets?.sources.find((x) => x.source === 'laser-B')?.offset;
    const b = r.bands.find((x) => x.band === '2-0')?.origin;
    if (!o || !b || !r.sourceOffsets?.applied || r.sourceOffsets.reference !== 'ftir-A') throw new Error('no offset');
    offset.push((o.value - s.shift) / o.uncertainty);
    band.push((b.value - origin) / b.uncertainty);
  }
  return { offset: pullSummary(offset), origin: pullSummary(band) };
}

const SETUPS: readonly Setup[] = [
  { molecule: 'CO', jMax: 25, sigmaA: 0.002, sigmaB: 0.0005, shift: 0.003 },
  { molecule: 'HCl', jMax: 10, sigmaA: 0.003, sigmaB: 0.001, shift: -0.004 },
];

describe('pulls of a carried source offset and of the 2-0 origin (independent Dunham generator with H, L)', () => {
  for (const s of SETUPS)
    for (const withSigma of [true, false])
      it(`${s.molecule}, laser-B shifted ${s.shift} cm-1, ${withSigma ? 'with' : 'without'} σ: 1σ in 0.60–0.76, 2σ ≥ 0.92`, () => {
        const p = pulls(s, withSigma);
        const fmt = (x: typeof p.offset) =>
          `${x.within1.toFixed(3)}/${x.within2.toFixed(3)} mean ${x.mean.toFixed(2)} sd ${x.sd.toFixed(2)}`;
        console.log(`${s.molecule} ${withSigma ? 'σ' : 'no σ'}: offset ${fmt(p.offset)}; 2-0 origin ${fmt(p.origin)}`);
        for (const x of [p.offset, p.origin]) expectCoverage(x, TRIALS);
      }, 600_000);
});

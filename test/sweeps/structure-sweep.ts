/**
 * Sweep of numbering from structure alone (run: npx tsx test/sweeps/structure-sweep.ts [seeds…] [--sigma=both]):
 * species absent from the library, the P branch cut at J = 1, 2, 3, 5, with and without intensities, 4 spurious
 * lines, per seed; prints right/wrong/refused per species and per cut, and the evidence of every refusal.
 */
import { analyseLineList } from '../../src/assign/analyse.js';
import { assignByStructure } from '../../src/assign/structure.js';
import { ScienceError } from '../../src/errors.js';
import { parseSpecies } from '../../src/species/parse.js';
import { reducedMass } from '../../src/species/reduced-mass.js';
import { CS, LIH, NACL, SIO } from '../helpers/absent-species.js';
import { independentLines, type MoleculeConstants, termValue } from '../helpers/independent-lines.js';

const args = process.argv.slice(2);
const seeds = args.filter((a) => /^\d+$/.test(a)).map(Number);
if (seeds.length === 0) seeds.push(11, 21, 31);
const sigmaModes = args.includes('--sigma=both') ? [true, false] : args.includes('--sigma=no') ? [false] : [true];
const verbose = args.includes('-v');
const tops: [MoleculeConstants, number][] = [
  [CS, 40],
  [SIO, 45],
  [LIH, 15],
  [NACL, 70],
];
const tally = new Map<string, { right: number; wrong: number; refused: number; partial: number }>();
const bump = (k: string, f: 'right' | 'wrong' | 'refused' | 'partial') => {
  const t = tally.get(k) ?? { right: 0, wrong: 0, refused: 0, partial: 0 };
  t[f]++;
  tally.set(k, t);
};
for (const seed of seeds)
  for (const withSigma of sigmaModes)
    for (const intensities of [false, true])
      for (const pMin of [1, 2, 3, 5])
        for (const [molecule, top] of tops) {
          const list = independentLines({
            molecule,
            seed,
            sigma: 0.001,
            withUncertainties: withSigma,
            unassigned: true,
            spurious: 4,
            ...(intensities ? { temperature: 296, intensityNoise: 0.1 } : {}),
            bands: [
              { upper: 1, lower: 0, jMin: pMin, jMax: top, branches: ['P'] },
              { upper: 1, lower: 0, jMax: top, branches: ['R'] },
            ],
          });
          const name = `${molecule.formula} P(${pMin})+ ${intensities ? 'I' : '-'} ${withSigma ? 'σ' : 'noσ'} seed ${seed}`;
          const sp = parseSpecies(molecule.formula.replace('-', ''));
          let outcome: 'right' | 'wrong' | 'refused' | 'partial';
          let detail = '';
          try {
            const a = analyseLineList(list.lines, sp);
            let correct = 0;
            let wrong = 0;
            let n = 0;
            a.result.lines.forEach((l, i) => {
              const t = list.truth[i];
              if (!t || t.spurious) return;
              n++;
              const as = l.status === 'fitted' ? l.assignment : undefined;
              if (!as) return;
              if (as.band === t.band && as.branch === t.branch && as.j === t.j) correct++;
              else wrong++;
            });
            outcome = wrong > 0.02 * n ? 'wrong' : correct >= 0.98 * n ? 'right' : 'partial';
            detail = `${correct}/${n} right, ${wrong} wrong, margin ${a.assignment.numbering?.margin?.toFixed(1)}`;
          } catch (e) {
            if (!(e instanceof ScienceError && e.code === 'NUMBERING_AMBIGUOUS')) throw e;
            outcome = 'refused';
          }
          for (const k of ['all', molecule.formula, `P(${pMin})+`, `${molecule.formula} P(${pMin})+`]) bump(k, outcome);
          if (outcome !== 'right' || verbose) {
            const c = molecule.constants;
            const trueOrigin = termValue(c, 1, 0) - termValue(c, 0, 0);
            const s = assignByStructure(
              list.lines.map((l) => ({
                position: l.position,
                ...(l.uncertainty !== undefined ? { uncertainty: l.uncertainty } : {}),
                ...(l.intensity !== undefined ? { intensity: l.intensity } : {}),
              })),
              sp.formula,
              reducedMass(sp),
              { upper: 1, lower: 0 },
            );
            console.log(`${outcome.toUpperCase()} ${name} ${detail} true origin ${trueOrigin.toFixed(4)}`);
            if (s) {
              console.log(
                `  margin ${s.margin.toFixed(1)} fitsσ ${s.fitsUncertainties} own ${s.ownEvidence} decisive ${s.decisive}`,
              );
              for (const e of s.evidence.slice(0, 4)) {
                const p = e.parts;
                const truth = e.origin !== undefined && Math.abs(e.origin - trueOrigin) < 0.1 ? '*' : ' ';
                console.log(
                  `  ${truth} ν0 ${e.origin?.toFixed(4)} n ${e.lines} score ${e.score.toFixed(1)} = pos ${p.positions.toFixed(1)} + Δ2F ${p.differences.toFixed(1)} + orig ${p.origin} + I ${p.intensities.toFixed(1)} + K ${p.kratzer.toFixed(1)} (K ${e.kratzerRatio?.toFixed(4)} ± ${e.kratzerUncertainty?.toFixed(4)}, χ²/ν ${e.reducedChiSquare.toPrecision(3)}, B″ ${e.lowerB?.toFixed(5)}) ${e.label}`,
                );
              }
            }
          }
        }
console.log('\nkey: right / wrong / refused / partial');
for (const [k, t] of tally) console.log(`${k}: ${t.right} / ${t.wrong} / ${t.refused} / ${t.partial}`);

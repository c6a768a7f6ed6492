/**
 * Sweep of hot bands numbered from structure (run: npx tsx test/sweeps/hot-structure-sweep.ts [seeds…] [-v]):
 * species absent from the library, 1-0 and 2-1 in one list, the P branches of both cut at J = 1 (none cut), 2 or
 * 3, intensities at 1000 K or none, 4 spurious lines; per band right (≥ 98 % of its lines), wrong (> 2 %), partly
 * assigned, or left unassigned, and lists refused whole; the evidence of the first band for every list not right.
 */
import { analyseLineList } from '../../src/assign/analyse.js';
import { ScienceError } from '../../src/errors.js';
import { parseSpecies } from '../../src/species/parse.js';
import { CS, LIH, NACL, SIO } from '../helpers/absent-species.js';
import { independentLines, type MoleculeConstants } from '../helpers/independent-lines.js';

const args = process.argv.slice(2);
const seeds = args.filter((a) => /^\d+$/.test(a)).map(Number);
if (seeds.length === 0) seeds.push(11, 21);
const verbose = args.includes('-v');
const tops: [MoleculeConstants, number, number][] = [
  [CS, 40, 30],
  [SIO, 45, 35],
  [LIH, 15, 12],
  [NACL, 70, 50],
];
type Outcome = 'right' | 'wrong' | 'partial' | 'unassigned' | 'refused';
const tally = new Map<string, Record<Outcome, number>>();
const bump = (k: string, f: Outcome) => {
  const t = tally.get(k) ?? { right: 0, wrong: 0, partial: 0, unassigned: 0, refused: 0 };
  t[f]++;
  tally.set(k, t);
};
for (const seed of seeds)
  for (const intensities of [false, true])
    for (const pMin of [1, 2, 3])
      for (const [molecule, top, hotTop] of tops) {
        const list = independentLines({
          molecule,
          seed,
          sigma: 0.001,
          withUncertainties: true,
          unassigned: true,
          spurious: 4,
          ...(intensities ? { temperature: 1000, intensityNoise: 0.1 } : {}),
          bands: [
            { upper: 1, lower: 0, jMin: pMin, jMax: top, branches: ['P'] },
            { upper: 1, lower: 0, jMax: top, branches: ['R'] },
            { upper: 2, lower: 1, jMin: Math.max(2, pMin), jMax: hotTop, branches: ['P'] },
            { upper: 2, lower: 1, jMin: 1, jMax: hotTop, branches: ['R'] },
          ],
        });
        const name = `${molecule.formula} P(${pMin})+ ${intensities ? 'I' : '-'} seed ${seed}`;
        const keys = ['all', molecule.formula, `P(${pMin})+`, intensities ? 'with I' : 'no I'];
        try {
          const a = analyseLineList(list.lines, parseSpecies(molecule.formula.replace('-', '')));
          const per = new Map<string, { n: number; right: number; wrong: number }>();
          a.result.lines.forEach((l, i) => {
            const t = list.truth[i];
            if (!t || t.spurious) return;
            const s = per.get(t.band as string) ?? { n: 0, right: 0, wrong: 0 };
            s.n++;
            const as = l.status === 'fitted' ? l.assignment : undefined;
            if (as && as.band === t.band && as.branch === t.branch && as.j === t.j) s.right++;
            else if (as) s.wrong++;
            per.set(t.band as string, s);
          });
          const parts: string[] = [];
          for (const [band, s] of per) {
            const o: Outcome =
              s.wrong > 0.02 * s.n
                ? 'wrong'
                : s.right >= 0.98 * s.n
                  ? 'right'
                  : s.right === 0
                    ? 'unassigned'
                    : 'partial';
            for (const k of keys) bump(`${k} ${band}`, o);
            parts.push(`${band} ${o} ${s.right}/${s.n} (${s.wrong} wrong)`);
          }
          const bad = parts.some((p) => !p.includes(' right '));
          if (bad || verbose) {
            console.log(`${bad ? 'NOT RIGHT' : 'RIGHT'} ${name}: ${parts.join('; ')}`);
            const n = a.assignment.numbering;
            if (n)
              console.log(
                `  first band: margin ${n.margin?.toFixed(1)}; ${[n.chosen, ...n.runnersUp.slice(0, 2)].map((e) => `ν0 ${e.origin?.toFixed(3)} score ${e.score.toFixed(1)} K ${e.kratzerRatio?.toFixed(4)}±${e.kratzerUncertainty?.toFixed(4)}`).join(' | ')}`,
              );
            for (const w of a.result.warnings.filter((w) => w.code === 'BAND_NOT_NUMBERED'))
              console.log(`  ${w.message.slice(0, 300)}`);
          }
        } catch (e) {
          if (!(e instanceof ScienceError && e.code === 'NUMBERING_AMBIGUOUS')) throw e;
          for (const k of keys) for (const band of ['1-0', '2-1']) bump(`${k} ${band}`, 'refused');
          console.log(`REFUSED ${name}: ${e.message.slice(0, 400)}`);
        }
      }
console.log('\nkey: right / wrong / partial / unassigned / refused (lists)');
for (const [k, t] of tally)
  console.log(`${k}: ${t.right} / ${t.wrong} / ${t.partial} / ${t.unassigned} / ${t.refused}`);

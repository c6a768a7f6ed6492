/**
 * The held-out sweep: `npx tsx scripts/heldout-sweep.ts [scans=240] [first seed=1]`. Scans of
 * test/helpers/heldout-scans.ts (its own Dunham constants, natural isotopologues, real 12C16O database positions,
 * hot bands, overtones, blends, spurious and lost lines, an offset, one or two instruments, with and without σ),
 * each analysed with analyseLineList; prints per scan class the peaks right / wrong / left, the clear lines
 * assigned, spurious peaks taken, and the pulls (fitted − true)/σ of the band origin and B_0 (one instrument).
 */
import { analyseLineList } from '../src/assign/analyse.js';
import { parseSpecies } from '../src/species/parse.js';
import { heldoutScan, type ScanScore, scoreScan, sweepOptions, truthOf } from '../test/helpers/heldout-scans.js';

const n = Number(process.argv[2] ?? 240);
const first = Number(process.argv[3] ?? 1);
const verbose = process.argv.includes('-v');
const perSeed = process.argv.includes('--rows');

interface Tally extends Omit<ScanScore, 'misses'> {
  scans: number;
  failed: number;
}
const tallies = new Map<string, Tally>();
const pulls = { origin: [] as number[], B0: [] as number[] };
const bad: string[] = [];

function add(key: string, s: ScanScore | undefined): void {
  let t = tallies.get(key);
  if (!t) {
    t = { scans: 0, failed: 0, right: 0, wrong: 0, left: 0, clear: 0, clearRight: 0, spurious: 0, spuriousTaken: 0 };
    tallies.set(key, t);
  }
  t.scans++;
  if (!s) {
    t.failed++;
    return;
  }
  for (const k of ['right', 'wrong', 'left', 'clear', 'clearRight', 'spurious', 'spuriousTaken'] as const) t[k] += s[k];
}

let cpu = 0;
/** CPU seconds of each scan, for the slowest listed at the end. */
const slowest: { seed: number; cls: string; seconds: number }[] = [];
for (let seed = first; seed < first + n; seed++) {
  const o = sweepOptions(seed);
  const scan = heldoutScan(o);
  const cls = `${o.molecule} Δv ${o.deltaV.join('+')} ${o.b ? `2 inst ${o.b.layout}` : '1 inst'}`;
  const tag = `seed ${seed} ${cls} T ${o.temperature} σ ${o.a.sigma}${o.sigmaGiven ? ' given' : ''} off ${o.a.offset.toFixed(3)}${o.b ? `/${o.b.offset.toFixed(3)}` : ''} spur ${o.spurious.toFixed(2)} det ${o.detection} peaks ${scan.peaks.length}`;
  const t0 = process.cpuUsage();
  let s: ScanScore | undefined;
  let r: ReturnType<typeof analyseLineList>['result'] | undefined;
  try {
    r = analyseLineList(scan.peaks, parseSpecies(o.molecule), seed % 2 ? { temperature: o.temperature } : {}).result;
    s = scoreScan(scan.truth, r.lines);
  } catch (e) {
    bad.push(`${tag}: ${(e as Error).message.slice(0, 200)}`);
  }
  const dt = process.cpuUsage(t0);
  cpu += (dt.user + dt.system) / 1e6;
  slowest.push({ seed, cls, seconds: (dt.user + dt.system) / 1e6 });
  if (perSeed)
    console.log(
      `ROW ${seed} ${s ? `${s.right} ${s.wrong} ${s.left} ${s.clear} ${s.clearRight} ${s.spurious} ${s.spuriousTaken}` : 'fail'}`,
    );
  add(cls, s);
  add('all', s);
  add(`all, temperature ${seed % 2 ? 'given' : 'not given'}, ${o.intensities ? 'with' : 'without'} intensities`, s);
  if (s && (s.wrong > 0 || s.clearRight < s.clear)) {
    bad.push(
      `${tag}: right ${s.right} wrong ${s.wrong} left ${s.left} clear ${s.clearRight}/${s.clear}; ${s.misses.slice(0, verbose ? 40 : 6).join('; ')}`,
    );
  }
  if (r && !o.b) {
    const upper = o.deltaV[0] as number;
    const truth = truthOf(o.molecule, upper);
    const band = r.bands.find((b) => b.species === truth.species && b.band === `${upper}-0`);
    // A carried scale offset (a loop of bands fixed it) takes the instrument's offset out of the origin.
    const offset = r.scaleOffset?.applied ? 0 : o.a.offset;
    if (band?.origin && o.molecule !== 'CO')
      pulls.origin.push((band.origin.value - truth.origin - offset) / band.origin.uncertainty);
    const b0 = r.levels.find((l) => l.species === truth.species && l.v === 0);
    if (b0) pulls.B0.push((b0.B.value - truth.B0) / b0.B.uncertainty);
  }
}

const pct = (a: number, b: number) => (b ? ((100 * a) / b).toFixed(2) : '-');
console.log('class | scans | failed | right | wrong | left | clear right % | spurious taken %');
for (const [k, t] of [...tallies].sort()) {
  console.log(
    `${k} | ${t.scans} | ${t.failed} | ${t.right} | ${t.wrong} | ${t.left} | ${pct(t.clearRight, t.clear)} (${t.clearRight}/${t.clear}) | ${pct(t.spuriousTaken, t.spurious)}`,
  );
}
for (const [k, zs] of Object.entries(pulls)) {
  const c1 = zs.filter((z) => Math.abs(z) <= 1).length / zs.length;
  const c2 = zs.filter((z) => Math.abs(z) <= 2).length / zs.length;
  const mean = zs.reduce((a, z) => a + z, 0) / zs.length;
  const worst = zs.reduce((a, z) => Math.max(a, Math.abs(z)), 0);
  console.log(
    `pull ${k}: n ${zs.length}, 1σ ${c1.toFixed(3)}, 2σ ${c2.toFixed(3)}, mean ${mean.toFixed(2)}, largest |z| ${worst.toFixed(1)}`,
  );
}
console.log(`CPU ${cpu.toFixed(1)} s for ${n} scans`);
slowest.sort((a, b) => b.seconds - a.seconds);
console.log(
  `slowest: ${slowest
    .slice(0, 8)
    .map((x) => `seed ${x.seed} (${x.cls}) ${x.seconds.toFixed(1)} s`)
    .join(', ')}`,
);
console.log(bad.join('\n'));

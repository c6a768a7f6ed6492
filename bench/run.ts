/**
 * npm run bench: times printed as tables, with ratios from the same run. Nothing here is asserted.
 *
 * 1. One-band and 3-band fits of 50 … 50 000 assigned lines: the least-squares kernel alone, beside numpy's
 *    lstsq on the same weighted design (when python3 with numpy is present, OPENBLAS_NUM_THREADS=1), and the whole
 *    fitLineList (term selection, outliers, Dunham, combination differences).
 * 2. The HTTP round trip of a 60-line fit through the real server on loopback.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { buildApp } from '../services/app.js';
import { checkRequestSchema } from '../services/schemas/checks.js';
import { runCheck } from '../services/usecases/check.js';
import { analyseLineList } from '../src/assign/analyse.js';
import { fitLineList, type LineInput } from '../src/fit/fit-lines.js';
import { solveLeastSquares } from '../src/linalg/least-squares.js';
import { levelModel, levelParameters, levelStructure } from '../src/models/level-model.js';
import { buildDesign, type Observation } from '../src/models/linear-model.js';
import { predictBand } from '../src/models/predict.js';
import { constantsFor, dunhamFromEntry } from '../src/species/library.js';
import { parseSpecies } from '../src/species/parse.js';
import { reducedMass } from '../src/species/reduced-mass.js';
import { findPeaks } from '../src/spectra/peaks.js';
import { syntheticScan } from '../test/helpers/scans.js';
import { syntheticSpectrum } from '../test/helpers/spectra.js';

const iso = parseSpecies('CO');
const y = dunhamFromEntry(constantsFor(iso) ?? (undefined as never));
const masses = new Map([[iso.formula, reducedMass(iso)]]);

function lineList(n: number, bands: number): LineInput[] {
  const pool = Array.from({ length: bands }, (_, b) => predictBand(y, { upper: b + 1, lower: 0 }, 40)).flat();
  let s = 12345;
  const rnd = () => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return s / 2147483648 - 0.5;
  };
  return Array.from({ length: n }, (_, i) => {
    const p = pool[i % pool.length] as (typeof pool)[number];
    return {
      position: p.position + 0.002 * rnd(),
      uncertainty: 0.001,
      assignment: { species: iso.formula, band: p.band, branch: p.branch, j: p.j, source: 'given' as const },
    };
  });
}

function time(f: () => void, minMs = 300): number {
  f();
  const samples: number[] = [];
  const start = performance.now();
  while (performance.now() - start < minMs || samples.length < 5) {
    const t0 = performance.now();
    f();
    samples.push(performance.now() - t0);
  }
  samples.sort((a, b) => a - b);
  return samples[samples.length >> 1] as number;
}

const fmt = (ms: number) => (ms < 1 ? `${(ms * 1000).toFixed(1)} µs` : `${ms.toFixed(2)} ms`);

mkdirSync('bench/out', { recursive: true });
const rows: { name: string; n: number; p: number; kernel: number; full: number; file: string }[] = [];
for (const bands of [1, 3]) {
  for (const n of [50, 500, 5000, 50000]) {
    const lines = lineList(n, bands);
    const obs: Observation[] = lines.map((l, index) => {
      const a = l.assignment as NonNullable<LineInput['assignment']>;
      return {
        index,
        species: a.species,
        upperV: a.band.upper,
        lowerV: a.band.lower,
        upperJ: a.branch === 'R' ? a.j + 1 : a.j - 1,
        lowerJ: a.j,
        position: l.position,
        weight: 1e6,
      };
    });
    const structure = levelStructure(obs);
    const params = levelParameters(structure, 2);
    const model = levelModel(params);
    const design = buildDesign(model, obs);
    const yv = Float64Array.from(obs, (o) => o.position);
    const w = Float64Array.from(obs, (o) => o.weight);
    const p = params.length;
    const kernel = time(() => void solveLeastSquares({ rows: n, cols: p, design, observations: yv, weights: w }));
    const full = time(() => void fitLineList(lines, masses), n >= 50000 ? 1500 : 400);
    const file = `bench/out/design-${bands}band-${n}.bin`;
    const buf = new Float64Array(2 + n * p + 2 * n);
    buf[0] = n;
    buf[1] = p;
    buf.set(design, 2);
    buf.set(yv, 2 + n * p);
    buf.set(w, 2 + n * p + n);
    writeFileSync(file, Buffer.from(buf.buffer));
    rows.push({ name: `${bands} band${bands > 1 ? 's' : ''}`, n, p, kernel, full, file });
  }
}

let numpy = new Map<string, number>();
try {
  const out = execFileSync('python3', ['bench/numpy-lstsq.py', ...rows.map((r) => r.file)], {
    env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
    encoding: 'utf8',
  });
  numpy = new Map(
    out
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as { name: string; median_us: number })
      .map((x) => [x.name, x.median_us / 1000]),
  );
} catch {
  console.log('(python3 with numpy not found: the numpy column is skipped)\n');
}

console.log('Least squares per fit (median), kernel = weighted QR solve with covariance and leverages');
console.log('| fit | lines | parameters | kernel | numpy lstsq | numpy / kernel | whole fitLineList |');
console.log('| --- | ---: | ---: | ---: | ---: | ---: | ---: |');
for (const r of rows) {
  const np = numpy.get(r.file.split('/').pop() as string);
  console.log(
    `| ${r.name} | ${r.n} | ${r.p} | ${fmt(r.kernel)} | ${np !== undefined ? fmt(np) : '–'} | ${np !== undefined ? `${(np / r.kernel).toFixed(2)}×` : '–'} | ${fmt(r.full)} |`,
  );
}

// Automatic assignment and fit of an unassigned scan of about 500 lines.
{
  const scan = syntheticScan({
    isotopologues: [{ species: 'CO', abundance: 1 }],
    bands: [
      { upper: 1, lower: 0, strength: 1 },
      { upper: 2, lower: 1, strength: 2 },
      { upper: 3, lower: 2, strength: 3 },
    ],
    temperature: 1500,
    offset: 0.1,
    scalePpm: 20,
    sigma: 0.002,
    missing: 0.1,
    spurious: 0.25,
    detection: 3e-4,
    seed: 3,
  });
  const co = parseSpecies('CO');
  const t = time(() => void analyseLineList(scan.peaks, co, { temperature: 1500 }), 2000);
  console.log('\nAutomatic assignment (identification not needed: species declared) and the full fit');
  console.log('| scan | peaks | time |');
  console.log('| --- | ---: | ---: |');
  console.log(`| CO at 1500 K, 1-0 + 2-1 + 3-2, 25 % spurious, 10 % lost | ${scan.peaks.length} | ${fmt(t)} |`);
  const t2 = time(() => void analyseLineList(scan.peaks, undefined, { temperature: 1500 }), 2000);
  console.log(`| the same with the species identified from the library | ${scan.peaks.length} | ${fmt(t2)} |`);
}

// Spectra: peaks of a 1 000 000-point spectrum, and a spectrum all the way to a QA verdict.
{
  const co = predictBand(y, { upper: 1, lower: 0 }, 30).map((p) => ({
    position: p.position,
    strength: 0.5 * ((p.branch === 'R' ? p.j + 1 : p.j) / 8) * Math.exp((-1.4388 * p.lowerEnergy) / 296) + 0.01,
  }));
  const big = syntheticSpectrum({
    lines: co,
    from: 2000,
    to: 2300,
    step: 0.0003,
    gaussianFwhm: 0.006,
    lorentzianFwhm: 0.003,
    noise: 0.0005,
    baseline: [0.02, 1e-5],
    seed: 1,
  });
  const tPeaks = time(() => void findPeaks(big.x, big.y), 3000);
  const small = syntheticSpectrum({
    lines: co,
    from: 2000,
    to: 2300,
    step: 0.05,
    gaussianFwhm: 0.2,
    lorentzianFwhm: 0.1,
    noise: 0.0005,
    baseline: [0.02, 1e-5],
    seed: 2,
  });
  const body = checkRequestSchema(100_000).parse({
    species: 'CO',
    spectrum: { x: Array.from(small.x), y: Array.from(small.y) },
  });
  const tVerdict = time(() => void runCheck(body), 2000);
  console.log('\nSpectra');
  console.log('| task | points | time |');
  console.log('| --- | ---: | ---: |');
  console.log(`| peaks of a CO fundamental (baseline, noise, pseudo-Voigt fits) | ${big.x.length} | ${fmt(tPeaks)} |`);
  console.log(`| spectrum → peaks → assignment → fit → QA verdict | ${small.x.length} | ${fmt(tVerdict)} |`);
}

// HTTP round trip of a 60-line fit on loopback.
const app = await buildApp();
await app.listen({ host: '127.0.0.1', port: 0 });
const address = app.server.address();
const port = typeof address === 'object' && address ? address.port : 0;
const body60 = JSON.stringify({
  species: 'CO',
  lines: lineList(60, 1).map((l) => ({
    position: l.position,
    uncertainty: l.uncertainty,
    assignment: { band: '1-0', branch: l.assignment?.branch, j: l.assignment?.j },
  })),
});
const post = async () => {
  const r = await fetch(`http://127.0.0.1:${port}/v1/fits`, {
    method: 'POST',
    body: body60,
    headers: { 'content-type': 'application/json' },
  });
  await r.arrayBuffer();
};
const health = async () => {
  const r = await fetch(`http://127.0.0.1:${port}/healthz`);
  await r.arrayBuffer();
};
async function timeAsync(f: () => Promise<void>, count: number): Promise<number> {
  for (let i = 0; i < 20; i++) await f();
  const s: number[] = [];
  for (let i = 0; i < count; i++) {
    const t0 = performance.now();
    await f();
    s.push(performance.now() - t0);
  }
  s.sort((a, b) => a - b);
  return s[s.length >> 1] as number;
}
const tFit = await timeAsync(post, 300);
const tHealth = await timeAsync(health, 300);
await app.close();
console.log('\nHTTP round trip on loopback (median of 300, same process as the client)');
console.log('| request | time | ratio to /healthz |');
console.log('| --- | ---: | ---: |');
console.log(`| GET /healthz | ${fmt(tHealth)} | 1.00 |`);
console.log(`| POST /v1/fits, 60 lines | ${fmt(tFit)} | ${(tFit / tHealth).toFixed(2)} |`);

/**
 * The service against the floor, as ratios from one run. The service (npm start defaults, rate limit and shedding
 * off, no workers) and a bare fastify server (bench/bare-server.ts) answering the service's own response bytes run
 * in their own processes; the load generator (autocannon) runs in this one. Each pair is measured back to back so
 * that the load of a shared machine falls on both. Nothing here is asserted.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import autocannon from 'autocannon';
import { hotCoScan } from './hot-co-scan.js';
import { largeSpectrumBody } from './large-spectrum.js';
import { startServer } from './server-process.js';
import { printSummary, recordRatios } from './summary.js';

const seconds = Number(process.env.BENCH_SECONDS ?? 3);
const basePort = 20000 + Math.floor(Math.random() * 20000);

function fitBody(): string {
  const lines = [];
  for (let j = 0; j < 30; j++) {
    const x = (J: number) => J * (J + 1);
    const nu = (v1: number, J1: number, J0: number) =>
      2143.27 + (1.9225 - 0.0175 * v1) * x(J1) - 1.9225 * x(J0) - 6.1e-6 * (x(J1) ** 2 - x(J0) ** 2);
    lines.push({ position: nu(1, j + 1, j), uncertainty: 0.001, assignment: { band: '1-0', branch: 'R', j } });
    lines.push({ position: nu(1, j, j + 1), uncertainty: 0.001, assignment: { band: '1-0', branch: 'P', j: j + 1 } });
  }
  return JSON.stringify({ species: 'CO', lines });
}

/** CO at 1500 K: 1-0, 2-1 and 3-2 with 25 % spurious and 10 % lost lines, offset 0.1 cm⁻¹, unassigned. */
function scanBody(): { body: string; peaks: number } {
  const scan = hotCoScan();
  const lines = scan.peaks.map((p) => ({ position: p.position, intensity: p.intensity }));
  return { body: JSON.stringify({ species: 'CO', lines, options: { temperature: 1500 } }), peaks: lines.length };
}

async function post(port: number, path: string, body: string): Promise<string> {
  const r = await fetch(`http://127.0.0.1:${port}${path}`, {
    method: 'POST',
    body,
    headers: { 'content-type': 'application/json' },
  });
  const text = await r.text();
  if (!r.ok) throw new Error(`${path} answered ${r.status}: ${text.slice(0, 300)}`);
  return text;
}

async function rate(port: number, path: string, body: string, connections: number): Promise<number> {
  const r = await autocannon({
    url: `http://127.0.0.1:${port}${path}`,
    duration: seconds,
    connections,
    method: 'POST',
    body,
    headers: { 'content-type': 'application/json' },
  });
  if (r.non2xx > 0 || r.errors > 0) throw new Error(`${path}: ${r.non2xx} non-2xx, ${r.errors} errors`);
  return r.requests.average;
}

async function medianMs(f: () => Promise<unknown>, count: number): Promise<number> {
  const t: number[] = [];
  for (let i = 0; i < count; i++) {
    const t0 = performance.now();
    await f();
    t.push(performance.now() - t0);
  }
  t.sort((a, b) => a - b);
  return t[t.length >> 1] as number;
}

const fit = fitBody();
const scan = scanBody();
const spectrum = largeSpectrumBody();
const service = await startServer(basePort);
let bare: { stop: () => void } | undefined;
try {
  const fitResponse = await post(basePort, '/v1/fits', fit);
  const scanResponse = await post(basePort, '/v1/fits', scan.body);
  const fitLean = await post(basePort, '/v1/fits?lean=true', fit).catch(() => undefined);
  mkdirSync('bench/out', { recursive: true });
  writeFileSync(
    'bench/out/bare-bodies.json',
    JSON.stringify({ fit: fitResponse, scan: scanResponse, peaks: '{"parsed":true}' }),
  );
  bare = await startServer(basePort + 1, 'bench/bare-server.ts', { BARE_BODIES: 'bench/out/bare-bodies.json' });

  await rate(basePort + 1, '/fit', fit, 10); // warm-up, both
  await rate(basePort, '/v1/fits', fit, 10);
  const fitBare = await rate(basePort + 1, '/fit', fit, 10);
  const fitService = await rate(basePort, '/v1/fits', fit, 10);
  const scanBare = 1000 / (await medianMs(() => post(basePort + 1, '/scan', scan.body), 9));
  const scanService = 1000 / (await medianMs(() => post(basePort, '/v1/fits', scan.body), 9));
  const peaksBare = await medianMs(() => post(basePort + 1, '/peaks', spectrum.body), 3);
  const peaksService = await medianMs(() => post(basePort, '/v1/peaks', spectrum.body), 2);

  const rows: [string, string, string, string][] = [
    [
      `POST /v1/fits, 60 assigned lines (${fitResponse.length} B answer): throughput / bare route's`,
      `${fitService.toFixed(0)} vs ${fitBare.toFixed(0)} req/s`,
      (fitService / fitBare).toFixed(2),
      '≥ 0.4',
    ],
    [
      `POST /v1/fits, ${scan.peaks}-peak unassigned CO scan at 1500 K: time / bare route's`,
      `${(1000 / scanService).toFixed(1)} vs ${(1000 / scanBare).toFixed(1)} ms per request (median of 9, one at a time)`,
      `${(scanBare / scanService).toFixed(1)}×`,
      '≤ 8×',
    ],
    [
      `POST /v1/peaks, ${spectrum.points}-point spectrum (${(spectrum.body.length / 1e6).toFixed(1)} MB JSON): time / bare parse`,
      `${peaksService.toFixed(0)} vs ${peaksBare.toFixed(0)} ms`,
      `${(peaksService / peaksBare).toFixed(1)}×`,
      '≤ 2.5×',
    ],
  ];
  const fitRatio = fitService / fitBare;
  const scanRatio = scanBare / scanService;
  const peaksRatio = peaksService / peaksBare;
  recordRatios([
    {
      measure: (rows[0] as (typeof rows)[number])[0],
      value: fitRatio,
      shown: fitRatio.toFixed(2),
      goal: '≥ 0.4',
      met: fitRatio >= 0.4,
    },
    {
      measure: (rows[1] as (typeof rows)[number])[0],
      value: scanRatio,
      shown: `${scanRatio.toFixed(1)}×`,
      goal: '≤ 8×',
      met: scanRatio <= 8,
    },
    {
      measure: (rows[2] as (typeof rows)[number])[0],
      value: peaksRatio,
      shown: `${peaksRatio.toFixed(1)}×`,
      goal: '≤ 2.5×',
      met: peaksRatio <= 2.5,
    },
  ]);
  console.log(`\nThe service against a bare fastify route with the same response bytes (autocannon ${seconds} s each)`);
  console.log('| measure | measured | ratio | goal |');
  console.log('| --- | --- | ---: | ---: |');
  for (const r of rows) console.log(`| ${r.join(' | ')} |`);
  if (fitLean) {
    console.log(
      `\nResponse size of the 60-line fit: ${fitResponse.length} B in full, ${fitLean.length} B lean (?lean=true)`,
    );
  }
} finally {
  bare?.stop();
  service.stop();
}
printSummary();

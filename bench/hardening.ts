/**
 * Hardening figures with the defaults of `npm start` (only HOST/PORT set), the built service in its own process:
 *  1. /healthz worst latency (polled every 20 ms) while the largest request runs: a 100 000-line fit;
 *  2. peak resident memory of the process (threads included, /proc VmRSS) under 8 concurrent 100 000-line fits,
 *     and how they were answered;
 *  3. the issue's reproductions: how many got a 5xx, whether the process survived.
 * `npx tsx bench/hardening.ts` after `npm run build`. Prints figures; asserts nothing; bounded in time.
 */
import { execFile, spawn } from 'node:child_process';
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';

const port = 20000 + Math.floor(Math.random() * 20000);
const base = `http://127.0.0.1:${port}`;
const child = spawn(process.execPath, ['dist/services/server.js'], {
  env: { PATH: process.env.PATH, HOST: '127.0.0.1', PORT: String(port), LOG_LEVEL: 'warn' },
  stdio: ['ignore', 'ignore', 'inherit'],
});
const stop = () => child.kill('SIGTERM');
process.on('exit', stop);
for (let i = 0; i < 100; i++) {
  try {
    if ((await fetch(`${base}/readyz`)).ok) break;
  } catch {}
  await new Promise((r) => setTimeout(r, 200));
}

const rss = () => {
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${child.pid}/status`, 'utf8'));
    return m ? Number(m[1]) * 1024 : Number.NaN;
  } catch {
    return Number.NaN;
  }
};

/** An assigned HCl 1-0 / 2-0 line list, repeated with small offsets to n lines. */
function bigFit(n: number) {
  const lines: unknown[] = [];
  const B0 = 10.44,
    B1 = 10.14,
    B2 = 9.84,
    nu1 = 2885.98,
    nu2 = 5667.98;
  let k = 0;
  while (lines.length < n) {
    for (const [band, nu, Bu] of [
      ['1-0', nu1, B1],
      ['2-0', nu2, B2],
    ] as const) {
      for (let j = 0; j < 25 && lines.length < n; j++) {
        const r = nu + Bu * (j + 1) * (j + 2) - B0 * j * (j + 1);
        const p = nu + Bu * (j + 1) * j - B0 * (j + 1) * (j + 2);
        const noise = ((k++ * 7919) % 1000) / 1e6;
        lines.push({ position: r + noise, uncertainty: 0.002, assignment: { band, branch: 'R', j } });
        lines.push({ position: p + noise, uncertainty: 0.002, assignment: { band, branch: 'P', j: j + 1 } });
      }
    }
  }
  return JSON.stringify({ species: 'HCl', lines: lines.slice(0, n) });
}

async function healthzWorstWhile<T>(work: Promise<T>): Promise<{ worstMs: number; samples: number; result: T }> {
  let done = false;
  let worst = 0;
  let samples = 0;
  const poll = (async () => {
    while (!done) {
      const t = performance.now();
      try {
        await fetch(`${base}/healthz`, { signal: AbortSignal.timeout(30_000) });
      } catch {}
      worst = Math.max(worst, performance.now() - t);
      samples++;
      await new Promise((r) => setTimeout(r, 20));
    }
  })();
  const result = await work;
  done = true;
  await poll;
  return { worstMs: worst, samples, result };
}

const post = async (path: string, body: string, type = 'application/json') => {
  const t = performance.now();
  const r = await fetch(`${base}${path}`, { method: 'POST', body, headers: { 'content-type': type } });
  const text = await r.text();
  return {
    status: r.status,
    ms: performance.now() - t,
    bytes: text.length,
    code: /"code":"([A-Z_]+)"/.exec(text)?.[1],
  };
};

/**
 * A large body sent by curl from its own process: sending 10–80 MB from this process would delay its own /healthz
 * polls, and the figure would measure the bench, not the service.
 */
const postFile = (path: string, file: string) =>
  new Promise<{ status: number; ms: number; code?: string }>((resolve) => {
    const t = performance.now();
    execFile(
      'curl',
      [
        '-s',
        '-w',
        '\n%{http_code}',
        '-H',
        'content-type: application/json',
        '--data-binary',
        `@${file}`,
        `${base}${path}`,
      ],
      { timeout: 300_000, maxBuffer: 256 * 2 ** 20 },
      (_e, stdout) => {
        const status = Number(stdout.slice(stdout.lastIndexOf('\n') + 1));
        const code = /"code":"([A-Z_]+)"/.exec(stdout.slice(0, 4000))?.[1];
        resolve({ status, ms: performance.now() - t, ...(code ? { code } : {}) });
      },
    );
  });
const load = () =>
  loadavg()
    .map((x) => x.toFixed(1))
    .join(' ');

/** The server's own event-loop delay since the last scrape (prom-client resets its histogram at each scrape). */
const loopLagMaxMs = async () => {
  const m = await (await fetch(`${base}/metrics`)).text();
  return Number(/^branchwise_nodejs_eventloop_lag_max_seconds (\S+)/m.exec(m)?.[1]) * 1000;
};

// Baseline: /healthz while nothing else runs (the machine's own noise).
await loopLagMaxMs();
const idle = await healthzWorstWhile(new Promise((r) => setTimeout(r, 3000)));
console.log(
  `load average ${load()}\n0. idle: /healthz worst ${idle.worstMs.toFixed(0)} ms over ${idle.samples} polls; loop lag max ${(await loopLagMaxMs()).toFixed(0)} ms`,
);

const body100k = bigFit(100_000);
const file100k = join(tmpdir(), `hardening-${process.pid}.json`);
writeFileSync(file100k, body100k);
process.on('exit', () => rmSync(file100k, { force: true }));
console.log(
  `100 000-line body: ${(body100k.length / 1e6).toFixed(1)} MB; RSS idle ${(rss() / 2 ** 20).toFixed(0)} MiB`,
);
await loopLagMaxMs();
const one = await healthzWorstWhile(postFile('/v1/fits', file100k));
console.log(
  `1. one 100 000-line fit: ${one.result.status} in ${(one.result.ms / 1000).toFixed(1)} s; /healthz worst ${one.worstMs.toFixed(0)} ms over ${one.samples} polls; server loop lag max ${(await loopLagMaxMs()).toFixed(0)} ms`,
);

let peak = 0;
const sampler = setInterval(() => {
  peak = Math.max(peak, rss());
}, 50);
const eight = await healthzWorstWhile(Promise.all(Array.from({ length: 8 }, () => postFile('/v1/fits', file100k))));
clearInterval(sampler);
const byStatus = eight.result.reduce<Record<string, number>>((m, r) => {
  const k = `${r.status}${r.code ? ` ${r.code}` : ''}`;
  m[k] = (m[k] ?? 0) + 1;
  return m;
}, {});
console.log(
  `2. 8 concurrent 100 000-line fits: ${JSON.stringify(byStatus)}; peak RSS ${(peak / 2 ** 20).toFixed(0)} MiB; /healthz worst ${eight.worstMs.toFixed(0)} ms`,
);

const jcamp = (labels: string, data: string) =>
  `##TITLE=x\n##JCAMP-DX=4.24\n${labels}\n##XYDATA=(X++(Y..Y))\n${data}\n##END=\n`;
const peakTable = `##TITLE=p\n##JCAMP-DX=4.24\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##PEAK TABLE=(XY..XY)\n${Array.from({ length: 1_500_000 }, (_, i) => `${(2000 + i * 1e-4).toFixed(4)}, 0.5`).join('\n')}\n##END=\n`;
const csvRows = `position,intensity\n${Array.from({ length: 1_000_000 }, (_, i) => `${2000 + i * 1e-4},1`).join('\n')}`;
const repro: [string, string, string, string?][] = [
  [
    'JCAMP DUP 920 000 000',
    '/v1/peaks',
    jcamp('##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##FIRSTX=2000\n##LASTX=3000\n##NPOINTS=8', '2000 A s20000000'),
    'chemical/x-jcamp-dx',
  ],
  [
    'JCAMP NPOINTS=1e10',
    '/v1/peaks',
    jcamp('##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##FIRSTX=2000\n##LASTX=3000\n##NPOINTS=10000000000', '2000 A s20000000'),
    'chemical/x-jcamp-dx',
  ],
  [
    `JCAMP peak table ${(peakTable.length / 1e6).toFixed(0)} MB`,
    '/v1/fits?species=HCl',
    peakTable,
    'chemical/x-jcamp-dx',
  ],
  [`CSV 10^6 rows ${(csvRows.length / 1e6).toFixed(0)} MB`, '/v1/fits?species=HCl', csvRows, 'text/csv'],
  ['position 1e308', '/v1/fits', JSON.stringify({ species: 'HCl', lines: [{ position: 1e308 }, { position: 2906 }] })],
  [
    'position 5e-324 um',
    '/v1/fits',
    JSON.stringify({ species: 'HCl', unit: 'um', lines: [{ position: 5e-324 }, { position: 3.4 }] }),
  ],
  ['predictions jMax 200', '/v1/predictions', JSON.stringify({ species: 'HCl', jMax: 200 })],
  [
    'spectrum y 1e300',
    '/v1/peaks',
    JSON.stringify({ spectrum: { x: [1, 2, 3, 4, 5, 6, 7, 8], y: [0, 0, 0, 1e300, 0, 0, 0, 0] } }),
  ],
  ['batch without NDJSON type', '/v1/batch/fits', JSON.stringify({ species: 'HCl', lines: [] })],
  ['fits via /v%31/ without a key', '/v%31/fits', JSON.stringify({ species: 'HCl', lines: [{ position: 1 }] })],
];
let fivexx = 0;
for (const [name, path, body, type] of repro) {
  const w = await healthzWorstWhile(post(path, body, type));
  if (w.result.status >= 500) fivexx++;
  console.log(
    `3. ${name}: ${w.result.status} ${w.result.code ?? ''} in ${w.result.ms.toFixed(0)} ms; /healthz worst ${w.worstMs.toFixed(0)} ms`,
  );
}
// NDJSON: one newline-free line of 600 MiB, streamed.
{
  const MiB = 1024 * 1024;
  let sent = 0;
  const stream = new ReadableStream({
    pull(c) {
      if (sent < 600) {
        sent++;
        c.enqueue(new Uint8Array(MiB).fill(0x20));
      } else c.close();
    },
  });
  const t = performance.now();
  const w = await healthzWorstWhile(
    fetch(`${base}/v1/batch/fits`, {
      method: 'POST',
      body: stream,
      headers: { 'content-type': 'application/x-ndjson' },
      duplex: 'half',
    } as RequestInit).then(async (r) => ({ status: r.status, text: await r.text() })),
  );
  if (w.result.status >= 500) fivexx++;
  console.log(
    `3. NDJSON 600 MiB line: ${w.result.status} ${w.result.text.slice(0, 60)} in ${((performance.now() - t) / 1000).toFixed(1)} s; /healthz worst ${w.worstMs.toFixed(0)} ms; peak RSS now ${(rss() / 2 ** 20).toFixed(0)} MiB`,
  );
}
const alive = (await fetch(`${base}/healthz`).catch(() => undefined))?.status;
console.log(
  `3. reproductions with a 5xx: ${fivexx} of ${repro.length + 1}; process alive: ${alive === 200}; load average ${load()}`,
);
stop();
process.exit(0);

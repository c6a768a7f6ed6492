/**
 * Where the event loop stops while one large request runs: the built app (defaults of `npm start`) in this
 * process, the client in another (curl), and on the loop
 *  - perf_hooks.monitorEventLoopDelay (10 ms resolution): the loop's delay percentiles;
 *  - a 5 ms timer that records every stall longer than 40 ms with its start and end;
 *  - the request's stages (onRequest, body parsed, handler, hand-off to the worker, answer back, response sent);
 *  - garbage collections on this thread (PerformanceObserver 'gc');
 *  - this thread's CPU time across each stall (process.cpuUsage counts every thread, so the worker's is subtracted
 *    by sampling the process total and the worker's own CPU clock is not available: a stall with little CPU on the
 *    whole process is the scheduler, not the loop's own work).
 * `npm run build && npx tsx bench/loop-pause.ts [lines] [concurrent clients]`. Prints a timeline; asserts nothing; bounded in time.
 */
import { execFile } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { monitorEventLoopDelay, PerformanceObserver, performance } from 'node:perf_hooks';

const { buildApp } = (await import(
  new URL('../dist/services/app.js', import.meta.url).href
)) as typeof import('../services/app.js');
const { loadConfig } = (await import(
  new URL('../dist/services/config.js', import.meta.url).href
)) as typeof import('../services/config.js');

const n = Number(process.argv[2] ?? 100_000);
const clients = Number(process.argv[3] ?? 1);
const app = await buildApp({ config: loadConfig({ PORT: '0' }) });

const t0 = performance.now();
const at = () => (performance.now() - t0).toFixed(0).padStart(6);
const events: string[] = [];
const mark = (what: string) => events.push(`${at()} ms  ${what}`);

for (const hook of ['onRequest', 'preParsing', 'preValidation', 'preHandler', 'onSend', 'onResponse'] as const)
  app.addHook(hook, async (req: { url: string }) => {
    if (req.url.startsWith('/v1/')) mark(hook);
  });
const run = app.pool.run.bind(app.pool);
app.pool.run = async (job, size, options) => {
  mark(`pool.run (${job.kind}, ${size})`);
  try {
    return await run(job, size, options);
  } finally {
    mark('pool.run returned');
  }
};
await app.pool.warm();
await app.listen({ host: '127.0.0.1', port: 0 });
const port = (app.server.address() as { port: number }).port;
new PerformanceObserver((list) => {
  for (const e of list.getEntries())
    if (e.duration > 5)
      events.push(
        `${(e.startTime - t0).toFixed(0).padStart(6)} ms  GC ${(e as { detail?: { kind?: number } }).detail?.kind ?? ''} ${e.duration.toFixed(0)} ms`,
      );
}).observe({ entryTypes: ['gc'] });

const h = monitorEventLoopDelay({ resolution: 10 });
let last = performance.now();
let lastCpu = process.cpuUsage();
const tick = setInterval(() => {
  const now = performance.now();
  const cpu = process.cpuUsage(lastCpu);
  if (now - last > 40)
    events.push(
      `${(last - t0).toFixed(0).padStart(6)} ms  STALL ${(now - last).toFixed(0)} ms (process CPU in it ${((cpu.user + cpu.system) / 1000).toFixed(0)} ms)`,
    );
  last = now;
  lastCpu = process.cpuUsage();
}, 5);

const lines: unknown[] = [];
for (let k = 0; lines.length < n; k++) {
  const j = k % 25;
  const noise = ((k * 7919) % 1000) / 1e6;
  lines.push({
    position: 2885.98 + 10.14 * (j + 1) * (j + 2) - 10.44 * j * (j + 1) + noise,
    uncertainty: 0.002,
    assignment: { band: '1-0', branch: 'R', j },
  });
}
const file = join(tmpdir(), `loop-pause-${process.pid}.json`);
writeFileSync(file, JSON.stringify({ species: 'HCl', lines }));
console.log(
  `body ${n} lines; load average ${loadavg()
    .map((x) => x.toFixed(1))
    .join(' ')}`,
);

await new Promise((r) => setTimeout(r, 500));
h.enable();
mark('client starts');
const curl = () =>
  new Promise<string>((resolve) =>
    execFile(
      'curl',
      [
        '-s',
        '-o',
        '/dev/null',
        '-w',
        '%{http_code} %{time_total}',
        '-H',
        'content-type: application/json',
        '--data-binary',
        `@${file}`,
        `http://127.0.0.1:${port}/v1/fits`,
      ],
      { timeout: 120_000 },
      (_e, stdout) => resolve(stdout),
    ),
  );
const out = await Promise.all(Array.from({ length: clients }, curl));
mark(`clients done: ${out.join(', ')}`);
h.disable();
clearInterval(tick);
events.sort((a, b) => Number(a.slice(0, 6)) - Number(b.slice(0, 6)));
console.log(events.join('\n'));
console.log(
  `loop delay: p50 ${(h.percentile(50) / 1e6).toFixed(0)} ms, p99 ${(h.percentile(99) / 1e6).toFixed(0)} ms, max ${(h.max / 1e6).toFixed(0)} ms; load average ${loadavg()
    .map((x) => x.toFixed(1))
    .join(' ')}`,
);
await app.close();

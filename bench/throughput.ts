/**
 * Throughput of 60-line fits against a bare route (/healthz) on the same server, as a ratio from one run. The
 * server runs in its own process (from the TypeScript sources), the load generator (autocannon) in this one.
 */
import autocannon from 'autocannon';
import { startServer } from './server-process.js';

const port = 18090;
const server = await startServer(port);
try {
  const lines = [];
  for (let j = 0; j < 30; j++) {
    const x = (J: number) => J * (J + 1);
    const nu = (v1: number, J1: number, J0: number) =>
      2143.27 + (1.9225 - 0.0175 * v1) * x(J1) - 1.9225 * x(J0) - 6.1e-6 * (x(J1) ** 2 - x(J0) ** 2);
    lines.push({ position: nu(1, j + 1, j), uncertainty: 0.001, assignment: { band: '1-0', branch: 'R', j } });
    lines.push({ position: nu(1, j, j + 1), uncertainty: 0.001, assignment: { band: '1-0', branch: 'P', j: j + 1 } });
  }
  const body = JSON.stringify({ species: 'CO', lines });
  const run = (path: string, post: boolean) =>
    autocannon({
      url: `http://127.0.0.1:${port}${path}`,
      duration: 5,
      connections: 10,
      ...(post ? { method: 'POST' as const, body, headers: { 'content-type': 'application/json' } } : {}),
    });
  await run('/healthz', false); // warm-up
  const bare = await run('/healthz', false);
  const fit = await run('/v1/fits', true);
  console.log('\nThroughput on one server process (autocannon, 10 connections, 5 s each, same run)');
  console.log('| request | req/s | p99 latency | ratio to GET /healthz |');
  console.log('| --- | ---: | ---: | ---: |');
  console.log(`| GET /healthz | ${bare.requests.average.toFixed(0)} | ${bare.latency.p99} ms | 1.00 |`);
  console.log(
    `| POST /v1/fits, 60 assigned lines | ${fit.requests.average.toFixed(0)} | ${fit.latency.p99} ms | ${(fit.requests.average / bare.requests.average).toFixed(2)} |`,
  );
} finally {
  server.stop();
}

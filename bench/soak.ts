/**
 * Memory over 100 000 requests (bounded): the server in its own process; resident memory and heap read from
 * /metrics after a warm-up and at the end. `npm run soak`. Prints the growth; asserts nothing.
 */
import autocannon from 'autocannon';
import { startServer } from './server-process.js';

const port = 18091;
const total = Number(process.env.SOAK_REQUESTS ?? 100_000);
const server = await startServer(port);
const memory = async () => {
  const m = await (await fetch(`http://127.0.0.1:${port}/metrics`)).text();
  const get = (name: string) => Number(new RegExp(`^${name} (\\S+)`, 'm').exec(m)?.[1] ?? Number.NaN);
  return { rss: get('branchwise_process_resident_memory_bytes'), heap: get('branchwise_nodejs_heap_size_used_bytes') };
};
try {
  const body = JSON.stringify({
    species: 'HCl',
    lines: [0, 1, 2, 3, 4, 5].flatMap((j) => [
      { position: 2906.24 + 19.6 * j - 0.6 * j * j, assignment: { band: '1-0', branch: 'R', j } },
      { position: 2865.1 - 21.5 * j - 0.6 * j * j, assignment: { band: '1-0', branch: 'P', j: j + 1 } },
    ]),
  });
  const send = (amount: number) =>
    autocannon({
      url: `http://127.0.0.1:${port}/v1/fits`,
      method: 'POST',
      body,
      headers: { 'content-type': 'application/json' },
      amount,
      connections: 10,
    });
  await send(5000);
  const before = await memory();
  const r = await send(total);
  const after = await memory();
  console.log(`\nSoak: ${r.requests.total} requests (${r.non2xx} non-2xx, ${r.errors} errors)`);
  console.log(
    `resident memory ${(before.rss / 2 ** 20).toFixed(1)} → ${(after.rss / 2 ** 20).toFixed(1)} MiB; heap used ${(before.heap / 2 ** 20).toFixed(1)} → ${(after.heap / 2 ** 20).toFixed(1)} MiB`,
  );
} finally {
  server.stop();
}

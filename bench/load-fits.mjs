// A bounded load of 60-line CO fits with autocannon: POSTs to the URL given for the seconds given, then prints
// the request count, the non-2xx count and errors. Used by docker/loopback-check.sh and npm run bench.
import autocannon from 'autocannon';

const [url, seconds = '10', connections = '10'] = process.argv.slice(2);
const lines = [];
for (let j = 0; j < 30; j++) {
  const x = (J) => J * (J + 1);
  const nu = (v1, J1, J0) =>
    2143.27 + (1.9225 - 0.0175 * v1) * x(J1) - 1.9225 * x(J0) - 6.1e-6 * (x(J1) ** 2 - x(J0) ** 2);
  lines.push({ position: nu(1, j + 1, j), uncertainty: 0.001, assignment: { band: '1-0', branch: 'R', j } });
  lines.push({ position: nu(1, j, j + 1), uncertainty: 0.001, assignment: { band: '1-0', branch: 'P', j: j + 1 } });
}
const body = JSON.stringify({ species: 'CO', lines });
const result = await autocannon({
  url,
  method: 'POST',
  headers: { 'content-type': 'application/json' },
  body,
  duration: Number(seconds),
  connections: Number(connections),
});
console.log(
  JSON.stringify({
    requests: result.requests.total,
    non2xx: result.non2xx,
    byStatus: Object.fromEntries(Object.entries(result.statusCodeStats ?? {}).map(([k, v]) => [k, v.count])),
    errors: result.errors,
    timeouts: result.timeouts,
    rps: result.requests.average,
    p99ms: result.latency.p99,
  }),
);

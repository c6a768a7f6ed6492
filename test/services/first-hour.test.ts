import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { main } from '../../cli/main.js';
import { useApp } from '../helpers/app.js';

/** What a newcomer meets in the first hour: answers that name the real problem. */
const app = useApp();

describe('a JSON array or a `query` field sent to a REST route', () => {
  it('is a schema error of that route, not a refused GraphQL batch', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: [] });
    expect(r.statusCode).toBe(400);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(r.json().code).toBe('VALIDATION_FAILED');
    expect(r.json().detail).not.toMatch(/GraphQL|batched/i);
  });
  it('a long `query` string in a fit body is reported as an unknown key of the fit', async () => {
    const body = { query: 'x'.repeat(50_000), species: 'CO', lines: [{ position: 2143.27 }] };
    const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().code).toBe('VALIDATION_FAILED');
    expect(r.json().detail).toMatch(/query/);
  });
  it('a batched GraphQL request is still refused on /graphql', async () => {
    const r = await app().inject({ method: 'POST', url: '/graphql', payload: [{ query: '{ species { formula } }' }] });
    expect(r.statusCode).toBe(400);
    expect(r.json().code).toBe('GRAPHQL_REFUSED');
  });
});

describe('a JSON line with its assignment written as in a CSV row', () => {
  it('is told where the assignment goes', async () => {
    const body = { species: 'CO', lines: [{ position: 2139.4261, band: '1-0', branch: 'P', j: 1 }] };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().code).toBe('VALIDATION_FAILED');
    expect(r.json().detail).toContain('"band", "branch", "j"');
    expect(r.json().detail).toContain('"assignment": {');
  });
  it('an unknown key that is no assignment lists the keys a line has', async () => {
    const body = { species: 'CO', lines: [{ wavenumber: 2139.4261 }] };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().detail).toMatch(/"wavenumber".*a line has position, uncertainty/);
    expect(r.json().detail).not.toContain('"assignment": {');
  });
});

describe('an unknown key of a request or of its options', () => {
  // A list kept with the published constants beside it, a misspelt option, a profile under a singular name: each
  // answer names the key and lists the keys that object has, as a line's and a tolerance profile's answers do.
  const lines = [{ position: 2139.4261 }];
  it('of a fit request lists the keys a fit request has', async () => {
    const body = { species: 'CO', published: { B_v_MHz: [57635.968] }, lines };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().detail).toBe(
      '(body): Unrecognized key(s) "published": a fit request has species, unit, lines, spectrum, peakOptions, options, sample',
    );
  });
  it('of a check request lists tolerances too', async () => {
    const body = { species: 'CO', tolerance: { calibrationOffset: 0.02 }, lines };
    const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().detail).toMatch(
      /^\(body\): Unrecognized key\(s\) "tolerance": a check request has .*, tolerances$/,
    );
  });
  it('of the options lists the options', async () => {
    const body = { species: 'CO', options: { rejectionTreshold: 3 }, lines };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(400);
    expect(r.json().detail).toMatch(
      /^options: Unrecognized key\(s\) "rejectionTreshold": options has uncertaintyMode, rejectionThreshold, .*structureBand, fitSourceOffsets, referenceSource$/,
    );
  });
});

describe('an assigned CSV line list without a species', () => {
  // 12C16O fundamental, P(1) and R(0)…R(2) from ν0 = 2143.2712 cm⁻¹, B0 = 1.92253, B1 = 1.90502 cm⁻¹ (from memory,
  // close to Huber & Herzberg); no uncertainties.
  const csv = 'position,band,branch,j\n2139.4262,1-0,P,1\n2135.5465,1-0,P,2\n2147.0812,1-0,R,0\n2150.8561,1-0,R,1\n';
  it('is identified from its labels (carbon monoxide), and says so', async () => {
    const headers = { 'content-type': 'text/csv' };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', headers, payload: csv });
    expect(r.statusCode).toBe(200);
    expect(r.json().species.map((s: { formula: string }) => s.formula)).toEqual(['12C-16O']);
    expect(r.json().warnings[0].code).toBe('SPECIES_FROM_LABELS');
    expect(r.json().warnings[0].message).toMatch(/carbon monoxide/);
  });
  it('labels that fit no species: says where the species goes for this kind of body, and the advice works', async () => {
    const headers = { 'content-type': 'text/csv' };
    // The same lines labelled 2-0: no library molecule has its first overtone there.
    const wrong = csv.replaceAll('1-0', '2-0');
    const r = await app().inject({ method: 'POST', url: '/v1/fits', headers, payload: wrong });
    expect(r.statusCode).toBe(422);
    expect(r.json().code).toBe('SPECIES_UNIDENTIFIED');
    expect(r.json().detail).toContain('?species=');
    expect(r.json().detail).toContain('--species');
    expect(r.json().detail.endsWith('…')).toBe(false);
    const again = await app().inject({ method: 'POST', url: '/v1/fits?species=CO', headers, payload: csv });
    expect(again.statusCode).toBe(200);
  });
});

describe('the README', () => {
  const readme = readFileSync('README.md', 'utf8');
  it('lists every path of the OpenAPI document in its endpoint table', async () => {
    const doc = (await app().inject({ method: 'GET', url: '/openapi.json' })).json();
    const table = readme.split('\n').filter((l) => l.startsWith('| `'));
    const missing = Object.keys(doc.paths).filter((p) => !table.some((row) => row.includes(` ${p}\``)));
    expect(missing).toEqual([]);
  });
  it('shows the JSON shape of a line list, and that example is accepted by /v1/fits', async () => {
    const block = readme.match(/A line list in JSON[\s\S]*?```json\n([\s\S]*?)```/);
    expect(block).not.toBeNull();
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: JSON.parse(block?.[1] ?? '') });
    expect(r.statusCode).toBe(422); // two lines cannot determine a band: a science answer, not a schema error
    expect(r.json().code).not.toBe('VALIDATION_FAILED');
  });
});

describe('a JSON body with a __proto__ key', () => {
  it('is told that the key is refused, not that the JSON is broken', async () => {
    const payload = '{"species":"CO","__proto__":{"polluted":1},"lines":[{"position":2143.27}]}';
    const headers = { 'content-type': 'application/json' };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', headers, payload });
    expect(r.statusCode).toBe(400);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(r.json().code).toBe('FORBIDDEN_PROPERTY');
    expect(r.json().detail).toContain('__proto__');
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    const broken = await app().inject({ method: 'POST', url: '/v1/fits', headers, payload: '{"species":' });
    expect(broken.json().code).toBe('INVALID_JSON');
  });
});

describe('the command line', () => {
  it('prints under its help and its tables that it defers to local codes, safety data sheets and licensed practice', () => {
    const runs = [
      ['--help'],
      ['predict', '--species', 'CO', '--jmax', '2'],
      ['potential', '--species', 'CO', '--vmax', '2'],
    ];
    for (const args of runs) {
      let out = '';
      main(args, { out: (s) => (out += s), err: () => {}, isTty: false });
      expect(out).toContain('certifies nothing about the safety');
      expect(out).toContain('local codes, the safety data sheets and licensed practice');
      expect(out.endsWith('\n')).toBe(true);
    }
  });
});

describe('an unknown query parameter with a CSV body', () => {
  it('is named as a query-string parameter, not as part of the body', async () => {
    const csv = 'position\n2139.4262\n2135.5465\n2147.0812\n2150.8561\n2131.6313\n2154.5961\n';
    const headers = { 'content-type': 'text/csv' };
    const r = await app().inject({ method: 'POST', url: '/v1/fits?species=CO&units=MHz', headers, payload: csv });
    expect(r.statusCode).toBe(400);
    expect(r.json().code).toBe('VALIDATION_FAILED');
    expect(r.json().detail).toMatch(/^\(query string\).*"units"/);
    expect(r.json().detail).not.toContain('(body)');
  });
});

describe('predicted positions in the CLI table', () => {
  it('keep the digits of the CSV form to 1e-5 cm⁻¹ and 1e-3 MHz (six significant digits lost 0.004 cm⁻¹)', () => {
    const runCli = (args: string[]) => {
      let out = '';
      main(args, { out: (s) => (out += s), err: () => {}, isTty: false });
      return out;
    };
    for (const [unit, tolerance] of [
      ['cm-1', 1e-5],
      ['MHz', 1e-3],
    ] as const) {
      const base = ['predict', '--species', 'CO', '--bands', '1-0', '--jmax', '3', '--unit', unit];
      const csv = runCli([...base, '--format', 'csv'])
        .trim()
        .split(/\r?\n/)
        .slice(1);
      const full = new Map(csv.map((row) => row.split(',')).map((c) => [`${c[1]}(${c[2]})`, Number(c[3])]));
      const rows = runCli(base)
        .split('\n')
        .filter((l) => /^1-0 /.test(l));
      expect(rows.length).toBe(full.size);
      for (const row of rows) {
        const [, line, position] = row.trim().split(/\s+/);
        expect(Math.abs(Number(position) - (full.get(line ?? '') ?? Number.NaN))).toBeLessThan(tolerance);
      }
    }
  });
});

describe('a band whose level is out of range', () => {
  it('is told the range, not only the form it already has', async () => {
    const lines = [{ position: 2143.27, assignment: { band: '100-0', branch: 'P', j: 1 } }];
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines } });
    expect(r.statusCode).toBe(400);
    expect(r.json().detail).toContain('0 to 99');
  });
});

describe('a body of a media type the route does not take', () => {
  // 12C16O fundamental P(1), R(0) … R(3), P(2) … P(3) from ν0 = 2143.2712, B0 = 1.92253, B1 = 1.90502 cm⁻¹
  // (from memory, Huber & Herzberg / HITRAN); only the media type matters here.
  const lines = [2139.4262, 2135.5464, 2131.6317, 2147.0812, 2150.8558, 2154.5956, 2158.2997].map((position) => ({
    position,
  }));
  const json = JSON.stringify({ species: 'CO', lines });
  const csv = `position\n${lines.map((l) => l.position).join('\n')}\n`;
  const post = (url: string, type: string | undefined, payload: string) =>
    app().inject({ method: 'POST', url, payload, headers: type ? { 'content-type': type } : {} });

  it('JSON sent as text/plain is a 415 naming what to send, not a schema error about a string', async () => {
    const r = await post('/v1/fits', 'text/plain; charset=utf-8', json);
    expect(r.statusCode).toBe(415);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(r.json().code).toBe('UNSUPPORTED_MEDIA_TYPE');
    expect(r.json().detail).toContain('"text/plain"');
    expect(r.json().detail).toContain('application/json');
    expect(r.json().detail).toContain('text/csv');
    expect(r.json().detail).toContain('?species=');
    expect(r.json().detail).not.toMatch(/received string/);
  });
  it('following the advice works: the same JSON as application/json, the lines as text/csv with ?species=', async () => {
    const asJson = await post('/v1/fits', 'application/json', json);
    expect(asJson.statusCode).toBe(200);
    const asCsv = await post('/v1/fits?species=CO', 'text/csv', csv);
    expect(asCsv.statusCode).toBe(200);
    expect(asCsv.json().bands[0].band).toBe('1-0');
  });
  it('a form body (curl --data without -H) on a JSON-only route is told to send JSON only', async () => {
    const r = await post('/v1/predictions', 'application/x-www-form-urlencoded', 'species=CO');
    expect(r.statusCode).toBe(415);
    expect(r.json().detail).toContain('"application/x-www-form-urlencoded" is not accepted on /v1/predictions');
    expect(r.json().detail).toMatch(/send application\/json$/);
  });
  it('a body without a content-type is told so', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: Buffer.from(json) });
    expect(r.statusCode).toBe(415);
    expect(r.json().detail).toMatch(
      /^a body without a content-type is not accepted on \/v1\/checks; send application\/json/,
    );
  });
  it('names text bodies on exactly the routes whose OpenAPI request bodies list text/csv', async () => {
    const doc = JSON.parse(readFileSync(new URL('../../openapi/openapi.json', import.meta.url), 'utf8'));
    const postPaths = Object.entries(doc.paths as Record<string, { post?: { requestBody?: { content?: object } } }>)
      .filter(([, ops]) => ops.post?.requestBody?.content)
      .filter(([path]) => !path.startsWith('/v1/batch/'));
    expect(postPaths.length).toBeGreaterThanOrEqual(6);
    for (const [path, ops] of postPaths) {
      const takesCsv = Object.keys(ops.post?.requestBody?.content ?? {}).includes('text/csv');
      const r = await post(path, 'text/plain', 'x');
      expect(r.statusCode, path).toBe(415);
      expect(r.json().detail.includes('text/csv'), path).toBe(takesCsv);
    }
  });
});

describe("the README's curl examples, run as written", () => {
  const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
  const root = new URL('../../', import.meta.url);
  const examples = [
    ...readme.matchAll(
      /curl -s -X POST '?http:\/\/127\.0\.0\.1:8080(\/v1\/[a-z/]+)'? [^\n]*\\\n\s+(?:-H '[^']*' \\\n\s+)?--data @(examples\/[\w.-]+\.json) \| jq '([^']+)'/g,
    ),
  ].map((m) => ({ path: m[1] as string, file: m[2] as string, filter: m[3] as string }));
  const jq = spawnSync('jq', ['--version']);

  it('finds every `… | jq` example of the README', () => {
    expect(examples.length).toBe(readme.match(/--data @examples\/[\w.-]+\.json \| jq/g)?.length);
    expect(examples.length).toBeGreaterThanOrEqual(3);
  });
  it.skipIf(jq.status !== 0)(
    "each jq filter runs on the service's answer and prints something (jq 1.6 too)",
    async () => {
      for (const { path, file, filter } of examples) {
        const r = await app().inject({
          method: 'POST',
          url: path,
          headers: { 'content-type': 'application/json' },
          payload: readFileSync(new URL(file, root)),
        });
        expect(r.statusCode, file).toBe(200);
        const out = spawnSync('jq', ['-e', filter], { input: r.body, encoding: 'utf8' });
        expect(out.stderr, `${file}: jq '${filter}'`).toBe('');
        expect(out.status, `${file}: jq '${filter}'`).toBe(0);
        expect(out.stdout.length).toBeGreaterThan(10);
      }
    },
  );
  it('runs the command line through npx or npm, as a fresh clone has no `branchwise` on its PATH', () => {
    let inCode = false;
    const codeLines: string[] = [];
    for (const line of readme.split('\n')) {
      if (line.startsWith('```')) inCode = !inCode;
      else if (inCode) codeLines.push(line);
    }
    expect(codeLines).toContain('npx branchwise --version');
    expect(codeLines.filter((l) => /^branchwise /.test(l))).toEqual([]);
  });
});

describe('a CSV whose rows hold no numbers', () => {
  it('says what it read instead: the header and the row taken as units', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits?species=CO',
      headers: { 'content-type': 'text/csv' },
      payload: 'peak;note\nn/a;blank\n',
    });
    expect(r.statusCode).toBe(422);
    expect(r.json().code).toBe('INPUT_INVALID');
    expect(r.json().detail).toBe(
      'the CSV holds no rows of numbers (header peak, note; the row under it, n/a, blank, was read as its units)',
    );
  });
});

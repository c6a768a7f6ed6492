import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EXIT, main } from '../../cli/main.js';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { checkExample, co2FitExample, csvExample, fitExample, peaksExample } from '../../services/openapi/examples.js';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';

/**
 * One kind of bad value, one answer (DEVELOPERS.md, "Bad values"): every number of every route's body, the query's
 * temperature and a CSV's number cells, sent NaN, ±Infinity, 1e400, subnormal, huge, a string, empty, null, negative
 * or zero where its field refuses it, get a 400 VALIDATION_FAILED problem+json whose `errors` name the field and say
 * what is expected; never a 5xx, and /healthz answers after each. Nesting too deep is one answer for objects and
 * arrays, small or large. Before: NaN was a 400 INVALID_JSON naming no field, a subnormal uncertainty a 422
 * FIT_RANK_DEFICIENT, `?temperature=NaN` with a CSV body a 422 and −5 a 400 naming `options/temperature`, a CSV cell
 * "NaN" a 422, a negative variance a 422 RESULT_NOT_FINITE, and 100 000-deep objects a VALIDATION_FAILED where arrays
 * were a BAD_REQUEST.
 */
const app = useApp();

type Path = (string | number)[];

/** Bodies that carry every numeric field of their route (each is accepted as it is: checked below). */
const FIT = {
  ...fitExample,
  lines: fitExample.lines.map((l, i) => (i === 0 ? { ...l, id: 1, intensity: 0.5 } : l)),
  options: {
    rejectionThreshold: 4,
    maxRejectedFraction: 0.2,
    termSignificance: 0.01,
    maxCentrifugalOrder: 5,
    temperature: 296,
    maxOffset: 0.5,
  },
};
const TOLERANCES = {
  identityOrigin: 0.5,
  identityB: 1e-3,
  calibrationOffset: 0.05,
  calibrationScalePpm: 20,
  unexplainedFraction: 0.05,
  isotopeRatio: 0.1,
  temperature: { expected: 296, tolerance: 50 },
  maxReducedChiSquare: 3,
  maxRejectedFraction: 0.05,
  minCompleteness: 0.9,
};
const CONSTANTS = {
  values: {
    omega_e: { value: 2990.9, uncertainty: 0.1 },
    omega_e_x_e: { value: 52.8 },
    B_e: { value: 10.59, uncertainty: 0.01 },
    alpha_e: { value: 0.307 },
  },
  covariance: {
    names: ['omega_e', 'B_e'],
    matrix: [
      [0.01, 0],
      [0, 1e-4],
    ],
  },
};
const BASES: { name: string; url: string; body: object; status: number }[] = [
  { name: 'fit', url: '/v1/fits', body: FIT, status: 200 },
  { name: 'linear fit', url: '/v1/fits', body: co2FitExample, status: 200 },
  // One peak: the fit is refused by the science (422), which no bad value may reach.
  {
    name: 'spectrum fit',
    url: '/v1/fits',
    body: { species: 'CO', ...peaksExample, peakOptions: { threshold: 6 } },
    status: 422,
  },
  { name: 'check', url: '/v1/checks', body: { ...checkExample, tolerances: TOLERANCES }, status: 200 },
  { name: 'peaks', url: '/v1/peaks', body: { ...peaksExample, peakOptions: { threshold: 6 } }, status: 200 },
  {
    name: 'prediction',
    url: '/v1/predictions',
    body: { species: 'H35Cl', bands: ['1-0'], jMax: 5, temperature: 296, constants: CONSTANTS },
    status: 200,
  },
  {
    name: 'potential',
    url: '/v1/potentials',
    body: { species: 'H35Cl', vMax: 3, vData: 3, constants: CONSTANTS },
    status: 200,
  },
];

/** Every numeric leaf (the first element of each array). */
function numericPaths(v: unknown, path: Path = []): Path[] {
  if (typeof v === 'number') return [path];
  if (Array.isArray(v)) return v.length > 0 ? numericPaths(v[0], [...path, 0]) : [];
  if (v !== null && typeof v === 'object') return Object.entries(v).flatMap(([k, x]) => numericPaths(x, [...path, k]));
  return [];
}

/** The body as JSON text with the leaf at `path` replaced by a literal (which may be no JSON value, e.g. NaN). */
function withLiteral(body: object, path: Path, literal: string): string {
  const copy = structuredClone(body) as Record<string | number, unknown>;
  let at = copy;
  for (const k of path.slice(0, -1)) at = at[k] as Record<string | number, unknown>;
  at[path.at(-1) as string | number] = '@@VALUE@@';
  return JSON.stringify(copy).replace('"@@VALUE@@"', literal);
}

/** Not a finite number, or far outside every field's range: refused in every numeric field. */
const NEVER = [
  'NaN',
  'Infinity',
  '-Infinity',
  '1e400',
  '-1e400',
  '1e300',
  '1.7976931348623157e308',
  '"5"',
  '""',
  'null',
  'true',
  '[]',
];
/** Fields that take any sign (a spectrum's ordinates, a caller's constants). */
const SIGNED = /^(spectrum\/[xy]\/0|constants\/values\/[a-zA-Z_]+\/value)$/;
/** Fields that must be positive: 0 and subnormal numbers refused as well (their minimum is 2.2e-308). */
const POSITIVE =
  /^(lines\/0\/(position|uncertainty)|options\/(termSignificance|temperature|maxCentrifugalOrder)|peakOptions\/threshold|tolerances\/(identityOrigin|identityB|calibrationOffset|calibrationScalePpm|isotopeRatio|maxReducedChiSquare|temperature\/(expected|tolerance))|temperature)$/;

async function send(url: string, payload: string, contentType = 'application/json') {
  return app().inject({
    method: 'POST',
    url,
    payload,
    headers: { 'content-type': contentType },
    remoteAddress: nextClient(),
  });
}

/** A 400 VALIDATION_FAILED problem naming `field` with what is expected; then /healthz still answers. */
async function expectRefused(r: Awaited<ReturnType<typeof send>>, field: string, label: string) {
  expect(r.statusCode, `${label}: ${r.body.slice(0, 300)}`).toBe(400);
  expect(r.headers['content-type'], label).toMatch(/^application\/problem\+json/);
  const p = r.json() as {
    type: string;
    title: string;
    status: number;
    detail: string;
    code: string;
    errors?: { path: string; message: string }[];
  };
  expect(p, label).toMatchObject({ type: '/problems/validation-failed', status: 400, code: 'VALIDATION_FAILED' });
  const named = (p.errors ?? []).find((e) => e.path === field);
  expect(named, `${label}: ${JSON.stringify(p.errors)}`).toBeDefined();
  expect(named?.message, label).toMatch(/expected|send/);
  expect(p.detail, label).toContain(field);
  const health = await app().inject({ method: 'GET', url: '/healthz' });
  expect(health.statusCode, label).toBe(200);
}

describe('one kind of bad value, one answer: 400 VALIDATION_FAILED naming the field (npm start defaults)', () => {
  it('the bodies the table starts from are accepted as they are', async () => {
    for (const b of BASES) expect((await send(b.url, JSON.stringify(b.body))).statusCode, b.name).toBe(b.status);
  });

  for (const b of BASES)
    it(`${b.name}: every number sent NaN, ±Infinity, 1e400, 1e300, a string, empty, null, true, [], and negative, zero or subnormal where refused`, async () => {
      // A line's id is a label (a string or an integer), not a quantity.
      const paths = numericPaths(b.body).filter((p) => p.join('/') !== 'lines/0/id');
      expect(paths.length).toBeGreaterThan(0);
      for (const path of paths) {
        const field = path.join('/');
        const literals = [
          ...NEVER,
          ...(SIGNED.test(field) ? [] : ['-5', '-1e-310']),
          ...(POSITIVE.test(field) ? ['0', '5e-324', '1e-320'] : []),
        ];
        for (const literal of literals)
          await expectRefused(
            await send(b.url, withLiteral(b.body, path, literal)),
            field,
            `${b.name} ${field}=${literal}`,
          );
      }
    }, 120_000);

  it('an uncertainty below 1e-15 of its position (finer than a double resolves it) is refused, one above is fitted', async () => {
    for (const u of [1e-14, 1e-30, 1e-300]) {
      const body = { ...fitExample, lines: fitExample.lines.map((l, i) => (i === 2 ? { ...l, uncertainty: u } : l)) };
      const r = await send('/v1/fits', JSON.stringify(body));
      await expectRefused(r, 'lines/2/uncertainty', `uncertainty ${u}`);
      expect(r.json().errors[0].message).toMatch(/send at least 2\.2e-12/);
    }
    const fine = { ...fitExample, lines: fitExample.lines.map((l, i) => (i === 2 ? { ...l, uncertainty: 1e-7 } : l)) };
    expect((await send('/v1/fits', JSON.stringify(fine))).statusCode).toBe(200);
  });

  it('?temperature= is checked by one rule whatever the body (CSV or JSON) and whichever route takes it', async () => {
    const csvOk = await send('/v1/fits?species=CO&temperature=296', csvExample, 'text/csv');
    expect(csvOk.statusCode, csvOk.body.slice(0, 300)).toBe(200);
    for (const t of ['NaN', 'Infinity', '1e400', '5e-324', '-5', '0', '9', '6001', 'abc', '', '%20', '1e3'])
      for (const [url, payload, type] of [
        [`/v1/fits?species=CO&temperature=${t}`, csvExample, 'text/csv'],
        [`/v1/checks?species=CO&temperature=${t}`, csvExample, 'text/csv'],
        [`/v1/fits?temperature=${t}`, JSON.stringify(fitExample), 'application/json'],
        [`/v1/peaks?temperature=${t}`, JSON.stringify(peaksExample), 'application/json'],
      ] as const)
        await expectRefused(await send(url, payload, type), '(query string) temperature', `${url} (${type})`);
  });

  it("a CSV number cell that is not a finite number is refused naming its line and column, like a JSON field's", async () => {
    for (const cell of ['NaN', 'Infinity', '1e400', 'abc'])
      for (const [column, from] of [
        ['position', '2139.4218'],
        ['uncertainty', '0.002'],
      ] as const)
        await expectRefused(
          await send('/v1/fits?species=CO', csvExample.replace(from, cell), 'text/csv'),
          `(CSV line 2) ${column}`,
          `CSV ${column} ${cell}`,
        );
    // What JSON refuses by its range, a CSV cell gets refused for too, under the field it fills.
    await expectRefused(
      await send('/v1/fits?species=CO', csvExample.replace('2139.4218', '5e-324'), 'text/csv'),
      'lines/0/position',
      'CSV position 5e-324',
    );
  });

  it('a body large enough for a worker (≥ OFFLOAD_BYTES) gets the same answers as a small one', async () => {
    const lines = Array.from({ length: 8000 }, (_, i) => ({ position: 2000 + i * 0.01, uncertainty: 0.002 }));
    const body = { species: 'CO', lines };
    expect(JSON.stringify(body).length).toBeGreaterThan(DEFAULT_CONFIG.offloadBytes);
    for (const literal of ['NaN', '-Infinity', '1e400', '5e-324', '-5', '1e-30'])
      await expectRefused(
        await send('/v1/fits', withLiteral(body, ['lines', 7999, 'uncertainty'], literal)),
        'lines/7999/uncertainty',
        `large body, uncertainty ${literal}`,
      );
  });

  it('NaN in an NDJSON batch line: the in-band 400 names the field', async () => {
    const good = JSON.stringify(fitExample);
    const bad = withLiteral(fitExample, ['lines', 4, 'position'], 'NaN');
    const r = await send('/v1/batch/fits', `${good}\n${bad}\n`, 'application/x-ndjson');
    expect(r.statusCode).toBe(200);
    const [first, second] = r.body
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l));
    expect(first.status).toBe(200);
    expect(second).toMatchObject({ status: 400, problem: { code: 'VALIDATION_FAILED' } });
    expect(second.problem.errors[0].path).toBe('lines/4/position');
  });

  it('NaN in GraphQL variables: a 400 whose message names the field, never a 5xx', async () => {
    const query = 'query($i: FitInput!){ fit(input: $i){ notice } }';
    const text = withLiteral(
      { query, variables: { i: fitExample } },
      ['variables', 'i', 'lines', 0, 'uncertainty'],
      'NaN',
    );
    const r = await send('/graphql', text);
    expect(r.statusCode, r.body).toBe(400);
    expect(r.json().errors[0].message).toMatch(
      /^variables\/i\/lines\/0\/uncertainty: expected a finite number, received NaN/,
    );
    expect((await app().inject({ method: 'GET', url: '/healthz' })).statusCode).toBe(200);
  });

  it('nesting beyond 32 levels: one answer for objects and arrays, at 100 and 100 000 levels (the latter parsed in a worker)', async () => {
    const answers = new Set<string>();
    for (const depth of [100, 100_000])
      for (const text of [
        `${'{"a":'.repeat(depth)}1${'}'.repeat(depth)}`,
        `${'['.repeat(depth)}1${']'.repeat(depth)}`,
      ]) {
        const r = await send('/v1/fits', text);
        expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
        answers.add(`${r.statusCode} ${r.json().code} ${r.json().detail}`);
        expect((await app().inject({ method: 'GET', url: '/healthz' })).statusCode).toBe(200);
      }
    expect([...answers]).toEqual(['400 BAD_REQUEST JSON nested deeper than 32 levels']);
  });

  it('the CLI follows the same rule: bad input (3) naming the field, a bad --temperature a usage error (4)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'bad-values-'));
    const run = (args: string[]) => {
      let err = '';
      const code = main(args, { out: () => {}, err: (s) => (err += s), isTty: false });
      return { code, err };
    };
    const cases: [string, string, string][] = [
      [
        'nan.json',
        withLiteral(fitExample, ['lines', 1, 'position'], 'NaN'),
        'lines/1/position: expected a finite number',
      ],
      [
        'subnormal.json',
        withLiteral(fitExample, ['lines', 1, 'uncertainty'], '5e-324'),
        'lines/1/uncertainty: expected a positive number',
      ],
      [
        'huge.json',
        withLiteral(fitExample, ['lines', 1, 'position'], '1e400'),
        'lines/1/position: expected a finite number',
      ],
      ['cell.csv', csvExample.replace('2139.4218', 'NaN'), 'CSV line 2: position "NaN" is not a number'],
    ];
    for (const [name, text, message] of cases) {
      const file = join(dir, name);
      writeFileSync(file, text);
      const r = run(['fit', '--species', 'CO', file]);
      expect(r.code, name).toBe(EXIT.input);
      expect(r.err, name).toContain(message);
    }
    const file = join(dir, 'good.csv');
    writeFileSync(file, csvExample);
    for (const t of ['NaN', '-5', '0', '1e400', 'abc']) {
      const r = run(['fit', '--species', 'CO', `--temperature=${t}`, file]);
      expect(r.code, t).toBe(EXIT.usage);
      expect(r.err, t).toMatch(/--temperature .*: expected a temperature in K from 10 to 6000/);
    }
    expect(run(['fit', '--species', 'CO', '--temperature=296', file]).code).toBe(EXIT.pass);
  });
});

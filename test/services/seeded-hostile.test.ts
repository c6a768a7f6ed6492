import { connect } from 'node:net';
import { describe, expect, it } from 'vitest';
import {
  csvExample,
  csvSpectrumExample,
  fitExample,
  jcampExample,
  ndjsonExample,
  peaksExample,
  predictionExample,
} from '../../services/openapi/examples.js';
import { useListeningApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';
import { seededRandom } from '../helpers/random.js';

/**
 * A seeded hostile mix against the app at the `npm start` defaults: valid bodies of every content type each route
 * takes (JSON, CSV, JCAMP-DX, NDJSON, GraphQL) are cut, spliced with hostile tokens (numbers past a double's range,
 * subnormals, NaN, deep nesting, duplicate and prototype keys, control characters, very long strings), sent with
 * odd content types, charsets, encodings, methods and Expect headers. Every answer must be a 2xx or a 4xx; every
 * 4xx must be an RFC 9457 problem (type, title, status equal to the HTTP status, a detail saying what to fix) —
 * GraphQL's own 4xx carry `errors` with messages instead — and /healthz must answer after each batch. Then the
 * same over real sockets: pipelined requests, a body sent slowly in pieces, a body cut short by the client.
 * Seed 20261204; a failure prints the case so it can be replayed.
 */
const { app, port } = useListeningApp();
const rand = seededRandom(20261204);
const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rand() * xs.length)] as T;

const HOSTILE = [
  '1e400',
  '-1e400',
  '4e-320',
  'NaN',
  '-0',
  '1e308',
  '"\\u0000"',
  '"\\ud800"',
  '{"__proto__":{"polluted":1}}',
  '{"constructor":{"prototype":{"polluted":1}}}',
  `${'['.repeat(40)}${']'.repeat(40)}`,
  `${'{"a":'.repeat(40)}1${'}'.repeat(40)}`,
  `"${'x'.repeat(20_000)}"`,
  'true',
  'null',
  '[]',
  '""',
  '99999999999999999999999',
];
const TEXT_HOSTILE = [
  '1e400',
  'NaN',
  '\u0000',
  '\uFFFD',
  ';;;',
  '"',
  '##',
  '##XYDATA=(X++(Y..Y))',
  '9'.repeat(400),
  '\r',
];

/** One mutation of a text body: cut it, splice a hostile token in, repeat a piece, or duplicate a key. */
function mutate(text: string, json: boolean): string {
  const at = Math.floor(rand() * text.length);
  switch (Math.floor(rand() * 5)) {
    case 0:
      return text.slice(0, at);
    case 1: {
      // replace the number (or word) at a random place by a hostile token
      const m = /-?[\d.eE+-]+|[A-Za-z]+/.exec(text.slice(at));
      if (!m) return text + pick(json ? HOSTILE : TEXT_HOSTILE);
      const start = at + m.index;
      return text.slice(0, start) + pick(json ? HOSTILE : TEXT_HOSTILE) + text.slice(start + m[0].length);
    }
    case 2:
      return text.slice(0, at) + text.slice(at, at + 200).repeat(Math.ceil(rand() * 50)) + text.slice(at);
    case 3:
      return json ? text.replace('{', `{"species":${pick(HOSTILE)},`) : `${pick(TEXT_HOSTILE)}\n${text}`;
    default:
      return text.slice(0, at) + String.fromCharCode(Math.floor(rand() * 0x2ff)) + text.slice(at + 1);
  }
}

const JSON_ROUTES: [string, object][] = [
  ['/v1/fits', fitExample],
  ['/v1/checks', { ...fitExample, tolerances: { calibrationOffset: 0.02 } }],
  ['/v1/peaks', peaksExample],
  ['/v1/predictions', predictionExample],
  ['/v1/potentials', { species: 'CO', vMax: 4 }],
];
const TEXT_ROUTES = ['/v1/fits?species=CO', '/v1/checks?species=CO', '/v1/peaks', '/v1/reports?species=CO'];
const TEXT_BODIES: [string, string][] = [
  ['text/csv', csvExample],
  ['text/csv', csvSpectrumExample],
  ['chemical/x-jcamp-dx', jcampExample],
];
const CONTENT_TYPES = [
  undefined,
  'application/json; charset=utf-8',
  'application/json; charset=iso-8859-1',
  'application/json; charset=utf-16le',
  'text/csv; charset=windows-1252',
  'application/x-www-form-urlencoded',
  'multipart/form-data; boundary=x',
  'application/json, text/csv',
  'chemical/x-jcamp-dx; charset=ebcdic',
];

interface Case {
  method: string;
  url: string;
  type?: string;
  body?: string;
  headers?: Record<string, string>;
}

function nextCase(i: number): Case {
  const kind = i % 6;
  if (kind <= 1) {
    const [url, body] = pick(JSON_ROUTES);
    return { method: 'POST', url, type: 'application/json', body: mutate(JSON.stringify(body), true) };
  }
  if (kind === 2) {
    const [type, body] = pick(TEXT_BODIES);
    return { method: 'POST', url: pick(TEXT_ROUTES), type, body: mutate(body, false) };
  }
  if (kind === 3)
    return {
      method: 'POST',
      url: pick(['/v1/batch/fits', '/v1/batch/checks']),
      type: 'application/x-ndjson',
      body: mutate(ndjsonExample, true),
    };
  if (kind === 4) {
    const query = pick([
      '{ species { formula } }',
      'query($i: PredictionInput!){ predict(input:$i){ species } }',
      '{ fit(input: {species: "CO", lines: []}) { warnings { code } } }',
      `{ ${'species { formula } '.repeat(30)} }`,
      '{ __schema { types { name } } }',
    ]);
    const body = JSON.stringify({ query, variables: { i: JSON.parse(JSON.stringify(predictionExample)) } });
    return {
      method: pick(['POST', 'POST', 'GET']),
      url: '/graphql',
      type: 'application/json',
      body: mutate(body, true),
    };
  }
  const [url, body] = pick(JSON_ROUTES);
  return {
    method: pick(['POST', 'PUT', 'PATCH', 'DELETE', 'OPTIONS', 'GET']),
    url: `${url}${pick(['', '?temperature=1e400', '?unit=parsec', '?table=x', '?detail=lean&detail=full', '?species=%00', `?x=${'a'.repeat(3000)}`])}`,
    type: pick(CONTENT_TYPES) as string,
    body: JSON.stringify(body),
    headers: pick<Record<string, string>>([
      {},
      { expect: '100-continue' },
      { expect: 'nothing' },
      { 'content-encoding': 'gzip' },
      { 'content-encoding': 'identity, br' },
      { accept: 'text/csv;q=nonsense' },
      { authorization: `Bearer ${'A'.repeat(500)}` },
    ]),
  };
}

function expectGoodAnswer(c: Case, status: number, type: string | undefined, body: string) {
  const where = `${c.method} ${c.url} ${c.type} ${JSON.stringify(c.headers ?? {})} ${JSON.stringify(c.body?.slice(0, 300))}`;
  expect(status, where).toBeLessThan(500);
  if (status < 400) return;
  if (c.url.startsWith('/graphql') && /^application\/(graphql-response\+)?json/.test(type ?? '')) {
    const g = JSON.parse(body) as { errors?: { message: string }[] };
    expect(g.errors?.[0]?.message, where).toBeTruthy();
    return;
  }
  expect(type, where).toMatch(/^application\/problem\+json/);
  const p = JSON.parse(body) as { type: string; title: string; status: number; detail: string };
  expect(p.status, where).toBe(status);
  expect(typeof p.type, where).toBe('string');
  expect(p.title, where).toBeTruthy();
  expect(p.detail, where).toBeTruthy();
}

async function healthy() {
  const started = process.hrtime.bigint();
  const h = await app().inject({ method: 'GET', url: '/healthz' });
  expect(h.statusCode).toBe(200);
  return Number(process.hrtime.bigint() - started) / 1e6;
}

describe('seeded hostile requests at the npm start defaults', () => {
  it('240 mutated requests of every route and content type: 2xx or a 4xx problem, never 5xx', async () => {
    const statuses = new Map<number, number>();
    for (let i = 0; i < 240; i++) {
      const c = nextCase(i);
      const r = await app().inject({
        method: c.method as 'POST',
        url: c.url,
        ...(c.body !== undefined && c.method !== 'GET' ? { payload: c.body } : {}),
        headers: { ...(c.type ? { 'content-type': c.type } : {}), ...c.headers },
        remoteAddress: nextClient(),
      });
      statuses.set(r.statusCode, (statuses.get(r.statusCode) ?? 0) + 1);
      expectGoodAnswer(c, r.statusCode, r.headers['content-type'] as string | undefined, r.body);
      if (i % 40 === 39) await healthy();
    }
    // The mix reaches the science as well as the parsers: some answers are 200, most are refusals.
    expect(statuses.get(200) ?? 0).toBeGreaterThan(0);
    expect([...statuses.keys()].filter((s) => s >= 400).length).toBeGreaterThanOrEqual(4);
  }, 120_000);

  /** Raw bytes to the listening port; the whole answer once the server closes the connection (or 10 s pass). */
  function sendRaw(parts: string[], gapMs: number, endEarly = false): Promise<string> {
    return new Promise((resolve, reject) => {
      const s = connect(port(), '127.0.0.1');
      let out = '';
      const timer = setTimeout(() => {
        s.destroy();
        resolve(`${out}<<no answer in 10 s>>`);
      }, 10_000);
      s.setEncoding('utf8');
      s.on('data', (d) => {
        out += d;
      });
      s.on('error', reject);
      s.on('close', () => {
        clearTimeout(timer);
        resolve(out);
      });
      s.on('connect', async () => {
        for (const p of parts) {
          s.write(p);
          if (gapMs > 0) await new Promise((r) => setTimeout(r, gapMs));
        }
        if (endEarly) s.end();
      });
    });
  }
  const request = (path: string, body: string, extra = '') =>
    `POST ${path} HTTP/1.1\r\nHost: x\r\nContent-Type: application/json\r\nContent-Length: ${Buffer.byteLength(body)}\r\n${extra}\r\n${body}`;

  it('pipelined requests are answered in order; a slow body is read; a body cut short gets no 5xx', async () => {
    const predict = JSON.stringify(predictionExample);
    const pipelined = await sendRaw(
      [
        request('/v1/predictions', predict) +
          request('/v1/predictions', '{"species":"CO","bands":[1e400]}') +
          request('/v1/predictions', predict, 'Connection: close\r\n'),
      ],
      0,
    );
    const statuses = [...pipelined.matchAll(/HTTP\/1\.1 (\d{3})/g)].map((m) => Number(m[1]));
    expect(statuses).toEqual([200, 400, 200]);

    const body = predict;
    const head = request('/v1/predictions', body, 'Connection: close\r\n').slice(0, -body.length);
    const pieces = [head, ...(body.match(/.{1,8}/gs) ?? [])];
    const slow = await sendRaw(pieces, 20);
    expect(slow).toMatch(/^HTTP\/1\.1 200/);
    expect(await healthy()).toBeLessThan(2000);

    // The client promises 500 bytes, sends 20 and closes its side: no answer is owed, the server must stay up.
    const cut = await sendRaw(
      [`${head.replace(/Content-Length: \d+/, 'Content-Length: 500')}${body.slice(0, 20)}`],
      0,
      true,
    );
    expect(cut).not.toMatch(/HTTP\/1\.1 5\d\d/);
    expect(await healthy()).toBeLessThan(2000);
  }, 60_000);
});

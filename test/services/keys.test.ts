import { request as httpRequest } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * Keys cannot be bypassed: every protected route × {no key, wrong key, right key} × {plain path, a percent-encoded
 * letter, doubled slashes, absolute-form request target}, sent as raw HTTP/1.1 over a socket (no client library
 * normalises the target). The app runs with the defaults of `npm start` plus one API key.
 */
const KEY = 'keys-test-key-0123456789abcdef';
const fit = assignedFitBody('HCl', ['1-0'], 6, 0.002, 5);
const json = (b: unknown) => ({ type: 'application/json', body: JSON.stringify(b) });

/** Protected routes: method, path, body (paths from the served OpenAPI document, checked below). */
const ROUTES: { method: string; path: string; body?: { type: string; body: string } }[] = [
  { method: 'POST', path: '/v1/fits', body: json(fit) },
  { method: 'POST', path: '/v1/checks', body: json(fit) },
  { method: 'POST', path: '/v1/reports', body: json(fit) },
  { method: 'POST', path: '/v1/predictions', body: json({ species: 'HCl', jMax: 5 }) },
  { method: 'POST', path: '/v1/potentials', body: json({ species: 'HCl', vMax: 2, verify: false }) },
  {
    method: 'POST',
    path: '/v1/peaks',
    body: json({ spectrum: { x: [1, 2, 3, 4, 5, 6, 7, 8], y: [0, 0, 0, 1, 0, 0, 0, 0] } }),
  },
  { method: 'POST', path: '/v1/batch/fits', body: { type: 'application/x-ndjson', body: `${JSON.stringify(fit)}\n` } },
  {
    method: 'POST',
    path: '/v1/batch/checks',
    body: { type: 'application/x-ndjson', body: `${JSON.stringify(fit)}\n` },
  },
  { method: 'GET', path: '/v1/species' },
  { method: 'GET', path: '/v1/species/HCl' },
  { method: 'POST', path: '/graphql', body: json({ query: '{ species { formula } }' }) },
  { method: 'GET', path: '/graphql?query=%7B%20species%20%7B%20formula%20%7D%20%7D' },
];

/** The same path spelled four ways; each keeps the route the router matches. */
const SPELLINGS: Record<string, (path: string, port: number) => string> = {
  plain: (p) => p,
  // The first letter of the first segment percent-encoded: /%761/…, /%67raphql.
  'percent-encoded': (p) => `/%${(p.charCodeAt(1) as number).toString(16)}${p.slice(2)}`,
  'doubled slashes': (p) => `/${p.replace(/\//g, '//')}`,
  'absolute form': (p, port) => `http://127.0.0.1:${port}${p}`,
};

const AUTH: Record<string, Record<string, string>> = {
  'no key': {},
  'wrong key': { authorization: `Bearer ${KEY}x` },
  'right key': { authorization: `Bearer ${KEY}` },
};

let app: FastifyInstance;
let port: number;
beforeAll(async () => {
  app = await buildApp({ config: { ...DEFAULT_CONFIG, apiKeys: [KEY] } });
  await app.listen({ host: '127.0.0.1', port: 0 });
  port = (app.server.address() as AddressInfo).port;
});
afterAll(async () => {
  await app.close();
});

function send(method: string, target: string, headers: Record<string, string>, body?: { type: string; body: string }) {
  return new Promise<{ status: number; type: string }>((resolve, reject) => {
    const req = httpRequest(
      {
        host: '127.0.0.1',
        port,
        method,
        path: target,
        headers: {
          ...headers,
          ...(body ? { 'content-type': body.type, 'content-length': Buffer.byteLength(body.body) } : {}),
        },
      },
      (res) => {
        res.resume();
        res.on('end', () => resolve({ status: res.statusCode ?? 0, type: String(res.headers['content-type'] ?? '') }));
      },
    );
    req.on('error', reject);
    req.end(body?.body);
  });
}

describe('API keys hold whatever the spelling of the path', () => {
  it('the route table covers every operation of the served OpenAPI document', async () => {
    const doc = (await app.inject({ method: 'GET', url: '/openapi.json' })).json() as {
      paths: Record<string, Record<string, unknown>>;
    };
    // The probes, metrics and the document are open by design; every /v1 operation must be in the table.
    const served = Object.entries(doc.paths)
      .filter(([p]) => p.startsWith('/v1/'))
      .flatMap(([p, ops]) => Object.keys(ops).map((m) => `${m.toUpperCase()} ${p.replace('{formula}', 'HCl')}`));
    const covered = new Set(ROUTES.map((r) => `${r.method} ${r.path}`));
    for (const op of served) expect(covered, op).toContain(op);
  });

  for (const route of ROUTES) {
    it(`${route.method} ${route.path}`, async () => {
      const plain = await send(route.method, route.path, AUTH['right key'] as Record<string, string>, route.body);
      expect(plain.status, 'the right key on the plain path reaches the handler').toBe(200);
      for (const [spelling, spell] of Object.entries(SPELLINGS)) {
        const target = spell(route.path, port);
        for (const [auth, headers] of Object.entries(AUTH)) {
          const r = await send(route.method, target, headers, route.body);
          const where = `${auth}, ${spelling}: ${route.method} ${target} → ${r.status}`;
          if (auth === 'right key') {
            expect(r.status, where).not.toBe(401);
            // A spelling the router does not match is a 404, never a way around the key.
            expect([200, 404], where).toContain(r.status);
          } else {
            expect([401, 404], where).toContain(r.status);
          }
          if (r.status >= 400) expect(r.type, where).toMatch(/^application\/problem\+json/);
        }
      }
    });
  }
});

import { connect } from 'node:net';
import { describe, expect, it } from 'vitest';
import { useListeningApp } from '../helpers/app.js';

/**
 * Requests Node's HTTP server used to answer by itself, with no problem body: CONNECT (the connection closed with no
 * answer), an Expect other than 100-continue (a bare 417), an HTTP/1.1 request without Host (a bare 400). RFC 9112
 * §3.2 (Host required in HTTP/1.1), RFC 9110 §10.1.1 (Expect, 417), §9.3.6 (CONNECT). Raw sockets, since inject and
 * HTTP clients cannot send these; the app with the defaults of `npm start`.
 */
const { app, port } = useListeningApp();

/** Everything the server sends on one connection until it closes it (or 5 s pass). */
function exchange(text: string): Promise<string> {
  return new Promise((resolve) => {
    const socket = connect(port(), '127.0.0.1');
    let out = '';
    socket.setEncoding('latin1');
    socket.on('data', (d: string) => {
      out += d;
    });
    socket.on('close', () => resolve(out));
    socket.on('error', () => resolve(out));
    socket.setTimeout(5000, () => socket.destroy());
    socket.write(text);
  });
}

interface RawAnswer {
  status: number;
  headers: Record<string, string>;
  body: string;
}

/** Status line, headers and body of one HTTP/1.1 answer (chunked bodies joined). */
function parseAnswer(raw: string): RawAnswer {
  const split = raw.indexOf('\r\n\r\n');
  const [statusLine = '', ...lines] = raw.slice(0, split).split('\r\n');
  const headers = Object.fromEntries(
    lines.map((l) => [l.slice(0, l.indexOf(':')).toLowerCase(), l.slice(l.indexOf(':') + 1).trim()]),
  );
  let body = raw.slice(split + 4);
  if (headers['transfer-encoding'] === 'chunked') {
    let joined = '';
    for (let at = 0; ; ) {
      const eol = body.indexOf('\r\n', at);
      const size = Number.parseInt(body.slice(at, eol), 16);
      if (!(size > 0)) break;
      joined += body.slice(eol + 2, eol + 2 + size);
      at = eol + 2 + size + 2;
    }
    body = joined;
  }
  return { status: Number(statusLine.split(' ')[1]), headers, body };
}

function expectProblem(a: RawAnswer, status: number, code: string): Record<string, unknown> {
  expect(a.status).toBe(status);
  expect(a.headers['content-type']).toMatch(/^application\/problem\+json/);
  const p = JSON.parse(a.body) as Record<string, unknown>;
  expect(p.status).toBe(status);
  expect(p.code).toBe(code);
  expect(p.type).toBe(`/problems/${code.toLowerCase().replaceAll('_', '-')}`);
  expect(String(p.detail).length).toBeGreaterThan(10);
  return p;
}

async function stillServing(): Promise<void> {
  const a = parseAnswer(await exchange('GET /healthz HTTP/1.1\r\nHost: localhost\r\nConnection: close\r\n\r\n'));
  expect(a.status).toBe(200);
  expect(JSON.parse(a.body).status).toBe('ok');
}

describe('answers Node used to give on its own are problems', () => {
  it('CONNECT: 405 problem with Allow, not a silently closed connection', async () => {
    const a = parseAnswer(await exchange('CONNECT example.org:443 HTTP/1.1\r\nHost: example.org:443\r\n\r\n'));
    const p = expectProblem(a, 405, 'METHOD_NOT_ALLOWED');
    expect(String(p.detail)).toMatch(/CONNECT/);
    expect(a.headers.allow).toMatch(/GET/);
    await stillServing();
  });

  it('HTTP/1.1 without Host: 400 problem naming the header; HTTP/1.0 without Host is still served', async () => {
    const a = parseAnswer(await exchange('GET /healthz HTTP/1.1\r\nConnection: close\r\n\r\n'));
    expect(String(expectProblem(a, 400, 'BAD_REQUEST').detail)).toMatch(/Host/);
    const old = parseAnswer(await exchange('GET /healthz HTTP/1.0\r\n\r\n'));
    expect(old.status).toBe(200);
    await stillServing();
  });

  it('Expect other than 100-continue: 417 problem; 100-continue still leads to the route', async () => {
    const a = parseAnswer(
      await exchange('GET /healthz HTTP/1.1\r\nHost: x\r\nExpect: tea\r\nConnection: close\r\n\r\n'),
    );
    expect(String(expectProblem(a, 417, 'EXPECTATION_FAILED').detail)).toMatch(/tea/);
    const body = '{"species":"HCl"}';
    const raw = await exchange(
      `POST /v1/fits HTTP/1.1\r\nHost: x\r\nExpect: 100-continue\r\nContent-Type: application/json\r\nContent-Length: ${body.length}\r\nConnection: close\r\n\r\n${body}`,
    );
    expect(raw.startsWith('HTTP/1.1 100 Continue\r\n\r\n')).toBe(true);
    // The body lacks its lines: the route's own schema check answers, so the request reached it.
    expectProblem(parseAnswer(raw.slice('HTTP/1.1 100 Continue\r\n\r\n'.length)), 400, 'VALIDATION_FAILED');
    await stillServing();
  });

  it('the problem pages describe the new type', async () => {
    const r = await app().inject({ method: 'GET', url: '/problems/expectation-failed' });
    expect(r.statusCode).toBe(200);
    expect(r.body).toMatch(/Expect/);
  });
});

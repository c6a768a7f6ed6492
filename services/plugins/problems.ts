import type { Server } from 'node:http';
import type { Socket } from 'node:net';
import type { FastifyInstance } from 'fastify';
import { HttpProblem, problem, problemType, sendProblem, toProblem } from '../errors.js';

/**
 * Every error as RFC 9457 problem+json: one error handler, a not-found handler that answers 405 with Allow when
 * the path exists under other methods, and the service's own problems (HttpProblem) with their headers.
 * @see https://www.rfc-editor.org/rfc/rfc9457
 */
export function answerWithProblems(app: FastifyInstance): void {
  // Route templates by method, collected as routes are added, for 405 + Allow.
  const routes: { pattern: RegExp; methods: Set<string> }[] = [];
  app.addHook('onRoute', (r) => {
    const source = `^${r.url
      .split('/')
      .map((seg) => (seg.startsWith(':') || seg === '*' ? '[^/]+' : seg.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')))
      .join('/')}/?$`;
    let entry = routes.find((e) => e.pattern.source === source);
    if (!entry) {
      entry = { pattern: new RegExp(source), methods: new Set() };
      routes.push(entry);
    }
    for (const m of Array.isArray(r.method) ? r.method : [r.method]) entry.methods.add(m);
  });
  const allowedMethods = (url: string): string[] => {
    let path = url.split('?')[0] ?? '';
    // The router decodes and accepts an absolute-form target and repeated slashes: so does this lookup.
    path = path.replace(/^[a-z][a-z0-9+.-]*:\/\/[^/]*/i, '').replace(/\/{2,}/g, '/');
    try {
      path = decodeURIComponent(path);
    } catch {
      return [];
    }
    const found = new Set<string>();
    for (const e of routes) if (e.pattern.test(path)) for (const m of e.methods) found.add(m);
    return [...found].sort();
  };

  app.setErrorHandler((error, request, reply) => {
    const p = toProblem(error, request);
    if (error instanceof HttpProblem) for (const [k, v] of Object.entries(error.headers)) reply.header(k, v);
    if (p.status >= 500 && !(error instanceof HttpProblem)) request.log.error({ err: error }, 'request failed');
    else request.log.info({ code: p.code, status: p.status }, 'request refused');
    return sendProblem(reply, p);
  });

  app.setNotFoundHandler((request, reply) => {
    const allow = allowedMethods(request.url);
    if (allow.length > 0 && !allow.includes(request.method)) {
      reply.header('allow', allow.join(', '));
      return sendProblem(
        reply,
        problem(
          'METHOD_NOT_ALLOWED',
          405,
          'Method not allowed',
          `${request.method} is not accepted here; use ${allow.join(', ')}`,
          request,
        ),
      );
    }
    return sendProblem(
      reply,
      problem('NOT_FOUND', 404, 'Not found', `no route ${request.method} ${request.url.split('?')[0]}`, request),
    );
  });
}

/**
 * Errors of the HTTP layer itself, before fastify has a request (a request that is not received in time, headers
 * too large, a malformed request line): answered as problem+json on the socket, then the connection is closed.
 * @see https://fastify.dev/docs/latest/Reference/Server/#clienterrorhandler
 */
export function clientErrorHandler(err: Error & { code?: string }, socket: Socket): void {
  const [status, code, title] =
    err.code === 'ERR_HTTP_REQUEST_TIMEOUT'
      ? [408, 'REQUEST_TIMEOUT', 'Request Timeout']
      : err.code === 'HPE_HEADER_OVERFLOW'
        ? [431, 'HEADERS_TOO_LARGE', 'Request Header Fields Too Large']
        : [400, 'BAD_REQUEST', 'Bad Request'];
  if (err.code === 'ECONNRESET' || !socket.writable) {
    socket.destroy();
    return;
  }
  const detail =
    status === 408 ? 'the request was not received completely within REQUEST_TIMEOUT_MS' : 'the request is malformed';
  socket.end(rawProblem(status, code, title, detail));
}

/** A whole HTTP/1.1 answer holding one problem, for the places Node answers before fastify has a request. */
function rawProblem(status: number, code: string, title: string, detail: string, extra = ''): string {
  const body = JSON.stringify({ type: problemType(code), title, status, detail, code });
  return `HTTP/1.1 ${status} ${title}\r\nContent-Type: application/problem+json\r\nContent-Length: ${Buffer.byteLength(body)}\r\n${extra}Connection: close\r\n\r\n${body}`;
}

/**
 * The requests Node's HTTP server answers on its own, with an empty body, unless told otherwise: CONNECT (the
 * connection was closed with no answer at all), an Expect other than 100-continue (a bare 417) and an HTTP/1.1
 * request without Host (a bare 400; buildApp turns Node's check off and `requireHost` below answers it). Each is a
 * problem+json now, and the connection is closed.
 */
export function answerProtocolEdges(server: Server): void {
  server.on('connect', (_req, socket: Socket) => {
    if (!socket.writable) return socket.destroy();
    socket.end(
      rawProblem(
        405,
        'METHOD_NOT_ALLOWED',
        'Method not allowed',
        'CONNECT is not served: this service is not a proxy',
        'Allow: GET, HEAD, POST\r\n',
      ),
    );
  });
  server.on('checkExpectation', (req, res) => {
    const body = JSON.stringify({
      type: problemType('EXPECTATION_FAILED'),
      title: 'Expectation failed',
      status: 417,
      detail: `Expect "${String(req.headers.expect).slice(0, 100)}" is not supported: only 100-continue is`,
      code: 'EXPECTATION_FAILED',
    });
    res.writeHead(417, { 'content-type': 'application/problem+json', connection: 'close' });
    res.end(body);
  });
}

/** HTTP/1.1 requires a Host header (RFC 9112 §3.2): a request without one is a 400 problem. */
export function requireHost(app: FastifyInstance): void {
  app.addHook('onRequest', async (request, reply) => {
    if (request.raw.httpVersion !== '1.1' || request.headers.host !== undefined) return;
    reply.header('connection', 'close');
    return sendProblem(
      reply,
      problem('BAD_REQUEST', 400, 'Bad request', 'an HTTP/1.1 request must carry a Host header', request),
    );
  });
}

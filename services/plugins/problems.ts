import type { FastifyInstance } from 'fastify';
import { HttpProblem, problem, sendProblem, toProblem } from '../errors.js';

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
export function clientErrorHandler(err: Error & { code?: string }, socket: import('node:net').Socket): void {
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
  const body = JSON.stringify({
    type: `/problems/${code.toLowerCase().replaceAll('_', '-')}`,
    title,
    status,
    detail:
      status === 408 ? 'the request was not received completely within REQUEST_TIMEOUT_MS' : 'the request is malformed',
    code,
  });
  socket.end(
    `HTTP/1.1 ${status} ${title}\r\nContent-Type: application/problem+json\r\nContent-Length: ${Buffer.byteLength(body)}\r\nConnection: close\r\n\r\n${body}`,
  );
}

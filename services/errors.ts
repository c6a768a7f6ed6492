import type { FastifyError, FastifyReply, FastifyRequest } from 'fastify';
import { hasZodFastifySchemaValidationErrors } from 'fastify-type-provider-zod';
import { ScienceError, type ScienceErrorCode } from '../src/errors.js';
import { NonFiniteLiteral, RawBody } from './raw-body.js';
import { acceptedBodiesAdvice, CSV_TYPES, JCAMP_TYPES } from './text-bodies.js';
import { NonFiniteResult } from './usecases/finite.js';

/**
 * One place that turns every failure into RFC 9457 problem details. Science errors map by their stable code;
 * fastify's own errors (bad JSON, media type, size, prototype poisoning) keep their 4xx status; anything else is a
 * 500 whose message is never shown.
 */

export interface Problem {
  type: string;
  title: string;
  status: number;
  detail: string;
  instance?: string;
  code: string;
  errors?: { path: string; message: string }[];
  [extension: string]: unknown;
}

const SCIENCE_STATUS: Record<ScienceErrorCode, { status: number; title: string }> = {
  SPECIES_INVALID: { status: 422, title: 'Species string not understood' },
  SPECIES_UNKNOWN_ELEMENT: { status: 422, title: 'Unknown element' },
  SPECIES_UNKNOWN_ISOTOPE: { status: 422, title: 'Unknown isotope' },
  SPECIES_NOT_DIATOMIC: { status: 422, title: 'Only diatomic species are supported' },
  SPECIES_NOT_IN_LIBRARY: { status: 404, title: 'Species not in the reference library' },
  SPECIES_UNIDENTIFIED: { status: 422, title: 'Species could not be identified' },
  ASSIGNMENT_INVALID: { status: 422, title: 'Impossible assignment' },
  UNIT_INVALID: { status: 400, title: 'Unknown unit' },
  FIT_TOO_FEW_LINES: { status: 422, title: 'Too few lines for the parameters' },
  FIT_RANK_DEFICIENT: { status: 422, title: 'Parameters not determined by the data' },
  FIT_NO_ASSIGNED_LINES: { status: 422, title: 'No assigned lines' },
  NUMBERING_AMBIGUOUS: { status: 422, title: 'Band numbering ambiguous' },
  INPUT_INVALID: { status: 422, title: 'Invalid input value' },
  POTENTIAL_UNDETERMINED: { status: 422, title: 'Constants do not determine a potential' },
  POTENTIAL_LEVELS_NOT_INCREASING: { status: 422, title: 'Vibrational energies stop increasing below vMax' },
  POTENTIAL_CONSTANTS_INVALID: { status: 422, title: 'Constants give no turning points' },
  POTENTIAL_EXTRAPOLATION_TOO_FAR: { status: 422, title: 'vMax far beyond the levels the data reached' },
};

/** Problem type URI of a code: a page on this service describing it. */
export const problemType = (code: string): string => `/problems/${code.toLowerCase().replaceAll('_', '-')}`;

export function scienceProblem(e: ScienceError, instance?: string): Problem {
  const m = SCIENCE_STATUS[e.code];
  return {
    ...e.details,
    type: problemType(e.code),
    title: m.title,
    status: m.status,
    detail: e.message,
    ...(instance ? { instance } : {}),
    code: e.code,
  };
}

export function nonFiniteProblem(e: NonFiniteResult, instance?: string): Problem {
  return {
    type: problemType('RESULT_NOT_FINITE'),
    title: 'A computed quantity is not finite',
    status: 422,
    detail: e.message,
    ...(instance ? { instance } : {}),
    code: 'RESULT_NOT_FINITE',
    quantity: e.quantity,
  };
}

const FASTIFY_CODES: Record<string, { status: number; code: string; title: string }> = {
  FST_ERR_CTP_INVALID_MEDIA_TYPE: { status: 415, code: 'UNSUPPORTED_MEDIA_TYPE', title: 'Unsupported media type' },
  FST_ERR_CTP_BODY_TOO_LARGE: { status: 413, code: 'BODY_TOO_LARGE', title: 'Request body too large' },
  FST_ERR_CTP_EMPTY_JSON_BODY: { status: 400, code: 'BODY_EMPTY', title: 'Empty JSON body' },
  FST_ERR_CTP_INVALID_CONTENT_LENGTH: { status: 400, code: 'BAD_CONTENT_LENGTH', title: 'Invalid content length' },
  FST_ERR_CTP_INVALID_JSON_BODY: { status: 400, code: 'INVALID_JSON', title: 'Body is not valid JSON' },
  FST_ERR_CTP_INVALID_TYPE: { status: 415, code: 'UNSUPPORTED_MEDIA_TYPE', title: 'Unsupported media type' },
  FST_ERR_CTP_INVALID_HEADER: { status: 400, code: 'BAD_REQUEST', title: 'Bad request' },
};

/** Client errors other than 400 that fastify or its plugins raise with a status only. */
const OTHER_CLIENT_ERRORS: Record<number, { code: string; title: string }> = {
  403: { code: 'FORBIDDEN', title: 'Forbidden' },
  404: { code: 'NOT_FOUND', title: 'Not found' },
  405: { code: 'METHOD_NOT_ALLOWED', title: 'Method not allowed' },
  406: { code: 'NOT_ACCEPTABLE', title: 'Not acceptable' },
  411: { code: 'LENGTH_REQUIRED', title: 'Length required' },
  413: { code: 'BODY_TOO_LARGE', title: 'Request body too large' },
  414: { code: 'URI_TOO_LONG', title: 'URI too long' },
  415: { code: 'UNSUPPORTED_MEDIA_TYPE', title: 'Unsupported media type' },
  431: { code: 'HEADERS_TOO_LARGE', title: 'Request Header Fields Too Large' },
};

/**
 * A problem raised by the service itself (rate limit, shedding, admission, deadlines): it travels as an error and
 * is sent as it is.
 */
export class HttpProblem extends Error {
  readonly problem: Problem;
  readonly statusCode: number;
  readonly headers: Readonly<Record<string, string>>;
  constructor(
    code: string,
    status: number,
    title: string,
    detail: string,
    headers: Record<string, string> = {},
    extensions: Record<string, unknown> = {},
  ) {
    super(detail);
    this.problem = { ...extensions, type: problemType(code), title, status, detail, code };
    this.statusCode = status;
    this.headers = headers;
  }
}

/**
 * A 413's detail with the limit that applies: the route's own (`bodyLimit`: SMALL_BODY_LIMIT on /v1/predictions and
 * /graphql, BODY_LIMIT on the work routes), in bytes and by the name of its setting.
 */
function bodyLimitDetail(request: FastifyRequest): string {
  const limit = request.routeOptions?.bodyLimit;
  if (limit === undefined) return 'Request body is too large';
  const mib = limit / (1024 * 1024);
  const shown = mib >= 1 ? `${Number.isInteger(mib) ? mib : mib.toFixed(1)} MiB` : `${limit} bytes`;
  const url = request.routeOptions?.url ?? '';
  const setting = url === '/v1/predictions' || url === '/graphql' ? 'SMALL_BODY_LIMIT' : 'BODY_LIMIT';
  return `the body is larger than ${url || 'this route'} takes: ${shown} (${limit} bytes, ${setting}); send fewer lines or points, or split the list`;
}

/** Longest error detail sent back; details may quote the input, which must not be echoed at length. */
export const MAX_DETAIL_CHARS = 300;
export const truncate = (s: string, max = MAX_DETAIL_CHARS): string =>
  s.length <= max ? s : `${s.slice(0, max - 1)}…`;

/** Request path without the query string, shortened: a problem's `instance`. */
export const instanceOf = (request: FastifyRequest): string => truncate(request.url.split('?')[0] ?? '', 200);

const JSON_UNIT_ADVICE = 'send "unit": "um"';

/**
 * The assignment's hint that positions read like wavelengths in µm ends with the remedy for a JSON line list
 * (`"unit": "um"`); a JSON spectrum, a CSV and a JCAMP-DX body say their unit elsewhere, so the remedy is the one
 * for the body that was sent.
 */
function withUnitAdvice(e: ScienceError, request: FastifyRequest): ScienceError {
  if (e.details.suggestedUnit !== 'um' || !e.message.endsWith(JSON_UNIT_ADVICE)) return e;
  const type =
    String(request.headers['content-type'] ?? '')
      .split(';')[0]
      ?.trim()
      .toLowerCase() ?? '';
  const body = request.body;
  const spectrum =
    body instanceof RawBody ? body.namesSpectrum : typeof body === 'object' && body !== null && 'spectrum' in body;
  const advice = (CSV_TYPES as readonly string[]).includes(type)
    ? `name the unit in the CSV header (${spectrum ? '"wavelength (um),absorbance"' : '"position (um)"'}) or send ?unit=um`
    : (JCAMP_TYPES as readonly string[]).includes(type)
      ? "the file's ##XUNITS should say MICROMETERS"
      : spectrum
        ? 'send "spectrum": {"xUnit": "um", …}'
        : JSON_UNIT_ADVICE;
  return new ScienceError(e.code, `${e.message.slice(0, -JSON_UNIT_ADVICE.length)}${advice}`, { ...e.details });
}

export function toProblem(error: unknown, request: FastifyRequest): Problem {
  const p = toProblemUntruncated(error, request);
  return {
    ...p,
    detail: truncate(p.detail),
    ...(p.errors
      ? { errors: p.errors.slice(0, 50).map((e) => ({ path: truncate(e.path, 100), message: truncate(e.message) })) }
      : {}),
  };
}

/** The 400 of one bad value: what a schema violation gets, naming where the value stands. */
function badValue(path: string, message: string, instance: string): Problem {
  return {
    type: problemType('VALIDATION_FAILED'),
    title: 'Request does not match the schema',
    status: 400,
    detail: `${path}: ${message}`,
    instance,
    code: 'VALIDATION_FAILED',
    errors: [{ path, message }],
  };
}

function toProblemUntruncated(error: unknown, request: FastifyRequest): Problem {
  const instance = instanceOf(request);
  if (error instanceof HttpProblem) return { ...error.problem, instance };
  if (error instanceof NonFiniteLiteral) return badValue(error.field, error.reason, instance);
  // A CSV cell that is not a number where the column wants one is the same kind of bad value as a JSON field (it
  // was a 422 where the JSON body's NaN or 1e400 was a 400); the file's structure (field counts, decimal commas)
  // stays a 422 INPUT_INVALID.
  if (
    error instanceof ScienceError &&
    error.code === 'INPUT_INVALID' &&
    typeof error.details.column === 'string' &&
    typeof error.details.line === 'number'
  )
    return badValue(
      `(${typeof error.details.file === 'string' ? error.details.file : 'CSV'} line ${error.details.line}) ${error.details.column}`,
      `${error.message}: expected a finite number, e.g. 2143.27`,
      instance,
    );
  if (error instanceof ScienceError) return scienceProblem(withUnitAdvice(error, request), instance);
  if (error instanceof NonFiniteResult) return nonFiniteProblem(error, instance);
  if (hasZodFastifySchemaValidationErrors(error)) {
    // A query-string parameter is named as such: `(body)` sent readers of a CSV upload looking in the file.
    const where = (error as { validationContext?: string }).validationContext === 'querystring' ? 'query' : 'body';
    const errors = error.validation.map((v) => ({
      path:
        where === 'query'
          ? `(query string)${v.instancePath ? ` ${v.instancePath.replace(/^\//, '')}` : ''}`
          : (v.instancePath || '/').replace(/^\//, '') || '(body)',
      message: v.message ?? 'invalid',
    }));
    return {
      type: problemType('VALIDATION_FAILED'),
      title: 'Request does not match the schema',
      status: 400,
      detail: errors
        .slice(0, 5)
        .map((e) => `${e.path}: ${e.message}`)
        .join('; '),
      instance,
      code: 'VALIDATION_FAILED',
      errors,
    };
  }
  const fe = error as Partial<FastifyError> & { status?: number };
  const known = fe.code ? FASTIFY_CODES[fe.code] : undefined;
  if (known) {
    const mediaType = fe.code === 'FST_ERR_CTP_INVALID_MEDIA_TYPE';
    return {
      type: problemType(known.code),
      title: known.title,
      status: known.status,
      detail: mediaType
        ? acceptedBodiesAdvice(request.routeOptions?.url, request.headers['content-type'])
        : fe.code === 'FST_ERR_CTP_BODY_TOO_LARGE'
          ? bodyLimitDetail(request)
          : (fe.message ?? known.title),
      instance,
      code: known.code,
    };
  }
  const status = fe.statusCode ?? fe.status;
  if (error instanceof SyntaxError || (typeof status === 'number' && status >= 400 && status < 500)) {
    const s = typeof status === 'number' && status >= 400 && status < 500 ? status : 400;
    const message = fe.message ?? 'bad request';
    // Type, title and code say the status: a 403 (a static path outside the docs) or 414 (a path parameter over its
    // length) was typed /problems/bad-request, titled "Bad request".
    const named = OTHER_CLIENT_ERRORS[s];
    if (named && !/prototype|constructor/i.test(message))
      return {
        type: problemType(named.code),
        title: named.title,
        status: s,
        detail: message,
        instance,
        code: named.code,
      };
    return {
      type: problemType('BAD_REQUEST'),
      title: 'Bad request',
      status: s,
      detail: message,
      instance,
      code: /prototype|constructor/i.test(message) ? 'FORBIDDEN_PROPERTY' : 'BAD_REQUEST',
    };
  }
  return {
    type: problemType('INTERNAL'),
    title: 'Internal error',
    status: 500,
    detail: 'the service failed to handle this request; it has been logged',
    instance,
    code: 'INTERNAL',
  };
}

export function sendProblem(reply: FastifyReply, p: Problem): FastifyReply {
  return reply.status(p.status).type('application/problem+json').send(p);
}

/** A problem answer of the service's own (401, 404, 405, 429, 503 …). */
export function problem(code: string, status: number, title: string, detail: string, request: FastifyRequest): Problem {
  return { type: problemType(code), title, status, detail: truncate(detail), instance: instanceOf(request), code };
}

/** The 415 answer, sent before the body is read: `detail` says what the route takes instead. */
export function sendUnsupportedMediaType(reply: FastifyReply, detail: string, request: FastifyRequest): FastifyReply {
  return sendProblem(reply, problem('UNSUPPORTED_MEDIA_TYPE', 415, 'Unsupported media type', detail, request));
}

/** Human-readable descriptions behind each problem type URI. */
export const PROBLEM_DESCRIPTIONS: Record<string, string> = {
  'validation-failed': 'The body does not match the request schema; `errors` lists each offending path.',
  'invalid-json': 'The body is not valid JSON.',
  'forbidden-property': 'The body holds a "__proto__" or "constructor.prototype" key (prototype poisoning), refused.',
  'unsupported-media-type': 'The Content-Type is not one this endpoint accepts.',
  'body-too-large':
    "The body exceeds the route's limit: SMALL_BODY_LIMIT (1 MiB by default) on /v1/predictions and /graphql, BODY_LIMIT (32 MiB) on the other routes; the detail names the one that applies.",
  'bad-request': 'The request is malformed.',
  forbidden: 'The path is outside what the service serves (e.g. a static path leaving its folder).',
  'not-acceptable': 'None of the media types the Accept header asks for can be produced.',
  'length-required': 'The request needs a Content-Length.',
  'headers-too-large': "The request line and headers together exceed the server's limit.",
  'uri-too-long': 'A path parameter is longer than the router accepts; the route documents the limit.',
  'not-found': 'No such route.',
  'expectation-failed':
    'The request carries an Expect header other than 100-continue, which the service does not meet.',
  'method-not-allowed': 'The route exists, but not with this method; the Allow header lists the methods it takes.',
  unauthorized: 'The route needs an API key: send "Authorization: Bearer <key>".',
  'rate-limited': 'Too many requests from this client (API key, or address without a key) in the time window.',
  overloaded: 'The service is shedding load (event-loop delay, memory or a full work queue); retry after Retry-After.',
  'deadline-exceeded': 'The work took longer than the processing deadline (PROCESSING_DEADLINE_MS) and was stopped.',
  'request-timeout': 'The request was not received completely within the time allowed.',
  'result-not-finite':
    'The input is accepted, but a computed quantity came out infinite or undefined; the problem names it.',
  'graphql-refused': 'The GraphQL request is refused before it runs (batching, size, aliases or cost).',
  internal: 'An unexpected failure on the server side.',
  ...Object.fromEntries(
    Object.entries(SCIENCE_STATUS).map(([code, m]) => [code.toLowerCase().replaceAll('_', '-'), m.title]),
  ),
};

import { CSV_COLUMN_NAMES } from '../../src/spectra/csv.js';
import { CSV_TYPES, JCAMP_TYPES } from '../text-bodies.js';
import {
  checkExample,
  co2FitExample,
  csvExample,
  csvSpectrumExample,
  fitExample,
  jcampExample,
  jcampSpectrumExample,
  ndjsonExample,
  peaksExample,
  predictionExample,
  unassignedExample,
} from './examples.js';

/**
 * The last step of the OpenAPI document: what the zod-generated part cannot say by itself. Request bodies point at
 * the input form of their schemas (fields with defaults are optional there); JCAMP-DX, CSV and NDJSON bodies are
 * declared; the bearer scheme and the 401/404/405/429/503 answers of the protections are declared; the probes and
 * metrics are listed; examples are attached; components no operation reaches are dropped, and an `…Input` schema
 * identical to its output form is merged into it.
 */

type Obj = { [key: string]: unknown };
const isObj = (x: unknown): x is Obj => typeof x === 'object' && x !== null && !Array.isArray(x);
const obj = (x: unknown): Obj => (isObj(x) ? x : {});

const REF = '#/components/schemas/';
const NDJSON = 'application/x-ndjson';
const PROBLEM = { $ref: `${REF}Problem` };
const problemResponse = (description: string) => ({
  description,
  content: { 'application/problem+json': { schema: PROBLEM } },
});

/** Answers of the protections, shared by every work route. */
const SHARED_RESPONSES = {
  Unauthorized: {
    ...problemResponse('API keys are configured and the request carries no valid "Authorization: Bearer <key>"'),
    headers: { 'WWW-Authenticate': { schema: { type: 'string' }, description: 'Bearer realm="branchwise"' } },
  },
  NotFound: problemResponse('no such route, or the species is not in the reference library'),
  MethodNotAllowed: {
    ...problemResponse('the path exists but not with this method'),
    headers: { Allow: { schema: { type: 'string' }, description: 'the methods this path accepts' } },
  },
  TooManyRequests: {
    ...problemResponse('more requests a minute than the rate limit allows (per API key, or per address)'),
    headers: { 'Retry-After': { schema: { type: 'integer' }, description: 'seconds to wait' } },
  },
  Overloaded: {
    ...problemResponse('the service is shedding load; retry after the given time'),
    headers: { 'Retry-After': { schema: { type: 'integer' }, description: 'seconds to wait' } },
  },
} as const;
const SHARED_CODES: Record<string, keyof typeof SHARED_RESPONSES> = {
  401: 'Unauthorized',
  404: 'NotFound',
  405: 'MethodNotAllowed',
  429: 'TooManyRequests',
  503: 'Overloaded',
};

const text = (description: string, example: string) => ({ schema: { type: 'string', description }, example });
const jcampBody = text(
  'a JCAMP-DX 4.24 or 5 file: XYDATA (AFFN, PAC, SQZ, DIF, DUP), XYPOINTS or PEAK TABLE; species and temperature go in the query string',
  jcampExample,
);
const synonyms = (['position', 'uncertainty', 'intensity', 'band', 'branch', 'j', 'source', 'id'] as const)
  .map((c) => `${c} (${CSV_COLUMN_NAMES[c].slice(1).join(', ') || 'no synonym'})`)
  .join('; ');
const csvBody = text(
  `a CSV line list read by header name, in any order, with the accepted synonyms in parentheses: ${synonyms}. A unit may follow a name ("position (MHz)") or stand in a row of units under the header; band, branch and j together give the assignment; source names the instrument a line came from. A name one or two typing slips from a known one is refused naming the column meant; other columns are not read. Separators ",", ";", tab or spaces; with ";" or tab, decimal commas. Or a two-column spectrum whose header names absorbance or transmittance.`,
  csvExample,
);

/** Text bodies accepted besides JSON, and JSON examples, by operationId. */
const BODIES: Record<string, { json?: Record<string, unknown>; text?: Record<string, unknown> }> = {
  fitLines: {
    json: {
      assigned: { summary: 'assigned CO 1-0 lines', value: fitExample },
      unassigned: { summary: 'the same lines, assigned by the service', value: unassignedExample },
      co2: { summary: 'assigned CO2 ν3 lines (linear polyatomic: upper and lower levels)', value: co2FitExample },
    },
    text: {
      ...Object.fromEntries(JCAMP_TYPES.map((t) => [t, jcampBody])),
      ...Object.fromEntries(CSV_TYPES.map((t) => [t, csvBody])),
    },
  },
  checkLines: {
    json: { check: { summary: 'unassigned CO lines with one tolerance changed', value: checkExample } },
    text: {
      ...Object.fromEntries(JCAMP_TYPES.map((t) => [t, jcampBody])),
      ...Object.fromEntries(CSV_TYPES.map((t) => [t, csvBody])),
    },
  },
  renderReport: {
    json: { check: { summary: 'unassigned CO lines', value: checkExample } },
    text: {
      ...Object.fromEntries(JCAMP_TYPES.map((t) => [t, jcampBody])),
      ...Object.fromEntries(CSV_TYPES.map((t) => [t, csvBody])),
    },
  },
  findPeaks: {
    json: { line: { summary: 'one absorption line', value: peaksExample } },
    text: {
      ...Object.fromEntries(
        JCAMP_TYPES.map((t) => [t, text('a JCAMP-DX spectrum (XYDATA or XYPOINTS)', jcampSpectrumExample)]),
      ),
      ...Object.fromEntries(
        CSV_TYPES.map((t) => [
          t,
          text(
            'a two-column CSV spectrum, x and y, with a header naming absorbance or transmittance',
            csvSpectrumExample,
          ),
        ]),
      ),
    },
  },
  predictLines: { json: { hcl: { summary: 'H35Cl fundamental up to J = 5', value: predictionExample } } },
  fitBatch: { text: { [NDJSON]: text('one /v1/fits request body a line', ndjsonExample) } },
  checkBatch: { text: { [NDJSON]: text('one /v1/checks request body a line', ndjsonExample) } },
};

/** Operations that answer CSV when the Accept header prefers text/csv. */
const CSV_RESULTS: Record<string, string> = {
  fitLines:
    'with Accept: text/csv, the per-line table (?table=lines, the default: index, id, species, band, branch, j, position (cm-1), uncertainty (cm-1), intensity, calculated (cm-1), residual (cm-1), studentised residual, status, assignment source, reason) or the constants table (?table=constants: group, species, band or level, name, value, uncertainty, unit, display)',
  checkLines:
    'with Accept: text/csv, the per-line table of the fit (?table=lines, the default), its constants (?table=constants) or the checks (?table=checks: check, status, message, measured, limit)',
};

/** Examples of the query parameters that go with JCAMP-DX and CSV bodies. */
const QUERY_EXAMPLES: Record<string, string> = { species: '12C16O', temperature: '296' };

/** Operations that can answer 404 besides an unknown route (species not in the reference library). */
const CAN_BE_NOT_FOUND = new Set(['getSpecies', 'predictLines']);

/** Probes, metrics and the document: open (no key, no rate limit). */
const OPEN_PATHS = {
  '/healthz': {
    get: {
      operationId: 'health',
      tags: ['operations'],
      summary: 'Liveness probe',
      description: 'Answers 200 as long as the process serves requests, also under load.',
      security: [],
      responses: {
        200: {
          description: 'alive',
          content: {
            'application/json': {
              schema: { type: 'object', properties: { status: { const: 'ok' } }, required: ['status'] },
              example: { status: 'ok' },
            },
          },
        },
      },
    },
  },
  '/readyz': {
    get: {
      operationId: 'readiness',
      tags: ['operations'],
      summary: 'Readiness probe',
      description: 'Answers 503 once shutdown has begun, so that load balancers stop sending work.',
      security: [],
      responses: {
        200: {
          description: 'ready for work',
          content: {
            'application/json': {
              schema: { type: 'object', properties: { status: { const: 'ready' } }, required: ['status'] },
              example: { status: 'ready' },
            },
          },
        },
        503: {
          description: 'shutting down',
          content: {
            'application/json': {
              schema: { type: 'object', properties: { status: { type: 'string' } }, required: ['status'] },
              example: { status: 'shutting down' },
            },
          },
        },
      },
    },
  },
  '/metrics': {
    get: {
      operationId: 'metrics',
      tags: ['operations'],
      summary: 'Prometheus metrics',
      description: 'Request durations by route template, fit durations and sizes, verdicts, process metrics.',
      security: [],
      responses: {
        200: {
          description: 'Prometheus text exposition format 0.0.4',
          content: { 'text/plain': { schema: { type: 'string' }, example: '# HELP process_cpu_seconds_total …\n' } },
        },
      },
    },
  },
  '/openapi.json': {
    get: {
      operationId: 'openapiDocument',
      tags: ['operations'],
      summary: 'This document',
      security: [],
      responses: {
        200: {
          description: 'the OpenAPI 3.1 document',
          content: { 'application/json': { schema: { type: 'object' } } },
        },
      },
    },
  },
};

/** Every `$ref` target (schema component name) under a node. */
function refsUnder(node: unknown, out: Set<string>): Set<string> {
  if (Array.isArray(node)) for (const x of node) refsUnder(x, out);
  else if (isObj(node)) {
    for (const [k, v] of Object.entries(node)) {
      if (k === '$ref' && typeof v === 'string' && v.startsWith(REF)) out.add(v.slice(REF.length));
      else refsUnder(v, out);
    }
  }
  return out;
}

/** A copy of a node with schema references renamed. */
function renameRefs(node: unknown, rename: (name: string) => string): unknown {
  if (Array.isArray(node)) return node.map((x) => renameRefs(x, rename));
  if (!isObj(node)) return node;
  return Object.fromEntries(
    Object.entries(node).map(([k, v]) =>
      k === '$ref' && typeof v === 'string' && v.startsWith(REF)
        ? [k, REF + rename(v.slice(REF.length))]
        : [k, renameRefs(v, rename)],
    ),
  );
}

/** Schemas reachable from the paths, following references between schemas. */
function reachable(paths: unknown, schemas: Obj): Set<string> {
  const seen = new Set<string>();
  const todo = [...refsUnder(paths, new Set())];
  while (todo.length > 0) {
    const n = todo.pop() as string;
    if (seen.has(n) || !(n in schemas)) continue;
    seen.add(n);
    todo.push(...refsUnder(schemas[n], new Set()));
  }
  return seen;
}

const INPUT = 'Input';
const stripInput = (n: string) => (n.endsWith(INPUT) ? n.slice(0, -INPUT.length) : n);

/**
 * Merge each `XInput` into `X` where both say the same (their references compared without the suffix), and call
 * a lone `XInput` plain `X`. Repeated until nothing changes, because merging a leaf makes its parents equal.
 */
function mergeInputForms(doc: Obj): void {
  const components = obj(doc.components);
  for (let round = 0; round < 20; round++) {
    const schemas = obj(components.schemas);
    const merged = new Map<string, string>();
    for (const name of Object.keys(schemas)) {
      if (!name.endsWith(INPUT)) continue;
      const plain = stripInput(name);
      if (!(plain in schemas)) {
        merged.set(name, plain);
        continue;
      }
      const a = JSON.stringify(renameRefs(schemas[name], stripInput));
      const b = JSON.stringify(renameRefs(schemas[plain], stripInput));
      if (a === b) merged.set(name, plain);
    }
    if (merged.size === 0) return;
    const rename = (n: string) => merged.get(n) ?? n;
    const next: Obj = {};
    for (const [name, s] of Object.entries(schemas)) {
      const target = rename(name);
      if (target !== name && target in schemas) continue; // merged into the plain form, which is kept
      next[target] = renameRefs(s, rename);
    }
    components.schemas = next;
    doc.paths = renameRefs(doc.paths, rename);
  }
}

/** Sorted so that the committed document diffs cleanly. */
const sortKeys = (o: Obj): Obj => Object.fromEntries(Object.entries(o).sort(([a], [b]) => a.localeCompare(b)));

export function finishDocument<T>(generated: T, version: string): T {
  const doc = structuredClone(generated) as Obj;
  doc.info = { ...obj(doc.info), version };
  const components = obj(doc.components);
  doc.components = components;
  const schemas = obj(components.schemas);

  for (const [path, item] of Object.entries(obj(doc.paths))) {
    for (const op of Object.values(obj(item)).filter(isObj)) {
      const id = String(op.operationId ?? '');
      const extra = BODIES[id];
      const body = obj(op.requestBody);
      const content = obj(body.content);
      const json = obj(content['application/json']);
      // Request bodies describe what may be sent: the input form of a schema (defaults make fields optional).
      const ref = obj(json.schema).$ref;
      if (typeof ref === 'string' && `${ref.slice(REF.length)}${INPUT}` in schemas) {
        json.schema = { $ref: `${ref}${INPUT}` };
      }
      if (extra?.json) json.examples = extra.json;
      for (const param of Array.isArray(op.parameters) ? op.parameters.filter(isObj) : []) {
        const example = QUERY_EXAMPLES[String(param.name)];
        if (param.in === 'query' && example !== undefined) param.example = example;
      }
      if (extra?.text) op.requestBody = { ...body, required: true, content: { ...content, ...extra.text } };
      const csvResult = CSV_RESULTS[id];
      const ok = obj(obj(op.responses)['200']);
      if (csvResult && isObj(ok.content)) {
        ok.content['text/csv'] = { schema: { type: 'string', description: csvResult } };
        ok.description = 'the result: JSON, or CSV when Accept prefers text/csv';
        // The CSV table has no room for the notice and warnings a JSON answer carries: they travel as headers.
        ok.headers = {
          'Branchwise-Notice': {
            description: 'CSV answers only: the safety notice of the JSON answer (`notice`)',
            schema: { type: 'string' },
          },
          'Branchwise-Warnings': {
            description:
              'CSV answers only: the distinct codes of the fit\'s warnings, comma-separated, or "none"; ?comments=true also writes each warning with its message as a "# warning CODE: message" line above the table',
            schema: { type: 'string' },
          },
        };
      }
      if (path.startsWith('/v1/')) {
        op.security = [{ bearerAuth: [] }, {}];
        const responses = obj(op.responses);
        for (const [code, name] of Object.entries(SHARED_CODES)) {
          if (code === '404' && !CAN_BE_NOT_FOUND.has(id)) continue;
          if (responses[code] === undefined || code === '404')
            responses[code] = { $ref: `#/components/responses/${name}` };
        }
        for (const [code, r] of Object.entries(responses)) {
          if (isObj(r) && r.description === 'Default Response')
            r.description = code === '200' ? 'the result' : 'see the problem';
        }
        op.responses = sortKeys(responses);
      }
    }
  }

  const open = structuredClone(OPEN_PATHS) as Record<string, { get: { responses: Obj } }>;
  for (const item of Object.values(open)) item.get.responses[405] = { $ref: '#/components/responses/MethodNotAllowed' };
  doc.paths = { ...obj(doc.paths), ...open };
  components.responses = { ...obj(components.responses), ...SHARED_RESPONSES };
  components.securitySchemes = {
    ...obj(components.securitySchemes),
    bearerAuth: {
      type: 'http',
      scheme: 'bearer',
      description:
        'Required on /v1/ and /graphql only when the service is started with API keys (API_KEYS or API_KEYS_FILE); otherwise every route is open.',
    },
  };
  doc.tags = [
    ...(Array.isArray(doc.tags) ? doc.tags : []),
    { name: 'operations', description: 'Probes, metrics and this document' },
  ];

  // Drop what no operation reaches (response schemas' input forms), then merge identical input forms.
  const keep = reachable({ paths: doc.paths, responses: components.responses }, schemas);
  components.schemas = Object.fromEntries(Object.entries(schemas).filter(([n]) => keep.has(n)));
  mergeInputForms(doc);
  components.schemas = sortKeys(obj(components.schemas));
  return doc as T;
}

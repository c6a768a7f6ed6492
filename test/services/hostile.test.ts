import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * Hostile bodies that used to crash or freeze the process, as regression cases. The app runs with the defaults of
 * `npm start`. Each one must get a 4xx problem+json (or an in-band problem for NDJSON), and the service must still
 * answer /healthz afterwards.
 */
const app = useApp();

const jcamp = (labels: Record<string, string>, data: string[]) =>
  [
    '##TITLE=hostile',
    '##JCAMP-DX=4.24',
    '##DATA TYPE=INFRARED SPECTRUM',
    ...Object.entries(labels).map(([k, v]) => `##${k}=${v}`),
    '##XYDATA=(X++(Y..Y))',
    ...data,
    '##END=',
  ].join('\n');

async function post(url: string, type: string, payload: string | Readable) {
  return app().inject({ method: 'POST', url, payload, headers: { 'content-type': type } });
}

async function expectRefused(r: { statusCode: number; headers: Record<string, unknown>; body: string }) {
  expect(r.statusCode, r.body.slice(0, 300)).toBeGreaterThanOrEqual(400);
  expect(r.statusCode, r.body.slice(0, 300)).toBeLessThan(500);
  expect(String(r.headers['content-type'])).toMatch(/^application\/problem\+json/);
  expect((await app().inject({ method: 'GET', url: '/healthz' })).statusCode).toBe(200);
}

describe('hostile bodies are refused, not expanded', () => {
  it('a JCAMP-DX DUP count of 920 000 000 in a 200-byte body is refused before anything is repeated', async () => {
    const body = jcamp(
      { XUNITS: '1/CM', YUNITS: 'ABSORBANCE', FIRSTX: '2000', LASTX: '3000', NPOINTS: '8', XFACTOR: '1', YFACTOR: '1' },
      ['2000 A s20000000'],
    );
    expect(Buffer.byteLength(body)).toBeLessThan(260);
    const r = await post('/v1/peaks', 'chemical/x-jcamp-dx', body);
    await expectRefused(r);
    expect(r.json().detail).toMatch(/DUP count 920000000/);
  });

  it('a DUP count within ##NPOINTS but ##NPOINTS beyond the limit is refused at the label', async () => {
    for (const n of ['10000000000', '20000000']) {
      const body = jcamp({ XUNITS: '1/CM', YUNITS: 'ABSORBANCE', FIRSTX: '2000', LASTX: '3000', NPOINTS: n }, [
        '2000 A s20000000',
      ]);
      const r = await post('/v1/fits?species=HCl', 'chemical/x-jcamp-dx', body);
      await expectRefused(r);
      expect(r.json().detail).toMatch(/NPOINTS/);
    }
  });

  it('a JCAMP-DX peak table of more peaks than MAX_LINES stops at the first peak too many', async () => {
    const rows = Array.from({ length: 150_000 }, (_, i) => `${(2000 + i * 0.001).toFixed(3)}, 0.5`);
    const body = [
      '##TITLE=many peaks',
      '##JCAMP-DX=4.24',
      '##XUNITS=1/CM',
      '##YUNITS=ABSORBANCE',
      '##PEAK TABLE=(XY..XY)',
      ...rows,
      '##END=',
    ].join('\n');
    const r = await post('/v1/fits?species=HCl', 'chemical/x-jcamp-dx', body);
    await expectRefused(r);
    expect(r.json().detail).toMatch(/more than 100000 peaks/);
  });

  it('a CSV line list of 10^6 rows stops at the first row beyond MAX_LINES', async () => {
    const rows = ['position,intensity', ...Array.from({ length: 1_000_000 }, (_, i) => `${2000 + i * 1e-4},1`)];
    const r = await post('/v1/fits?species=HCl', 'text/csv', rows.join('\n'));
    await expectRefused(r);
    expect(r.json().detail).toMatch(/line 100002: more than 100000 rows/);
  });

  it('an NDJSON line longer than BODY_LIMIT is answered in-band without being buffered; the batch goes on', async () => {
    const MiB = 1024 * 1024;
    const chunk = Buffer.alloc(MiB, 0x20);
    const good = JSON.stringify(assignedFitBody('HCl', ['1-0'], 6, 0.002, 9));
    // 40 MiB without a newline (over the 32 MiB default), then a good request.
    let sent = 0;
    const stream = new Readable({
      read() {
        if (sent < 40) {
          sent++;
          this.push(sent === 1 ? Buffer.concat([Buffer.from('{"species":"HCl","lines":['), chunk]) : chunk);
        } else if (sent === 40) {
          sent++;
          this.push(`\n${good}\n`);
        } else this.push(null);
      },
    });
    const r = await post('/v1/batch/fits', 'application/x-ndjson', stream);
    expect(r.statusCode).toBe(200);
    const out = r.body
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as { index: number; status: number; problem?: { code: string } });
    expect(out.map((o) => [o.index, o.status])).toEqual([
      [0, 413],
      [1, 200],
    ]);
    expect(out[0]?.problem?.code).toBe('BODY_TOO_LARGE');
  });
});

describe('input the schema accepts never gets a 500', () => {
  it('predictions to jMax 200 stop each branch where the term values stop rising; every number is finite', async () => {
    for (const temperature of [10, 296, 6000]) {
      const r = await app().inject({
        method: 'POST',
        url: '/v1/predictions',
        payload: { species: 'HCl', jMax: 200, temperature },
      });
      expect(r.statusCode, r.body.slice(0, 200)).toBe(200);
      const lines = r.json().lines as { branch: string; j: number; lowerEnergy: number; relativeIntensity: number }[];
      expect(lines.length).toBeGreaterThan(60);
      for (const l of lines) {
        expect(Number.isFinite(l.relativeIntensity)).toBe(true);
        expect(l.relativeIntensity).toBeGreaterThanOrEqual(0);
        expect(l.relativeIntensity).toBeLessThanOrEqual(1);
      }
      // Within a branch the lower-state energy rises with J (the series is cut before it turns over).
      for (const b of ['P', 'R']) {
        const e = lines.filter((l) => l.branch === b).map((l) => l.lowerEnergy);
        for (let i = 1; i < e.length; i++) expect(e[i] as number).toBeGreaterThan(e[i - 1] as number);
      }
    }
  });

  it('GraphQL predict to jMax 200 answers data, not "cannot represent NaN"', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: '{ predict(input: {species: "HCl", jMax: 200}) { lines { j relativeIntensity } } }' },
    });
    expect(r.statusCode).toBe(200);
    expect(r.json().errors).toBeUndefined();
    expect(r.json().data.predict.lines.length).toBeGreaterThan(60);
  });

  it.each([
    ['a position of 1e308', '/v1/fits', { species: 'HCl', lines: [{ position: 1e308 }, { position: 2906 }] }],
    [
      'a position of 5e-324 µm (infinite in cm⁻¹)',
      '/v1/fits',
      { species: 'HCl', unit: 'um', lines: [{ position: 5e-324 }, { position: 3.44 }] },
    ],
    [
      'a spectrum with one y of 1e300',
      '/v1/peaks',
      { spectrum: { x: [1, 2, 3, 4, 5, 6, 7, 8, 9, 10], y: [0, 0, 0, 1e300, 0, 0, 0, 0, 0, 0] } },
    ],
    [
      'a spectrum at the magnitude limit',
      '/v1/peaks',
      { spectrum: { x: [1, 2, 3, 4, 5, 6, 7, 8, 9, 10], y: [0, 0, 0, 1e12, -1e12, 1e12, 0, 0, 0, 0] } },
    ],
  ])('%s: a 4xx or a finite 200, never a 5xx', async (_name, url, payload) => {
    const r = await app().inject({ method: 'POST', url, payload });
    expect(r.statusCode, r.body.slice(0, 300)).toBeLessThan(500);
    if (r.statusCode >= 400) expect(String(r.headers['content-type'])).toMatch(/problem\+json/);
    else expect(r.body).not.toMatch(/NaN|Infinity/);
  });

  it('/v1/batch/* without the NDJSON content type is a 415 before any body is read', async () => {
    for (const [type, payload] of [
      ['application/json', '{"species":"HCl","lines":[]}'],
      ['text/plain', 'x'],
      ['text/csv', 'position\n2906'],
    ] as const) {
      const r = await post('/v1/batch/fits', type, payload);
      expect(r.statusCode).toBe(415);
      expect(r.json().code).toBe('UNSUPPORTED_MEDIA_TYPE');
    }
  });
});

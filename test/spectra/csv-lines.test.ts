import { describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { loadConfig } from '../../services/config.js';
import { fitExample } from '../../services/openapi/examples.js';
import { ScienceError } from '../../src/errors.js';
import { type CsvData, parseCsv } from '../../src/spectra/csv.js';

/** Line lists as lab software exports them: columns by name in any order, synonyms, European CSV, units rows. */
const lines = (d: CsvData) => {
  if (d.kind !== 'lines') throw new Error(`read as ${d.kind}`);
  return d;
};

describe('CSV line lists read by header name', () => {
  it('"position,uncertainty": the second column is the uncertainty, not an intensity', () => {
    const d = lines(parseCsv('position,uncertainty\n2143.2712,0.0021\n2147.0807,0.0019\n'));
    expect(d.lines).toEqual([
      { position: 2143.2712, uncertainty: 0.0021 },
      { position: 2147.0807, uncertainty: 0.0019 },
    ]);
  });

  it('columns in any order, with the assignment from band, branch and j', () => {
    const d = lines(
      parseCsv(
        'j,branch,band,intensity,uncertainty,position\n3,R,1-0,0.41,0.002,2158.2982\n4,p,1-0,,0.003,2127.6854\n',
      ),
    );
    expect(d.lines).toEqual([
      { position: 2158.2982, uncertainty: 0.002, intensity: 0.41, assignment: { band: '1-0', branch: 'R', j: 3 } },
      { position: 2127.6854, uncertainty: 0.003, assignment: { band: '1-0', branch: 'P', j: 4 } },
    ]);
  });

  it('documented synonyms and a unit in the header ("Peak (MHz)", "Sigma", "Strength", "J\'\'")', () => {
    const d = lines(parseCsv("Peak (MHz),Sigma,Strength,Band,Branch,J''\n115271.2018,0.0005,1.0,0-0,R,0\n"));
    expect(d.unit).toBe('MHz');
    expect(d.lines[0]).toEqual({
      position: 115271.2018,
      uncertainty: 0.0005,
      intensity: 1,
      assignment: { band: '0-0', branch: 'R', j: 0 },
    });
  });

  it('decimal commas with ";" separators, a units row and trailing delimiters (a spreadsheet export)', () => {
    const text =
      '"Position";"Unc.";"Int.";\r\n"cm-1";"cm-1";"";\r\n2143,2712;0,0020;0,51;\r\n2147,0807;0,0020;0,44;\r\n';
    const d = lines(parseCsv(text));
    expect(d.unit).toBe('cm-1');
    expect(d.lines).toEqual([
      { position: 2143.2712, uncertainty: 0.002, intensity: 0.51 },
      { position: 2147.0807, uncertainty: 0.002, intensity: 0.44 },
    ]);
  });

  it('a trailing comma on every row of a comma-separated file', () => {
    const d = lines(parseCsv('position,uncertainty,\n2143.27,0.002,\n2147.08,0.002,\n'));
    expect(d.lines[1]).toEqual({ position: 2147.08, uncertainty: 0.002 });
  });

  it('tab-separated with decimal commas', () => {
    const d = lines(parseCsv('position\tuncertainty\n2143,27\t0,002\n'));
    expect(d.lines[0]).toEqual({ position: 2143.27, uncertainty: 0.002 });
  });

  it('without a header the columns stay position, intensity, uncertainty', () => {
    const d = lines(parseCsv('2143.27;0.5;0.002\n2147.08;0.4;0.002\n'));
    expect(d.lines[0]).toEqual({ position: 2143.27, intensity: 0.5, uncertainty: 0.002 });
  });

  it.each([
    ['position,uncertainty\nfurlongs,\n2143.27,0.002\n', /furlongs/],
    ['position,band,branch\n2143.27,1-0,R\n', /band, branch and j/],
    ['position,band,branch,j\n2143.27,1-0,X,3\n', /CSV line 2: branch "X"/],
    ['position,band,branch,j\n2143.27,1-0,R,3\n2147.08,1-0,R,three\n', /CSV line 3: j "three"/],
    ['position,uncertainty\n2143.27,0.002\n2147.08,small\n', /CSV line 3: uncertainty "small"/],
    ['uncertainty,intensity\n0.002,1\n', /no position column/],
  ])('refuses %j clearly', (text, message) => {
    expect(() => parseCsv(text)).toThrow(ScienceError);
    expect(() => parseCsv(text)).toThrow(message);
  });
});

describe('CSV bodies through the service (npm start defaults)', () => {
  it('a CSV with columns in another order fits to the same constants as the JSON body', async () => {
    const app = await buildApp({ config: { ...loadConfig({}), workers: 0 } });
    try {
      const csv = `branch;j;band;uncertainty;position;\n${fitExample.lines
        .map(
          (l) =>
            `${l.assignment.branch};${l.assignment.j};${l.assignment.band};0,002;${String(l.position).replace('.', ',')};`,
        )
        .join('\n')}\n`;
      const viaCsv = await app.inject({
        method: 'POST',
        url: '/v1/fits?species=12C16O',
        headers: { 'content-type': 'text/csv' },
        payload: csv,
      });
      expect(viaCsv.statusCode, viaCsv.body).toBe(200);
      const viaJson = await app.inject({ method: 'POST', url: '/v1/fits', payload: fitExample });
      const origin = (r: typeof viaJson) => r.json().bands[0].origin;
      expect(origin(viaCsv).value).toBe(origin(viaJson).value);
      expect(origin(viaCsv).uncertainty).toBe(origin(viaJson).uncertainty);
      expect(viaCsv.json().lines.map((l: { assignment: { source: string } }) => l.assignment.source)).toEqual(
        fitExample.lines.map(() => 'given'),
      );
    } finally {
      await app.close();
    }
  });
});

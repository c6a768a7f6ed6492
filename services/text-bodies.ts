import { ScienceError } from '../src/errors.js';
import { parseCsv } from '../src/spectra/csv.js';
import { parseJcamp } from '../src/spectra/jcamp.js';
import type { PositionUnit } from '../src/units.js';
import { PositionUnitSchema } from './schemas/fit.js';
import { queryTemperature } from './schemas/query.js';

/** Media types of spectra and line lists accepted besides JSON. */
export const JCAMP_TYPES = ['chemical/x-jcamp-dx', 'chemical/x-jcamp'] as const;
export const CSV_TYPES = ['text/csv'] as const;

/** Routes that take a JCAMP-DX or CSV body besides JSON (the others take JSON only; the batch routes NDJSON). */
export const TEXT_BODY_ROUTES: readonly string[] = ['/v1/fits', '/v1/checks', '/v1/reports', '/v1/peaks'];

/**
 * What to send instead, for a body of a media type the route does not take: the types it accepts, and for text
 * bodies where the species goes.
 */
export function acceptedBodiesAdvice(route: string | undefined, contentType: string | undefined): string {
  const sent = contentType
    ? `content-type "${contentType.split(';')[0]?.trim().slice(0, 80)}"`
    : 'a body without a content-type';
  const where = route ? ` on ${route}` : '';
  if (route !== undefined && TEXT_BODY_ROUTES.includes(route))
    return `${sent} is not accepted${where}; send application/json, or a file as text/csv or ${JCAMP_TYPES[0]} with the species in the query string (?species=CO)`;
  return `${sent} is not accepted${where}; send application/json`;
}

function xUnitOf(units: string): 'cm-1' | 'um' | 'nm' {
  const u = units.toUpperCase().replace(/\s/g, '');
  if (u === '1/CM' || u === 'CM-1' || u === 'CM^-1' || u === 'WAVENUMBERS') return 'cm-1';
  if (u === 'MICROMETERS' || u === 'UM' || u === 'MICRONS') return 'um';
  if (u === 'NANOMETERS' || u === 'NM') return 'nm';
  throw new ScienceError('UNIT_INVALID', `##XUNITS=${units} is not supported (1/CM, MICROMETERS or NANOMETERS)`, {
    xUnits: units,
  });
}

function yUnitOf(units: string): 'absorbance' | 'transmittance' {
  const u = units.toUpperCase();
  if (u.includes('TRANSMIT')) return 'transmittance';
  if (u.includes('ABSORB')) return 'absorbance';
  throw new ScienceError('UNIT_INVALID', `##YUNITS=${units} is not supported (ABSORBANCE or TRANSMITTANCE)`, {
    yUnits: units,
  });
}

/** `?unit=` of a CSV or JCAMP-DX body, in any spelling the JSON `unit` takes. */
function queryUnitOf(query: Record<string, unknown>): PositionUnit | undefined {
  if (query.unit === undefined || query.unit === '') return undefined;
  const u = PositionUnitSchema.safeParse(query.unit);
  if (!u.success)
    throw new ScienceError(
      'UNIT_INVALID',
      `unit=${String(query.unit).slice(0, 20)} is not one of cm-1, MHz, GHz, THz, um, nm`,
      {
        unit: String(query.unit).slice(0, 20),
      },
    );
  return u.data;
}

/** The unit the file names, else the query's; both, and different, is a contradiction to refuse. */
function agreedUnit<U extends string>(
  inFile: U | undefined,
  inQuery: PositionUnit | undefined,
  where: string,
): U | PositionUnit | undefined {
  if (inFile !== undefined && inQuery !== undefined && inFile !== inQuery)
    throw new ScienceError(
      'INPUT_INVALID',
      `${where} names the unit ${inFile}, the query unit=${inQuery}; send one or make them agree`,
      {
        fileUnit: inFile,
        queryUnit: inQuery,
      },
    );
  return inFile ?? inQuery;
}

/** A spectrum's x is a wavenumber or a vacuum wavelength; frequencies are for line lists. */
function spectrumUnit(u: PositionUnit | undefined): 'cm-1' | 'um' | 'nm' | undefined {
  if (u === undefined || u === 'cm-1' || u === 'um' || u === 'nm') return u;
  throw new ScienceError('UNIT_INVALID', `a spectrum's x is in cm-1, um or nm, not ${u}`, { unit: u });
}

/**
 * A JCAMP-DX or CSV body turned into the JSON body of the same endpoint: a spectrum or a line list, with the
 * species (and temperature) taken from the query string.
 */
export function textBodyToJson(
  contentType: string,
  text: string,
  query: Record<string, unknown>,
  limits: { readonly maxPoints: number; readonly maxLines: number } = { maxPoints: 5_000_000, maxLines: 100_000 },
): Record<string, unknown> {
  const extra: Record<string, unknown> = {};
  if (typeof query.species === 'string' && query.species !== '') extra.species = query.species;
  // A temperature out of its rule is left to the query's schema, which refuses it naming the query parameter.
  const temperature = typeof query.temperature === 'string' ? queryTemperature(query.temperature) : undefined;
  if (temperature !== undefined) extra.options = { temperature };
  const sample: Record<string, string> = {};
  for (const k of ['id', 'description', 'instrument', 'operator', 'measuredAt', 'notes']) {
    const v = query[`sample.${k}`];
    if (typeof v === 'string' && v !== '') sample[k] = v;
  }
  if (Object.keys(sample).length > 0) extra.sample = sample;
  const queryUnit = queryUnitOf(query);
  if ((JCAMP_TYPES as readonly string[]).some((t) => contentType.startsWith(t))) {
    const d = parseJcamp(text, { maxPoints: limits.maxPoints, maxPeaks: limits.maxLines });
    if (d.kind === 'peaks') {
      const xUnit = agreedUnit(xUnitOf(d.xUnits), queryUnit, "the file's ##XUNITS");
      return {
        ...extra,
        unit: xUnit,
        lines: d.peaks.map((p) => ({ position: p.x, ...(p.y !== undefined && p.y >= 0 ? { intensity: p.y } : {}) })),
      };
    }
    return {
      ...extra,
      spectrum: {
        x: Array.from(d.x),
        y: Array.from(d.y),
        xUnit: agreedUnit(xUnitOf(d.xUnits), queryUnit, "the file's ##XUNITS"),
        yUnit: yUnitOf(d.yUnits),
      },
    };
  }
  const c = parseCsv(text, { maxRows: limits.maxPoints, maxLines: limits.maxLines });
  if (c.kind === 'lines') {
    const unit = agreedUnit(c.unit, queryUnit, 'the CSV header');
    return { ...extra, ...(unit ? { unit } : {}), lines: c.lines.map((l) => ({ ...l })) };
  }
  const xUnit = spectrumUnit(agreedUnit(c.xUnit, queryUnit, 'the CSV header'));
  return {
    ...extra,
    spectrum: {
      x: Array.from(c.x),
      y: Array.from(c.y),
      ...(c.yUnit ? { yUnit: c.yUnit } : {}),
      ...(xUnit ? { xUnit } : {}),
    },
  };
}

import { ScienceError } from '../src/errors.js';
import { parseCsv } from '../src/spectra/csv.js';
import { parseJcamp } from '../src/spectra/jcamp.js';

/** Media types of spectra and line lists accepted besides JSON. */
export const JCAMP_TYPES = ['chemical/x-jcamp-dx', 'chemical/x-jcamp'] as const;
export const CSV_TYPES = ['text/csv'] as const;

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
  if (typeof query.temperature === 'string' && query.temperature !== '') {
    const t = Number(query.temperature);
    if (!Number.isFinite(t))
      throw new ScienceError('INPUT_INVALID', `temperature=${query.temperature} is not a number`, {});
    extra.options = { temperature: t };
  }
  const sample: Record<string, string> = {};
  for (const k of ['id', 'description', 'instrument', 'operator', 'measuredAt', 'notes']) {
    const v = query[`sample.${k}`];
    if (typeof v === 'string' && v !== '') sample[k] = v;
  }
  if (Object.keys(sample).length > 0) extra.sample = sample;
  if ((JCAMP_TYPES as readonly string[]).some((t) => contentType.startsWith(t))) {
    const d = parseJcamp(text, { maxPoints: limits.maxPoints, maxPeaks: limits.maxLines });
    if (d.kind === 'peaks') {
      const xUnit = xUnitOf(d.xUnits);
      return {
        ...extra,
        unit: xUnit,
        lines: d.peaks.map((p) => ({ position: p.x, ...(p.y !== undefined && p.y >= 0 ? { intensity: p.y } : {}) })),
      };
    }
    return {
      ...extra,
      spectrum: { x: Array.from(d.x), y: Array.from(d.y), xUnit: xUnitOf(d.xUnits), yUnit: yUnitOf(d.yUnits) },
    };
  }
  const c = parseCsv(text, { maxRows: limits.maxPoints, maxLines: limits.maxLines });
  if (c.kind === 'lines')
    return { ...extra, ...(c.unit ? { unit: c.unit } : {}), lines: c.lines.map((l) => ({ ...l })) };
  return { ...extra, spectrum: { x: Array.from(c.x), y: Array.from(c.y), ...(c.yUnit ? { yUnit: c.yUnit } : {}) } };
}

/**
 * The display form of a measured value: the uncertainty rounded to two significant digits and the value rounded to
 * the same decimal place (common practice, e.g. the GUM's advice to quote uncertainties to at most two significant
 * digits). Numbers far from 1 share one power of ten: "(6.1215 ± 0.0021)e-6". For display only: the JSON numbers
 * themselves keep full precision.
 */
export function roundedDisplay(value: number, uncertainty: number): string {
  if (!Number.isFinite(value)) return String(value);
  if (!(uncertainty > 0) || !Number.isFinite(uncertainty)) return String(value);
  const u2 = Number(uncertainty.toPrecision(2));
  const place = Math.floor(Math.log10(u2)) - 1; // power of ten of the uncertainty's second digit
  const magnitude = value === 0 ? place + 1 : Math.floor(Math.log10(Math.abs(value)));
  if (magnitude < -3 || magnitude > 7 || place > magnitude + 1) {
    const shift = Math.max(magnitude, place + 1);
    const decimals = Math.max(0, shift - place);
    const s = 10 ** shift;
    return `(${(value / s).toFixed(decimals)} ± ${(u2 / s).toFixed(decimals)})e${shift}`;
  }
  if (place < 0) return `${value.toFixed(-place)} ± ${u2.toFixed(-place)}`;
  const p = 10 ** place;
  return `${Math.round(value / p) * p} ± ${Math.round(u2 / p) * p}`;
}

type Json = unknown;

/**
 * A copy of a result where every object with numeric `value` and `uncertainty` also carries `display`, its rounded
 * form. Nothing else changes.
 */
export function withDisplay<T>(result: T): T {
  const walk = (x: Json): Json => {
    if (Array.isArray(x)) return x.map(walk);
    if (x === null || typeof x !== 'object') return x;
    const o = Object.fromEntries(Object.entries(x as Record<string, Json>).map(([k, v]) => [k, walk(v)]));
    if (typeof o.value === 'number' && typeof o.uncertainty === 'number')
      o.display = roundedDisplay(o.value, o.uncertainty);
    return o;
  };
  return walk(result) as T;
}

/**
 * Numbers and units as a reader expects them in a report: a value rounded to the digit of its uncertainty's second
 * significant figure (GUM / JCGM 100:2008 §7.2.6 asks for at most two significant digits of an uncertainty), a
 * shared power of ten for very small or very large values, and units typeset (cm⁻¹, Å).
 */

const SUPERSCRIPT: Record<string, string> = {
  '-': '⁻',
  '0': '⁰',
  '1': '¹',
  '2': '²',
  '3': '³',
  '4': '⁴',
  '5': '⁵',
  '6': '⁶',
  '7': '⁷',
  '8': '⁸',
  '9': '⁹',
};

export function superscript(n: number): string {
  return String(n)
    .split('')
    .map((c) => SUPERSCRIPT[c] ?? c)
    .join('');
}

const UNITS: Record<string, string> = { 'cm-1': 'cm⁻¹', angstrom: 'Å', u: 'u', K: 'K', ppm: 'ppm' };

export function unitText(unit: string): string {
  return (
    UNITS[unit] ??
    unit
      .replace(/angstrom/g, 'Å')
      .replace(/\^?-([1-9])\b/g, (_m, d: string) => `⁻${superscript(Number(d))}`)
      .replace(/\^([2-9])\b/g, (_m, d: string) => superscript(Number(d)))
  );
}

/** Decimal places that show an uncertainty u to two significant figures (0 … 12). */
export function decimalsFor(u: number): number {
  if (!(u > 0) || !Number.isFinite(u)) return 4;
  return Math.max(0, Math.min(12, 1 - Math.floor(Math.log10(u))));
}

/** A plain number to n significant figures, without exponent for everyday magnitudes. */
export function sig(v: number, n = 6): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e7) return Number(v.toPrecision(n)).toString();
  const e = Math.floor(Math.log10(a));
  return `${Number((v / 10 ** e).toPrecision(n))} × 10${superscript(e)}`;
}

export interface QuantityLike {
  readonly value: number;
  readonly uncertainty: number | null;
  readonly unit: string;
}

/** "2885.9774 ± 0.0011 cm⁻¹", "(5.319 ± 0.012) × 10⁻⁴ cm⁻¹", or, without an uncertainty, 6 significant figures. */
export function quantity(q: QuantityLike | undefined): string {
  if (!q) return '';
  const unit = unitText(q.unit);
  const u = q.uncertainty;
  if (u === null || !(u > 0) || !Number.isFinite(u)) return `${sig(q.value)} ${unit} (no uncertainty)`;
  const a = Math.abs(q.value);
  const exp = a !== 0 && (a < 1e-2 || a >= 1e7) ? Math.floor(Math.log10(a)) : 0;
  const scale = 10 ** exp;
  const vs = q.value / scale;
  const us = u / scale;
  const d = decimalsFor(us);
  const body = `${vs.toFixed(d)} ± ${us.toFixed(d)}`;
  return exp === 0 ? `${body} ${unit}` : `(${body}) × 10${superscript(exp)} ${unit}`;
}

/** A value with the decimals its uncertainty calls for (the uncertainty itself not shown). */
export function fixedTo(v: number | undefined, u: number | undefined): string {
  if (v === undefined || !Number.isFinite(v)) return '';
  return v.toFixed(decimalsFor(u ?? Number.NaN));
}

/**
 * Prose from the science (warnings, check findings) as printed: units typeset and long raw floats shortened to six
 * significant figures, so that "B_1 = 10.136212345678 cm-1" reads "B_1 = 10.1362 cm⁻¹".
 */
export function prose(text: string): string {
  return text
    .replace(/-?\d+\.\d{7,}(?:e[-+]?\d+)?/gi, (m) => sig(Number(m), 6))
    .replace(/\bcm-1\b/g, 'cm⁻¹')
    .replace(/\bangstrom\b/g, 'Å');
}

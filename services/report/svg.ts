import { extentOf } from '../../src/stats/extent.js';
/**
 * A small SVG plotting kit for the report: linear axes with round-number ticks, points, sticks and lines.
 * Colours are the Okabe–Ito palette (M. Okabe and K. Ito, "Color Universal Design", 2008), readable with the
 * common colour-vision deficiencies; every series also differs by marker shape.
 */
export const PALETTE = [
  '#0072B2',
  '#E69F00',
  '#009E73',
  '#CC79A7',
  '#56B4E9',
  '#D55E00',
  '#F0E442',
  '#000000',
] as const;

export type Marker = 'circle' | 'square' | 'triangle' | 'cross' | 'diamond';
export const MARKERS: readonly Marker[] = ['circle', 'square', 'triangle', 'diamond', 'cross'];

export interface Series {
  readonly label: string;
  /** `err`: a standard uncertainty of y, drawn as a ±σ bar. */
  readonly points: readonly { x: number; y: number; err?: number }[];
  readonly colour: string;
  readonly marker?: Marker;
  /** Draw as a polyline through the points (sorted by x). */
  readonly line?: boolean;
  /** Draw vertical sticks from y = 0. */
  readonly sticks?: boolean;
  readonly dashed?: boolean;
}

export interface PlotSpec {
  readonly id: string;
  readonly title: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly series: readonly Series[];
  readonly width?: number;
  readonly height?: number;
  /** Include y = 0 in the range (stick spectra, residuals). */
  readonly zeroY?: boolean;
}

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** Round-number ticks (1, 2, 5 × 10ⁿ) covering [lo, hi]. */
export function ticks(lo: number, hi: number, count = 6): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((k) => k * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi + step * 1e-9; t += step)
    out.push(Math.abs(t) < step * 1e-9 ? 0 : t);
  return out;
}

const num = (v: number) => {
  const a = Math.abs(v);
  return a !== 0 && (a >= 1e5 || a < 1e-3) ? v.toExponential(1) : Number(v.toPrecision(6)).toString();
};

function marker(m: Marker, x: number, y: number, colour: string): string {
  const r = 3.2;
  switch (m) {
    case 'square':
      return `<rect x="${(x - r).toFixed(1)}" y="${(y - r).toFixed(1)}" width="${2 * r}" height="${2 * r}" fill="${colour}"/>`;
    case 'triangle':
      return `<path d="M${x.toFixed(1)} ${(y - r - 0.8).toFixed(1)}L${(x + r + 0.6).toFixed(1)} ${(y + r).toFixed(1)}L${(x - r - 0.6).toFixed(1)} ${(y + r).toFixed(1)}Z" fill="${colour}"/>`;
    case 'diamond':
      return `<path d="M${x.toFixed(1)} ${(y - r - 1).toFixed(1)}L${(x + r + 1).toFixed(1)} ${y.toFixed(1)}L${x.toFixed(1)} ${(y + r + 1).toFixed(1)}L${(x - r - 1).toFixed(1)} ${y.toFixed(1)}Z" fill="${colour}"/>`;
    case 'cross':
      return `<path d="M${(x - r).toFixed(1)} ${(y - r).toFixed(1)}L${(x + r).toFixed(1)} ${(y + r).toFixed(1)}M${(x - r).toFixed(1)} ${(y + r).toFixed(1)}L${(x + r).toFixed(1)} ${(y - r).toFixed(1)}" stroke="${colour}" stroke-width="1.8" fill="none"/>`;
    default:
      return `<circle cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" r="${r}" fill="${colour}"/>`;
  }
}

export function plot(spec: PlotSpec): string {
  const W = spec.width ?? 640;
  const H = spec.height ?? 300;
  // The legend sits in the top margin, entries laid out left to right and wrapped, so that it never hides data.
  const m = { l: 72, r: 16, t: 0, b: 46 };
  const legendAt: { x: number; y: number }[] = [];
  {
    let x = m.l + 10;
    let row = 0;
    for (const s of spec.series.filter((x) => x.points.length > 0)) {
      const w = 26 + 6.3 * s.label.length;
      if (x + w > W - m.r && x > m.l + 10) {
        row++;
        x = m.l + 10;
      }
      legendAt.push({ x, y: 14 + row * 16 });
      x += w + 8;
    }
    m.t = 14 + 16 * (row + 1);
  }
  const all = spec.series
    .flatMap((s) =>
      s.points.flatMap((p) =>
        p.err !== undefined && p.err > 0 && Number.isFinite(p.err)
          ? [p, { x: p.x, y: p.y - p.err }, { x: p.x, y: p.y + p.err }]
          : [p],
      ),
    )
    .filter((p) => Number.isFinite(p.x) && Number.isFinite(p.y));
  if (all.length === 0) {
    return `<figure class="plot" id="${esc(spec.id)}"><figcaption>${esc(spec.title)}</figcaption><p class="empty">No data for this plot.</p></figure>`;
  }
  let { lo: x0, hi: x1 } = extentOf(all.map((p) => p.x));
  let { lo: y0, hi: y1 } = extentOf(all.map((p) => p.y));
  if (spec.zeroY) {
    y0 = Math.min(y0, 0);
    y1 = Math.max(y1, 0);
  }
  if (x1 === x0) {
    x0 -= 1;
    x1 += 1;
  }
  if (y1 === y0) {
    y0 -= 1;
    y1 += 1;
  }
  const px = (x1 - x0) * 0.03;
  const py = (y1 - y0) * 0.06;
  x0 -= px;
  x1 += px;
  y0 -= spec.zeroY && y0 === 0 ? 0 : py;
  y1 += py;
  const sx = (x: number) => m.l + ((x - x0) / (x1 - x0)) * (W - m.l - m.r);
  const sy = (y: number) => H - m.b - ((y - y0) / (y1 - y0)) * (H - m.t - m.b);
  const parts: string[] = [];
  parts.push(`<rect x="${m.l}" y="${m.t}" width="${W - m.l - m.r}" height="${H - m.t - m.b}" class="frame"/>`);
  for (const t of ticks(x0, x1)) {
    parts.push(
      `<line x1="${sx(t).toFixed(1)}" x2="${sx(t).toFixed(1)}" y1="${H - m.b}" y2="${H - m.b + 5}" class="tick"/>`,
    );
    parts.push(`<text x="${sx(t).toFixed(1)}" y="${H - m.b + 17}" text-anchor="middle" class="tl">${num(t)}</text>`);
  }
  for (const t of ticks(y0, y1, 5)) {
    parts.push(`<line x1="${m.l - 5}" x2="${m.l}" y1="${sy(t).toFixed(1)}" y2="${sy(t).toFixed(1)}" class="tick"/>`);
    parts.push(`<line x1="${m.l}" x2="${W - m.r}" y1="${sy(t).toFixed(1)}" y2="${sy(t).toFixed(1)}" class="grid"/>`);
    parts.push(`<text x="${m.l - 8}" y="${(sy(t) + 4).toFixed(1)}" text-anchor="end" class="tl">${num(t)}</text>`);
  }
  if (y0 < 0 && y1 > 0)
    parts.push(`<line x1="${m.l}" x2="${W - m.r}" y1="${sy(0).toFixed(1)}" y2="${sy(0).toFixed(1)}" class="zero"/>`);
  let shown = 0;
  spec.series.forEach((s) => {
    const pts = s.points.filter((p) => Number.isFinite(p.x) && Number.isFinite(p.y));
    if (pts.length === 0) return;
    const k = shown++;
    if (s.sticks) {
      const d = pts.map((p) => `M${sx(p.x).toFixed(1)} ${sy(0).toFixed(1)}V${sy(p.y).toFixed(1)}`).join('');
      parts.push(
        `<path d="${d}" stroke="${s.colour}" stroke-width="1.4" fill="none" class="series" data-series="${esc(s.label)}"${s.dashed ? ' stroke-dasharray="3 2"' : ''}/>`,
      );
    }
    if (s.line) {
      const sorted = [...pts].sort((a, b) => a.x - b.x);
      const d = sorted.map((p, i) => `${i === 0 ? 'M' : 'L'}${sx(p.x).toFixed(1)} ${sy(p.y).toFixed(1)}`).join('');
      parts.push(
        `<path d="${d}" stroke="${s.colour}" stroke-width="1.6" fill="none" class="series" data-series="${esc(s.label)}"${s.dashed ? ' stroke-dasharray="5 3"' : ''}/>`,
      );
    }
    const bars = pts.filter((p) => p.err !== undefined && p.err > 0 && Number.isFinite(p.err));
    if (bars.length > 0) {
      const d = bars
        .map((p) => {
          const x = sx(p.x).toFixed(1);
          const lo = sy(p.y - (p.err as number)).toFixed(1);
          const hi = sy(p.y + (p.err as number)).toFixed(1);
          return `M${x} ${lo}V${hi}M${(sx(p.x) - 2.5).toFixed(1)} ${lo}h5M${(sx(p.x) - 2.5).toFixed(1)} ${hi}h5`;
        })
        .join('');
      parts.push(`<path d="${d}" stroke="${s.colour}" stroke-width="1" fill="none" class="errorbars"/>`);
    }
    if (s.marker) {
      parts.push(
        `<g class="series" data-series="${esc(s.label)}">${pts.map((p) => marker(s.marker as Marker, sx(p.x), sy(p.y), s.colour)).join('')}</g>`,
      );
    }
    // Legend.
    const { x: lx, y: ly } = legendAt[k] as { x: number; y: number };
    parts.push(
      `<g class="legend">${s.marker ? marker(s.marker, lx, ly - 4, s.colour) : `<line x1="${lx - 6}" x2="${lx + 6}" y1="${ly - 4}" y2="${ly - 4}" stroke="${s.colour}" stroke-width="2"${s.dashed ? ' stroke-dasharray="4 2"' : ''}/>`}<text x="${lx + 10}" y="${ly}" class="lg">${esc(s.label)}</text></g>`,
    );
  });
  parts.push(
    `<text x="${(m.l + (W - m.r)) / 2}" y="${H - 8}" text-anchor="middle" class="al">${esc(spec.xLabel)}</text>`,
  );
  parts.push(
    `<text transform="translate(16 ${(m.t + H - m.b) / 2}) rotate(-90)" text-anchor="middle" class="al">${esc(spec.yLabel)}</text>`,
  );
  return `<figure class="plot" id="${esc(spec.id)}"><figcaption>${esc(spec.title)}</figcaption><svg viewBox="0 0 ${W} ${H}" width="100%" role="img" aria-label="${esc(spec.title)}" xmlns="http://www.w3.org/2000/svg">${parts.join('')}</svg></figure>`;
}

export { esc };

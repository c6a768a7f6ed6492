import type { PotentialResponse } from '../schemas/potentials.js';

/**
 * The potential figure of the report: RKR turning points (circles), the Morse curve from the same constants
 * (dashed), each level drawn as a horizontal segment from r₋ to r₊ at its energy, and the refined curve's turning
 * points at its own levels (hollow diamonds) when the response has them. Self-contained SVG (its own
 * axes), in the Okabe–Ito colours the other plots use.
 */
const BLUE = '#0072B2';
const ORANGE = '#E69F00';
const GREY = '#555555';

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

function niceTicks(lo: number, hi: number, count: number): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((k) => k * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi + step * 1e-9; t += step)
    out.push(Math.abs(t) < step * 1e-9 ? 0 : t);
  return out;
}

const label = (v: number) => Number(v.toPrecision(6)).toString();

export function renderPotentialPlot(p: PotentialResponse, caption: string): string {
  const W = 640;
  const H = 360;
  const m = { l: 72, r: 16, t: 30, b: 46 };
  const rkr = p.curves.rkr;
  if (rkr.length === 0) return '';
  const top = Math.max(...rkr.map((c) => c.energy));
  const yMax = top * 1.15;
  const morse = p.curves.morse.filter((c) => c.energy <= yMax);
  const xs = [...rkr.map((c) => c.r), ...morse.map((c) => c.r)];
  let x0 = Math.min(...xs);
  let x1 = Math.max(...xs);
  const pad = (x1 - x0) * 0.03;
  x0 -= pad;
  x1 += pad;
  const y0 = 0;
  const sx = (x: number) => m.l + ((x - x0) / (x1 - x0)) * (W - m.l - m.r);
  const sy = (y: number) => H - m.b - ((y - y0) / (yMax - y0)) * (H - m.t - m.b);
  const parts: string[] = [];
  parts.push(`<rect x="${m.l}" y="${m.t}" width="${W - m.l - m.r}" height="${H - m.t - m.b}" class="frame"/>`);
  for (const t of niceTicks(x0, x1, 6)) {
    parts.push(
      `<line x1="${sx(t).toFixed(1)}" x2="${sx(t).toFixed(1)}" y1="${H - m.b}" y2="${H - m.b + 5}" class="tick"/>`,
    );
    parts.push(`<text x="${sx(t).toFixed(1)}" y="${H - m.b + 17}" text-anchor="middle" class="tl">${label(t)}</text>`);
  }
  for (const t of niceTicks(y0, yMax, 5)) {
    parts.push(`<line x1="${m.l}" x2="${W - m.r}" y1="${sy(t).toFixed(1)}" y2="${sy(t).toFixed(1)}" class="grid"/>`);
    parts.push(`<text x="${m.l - 8}" y="${(sy(t) + 4).toFixed(1)}" text-anchor="end" class="tl">${label(t)}</text>`);
  }
  const levels = p.levels
    .map(
      (l) =>
        `<line x1="${sx(l.rMin.value).toFixed(1)}" x2="${sx(l.rMax.value).toFixed(1)}" y1="${sy(l.energy.value).toFixed(1)}" y2="${sy(l.energy.value).toFixed(1)}" stroke="${GREY}" stroke-width="1.2"/><text x="${(sx(l.rMax.value) + 4).toFixed(1)}" y="${(sy(l.energy.value) + 4).toFixed(1)}" class="tl">v=${l.v}</text>`,
    )
    .join('');
  parts.push(`<g class="series" data-series="levels">${levels}</g>`);
  if (morse.length > 1) {
    const d = morse.map((c, i) => `${i === 0 ? 'M' : 'L'}${sx(c.r).toFixed(1)} ${sy(c.energy).toFixed(1)}`).join('');
    parts.push(
      `<path d="${d}" stroke="${ORANGE}" stroke-width="1.6" fill="none" stroke-dasharray="5 3" class="series" data-series="Morse"/>`,
    );
  }
  if (p.refined) {
    // The refined curve's turning points at its own levels: hollow diamonds (they sit ≲ 1e-4 Å from the RKR points
    // of a light hydride's levels, a few pixels above them by the zero-point constant).
    const diamond = (x: number, y: number) =>
      `<path d="M${x.toFixed(1)} ${(y - 3.2).toFixed(1)}l3.2 3.2l-3.2 3.2l-3.2 -3.2z" fill="none" stroke="${GREY}" stroke-width="1"/>`;
    const pts = p.refined.levels.flatMap((l) => [
      diamond(sx(l.rMin.value), sy(l.energy.value)),
      diamond(sx(l.rMax.value), sy(l.energy.value)),
    ]);
    parts.push(`<g class="series" data-series="refined">${pts.join('')}</g>`);
  }
  parts.push(
    `<g class="series" data-series="RKR">${rkr.map((c) => `<circle cx="${sx(c.r).toFixed(1)}" cy="${sy(c.energy).toFixed(1)}" r="2.2" fill="${BLUE}"/>`).join('')}</g>`,
  );
  parts.push(
    `<g class="legend"><circle cx="${m.l + 10}" cy="16" r="3" fill="${BLUE}"/><text x="${m.l + 18}" y="20" class="lg">RKR turning points</text><line x1="${m.l + 170}" x2="${m.l + 186}" y1="16" y2="16" stroke="${ORANGE}" stroke-width="2" stroke-dasharray="4 2"/><text x="${m.l + 192}" y="20" class="lg">Morse</text><line x1="${m.l + 250}" x2="${m.l + 266}" y1="16" y2="16" stroke="${GREY}" stroke-width="1.5"/><text x="${m.l + 272}" y="20" class="lg">levels G_v</text>${p.refined ? `<path d="M${m.l + 356} 12.8l3.2 3.2l-3.2 3.2l-3.2 -3.2z" fill="none" stroke="${GREY}" stroke-width="1"/><text x="${m.l + 364}" y="20" class="lg">refined</text>` : ''}</g>`,
  );
  parts.push(`<text x="${(m.l + (W - m.r)) / 2}" y="${H - 8}" text-anchor="middle" class="al">r (Å)</text>`);
  parts.push(
    `<text transform="translate(16 ${(m.t + H - m.b) / 2}) rotate(-90)" text-anchor="middle" class="al">energy above the minimum (cm⁻¹)</text>`,
  );
  const title = `Potential curve of ${p.species}: RKR and Morse`;
  return `<figure class="plot" id="potential"><figcaption>${esc(title)}</figcaption><svg viewBox="0 0 ${W} ${H}" width="100%" role="img" aria-label="${esc(title)}" xmlns="http://www.w3.org/2000/svg">${parts.join('')}</svg><p class="note">${esc(caption)}</p></figure>`;
}

import type { DetailedFit, LineInput } from '../fit/fit-lines.js';
import { type Band, type Branch, formatBand, parseBand, transitionLabel } from '../models/transitions.js';

/**
 * For lines the fit rejected, the label they most likely should carry: every P and R transition of the fitted
 * bands (J″ up to five past the band's highest) that the fitted model predicts within 3σ of the observed position,
 * σ² = the prediction's variance + the line's own σ² (or the fit's rms when the line has none), and that no fitted
 * line already holds. A swapped pair (P(5) sent as P(6) and back) is the usual case.
 */
export function likelyLabels(fit: DetailedFit, lines: readonly LineInput[]): Map<number, string> {
  const out = new Map<number, string>();
  const r = fit.result;
  const held = new Set<string>();
  for (const l of r.lines)
    if (l.status === 'fitted' && l.assignment)
      held.add(`${l.assignment.species}|${l.assignment.band}|${l.assignment.branch}|${l.assignment.j}`);
  const rms = r.statistics.rms > 0 ? r.statistics.rms : 1e-3;
  for (const l of r.lines) {
    if (l.status !== 'rejected' || !l.assignment) continue;
    const sigma = lines[l.index]?.uncertainty ?? rms;
    const own = `${l.assignment.species}|${l.assignment.band}|${l.assignment.branch}|${l.assignment.j}`;
    let best: { label: string; z: number; residual: number } | undefined;
    for (const b of r.bands) {
      const band: Band = parseBand(b.band);
      const jTop = b.jRange[1] + 5;
      for (const branch of ['P', 'R'] as Branch[])
        for (let j = branch === 'P' ? 1 : 0; j <= jTop; j++) {
          const key = `${b.species}|${formatBand(band)}|${branch}|${j}`;
          if (held.has(key) || key === own) continue;
          const t = { species: b.species, band, branch, j };
          const p = fit.predict(t);
          if (!p) continue;
          const residual = l.position - p.value;
          const z = Math.abs(residual) / Math.sqrt(p.variance + sigma * sigma);
          if (z <= 3 && (!best || z < best.z)) best = { label: transitionLabel(t), z, residual };
        }
    }
    if (best)
      out.set(
        l.index,
        `its position fits ${best.label} (residual ${best.residual.toExponential(2)} cm-1, ${best.z.toFixed(1)}σ): probably mislabelled`,
      );
  }
  return out;
}

import type { PotentialResponse } from '../schemas/potentials.js';
import type { ReportSection } from './html.js';
import { renderPotentialPlot } from './potential-plot.js';

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
const q = (x: { value: number; uncertainty: number }, digits: number) =>
  x.uncertainty > 0 ? `${x.value.toFixed(digits)} ± ${x.uncertainty.toPrecision(2)}` : x.value.toFixed(digits);

/** The report's potential-curve section: the plot and a table of the turning points. */
export function potentialSection(p: PotentialResponse): ReportSection {
  const check = p.verification;
  const rf = p.refined;
  const refinedNote = rf
    ? ` Refined curve (corrected until its Numerov levels give back G_v − G_0 and B_v; ${rf.solves} Numerov solves): worst |Δ(G_v − G_0)| ${rf.worstIntervalError.toExponential(1)} cm⁻¹, worst |ΔB_v/B_v| ${rf.worstRotationalRelativeError.toExponential(1)}${rf.withinGoals ? '' : ', short of 0.01 cm⁻¹ and 1e-4'}; its turning points at its own levels E_v (G_v + the zero-point constant, ${rf.zeroPointShift.toFixed(3)} cm⁻¹) are in the last columns.`
    : '';
  const caption = `First-order RKR turning points from the fitted constants, for the levels the data reached (v = 0…${p.vMax}); the Morse curve from ω_e, ω_e x_e and B_e.${check ? ` Numerov check of the RKR curve: worst |Δ(G_v − G_0)| ${check.worstIntervalError.toExponential(1)} cm⁻¹, worst |ΔB_v/B_v| ${check.worstRotationalRelativeError.toExponential(1)}.` : ''}${refinedNote}`;
  const rows = p.levels
    .map((l, i) => {
      const r = rf?.levels[i];
      const refinedCells = rf
        ? r
          ? `<td class="num">${esc(r.energy.value.toFixed(3))}</td><td class="num">${esc(r.rMin.value.toFixed(6))}</td><td class="num">${esc(r.rMax.value.toFixed(6))}</td>`
          : '<td></td><td></td><td></td>'
        : '';
      return `<tr><td>${l.v}</td><td class="num">${esc(q(l.energy, 3))}</td><td class="num">${esc(q(l.rMin, 6))}</td><td class="num">${esc(q(l.rMax, 6))}</td>${refinedCells}</tr>`;
    })
    .join('');
  const refinedHead = rf ? '<th>refined E_v (cm⁻¹)</th><th>refined r₋ (Å)</th><th>refined r₊ (Å)</th>' : '';
  const morse = p.morse
    ? `<p id="morse">Morse: D_e = ${esc(q(p.morse.D_e, 1))} cm⁻¹, a = ${esc(q(p.morse.a, 5))} Å⁻¹, r_e = ${esc(q(p.morse.r_e, 6))} Å.</p>`
    : '';
  return {
    id: 'potential-curve',
    title: 'Potential curve',
    html: `${renderPotentialPlot(p, caption)}${morse}<table id="turning-points"><thead><tr><th>v</th><th>G_v (cm⁻¹)</th><th>r₋ (Å)</th><th>r₊ (Å)</th>${refinedHead}</tr></thead><tbody>${rows}</tbody></table>`,
  };
}

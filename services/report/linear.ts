import { linearReference } from '../../src/linear/reference.js';
import { extentOf } from '../../src/stats/extent.js';
import type { CheckResponse } from '../schemas/checks.js';
import { prose, quantity, sig } from './format.js';
import { esc, MARKERS, PALETTE, plot, type Series } from './svg.js';

/**
 * The report's layout for linear polyatomic fits (CO2, N2O, OCS, HCN, C2H2): levels in the trade's notation with
 * their vibrational angular momentum l and e/f components, bands with their kind (parallel, perpendicular) and
 * branches, the Q branches and the components they reach, residuals per branch and parity against m (J″ for Q),
 * the term-value convention the constants belong to, and each molecule's own hazard beside the general caution.
 */

type Fit = NonNullable<CheckResponse['fit']>;
type FitLine = Fit['lines'][number];
type Level = Fit['levels'][number] & {
  label?: string;
  l?: number;
  q?: Q;
  qJ?: Q;
  term?: Q & { relativeTo?: string };
  parity?: string;
  rank?: number;
};
type Band = Fit['bands'][number] & { label?: string; kind?: string; upper?: unknown; lower?: unknown };
type LinearAssignment = NonNullable<FitLine['assignment']> & { parity?: string; upperParity?: string };
type Q = { value: number; uncertainty: number; unit: string } | undefined;

/** A fit of a linear polyatomic molecule: its response states the term-value convention. */
export function isLinearFit(fit: Fit): boolean {
  return typeof (fit as { convention?: unknown }).convention === 'string';
}

/** Running number of a line: m = J″+1 for R, −J″ for P; Q lines are plotted at J″. */
const mOf = (branch: string, j: number) => (branch === 'R' ? j + 1 : branch === 'P' ? -j : j);

const cell = (q: Q) => (q ? esc(quantity(q)) : '<span class="muted">–</span>');

/** Bands in reading order: lower level label, then upper (the labels sort as the trade writes them). */
export function linearBandOrder(a: { band: string }, b: { band: string }): number {
  const [ua = '', la = ''] = a.band.split('–');
  const [ub = '', lb = ''] = b.band.split('–');
  return la.localeCompare(lb, 'en', { numeric: true }) || ua.localeCompare(ub, 'en', { numeric: true });
}

/** The convention, levels, bands, Q branches and the species' hazards: the "Constants" section for linear fits. */
export function linearConstantsSection(fit: Fit, notes: { levels: string; bands: string; stats: string }): string {
  const convention = `<p id="convention"><strong>Term values and e/f convention.</strong> ${esc((fit as { convention?: string }).convention ?? '')}</p>`;
  const levels = (fit.levels as Level[]).map((l) => {
    const components = (l.l ?? 0) === 0 ? 'e' : l.parity ? `${l.parity} only` : 'e, f';
    return `<tr><td>${esc(l.species)}</td><td>${esc(l.label ?? '')}</td><td>[${esc(String(l.v))}]</td><td class="num">${l.l ?? 0}</td><td>${esc(components)}</td><td class="num">${cell(l.term)}</td><td class="num">${cell(l.B)}</td><td class="num">${cell(l.D)}</td><td class="num">${cell(l.H)}</td><td class="num">${cell(l.q)}</td><td class="num">${cell(l.qJ)}</td></tr>`;
  });
  const levelTable = `<table id="levels" class="linear"><caption>Vibrational levels: effective constants of each level, in the convention above (G<sub>v</sub> relative to the lowest level of its set; q, q<sub>J</sub> only for l ≥ 1 with both components reached)</caption><thead><tr><th>species</th><th>level</th><th>v</th><th>l</th><th>components</th><th>G<sub>v</sub></th><th>B<sub>v</sub></th><th>D<sub>v</sub></th><th>H<sub>v</sub></th><th>q<sub>v</sub></th><th>q<sub>J</sub></th></tr></thead><tbody>${levels.join('')}</tbody></table>
<p class="muted">Terms fitted per level: ${esc(
    fit.model.levelTerms
      .map((t) => `${t.species} [${String(t.v)}] l=${(t as { l?: number }).l ?? 0}: ${t.terms.join(', ')}`)
      .join('; '),
  )}. ${esc(prose(fit.model.selection))}</p>${notes.levels}`;

  const lines = fit.lines.filter((l) => l.assignment && l.status !== 'unassigned');
  const branchesOf = (band: string) => {
    const mine = lines.filter((l) => l.assignment?.band === band);
    return (['P', 'Q', 'R'] as const)
      .map((b) => [b, mine.filter((l) => l.assignment?.branch === b).length] as const)
      .filter(([, n]) => n > 0)
      .map(([b, n]) => `${b} ${n}`)
      .join(', ');
  };
  const bands = [...(fit.bands as Band[])].sort(linearBandOrder).map((b) => {
    return `<tr><td>${esc(b.species)}</td><td>${esc(b.label ?? b.band)}</td><td>${esc(b.kind ?? '')}</td><td class="num">${cell(b.origin)}</td><td class="num">${b.lines}</td><td>${b.jRange[0]}–${b.jRange[1]}</td><td>${esc(branchesOf(b.band))}</td></tr>`;
  });
  const bandTable = `<table id="bands" class="linear"><caption>Bands (origin ν<sub>0</sub> = G<sub>v′</sub> − G<sub>v″</sub>)</caption><thead><tr><th>species</th><th>band v′–v″</th><th>kind</th><th>origin ν<sub>0</sub></th><th>lines</th><th>J″</th><th>branches (lines)</th></tr></thead><tbody>${bands.join('')}</tbody></table>${notes.bands}`;

  // Q branches: which parity components their lines join (a Σ→Π band's Q lines reach f; e↔f within a level).
  const qRows = (fit.bands as Band[]).flatMap((b) => {
    const q = lines.filter((l) => l.assignment?.band === b.band && l.assignment.branch === 'Q');
    if (q.length === 0) return [];
    const pairs = new Map<string, number>();
    for (const l of q) {
      const a = l.assignment as LinearAssignment;
      const k = `${a.parity ?? 'e'} → ${a.upperParity ?? 'f'}`;
      pairs.set(k, (pairs.get(k) ?? 0) + 1);
    }
    const { lo: jLow, hi: jHigh } = extentOf(q.map((l) => l.assignment?.j as number));
    return [
      `<tr><td>${esc(b.species)}</td><td>${esc(b.label ?? b.band)}</td><td class="num">${q.length}</td><td>${jLow}–${jHigh}</td><td>${esc(
        [...pairs].map(([k, n]) => `${k} (${n})`).join(', '),
      )}</td></tr>`,
    ];
  });
  const qTable = qRows.length
    ? `<table id="q-branches"><caption>Q branches (ΔJ = 0: lines join opposite e/f components)</caption><thead><tr><th>species</th><th>band</th><th>lines</th><th>J″</th><th>components (lower → upper)</th></tr></thead><tbody>${qRows.join('')}</tbody></table>`
    : '<p id="q-branches" class="muted">No Q branch was fitted (Σ–Σ bands have none).</p>';

  const st = fit.statistics;
  const scatter = (fit.scatter ?? [])
    .map((g) => `${g.group} (${g.by}, ${g.lines} lines): σ = ${sig(g.sigma, 2)} cm⁻¹`)
    .join('; ');
  const stats = `<p class="stats" id="statistics">${scatter ? `Lines sent without an uncertainty were weighted by the scatter of their group: ${esc(scatter)}. ` : ''}${st.fitted} of ${st.lines} lines fitted, ${st.rejected} rejected, ${st.unassigned} unassigned; ${st.parameters} parameters, ${st.degreesOfFreedom} degrees of freedom; rms of residuals ${sig(st.rms, 2)} cm⁻¹${st.reducedChiSquare !== null ? `; reduced χ² ${st.reducedChiSquare.toFixed(2)}` : ''}; uncertainties ${st.uncertaintyMode === 'absolute' ? 'as sent (absolute)' : 'scaled by the scatter of the residuals (a-posteriori)'}.</p>${notes.stats}`;
  return `${convention}${levelTable}${bandTable}${qTable}${stats}`;
}

/** Each species' own hazard from the library (HCN acutely toxic, CO2 an asphyxiant, …), for the caution box. */
export function linearHazards(fit: Fit): string {
  const hazards = fit.species
    .map((s) => ({ formula: s.formula, hazard: linearReference(s.formula)?.hazard }))
    .filter((h): h is { formula: string; hazard: string } => h.hazard !== undefined);
  if (hazards.length === 0) return '';
  return `<ul id="hazards">${hazards.map((h) => `<li><strong>${esc(h.formula)}</strong>: ${esc(h.hazard)}.</li>`).join('')}</ul>`;
}

const seriesOf = (l: FitLine) => (l.assignment ? `${l.assignment.species} ${l.assignment.band}` : 'unexplained');

/** Residuals of each band, one series per branch and parity component, against m (J″ for Q lines), ±σ bars. */
export function linearResidualPanels(fit: Fit, bands: readonly { species: string; band: string }[]): string[] {
  const rms = fit.statistics.rms;
  return bands.flatMap((b, n) => {
    const key = `${b.species} ${b.band}`;
    const mine = fit.lines.filter((l) => seriesOf(l) === key && l.residual !== undefined && l.assignment);
    if (mine.length === 0) return [];
    const groups = new Map<string, FitLine[]>();
    for (const l of mine) {
      const a = l.assignment as LinearAssignment;
      const g = l.status === 'rejected' ? 'rejected' : `${a.branch} ${a.parity ?? 'e'}→${a.upperParity ?? 'e'}`;
      groups.set(g, [...(groups.get(g) ?? []), l]);
    }
    const series: Series[] = [...groups].map(([label, ls], i) => ({
      label,
      colour: label === 'rejected' ? '#000000' : (PALETTE[(n + i) % PALETTE.length] as string),
      marker: label === 'rejected' ? 'cross' : MARKERS[i % 4],
      points: ls.map((l) => ({
        x: mOf(l.assignment?.branch as string, l.assignment?.j as number),
        y: l.residual as number,
        err: l.uncertainty ?? rms,
      })),
    }));
    const noSigma = mine.some((l) => l.uncertainty === undefined);
    return [
      plot({
        id: `residuals-${n + 1}`,
        title: `${key}: observed − calculated by branch and e/f component, ±σ bars${noSigma ? ` (σ = rms ${sig(rms, 2)} cm⁻¹ where none was sent)` : ''}`,
        xLabel: 'm  (J″+1 for R, −J″ for P, J″ for Q)',
        yLabel: 'obs − calc (cm⁻¹)',
        series,
        zeroY: true,
        height: 240,
      }),
    ];
  });
}

/** Fortrat diagram with P and R on one curve in m and the Q branch as its own series at J″. */
export function linearFortrat(fit: Fit, bands: readonly { species: string; band: string }[]): string[] {
  const series: Series[] = bands.flatMap((b, n) => {
    const mine = fit.lines.filter((l) => seriesOf(l) === `${b.species} ${b.band}` && l.assignment);
    const pr = mine.filter((l) => l.assignment?.branch !== 'Q');
    const q = mine.filter((l) => l.assignment?.branch === 'Q');
    const colour = PALETTE[n % PALETTE.length] as string;
    const point = (l: FitLine) => ({
      x: l.position,
      y: mOf(l.assignment?.branch as string, l.assignment?.j as number),
    });
    return [
      ...(pr.length ? [{ label: `${b.band} P, R`, colour, marker: MARKERS[n % 4], points: pr.map(point) }] : []),
      ...(q.length ? [{ label: `${b.band} Q`, colour, marker: 'cross' as const, points: q.map(point) }] : []),
    ];
  });
  if (series.length === 0) return [];
  return [
    plot({
      id: 'fortrat',
      title: 'Fortrat diagram (Q lines at J″)',
      xLabel: 'wavenumber (cm⁻¹)',
      yLabel: 'm  (J″+1 for R, −J″ for P, J″ for Q)',
      series,
    }),
  ];
}

/** A line's assignment as the table prints it: band, branch(J″) and, for l ≥ 1 levels, the e/f components. */
export function linearAssignmentText(a: LinearAssignment & { upper?: { l: number }; lower?: { l: number } }): string {
  const withParity = (a.upper?.l ?? 0) >= 1 || (a.lower?.l ?? 0) >= 1;
  return `${a.species} ${a.band} ${a.branch}(${a.j})${withParity ? ` ${a.parity ?? 'e'}→${a.upperParity ?? 'e'}` : ''}`;
}

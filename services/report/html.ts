import { extentOf } from '../../src/stats/extent.js';
import { toWavenumber } from '../../src/units.js';
import type { Provenance } from '../provenance.js';
import type { CheckRequest, CheckResponse } from '../schemas/checks.js';
import type { Sample } from '../schemas/provenance.js';
import { decimalsFor, fixedTo, prose, quantity, sig, unitText } from './format.js';
import {
  isLinearFit,
  linearAssignmentText,
  linearBandOrder,
  linearConstantsSection,
  linearFortrat,
  linearHazards,
  linearResidualPanels,
} from './linear.js';
import { esc, MARKERS, PALETTE, plot, type Series } from './svg.js';

/**
 * One self-contained HTML document for a QA check, made to be filed: inline CSS and SVG, no scripts, no external
 * assets; prints on A4 or Letter. The visual design is our own. Order: who and what (sample, software, input
 * digest), the verdict and the caution, every warning in words, the checks, the constants with the warnings that
 * qualify them beside them, the plots (one panel per band), every input line, then any extra sections.
 */

type Fit = NonNullable<CheckResponse['fit']>;
type FitLine = Fit['lines'][number];
type Warning = Fit['warnings'][number];

/** A section a caller adds after the standard ones (e.g. a potential-curve plot); `html` must be escaped already. */
export interface ReportSection {
  readonly id: string;
  readonly title: string;
  readonly html: string;
}

export interface RenderOptions {
  /** When the report was made, as printed. */
  readonly generatedAt: string;
  readonly sample?: Sample;
  readonly provenance?: Provenance;
  /** The spectrum sent, when the input was a spectrum (plotted with the peaks found). */
  readonly spectrum?: CheckRequest['spectrum'];
  /** The lines sent, for the line table when no fit could be made. */
  readonly inputLines?: CheckRequest['lines'];
  readonly unit?: CheckRequest['unit'];
  readonly extraSections?: readonly ReportSection[];
}

const STATUS_TEXT: Record<string, string> = {
  pass: '✓ PASS',
  warn: '! WARN',
  fail: '✗ FAIL',
  'not-evaluated': '– NOT EVALUATED',
};

const m = (branch: string, j: number) => (branch === 'R' ? j + 1 : branch === 'P' ? -j : j);

/** Bands in reading order: species as the fit lists them, then lower level, then upper level. */
function bandOrder(speciesOrder: readonly string[]) {
  const key = (species: string, band: string) => {
    const [up, low] = band.split('-').map(Number) as [number, number];
    const s = speciesOrder.indexOf(species);
    return [s < 0 ? speciesOrder.length : s, low, up] as const;
  };
  return (a: { species: string; band: string }, b: { species: string; band: string }) => {
    const ka = key(a.species, a.band);
    const kb = key(b.species, b.band);
    return ka[0] - kb[0] || ka[1] - kb[1] || ka[2] - kb[2];
  };
}

// ---------------------------------------------------------------------------------------------- warnings

interface NumberedWarning extends Warning {
  readonly n: number;
}

/** Symbols a warning may name, and the constants (response keys) they stand for. */
const SYMBOLS: [RegExp, string[]][] = [
  // A symbol stands alone: not preceded by a letter (so that "more" does not read as r_e).
  [/(?<![A-Za-z])(ω_?e ?x_?e|omega_e_x_e)/, ['omega_e_x_e']],
  [/(?<![A-Za-z])(ω_?e ?y_?e|omega_e_y_e)/, ['omega_e_y_e']],
  [/(?<![A-Za-z])(ω_?e(?! ?[xy]_?e)|omega_e\b)/, ['omega_e']],
  [/(?<![A-Za-z])B_?e\b/, ['B_e', 'r_e']],
  [/(?<![A-Za-z])(α_?e|alpha_e)/, ['alpha_e']],
  [/(?<![A-Za-z])(γ_?e|gamma_e)/, ['gamma_e']],
  [/(?<![A-Za-z])D_?e\b/, ['D_e']],
  [/(?<![A-Za-z])(β_?e|beta_e)/, ['beta_e']],
  [/(?<![A-Za-z])H_?e\b/, ['H_e']],
  [/(?<![A-Za-z])r_?e\b/, ['r_e']],
];

/** The equilibrium constants a warning qualifies: those it names, or every one for warnings about the whole set. */
function constantsQualified(w: Warning): Set<string> {
  const out = new Set<string>();
  for (const [re, keys] of SYMBOLS) if (re.test(w.message)) for (const k of keys) out.add(k);
  if (/^(EQUILIBRIUM_|MASS_REDUCED_)/.test(w.code)) out.add('*');
  return out;
}

const speciesOfWarning = (w: Warning) => /^([0-9A-Za-z-]+):/.exec(w.message)?.[1];

function warningNote(ws: readonly NumberedWarning[], id: string): string {
  if (ws.length === 0) return '';
  return `<ul class="notes" id="${esc(id)}">${ws.map((w) => `<li><span class="wref">W${w.n}</span> ${esc(prose(w.message))}</li>`).join('')}</ul>`;
}

const marks = (ws: readonly NumberedWarning[]) =>
  ws.length ? ` <sup class="wref">${ws.map((w) => `W${w.n}`).join(' ')}</sup>` : '';

// ---------------------------------------------------------------------------------------------- header

function headerBlock(report: CheckResponse, options: RenderOptions): string {
  const s = options.sample;
  const rows: [string, string | undefined][] = [
    ['Sample', s?.id],
    ['Description', s?.description],
    ['Instrument', s?.instrument],
    ['Operator', s?.operator],
    ['Measured at', s?.measuredAt],
    ['Notes', s?.notes],
  ];
  const given = rows.filter(([, v]) => v !== undefined && v !== '');
  const sample = given.length
    ? `<table class="kv" id="sample"><caption>Sample</caption><tbody>${given
        .map(([k, v]) => `<tr><th scope="row">${k}</th><td>${esc(v as string)}</td></tr>`)
        .join('')}</tbody></table>`
    : '<p class="muted" id="sample">No sample description was sent with the request.</p>';
  const p = options.provenance;
  const prov = `<table class="kv" id="provenance"><caption>Provenance</caption><tbody>
<tr><th scope="row">Software</th><td>${p ? `${esc(p.software.name)} ${esc(p.software.version)}` : 'branchwise'}</td></tr>
<tr><th scope="row">Reference library</th><td>${p ? esc(p.software.libraryVersion) : 'not recorded'}</td></tr>
<tr><th scope="row">Input SHA-256</th><td class="hash">${p ? esc(p.input.sha256) : 'not recorded (report made outside the service)'}</td></tr>
<tr><th scope="row">Generated</th><td>${esc(options.generatedAt)}</td></tr>
<tr><th scope="row">Tolerance profile</th><td>${esc(
    Object.entries(report.tolerances)
      .map(([k, v]) => `${k} ${typeof v === 'object' ? JSON.stringify(v) : String(v)}`)
      .join('; '),
  )}</td></tr>
</tbody></table>`;
  return `<div class="head">${sample}${prov}</div>`;
}

// ---------------------------------------------------------------------------------------------- constants

const EQ_NAMES: [string, string][] = [
  ['omega_e', 'ω<sub>e</sub>'],
  ['omega_e_x_e', 'ω<sub>e</sub>x<sub>e</sub>'],
  ['omega_e_y_e', 'ω<sub>e</sub>y<sub>e</sub>'],
  ['B_e', 'B<sub>e</sub>'],
  ['alpha_e', 'α<sub>e</sub>'],
  ['gamma_e', 'γ<sub>e</sub>'],
  ['D_e', 'D<sub>e</sub>'],
  ['beta_e', 'β<sub>e</sub>'],
  ['H_e', 'H<sub>e</sub>'],
  ['r_e', 'r<sub>e</sub>'],
];

type Q = { value: number; uncertainty: number; unit: string } | undefined;

function constantsSection(fit: Fit, warnings: readonly NumberedWarning[]): string {
  const used = new Set<number>();
  const forSpecies = (species: string) =>
    warnings.filter((w) => {
      const s = speciesOfWarning(w);
      return s === undefined || s === species;
    });
  // Equilibrium constants, each with the warnings that name it.
  const eqParts: string[] = [];
  for (const e of fit.equilibrium) {
    const ws = forSpecies(e.species).map((w) => ({ w, keys: constantsQualified(w) }));
    const rows: string[] = [];
    for (const [k, label] of EQ_NAMES) {
      const q = (e as Record<string, unknown>)[k] as Q;
      if (!q) continue;
      const mine = ws.filter((x) => x.keys.has(k) || x.keys.has('*')).map((x) => x.w);
      for (const w of mine) used.add(w.n);
      rows.push(
        `<tr><td>${esc(e.species)}</td><td>${label}</td><td class="num">${esc(quantity(q))}${marks(mine)}</td></tr>`,
      );
    }
    if (rows.length) eqParts.push(rows.join(''));
  }
  const eqWarnings = warnings.filter((w) => used.has(w.n));
  const eq = eqParts.length
    ? `<table id="equilibrium"><caption>Equilibrium constants (standard uncertainties, k = 1)</caption><thead><tr><th>species</th><th>constant</th><th>value</th></tr></thead><tbody>${eqParts.join('')}</tbody></table>${warningNote(eqWarnings, 'equilibrium-notes')}`
    : `<p id="equilibrium">The data determine no equilibrium constants${fit.levels.length < 2 ? ' (a single vibrational level was observed)' : ''}.</p>${warningNote(
        warnings.filter((w) => constantsQualified(w).size > 0),
        'equilibrium-notes',
      )}`;

  // Levels: effective constants of each vibrational level.
  const levelWarnings = warnings.filter((w) =>
    /STRONG_CORRELATION|NON_PHYSICAL|FEW_DEGREES|ILL_CONDITIONED/.test(w.code),
  );
  const hasH = fit.levels.some((l) => l.H);
  const levelRows = [...fit.levels]
    .sort(
      (a, b) =>
        fit.species.findIndex((s) => s.formula === a.species) - fit.species.findIndex((s) => s.formula === b.species) ||
        String(a.v).localeCompare(String(b.v), 'en', { numeric: true }),
    )
    .map(
      (l) =>
        `<tr><td>${esc(l.species)}</td><td>${l.v}</td><td class="num">${esc(quantity(l.B))}</td><td class="num">${esc(quantity(l.D))}</td>${hasH ? `<td class="num">${esc(quantity(l.H))}</td>` : ''}<td class="num">${esc(quantity(l.r))}</td></tr>`,
    )
    .join('');
  const levelTerms = fit.model.levelTerms.map((t) => `${t.species} v=${t.v}: ${t.terms.join(', ')}`).join('; ');
  const levels = `<table id="levels"><caption>Vibrational levels: effective constants of each level (B<sub>v</sub>, D<sub>v</sub>${hasH ? ', H<sub>v</sub>' : ''}; r<sub>v</sub> from B<sub>v</sub>, vibrationally averaged)</caption><thead><tr><th>species</th><th>v</th><th>B<sub>v</sub></th><th>D<sub>v</sub></th>${hasH ? '<th>H<sub>v</sub></th>' : ''}<th>r<sub>v</sub></th></tr></thead><tbody>${levelRows}</tbody></table>
<p class="muted">Terms fitted per level: ${esc(levelTerms)}. ${esc(prose(fit.model.selection))}</p>${warningNote(levelWarnings, 'level-notes')}`;

  const order = bandOrder(fit.species.map((s) => s.formula));
  const bandRows = [...fit.bands]
    .sort(order)
    .map(
      (b) =>
        `<tr><td>${esc(b.species)}</td><td>${esc(b.band)}</td><td class="num">${esc(quantity(b.origin))}</td><td class="num">${b.lines}</td><td>${b.jRange[0]}–${b.jRange[1]}</td></tr>`,
    )
    .join('');
  const bandWarnings = warnings.filter((w) =>
    /^(BAND_|OFFSET_|NUMBERING_|ASSIGNED_|NO_BAND|IDENTIFICATION_|COMBINATION_)/.test(w.code),
  );
  const bands = `<table id="bands"><caption>Bands${marks(bandWarnings)}</caption><thead><tr><th>species</th><th>band v′–v″</th><th>origin ν<sub>0</sub></th><th>lines</th><th>J″</th></tr></thead><tbody>${bandRows}</tbody></table>${warningNote(bandWarnings, 'band-notes')}`;

  const st = fit.statistics;
  const statWarnings = warnings.filter((w) => /^(UNCERTAINTY_|FEW_DEGREES|LINES_REJECTED|REPEATS)/.test(w.code));
  const scatter = (fit.scatter ?? [])
    .map((g) => `${g.group} (${g.by}, ${g.lines} lines): σ = ${sig(g.sigma, 2)} cm⁻¹`)
    .join('; ');
  const stats = `<p class="stats" id="statistics">${scatter ? `Lines sent without an uncertainty were weighted by the scatter of their group: ${esc(scatter)}. ` : ''}${st.fitted} of ${st.lines} lines fitted, ${st.rejected} rejected, ${st.unassigned} unassigned; ${st.parameters} parameters, ${st.degreesOfFreedom} degrees of freedom; rms of residuals ${sig(st.rms, 2)} cm⁻¹${st.reducedChiSquare !== null ? `; reduced χ² ${st.reducedChiSquare.toFixed(2)}` : ''}; uncertainties ${st.uncertaintyMode === 'absolute' ? 'as sent (absolute)' : 'scaled by the scatter of the residuals (a-posteriori)'}${st.conditionNumber !== null ? `; condition number ${sig(st.conditionNumber, 2)}` : ''}.${marks(statWarnings)}</p>${warningNote(statWarnings, 'statistics-notes')}`;

  const cross = fit.crossChecks.length
    ? `<table id="cross-checks"><caption>Cross-checks (approximations, reported as such)</caption><thead><tr><th>species</th><th>relation</th><th>estimate</th><th>fitted</th></tr></thead><tbody>${fit.crossChecks
        .map(
          (c) =>
            `<tr><td>${esc(c.species)}</td><td>${esc(prose(c.description))}</td><td class="num">${esc(quantity(c.value))}</td><td class="num">${esc(quantity(c.fitted))}</td></tr>`,
        )
        .join('')}</tbody></table>`
    : '';
  return `${eq}${levels}${bands}${stats}${cross}`;
}

/** The constants of a linear fit (services/report/linear.ts), with the warnings that qualify each table. */
function linearConstants(fit: Fit, warnings: readonly NumberedWarning[]): string {
  const of = (re: RegExp) => warnings.filter((w) => re.test(w.code));
  return linearConstantsSection(fit, {
    levels: warningNote(
      of(/STRONG_CORRELATION|NON_PHYSICAL|FEW_DEGREES|ILL_CONDITIONED|L_DOUBLING|CENTRIFUGAL|TERMS_/),
      'level-notes',
    ),
    bands: warningNote(of(/^(BAND_|OFFSET_|NUMBERING_|ASSIGNED_|NO_BAND|IDENTIFICATION_|COMBINATION_)/), 'band-notes'),
    stats: warningNote(of(/^(UNCERTAINTY_|FEW_DEGREES|LINES_REJECTED|REPEATS)/), 'statistics-notes'),
  });
}

// ---------------------------------------------------------------------------------------------- plots

const seriesKey = (l: { assignment?: { species: string; band: string } }) =>
  l.assignment ? `${l.assignment.species} ${l.assignment.band}` : 'unexplained';

/** Sticks of each band on its own axis, with the unexplained lines that fall in its range dashed. */
function lineListPanels(fit: Fit, bands: readonly { species: string; band: string }[]): string[] {
  const unexplained = fit.lines.filter((l) => l.status === 'unassigned');
  const intensity = (l: FitLine) => l.intensity ?? 1;
  const anyIntensity = fit.lines.some((l) => l.intensity !== undefined);
  // Each band's lines and position range, found once (they were found again for every unexplained line: a report of
  // 30 000 lines took 28 s).
  const linesOf = new Map<string, FitLine[]>();
  for (const l of fit.lines) {
    const k = seriesKey(l);
    const list = linesOf.get(k);
    if (list) list.push(l);
    else linesOf.set(k, [l]);
  }
  const ranges = bands.map((b) => {
    const { lo, hi } = extentOf((linesOf.get(`${b.species} ${b.band}`) ?? []).map((l) => l.position));
    return [lo, hi] as [number, number];
  });
  const panels = bands.map((b, n) => {
    const key = `${b.species} ${b.band}`;
    const mine = linesOf.get(key) ?? [];
    const fitted = mine.filter((l) => l.status === 'fitted');
    const rejected = mine.filter((l) => l.status === 'rejected');
    const [lo, hi] = ranges[n] as [number, number];
    const pad = Math.max(1, (hi - lo) * 0.03);
    const near = unexplained.filter((l) => l.position >= lo - pad && l.position <= hi + pad);
    const series: Series[] = [
      {
        label: `${key} fitted`,
        colour: PALETTE[n % PALETTE.length] as string,
        sticks: true,
        points: fitted.map((l) => ({ x: l.position, y: intensity(l) })),
      },
    ];
    if (rejected.length)
      series.push({
        label: 'rejected',
        colour: '#000000',
        sticks: true,
        marker: 'cross',
        points: rejected.map((l) => ({ x: l.position, y: intensity(l) })),
      });
    if (near.length)
      series.push({
        label: 'unexplained',
        colour: '#D55E00',
        sticks: true,
        dashed: true,
        points: near.map((l) => ({ x: l.position, y: intensity(l) })),
      });
    return plot({
      id: `lines-${n + 1}`,
      title: `${key}: ${fitted.length} fitted line${fitted.length === 1 ? '' : 's'}${rejected.length ? `, ${rejected.length} rejected (×)` : ''}${near.length ? `, ${near.length} unexplained nearby (dashed)` : ''}`,
      xLabel: 'wavenumber (cm⁻¹)',
      yLabel: anyIntensity ? 'intensity (as sent)' : 'line (no intensity sent)',
      series,
      zeroY: true,
      height: 240,
    });
  });
  // A band without lines has the empty range (+∞, −∞) and covers nothing.
  const covered = (x: number) => ranges.some(([lo, hi]) => x >= lo - 1 && x <= hi + 1);
  const outside = unexplained.filter((l) => !covered(l.position));
  if (outside.length)
    panels.push(
      plot({
        id: 'lines-unexplained',
        title: `Lines that no band explains, outside the bands' ranges (${outside.length})`,
        xLabel: 'wavenumber (cm⁻¹)',
        yLabel: anyIntensity ? 'intensity (as sent)' : 'line (no intensity sent)',
        series: [
          {
            label: 'unexplained',
            colour: '#D55E00',
            sticks: true,
            dashed: true,
            points: outside.map((l) => ({ x: l.position, y: intensity(l) })),
          },
        ],
        zeroY: true,
        height: 220,
      }),
    );
  return panels;
}

/** Residuals of each band against m, with ±σ bars (σ as sent, or the fit's rms where none was sent). */
function residualPanels(fit: Fit, bands: readonly { species: string; band: string }[]): string[] {
  const rms = fit.statistics.rms;
  return bands.flatMap((b, n) => {
    const key = `${b.species} ${b.band}`;
    const mine = fit.lines.filter((l) => seriesKey(l) === key && l.residual !== undefined && l.assignment);
    if (mine.length === 0) return [];
    const point = (l: FitLine) => ({
      x: m(l.assignment?.branch as string, l.assignment?.j as number),
      y: l.residual as number,
      err: l.uncertainty ?? rms,
    });
    const fitted = mine.filter((l) => l.status === 'fitted');
    const rejected = mine.filter((l) => l.status === 'rejected');
    const noSigma = mine.some((l) => l.uncertainty === undefined);
    const series: Series[] = [
      {
        label: key,
        colour: PALETTE[n % PALETTE.length] as string,
        marker: MARKERS[n % 4],
        points: fitted.map(point),
      },
    ];
    if (rejected.length)
      series.push({ label: 'rejected', colour: '#000000', marker: 'cross', points: rejected.map(point) });
    return [
      plot({
        id: `residuals-${n + 1}`,
        title: `${key}: observed − calculated, ±σ bars${noSigma ? ` (σ = rms ${sig(rms, 2)} cm⁻¹ where none was sent)` : ''}`,
        xLabel: 'm  (J″+1 for R, −J″ for P)',
        yLabel: 'obs − calc (cm⁻¹)',
        series,
        zeroY: true,
        height: 240,
      }),
    ];
  });
}

/** At most `buckets` min/max pairs, so that a million-point spectrum stays a small SVG path with its peaks intact. */
function decimate(x: readonly number[], y: readonly number[], buckets = 1500): { x: number; y: number }[] {
  if (x.length <= 2 * buckets) return x.map((v, i) => ({ x: v, y: y[i] as number }));
  const out: { x: number; y: number }[] = [];
  const per = Math.ceil(x.length / buckets);
  for (let s = 0; s < x.length; s += per) {
    let lo = s;
    let hi = s;
    for (let i = s; i < Math.min(x.length, s + per); i++) {
      if ((y[i] as number) < (y[lo] as number)) lo = i;
      if ((y[i] as number) > (y[hi] as number)) hi = i;
    }
    for (const i of lo < hi ? [lo, hi] : [hi, lo]) out.push({ x: x[i] as number, y: y[i] as number });
  }
  return out;
}

function spectrumPanel(fit: Fit, spectrum: NonNullable<RenderOptions['spectrum']>): string {
  const xs = spectrum.xUnit === 'cm-1' ? spectrum.x : spectrum.x.map((v) => toWavenumber(v, spectrum.xUnit).value);
  const pts = decimate(xs, spectrum.y);
  // The trace's value nearest each found peak, to put the peak marker on the trace.
  const order = xs.map((v, i) => [v, spectrum.y[i] as number] as const).sort((a, b) => a[0] - b[0]);
  const at = (x: number) => {
    let lo = 0;
    let hi = order.length - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if ((order[mid] as readonly [number, number])[0] < x) lo = mid;
      else hi = mid;
    }
    const a = order[lo] as readonly [number, number];
    const b = order[hi] as readonly [number, number];
    return Math.abs(a[0] - x) < Math.abs(b[0] - x) ? a[1] : b[1];
  };
  const peaks = (status: string) =>
    fit.lines.filter((l) => l.status === status).map((l) => ({ x: l.position, y: at(l.position) }));
  const candidates: Series[] = [
    { label: 'measured spectrum', colour: '#5b6474', line: true, points: pts },
    { label: 'peaks fitted', colour: PALETTE[0], marker: 'triangle', points: peaks('fitted') },
    { label: 'peaks rejected', colour: '#000000', marker: 'cross', points: peaks('rejected') },
    { label: 'peaks unexplained', colour: '#D55E00', marker: 'diamond', points: peaks('unassigned') },
  ];
  const series = candidates.filter((s) => s.points.length > 0);
  return plot({
    id: 'spectrum',
    title: `Measured spectrum (${spectrum.x.length} points) with the ${fit.lines.length} peaks found`,
    xLabel: 'wavenumber (cm⁻¹)',
    yLabel: spectrum.yUnit,
    series,
    width: 900,
    height: 320,
  });
}

function otherPlots(report: CheckResponse, fit: Fit, bands: readonly { species: string; band: string }[]): string[] {
  const out: string[] = [];
  for (const kind of ['lower', 'upper'] as const) {
    const cds = fit.combinationDifferences.filter((c) => c.kind === kind && c.points.length > 0);
    if (cds.length === 0) continue;
    const series: Series[] = cds.flatMap((c, n) => {
      const colour = PALETTE[n % PALETTE.length] as string;
      const pts = c.points.map((p) => ({
        x: (p.j + 0.5) ** 2,
        y: p.value / (p.j + 0.5),
        err: p.uncertainty / (p.j + 0.5),
      }));
      const line = c.points.map((p) => ({ x: (p.j + 0.5) ** 2, y: (p.value - p.residual) / (p.j + 0.5) }));
      return [
        { label: `${c.species} ${c.band} v=${c.v}`, colour, marker: MARKERS[n % 4], points: pts },
        { label: `fit, B = ${quantity(c.B)}`, colour, line: true, points: line },
      ];
    });
    out.push(
      plot({
        id: `cd-${kind}`,
        title:
          kind === 'lower'
            ? 'Lower-state combination differences Δ₂F″(J) = R(J−1) − P(J+1), ±σ'
            : 'Upper-state combination differences Δ₂F′(J) = R(J) − P(J), ±σ',
        xLabel: '(J + ½)²',
        yLabel: 'Δ₂F / (J + ½)  (cm⁻¹)',
        series,
      }),
    );
  }
  const t = report.checks.find((c) => c.id === 'temperature');
  const tp = (t?.measured.points as { x: number; y: number; residual: number }[] | undefined) ?? [];
  if (t && t.status !== 'not-evaluated' && tp.length > 0) {
    out.push(
      plot({
        id: 'boltzmann',
        title: `Boltzmann plot${t.measured.temperature ? ` — T = ${quantity(t.measured.temperature as Q)}` : ''}`,
        xLabel: 'lower-state energy E″ (cm⁻¹)',
        yLabel: 'ln(I / (ν S (1 − e^(−c₂ν/T))))',
        series: [
          { label: 'lines', colour: PALETTE[0], marker: 'circle', points: tp.map((p) => ({ x: p.x, y: p.y })) },
          {
            label: 'straight-line fit',
            colour: PALETTE[5],
            line: true,
            points: tp.map((p) => ({ x: p.x, y: p.y - p.residual })),
          },
        ],
      }),
    );
  }
  if (isLinearFit(fit)) return [...out, ...linearFortrat(fit, bands)];
  const fortrat: Series[] = bands
    .map((b, n) => ({
      label: `${b.species} ${b.band}`,
      colour: PALETTE[n % PALETTE.length] as string,
      marker: MARKERS[n % 4],
      points: fit.lines
        .filter((l) => seriesKey(l) === `${b.species} ${b.band}` && l.assignment)
        .map((l) => ({ x: l.position, y: m(l.assignment?.branch as string, l.assignment?.j as number) })),
    }))
    .filter((s) => s.points.length > 0);
  if (fortrat.length)
    out.push(
      plot({
        id: 'fortrat',
        title: 'Fortrat diagram',
        xLabel: 'wavenumber (cm⁻¹)',
        yLabel: 'm  (J″+1 for R, −J″ for P)',
        series: fortrat,
      }),
    );
  return out;
}

// ---------------------------------------------------------------------------------------------- lines

const STATUS_WORDS: Record<string, string> = { fitted: 'fitted', rejected: 'rejected', unassigned: 'unexplained' };

function lineTable(fit: Fit, warnings: readonly NumberedWarning[]): string {
  const linear = isLinearFit(fit);
  const byLine = new Map<number, NumberedWarning[]>();
  for (const w of warnings) for (const i of w.lines ?? []) byLine.set(i, [...(byLine.get(i) ?? []), w]);
  const rms = fit.statistics.rms;
  const rows = fit.lines
    .map((l) => {
      const u = l.uncertainty ?? rms;
      const d = decimalsFor(u);
      const a = l.assignment;
      const ws = byLine.get(l.index) ?? [];
      const why = l.reason ? prose(l.reason) : l.status === 'unassigned' ? 'no band explains this line' : '';
      const reason = [why, ...ws.map((w) => `W${w.n}`)].filter(Boolean).join('; ');
      return `<tr class="${esc(l.status)}"><td>${esc(l.id !== undefined ? String(l.id) : String(l.index + 1))}</td><td class="num">${l.position.toFixed(d)}</td><td class="num">${l.uncertainty !== undefined ? sig(l.uncertainty, 2) : ''}</td><td>${a ? `${esc(linear ? linearAssignmentText(a) : `${a.species} ${a.band} ${a.branch}(${a.j})`)}${a.source === 'auto' ? '' : ' <span class="muted">given</span>'}` : ''}</td><td class="num">${fixedTo(l.calculated, u)}</td><td class="num">${fixedTo(l.residual, u)}</td><td>${esc(STATUS_WORDS[l.status] ?? l.status)}</td><td>${esc(reason)}</td></tr>`;
    })
    .join('');
  const anyIds = fit.lines.some((l) => l.id !== undefined);
  return `<table id="line-table" class="lines"><caption>Every input line, in the order sent${anyIds ? " (by the caller's line id)" : ' (numbered from 1)'}; positions in cm⁻¹, to the digit of each line's uncertainty (the fit's rms where none was sent)</caption><thead><tr><th>${anyIds ? 'id' : '#'}</th><th>position</th><th>σ</th><th>assignment</th><th>calculated</th><th>obs − calc</th><th>status</th><th>reason</th></tr></thead><tbody>${rows}</tbody></table>`;
}

function inputLineTable(options: RenderOptions): string {
  const lines = options.inputLines ?? [];
  if (lines.length === 0)
    return '<p id="line-table">No line was fitted (the input was a spectrum and no fit could be made).</p>';
  const unit = options.unit ?? 'cm-1';
  const rows = lines
    .map(
      (l, i) =>
        `<tr class="unassigned"><td>${esc(l.id !== undefined ? String(l.id) : String(i + 1))}</td><td class="num">${l.uncertainty !== undefined ? l.position.toFixed(decimalsFor(l.uncertainty)) : esc(sig(l.position, 10))}</td><td class="num">${l.uncertainty !== undefined ? sig(l.uncertainty, 2) : ''}</td><td>${l.assignment ? `${esc(l.assignment.band ?? '')} ${esc(l.assignment.branch)}(${l.assignment.j})` : ''}</td><td></td><td></td><td>not fitted</td><td>no fit (see the identity check)</td></tr>`,
    )
    .join('');
  return `<table id="line-table" class="lines"><caption>Every input line, as sent (positions in ${esc(unitText(unit))}); none was fitted</caption><thead><tr><th>#</th><th>position</th><th>σ</th><th>assignment</th><th>calculated</th><th>obs − calc</th><th>status</th><th>reason</th></tr></thead><tbody>${rows}</tbody></table>`;
}

// ---------------------------------------------------------------------------------------------- document

const CSS = `
:root{--ink:#1d2330;--muted:#5b6474;--rule:#d9dde4;--pass:#1b7f4b;--warn:#9a6700;--fail:#b3261e;--ne:#5b6474}
*{box-sizing:border-box}body{font:14px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;color:var(--ink);margin:0 auto;max-width:960px;padding:24px}
h1{font-size:20px;margin:0 0 4px}h2{font-size:16px;margin:28px 0 8px;border-bottom:2px solid var(--rule);padding-bottom:4px}
.sub{color:var(--muted);margin:0 0 12px}.muted{color:var(--muted)}
.head{display:grid;grid-template-columns:1fr 1fr;gap:0 24px;align-items:start}
table.kv th{width:34%;font-weight:600;color:var(--muted)}td.hash{font:11px ui-monospace,Menlo,Consolas,monospace;word-break:break-all}
.verdict{display:flex;align-items:center;gap:16px;padding:14px 18px;border-radius:6px;color:#fff;font-weight:600;font-size:18px;margin-top:8px}
.verdict.pass{background:var(--pass)}.verdict.warn{background:var(--warn)}.verdict.fail{background:var(--fail)}
table{border-collapse:collapse;width:100%;margin:10px 0 14px}caption{text-align:left;font-weight:600;margin-bottom:4px}
th,td{border-bottom:1px solid var(--rule);padding:4px 8px;text-align:left;vertical-align:top}td.num{font-variant-numeric:tabular-nums;white-space:nowrap}
table.lines{font-size:12px}table.lines td,table.lines th{padding:2px 6px}tr.rejected td{color:var(--fail)}tr.unassigned td{color:var(--warn)}
.st{font-weight:600;white-space:nowrap}.st.pass{color:var(--pass)}.st.warn{color:var(--warn)}.st.fail{color:var(--fail)}.st.not-evaluated{color:var(--ne)}
.wref{font-weight:600;color:var(--warn)}ul.notes{margin:4px 0 14px;padding-left:18px;font-size:13px}ul.notes li{margin:2px 0}
ol#warnings{padding-left:0;list-style:none}ol#warnings li{margin:4px 0;padding-left:36px;text-indent:-36px}
.panels{display:grid;grid-template-columns:repeat(auto-fit,minmax(420px,1fr));gap:0 16px}
figure.plot{margin:14px 0;page-break-inside:avoid;break-inside:avoid}figcaption{font-weight:600;margin-bottom:4px}
figure.plot svg{display:block;max-width:100%;height:auto}figure.plot svg{max-width:760px}.panels figure.plot svg,#spectrum svg{max-width:none}
svg .frame{fill:none;stroke:#9aa3b2}svg .tick{stroke:#9aa3b2}svg .grid{stroke:#eef0f4}svg .zero{stroke:#9aa3b2;stroke-dasharray:2 2}
svg text{fill:var(--ink);font-size:11px}svg .al{font-size:12px}svg .lg{font-size:11px}
.caution{border-left:4px solid var(--fail);background:#fbf3f2;padding:10px 14px;margin-top:16px}
.stats{color:var(--muted)}
@page{margin:14mm 12mm}
@media print{body{max-width:none;padding:0;font-size:10.5px}.verdict,.caution{-webkit-print-color-adjust:exact;print-color-adjust:exact}
h2{page-break-after:avoid;break-after:avoid}.panels{display:block}figure.plot{margin:8px 0}figure.plot svg{width:100%;max-height:120mm}
thead{display:table-header-group}tr{page-break-inside:avoid;break-inside:avoid}.head{grid-template-columns:1fr 1fr}}
`;

export function renderReport(report: CheckResponse, options: RenderOptions): string {
  const fit = report.fit;
  const species = fit?.species.map((s) => s.formula).join(', ') || 'no species fitted';
  const warnings: NumberedWarning[] = (fit?.warnings ?? []).map((w, i) => ({ ...w, n: i + 1 }));
  const checks = report.checks
    .map(
      (c) =>
        `<tr><td>${esc(c.id)}</td><td class="st ${esc(c.status)}">${esc(STATUS_TEXT[c.status] ?? c.status)}</td><td>${esc(prose(c.message))}</td></tr>`,
    )
    .join('');
  const warningList = warnings.length
    ? `<ol id="warnings">${warnings.map((w) => `<li><span class="wref">W${w.n}</span> ${esc(prose(w.message))} <span class="muted">(${esc(w.code)})</span></li>`).join('')}</ol>`
    : fit
      ? '<p id="warnings">The fit raised no warnings.</p>'
      : '<p id="warnings">No fit was made, so no fit warnings exist; the checks above say why.</p>';

  let body: string;
  if (fit) {
    const linear = isLinearFit(fit);
    const bands = [...fit.bands].sort(linear ? linearBandOrder : bandOrder(fit.species.map((s) => s.formula)));
    const plotsHtml = [
      ...(options.spectrum ? [spectrumPanel(fit, options.spectrum)] : []),
      `<div class="panels" id="line-panels">${lineListPanels(fit, bands).join('')}</div>`,
      `<div class="panels" id="residual-panels">${(linear ? linearResidualPanels : residualPanels)(fit, bands).join('')}</div>`,
      ...otherPlots(report, fit, bands),
    ].join('\n');
    const unexplained = fit.assignment.unexplained;
    const explained =
      unexplained.length === 0
        ? `<p id="unexplained">Every line was assigned to a band: none is left unexplained.</p>`
        : `<p id="unexplained">${unexplained.length} line${unexplained.length === 1 ? ' is' : 's are'} explained by no band (status “unexplained” in the table below): possible impurities or noise, never fitted.</p>`;
    body = `<h2>Constants</h2>${linear ? linearConstants(fit, warnings) : constantsSection(fit, warnings)}
<h2>Plots</h2>${plotsHtml}
<h2>Lines</h2>${explained}${lineTable(fit, warnings)}`;
  } else {
    const identity = report.checks.find((c) => c.id === 'identity');
    body = `<h2>Constants</h2><p id="no-fit">No constant is reported. Identity check: ${esc(prose(identity?.message ?? 'no fit could be made'))}.</p>
<h2>Lines</h2>${inputLineTable(options)}`;
  }
  const extra = (options.extraSections ?? [])
    .map((s) => `<section id="${esc(s.id)}"><h2>${esc(s.title)}</h2>${s.html}</section>`)
    .join('\n');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>branchwise report — ${esc(options.sample?.id ? `${options.sample.id} — ` : '')}${esc(species)} — ${esc(report.verdict)}</title><style>${CSS}</style></head>
<body>
<h1>Line-list QA report</h1>
<p class="sub">${esc(species)} · generated ${esc(options.generatedAt)} by branchwise${options.provenance ? ` ${esc(options.provenance.software.version)}` : ''}</p>
${headerBlock(report, options)}
<div class="verdict ${esc(report.verdict)}" id="verdict">${esc(STATUS_TEXT[report.verdict] ?? report.verdict)}<span style="font-weight:400;font-size:14px">worst of ${report.checks.filter((c) => c.status !== 'not-evaluated').length} evaluated checks</span></div>
<div class="caution" id="caution"><strong>Caution.</strong> ${esc(report.notice)} This report gives constants computed from the data sent; it is not a certificate of the safety, purity or identity of a gas.${fit && isLinearFit(fit) ? linearHazards(fit) : ''}</div>
<h2>Warnings</h2>${warningList}
<h2>Checks</h2>
<table id="checks"><thead><tr><th>check</th><th>status</th><th>finding</th></tr></thead><tbody>${checks}</tbody></table>
${body}
${extra}
</body></html>`;
}

import type { CheckResponse } from '../schemas/checks.js';
import { esc, MARKERS, PALETTE, plot, type Series } from './svg.js';

/**
 * One self-contained HTML document for a QA check: inline CSS and SVG, no scripts, no external assets; prints on
 * A4 or Letter. The visual design is our own: a verdict band, then tables, then the diagnostic plots.
 */

type Fit = NonNullable<CheckResponse['fit']>;
type Q = { value: number; uncertainty: number; unit: string } | undefined;

const STATUS_TEXT: Record<string, string> = {
  pass: '✓ PASS',
  warn: '! WARN',
  fail: '✗ FAIL',
  'not-evaluated': '– NOT EVALUATED',
};

function fmtQ(q: Q): string {
  if (!q) return '';
  const u = q.uncertainty;
  if (!(u > 0)) return `${q.value.toPrecision(10)} ${q.unit}`;
  // Value to the digit of the uncertainty's second significant figure.
  const digits = Math.max(0, Math.min(15, 1 - Math.floor(Math.log10(u))));
  const v = Math.abs(q.value) >= 1e-3 || q.value === 0 ? q.value.toFixed(digits) : q.value.toExponential(2);
  const uu = Math.abs(q.value) >= 1e-3 || q.value === 0 ? u.toFixed(digits) : u.toExponential(1);
  return `${v} ± ${uu} ${q.unit}`;
}

const m = (branch: string, j: number) => (branch === 'R' ? j + 1 : -j);

function constantsTables(fit: Fit): string {
  const rows: string[] = [];
  const names: [string, string][] = [
    ['omega_e', 'ω<sub>e</sub>'],
    ['omega_e_x_e', 'ω<sub>e</sub>x<sub>e</sub>'],
    ['omega_e_y_e', 'ω<sub>e</sub>y<sub>e</sub>'],
    ['B_e', 'B<sub>e</sub>'],
    ['alpha_e', 'α<sub>e</sub>'],
    ['gamma_e', 'γ<sub>e</sub>'],
    ['D_e', 'D<sub>e</sub>'],
    ['beta_e', 'β<sub>e</sub>'],
    ['r_e', 'r<sub>e</sub>'],
  ];
  for (const e of fit.equilibrium) {
    for (const [k, label] of names) {
      const q = (e as Record<string, unknown>)[k] as Q;
      if (q) rows.push(`<tr><td>${esc(e.species)}</td><td>${label}</td><td class="num">${esc(fmtQ(q))}</td></tr>`);
    }
  }
  const eq = rows.length
    ? `<table><caption>Equilibrium constants (standard uncertainties, k = 1)</caption><thead><tr><th>species</th><th>constant</th><th>value</th></tr></thead><tbody>${rows.join('')}</tbody></table>`
    : '<p>The data determine no equilibrium constants (a single vibrational level was observed).</p>';
  const lv = fit.levels
    .map(
      (l) =>
        `<tr><td>${esc(l.species)}</td><td>${l.v}</td><td class="num">${esc(fmtQ(l.B))}</td><td class="num">${esc(fmtQ(l.D))}</td><td class="num">${esc(fmtQ(l.r))}</td></tr>`,
    )
    .join('');
  const bands = fit.bands
    .map(
      (b) =>
        `<tr><td>${esc(b.species)}</td><td>${esc(b.band)}</td><td class="num">${esc(fmtQ(b.origin))}</td><td class="num">${b.lines}</td><td>${b.jRange[0]}–${b.jRange[1]}</td></tr>`,
    )
    .join('');
  return `${eq}
<table><caption>Vibrational levels (effective constants)</caption><thead><tr><th>species</th><th>v</th><th>B<sub>v</sub></th><th>D<sub>v</sub></th><th>r<sub>v</sub></th></tr></thead><tbody>${lv}</tbody></table>
<table><caption>Bands</caption><thead><tr><th>species</th><th>band</th><th>origin</th><th>lines</th><th>J″</th></tr></thead><tbody>${bands}</tbody></table>
<p class="stats">${fit.statistics.fitted} of ${fit.statistics.lines} lines fitted, ${fit.statistics.rejected} rejected, ${fit.statistics.unassigned} unassigned; rms ${fit.statistics.rms.toExponential(2)} cm⁻¹${fit.statistics.reducedChiSquare !== null ? `; reduced χ² ${fit.statistics.reducedChiSquare.toFixed(2)}` : ''}; ${fit.statistics.degreesOfFreedom} degrees of freedom.</p>`;
}

function seriesKey(l: { assignment?: { species: string; band: string } }) {
  return l.assignment ? `${l.assignment.species} ${l.assignment.band}` : 'unexplained';
}

function plots(report: CheckResponse, fit: Fit): string {
  const keys = [...new Set(fit.lines.filter((l) => l.assignment).map(seriesKey))];
  const style = (k: number) => ({ colour: PALETTE[k % PALETTE.length] as string, marker: MARKERS[k % 4] });
  // Lines sent without an intensity show as unit sticks.
  const intensityOf = (i: number) => fit.lines[i]?.intensity ?? 1;
  const stick: Series[] = keys.map((k, n) => ({
    label: k,
    colour: style(n).colour,
    sticks: true,
    points: fit.lines
      .filter((l) => seriesKey(l) === k && l.status !== 'rejected')
      .map((l) => ({ x: l.position, y: intensityOf(l.index) })),
  }));
  const unexplained = fit.lines.filter((l) => l.status === 'unassigned');
  stick.push({
    label: 'unexplained',
    colour: '#D55E00',
    sticks: true,
    dashed: true,
    marker: 'cross',
    points: unexplained.map((l) => ({ x: l.position, y: intensityOf(l.index) })),
  });
  const rejected = fit.lines.filter((l) => l.status === 'rejected' && l.assignment && l.residual !== undefined);
  const residuals: Series[] = keys.map((k, n) => ({
    label: k,
    ...style(n),
    points: fit.lines
      .filter((l) => seriesKey(l) === k && l.status === 'fitted' && l.residual !== undefined && l.assignment)
      .map((l) => ({ x: m(l.assignment?.branch as string, l.assignment?.j as number), y: l.residual as number })),
  }));
  residuals.push({
    label: 'rejected',
    colour: '#000000',
    marker: 'cross',
    points: rejected.map((l) => ({
      x: m(l.assignment?.branch as string, l.assignment?.j as number),
      y: l.residual as number,
    })),
  });
  const cdPlots = (['lower', 'upper'] as const).map((kind) => {
    const cds = fit.combinationDifferences.filter((c) => c.kind === kind);
    const series: Series[] = cds.flatMap((c, n) => {
      const s = style(n);
      const pts = c.points.map((p) => ({ x: (p.j + 0.5) ** 2, y: p.value / (p.j + 0.5) }));
      const line = c.points.map((p) => ({ x: (p.j + 0.5) ** 2, y: (p.value - p.residual) / (p.j + 0.5) }));
      return [
        { label: `${c.species} ${c.band} v=${c.v}`, ...s, points: pts },
        { label: `fit B = ${c.B.value.toFixed(5)}`, colour: s.colour, line: true, points: line },
      ];
    });
    return plot({
      id: `cd-${kind}`,
      title:
        kind === 'lower'
          ? 'Lower-state combination differences Δ₂F″(J) = R(J−1) − P(J+1)'
          : 'Upper-state combination differences Δ₂F′(J) = R(J) − P(J)',
      xLabel: '(J + ½)²',
      yLabel: 'Δ₂F / (J + ½)  (cm⁻¹)',
      series,
    });
  });
  const t = report.checks.find((c) => c.id === 'temperature');
  const tp = (t?.measured.points as { x: number; y: number; residual: number }[] | undefined) ?? [];
  const boltzmann = plot({
    id: 'boltzmann',
    title: `Boltzmann plot${t?.status !== 'not-evaluated' && t?.measured.temperature ? ` — T = ${fmtQ(t.measured.temperature as Q)}` : ''}`,
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
  });
  const fortrat = plot({
    id: 'fortrat',
    title: 'Fortrat diagram',
    xLabel: 'wavenumber (cm⁻¹)',
    yLabel: 'm  (J″+1 for R, −J″ for P)',
    series: keys.map((k, n) => ({
      label: k,
      ...style(n),
      points: fit.lines
        .filter((l) => seriesKey(l) === k && l.assignment)
        .map((l) => ({ x: l.position, y: m(l.assignment?.branch as string, l.assignment?.j as number) })),
    })),
  });
  return [
    plot({
      id: 'stick',
      title: 'Line list: assigned lines by band, unexplained lines dashed',
      xLabel: 'wavenumber (cm⁻¹)',
      yLabel: 'intensity (as sent)',
      series: stick,
      zeroY: true,
      width: 900,
    }),
    plot({
      id: 'residuals',
      title: 'Residuals, observed − calculated, against m; rejected lines as ×',
      xLabel: 'm  (J″+1 for R, −J″ for P)',
      yLabel: 'residual (cm⁻¹)',
      series: residuals,
      zeroY: true,
    }),
    ...cdPlots,
    boltzmann,
    fortrat,
  ].join('\n');
}

const CSS = `
:root{--ink:#1d2330;--muted:#5b6474;--rule:#d9dde4;--pass:#1b7f4b;--warn:#9a6700;--fail:#b3261e;--ne:#5b6474}
*{box-sizing:border-box}body{font:14px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;color:var(--ink);margin:0 auto;max-width:960px;padding:24px}
h1{font-size:20px;margin:0 0 4px}h2{font-size:16px;margin:28px 0 8px;border-bottom:2px solid var(--rule);padding-bottom:4px}
.sub{color:var(--muted);margin:0 0 16px}
.verdict{display:flex;align-items:center;gap:16px;padding:14px 18px;border-radius:6px;color:#fff;font-weight:600;font-size:18px}
.verdict.pass{background:var(--pass)}.verdict.warn{background:var(--warn)}.verdict.fail{background:var(--fail)}
table{border-collapse:collapse;width:100%;margin:10px 0 14px}caption{text-align:left;font-weight:600;margin-bottom:4px}
th,td{border-bottom:1px solid var(--rule);padding:4px 8px;text-align:left;vertical-align:top}td.num{font-variant-numeric:tabular-nums;white-space:nowrap}
.st{font-weight:600;white-space:nowrap}.st.pass{color:var(--pass)}.st.warn{color:var(--warn)}.st.fail{color:var(--fail)}.st.not-evaluated{color:var(--ne)}
figure.plot{margin:14px 0;page-break-inside:avoid;break-inside:avoid}figcaption{font-weight:600;margin-bottom:4px}
svg .frame{fill:none;stroke:#9aa3b2}svg .tick{stroke:#9aa3b2}svg .grid{stroke:#eef0f4}svg .zero{stroke:#9aa3b2;stroke-dasharray:2 2}
svg text{fill:var(--ink);font-size:11px}svg .al{font-size:12px}svg .lg{font-size:11px}
.caution{border-left:4px solid var(--fail);background:#fbf3f2;padding:10px 14px;margin-top:24px}
.stats,.empty{color:var(--muted)}
@media print{body{max-width:none;padding:0;font-size:11px}.verdict{-webkit-print-color-adjust:exact;print-color-adjust:exact}h2{page-break-after:avoid}}
`;

export function renderReport(report: CheckResponse, generatedAt: string): string {
  const fit = report.fit;
  const species = fit?.species.map((s) => s.formula).join(', ') ?? 'no species fitted';
  const checks = report.checks
    .map(
      (c) =>
        `<tr><td>${esc(c.id)}</td><td class="st ${esc(c.status)}">${esc(STATUS_TEXT[c.status] ?? c.status)}</td><td>${esc(c.message)}</td></tr>`,
    )
    .join('');
  const unexplained = fit ? fit.assignment.unexplained : [];
  const unexplainedList = unexplained.length
    ? `<table><thead><tr><th>line</th><th>position (cm⁻¹)</th><th>intensity</th></tr></thead><tbody>${unexplained
        .map(
          (u) =>
            `<tr><td>${u.index}</td><td class="num">${u.position.toFixed(4)}</td><td class="num">${u.intensity !== undefined ? u.intensity.toPrecision(4) : ''}</td></tr>`,
        )
        .join('')}</tbody></table>`
    : '<p>Every line was explained.</p>';
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>branchwise report — ${esc(species)} — ${esc(report.verdict)}</title><style>${CSS}</style></head>
<body>
<h1>Line-list QA report</h1>
<p class="sub">${esc(species)} · generated ${esc(generatedAt)} by branchwise</p>
<div class="verdict ${esc(report.verdict)}" id="verdict">${esc(STATUS_TEXT[report.verdict] ?? report.verdict)}<span style="font-weight:400;font-size:14px">worst of ${report.checks.filter((c) => c.status !== 'not-evaluated').length} evaluated checks</span></div>
<h2>Checks</h2>
<table id="checks"><thead><tr><th>check</th><th>status</th><th>finding</th></tr></thead><tbody>${checks}</tbody></table>
${fit ? `<h2>Constants</h2>${constantsTables(fit)}<h2>Plots</h2>${plots(report, fit)}` : '<p>No fit could be made; see the identity check.</p>'}
<h2>Unexplained lines</h2>
${unexplainedList}
<div class="caution" id="caution"><strong>Caution.</strong> ${esc(report.notice)}</div>
</body></html>`;
}

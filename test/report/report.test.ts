import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { hclScan } from '../helpers/scans.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

const app = useApp();
const scan = hclScan({ offset: 0.02, exactReference: true });

/** Text of an HTML fragment: tags dropped, the few entities the report uses decoded. */
const text = (html: string) =>
  html
    .replace(/<[^>]+>/g, ' ')
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&amp;/g, '&')
    .replace(/\s+/g, ' ');
const section = (html: string, id: string) => {
  const at = html.indexOf(`id="${id}"`);
  if (at < 0) throw new Error(`no element with id ${id}`);
  return html.slice(at, html.indexOf('</table>', at) + 8);
};

const SAMPLE = {
  id: 'CYL-0042 <lot 7>',
  description: 'hydrogen chloride, 5 % in N2, cylinder from the east store',
  instrument: 'FTIR bench 2, 0.01 cm-1 resolution',
  operator: 'A. Chemist',
  measuredAt: '2026-12-01T09:30:00Z',
  notes: 'cell purged twice; "second fill"',
};

describe('POST /v1/reports: a report a lab can file', () => {
  const lines = scan.peaks.map((p, i) => ({ ...p, id: `S${String(i + 1).padStart(3, '0')}` }));
  const payload = JSON.stringify({ species: 'HCl', sample: SAMPLE, lines });

  it('prints the sample, the software and library versions and the SHA-256 of the body as sent', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/reports',
      headers: { 'content-type': 'application/json' },
      payload,
    });
    expect(r.statusCode).toBe(200);
    expect(r.headers['content-type']).toMatch(/^text\/html/);
    const html = r.body;
    const sample = text(section(html, 'sample'));
    for (const v of Object.values(SAMPLE)) expect(sample).toContain(v);
    // Escaped, never raw markup from the caller.
    expect(html).not.toContain('<lot 7>');
    // The sample comes before the verdict: at the top of the report.
    expect(html.indexOf('id="sample"')).toBeLessThan(html.indexOf('id="verdict"'));
    const prov = text(section(html, 'provenance'));
    const sha = createHash('sha256').update(payload).digest('hex');
    expect(prov).toContain(sha);
    const pkg = (await import('../../package.json', { with: { type: 'json' } })).default as { version: string };
    expect(prov).toContain(`branchwise ${pkg.version}`);
    expect(prov).toMatch(/Reference library \d{4}\.\d+\.\d+\+[0-9a-f]{12}/);
    // Self-contained: no scripts, no external styles, images or fonts.
    expect(html).not.toMatch(/<script|<link |src="http|url\(http/);
  });

  it('lists every input line by its id with position, assignment, calculated, obs − calc, status and reason', async () => {
    const html = (
      await app().inject({
        method: 'POST',
        url: '/v1/reports',
        headers: { 'content-type': 'application/json' },
        payload,
      })
    ).body;
    const fit = (
      await app().inject({ method: 'POST', url: '/v1/fits', headers: { 'content-type': 'application/json' }, payload })
    ).json();
    const table = section(html, 'line-table');
    const rows = [...table.matchAll(/<tr class="(\w+)">(.*?)<\/tr>/g)];
    expect(rows.length).toBe(lines.length);
    for (const [k, row] of rows.entries()) {
      const cells = [...(row[2] as string).matchAll(/<td[^>]*>(.*?)<\/td>/g)].map((c) => text(c[1] as string).trim());
      const outcome = fit.lines[k];
      expect(cells[0]).toBe(lines[k]?.id);
      // Position to the digit of its 0.002 cm-1 uncertainty's second figure: 4 decimals (tolerance: that rounding).
      expect(Number(cells[1])).toBeCloseTo(outcome.position, 4);
      if (outcome.status === 'unassigned') {
        expect(cells[6]).toBe('unexplained');
        expect(cells[7]).toMatch(/no band explains this line/);
      } else {
        expect(cells[3]).toContain(`${outcome.assignment.band} ${outcome.assignment.branch}(${outcome.assignment.j})`);
        expect(Number(cells[4])).toBeCloseTo(outcome.calculated, 4);
        expect(Number(cells[5])).toBeCloseTo(outcome.residual, 4);
        expect(cells[6]).toBe(outcome.status);
      }
    }
    // This scan carries a few impurity lines: they are listed, and the report does not claim every line explained.
    expect(fit.statistics.unassigned).toBeGreaterThan(0);
    expect(html).not.toMatch(/Every line was/);
  });

  it('states every warning in words, and beside the constants it qualifies', async () => {
    const html = (
      await app().inject({
        method: 'POST',
        url: '/v1/reports',
        headers: { 'content-type': 'application/json' },
        payload,
      })
    ).body;
    const fit = (
      await app().inject({ method: 'POST', url: '/v1/fits', headers: { 'content-type': 'application/json' }, payload })
    ).json();
    expect(fit.warnings.length).toBeGreaterThan(0);
    const all = text(html);
    const warningList = text(html.slice(html.indexOf('id="warnings"'), html.indexOf('</ol>')));
    for (const w of fit.warnings as { code: string; message: string }[]) {
      expect(warningList).toContain(w.code);
      // The words themselves (units typeset, so compare up to the first unit).
      expect(all).toContain(w.message.split('cm-1')[0]);
    }
    // One band of each isotopologue: B_e and α_e from two levels carry γ_e constrained, and the note sits under
    // that table.
    const neglect = (fit.warnings as { code: string; message: string }[]).findIndex((w) => w.message.includes('γ_e'));
    expect(neglect).toBeGreaterThanOrEqual(0);
    const eq = section(html, 'equilibrium');
    const bRow = [...eq.matchAll(/<tr>(.*?)<\/tr>/g)].find((r) => /B<sub>e<\/sub>/.test(r[1] as string));
    expect(bRow?.[1]).toContain(`W${neglect + 1}`);
    const notes = html.slice(html.indexOf('id="equilibrium-notes"'));
    expect(text(notes.slice(0, notes.indexOf('</ul>')))).toContain('γ_e');
  });

  it('draws one panel per band, in band order, with ±σ error bars on the residuals and units typeset', async () => {
    const html = (
      await app().inject({
        method: 'POST',
        url: '/v1/reports',
        headers: { 'content-type': 'application/json' },
        payload,
      })
    ).body;
    const panels = [...html.matchAll(/<figure class="plot" id="(lines-\d+)"><figcaption>([^<]*)/g)].map((m) => m[2]);
    expect(panels.length).toBe(2);
    expect(panels[0]).toMatch(/^1H-35Cl 1-0/);
    expect(panels[1]).toMatch(/^1H-37Cl 1-0/);
    expect((html.match(/id="residuals-\d+"/g) ?? []).length).toBe(2);
    expect((html.match(/class="errorbars"/g) ?? []).length).toBeGreaterThanOrEqual(2);
    expect(html).not.toMatch(/No data for this plot/);
    expect(html).toContain('wavenumber (cm⁻¹)');
    expect(html).toMatch(/\d ± \d[.\d]* Å/);
    // No float printed raw in the prose or the tables (7+ decimals), outside the SVG coordinates.
    // (The sample's own words are the caller's and stay as sent.)
    const prose = text(
      html.replace(/<svg[\s\S]*?<\/svg>/g, '').replace(/<table class="kv" id="sample">[\s\S]*?<\/table>/, ''),
    );
    expect(prose.match(/\d\.\d{8,}/g) ?? []).toEqual([]);
    expect(prose).not.toMatch(/cm-1/);
  });

  it('orders bands by level: a fundamental before its overtone', async () => {
    // Overtone listed first in the input; strengths as the fundamental's and about 2 % of it (common practice).
    const over = hclScan({
      exactReference: true,
      bands: [
        { upper: 2, lower: 0, strength: 0.02 },
        { upper: 1, lower: 0, strength: 1 },
      ],
    });
    const html = (
      await app().inject({ method: 'POST', url: '/v1/reports', payload: { species: 'HCl', lines: over.peaks } })
    ).body;
    const captions = [...html.matchAll(/id="lines-\d+"><figcaption>([^<]*)/g)].map((m) => m[1] as string);
    const bands = captions.map((c) => /^(\S+) (\d-\d)/.exec(c)?.slice(1).join(' '));
    expect(bands).toEqual(['1H-35Cl 1-0', '1H-35Cl 2-0', '1H-37Cl 1-0', '1H-37Cl 2-0']);
  });

  it('plots the measured spectrum with the peaks found when a spectrum was sent', async () => {
    const s = syntheticSpectrum({
      lines: scan.peaks.slice(0, 30).map((p) => ({ position: p.position, strength: 0.3 * p.intensity + 0.02 })),
      from: 2600,
      to: 3100,
      step: 0.05,
      gaussianFwhm: 0.3,
      lorentzianFwhm: 0.15,
      noise: 0.0005,
      baseline: [0.01, 0],
      seed: 11,
    });
    const r = await app().inject({
      method: 'POST',
      url: '/v1/reports',
      payload: { species: 'HCl', spectrum: { x: Array.from(s.x), y: Array.from(s.y) } },
    });
    expect(r.statusCode).toBe(200);
    const fig = r.body.slice(r.body.indexOf('id="spectrum"'));
    expect(fig).toMatch(/data-series="measured spectrum"/);
    expect(fig.slice(0, fig.indexOf('</figure>'))).toMatch(/data-series="peaks fitted"/);
    // 10 001 points decimated to at most 2 × 1500 vertices (min and max of each bucket).
    const d = /data-series="measured spectrum"/.exec(fig)
      ? (/<path d="([^"]+)"[^>]*data-series="measured spectrum"/.exec(fig)?.[1] ?? '')
      : '';
    const vertices = (d.match(/[ML]/g) ?? []).length;
    expect(vertices).toBeGreaterThan(500);
    expect(vertices).toBeLessThanOrEqual(3000);
  });

  it('under a FAIL where nothing was fitted: no claim that lines were explained, every input line listed', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/reports',
      payload: { species: 'CO', sample: { id: 'wrong-gas' }, lines: scan.peaks },
    });
    expect(r.statusCode).toBe(200);
    expect(text(r.body)).toMatch(/✗ FAIL/);
    expect(r.body).not.toMatch(/Every line was|none is left unexplained/);
    expect(r.body).toContain('id="no-fit"');
    const rows = section(r.body, 'line-table').match(/<tr class=/g) ?? [];
    expect(rows.length).toBe(scan.peaks.length);
    expect(r.body).not.toMatch(/No data for this plot|<svg /);
  });

  it('carries the safety statement, and refuses bad input as problem+json', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/reports',
      payload: { species: 'HCl', lines: scan.peaks },
    });
    const caution = text(r.body.slice(r.body.indexOf('id="caution"')));
    expect(caution).toMatch(/certifies nothing about the safety/);
    expect(caution).toMatch(/local codes, the safety data sheets and licensed practice/);
    const bad = await app().inject({ method: 'POST', url: '/v1/reports', payload: { species: 'HCl' } });
    expect(bad.statusCode).toBe(400);
    expect(bad.headers['content-type']).toMatch(/problem\+json/);
    const badTime = await app().inject({
      method: 'POST',
      url: '/v1/reports',
      payload: { species: 'HCl', sample: { measuredAt: 'yesterday' }, lines: scan.peaks },
    });
    expect(badTime.statusCode).toBe(400);
    expect(badTime.body).toMatch(/measuredAt/);
  });
});

describe('GET /', () => {
  it('serves the page with its own policy: no upgrade to https, scripts by hash, requests to its own origin', async () => {
    const r = await app().inject({ method: 'GET', url: '/' });
    expect(r.statusCode).toBe(200);
    const csp = String(r.headers['content-security-policy']);
    expect(csp).not.toMatch(/upgrade-insecure-requests/);
    expect(csp).toMatch(/script-src 'sha256-[A-Za-z0-9+/=]+'/);
    expect(csp).not.toMatch(/unsafe-eval/);
    expect(csp).toMatch(/connect-src 'self'/);
    expect(r.headers['cross-origin-opener-policy']).toBeUndefined();
    const script = /<script>([\s\S]*?)<\/script>/.exec(r.body)?.[1] ?? '';
    const hash = createHash('sha256').update(script).digest('base64');
    expect(csp).toContain(`'sha256-${hash}'`);
    expect(r.body).toContain('id="file"');
    expect(r.body).toMatch(/certifies nothing about the safety/);
    // Without keys configured the key field is hidden until a 401 asks for it.
    expect(r.body).toMatch(/id="keyrow" hidden/);
  });
});

describe('warnings about the assignment and the weights sit beside the bands and the statistics', () => {
  it('a list without uncertainties says how its lines were weighted, beside the statistics', async () => {
    const bare = scan.peaks.map(({ position, intensity }) => ({ position, intensity }));
    const fit = (
      await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'HCl', lines: bare } })
    ).json();
    const html = (await app().inject({ method: 'POST', url: '/v1/reports', payload: { species: 'HCl', lines: bare } }))
      .body;
    const estimated = (fit.warnings as { code: string; message: string }[]).findIndex((w) =>
      w.code.startsWith('UNCERTAINTY_'),
    );
    expect(estimated).toBeGreaterThanOrEqual(0);
    const stats = html.slice(html.indexOf('id="statistics"'), html.indexOf('</ul>', html.indexOf('id="statistics"')));
    expect(stats).toContain(`W${estimated + 1}`);
    expect(text(stats)).toMatch(/weighted by the scatter|σ =/);
  });
});

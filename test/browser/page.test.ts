/// <reference lib="dom" />
import { existsSync, mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { type Browser, chromium } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { writeJcamp } from '../helpers/jcamp-writer.js';
import { hclScan } from '../helpers/scans.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

/**
 * The page and the report in a real browser: Debian's Chromium driven by playwright-core (.ci/run installs it).
 * Screenshots go to artifacts/ for review.
 */
const CHROMIUM = '/usr/bin/chromium';
const ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

describe.skipIf(!existsSync(CHROMIUM))('in Chromium', () => {
  let app: FastifyInstance;
  let browser: Browser;
  let base = '';
  beforeAll(async () => {
    app = await buildApp();
    await app.listen({ host: '127.0.0.1', port: 0 });
    const a = app.server.address();
    base = `http://127.0.0.1:${typeof a === 'object' && a ? a.port : 0}`;
    browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS });
    mkdirSync('artifacts', { recursive: true });
  }, 60_000);
  afterAll(async () => {
    await browser?.close();
    await app?.close();
  });

  const scan = hclScan({ offset: 0.02, exactReference: true });

  async function reportFrame(page: import('playwright-core').Page) {
    await page.waitForFunction(() => document.getElementById('status')?.textContent === 'report ready', null, {
      timeout: 30_000,
    });
    const frame = page.frames().find((f) => f !== page.mainFrame());
    if (!frame) throw new Error('no report frame');
    await frame.waitForSelector('#verdict');
    return frame;
  }

  it('pasting a JSON line list makes a report with every plot drawn and no console errors', async () => {
    const page = await browser.newPage({ viewport: { width: 1100, height: 1600 } });
    const errors: string[] = [];
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto(`${base}/`);
    await page.fill('#input', JSON.stringify({ lines: scan.peaks }));
    await page.fill('#species', 'HCl');
    await page.click('#go');
    const frame = await reportFrame(page);
    const ids = await frame.$$eval('figure.plot', (fs) => fs.map((f) => f.id));
    expect(ids).toEqual(['stick', 'residuals', 'cd-lower', 'cd-upper', 'boltzmann', 'fortrat']);
    const emptyPaths = await frame.$$eval(
      'figure.plot svg .series',
      (els) =>
        els.filter((e) => (e.tagName === 'path' ? !(e.getAttribute('d') ?? '').length : e.childElementCount === 0))
          .length,
    );
    expect(emptyPaths).toBe(0);
    const plotted = await frame.$$eval('figure.plot svg', (svgs) =>
      svgs.map((s) => s.querySelectorAll('.series').length),
    );
    for (const n of plotted) expect(n).toBeGreaterThan(0);
    expect(await frame.textContent('#caution')).toMatch(/certifies nothing/);
    await page.screenshot({ path: join('artifacts', 'page-with-report.png'), fullPage: true });
    expect(errors.join(' | ')).toBe('');
    await page.close();
  });

  it('uploading a JCAMP-DX spectrum file works end to end', async () => {
    const page = await browser.newPage();
    const s = syntheticSpectrum({
      lines: scan.peaks.slice(0, 40).map((p) => ({ position: p.position, strength: 0.3 * p.intensity + 0.02 })),
      from: 2600,
      to: 3100,
      step: 0.1,
      gaussianFwhm: 0.3,
      lorentzianFwhm: 0.15,
      noise: 0.0005,
      baseline: [0.01, 0],
      seed: 4,
    });
    const dir = mkdtempSync(join(tmpdir(), 'branchwise-page-'));
    const file = join(dir, 'cylinder.jdx');
    writeFileSync(file, writeJcamp(s.x, s.y, 'DIFDUP', { yFactor: 1e-5 }));
    await page.goto(`${base}/`);
    await page.setInputFiles('#file', file);
    await page.waitForFunction(() =>
      (document.getElementById('input') as HTMLTextAreaElement).value.startsWith('##TITLE'),
    );
    await page.fill('#species', 'HCl');
    await page.click('#go');
    const frame = await reportFrame(page);
    expect(await frame.textContent('#verdict')).toMatch(/PASS|WARN|FAIL/);
    await page.close();
  });

  it('a report opened on its own prints to PDF without errors', async () => {
    const r = await fetch(`${base}/v1/reports`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ species: 'HCl', lines: scan.peaks }),
    });
    const page = await browser.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await page.setContent(await r.text());
    const pdf = await page.pdf({ format: 'A4' });
    expect(pdf.length).toBeGreaterThan(10_000);
    await page.screenshot({ path: join('artifacts', 'report.png'), fullPage: true });
    expect(errors).toEqual([]);
    await page.close();
  });
});

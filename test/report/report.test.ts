import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { hclScan } from '../helpers/scans.js';

const app = useApp();
const scan = hclScan({ exactReference: true });

describe('POST /v1/reports', () => {
  it('returns one self-contained HTML document with every plot, the verdict and the caution', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/reports',
      payload: { species: 'HCl', lines: scan.peaks },
    });
    expect(r.statusCode).toBe(200);
    expect(r.headers['content-type']).toMatch(/^text\/html/);
    const html = r.body;
    expect(html.startsWith('<!doctype html>')).toBe(true);
    for (const id of ['stick', 'residuals', 'cd-lower', 'cd-upper', 'boltzmann', 'fortrat'])
      expect(html).toContain(`id="${id}"`);
    expect((html.match(/<svg /g) ?? []).length).toBe(6);
    expect(html).toMatch(/id="verdict"/);
    expect(html).toMatch(/certifies nothing/);
    // Self-contained: no external scripts, styles, images or fonts.
    expect(html).not.toMatch(/<script|<link |src="http|url\(http/);
    // Axis labels carry units.
    expect(html).toContain('wavenumber (cm⁻¹)');
    expect(html).toContain('residual (cm⁻¹)');
  });
  it('reports a fit that could not be made, and bad input as problem+json', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/reports', payload: { species: 'CO', lines: scan.peaks } });
    expect(r.statusCode).toBe(200);
    expect(r.body).toMatch(/FAIL/);
    const bad = await app().inject({ method: 'POST', url: '/v1/reports', payload: { species: 'HCl' } });
    expect(bad.statusCode).toBe(400);
    expect(bad.headers['content-type']).toMatch(/problem\+json/);
  });
  it('GET / serves the page with its upload controls', async () => {
    const r = await app().inject({ method: 'GET', url: '/' });
    expect(r.statusCode).toBe(200);
    expect(r.body).toContain('id="file"');
    expect(r.body).toContain('/v1/reports');
  });
});

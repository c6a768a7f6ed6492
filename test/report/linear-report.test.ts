import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO2_626, genLineList, genUnassigned, HCN_H12C14N } from '../helpers/independent-linear.js';

/**
 * The report's linear layout (services/report/linear.ts) over POST /v1/reports: levels with l and their e/f
 * components, bands with their kind and branches, the Q branches and the components they join, residuals per
 * branch and component, the term-value convention, and the molecule's own hazard beside the general caution.
 * Lines from the independent generator (HCN: the shared note's refit of HITRAN level energies; CO2: Rothman &
 * Young 1981).
 */
const app = useApp();

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
  const end = html.indexOf('</table>', at);
  return html.slice(at, end < 0 ? at + 2000 : end + 8);
};

describe('POST /v1/reports for linear molecules', () => {
  it('HCN ν2 (Π←Σ, P, Q, R): levels with l and e/f, the Q branch reaching f, residuals per branch, HCN acutely toxic', async () => {
    const lines = genUnassigned(
      genLineList({
        molecule: HCN_H12C14N,
        bands: [{ upper: '0110', lower: '0000' }],
        jMax: 30,
        sigma: 5e-4,
        seed: 81,
        minRelativeIntensity: 0.01,
      }),
    );
    const res = await app().inject({ method: 'POST', url: '/v1/reports', payload: { species: 'HCN', lines } });
    expect(res.statusCode, res.body.slice(0, 300)).toBe(200);
    const html = res.body;
    expect(text(section(html, 'convention'))).toMatch(/upper sign \(−\) for e and lower \(\+\) for f/);
    const levels = text(section(html, 'levels'));
    // Header names l and the components; the 01¹0 row has both components and a fitted q.
    expect(levels).toMatch(/level v l components G/);
    expect(levels).toMatch(/01¹0 \[0,1,0\] 1 e, f/);
    expect(levels).toMatch(/00⁰0 \[0,0,0\] 0 e /);
    const bands = text(section(html, 'bands'));
    expect(bands).toMatch(/01¹0–00⁰0 perpendicular/);
    expect(bands).toMatch(/P \d+, Q \d+, R \d+/);
    // The Q branch joins the e component of the Σ ground state to the f component of the Π level.
    expect(text(section(html, 'q-branches'))).toMatch(/01¹0–00⁰0 \d+ 1–\d+ e → f \(\d+\)/);
    // One residual series per branch and component, against m (J″ for Q).
    const residuals = section(html, 'residual-panels');
    for (const label of ['P e→e', 'Q e→f', 'R e→e']) expect(residuals).toContain(label);
    expect(residuals).toContain('J″ for Q');
    // The line table writes components: "R(3) e→e", "Q(5) e→f".
    expect(text(section(html, 'line-table'))).toMatch(/Q\(\d+\) e→f/);
    // The general caution and HCN's own hazard.
    const caution = text(section(html, 'caution'));
    expect(caution).toMatch(/certifies nothing about the safety/);
    expect(caution).toMatch(/HCN is acutely toxic/);
    expect(caution).toMatch(/safety data sheets and licensed practice/);
  });

  it('CO2 ν3 (Σ–Σ): no Q branch, only e components, ground-state lines at even J″, CO2 an asphyxiant', async () => {
    const lines = genUnassigned(
      genLineList({
        molecule: CO2_626,
        bands: [{ upper: '00011', lower: '00001' }],
        jMax: 50,
        sigma: 5e-4,
        seed: 82,
        minRelativeIntensity: 0.01,
      }),
    );
    const res = await app().inject({ method: 'POST', url: '/v1/reports', payload: { species: 'CO2', lines } });
    expect(res.statusCode).toBe(200);
    const html = res.body;
    expect(text(section(html, 'bands'))).toMatch(/00⁰1–00⁰0 parallel/);
    expect(text(html.slice(html.indexOf('id="q-branches"'), html.indexOf('id="q-branches"') + 200))).toMatch(
      /No Q branch/,
    );
    expect(text(section(html, 'caution'))).toMatch(/carbon dioxide is an asphyxiant/);
    // Every assigned line in the table has an even J″ (12C16O2 ground state: odd J missing).
    const js = [...text(section(html, 'line-table')).matchAll(/[PR]\((\d+)\)/g)].map((m) => Number(m[1]));
    expect(js.length).toBeGreaterThan(40);
    expect(js.every((j) => j % 2 === 0)).toBe(true);
  });
});

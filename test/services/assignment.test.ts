import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { hclScan } from '../helpers/scans.js';

const app = useApp();
const scan = hclScan({ offset: 0.1, sigma: 0.003, missing: 0.1, spurious: 0.25, seed: 31 });

describe('POST /v1/fits with a bare line list', () => {
  it('assigns the lines (source "auto"), keeps spurious ones unassigned and lists them', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'HCl', lines: scan.peaks } });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.assignment.method).toBe('reference');
    expect(j.assignment.species).toEqual(['1H-35Cl', '1H-37Cl']);
    const auto = j.lines.filter((l: { assignment?: { source: string } }) => l.assignment?.source === 'auto');
    expect(auto.length).toBeGreaterThan(30);
    const unexplained = j.assignment.unexplained.map((u: { index: number }) => u.index);
    const spurious = scan.truth.flatMap((t, i) => (t ? [] : [i]));
    for (const i of spurious) expect(unexplained).toContain(i);
    for (const i of unexplained) expect(j.lines[i].status).toBe('unassigned');
    expect(j.assignment.calibration.offset.unit).toBe('cm-1');
    expect(j.equilibrium.map((e: { species: string }) => e.species)).toEqual(['1H-35Cl', '1H-37Cl']);
  });

  it('identifies the species when none is declared, and ranks the candidates', async () => {
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { lines: scan.peaks } });
    expect(r.statusCode).toBe(200);
    expect(r.json().assignment.identification[0].species).toBe('1H-35Cl');
  });

  it('answers 422 SPECIES_UNIDENTIFIED with candidates and scores for lines no library species explains', async () => {
    const lines = Array.from({ length: 30 }, (_, i) => ({ position: 700 + 13.7 * i + 3 * Math.sin(i * i) }));
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { lines } });
    expect(r.statusCode).toBe(422);
    expect(r.headers['content-type']).toMatch(/problem\+json/);
    const p = r.json();
    expect(p.code).toBe('SPECIES_UNIDENTIFIED');
    expect(Array.isArray(p.candidates)).toBe(true);
  });
});

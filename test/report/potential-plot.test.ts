import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO_12_16, independentLines } from '../helpers/independent-lines.js';

const app = useApp();

function body(bands: { upper: number; lower: number; jMax: number }[]) {
  const list = independentLines({ molecule: CO_12_16, bands, sigma: 0.002, seed: 11 });
  return {
    species: 'CO',
    lines: list.lines.map((l) => ({
      position: l.position,
      ...(l.uncertainty !== undefined ? { uncertainty: l.uncertainty } : {}),
      ...(l.assignment
        ? {
            assignment: {
              band: `${l.assignment.band.upper}-${l.assignment.band.lower}`,
              branch: l.assignment.branch,
              j: l.assignment.j,
            },
          }
        : {}),
    })),
  };
}

describe('report: potential curve', () => {
  it('draws the RKR points, the Morse curve and the levels when the data give two vibrational intervals', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/reports',
      payload: body([
        { upper: 1, lower: 0, jMax: 22 },
        { upper: 2, lower: 0, jMax: 22 },
        { upper: 2, lower: 1, jMax: 18 },
      ]),
    });
    expect(r.statusCode).toBe(200);
    const html = r.body;
    const at = html.indexOf('id="potential-curve"');
    expect(at).toBeGreaterThan(0);
    const part = html.slice(at, html.indexOf('</section>', at));
    // Levels v = 0…2 (the levels the data reached): RKR points every quarter level, both branches, plus r_e.
    const rkr = part.slice(part.indexOf('data-series="RKR"'), part.indexOf('</g>', part.indexOf('data-series="RKR"')));
    expect(rkr.match(/<circle/g)).toHaveLength(2 * (4 * 2 + 1) + 1);
    expect(part).toContain('data-series="Morse"');
    expect(part.match(/>v=\d</g)).toHaveLength(3);
    expect(part).toMatch(/<table id="turning-points">/);
    // The refined curve: two diamonds per level and three more columns in the table, its check in the caption.
    const refined = part.slice(
      part.indexOf('data-series="refined"'),
      part.indexOf('</g>', part.indexOf('data-series="refined"')),
    );
    expect(refined.match(/<path/g)).toHaveLength(2 * 3);
    expect(part).toContain('<th>refined r₋ (Å)</th>');
    expect(part).toMatch(/Refined curve \(corrected until its Numerov levels give back/);
    const firstRow = part.slice(part.indexOf('<tbody>'), part.indexOf('</tr>', part.indexOf('<tbody>')));
    expect(firstRow.match(/<td/g)).toHaveLength(7);
  });

  it('has no potential section with one vibrational interval (the fundamental alone)', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/reports',
      payload: body([{ upper: 1, lower: 0, jMax: 22 }]),
    });
    expect(r.statusCode).toBe(200);
    expect(r.body).not.toContain('id="potential-curve"');
  });
});

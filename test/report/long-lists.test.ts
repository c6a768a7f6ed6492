import { describe, expect, it } from 'vitest';
import { plot } from '../../services/report/svg.js';
import { runReport } from '../../services/usecases/report.js';
import { extentOf } from '../../src/stats/extent.js';

/**
 * Reports of long line lists. The plots took their ranges with Math.min(...values), which overflows the stack past
 * about 10⁵ arguments (MAX_LINES can be raised to 10⁷), and the panel of unexplained lines looked up every band's
 * lines again for each unexplained line (a 30 000-line report took 28 s, 2 s after the change, measured 2026-12-05
 * in process; not asserted here).
 */
describe('long line lists in the report', () => {
  it('a plot of 300 000 points has its axes (no stack overflow) and the range of its points', () => {
    const points = Array.from({ length: 300_000 }, (_, i) => ({ x: 1000 + i * 0.001, y: Math.sin(i) }));
    const svg = plot({
      id: 'many',
      title: 'many',
      xLabel: 'x',
      yLabel: 'y',
      series: [{ label: 's', colour: '#000000', sticks: true, points }],
    });
    expect(svg).toContain('<svg');
    expect(extentOf(points.map((p) => p.x))).toEqual({ lo: 1000, hi: 1000 + 299_999 * 0.001 });
    expect(extentOf([])).toEqual({ lo: Number.POSITIVE_INFINITY, hi: Number.NEGATIVE_INFINITY });
  });

  it('unexplained lines outside every band get their own panel, those inside a band its panel', () => {
    // CO 1-0 (invented list from rounded textbook-level constants, from memory: ν₀ 2143.27, B 1.9225, α 0.0175)
    // plus 30 lines far from any band and 5 between its lines.
    const x = (j: number) => j * (j + 1);
    const nu = (j1: number, j0: number) => 2143.27 + (1.9225 - 0.0175) * x(j1) - 1.9225 * x(j0);
    const lines = [];
    for (let j = 0; j < 20; j++) lines.push({ position: nu(j + 1, j) }, { position: nu(j, j + 1) });
    for (let k = 0; k < 30; k++) lines.push({ position: 2600 + k * 1.37 });
    for (let k = 0; k < 5; k++) lines.push({ position: 2160.5 + k * 7.7 });
    const html = runReport({ species: 'CO', lines } as never);
    expect(html).toMatch(/Lines that no band explains, outside the bands' ranges \(30\)/);
    expect(html).toMatch(/12C-16O 1-0: \d+ fitted lines?[^<]*, 5 unexplained nearby/);
  });
});

import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { hclScan } from '../helpers/scans.js';

/**
 * A lone client is never turned away: with the defaults of `npm start` (load shedding on at
 * MAX_EVENT_LOOP_DELAY_MS=1000, rate limit, worker pool), 60 heavy scans posted one after another all get 200.
 * "Heavy": a bare HCl scan (two isotopologues, fundamental and first overtone, to J = 35, spurious peaks) that
 * needs automatic assignment, so that each request keeps the service busy well beyond a 50 ms sampling interval;
 * every tenth is a 3 000-line list that goes to the worker pool.
 */
const app = useApp();

describe('a lone sequential client', () => {
  it('60 heavy scans in a row: 60 × 200', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 60; i++) {
      const scan = hclScan({
        bands: [
          { upper: 1, lower: 0, strength: 1 },
          { upper: 2, lower: 0, strength: 0.02 },
        ],
        jMax: 35,
        seed: 100 + i,
      });
      let lines = scan.peaks;
      if (i % 10 === 9) {
        // Repeated scans of the same gas, as a long averaging run sends them: over WORKER_THRESHOLD lines.
        const copies = Math.ceil(3000 / lines.length);
        lines = Array.from({ length: copies }, () => scan.peaks).flat();
      }
      const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'HCl', lines } });
      statuses.push(r.statusCode);
      if (r.statusCode !== 200) console.error(i, r.body.slice(0, 300));
    }
    expect(statuses.filter((s) => s !== 200)).toEqual([]);
    expect(statuses.length).toBe(60);
  });
});

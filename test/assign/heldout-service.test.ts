import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { parseSpecies } from '../../src/species/parse.js';
import { useListeningApp } from '../helpers/app.js';
import { heldoutScan, scoreScan, sweepOptions } from '../helpers/heldout-scans.js';

/**
 * Held-out scans through the service at the defaults of `npm start` (POST /v1/fits, no temperature sent): the
 * labels are those of the in-process analysis, and a hot scan's temperature is read from its intensities.
 * Seeds 2, 12 and 28 of the sweep: HBr at 1211 K, HCl at 712 K, CO at 1143 K, every one with intensities; before
 * this change 36 / 31 / 72 of their lines were fitted right through the 296 K default, now 355 / 138 / 312.
 */
const { app } = useListeningApp();

/**
 * Seeds 14, 140 and 188 as well: an HBr list split line by line between two instruments 0.19 cm⁻¹ apart (7 lines
 * right before the aligned attempt, now 142), a 1037 K CO scan from two instruments that lost its main bands at 296 K
 * (102 right before the hot start, now 982), and a 1444 K HCl scan without intensities (110 right before, now 268,
 * the temperature assumed hot since none can be read).
 */
describe('held-out scans through POST /v1/fits at the npm start defaults', () => {
  for (const [seed, right, code] of [
    [2, 355, 'TEMPERATURE_ESTIMATED'],
    [12, 138, 'TEMPERATURE_ESTIMATED'],
    [28, 312, 'TEMPERATURE_ESTIMATED'],
    [14, 142, 'TEMPERATURE_ESTIMATED'],
    [140, 982, 'TEMPERATURE_ESTIMATED'],
    [188, 268, 'TEMPERATURE_ASSUMED_HOT'],
  ] as const) {
    it(`seed ${seed}: the in-process labels, ${right} right, ${code}`, async () => {
      const o = sweepOptions(seed);
      const scan = heldoutScan(o);
      const r = await app().inject({
        method: 'POST',
        url: '/v1/fits',
        payload: { species: o.molecule, lines: scan.peaks },
      });
      expect(r.statusCode).toBe(200);
      const body = r.json() as {
        lines: { status: string; assignment?: { species: string; band: string; branch: string; j: number } }[];
        warnings: { code: string; message: string }[];
      };
      const local = analyseLineList(scan.peaks, parseSpecies(o.molecule)).result.lines;
      const label = (l: {
        status: string;
        assignment?: { species: string; band: string; branch: string; j: number };
      }) =>
        l.status === 'fitted' && l.assignment
          ? `${l.assignment.species} ${l.assignment.band} ${l.assignment.branch}${l.assignment.j}`
          : '';
      expect(body.lines.map(label)).toEqual(local.map(label));
      expect(scoreScan(scan.truth, body.lines).right).toBe(right);
      expect(body.warnings.map((w) => w.code)).toContain(code);
    });
  }
});

import { describe, expect, it } from 'vitest';
import { rejectionReason } from '../../src/fit/outliers.js';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * The reason of a rejected line prints the figure of its own `studentisedResidual` field, with enough digits to lie
 * beyond the printed threshold. Data: the whole real 12C16O list of test/fixtures/co-database-lines, assigned, at
 * the `npm start` defaults (it has rejected lines whose field was −4.05 beside a reason of "−4.0 exceeds 4.00").
 */
const app = useApp();

describe('rejectionReason', () => {
  it.each([
    [-4.048, 4, 'studentised residual -4.05 exceeds 4.00'],
    [-4.38, 4, 'studentised residual -4.38 exceeds 4.00'],
    [4.001, 4, 'studentised residual 4.001 exceeds 4.000'],
    [4.3575, 4.3567, 'studentised residual 4.3575 exceeds 4.3567'],
    [12.3, 4.2, 'studentised residual 12.30 exceeds 4.20'],
  ])('%d against %d: "%s"', (t, threshold, text) => {
    expect(rejectionReason(t, threshold)).toBe(text);
  });
});

describe('rejected lines of the real CO list', () => {
  it('each reason prints its field to the digits shown, beyond the threshold shown', async () => {
    const lines = CO_DATABASE.lines.map((l) => ({
      position: l.position,
      uncertainty: l.uncertainty,
      assignment: { band: l.band, branch: l.branch, j: l.j },
    }));
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines } });
    expect(r.statusCode).toBe(200);
    const rejected = (r.json().lines as { status: string; reason?: string; studentisedResidual?: number }[]).filter(
      (l) => l.status === 'rejected',
    );
    expect(rejected.length).toBeGreaterThan(0);
    for (const l of rejected) {
      const m = /^studentised residual (-?\d+\.(\d+)) exceeds (\d+\.\d+)$/.exec(l.reason ?? '');
      expect(m, l.reason).not.toBeNull();
      const [, figure, decimals = '', threshold] = m as RegExpExecArray;
      expect(decimals.length).toBeGreaterThanOrEqual(2);
      expect(figure).toBe((l.studentisedResidual as number).toFixed(decimals.length));
      expect(Math.abs(Number(figure))).toBeGreaterThan(Number(threshold));
    }
  });
});

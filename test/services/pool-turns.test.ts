import { describe, expect, it } from 'vitest';
import { inlineTurns } from '../../services/pool.js';

/**
 * Inline jobs take turns with the event loop (services/pool.ts#inlineTurns). Order, not time: what a job leaves for
 * the loop (here an immediate, as a socket's callbacks would be) runs before the next job starts.
 */
describe('inline jobs take turns with the event loop', () => {
  it('runs jobs in the order given, and what each leaves for the loop runs before the next one', async () => {
    const inline = inlineTurns();
    const events: string[] = [];
    const jobs = [1, 2, 3].map((k) =>
      inline(() => {
        events.push(`job ${k}`);
        setImmediate(() => events.push(`loop after ${k}`));
        return k * 10;
      }),
    );
    expect(await Promise.all(jobs)).toEqual([10, 20, 30]);
    await new Promise((r) => setImmediate(r));
    // Back to back (before), the three jobs ran first and the loop's work after all of them.
    expect(events).toEqual(['job 1', 'loop after 1', 'job 2', 'loop after 2', 'job 3', 'loop after 3']);
  });

  it('a job that throws passes its turn on: the next jobs still run, in order', async () => {
    const inline = inlineTurns();
    const ran: number[] = [];
    // The first job runs at once (nothing holds the turn) and throws; the others wait for their turns.
    const first = (async () =>
      inline(() => {
        throw new Error('refused');
      }))();
    const rest = [2, 3].map((k) => inline(() => ran.push(k)));
    await expect(first).rejects.toThrow('refused');
    await Promise.all(rest);
    expect(ran).toEqual([2, 3]);
  });
});

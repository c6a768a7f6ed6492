import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../../cli/main.js';
import { CO_DATABASE } from '../helpers/co-database.js';

/**
 * `branchwise fit` prints the higher terms the fit determined: L_v, M_v and ω_e y_e of the whole real 12C16O list
 * (test/fixtures/co-database-lines: pure rotation to high J and the 1-0, 2-1, 2-0, 3-0 bands), which were only in
 * `--format json`.
 */
const dir = mkdtempSync(join(tmpdir(), 'branchwise-fit-table-'));
const file = join(dir, 'co-full.json');
writeFileSync(
  file,
  JSON.stringify({
    species: 'CO',
    lines: CO_DATABASE.lines.map((l) => ({
      position: l.position,
      uncertainty: l.uncertainty,
      assignment: { band: l.band, branch: l.branch, j: l.j },
    })),
  }),
);
const run = (args: string[]) => {
  let out = '';
  main(args, { out: (s) => (out += s), err: () => {}, isTty: false });
  return out;
};

describe('the CLI fit table', () => {
  it('shows the L and M columns and the higher equilibrium constants the JSON holds', () => {
    const json = JSON.parse(run(['fit', file, '--format', 'json']));
    const table = run(['fit', file]);
    const header = table.split('\n').find((l) => /species\s+level\s+B \(cm-1\)/.test(l)) ?? '';
    const hasL = json.levels.some((l: { L?: unknown }) => l.L);
    const hasM = json.levels.some((l: { M?: unknown }) => l.M);
    expect(hasL || hasM).toBe(true); // the real list carries L_0 at least (J up to 80 in pure rotation)
    if (hasL) expect(header).toMatch(/H \(cm-1\)\s+L \(cm-1\)/);
    if (hasM) expect(header).toMatch(/M \(cm-1\)/);
    const eq = json.equilibrium[0] as Record<string, unknown>;
    for (const k of ['omega_e_y_e', 'gamma_e', 'beta_e', 'H_e'])
      if (eq[k]) expect(table).toMatch(new RegExp(`12C-16O\\s+${k}\\s`));
    expect(eq.omega_e_y_e).toBeDefined(); // three vibrational intervals fit ω_e y_e
  });
});

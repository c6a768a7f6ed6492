import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EXIT, LEAN_FROM_LINES, main } from '../../cli/main.js';
import { assignedFitBody } from '../helpers/requests.js';

/**
 * The CLI answers large lists lean in JSON (the per-line echoes of what the file holds are most of such an answer),
 * and --detail says otherwise. Lines: CO 1-0 and 2-0 from the library constants with seeded noise, several
 * measurements of each line (one seed each).
 */
function run(args: string[]) {
  let out = '';
  let err = '';
  const code = main(args, { out: (s) => (out += s), err: (s) => (err += s), isTty: false });
  return { code, out, err };
}

const dir = mkdtempSync(join(tmpdir(), 'branchwise-detail-'));
const measurements = (seeds: number) =>
  Array.from({ length: seeds }, (_, k) => assignedFitBody('CO', ['1-0', '2-0'], 30, 0.002, 40 + k).lines).flat();
const large = join(dir, 'large.json');
const largeLines = measurements(10);
writeFileSync(large, JSON.stringify({ species: 'CO', lines: largeLines }));
const small = join(dir, 'small.json');
writeFileSync(small, JSON.stringify({ species: 'CO', lines: measurements(1) }));

type Line = { uncertainty?: number; assignment?: unknown; position: number; residual?: number };
const linesOf = (out: string) => (JSON.parse(out) as { lines: Line[] }).lines;

describe('lean JSON answers from the command line', () => {
  it(`lists of more than ${LEAN_FROM_LINES} lines are lean by default; --detail full keeps the echoes`, () => {
    expect(largeLines.length).toBeGreaterThan(LEAN_FROM_LINES);
    const lean = run(['fit', large, '--format', 'json']);
    expect(lean.code).toBe(EXIT.pass);
    const l = linesOf(lean.out);
    expect(l).toHaveLength(largeLines.length);
    expect(l.every((x) => x.uncertainty === undefined && x.assignment === undefined)).toBe(true);
    expect(l.every((x) => typeof x.residual === 'number')).toBe(true);
    const full = run(['fit', large, '--format', 'json', '--detail', 'full']);
    const f = linesOf(full.out);
    expect(f.every((x) => x.uncertainty === 0.002 && x.assignment !== undefined)).toBe(true);
    // The fitted numbers do not depend on the answer's shape (exact).
    expect(f.map((x) => x.residual)).toEqual(l.map((x) => x.residual));
    expect(lean.out.length).toBeLessThan(full.out.length);
  });
  it('small lists keep the echoes unless --detail lean; check takes --detail too', () => {
    expect(linesOf(run(['fit', small, '--format', 'json']).out)[0]?.uncertainty).toBe(0.002);
    expect(linesOf(run(['fit', small, '--format', 'json', '--detail', 'lean']).out)[0]?.uncertainty).toBeUndefined();
    const check = JSON.parse(run(['check', small, '--format', 'json', '--detail', 'lean']).out) as {
      fit: { lines: Line[] };
    };
    expect(check.fit.lines[0]?.uncertainty).toBeUndefined();
  });
  it('--detail takes lean or full only (usage error otherwise); the help says what lean leaves out', () => {
    const bad = run(['fit', small, '--detail', 'short']);
    expect(bad.code).toBe(EXIT.usage);
    expect(bad.err).toContain('--detail short');
    expect(run(['--help']).out).toMatch(/more than 1 000 lines are lean/);
  });
});

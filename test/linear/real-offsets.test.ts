import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { assignLinearLines } from '../../src/linear/assign.js';

/**
 * Real line tables (test/fixtures/linear-reference, a copy of ../shared/fixtures/linear-reference.json) shifted as an
 * uncalibrated bench shifts them, sent without labels, with lines of another gas added: the default offset search
 * (±1.2 cm⁻¹) must number them right or leave them, never a line off. Tables: the 12C16O2 laser bands 00011–10001
 * and 00011–10002 (Witteman table, 116 lines, read from a secondary copy) and the H13C14N 2000–0000 centres of NIST
 * SRM 2519a (54 lines, secondary copy of the certificate).
 */
type Row = { transition: string; 'wavenumber_cm-1': number };
const TABLES = (
  JSON.parse(readFileSync(new URL('../fixtures/linear-reference/linear-reference.json', import.meta.url), 'utf8')) as {
    line_tables: Record<string, Row[]>;
  }
).line_tables;
const table = (prefix: string) => Object.entries(TABLES).find(([k]) => k.startsWith(prefix))?.[1] as readonly Row[];

/** Label of a row as branch and J″ (the laser table writes "10P(20)", SRM 2519a "R(26)"). */
const label = (t: string) => /([PR])\((\d+)\)$/.exec(t)?.slice(1).join('') as string;

function shares(species: string, rows: readonly Row[], offset: number, foreign: readonly number[]) {
  const peaks = [
    ...rows.map((r) => ({ position: r['wavenumber_cm-1'] + offset })),
    ...foreign.map((position) => ({ position })),
  ];
  const result = assignLinearLines(species, peaks);
  const s = { correct: 0, wrong: 0, unassigned: 0, foreignTaken: 0 };
  result.lines.forEach((l, i) => {
    if (i >= rows.length) {
      if (l.assignment) s.foreignTaken++;
      return;
    }
    if (!l.assignment) s.unassigned++;
    else if (`${l.assignment.branch}${l.assignment.j}` === label((rows[i] as Row).transition)) s.correct++;
    else s.wrong++;
  });
  if (process.env.SHARES_LOG) console.log(species, offset, s);
  return s;
}

describe('real tables shifted by an uncalibrated instrument, default offset search', () => {
  it('CO2 laser bands (116 lines) shifted by +0.8 and −1.0 cm⁻¹ with 3 foreign lines: every line right, none foreign taken', () => {
    const rows = table('12C16O2 laser bands');
    expect(rows.length).toBe(116);
    for (const offset of [0.8, -1.0]) {
      const s = shares('CO2', rows, offset, [931.01, 1001.37, 1052.66]);
      // Measured: 116 / 0 / 0 at both offsets, 0 of 3 foreign lines taken.
      expect(s.wrong).toBe(0);
      expect(s.foreignTaken).toBe(0);
      expect(s.correct).toBe(116);
    }
  });
  it('H13CN SRM 2519a centres (54 lines) shifted by +0.6 and −0.9 cm⁻¹: none numbered wrong', () => {
    const rows = table('H13C14N C-H stretch first overtone');
    expect(rows.length).toBe(54);
    for (const offset of [0.6, -0.9]) {
      const s = shares('H13CN', rows, offset, [6480.3, 6555.55]);
      expect(s.wrong).toBe(0);
      expect(s.foreignTaken).toBe(0);
      // Measured: 54 / 0 / 0 at both offsets.
      expect(s.correct).toBe(54);
    }
  });
});

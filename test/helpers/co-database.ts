import { readFileSync } from 'node:fs';

/**
 * The real 12C16O line list of test/fixtures/co-database-lines (published positions and uncertainties, cm⁻¹; the
 * source and the published level constants are named in its SOURCE.md), read once for every test that uses it.
 */
export interface CoDatabaseLine {
  band: string;
  branch: 'P' | 'R';
  j: number;
  position: number;
  uncertainty: number;
}

export interface CoDatabase {
  lines: CoDatabaseLine[];
  published: Record<'B_v_MHz' | 'D_v_kHz' | 'H_v_mHz', { v: number[]; value: number[]; uncertainty: number[] }>;
}

export const CO_DATABASE: CoDatabase = JSON.parse(
  readFileSync(new URL('../fixtures/co-database-lines/lines.json', import.meta.url), 'utf8'),
) as CoDatabase;

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitLinearLines } from '../../src/linear/fit.js';
import { parseLinearSpecies } from '../../src/linear/species.js';

/** Real line tables from test/fixtures/linear-reference (copy of ../shared/fixtures/linear-reference.json). */
const DATA = JSON.parse(
  readFileSync(new URL('../fixtures/linear-reference/linear-reference.json', import.meta.url), 'utf8'),
) as { line_tables: Record<string, { transition: string; 'wavenumber_cm-1': number }[]> };

describe('real line tables', () => {
  it('CO2 laser bands 00⁰1–[10⁰0,02⁰0]_I,II (Witteman table, 116 lines, no σ) give the R&Y constants', () => {
    const table = DATA.line_tables[
      '12C16O2 laser bands 00011-10001 (10 um) and 00011-10002 (9 um): Witteman table'
    ] as { transition: string; 'wavenumber_cm-1': number }[];
    const lines = table.map((x) => {
      const m = /^(10|9)([PR])\((\d+)\)$/.exec(x.transition) as RegExpExecArray;
      return {
        position: x['wavenumber_cm-1'],
        assignment: {
          upper: { v: [0, 0, 1], l: 0 },
          lower: { v: [1, 0, 0], l: 0, r: m[1] === '10' ? 1 : 2 },
          branch: m[2] as 'P' | 'R',
          j: Number(m[3]),
        },
      };
    });
    const r = fitLinearLines(parseLinearSpecies('CO2'), lines);
    expect(r.statistics.fitted).toBe(116);
    const B = (key: string) => r.levels.find((l) => l.key === key)?.B?.value ?? Number.NaN;
    // Rothman & Young 1981 (read-secondary, RY1981), given to 7–8 digits: tolerance 1e-7 cm⁻¹ (rounding plus the
    // table's own higher-order terms, note §3).
    expect(Math.abs(B('0,0,1|0') - 0.3871414)).toBeLessThan(1e-7);
    expect(Math.abs(B('1,0,0|0|r1') - 0.39018893)).toBeLessThan(1e-7);
    expect(Math.abs(B('1,0,0|0|r2') - 0.3904823)).toBeLessThan(1e-7);
    // Band origins: Witteman polynomial a0 (960.95859171, 1063.7345712; note §1.1). Tolerance 3e-6 cm⁻¹ (the
    // 7-term polynomial and the table differ by up to 1.6e-4 at J = 58; near the origin by < 1e-7).
    const origin = (label: string) => r.bands.find((b) => b.label === label)?.origin?.value ?? Number.NaN;
    expect(Math.abs(origin('00⁰1–10⁰0_I') - 960.95859171)).toBeLessThan(3e-6);
    expect(Math.abs(origin('00⁰1–10⁰0_II') - 1063.7345712)).toBeLessThan(3e-6);
    // R&Y's 00011 − 10002 separation from the G_v (2349.1433 − 1285.4087 = 1063.7346, given to 1e-4).
    expect(Math.abs(origin('00⁰1–10⁰0_II') - 1063.7346)).toBeLessThan(2e-4);
  });

  it('OCS ν1 10⁰0–00⁰0 (17 HITRAN lines, code 5) gives B0 of NIST/Reinartz & Dymanus and the note', () => {
    const table = DATA.line_tables['OCS 16O12C32S nu1 band 10^0 0 - 00^0 0 (HITRAN)'] as {
      transition: string;
      'wavenumber_cm-1': number;
    }[];
    const lines = table.map((x) => {
      const m = /([PR])\((\d+)\)/.exec(x.transition) as RegExpExecArray;
      return {
        position: x['wavenumber_cm-1'],
        // HITRAN uncertainty code 5: 1e-5..1e-4 cm⁻¹ (code meaning recalled, note §2); the lower bound as σ.
        uncertainty: 1e-5,
        assignment: {
          upper: { v: [1, 0, 0], l: 0 },
          lower: { v: [0, 0, 0], l: 0 },
          branch: m[1] as 'P' | 'R',
          j: Number(m[2]),
        },
      };
    });
    const r = fitLinearLines(parseLinearSpecies('OCS'), lines);
    const b0 = r.levels.find((l) => l.key === '0,0,0|0')?.B;
    // NIST Triatomic / Reinartz & Dymanus 1974: 6081.492475 MHz = 0.2028567535 cm⁻¹ (read-secondary). Within 3σ of
    // our fitted σ plus 1e-8 for the HITRAN positions' 6 decimals.
    expect(Math.abs((b0?.value ?? 0) - 0.2028567535)).toBeLessThan(3 * (b0?.uncertainty ?? 0) + 1e-8);
    // The note's own pure-rotation fit 0.2028567424(38) (derived): within 3 combined σ.
    expect(Math.abs((b0?.value ?? 0) - 0.2028567424)).toBeLessThan(3 * Math.hypot(b0?.uncertainty ?? 0, 3.8e-9));
    // Band origin: 858.9669714(70) from the note's fit of HITRAN energies (derived): 3 combined σ.
    const o = r.bands[0]?.origin;
    expect(Math.abs((o?.value ?? 0) - 858.9669714)).toBeLessThan(3 * Math.hypot(o?.uncertainty ?? 0, 7e-6));
  });
});

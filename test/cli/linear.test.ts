import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EXIT, main } from '../../cli/main.js';

function run(args: string[]) {
  let out = '';
  let err = '';
  const code = main(args, { out: (s) => (out += s), err: (s) => (err += s), isTty: false });
  return { code, out, err };
}

describe('CLI with linear polyatomic molecules', () => {
  it('fits the README CO2 example: B of 00⁰1 and 00⁰0 in the table, the e/f convention printed', () => {
    const r = run(['fit', 'examples/co2-nu3-assigned.json']);
    expect(r.code).toBe(EXIT.pass);
    expect(r.out).toMatch(/00⁰1–00⁰0/);
    // B(00⁰1) printed as 0.38713… ± 0.0000051: R&Y's 0.3871414 (the scenario's source) lies within 2σ, so the
    // printed value starts 0.3871.
    expect(r.out).toMatch(/00⁰1\s+0\.3871\d+ ± 0\.00000\d/);
    expect(r.out).toMatch(/convention: .*lower \(\+\) for f/);
  });

  it('predicts N2O pure rotation in MHz from NIST constants: R(0) of HITRAN within 1e-6 cm⁻¹ (0.03 MHz)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'branchwise-linear-'));
    const body = join(dir, 'n2o.json');
    // NIST Triatomic Spectral Database, 14N2 16O: B0 = 12561.6348 MHz, D0 = 5.2808 kHz (read; note §1.4), converted
    // with 29 979.2458 MHz per cm⁻¹.
    writeFileSync(
      body,
      JSON.stringify({
        species: 'N2O',
        jMax: 2,
        unit: 'MHz',
        levels: [{ v: [0, 0, 0], l: 0, G: 0, B: 12561.6348 / 29979.2458, D: 5.2808e-3 / 29979.2458 }],
        bands: [{ upper: { v: [0, 0, 0], l: 0 }, lower: { v: [0, 0, 0], l: 0 } }],
      }),
    );
    const r = run(['predict', body, '--format', 'json']);
    expect(r.code).toBe(EXIT.pass);
    const lines = JSON.parse(r.out).lines as { branch: string; j: number; position: { value: number } }[];
    expect(lines.map((l) => `${l.branch}${l.j}`)).toEqual(['R0', 'R1', 'R2']);
    // HITRAN R(0) = 0.838022 cm⁻¹ = 25123.27 MHz (read; note §4, 6 decimals).
    expect(Math.abs((lines[0]?.position.value ?? 0) - 0.838022 * 29979.2458)).toBeLessThan(0.03);
  });

  it("predicts OCS from the library with no levels: sources cited, ν1 P(1) at HITRAN's 858.561245 cm⁻¹ within 5e-5", () => {
    const r = run(['predict', '--species', 'OCS', '--jmax', '5', '--format', 'json']);
    expect(r.code).toBe(EXIT.pass);
    const body = JSON.parse(r.out) as {
      source: string;
      sources: Record<string, { cite: string }>;
      lines: { band: string; branch: string; j: number; wavenumber: { value: number } }[];
    };
    expect(body.source).toBe('library');
    expect(Object.keys(body.sources).length).toBeGreaterThan(0);
    // HITRAN, OCS 10⁰0–00⁰0 P(1) (test/fixtures/linear-reference, read); the library's ν1 constants reproduce the
    // 17 HITRAN lines within 5e-5 cm⁻¹ (test/linear/reference.test.ts).
    const p1 = body.lines.find((l) => l.band === '10⁰0–00⁰0' && l.branch === 'P' && l.j === 1);
    expect(Math.abs((p1?.wavenumber.value as number) - 858.561245)).toBeLessThan(5e-5);
  });
});

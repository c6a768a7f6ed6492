import { describe, expect, it } from 'vitest';
import { checkRequestSchema } from '../../services/schemas/checks.js';
import { runCheck } from '../../services/usecases/check.js';
import { type ScanSpec, syntheticScan } from '../helpers/scans.js';

/**
 * QA checks on generated scans with reference-quality truth (library constants unperturbed: the gas is what the
 * library says), so that any deviation the checks measure is the one the generator put in.
 */
const schema = checkRequestSchema(100_000);
const HCL = [
  { species: 'H35Cl', abundance: 0.7576 },
  { species: 'H37Cl', abundance: 0.2424 },
];
const clean: ScanSpec = {
  isotopologues: HCL,
  bands: [{ upper: 1, lower: 0, strength: 1 }],
  temperature: 296,
  offset: 0,
  scalePpm: 0,
  sigma: 0.002,
  missing: 0,
  spurious: 0,
  detection: 1e-3,
  seed: 41,
  exactReference: true,
};
const check = (body: unknown) => runCheck(schema.parse(body));
const byId = (r: ReturnType<typeof check>, id: string) => {
  const c = r.checks.find((x) => x.id === id);
  if (!c) throw new Error(`no check ${id}`);
  return c;
};

describe('QA checks', () => {
  it('a clean HCl scan passes every check, and carries the safety caution', () => {
    const r = check({
      species: 'HCl',
      lines: syntheticScan(clean).peaks,
      tolerances: { temperature: { expected: 296, tolerance: 15 } },
    });
    expect(r.checks.map((c) => [c.id, c.status])).toEqual([
      ['identity', 'pass'],
      ['calibration', 'pass'],
      ['unexplained-lines', 'pass'],
      ['isotope-ratio', 'pass'],
      ['temperature', 'pass'],
      ['fit-quality', 'pass'],
    ]);
    expect(r.verdict).toBe('pass');
    expect(r.notice).toMatch(/certifies nothing/);
  });

  it('a scan shifted by 0.2 cm⁻¹ fails calibration, with the measured offset within ±0.01 cm⁻¹', () => {
    const r = check({ species: 'HCl', lines: syntheticScan({ ...clean, offset: 0.2 }).peaks });
    const c = byId(r, 'calibration');
    expect(c.status).toBe('fail');
    const off = (c.measured.offset as { value: number }).value;
    expect(Math.abs(off - 0.2)).toBeLessThan(0.01);
    expect(r.verdict).toBe('fail');
  });

  it('HBr lines declared as HCl fail identity and name HBr as the better match', () => {
    const hbr = syntheticScan({
      ...clean,
      isotopologues: [
        { species: 'H79Br', abundance: 0.5069 },
        { species: 'H81Br', abundance: 0.4931 },
      ],
    });
    const r = check({ species: 'HCl', lines: hbr.peaks });
    const c = byId(r, 'identity');
    expect(c.status).toBe('fail');
    expect(c.measured.bestMatch).toBe('1H-79Br');
    expect(r.verdict).toBe('fail');
  });

  it('30 % of the intensity from CO lines in an HCl scan fails unexplained-lines, lists them and names CO', () => {
    const hcl = syntheticScan({ ...clean, seed: 42 });
    const co = syntheticScan({ ...clean, isotopologues: [{ species: 'CO', abundance: 1 }], seed: 43 });
    const sum = (xs: { intensity: number }[]) => xs.reduce((s, p) => s + p.intensity, 0);
    const k = (0.3 / 0.7) * (sum(hcl.peaks) / sum(co.peaks));
    const lines = [...hcl.peaks, ...co.peaks.map((p) => ({ ...p, intensity: p.intensity * k }))];
    const r = check({ species: 'HCl', lines });
    const c = byId(r, 'unexplained-lines');
    expect(c.status).toBe('fail');
    expect(Math.abs((c.measured.fraction as number) - 0.3)).toBeLessThan(0.02);
    expect((c.measured.positions as number[]).length).toBe(co.peaks.length);
    expect((c.measured.explainedBy as { species: string }[])[0]?.species).toBe('12C-16O');
  });

  it('a ¹³C-enriched CO scan (10 % ¹³C against 1.07 % natural, CIAAW) warns on the isotope ratio', () => {
    const enriched = syntheticScan({
      ...clean,
      isotopologues: [
        { species: '12C16O', abundance: 0.9 },
        { species: '13C16O', abundance: 0.1 },
      ],
      seed: 44,
    });
    const r = check({ species: 'CO', lines: enriched.peaks });
    const c = byId(r, 'isotope-ratio');
    expect(c.status).toBe('warn');
    const ratio = (c.measured.ratios as { species: string; relativeToNatural: { value: number } }[]).find(
      (x) => x.species === '13C-16O',
    );
    // Expected (0.1/0.9) / (0.0107/0.9893) = 10.3 times natural, within 15 % (intensity noise 10 % per line).
    expect(Math.abs((ratio?.relativeToNatural.value as number) / (0.1 / 0.9 / (0.0107 / 0.9893)) - 1)).toBeLessThan(
      0.15,
    );
  });

  it.each([250, 296, 600, 1000, 1500])(
    'the rotational temperature of a %i K scan is recovered within 3σ and 2 %',
    (T) => {
      const scan = syntheticScan({
        ...clean,
        temperature: T,
        isotopologues: [{ species: 'CO', abundance: 1 }],
        seed: 50 + T,
        detection: 1e-2,
      });
      const r = check({ species: 'CO', lines: scan.peaks, options: { temperature: T } });
      // 10 % intensity noise per line gives σ_T ≈ 0.5–0.9 % (measured 2026-12-02: pulls −1.5…+0.7, all within 1.2 %).
      const t = byId(r, 'temperature').measured.temperature as { value: number; uncertainty: number };
      expect(Math.abs(t.value - T)).toBeLessThan(3 * t.uncertainty);
      expect(Math.abs(t.value / T - 1)).toBeLessThan(0.02);
    },
  );

  it('a check the data cannot evaluate says not-evaluated and why', () => {
    const bare = syntheticScan(clean).peaks.map((p) => ({ position: p.position, uncertainty: p.uncertainty }));
    const r = check({ species: 'HCl', lines: bare });
    const t = byId(r, 'temperature');
    expect(t.status).toBe('not-evaluated');
    expect(t.message).toMatch(/intensities/);
  });

  it('tolerances override the defaults and are echoed', () => {
    const r = check({
      species: 'HCl',
      lines: syntheticScan({ ...clean, offset: 0.2 }).peaks,
      tolerances: { calibrationOffset: 0.5 },
    });
    expect(byId(r, 'calibration').status).toBe('pass');
    expect(r.tolerances.calibrationOffset).toBe(0.5);
    expect(r.tolerances.calibrationScalePpm).toBe(20);
  });
});

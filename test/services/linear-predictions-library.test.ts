import { describe, expect, it } from 'vitest';
import { PredictionResponseSchema } from '../../services/schemas/predictions.js';
import { useApp } from '../helpers/app.js';
import { C2H2_1221, CO2_626, type GenLine, genBandLines, HCN_H12C14N } from '../helpers/independent-linear.js';

/**
 * POST /v1/predictions for linear molecules without `levels`: the reference library's constants, echoed with their
 * status and source, and the sources cited. Positions and relative intensities are compared with the independent
 * generator (test/helpers/independent-linear.ts: own term values, spin rule, Hönl–London closed forms), whose
 * constants are the published sets named beside each molecule there (Rothman & Young 1981 for CO2; the shared
 * note's HCN refit; recalled C2H2 ground and ν3, low confidence).
 */
const app = useApp();

interface Predicted {
  band: string;
  branch: 'P' | 'Q' | 'R';
  j: number;
  parity: string;
  wavenumber: { value: number; uncertainty: number | null };
  relativeIntensity: number;
  upper: { v: number[]; l: number };
  lower: { v: number[]; l: number };
}

const key = (branch: string, j: number, parity: string) => `${branch}${j}${parity}`;

/** The generator's lines of one band, by branch, J″ and lower parity. */
function truthOf(lines: readonly GenLine[]): Map<string, GenLine> {
  return new Map(lines.map((l) => [key(l.branch as string, l.j as number, l.lowerParity as string), l]));
}

/** Intensities of a band relative to one of its own lines, so that the band strength (not modelled) cancels. */
function ratios<T>(lines: readonly T[], intensity: (l: T) => number, ref: T): number[] {
  return lines.map((l) => intensity(l) / intensity(ref));
}

describe('linear predictions from the reference library', () => {
  it('CO2 with no levels and no bands: every library band, sources cited, ν3 positions and intensities as the generator', async () => {
    const res = await app().inject({ method: 'POST', url: '/v1/predictions', payload: { species: 'CO2', jMax: 40 } });
    expect(res.statusCode, res.body.slice(0, 300)).toBe(200);
    const body = res.json();
    expect(PredictionResponseSchema.safeParse(body).success).toBe(true);
    expect(body.source).toBe('library');
    expect(body.species).toBe('16O-12C-16O');
    // Every constant says where it comes from, and every source key is cited.
    for (const c of body.constants as { source: string; status: string }[]) {
      expect(['read', 'read-secondary', 'derived', 'recalled']).toContain(c.status);
      for (const k of c.source.split('+')) expect(body.sources[k]?.cite, k).toBeTypeOf('string');
    }
    const nu3 = (body.lines as Predicted[]).filter((l) => l.band === '00⁰1–00⁰0');
    // Ground state of 12C16O2: even J″ only; J″ ≤ 40: R(0..40) 21 lines, P(2..40) 20 lines.
    expect(nu3.length).toBe(41);
    expect(nu3.every((l) => l.j % 2 === 0)).toBe(true);
    const truth = truthOf(genBandLines(CO2_626, { upper: '00011', lower: '00001' }, 40, 296));
    expect(truth.size).toBe(41);
    // Positions: the library and the generator both carry Rothman & Young (1981) constants; agreement within
    // 2e-4 cm⁻¹ (the library's and the generator's higher terms may differ in the last digits).
    for (const l of nu3) {
      const t = truth.get(key(l.branch, l.j, l.parity)) as GenLine;
      expect(Math.abs(l.wavenumber.value - (t.truePosition as number)), `${l.branch}(${l.j})`).toBeLessThan(2e-4);
    }
    // Relative intensities inside the band (Hönl–London × Boltzmann × ν(1 − e^(−c₂ν/T))) within 1e-3 relative.
    const r16 = nu3.find((l) => l.branch === 'R' && l.j === 16) as Predicted;
    const ours = ratios(nu3, (l) => l.relativeIntensity, r16);
    const theirs = ratios(
      nu3.map((l) => truth.get(key(l.branch, l.j, l.parity)) as GenLine),
      (l) => l.intensity,
      truth.get(key('R', 16, 'e')) as GenLine,
    );
    ours.forEach((x, i) => {
      expect(Math.abs(x / (theirs[i] as number) - 1)).toBeLessThan(1e-3);
    });
  });

  it('C2H2 ν3 from the library: odd J″ three times even (spin weights), recalled constants give null uncertainties', async () => {
    const res = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: {
        species: 'C2H2',
        jMax: 20,
        bands: [{ upper: { v: [0, 0, 1, 0, 0], l: 0 }, lower: { v: [0, 0, 0, 0, 0], l: 0 } }],
      },
    });
    expect(res.statusCode, res.body.slice(0, 300)).toBe(200);
    const body = res.json();
    const lines = body.lines as Predicted[];
    const truth = truthOf(genBandLines(C2H2_1221, { upper: '00100', lower: '00000' }, 20, 296));
    const r5 = lines.find((l) => l.branch === 'R' && l.j === 5) as Predicted;
    const ours = ratios(lines, (l) => l.relativeIntensity, r5);
    const theirs = ratios(
      lines.map((l) => truth.get(key(l.branch, l.j, l.parity)) as GenLine),
      (l) => l.intensity,
      truth.get(key('R', 5, 'e')) as GenLine,
    );
    ours.forEach((x, i) => {
      expect(Math.abs(x / (theirs[i] as number) - 1)).toBeLessThan(1e-3);
    });
    // R(5) (odd, weight 3) against the mean of R(4) and R(6) (even, weight 1): close to 3 (Boltzmann and HL smooth).
    const at = (j: number) => (lines.find((l) => l.branch === 'R' && l.j === j) as Predicted).relativeIntensity;
    expect(at(5) / ((at(4) + at(6)) / 2)).toBeGreaterThan(2.8);
    expect(at(5) / ((at(4) + at(6)) / 2)).toBeLessThan(3.2);
    // The recalled ground and ν3 constants state no uncertainty: no position uncertainty is invented.
    expect(lines.every((l) => l.wavenumber.uncertainty === null)).toBe(true);
    expect(body.constants.some((c: { status: string }) => c.status === 'recalled')).toBe(true);
  });

  it('HCN 01¹0–00⁰0 (perpendicular): P, Q, R intensities in the Σ→Π Hönl–London ratios of the generator', async () => {
    const res = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: {
        species: 'HCN',
        jMax: 25,
        bands: [{ upper: { v: [0, 1, 0], l: 1 }, lower: { v: [0, 0, 0], l: 0 } }],
      },
    });
    expect(res.statusCode, res.body.slice(0, 300)).toBe(200);
    const lines = res.json().lines as Predicted[];
    const truth = truthOf(genBandLines(HCN_H12C14N, { upper: '0110', lower: '0000' }, 25, 296));
    expect(lines.length).toBe(truth.size);
    const q10 = lines.find((l) => l.branch === 'Q' && l.j === 10) as Predicted;
    const ours = ratios(lines, (l) => l.relativeIntensity, q10);
    const theirs = ratios(
      lines.map((l) => truth.get(key(l.branch, l.j, l.parity)) as GenLine),
      (l) => l.intensity,
      truth.get(key('Q', 10, 'e')) as GenLine,
    );
    ours.forEach((x, i) => {
      expect(Math.abs(x / (theirs[i] as number) - 1), `${lines[i]?.branch}(${lines[i]?.j})`).toBeLessThan(2e-3);
    });
    // Positions within 3e-4 cm⁻¹ of the generator's per-parity refit (the library's conversion to the l² form
    // keeps q_J = −(D_f − D_e) but averages the e/f H: ½ΔH·x³ = ½ · 1.29e-12 · 702³ ≈ 2.2e-4 cm⁻¹ at J′ = 26).
    for (const l of lines) {
      const t = truth.get(key(l.branch, l.j, l.parity)) as GenLine;
      expect(Math.abs(l.wavenumber.value - (t.truePosition as number)), `${l.branch}(${l.j})`).toBeLessThan(3e-4);
    }
  });

  it('a linear species without library constants and without levels: a 404 problem that says to send levels', async () => {
    const res = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: { species: '32S-12C-32S', bands: [{ upper: { v: [0, 0, 1], l: 0 }, lower: { v: [0, 0, 0], l: 0 } }] },
    });
    // SPECIES_NOT_IN_LIBRARY is a 404 throughout the service (services/errors.ts).
    expect(res.statusCode).toBe(404);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.json().detail).toMatch(/levels/);
  });
});

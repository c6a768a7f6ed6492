import { describe, expect, it } from 'vitest';
import { uninformativeIntensities } from '../../src/assign/analyse.js';
import { useApp } from '../helpers/app.js';

/*
 * Placeholder intensities (every line 1, or 0.5) used to make the assignment refuse the whole 1-0 band of CO. The
 * lists are made here from 12C-16O X¹Σ⁺ constants of Huber & Herzberg (1979) (values from memory), with this file's
 * own term values and J bookkeeping (not src/models): G(v) = ωe x − ωexe x² + ωeye x³, B_v = Be − αe x + γe x²,
 * D_v = De + βe x, x = v + ½, F = B_v J(J+1) − D_v [J(J+1)]², Gaussian noise σ 0.002 cm⁻¹ from a seeded generator.
 */
const HH = { we: 2169.81358, wexe: 13.28831, weye: 0.010511, Be: 1.93128087, ae: 0.01750441, ge: 5.487e-7 };
const HHD = { De: 6.12147e-6, be: 1.153e-9 };
const G = (v: number) => {
  const x = v + 0.5;
  return HH.we * x - HH.wexe * x * x + HH.weye * x ** 3;
};
const F = (v: number, J: number) => {
  const x = v + 0.5;
  const B = HH.Be - HH.ae * x + HH.ge * x * x;
  const D = HHD.De + HHD.be * x;
  const n = J * (J + 1);
  return B * n - D * n * n;
};

interface Truth {
  readonly upper: number;
  readonly branch: 'P' | 'R';
  readonly j: number;
}

/** Seeded uniform numbers (mulberry32) and Gaussian ones (Box–Muller). */
function gaussian(seed: number): () => number {
  let a = seed >>> 0;
  const u = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
}

/** R(0…25) and P(1…25) of each band v′-0 asked for, shuffled, positions with noise σ 0.002 cm⁻¹. */
function coList(uppers: readonly number[], seed: number): { position: number; truth: Truth }[] {
  const noise = gaussian(seed);
  const out: { position: number; truth: Truth }[] = [];
  for (const v of uppers) {
    for (let J = 0; J <= 25; J++) {
      out.push({ position: G(v) - G(0) + F(v, J + 1) - F(0, J), truth: { upper: v, branch: 'R', j: J } });
      if (J >= 1) out.push({ position: G(v) - G(0) + F(v, J - 1) - F(0, J), truth: { upper: v, branch: 'P', j: J } });
    }
  }
  // Shuffled by a seeded key, so the order says nothing.
  const keyed = out.map((l) => ({ l, k: noise() }));
  keyed.sort((a, b) => a.k - b.k);
  return keyed.map(({ l }) => ({ ...l, position: Math.round((l.position + 0.002 * noise()) * 1e5) / 1e5 }));
}

interface OutLine {
  readonly assignment?: { species: string; band: string; branch: string; j: number };
}

/** Lines whose assignment is the one that made them (12C-16O, band, branch, J). */
function correctlyAssigned(lines: readonly OutLine[], truth: readonly Truth[]): number {
  return lines.filter((l, i) => {
    const a = l.assignment;
    const t = truth[i] as Truth;
    return (
      a !== undefined && a.species === '12C-16O' && a.band === `${t.upper}-0` && a.branch === t.branch && a.j === t.j
    );
  }).length;
}

const ignoredWarning = (j: { warnings: { code: string; message: string }[] }) =>
  j.warnings.find((w) => w.code === 'INTENSITIES_IGNORED');

const app = useApp();

describe('placeholder intensities are ignored by the assignment', () => {
  it('a 1-0 list, every line at intensity 0.5 and no species: identified as CO and ≥ 98 % assigned correctly', async () => {
    const list = coList([1], 11);
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { lines: list.map((l) => ({ position: l.position, intensity: 0.5 })) },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.assignment.identification[0].species).toBe('12C-16O');
    expect(
      correctlyAssigned(
        j.lines,
        list.map((l) => l.truth),
      ),
    ).toBeGreaterThanOrEqual(Math.ceil(0.98 * list.length));
    expect(ignoredWarning(j)?.message).toMatch(/same intensity \(0\.5\)/);
  });

  it('the same list with species CO: ≥ 98 % assigned correctly, warning present', async () => {
    const list = coList([1], 12);
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: 'CO', lines: list.map((l) => ({ position: l.position, intensity: 0.5 })) },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(
      correctlyAssigned(
        j.lines,
        list.map((l) => l.truth),
      ),
    ).toBeGreaterThanOrEqual(Math.ceil(0.98 * list.length));
    expect(ignoredWarning(j)).toBeDefined();
  });

  it('1-0 and 2-0 as a ";" CSV with decimal commas, intensity 1, ?species=CO: both bands ≥ 98 % correct', async () => {
    const list = coList([1, 2], 13);
    const csv = [
      'Wavenumber (cm-1);Intensity',
      ...list.map((l) => `${l.position.toFixed(5).replace('.', ',')};1`),
    ].join('\n');
    const r = await app().inject({
      method: 'POST',
      url: '/v1/fits?species=CO',
      payload: csv,
      headers: { 'content-type': 'text/csv' },
    });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(j.lines).toHaveLength(list.length);
    const truth = list.map((l) => l.truth);
    expect(correctlyAssigned(j.lines, truth)).toBeGreaterThanOrEqual(Math.ceil(0.98 * list.length));
    // Each band on its own, so a band cannot be dropped behind a good total.
    for (const v of [1, 2]) {
      const idx = truth.flatMap((t, i) => (t.upper === v ? [i] : []));
      const ok = correctlyAssigned(
        idx.map((i) => j.lines[i]),
        idx.map((i) => truth[i] as Truth),
      );
      expect(ok).toBeGreaterThanOrEqual(Math.ceil(0.98 * idx.length));
    }
    expect(ignoredWarning(j)?.message).toMatch(/same intensity \(1\)/);
    expect(j.warnings.some((w: { message: string }) => /12C-16O band 1-0/.test(w.message))).toBe(false);
  });

  it('a band refused although its best offset matches its lines says why, instead of "absent or too weak"', async () => {
    // Intensities 1 except every tenth line at 1.5: a spread of ×1.5, beyond the ×1.2 rule, and more odd lines than
    // the rule's one in 50, so they are used (and mislead).
    const list = coList([1, 2], 13);
    const lines = list.map((l, i) => ({ position: l.position, intensity: i % 10 === 0 ? 1.5 : 1 }));
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO', lines } });
    expect(r.statusCode).toBe(200);
    const j = r.json();
    expect(ignoredWarning(j)).toBeUndefined();
    let withinReach = 0;
    for (const w of j.warnings as { code: string; message: string }[]) {
      if (w.code !== 'BAND_NOT_FOUND') continue;
      const m = /which matches (\d+) of them/.exec(w.message);
      // A best offset within reach that matches lines is never called absent; it names what refused it.
      if (m && Number(m[1]) >= 8 && !/beyond the/.test(w.message)) {
        expect(w.message).not.toMatch(/absent, too weak/);
        expect(w.message).toMatch(/yet refused: .*intensity ratio/);
        withinReach++;
      }
    }
    // Before bands their positions establish were exempt from the band intensity test, the 1-0 band was refused here
    // (withinReach 1); now its positions keep it, and the stray intensity scale is named instead.
    expect(withinReach).toBe(0);
    expect(j.warnings.map((w: { code: string }) => w.code)).toContain('INTENSITY_SCALE_DIFFERS');
  });
});

describe('uninformativeIntensities (the stated rule)', () => {
  const at = (xs: number[]) => xs.map((intensity, i) => ({ position: 2000 + i, intensity }));
  it('all equal, even zero, is ignored; a list without intensities or with one missing is left alone', () => {
    expect(uninformativeIntensities(at([1, 1, 1]))).toMatch(/same intensity \(1\)/);
    expect(uninformativeIntensities(at([0, 0]))).toMatch(/same intensity \(0\)/);
    expect(uninformativeIntensities([{ intensity: 1 }, {}, { intensity: 1 }])).toBeUndefined();
    expect(uninformativeIntensities([{}, {}])).toBeUndefined();
  });
  it('six or more lines within ×1.2 are ignored; ×1.3, or five lines, are not', () => {
    expect(uninformativeIntensities(at([1, 1.1, 1.05, 1.2, 1, 1.15]))).toMatch(/factor 1\.200/);
    expect(uninformativeIntensities(at([1, 1.1, 1.05, 1.3, 1, 1.15]))).toBeUndefined();
    expect(uninformativeIntensities(at([1, 1.1, 1.05, 1.2, 1]))).toBeUndefined();
  });
});

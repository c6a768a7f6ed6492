import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { ScienceError } from '../../src/errors.js';
import { predictBand } from '../../src/models/predict.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { parseCsv } from '../../src/spectra/csv.js';
import { parseJcamp } from '../../src/spectra/jcamp.js';
import { findPeaks } from '../../src/spectra/peaks.js';
import { type JcampForm, writeJcamp } from '../helpers/jcamp-writer.js';
import { syntheticSpectrum } from '../helpers/spectra.js';

// Lines of the CO fundamental from the library (Huber & Herzberg constants), J″ ≤ 18, strengths following the
// Boltzmann envelope at 296 K roughly (peak absorbance 0.05–0.5).
const y = dunhamFromEntry(constantsFor(parseSpecies('CO')) ?? (undefined as never));
const coLines = predictBand(y, { upper: 1, lower: 0 }, 18).map((p) => ({
  position: p.position,
  strength: 0.5 * ((p.branch === 'R' ? p.j + 1 : p.j) / 8) * Math.exp((-1.4388 * p.lowerEnergy) / 296) + 0.02,
}));

function nearestError(found: readonly { position: number }[], truth: number): number {
  let best = Number.POSITIVE_INFINITY;
  for (const f of found) if (Math.abs(f.position - truth) < Math.abs(best)) best = f.position - truth;
  return best;
}

describe('peak finding on synthetic Voigt spectra', () => {
  it.each([
    [0.01, 0.06, 0.03],
    [0.05, 0.2, 0.1],
    [0.5, 1.2, 0.6],
  ])(
    'sampling %f cm⁻¹ (Gaussian FWHM %f, Lorentzian %f): every line found to 10 % of the step, pulls below 5',
    (step, wG, wL) => {
      const s = syntheticSpectrum({
        lines: coLines,
        from: 2040,
        to: 2230,
        step,
        gaussianFwhm: wG,
        lorentzianFwhm: wL,
        noise: 0.0005,
        baseline: [0.05, 2e-4],
        seed: 3,
      });
      const r = findPeaks(s.x, s.y);
      const errors: number[] = [];
      for (const l of coLines) {
        const err = nearestError(r.peaks, l.position);
        const p = r.peaks.find((q) => Math.abs(q.position - l.position - err) < 1e-12) as { uncertainty: number };
        // Each line within a tenth of the step, or within 3σ where the noise limits a weak line.
        expect(Math.abs(err), `line at ${l.position}`).toBeLessThan(Math.max(0.1 * step, 3 * p.uncertainty));
        expect(Math.abs(err) / p.uncertainty).toBeLessThan(5);
        errors.push(Math.abs(err));
      }
      errors.sort((a, b) => a - b);
      expect(errors[errors.length >> 1] as number).toBeLessThan(0.03 * step);
      expect(r.peaks.length).toBe(coLines.length);
      // The noise is estimated from the fit residuals; the pseudo-Voigt's misfit to a true Voigt adds to it at coarse
      // sampling, so it may only over-estimate (conservative uncertainties), never fall below the true 5e-4.
      expect(r.noise).toBeGreaterThan(0.0005 * 0.85);
    },
  );

  it('separates a blend of two lines 0.8 FWHM apart', () => {
    const lines = [
      { position: 2100, strength: 0.3 },
      { position: 2100.16, strength: 0.2 },
    ];
    const s = syntheticSpectrum({
      lines,
      from: 2098,
      to: 2102,
      step: 0.01,
      gaussianFwhm: 0.16,
      lorentzianFwhm: 0.08,
      noise: 0.001,
      baseline: [0, 0],
      seed: 5,
    });
    const r = findPeaks(s.x, s.y);
    expect(r.peaks.length).toBe(2);
    // Within an eighth of the line width (0.19 cm⁻¹ FWHM) each.
    expect(Math.abs((r.peaks[0]?.position as number) - 2100)).toBeLessThan(0.025);
    expect(Math.abs((r.peaks[1]?.position as number) - 2100.16)).toBeLessThan(0.025);
  });

  it('handles transmittance in per cent and decreasing x', () => {
    const s = syntheticSpectrum({
      lines: coLines,
      from: 2040,
      to: 2230,
      step: 0.05,
      gaussianFwhm: 0.2,
      lorentzianFwhm: 0.1,
      noise: 0.001,
      baseline: [0, 0],
      seed: 6,
    });
    const xr = Float64Array.from(s.x).reverse();
    const tr = Float64Array.from(s.y, (a) => 100 * 10 ** -a).reverse();
    const r = findPeaks(xr, tr, { yUnit: 'transmittance' });
    expect(r.peaks.length).toBe(coLines.length);
    for (const l of coLines) expect(Math.abs(nearestError(r.peaks, l.position))).toBeLessThan(0.005);
  });
});

describe('JCAMP-DX', () => {
  const s = syntheticSpectrum({
    lines: coLines,
    from: 2040,
    to: 2230,
    step: 0.05,
    gaussianFwhm: 0.2,
    lorentzianFwhm: 0.1,
    noise: 0.002,
    baseline: [0.05, 2e-4],
    seed: 7,
  });
  const forms: JcampForm[] = ['AFFN', 'PAC', 'SQZ', 'DIF', 'DIFDUP'];
  it.each(forms)('%s round trip reproduces every point to the Y quantum, and the constants are recovered', (form) => {
    const text = writeJcamp(s.x, s.y, form, { yFactor: 1e-5, perLine: 12 });
    const d = parseJcamp(text);
    if (d.kind !== 'spectrum') throw new Error('expected a spectrum');
    expect(d.x.length).toBe(s.x.length);
    for (let i = 0; i < s.x.length; i++) {
      expect(Math.abs((d.y[i] as number) - (s.y[i] as number))).toBeLessThanOrEqual(0.5e-5 + 1e-12);
      expect(Math.abs((d.x[i] as number) - (s.x[i] as number))).toBeLessThan(1e-9);
    }
    const peaks = findPeaks(d.x, d.y).peaks;
    const a = analyseLineList(
      peaks.map((p) => ({ position: p.position, uncertainty: p.uncertainty, intensity: p.intensity })),
      parseSpecies('CO'),
    );
    const b = a.result.equilibrium[0]?.B_e;
    // Huber & Herzberg B_e(CO) = 1.93128087 cm⁻¹; tolerance 4σ plus 1e-5 for the neglected γ_e.
    expect(Math.abs((b?.value as number) - 1.93128087)).toBeLessThan(4 * (b?.uncertainty as number) + 1e-5);
  });

  it('reads decreasing X, XFACTOR, ##XYPOINTS and ##PEAK TABLE, with labels spelled loosely', () => {
    const xs = Float64Array.from([2200, 2199.5, 2199, 2198.5, 2198, 2197.5, 2197, 2196.5]);
    const ys = Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8]);
    const t = writeJcamp(xs, ys, 'DIFDUP', { yFactor: 1, xFactor: 0.5, perLine: 4 })
      .replace('##XFACTOR', '## x_factor')
      .replace('##NPOINTS', '##N Points');
    const d = parseJcamp(t);
    expect(d.kind).toBe('spectrum');
    if (d.kind === 'spectrum') {
      expect(Array.from(d.x)).toEqual(Array.from(xs));
      expect(Array.from(d.y)).toEqual(Array.from(ys));
    }
    const pts = parseJcamp(
      '##TITLE=t\n##XUNITS=1/CM\n##XYPOINTS=(XY..XY)\n2000.5, 0.1; 2001.0, 0.2\n2001.5,0.3\n##END=',
    );
    expect(pts.kind === 'spectrum' && Array.from(pts.y)).toEqual([0.1, 0.2, 0.3]);
    const pk = parseJcamp('##TITLE=t\n##PEAK TABLE=(XY..XY)\n2143.27,0.5 2147.08,0.4\n##END=');
    expect(pk.kind === 'peaks' && pk.peaks.map((p) => p.x)).toEqual([2143.27, 2147.08]);
  });

  it.each([
    ['no title', '##XYDATA=(X++(Y..Y))\n1 2 3\n##END=', /TITLE/],
    [
      'NPOINTS mismatch',
      '##TITLE=t\n##FIRSTX=1\n##LASTX=3\n##NPOINTS=5\n##XYDATA=(X++(Y..Y))\n1 2 3 4\n##END=',
      /NPOINTS/,
    ],
    [
      'a failed DIF check',
      '##TITLE=t\n##FIRSTX=1\n##LASTX=6\n##NPOINTS=6\n##XYDATA=(X++(Y..Y))\n1 A J J\n3 D J J\n##END=',
      /line 7.*check/,
    ],
    [
      'garbage in the data',
      '##TITLE=t\n##FIRSTX=1\n##LASTX=3\n##NPOINTS=3\n##XYDATA=(X++(Y..Y))\n1 2 ! 3\n##END=',
      /line 6/,
    ],
    [
      'an X out of step',
      '##TITLE=t\n##FIRSTX=1\n##LASTX=4\n##NPOINTS=4\n##XYDATA=(X++(Y..Y))\n1 1 2\n9 3 4\n##END=',
      /line 7.*does not continue/,
    ],
  ])('refuses %s with an error that names the line', (_n, text, msg) => {
    try {
      parseJcamp(text);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ScienceError);
      expect((e as Error).message).toMatch(msg);
    }
  });
});

describe('CSV', () => {
  it('reads a spectrum with a header and a line list without one', () => {
    const sp = parseCsv(
      `wavenumber,transmittance\n${Array.from({ length: 30 }, (_, i) => `${2000 + i * 0.1},${0.9}`).join('\n')}`,
    );
    expect(sp.kind).toBe('spectrum');
    expect(sp.kind === 'spectrum' && sp.yUnit).toBe('transmittance');
    const ll = parseCsv('2143.27;0.5\n2147.08;0.4\n2139.43;0.45\n');
    expect(ll.kind).toBe('lines');
    expect(ll.kind === 'lines' && ll.lines[1]).toEqual({ position: 2147.08, intensity: 0.4 });
  });
  it('names the line of a bad row', () => {
    expect(() => parseCsv('x,y\n1,2\n3,oops\n')).toThrow(/line 3/);
  });
});

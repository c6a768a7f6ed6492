/**
 * Messages and fields of POST /v1/checks that a first-time user reads: a band the library predicts but the
 * assignment missed, the measured isotope abundance ratio, where the calibration offset is quoted, and the accepted
 * tolerance keys. Lines come from the independent generator (test/helpers/independent-lines.ts, published HCl
 * constants with the higher terms), never from src/models.
 */
import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO_DATABASE } from '../helpers/co-database.js';
import {
  type CustomaryConstants,
  HCL_1_35,
  independentLines,
  type MoleculeConstants,
} from '../helpers/independent-lines.js';

const app = useApp();

interface CheckOut {
  id: string;
  status: string;
  message: string;
  measured: Record<string, unknown>;
}

async function check(body: Record<string, unknown>) {
  const r = await app().inject({ method: 'POST', url: '/v1/checks', payload: body });
  expect(r.statusCode).toBe(200);
  const j = r.json();
  const byId = (id: string) => j.checks.find((c: CheckOut) => c.id === id) as CheckOut;
  return { j, byId };
}

/**
 * HCl 1-0 (J″ ≤ 10) with an instrument offset of +0.05 cm⁻¹ and the 2-0 overtone (J″ ≤ 8) shifted a further
 * `overtoneShift`, its intensities scaled by 0.005 (a weak overtone: its 17 lines carry about 1 % of the intensity,
 * below the 2.5 % at which the share alone warns).
 */
function fundamentalAndOvertone(overtoneShift: number) {
  const g = independentLines({
    molecule: HCL_1_35,
    bands: [
      { upper: 1, lower: 0, jMax: 10, offset: 0.05 },
      { upper: 2, lower: 0, jMax: 8, offset: 0.05 + overtoneShift },
    ],
    sigma: 0.001,
    seed: 7,
    temperature: 296,
    unassigned: true,
  });
  return g.lines.map((l, i) => ({
    ...l,
    intensity: (l.intensity as number) * (g.truth[i]?.band === '2-0' ? 0.005 : 1),
  }));
}

describe('unexplained-lines and a predicted band that was not found', () => {
  it('warns, naming the band and its best offset, when the overtone lies beyond maxOffset', async () => {
    const lines = fundamentalAndOvertone(0.6);
    const { j, byId } = await check({ species: 'HCl', lines });
    const u = byId('unexplained-lines');
    // The intensity share alone would pass (it is below half the 5 % default).
    expect(u.measured.fraction as number).toBeLessThan(0.025);
    expect(u.measured.count).toBe(17);
    expect(u.status).toBe('warn');
    const missed = u.measured.bandsNotMatched as { species: string; band: string; offset: number; matches: number }[];
    expect(missed.map((m) => `${m.species} ${m.band}`)).toEqual(['1H-35Cl 2-0']);
    // Shifted 0.6 cm⁻¹ beyond the fundamental's offset: the best offset is at least 0.5 (the default search).
    expect(missed[0]?.offset).toBeGreaterThan(0.5);
    expect(missed[0]?.matches).toBeGreaterThanOrEqual(4);
    expect(u.message).toMatch(/1H-35Cl band 2-0 at its best offset \+0\.\d{3} cm-1/);
    const vib = j.fit.warnings.find(
      (w: { code: string; message: string }) =>
        w.code === 'VIBRATION_NEEDS_TWO_INTERVALS' && w.message.startsWith('1H-35Cl:'),
    );
    expect(vib.message).toMatch(/band 2-0 .* not matched/);
    expect(vib.message).not.toMatch(/e\.g\. a fundamental and an overtone/);
  });

  it('passes and names no band when the overtone is within reach and assigned', async () => {
    const { j, byId } = await check({ species: 'HCl', lines: fundamentalAndOvertone(0) });
    const u = byId('unexplained-lines');
    expect(u.status).toBe('pass');
    expect(u.measured.bandsNotMatched).toEqual([]);
    expect(j.fit.warnings.some((w: { code: string }) => w.code === 'VIBRATION_NEEDS_TWO_INTERVALS')).toBe(false);
  });
});

/**
 * ¹H³⁷Cl from the ¹H³⁵Cl constants by the isotopic relations (ρ = √(μ³⁵/μ³⁷): ω_e ρ, ω_e x_e ρ², ω_e y_e ρ³,
 * ω_e z_e ρ⁴, B_e ρ², α_e ρ³, γ_e ρ⁴, D_e ρ⁴, β_e ρ⁵, H_e ρ⁶). Atomic masses AME2020, from memory:
 * ¹H 1.00782503, ³⁵Cl 34.96885268, ³⁷Cl 36.96590259 u.
 */
function hcl37(): MoleculeConstants {
  const mu = (m: number) => (1.00782503 * m) / (1.00782503 + m);
  const rho = Math.sqrt(mu(34.96885268) / mu(36.96590259));
  const powers: Record<keyof CustomaryConstants, number> = {
    omega_e: 1,
    omega_e_x_e: 2,
    omega_e_y_e: 3,
    omega_e_z_e: 4,
    B_e: 2,
    alpha_e: 3,
    gamma_e: 4,
    D_e: 4,
    beta_e: 5,
    H_e: 6,
    L_e: 8,
  };
  const c: Record<string, { value: number; source: string }> = {};
  for (const [k, v] of Object.entries(HCL_1_35.constants)) {
    c[k] = { value: v.value * rho ** powers[k as keyof CustomaryConstants], source: `${v.source}; scaled by ρ` };
  }
  return { formula: '1H-37Cl', constants: c as unknown as CustomaryConstants };
}

/** An HCl 1-0 list of both isotopologues, the ³⁷Cl lines' intensities times `abundance37 / abundance35`, 3 % noise. */
function mixedList(abundance35: number, abundance37: number, intensityNoise = 0.03) {
  const opts = {
    bands: [{ upper: 1, lower: 0, jMax: 9 }],
    sigma: 0.001,
    temperature: 296,
    intensityNoise,
    unassigned: true,
  };
  const a = independentLines({ ...opts, molecule: HCL_1_35, seed: 11 });
  const b = independentLines({ ...opts, molecule: hcl37(), seed: 12 });
  return [
    ...a.lines,
    ...b.lines.map((l) => ({ ...l, intensity: ((l.intensity as number) * abundance37) / abundance35 })),
  ];
}

describe('isotope-ratio gives the measured abundance ratio', () => {
  // Natural chlorine: ³⁵Cl 0.7576, ³⁷Cl 0.2424 (CIAAW, from memory): H³⁵Cl/H³⁷Cl = 3.125.
  it.each([
    ['natural', 0.2424, 0.7576 / 0.2424],
    ['enriched twofold in 37Cl', 0.4848, 0.7576 / 0.4848],
  ])('%s chlorine', async (_name, abundance37, expected) => {
    const { byId } = await check({ species: 'HCl', lines: mixedList(0.7576, abundance37) });
    const iso = byId('isotope-ratio');
    expect(iso.status).not.toBe('not-evaluated');
    const r = (iso.measured.ratios as { abundanceRatio: { ratio: string; value: number; uncertainty: number } }[])[0];
    expect(r?.abundanceRatio.ratio).toBe('1H-35Cl/1H-37Cl');
    // With 3 % intensity noise on 19 pairs σ is about 1 %; tolerance 3σ plus 0.5 % for the check's intensity model
    // (library energies, fitted T), which is not the generator's (noise-free lists come out within 0.05 %).
    const u = r?.abundanceRatio.uncertainty as number;
    expect(u).toBeGreaterThan(0.002 * expected);
    expect(u).toBeLessThan(0.03 * expected);
    expect(Math.abs((r?.abundanceRatio.value as number) - expected)).toBeLessThan(3 * u + 0.005 * expected);
    expect(iso.message).toContain(`1H-35Cl/1H-37Cl = ${r?.abundanceRatio.value.toFixed(3)} ±`);
  });
});

describe('isotope-ratio prints its uncertainty with two significant digits', () => {
  it('intensities good to 0.03 %: the ratio is not printed as "± 0.000"', async () => {
    const { byId } = await check({ species: 'HCl', lines: mixedList(0.7576, 0.2424, 0.0003) });
    const iso = byId('isotope-ratio');
    const r = (iso.measured.ratios as { abundanceRatio: { value: number; uncertainty: number } }[])[0];
    const u = r?.abundanceRatio.uncertainty as number;
    expect(u).toBeLessThan(0.0005); // small enough that three decimals printed it as 0.000
    const m = /1H-35Cl\/1H-37Cl = (\d+\.\d+) ± (\d+\.\d+) \(natural/.exec(iso.message);
    expect(m, iso.message).not.toBeNull();
    const [, value = '', printed = ''] = m as RegExpExecArray;
    expect(Number(printed)).toBeGreaterThan(0);
    // two significant digits of u, and the value to the same decimal place
    expect(Number(printed)).toBeCloseTo(Number(u.toPrecision(2)), 12);
    expect(value.split('.')[1]?.length).toBe(printed.split('.')[1]?.length);
  });
});

describe('calibration says where the offset is quoted and which estimate it is', () => {
  it('quotes the offset at the weighted centre of the lines, and sets it apart from the search estimate', async () => {
    const lines = fundamentalAndOvertone(0);
    const { j, byId } = await check({ species: 'HCl', lines });
    const c = byId('calibration');
    const centre = c.measured.centre as number;
    const positions = lines.map((l) => l.position);
    expect(centre).toBeGreaterThan(Math.min(...positions));
    expect(centre).toBeLessThan(Math.max(...positions));
    expect(c.message).toContain(
      `cm-1 at ${centre.toFixed(1)} cm-1 (the weighted centre of ${c.measured.lines} lines with J″ ≤ 20,`,
    );
    expect(c.message).toMatch(/fit\.assignment\.calibration is the assignment's search estimate/);
    expect(j.fit.assignment.calibration).toBeDefined();
    const spec = (await app().inject({ method: 'GET', url: '/openapi.json' })).json();
    expect(JSON.stringify(spec)).toContain("the assignment's search estimate");
  });
});

describe('a wrong tolerance key lists the accepted ones', () => {
  const accepted = [
    'identityOrigin',
    'identityB',
    'calibrationOffset',
    'calibrationScalePpm',
    'unexplainedFraction',
    'isotopeRatio',
    'temperature',
    'maxReducedChiSquare',
    'maxRejectedFraction',
    'minCompleteness',
  ];
  const lines = fundamentalAndOvertone(0).slice(0, 12);

  it('REST', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/checks',
      payload: { species: 'HCl', lines, tolerances: { calibration: 0.1 } },
    });
    expect(r.statusCode).toBe(400);
    expect(r.headers['content-type']).toMatch(/application\/problem\+json/);
    const detail = r.json().detail as string;
    expect(detail).toContain('"calibration"');
    for (const k of accepted) expect(detail).toContain(k);
  });

  it('GraphQL', async () => {
    const q = 'query C($i: FitInput!, $t: JSON) { check(input: $i, tolerances: $t) { verdict } }';
    const g = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: q, variables: { i: { species: 'HCl', lines }, t: { calibration: 0.1 } } },
    });
    const text = JSON.stringify(g.json().errors);
    expect(text).toContain('calibration');
    for (const k of accepted) expect(text).toContain(k);
  });
});

describe('identity and calibration messages on real CO lines', () => {
  it('the runner-up named is another molecule, and a bare-line ranking that put another molecule first is said to be inconclusive', async () => {
    // the fundamental with its saturated centre removed (J 3–14), positions only, CO declared: the ranking of the
    // bare lines once put 1H-79Br first (0.15) while the message named 12C-16O as its own runner-up
    const lines = CO_DATABASE.lines
      .filter((l) => l.band === '1-0' && (l.j < 3 || l.j > 14))
      .map((l) => ({ position: l.position }));
    const { byId } = await check({ species: 'CO', lines });
    const identity = byId('identity');
    const runnerUp = identity.measured.runnerUp as string | null;
    if (runnerUp !== null) expect(runnerUp).not.toMatch(/^1[23]C-1[678]O$/);
    expect(identity.message).not.toMatch(/runner-up 1[23]C-1[678]O/);
    const bestMatch = identity.measured.bestMatch as string | null;
    if (identity.status === 'pass' && bestMatch !== null && !/C-1[678]O$/.test(bestMatch)) {
      expect(identity.message).toContain(`put ${bestMatch} first`);
      expect(identity.message).toContain('not conclusive');
    }
  });

  it('a calibration uncertainty far below 1e-4 cm-1 is printed with two significant digits, not as 0.0000', async () => {
    // 1-0 and 2-0 with their database uncertainties (1e-6 … 1e-5 cm-1): the offset's σ is ~1e-6 cm-1
    const lines = CO_DATABASE.lines
      .filter((l) => l.band === '1-0' || l.band === '2-0')
      .map((l) => ({ position: l.position, uncertainty: l.uncertainty }));
    const { byId } = await check({ species: 'CO', lines });
    const calibration = byId('calibration');
    expect(calibration.message).toMatch(/offset -?\d\.\d+ ± \d\.\d+ cm-1/);
    expect(calibration.message).not.toMatch(/± 0\.0+ /);
    const sigma = /offset -?\d\.\d+ ± (\d\.\d+) cm-1/.exec(calibration.message)?.[1] ?? '';
    // two significant digits: the uncertainty printed is its first two non-zero digits
    expect(sigma.replace(/^0\.0*/, '')).toHaveLength(2);
  });
});

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import {
  compileDunham,
  dunhamEnergy,
  dunhamKey,
  dunhamModel,
  dunhamParameters,
  massReducedParameters,
  massReducedUnit,
} from '../../src/models/dunham.js';
import { levelModel, levelParameters, levelStructure } from '../../src/models/level-model.js';
import { buildDesign, type Observation, predictPosition } from '../../src/models/linear-model.js';
import { predictBand } from '../../src/models/predict.js';
import {
  formatBand,
  parseBand,
  transitionKey,
  transitionLabel,
  upperJ,
  validateTransition,
} from '../../src/models/transitions.js';

// Fast checks of the spectroscopic models against what the project did not make: real 12C16O line positions
// (HITRAN2020 via test/fixtures/co-database-lines/, with the level constants of Gendriesch et al. 2009 stored beside
// them) and term values written out by hand here, with their own J bookkeeping (R: J′ = J″ + 1, P: J′ = J″ − 1).
// Everything is computed inside `it` so that mutation testing sees it.

interface FixtureLine {
  band: string;
  branch: 'P' | 'R';
  j: number;
  position: number;
}
const fixture = JSON.parse(
  readFileSync(new URL('../fixtures/co-database-lines/lines.json', import.meta.url), 'utf8'),
) as {
  lines: FixtureLine[];
  published: Record<'B_v_MHz' | 'D_v_kHz' | 'H_v_mHz', { v: number[]; value: number[] }>;
};
/** MHz per cm⁻¹: c = 299 792 458 m/s exactly (CODATA). */
const MHZ_PER_CM = 29979.2458;

function observation(band: string, branch: 'P' | 'R', j: number, species = '12C-16O', index = 0): Observation {
  const [upperV, lowerV] = band.split('-').map(Number) as [number, number];
  return {
    index,
    species,
    upperV,
    lowerV,
    upperJ: branch === 'R' ? j + 1 : j - 1,
    lowerJ: j,
    position: 0,
    weight: 1,
  };
}

describe('level model against real 12C16O lines (HITRAN2020) and published level constants', () => {
  // Gendriesch et al., A&A 497, 927 (2009), Table 2 (fixture `published`): B_v, D_v, H_v of v = 0 and 1.
  // Band origin of 1-0: 2143.27111 cm⁻¹ (from memory; the same value to 1e-5 follows from the fixture's R(0) with
  // these constants).
  function values(params: ReturnType<typeof levelParameters>): number[] {
    const p = fixture.published;
    return params.map((q) => {
      const v = q.v as number;
      if (q.kind === 'T') return 2143.27111;
      if (q.kind === 'B') return (p.B_v_MHz.value[v] as number) / MHZ_PER_CM;
      if (q.kind === 'D') return (p.D_v_kHz.value[v] as number) / 1e3 / MHZ_PER_CM;
      if (q.kind === 'H') return (p.H_v_mHz.value[v] as number) / 1e9 / MHZ_PER_CM;
      throw new Error(`unexpected ${q.kind}`);
    });
  }

  it('pure rotation R(0)–R(40) of v = 0 to 2e-5 cm⁻¹ (the database positions carry 1e-6)', () => {
    const lines = fixture.lines.filter((l) => l.band === '0-0' && l.j <= 40);
    const obs = lines.map((l, i) => observation(l.band, l.branch, l.j, '12C-16O', i));
    const params = levelParameters(levelStructure(obs), 3);
    expect(params.map((p) => p.name)).toEqual(['B_0', 'D_0', 'H_0']);
    const model = levelModel(params);
    const x = values(params);
    expect(lines.length).toBe(41);
    for (const [i, l] of lines.entries()) {
      expect(Math.abs(predictPosition(model, x, obs[i] as Observation) - l.position), `R(${l.j})`).toBeLessThan(2e-5);
    }
  });

  it('the fundamental 1-0, P(1)–P(30) and R(0)–R(30), to 3e-4 cm⁻¹ (band origin from memory to 1e-5)', () => {
    const lines = fixture.lines.filter((l) => l.band === '1-0' && l.j <= 30);
    const obs = lines.map((l, i) => observation(l.band, l.branch, l.j, '12C-16O', i));
    const params = levelParameters(levelStructure(obs), 3);
    expect(params.map((p) => p.name)).toEqual(['T_1-T_0', 'B_0', 'D_0', 'H_0', 'B_1', 'D_1', 'H_1']);
    const model = levelModel(params);
    const x = values(params);
    expect(lines.length).toBe(61);
    const design = buildDesign(model, obs);
    const n = obs.length;
    for (const [i, l] of lines.entries()) {
      const o = obs[i] as Observation;
      const viaModel = predictPosition(model, x, o);
      let viaDesign = 0;
      for (let k = 0; k < params.length; k++) viaDesign += (design[k * n + i] as number) * (x[k] as number);
      expect(Math.abs(viaModel - l.position), `${l.branch}(${l.j})`).toBeLessThan(3e-4);
      expect(Math.abs(viaDesign - viaModel)).toBeLessThan(1e-9);
    }
  });

  it('coefficients by hand: R(3) of 1-0 is T + x′B₁ − x′²D₁ + x′³H₁ + x′⁴L₁ − (x″B₀ − x″²D₀ + x″³H₀ + x″⁴L₀)', () => {
    const o = observation('1-0', 'R', 3);
    const params = levelParameters(levelStructure([o]), 4);
    const model = levelModel(params);
    const xu = 20; // J′ = 4
    const xl = 12; // J″ = 3
    const expected: Record<string, number> = {
      'T_1-T_0': 1,
      B_0: -xl,
      D_0: xl ** 2,
      H_0: -(xl ** 3),
      L_0: -(xl ** 4),
      B_1: xu,
      D_1: -(xu ** 2),
      H_1: xu ** 3,
      L_1: xu ** 4,
    };
    expect(Object.fromEntries(params.map((p) => [p.name, model.coefficient(p, o)]))).toEqual(expected);
    // Another species' parameters do not enter this line.
    const other = observation('1-0', 'R', 3, '13C-16O');
    expect(params.map((p) => model.coefficient(p, other))).toEqual(params.map(() => 0));
    // A level the line does not touch does not enter it.
    const hot = observation('3-2', 'P', 5);
    expect(params.map((p) => model.coefficient(p, hot))).toEqual(params.map(() => 0));
  });
});

describe('level structure: connected sets of levels, their reference level, parameter names', () => {
  it('bands 2-1 and 4-3 alone give two sets referred to v = 1 and v = 3; 1-0 joins nothing else', () => {
    const obs = [
      observation('4-3', 'R', 1),
      observation('2-1', 'P', 2),
      observation('1-0', 'R', 0, 'D-35Cl'),
      observation('2-1', 'R', 0),
    ];
    const s = levelStructure(obs);
    expect(s.species).toEqual(['12C-16O', 'D-35Cl']);
    expect(s.levels.get('12C-16O')).toEqual([1, 2, 3, 4]);
    expect([...(s.reference.get('12C-16O') ?? [])]).toEqual([
      [1, 1],
      [2, 1],
      [3, 3],
      [4, 3],
    ]);
    expect([...(s.reference.get('D-35Cl') ?? [])]).toEqual([
      [0, 0],
      [1, 0],
    ]);
    const order = new Map([
      ['12C-16O|2', 2],
      ['D-35Cl|1', 3],
    ]);
    expect(levelParameters(s, order).map((p) => p.name)).toEqual([
      'T_2-T_1(12C-16O)',
      'T_4-T_3(12C-16O)',
      'B_1(12C-16O)',
      'B_2(12C-16O)',
      'D_2(12C-16O)',
      'B_3(12C-16O)',
      'B_4(12C-16O)',
      'T_1-T_0(D-35Cl)',
      'B_0(D-35Cl)',
      'B_1(D-35Cl)',
      'D_1(D-35Cl)',
      'H_1(D-35Cl)',
    ]);
    const keys = levelParameters(s, 1).map((p) => p.key);
    expect(keys).toContain('12C-16O|T|4');
    expect(keys).toContain('D-35Cl|B|1');
    expect(new Set(keys).size).toBe(keys.length);
  });

  it('a chain 3-2, 2-1, 1-0 given top down is one set referred to v = 0', () => {
    const s = levelStructure([observation('3-2', 'R', 1), observation('2-1', 'R', 1), observation('1-0', 'R', 1)]);
    expect([...(s.reference.get('12C-16O') ?? [])]).toEqual([
      [0, 0],
      [1, 0],
      [2, 0],
      [3, 0],
    ]);
    expect(levelParameters(s, 2).map((p) => p.unit)).toEqual(Array(11).fill('cm-1'));
    const t = levelParameters(s, 1).filter((p) => p.kind === 'T');
    expect(t.map((p) => [p.name, p.v, p.unit, p.species])).toEqual([
      ['T_1-T_0', 1, 'cm-1', '12C-16O'],
      ['T_2-T_0', 2, 'cm-1', '12C-16O'],
      ['T_3-T_0', 3, 'cm-1', '12C-16O'],
    ]);
  });
});

describe('a pure-rotation line of an excited level', () => {
  it('carries no term value: R(2) of 1-1 has T_1 − T_0 coefficient 0 and B_1 coefficient x′ − x″', () => {
    const obs = [observation('1-0', 'R', 2), observation('1-1', 'R', 2)];
    const params = levelParameters(levelStructure(obs), 1);
    expect(params.map((p) => p.name)).toEqual(['T_1-T_0', 'B_0', 'B_1']);
    const m = levelModel(params);
    expect(params.map((p) => m.coefficient(p, obs[1] as Observation))).toEqual([0, 0, 12 - 6]);
    expect(params.map((p) => m.coefficient(p, obs[0] as Observation))).toEqual([1, -6, 12]);
  });
});

describe('Dunham model against term values written out by hand', () => {
  // CO, Huber & Herzberg (1979) X ¹Σ⁺ via the NIST WebBook (REFERENCE-DATA.md): ω_e 2169.81358, ω_e x_e 13.28831,
  // B_e 1.93128087, α_e 0.01750441, D_e 6.1215e-6 cm⁻¹ (ω_e y_e 0.0104 from memory, sign +).
  const we = 2169.81358;
  const wexe = 13.28831;
  const weye = 0.0104;
  const Be = 1.93128087;
  const ae = 0.01750441;
  const De = 6.1215e-6;
  const y = new Map([
    ['1,0', we],
    ['2,0', -wexe],
    ['3,0', weye],
    ['0,1', Be],
    ['1,1', -ae],
    ['0,2', -De],
  ]);
  const term = (v: number, J: number) => {
    const h = v + 0.5;
    const x = J * (J + 1);
    return we * h - wexe * h * h + weye * h * h * h + (Be - ae * h) * x - De * x * x;
  };

  it('E(v, J) equals the customary term formula to 1e-9 cm⁻¹', () => {
    for (const [v, J] of [
      [0, 0],
      [0, 7],
      [1, 0],
      [2, 13],
      [5, 40],
    ] as const) {
      expect(Math.abs(dunhamEnergy(y, v, J) - term(v, J))).toBeLessThan(1e-9);
      expect(compileDunham(y)(v, J)).toBe(dunhamEnergy(y, v, J));
    }
  });

  it('predictBand: P(1)…P(20) and R(0)…R(20) of 2-1 by hand, E″ from (0, 0); pure rotation has R lines only', () => {
    const lines = predictBand(y, { upper: 2, lower: 1 }, 20);
    expect(lines.map((l) => `${l.branch}${l.j}`)).toEqual([
      ...Array.from({ length: 20 }, (_, i) => `P${i + 1}`),
      ...Array.from({ length: 21 }, (_, i) => `R${i}`),
    ]);
    for (const l of lines) {
      const ju = l.branch === 'R' ? l.j + 1 : l.j - 1;
      expect(Math.abs(l.position - (term(2, ju) - term(1, l.j)))).toBeLessThan(1e-8);
      expect(Math.abs(l.lowerEnergy - (term(1, l.j) - term(0, 0)))).toBeLessThan(1e-8);
      expect(l.band).toEqual({ upper: 2, lower: 1 });
    }
    const rot = predictBand(y, { upper: 0, lower: 0 }, 3);
    expect(rot.map((l) => [l.branch, l.j])).toEqual([
      ['R', 0],
      ['R', 1],
      ['R', 2],
      ['R', 3],
    ]);
  });

  it('predictBand from H&H constants meets the real 1-0 lines (HITRAN2020) within 0.01 cm⁻¹ up to J = 20', () => {
    // The H&H set gives the band origin 2143.2712 and B values to about 1e-5: 0.01 cm⁻¹ is common practice for a
    // prediction from customary constants.
    const predicted = new Map(predictBand(y, { upper: 1, lower: 0 }, 20).map((l) => [`${l.branch}${l.j}`, l]));
    const real = fixture.lines.filter((l) => l.band === '1-0' && l.j <= 20);
    expect(real.length).toBe(41);
    for (const l of real) {
      const p = predicted.get(`${l.branch}${l.j}`);
      expect(p, `${l.branch}(${l.j})`).toBeDefined();
      expect(Math.abs((p?.position ?? 0) - l.position), `${l.branch}(${l.j})`).toBeLessThan(0.01);
    }
  });

  it('coefficients: Y_kl per species, U_kl scaled by μ^−(k/2+l), names and units', () => {
    const params = dunhamParameters(
      '12C-16O',
      [
        { k: 1, l: 0 },
        { k: 0, l: 1 },
        { k: 1, l: 1 },
      ],
      true,
    );
    expect(params.map((p) => [p.key, p.name, p.unit, p.kind])).toEqual([
      ['12C-16O|Y|1,0', 'Y10(12C-16O)', 'cm-1', 'Y'],
      ['12C-16O|Y|0,1', 'Y01(12C-16O)', 'cm-1', 'Y'],
      ['12C-16O|Y|1,1', 'Y11(12C-16O)', 'cm-1', 'Y'],
    ]);
    expect(dunhamParameters('12C-16O', [{ k: 2, l: 0 }], false)[0]?.name).toBe('Y20');
    const o = observation('2-1', 'R', 3); // (v+½): 2.5 and 1.5; x: 20 and 12
    const m = dunhamModel(params);
    expect(params.map((p) => m.coefficient(p, o))).toEqual([1, 8, 2.5 * 20 - 1.5 * 12]);
    expect(params.map((p) => m.coefficient(p, observation('2-1', 'R', 3, '13C-16O')))).toEqual([0, 0, 0]);

    const u = massReducedParameters([
      { k: 1, l: 0 },
      { k: 0, l: 1 },
      { k: 2, l: 0 },
      { k: 1, l: 1 },
      { k: 0, l: 2 },
    ]);
    expect(u.map((p) => [p.key, p.name, p.unit, p.kind])).toEqual([
      ['U|1,0', 'U10', 'cm-1 u^0.5', 'U'],
      ['U|0,1', 'U01', 'cm-1 u^1', 'U'],
      ['U|2,0', 'U20', 'cm-1 u^1', 'U'],
      ['U|1,1', 'U11', 'cm-1 u^1.5', 'U'],
      ['U|0,2', 'U02', 'cm-1 u^2', 'U'],
    ]);
    expect(massReducedUnit({ k: 3, l: 0 })).toBe('cm-1 u^1.5');
    // μ(12C16O) = 6.8562086379 u (AME2020, REFERENCE-DATA §2c).
    const mu = 6.8562086379;
    const mm = dunhamModel(u, new Map([['12C-16O', mu]]));
    const got = u.map((p) => mm.coefficient(p, o));
    const want = [
      1 * mu ** -0.5,
      8 * mu ** -1,
      (2.5 ** 2 - 1.5 ** 2) * mu ** -1,
      (2.5 * 20 - 1.5 * 12) * mu ** -1.5,
      (400 - 144) * mu ** -2,
    ];
    for (const [i, w] of want.entries()) expect(Math.abs((got[i] as number) / w - 1)).toBeLessThan(1e-14);
    expect(() => mm.coefficient(u[0] as (typeof u)[number], observation('1-0', 'R', 0, '13C-16O'))).toThrow(
      /no reduced mass for 13C-16O/,
    );
    expect(() => dunhamModel(u).coefficient(u[0] as (typeof u)[number], o)).toThrow(/no reduced mass for 12C-16O/);
    expect(dunhamKey(3, 1)).toBe('3,1');
  });
});

describe('bands and transitions', () => {
  it('parses "v′-v″" with spaces, formats it back, and refuses other forms with ASSIGNMENT_INVALID', () => {
    expect(parseBand(' 2 - 1 ')).toEqual({ upper: 2, lower: 1 });
    expect(parseBand('10-0')).toEqual({ upper: 10, lower: 0 });
    expect(formatBand({ upper: 3, lower: 0 })).toBe('3-0');
    for (const bad of ['1', '1-', '100-0', '1–0', 'a-b', '1-0-0']) {
      try {
        parseBand(bad);
        expect.unreachable(bad);
      } catch (e) {
        expect(e).toBeInstanceOf(ScienceError);
        expect((e as ScienceError).code).toBe('ASSIGNMENT_INVALID');
        expect((e as Error).message).toBe(`band "${bad}" is not of the form "v'-v''" (e.g. "1-0")`);
        expect((e as ScienceError).details).toEqual({ band: bad });
      }
    }
  });

  it('J′ = J″ + 1 in R, J″ − 1 in P, J″ in Q; keys and labels name species, band, branch and J″', () => {
    expect([upperJ({ branch: 'R', j: 4 }), upperJ({ branch: 'P', j: 4 }), upperJ({ branch: 'Q', j: 4 })]).toEqual([
      5, 3, 4,
    ]);
    const t = { species: '1H-35Cl', band: { upper: 1, lower: 0 }, branch: 'P' as const, j: 7 };
    expect(transitionKey(t)).toBe('1H-35Cl|1-0|P|7');
    expect(transitionLabel(t)).toBe('1H-35Cl 1-0 P(7)');
  });

  it.each([
    [{ upper: 1, lower: 0 }, 'R', 2.5, 'J″ must be a whole number ≥ 0'],
    [{ upper: 1, lower: 0 }, 'R', -1, 'J″ must be a whole number ≥ 0'],
    [{ upper: 1, lower: 0 }, 'R', 401, 'J″ above 400 is not supported'],
    [{ upper: 61, lower: 0 }, 'R', 1, 'v above 60 is not supported'],
    [{ upper: 1, lower: 61 }, 'R', 1, 'v above 60 is not supported'],
    [
      { upper: 0, lower: 1 },
      'R',
      1,
      "the upper level v′ must not lie below the lower level v″ (write bands as v'-v'')",
    ],
    [{ upper: 1, lower: 0 }, 'Q', 1, 'ΔJ = 0 is forbidden in a ¹Σ–¹Σ band: there is no Q branch'],
    [{ upper: 1, lower: 0 }, 'P', 0, 'P(0) does not exist: J′ would be −1'],
    [{ upper: 0, lower: 0 }, 'P', 3, 'pure rotational lines are R lines (J″+1 ← J″)'],
  ] as const)('band %j %s(%f) is refused: %s', (band, branch, j, why) => {
    try {
      validateTransition({ species: '12C-16O', band, branch, j });
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ScienceError);
      expect((e as ScienceError).code).toBe('ASSIGNMENT_INVALID');
      expect((e as Error).message).toBe(`${branch}(${j}) of band ${band.upper}-${band.lower}: ${why}`);
      expect((e as ScienceError).details).toEqual({ band: `${band.upper}-${band.lower}`, branch, j });
    }
  });

  it.each([
    [{ upper: 1, lower: 0 }, 'R', 0],
    [{ upper: 1, lower: 0 }, 'P', 1],
    [{ upper: 60, lower: 60 }, 'R', 400],
    [{ upper: 0, lower: 0 }, 'R', 0],
  ] as const)('band %j %s(%i) is accepted', (band, branch, j) => {
    expect(() => validateTransition({ species: '12C-16O', band, branch, j })).not.toThrow();
  });
});

import { describe, expect, it } from 'vitest';
import { dunhamModel, dunhamParameters, massReducedParameters } from '../../src/models/dunham.js';
import { levelModel, levelParameters, levelStructure } from '../../src/models/level-model.js';
import { levelStates, transitionGroups } from '../../src/models/level-states.js';
import type { LinearModel, Observation } from '../../src/models/linear-model.js';

/**
 * The design columns built from per-state tables (src/models/level-states.ts) must be the coefficients line by line,
 * bit for bit: a fit's answers may not move by a rounding when its columns are made the faster way.
 */

/** A seeded list of two isotopologues, bands 1-0, 2-0, 2-1 and pure rotation, J up to 400, with repeats. */
function observations(n: number, seed: number): Observation[] {
  let s = seed;
  const rnd = () => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return s / 2147483648;
  };
  const bands = [
    [1, 0],
    [2, 0],
    [2, 1],
    [0, 0],
  ] as const;
  const out: Observation[] = [];
  for (let i = 0; i < n; i++) {
    const species = rnd() < 0.7 ? '12C-16O' : '13C-16O';
    const [upperV, lowerV] = bands[Math.floor(rnd() * bands.length)] as readonly [number, number];
    const j = Math.floor(rnd() * 400);
    const r = upperV === lowerV || rnd() < 0.5;
    out.push({
      index: i,
      species,
      upperV,
      lowerV,
      upperJ: r ? j + 1 : j,
      lowerJ: r ? j : j + 1,
      position: 2000 + rnd(),
      weight: 1,
    });
  }
  // Repeats of earlier lines, as a second scan would give.
  for (let i = 0; i < n / 4; i++) out.push({ ...(out[Math.floor(rnd() * n)] as Observation), index: out.length });
  return out;
}

function expectColumnsAsCoefficients(model: LinearModel, obs: readonly Observation[]) {
  for (const p of model.parameters) {
    const col = model.column?.(p, obs) as Float64Array;
    expect(col.length).toBe(obs.length);
    let differing = 0;
    obs.forEach((o, i) => {
      if (!Object.is(col[i], model.coefficient(p, o))) differing++;
    });
    expect({ parameter: p.key, differing }).toEqual({ parameter: p.key, differing: 0 });
  }
}

describe('columns from level states', () => {
  it('level-model columns equal the coefficients bit for bit (T, B … M, two species)', () => {
    const obs = observations(300, 7);
    const params = levelParameters(levelStructure(obs), 5);
    expect(params.map((p) => p.kind)).toContain('M');
    expectColumnsAsCoefficients(levelModel(params), obs);
  });

  it("a level model lists exactly its parameters with a coefficient in a line, ascending (a prediction's sums)", () => {
    const obs = observations(300, 13);
    // Mixed orders: some levels stop at B, others reach M, so the lists differ in length between levels.
    const structure = levelStructure(obs);
    const orders = new Map([
      ['12C-16O|0', 5],
      ['12C-16O|1', 1],
      ['12C-16O|2', 3],
      ['13C-16O|0', 2],
      ['13C-16O|1', 4],
    ]);
    const model = levelModel(levelParameters(structure, orders));
    let wrong = 0;
    for (const o of obs) {
      const listed = [...(model.parametersOf?.(o) ?? [])];
      // Every parameter of the line's two levels, whatever its coefficient (B of J = 0 is 0 and still listed).
      const expected = model.parameters.flatMap((p, i) =>
        p.species === o.species && (p.v === o.upperV || p.v === o.lowerV) ? [i] : [],
      );
      const nonZero = model.parameters.flatMap((p, i) => (model.coefficient(p, o) !== 0 ? [i] : []));
      if (JSON.stringify(listed) !== JSON.stringify(expected) || nonZero.some((i) => !listed.includes(i))) wrong++;
    }
    expect(wrong).toBe(0);
    // A pure-rotation line lists its one level once; asked again, the same list.
    const rot = obs.find((o) => o.upperV === o.lowerV) as Observation;
    const first = model.parametersOf?.(rot);
    expect(new Set(first).size).toBe(first?.length);
    expect(model.parametersOf?.(rot)).toBe(first);
  });

  it('Dunham and mass-reduced columns equal the coefficients bit for bit', () => {
    const obs = observations(200, 11);
    const terms = [
      { k: 1, l: 0 },
      { k: 2, l: 0 },
      { k: 0, l: 1 },
      { k: 1, l: 1 },
      { k: 2, l: 1 },
      { k: 0, l: 2 },
      { k: 1, l: 3 },
      { k: 0, l: 5 },
    ];
    expectColumnsAsCoefficients(dunhamModel(dunhamParameters('12C-16O', terms, true)), obs);
    const mu = new Map([
      ['12C-16O', 6.856208],
      ['13C-16O', 7.172376],
    ]);
    expectColumnsAsCoefficients(dunhamModel(massReducedParameters(terms), mu), obs);
  });

  it('numbers each (species, v, J) once, in order of first appearance, and maps every line to its two states', () => {
    const obs = observations(150, 3);
    const st = levelStates(obs);
    const seen = new Set<string>();
    const order: string[] = [];
    for (const o of obs)
      for (const [v, j] of [
        [o.upperV, o.upperJ],
        [o.lowerV, o.lowerJ],
      ] as const) {
        const key = `${o.species}|${v}|${j}`;
        if (!seen.has(key)) order.push(key);
        seen.add(key);
      }
    expect(st.count).toBe(order.length);
    expect(Array.from({ length: st.count }, (_, k) => `${st.species[k]}|${st.v[k]}|${st.j[k]}`)).toEqual(order);
    obs.forEach((o, i) => {
      expect(order[st.upper[i] as number]).toBe(`${o.species}|${o.upperV}|${o.upperJ}`);
      expect(order[st.lower[i] as number]).toBe(`${o.species}|${o.lowerV}|${o.lowerJ}`);
    });
  });

  it('groups lines by transition: repeats share a group, numbered by first appearance', () => {
    const obs = observations(120, 5);
    const { group, firstRow } = transitionGroups(obs);
    const key = (o: Observation) => `${o.species}|${o.upperV}|${o.upperJ}|${o.lowerV}|${o.lowerJ}`;
    const firstOf = new Map<string, number>();
    obs.forEach((o, i) => {
      if (!firstOf.has(key(o))) firstOf.set(key(o), i);
    });
    expect(Array.from(firstRow)).toEqual([...firstOf.values()]);
    obs.forEach((o, i) => {
      expect(firstRow[group[i] as number]).toBe(firstOf.get(key(o)));
    });
    expect(firstRow.length).toBeLessThan(obs.length);
  });

  it('a list that grew after its states were found is read again, not answered from the stale states', () => {
    const obs = observations(40, 9);
    expect(levelStates(obs).upper.length).toBe(40 + 10);
    obs.push({ ...(obs[0] as Observation), upperV: 5, lowerV: 4, index: obs.length });
    const st = levelStates(obs);
    expect(st.upper.length).toBe(obs.length);
    expect(st.v[st.upper[obs.length - 1] as number]).toBe(5);
  });
});

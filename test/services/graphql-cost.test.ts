import { getIntrospectionQuery } from 'graphql';
import { describe, expect, it } from 'vitest';
import { LIBRARY_LIST_LENGTH, MAX_FIELDS } from '../../services/graphql/limits.js';
import { listSpecies } from '../../services/usecases/species.js';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';

/**
 * GraphQL cost as executed, not as written (found by fuzzing the built service with `npm start` defaults): a query
 * of 200 written fields, 100 aliases of `species { ...E }` with a fragment E of 100 aliased fields, was executed as
 * 100 × 11 × 100 fields and answered 404 MB in 18 s with /healthz waiting 11 s; 850 aliases of
 * `species { constants }` (1 700 written fields) answered 34 MB and held the event loop 1 s.
 */
const app = useApp();
const post = (query: string) =>
  app().inject({ method: 'POST', url: '/graphql', payload: { query }, remoteAddress: nextClient() });

describe('GraphQL field count as executed', () => {
  it('the library list lengths used for the count are those the list answers', () => {
    const lists = listSpecies();
    expect(LIBRARY_LIST_LENGTH.species).toBe(lists.species.length);
    expect(LIBRARY_LIST_LENGTH.linearSpecies).toBe(lists.linear.length);
    expect(lists.species.length).toBeGreaterThan(1);
  });

  it('a fragment spread under many aliases counts its fields at every use', async () => {
    const inner = Array.from({ length: 40 }, (_, i) => `f${i}: formula`).join(' ');
    const outer = Array.from({ length: 40 }, (_, i) => `a${i}: species(formula: "CO") { ...E }`).join(' ');
    // 80 fields as written; 40 × (1 + 40) = 1 640 as executed: under the limit, answered.
    const ok = await post(`{ ${outer} } fragment E on SpeciesEntry { ${inner} }`);
    expect(ok.statusCode).toBe(200);
    expect(Object.keys(ok.json().data)).toHaveLength(40);
    expect(Object.keys(ok.json().data.a0[0])).toHaveLength(40);
    // One more alias of the same fragment: 41 × 41 = 1 681; one more fragment field: 40 × 42 = 1 680; both under.
    // 60 aliases: 60 × 41 = 2 460 as executed (100 as written): refused before anything runs.
    const many = Array.from({ length: 60 }, (_, i) => `a${i}: species(formula: "CO") { ...E }`).join(' ');
    const r = await post(`{ ${many} } fragment E on SpeciesEntry { ${inner} }`);
    expect(r.statusCode).toBe(400);
    expect(r.json().errors[0].extensions.code).toBe('GRAPHQL_REFUSED');
    expect(r.json().errors[0].message).toMatch(/more than 2000 fields/);
    expect(r.json().data ?? null).toBeNull();
  });

  it('fields under a library list count once per entry', async () => {
    const per = 1 + LIBRARY_LIST_LENGTH.species; // the alias and its one field per entry
    const most = Math.floor(MAX_FIELDS / per);
    const query = (n: number) => `{ ${Array.from({ length: n }, (_, i) => `a${i}: species { constants }`).join(' ')} }`;
    const ok = await post(query(most));
    expect(ok.statusCode).toBe(200);
    expect(Object.keys(ok.json().data)).toHaveLength(most);
    const r = await post(query(most + 1));
    expect(r.statusCode).toBe(400);
    expect(r.json().errors[0].extensions.code).toBe('GRAPHQL_REFUSED');
    // A named formula is one entry: the same number of aliases then counts 2 fields each.
    const named = await post(
      `{ ${Array.from({ length: most + 1 }, (_, i) => `a${i}: species(formula: "HCl") { constants }`).join(' ')} }`,
    );
    expect(named.statusCode).toBe(200);
  });

  it('computations spread through fragments are counted where they run', async () => {
    const predict = (i: number) => `p${i}: predict(input: {species: "HCl", jMax: 2}) { species }`;
    const r = await post(
      `{ ...A ...B } fragment A on Query { ${[0, 1, 2].map(predict).join(' ')} } fragment B on Query { ${[3, 4].map(predict).join(' ')} }`,
    );
    expect(r.statusCode).toBe(400);
    expect(r.json().errors[0].message).toMatch(/more than 4 computations/);
    const four = await post(`{ ...A } fragment A on Query { ${[0, 1, 2, 3].map(predict).join(' ')} }`);
    expect(four.statusCode).toBe(200);
    expect(Object.keys(four.json().data)).toHaveLength(4);
  });

  it('a chain of fragments each spreading the next twice is costed in linear time', async () => {
    const chain = (k: number) =>
      `{ ...F0 } ${Array.from(
        { length: k },
        (_, i) => `fragment F${i} on Query { ...F${i + 1} ... on Query { ...F${i + 1} } }`,
      ).join(' ')} fragment F${k} on Query { species(formula: "CO") { formula } }`;
    // 2^3 uses of the last fragment, 2 fields each: answered.
    const short = await post(chain(3));
    expect(short.statusCode).toBe(200);
    expect(short.json().data.species[0].formula).toBe('12C-16O');
    // 2^60 uses if expanded path by path: each fragment is costed once, and the count (2^61) is refused.
    const long = await post(chain(60));
    expect(long.statusCode).toBe(400);
    expect(long.json().errors[0].extensions.code).toBe('GRAPHQL_REFUSED');
  });

  it('a fragment cycle is still refused by GraphQL itself, and introspection still passes', async () => {
    const cyc = await post('{ ...A } fragment A on Query { ...B } fragment B on Query { ...A }');
    expect(cyc.statusCode).toBe(400);
    expect(cyc.json().errors[0].message).toMatch(/Cannot spread fragment/);
    const intro = await post(getIntrospectionQuery());
    expect(intro.statusCode).toBe(200);
    expect(intro.json().data.__schema.queryType.name).toBe('Query');
  });

  it('a whole library entry through a fragment is answered', async () => {
    const r = await post(
      '{ species { ...E } linearSpecies { formula name levels } } fragment E on SpeciesEntry { formula name state reducedMass { value unit } naturalAbundance constants notice }',
    );
    expect(r.statusCode).toBe(200);
    expect(r.json().data.species).toHaveLength(LIBRARY_LIST_LENGTH.species);
  });
});

import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { assignedFitBody } from '../helpers/requests.js';

const app = useApp();

const FIT_QUERY = `query Fit($input: FitInput!) {
  fit(input: $input) {
    species { formula reducedMass { value uncertainty unit } }
    lines { index position calculated residual status assignment { band branch j species source } }
    bands { species band origin { value uncertainty unit } lines jRange }
    levels { species v B { value uncertainty unit } D { value uncertainty unit } r { value uncertainty unit } }
    equilibrium { species omega_e { value uncertainty } omega_e_x_e { value uncertainty } B_e { value uncertainty } alpha_e { value uncertainty } r_e { value uncertainty } }
    parameters { name value uncertainty unit species }
    covariance { parameters matrix }
    statistics { lines fitted rejected degreesOfFreedom rms reducedChiSquare }
    warnings { code message }
    notice
  }
}`;

describe('GraphQL and REST agree', () => {
  it('the same fit through both faces agrees to the last digit', async () => {
    const body = assignedFitBody('CO', ['1-0', '2-0'], 12, 0.001, 4);
    const rest = (await app().inject({ method: 'POST', url: '/v1/fits', payload: body })).json();
    const g = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: FIT_QUERY, variables: { input: body } },
    });
    expect(g.statusCode).toBe(200);
    const gql = g.json().data.fit;
    const strip = (xs: Record<string, unknown>[]) =>
      xs.map((x) => Object.fromEntries(Object.entries(x).filter(([, v]) => v !== null)));
    expect(strip(gql.parameters)).toEqual(rest.parameters);
    expect(gql.covariance).toEqual(rest.covariance);
    expect(gql.equilibrium[0].omega_e).toEqual({
      value: rest.equilibrium[0].omega_e.value,
      uncertainty: rest.equilibrium[0].omega_e.uncertainty,
    });
    expect(gql.bands).toEqual(rest.bands);
    expect(gql.lines.map((l: { residual: number }) => l.residual)).toEqual(
      rest.lines.map((l: { residual: number }) => l.residual),
    );
    expect(gql.warnings).toEqual(
      rest.warnings.map((w: { code: string; message: string }) => ({ code: w.code, message: w.message })),
    );
  });

  it('science errors carry the REST problem code in extensions', async () => {
    const input = { species: 'HCl', lines: [{ position: 2900, assignment: { band: '1-0', branch: 'P', j: 0 } }] };
    const g = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: FIT_QUERY, variables: { input } },
    });
    const e = g.json().errors[0];
    expect(e.extensions.code).toBe('ASSIGNMENT_INVALID');
    expect(e.extensions.status).toBe(422);
    expect(e.message).toMatch(/P\(0\)/);
  });

  it('schema violations are BAD input with paths', async () => {
    const input = { species: 'HCl', unit: 'furlong', lines: [{ position: -1 }] };
    const g = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: FIT_QUERY, variables: { input } },
    });
    const e = g.json().errors[0];
    expect(e.extensions.code).toBe('VALIDATION_FAILED');
    const paths = e.extensions.errors.map((x: { path: string }) => x.path);
    expect(paths).toContain('unit');
    expect(paths).toContain('lines/0/position');
  });

  it('species query matches GET /v1/species', async () => {
    const g = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: { query: '{ species { formula constants } }' },
    });
    const rest = (await app().inject({ method: 'GET', url: '/v1/species' })).json();
    expect(g.json().data.species.map((s: { formula: string }) => s.formula)).toEqual(
      rest.species.map((s: { formula: string }) => s.formula),
    );
    expect(g.json().data.species[0].constants).toEqual(rest.species[0].constants);
  });
});

describe('GraphQL carries the scatter estimate and the constrained terms (as REST does)', () => {
  it('two instruments without uncertainties: scatter per source and model.constraints equal REST’s', async () => {
    // CO 1-0 from the independent generator measured on two instruments (σ 0.001 and 0.006 cm⁻¹), no σ sent.
    const { independentLines, CO_12_16 } = await import('../helpers/independent-lines.js');
    const list = (sigma: number, seed: number, source: string) =>
      independentLines({
        molecule: CO_12_16,
        bands: [{ upper: 1, lower: 0, jMax: 22 }],
        sigma,
        seed,
        withUncertainties: false,
      }).lines.map((l) => ({
        position: l.position,
        source,
        assignment: { band: '1-0', branch: l.assignment?.branch, j: l.assignment?.j },
      }));
    const body = { species: 'CO', lines: [...list(0.001, 31, 'ftir-a'), ...list(0.006, 32, 'ftir-b')] };
    const rest = (await app().inject({ method: 'POST', url: '/v1/fits', payload: body })).json();
    const g = await app().inject({
      method: 'POST',
      url: '/graphql',
      payload: {
        query: `query Fit($input: FitInput!) { fit(input: $input) { scatter { group by lines sigma } model } }`,
        variables: { input: body },
      },
    });
    expect(g.statusCode).toBe(200);
    const gql = g.json().data.fit;
    expect(gql.scatter).toEqual(rest.scatter);
    expect(gql.scatter.map((s: { by: string }) => s.by)).toEqual(['source', 'source']);
    const sigma = Object.fromEntries(gql.scatter.map((s: { group: string; sigma: number }) => [s.group, s.sigma]));
    // Robust σ of ~44 lines each: within 30 % of the generator's 0.001 and 0.006 (a standard error of about 11 %).
    expect(sigma['ftir-a'] / 0.001).toBeGreaterThan(0.7);
    expect(sigma['ftir-a'] / 0.001).toBeLessThan(1.3);
    expect(sigma['ftir-b'] / 0.006).toBeGreaterThan(0.7);
    expect(sigma['ftir-b'] / 0.006).toBeLessThan(1.3);
    expect(gql.model.constraints).toEqual(rest.model.constraints);
    expect(rest.model.constraints.length).toBeGreaterThan(0);
  });
});

import { describe, expect, it } from 'vitest';
import { FitResponseSchema } from '../../services/schemas/fit.js';
import { useApp } from '../helpers/app.js';
import { CO2_626, type GenLine, type GenMolecule, genLineList } from '../helpers/independent-linear.js';

/**
 * Several isotopologues in one linear fit: 12C16O2 and 13C16O2 ν3 lines in one list, each line naming its species,
 * fitted in one request; each species gets its own constants (independent fits per isotopologue, SCIENCE.md §3)
 * and the response holds both. Lines from the independent generator: 626 with Rothman & Young (1981) constants;
 * 636 set here from the shared reference note §1.2 (00011: the note's fit of HITRAN lower-state energies, status
 * derived; ground B0 0.3902369 recalled there, D0 taken as 626's, both low confidence — only the round trip of the
 * generator's own values is tested).
 */
const app = useApp();

const CO2_636: GenMolecule = {
  formula: '16O-13C-16O',
  spin: { kind: 'exchange', symmetric: 1, antisymmetric: 0, uModes: [2, 3] },
  levels: {
    '00001': {
      label: '00001',
      v: [0, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 0, B: 0.3902369, D: 1.3337e-7 } },
      source: 'shared/REFERENCE-DATA-LINEAR.md §1.2 (recalled)',
    },
    '00011': {
      label: '00011',
      v: [0, 0, 1],
      l: 0,
      terms: { form: 'per-parity', e: { G: 2283.487118, B: 0.387273127, D: 1.326174645e-7 } },
      source: 'shared/REFERENCE-DATA-LINEAR.md §1.2 (derived)',
    },
  },
};

const NU3 = { upper: '00011', lower: '00001' };
const wire = (l: GenLine, species: string) => ({
  position: l.position,
  uncertainty: l.uncertainty,
  assignment: { species, upper: l.upper, lower: l.lower, branch: l.branch, j: l.j },
});

describe('several isotopologues of a linear molecule in one fit', () => {
  it('12C16O2 and 13C16O2 ν3 in one list: each species its own B″, B′ and ν₀ (within 4σ of the generator), one response', async () => {
    const a = genLineList({ molecule: CO2_626, bands: [NU3], jMax: 50, sigma: 5e-4, seed: 61 });
    const b = genLineList({ molecule: CO2_636, bands: [NU3], jMax: 40, sigma: 5e-4, seed: 62 });
    // Interleaved by position, as one scan gives them.
    const mixed = [...a.map((l) => ({ l, s: '16O-12C-16O' })), ...b.map((l) => ({ l, s: '13CO2' }))].sort(
      (x, y) => x.l.position - y.l.position,
    );
    const res = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: { species: 'CO2', lines: mixed.map((m) => wire(m.l, m.s)) },
    });
    expect(res.statusCode, res.body.slice(0, 400)).toBe(200);
    const body = res.json();
    expect(FitResponseSchema.safeParse(body).success).toBe(true);
    expect(body.species.map((s: { formula: string }) => s.formula).sort()).toEqual(['16O-12C-16O', '16O-13C-16O']);
    // Lines in request order, each with its own species.
    expect(body.lines.map((l: { index: number }) => l.index)).toEqual(mixed.map((_, i) => i));
    body.lines.forEach((l: { assignment: { species: string }; status: string }, i: number) => {
      expect(l.assignment.species).toBe(mixed[i]?.s === '13CO2' ? '16O-13C-16O' : '16O-12C-16O');
      expect(l.status).toBe('fitted');
    });
    for (const [mol, formula] of [
      [CO2_626, '16O-12C-16O'],
      [CO2_636, '16O-13C-16O'],
    ] as const) {
      const level = (label: string) =>
        body.levels.find((l: { species: string; label: string }) => l.species === formula && l.label === label);
      const truth = (k: string) => {
        const t = mol.levels[k]?.terms;
        return t?.form === 'per-parity' ? t.e : undefined;
      };
      const g = level('00⁰0');
      const u = level('00⁰1');
      expect(Math.abs(g.B.value - (truth('00001')?.B as number)), `${formula} B″`).toBeLessThan(4 * g.B.uncertainty);
      expect(Math.abs(u.B.value - (truth('00011')?.B as number)), `${formula} B′`).toBeLessThan(4 * u.B.uncertainty);
      const band = body.bands.find((x: { species: string }) => x.species === formula);
      expect(Math.abs(band.origin.value - (truth('00011')?.G as number))).toBeLessThan(4 * band.origin.uncertainty);
    }
    // Parameters named per species; the covariance is block-diagonal (the fits share no parameter).
    const names: string[] = body.covariance.parameters;
    expect(names.some((n) => n.startsWith('16O-13C-16O '))).toBe(true);
    expect(names.some((n) => n.startsWith('16O-12C-16O '))).toBe(true);
    names.forEach((n, i) => {
      names.forEach((m, j) => {
        if (n.split(' ')[0] !== m.split(' ')[0]) expect(body.covariance.matrix[i][j]).toBe(0);
      });
    });
    expect(body.statistics.lines).toBe(mixed.length);
    expect(body.statistics.fitted).toBe(mixed.length);
  });

  it('lines without a species in a mixed list belong to the declared species; none declared is a clear 4xx', async () => {
    const a = genLineList({ molecule: CO2_626, bands: [NU3], jMax: 30, sigma: 5e-4, seed: 63 });
    const b = genLineList({ molecule: CO2_636, bands: [NU3], jMax: 30, sigma: 5e-4, seed: 64 });
    const lines = [
      ...a.map((l) => {
        const { species: _s, ...assignment } = wire(l, 'x').assignment;
        return { position: l.position, uncertainty: l.uncertainty, assignment };
      }),
      ...b.map((l) => wire(l, '16O-13C-16O')),
    ];
    const ok = await app().inject({ method: 'POST', url: '/v1/fits', payload: { species: 'CO2', lines } });
    expect(ok.statusCode).toBe(200);
    expect(ok.json().species).toHaveLength(2);
    const bad = await app().inject({ method: 'POST', url: '/v1/fits', payload: { lines } });
    expect(bad.statusCode).toBeGreaterThanOrEqual(400);
    expect(bad.statusCode).toBeLessThan(500);
    expect(bad.headers['content-type']).toMatch(/application\/problem\+json/);
  });

  it('POST /v1/checks of the mixed list: identity and unexplained lines pass for 12C16O2, the 13C16O2 lines explained by their own fit', async () => {
    const a = genLineList({ molecule: CO2_626, bands: [NU3], jMax: 40, sigma: 5e-4, seed: 65 });
    const b = genLineList({ molecule: CO2_636, bands: [NU3], jMax: 30, sigma: 5e-4, seed: 66 });
    const lines = [...a.map((l) => wire(l, 'CO2')), ...b.map((l) => wire(l, '13CO2'))];
    const res = await app().inject({ method: 'POST', url: '/v1/checks', payload: { species: 'CO2', lines } });
    expect(res.statusCode, res.body.slice(0, 300)).toBe(200);
    const body = res.json();
    const by = (id: string) => body.checks.find((c: { id: string }) => c.id === id);
    expect(by('identity').status).toBe('pass');
    expect(by('unexplained-lines').measured.lines).toBe(0);
    expect(body.fit.species).toHaveLength(2);
  });

  it('an unlabelled CO2 list holding 13C16O2 ν3 at natural abundance: both isotopologues assigned and fitted, no spurious line taken', async () => {
    const a = genLineList({ molecule: CO2_626, bands: [NU3], jMax: 50, sigma: 5e-4, spurious: 5, seed: 67 });
    // 13C: 1.07 % (CIAAW, SCIENCE.md §5); the weak lines of the rarer species as a scan gives them.
    const b = genLineList({ molecule: CO2_636, bands: [NU3], jMax: 40, sigma: 5e-4, seed: 68 }).map((l) => ({
      ...l,
      intensity: 0.0107 * l.intensity,
    }));
    const mixed = [...a.map((l) => ({ l, s: '16O-12C-16O' })), ...b.map((l) => ({ l, s: '16O-13C-16O' }))].sort(
      (x, y) => x.l.position - y.l.position,
    );
    const res = await app().inject({
      method: 'POST',
      url: '/v1/fits',
      payload: {
        species: 'CO2',
        lines: mixed.map(({ l }) => ({ position: l.position, uncertainty: l.uncertainty, intensity: l.intensity })),
      },
    });
    expect(res.statusCode, res.body.slice(0, 400)).toBe(200);
    const body = res.json();
    const s = { correct: 0, wrong: 0, unassigned: 0, spuriousTaken: 0 };
    body.lines.forEach(
      (l: { index: number; assignment?: { species: string; branch: string; j: number; source: string } }) => {
        const m = mixed[l.index] as { l: GenLine; s: string };
        if (m.l.kind === 'spurious') {
          if (l.assignment) s.spuriousTaken++;
          return;
        }
        if (!l.assignment) s.unassigned++;
        else if (l.assignment.species === m.s && l.assignment.branch === m.l.branch && l.assignment.j === m.l.j)
          s.correct++;
        else s.wrong++;
        if (l.assignment) expect(l.assignment.source).toBe('auto');
      },
    );
    if (process.env.SHARES_LOG) console.log(s);
    expect(s.wrong).toBe(0);
    expect(s.spuriousTaken).toBe(0);
    expect(s.correct).toBeGreaterThanOrEqual(0.98 * (s.correct + s.unassigned));
    expect(body.species.map((x: { formula: string }) => x.formula).sort()).toEqual(['16O-12C-16O', '16O-13C-16O']);
  });
});

import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';
import { CO2_626, type GenLine, genLineList } from '../helpers/independent-linear.js';

/**
 * A partly assigned linear list (some lines labelled by the caller, the rest bare) in /v1/fits and /v1/checks:
 * the given labels are kept as given (never re-assigned), the other lines assigned against the library, and an
 * automatic label that would repeat a given transition is dropped. Lines from the independent generator (CO2 ν3,
 * Rothman & Young 1981 constants) with spurious lines of another gas.
 */
const app = useApp();

const GROUND = { v: [0, 0, 0], l: 0 };
const NU3 = { v: [0, 0, 1], l: 0 };

const truth = genLineList({
  molecule: CO2_626,
  bands: [{ upper: '00011', lower: '00001' }],
  jMax: 56,
  sigma: 8e-4,
  reportUncertainty: false,
  spurious: 4,
  seed: 91,
  minRelativeIntensity: 0.005,
});
/** Labels given on every fifth real line (the caller's anchors), as a lab would type them. */
const labelled = new Set(truth.flatMap((l, i) => (l.kind === 'line' && i % 5 === 0 ? [i] : [])));
const body = {
  species: 'CO2',
  lines: truth.map((l, i) => ({
    position: l.position,
    intensity: l.intensity,
    ...(labelled.has(i) ? { assignment: { upper: NU3, lower: GROUND, branch: l.branch, j: l.j } } : {}),
  })),
};

interface Outcome {
  index: number;
  status: string;
  assignment?: { branch: string; j: number; source: string };
}

/** Correct, wrong and unassigned among the real lines; spurious lines taken; given labels echoed as given. */
function score(lines: readonly Outcome[], t: readonly GenLine[]) {
  const s = { correct: 0, wrong: 0, unassigned: 0, spuriousTaken: 0, givenKept: 0, auto: 0 };
  for (const l of lines) {
    const x = t[l.index] as GenLine;
    if (x.kind === 'spurious') {
      if (l.assignment) s.spuriousTaken++;
      continue;
    }
    if (!l.assignment) s.unassigned++;
    else if (l.assignment.branch === x.branch && l.assignment.j === x.j) s.correct++;
    else s.wrong++;
    if (l.assignment?.source === 'given') s.givenKept++;
    if (l.assignment?.source === 'auto') s.auto++;
  }
  if (process.env.SHARES_LOG) console.log(s);
  return s;
}

describe('partly assigned linear lists', () => {
  it('POST /v1/fits keeps the given labels and assigns the rest: all real lines right, no spurious line taken', async () => {
    const res = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(res.statusCode, res.body.slice(0, 300)).toBe(200);
    const s = score(res.json().lines, truth);
    expect(s.givenKept).toBe(labelled.size);
    expect(s.auto).toBeGreaterThan(2 * labelled.size);
    expect(s.wrong).toBe(0);
    expect(s.spuriousTaken).toBe(0);
    expect(s.unassigned).toBe(0);
    expect(res.json().assignment.method).toBe('reference');
  });

  it('POST /v1/checks judges the list as labelled: identity and unexplained lines count the spurious ones only', async () => {
    const res = await app().inject({ method: 'POST', url: '/v1/checks', payload: body });
    expect(res.statusCode).toBe(200);
    const r = res.json();
    const s = score(r.fit.lines, truth);
    expect(s.givenKept).toBe(labelled.size);
    expect(s.wrong).toBe(0);
    const by = (id: string) => r.checks.find((c: { id: string }) => c.id === id);
    expect(by('identity').status).toBe('pass');
    expect(by('unexplained-lines').measured.lines).toBe(4);
  });

  it('a given label is never replaced: a line labelled one J off keeps that label (and is rejected by the fit), the line it names stays unassigned', async () => {
    const realP = truth.findIndex((l, i) => l.kind === 'line' && l.branch === 'P' && l.j === 20 && !labelled.has(i));
    const realP22 = truth.findIndex((l) => l.kind === 'line' && l.branch === 'P' && l.j === 22);
    expect(realP).toBeGreaterThanOrEqual(0);
    expect(realP22).toBeGreaterThanOrEqual(0);
    const lines = body.lines.map((l, i) => {
      if (i === realP) return { ...l, assignment: { upper: NU3, lower: GROUND, branch: 'P', j: 22 } };
      if (i === realP22) return { position: l.position, intensity: l.intensity };
      return l;
    });
    const res = await app().inject({ method: 'POST', url: '/v1/fits', payload: { ...body, lines } });
    expect(res.statusCode).toBe(200);
    const out = res.json().lines as Outcome[];
    const wrongLabel = out[realP] as Outcome;
    expect(wrongLabel.assignment).toMatchObject({ branch: 'P', j: 22, source: 'given' });
    expect(wrongLabel.status).toBe('rejected');
    // Its record carries the studentised residual against the final fit, beyond the rejection threshold (≥ 4).
    expect(Math.abs((wrongLabel as { studentisedResidual?: number }).studentisedResidual as number)).toBeGreaterThan(4);
    expect((out[realP22] as Outcome).assignment).toBeUndefined();
  });
});

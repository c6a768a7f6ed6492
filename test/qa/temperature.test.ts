import { describe, expect, it } from 'vitest';
import { checkRequestSchema } from '../../services/schemas/checks.js';
import { runCheck } from '../../services/usecases/check.js';
import { boltzmannTemperature } from '../../src/qa/temperature.js';
import { CO_12_16, HCL_1_35, independentLines } from '../helpers/independent-lines.js';

/**
 * Rotational temperature from Boltzmann-distributed lists made by the independent generator (its own Hönl–London
 * factors R: J″+1, P: J″, its own term values and c₂). Noise-free intensities must give T to 0.1 % (only the
 * arithmetic and the iteration on the stimulated-emission factor); 1 % intensity noise must give T within 1 %.
 */
function points(t: number, branches: readonly ('P' | 'R')[], noise: number, seed: number) {
  const { lines, truth } = independentLines({
    molecule: CO_12_16,
    bands: [{ upper: 1, lower: 0, jMax: 40, branches }],
    temperature: t,
    intensityNoise: noise,
    seed,
  });
  return lines.map((l, i) => ({
    position: truth[i]?.exact as number,
    intensity: l.intensity as number,
    branch: l.assignment?.branch as 'P' | 'R',
    j: l.assignment?.j as number,
    lowerEnergy: truth[i]?.lowerEnergy as number,
  }));
}

describe('Boltzmann-plot temperature', () => {
  it.each([150, 296, 800, 2000])('%i K from noise-free P and R lines of CO 1-0 (J″ ≤ 40) within 0.1 %', (t) => {
    const plot = boltzmannTemperature(points(t, ['P', 'R'], 0, 1));
    expect(Math.abs((plot?.temperature.value as number) / t - 1)).toBeLessThan(1e-3);
  });

  it.each([
    ['P', 296],
    ['R', 296],
    ['P', 1000],
    ['R', 1000],
  ] as const)('the %s branch alone gives %i K within 0.1 % (each branch its own Hönl–London factor)', (br, t) => {
    const plot = boltzmannTemperature(points(t, [br], 0, 2));
    expect(Math.abs((plot?.temperature.value as number) / t - 1)).toBeLessThan(1e-3);
  });

  it('600 K with 1 % intensity noise: within 1 %, and the truth inside 3σ of the reported uncertainty', () => {
    const plot = boltzmannTemperature(points(600, ['P', 'R'], 0.01, 3));
    const tq = plot?.temperature;
    expect(Math.abs((tq?.value as number) / 600 - 1)).toBeLessThan(0.01);
    expect(Math.abs((tq?.value as number) - 600)).toBeLessThan(3 * (tq?.uncertainty as number));
  });
});

describe('temperature through the QA check (assigned H35Cl list from the independent generator)', () => {
  const schema = checkRequestSchema(100_000);
  it.each([296, 700])('%i K recovered within 1 % through /v1/checks’ use case', (t) => {
    const { lines } = independentLines({
      molecule: HCL_1_35,
      bands: [{ upper: 1, lower: 0, jMax: 14 }],
      sigma: 0.001,
      temperature: t,
      intensityNoise: 0.005,
      seed: 9,
    });
    const body = {
      species: 'H35Cl',
      lines: lines.map((l) => ({
        position: l.position,
        uncertainty: l.uncertainty,
        intensity: l.intensity,
        assignment: { species: 'H35Cl', band: '1-0', branch: l.assignment?.branch, j: l.assignment?.j },
      })),
    };
    const r = runCheck(schema.parse(body));
    const c = r.checks.find((x) => x.id === 'temperature');
    const value = (c?.measured.temperature as { value: number } | undefined)?.value as number;
    expect(Math.abs(value / t - 1)).toBeLessThan(0.01);
  });
});

import { describe, expect, it } from 'vitest';
import { useApp } from '../helpers/app.js';

/**
 * A peak list pasted with some rows twice. The lines are our own: 12C16O 1-0 P(1)–P(20) and R(0)–R(19) from Huber &
 * Herzberg's equilibrium constants (ω_e 2169.81358, ω_e x_e 13.28831, ω_e y_e 0.010511, B_e 1.93128087, α_e
 * 0.01750441, γ_e 5.487e-7, D_e 6.1216e-6 cm⁻¹; from memory), own term values, rounded to 1e-4 cm⁻¹, no σ.
 */
const app = useApp();

function term(v: number, j: number): number {
  const x = v + 0.5;
  const g = 2169.81358 * x - 13.28831 * x * x + 0.010511 * x ** 3;
  const b = 1.93128087 - 0.01750441 * x + 5.487e-7 * x * x;
  const y = j * (j + 1);
  return g + b * y - 6.1216e-6 * y * y;
}

function coFundamental(): { position: number }[] {
  const out: { position: number }[] = [];
  for (let j = 1; j <= 20; j++) out.push({ position: Number((term(1, j - 1) - term(0, j)).toFixed(4)) });
  for (let j = 0; j < 20; j++) out.push({ position: Number((term(1, j + 1) - term(0, j)).toFixed(4)) });
  return out;
}

describe('a line list with duplicated rows', () => {
  it('assigns each position once and says the unassigned ones repeat earlier lines', async () => {
    const lines = coFundamental();
    const body = { species: 'CO', lines: [...lines, ...lines.slice(3, 6)] };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(200);
    const out = r.json();
    expect(out.statistics.assigned).toBe(40);
    const unexplained = out.warnings.find((w: { code: string }) => w.code === 'LINES_UNEXPLAINED');
    expect(unexplained.lines).toEqual([40, 41, 42]);
    expect(unexplained.message).toMatch(/3 of them repeat the position of an earlier line.*lines 40, 41, 42/);
  });
  it('a list without repeats says nothing about repeats', async () => {
    const lines = coFundamental();
    const body = { species: 'CO', lines: [...lines, { position: 2160.1234 }] };
    const r = await app().inject({ method: 'POST', url: '/v1/fits', payload: body });
    expect(r.statusCode).toBe(200);
    const unexplained = r.json().warnings.find((w: { code: string }) => w.code === 'LINES_UNEXPLAINED');
    expect(unexplained.lines).toEqual([40]);
    expect(unexplained.message).not.toMatch(/repeat/);
  });
});

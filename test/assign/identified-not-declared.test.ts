import { describe, expect, it } from 'vitest';
import { analyseLineList } from '../../src/assign/analyse.js';
import { ScienceError } from '../../src/errors.js';

/**
 * The diatomic pipeline alone, fed a dense polyatomic band without a species: a diatomic with a handful of lines in
 * the window meets some of them by coincidence (hydrogen iodide, 2 of 4), which identification must not take for
 * the species (src/assign/identify.ts, the chance rule). The refusal names the candidates and asks for a species,
 * never speaking of "the declared species".
 * Own generator: N2O ν3 (00⁰1–00⁰0), from memory: ν0 2223.7567, B″ 0.41901, B′ 0.41555, D″ 1.76e-7, D′ 1.75e-7 cm⁻¹,
 * P(1) … P(40), R(0) … R(40), positions only.
 */
function n2oNu3(): { position: number }[] {
  const f = (b: number, d: number, j: number) => b * j * (j + 1) - d * (j * (j + 1)) ** 2;
  const out: { position: number }[] = [];
  for (let j = 0; j <= 40; j++) {
    if (j >= 1) out.push({ position: 2223.7567 + f(0.41555, 1.75e-7, j - 1) - f(0.41901, 1.76e-7, j) });
    out.push({ position: 2223.7567 + f(0.41555, 1.75e-7, j + 1) - f(0.41901, 1.76e-7, j) });
  }
  return out;
}

describe('a dense polyatomic band sent to the diatomic pipeline without a species', () => {
  it('is refused as unidentified (its diatomic coincidences are chance), with candidates and no "declared species"', () => {
    let caught: unknown;
    try {
      analyseLineList(n2oNu3(), undefined);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ScienceError);
    const e = caught as ScienceError;
    // The coincidence this list meets (HI, 2 of its 4 lines in the window, score 0.52 before the chance rule of
    // identify.ts) no longer identifies it: no species is chosen.
    expect(e.code).toBe('SPECIES_UNIDENTIFIED');
    expect(e.message).not.toMatch(/the declared species/);
    // What the caller needs survives the 300-character cut of a problem's detail.
    expect(e.message.slice(0, 300)).toMatch(/^no species of the reference library explains these lines/);
    expect(e.message.slice(0, 300)).toMatch(/declare "species"/);
    expect((e.details as { candidates?: unknown[] }).candidates?.length).toBeGreaterThan(0);
  });
});

import { describe, expect, it } from 'vitest';
import { type RadialLevel, solveRadialLevels } from '../../src/potential/numerov.js';

// Fast checks of the Numerov solver against closed forms, on grids of 200–1000 points so that each case costs a few
// milliseconds (a mutation run re-runs them for every mutant of numerov.ts). Everything is computed inside `it`.
// The equation is −C ψ″ + V(r) ψ = E ψ with ψ = 0 at both ends of the grid. The tolerances were set from the
// measured convergence: Numerov's error falls as h⁴ (halving the step shrank every error 14–16×), and each bound
// is about twice the error measured at the step used.

const energies = (levels: readonly RadialLevel[]) => levels.map((l) => l.energy);

describe('Morse oscillator: E_v = ω(v + ½) − ωx(v + ½)² exactly, ω = 2a√(CD), ωx = a²C', () => {
  // V = D(1 − e^{−a(r − r_e)})² on the whole line has exactly these levels (P. M. Morse, Phys. Rev. 34, 57 (1929));
  // on r ∈ [2, 12] Å with r_e = 5 the cut-off wall at r = 2 lies 360 D above the minimum and changes nothing at
  // this precision. D = 100, a = 1 Å⁻¹, C = 1 cm⁻¹ Å²: ω = 20, ωx = 1 cm⁻¹.
  const morse = (D: number, a: number, re: number) => (r: number) => D * (1 - Math.exp(-a * (r - re))) ** 2;

  it('v = 0…4 on 501 points (step 0.02 Å): 9.75, 27.75, 43.75, 57.75, 69.75 cm⁻¹ within 1e-4 (measured ≤ 4.8e-5)', () => {
    const levels = solveRadialLevels(morse(100, 1, 5), 1, { from: 2, to: 12, step: 0.02 }, 5);
    expect(levels.map((l) => l.v)).toEqual([0, 1, 2, 3, 4]);
    const hand = [9.75, 27.75, 43.75, 57.75, 69.75]; // 20x − x², x = ½, 3/2, 5/2, 7/2, 9/2
    energies(levels).forEach((e, v) => {
      expect(Math.abs(e - (hand[v] as number))).toBeLessThan(1e-4);
    });
  });

  it('C enters the recurrence: C = 4 gives ω = 40, ωx = 4, so E = 40x − 4x² = 19, 51 (1e-4; measured 9e-6, 3.6e-5)', () => {
    const levels = solveRadialLevels(morse(100, 1, 5), 4, { from: 2.5, to: 12, step: 0.04 }, 2);
    expect(Math.abs((levels[0] as RadialLevel).energy - 19)).toBeLessThan(1e-4);
    expect(Math.abs((levels[1] as RadialLevel).energy - 51)).toBeLessThan(1e-4);
  });

  it('guesses only start the bisection: near, far, below, above the range or not finite, the levels are the same (1e-9)', () => {
    const V = morse(100, 1, 5);
    const grid = { from: 2, to: 12, step: 0.05 }; // coarse: only the agreement with the plain solve is checked
    const plain = energies(solveRadialLevels(V, 1, grid, 4));
    const hand = [9.75, 27.75, 43.75, 57.75];
    const cases: (readonly number[])[] = [
      hand.map((e) => e + 0.3), // within the first ±1 bracket
      hand.map((e) => e - 0.7),
      [27.75, 43.75, 57.75, 69.75], // each one level too high: the bracket must widen below the guess
      [1, 9.75, 27.75, 43.75], // each one level too low: widen above
      [9.76, 40, 40, 40], // the guess of v = 3 sits below v = 2: outside (lo, hi) once v = 2 is found
      [-50, 500, Number.NaN, Number.POSITIVE_INFINITY], // outside the well or not numbers: ignored
      [9.75], // shorter than the levels asked
    ];
    for (const guesses of cases) {
      const got = energies(solveRadialLevels(V, 1, grid, 4, guesses));
      expect(got.length).toBe(4);
      got.forEach((e, v) => {
        expect(Math.abs(e - (plain[v] as number))).toBeLessThan(1e-9);
      });
    }
  });
});

describe('Kratzer oscillator V = D(1 − r_e/r)²: E_v and B_v = C⟨1/r²⟩ in closed form', () => {
  // With the centrifugal term C J(J+1)/r² the radial equation is hydrogen-like (A. Kratzer, Z. Phys. 3, 289
  // (1920)): C λ(λ+1) = D r_e² + C J(J+1) and E = D − D² r_e² / (C (v + λ + 1)²). By Hellmann–Feynman,
  // C⟨1/r²⟩ = ∂E/∂[J(J+1)] at J = 0 = 2 D² r_e² / (C (v + λ + 1)³ (2λ + 1)). Worked out here for D = 100 cm⁻¹,
  // r_e = 1 Å, C = 1 cm⁻¹ Å²: λ = −½ + √(¼ + 100) = 9.5124922…
  const D = 100;
  const kratzer = (r: number) => D * (1 - 1 / r) ** 2;
  const lambda = -0.5 + Math.sqrt(0.25 + 100);
  const exactE = (v: number) => D - (D * D) / (v + lambda + 1) ** 2;
  const exactB = (v: number) => (2 * D * D) / ((v + lambda + 1) ** 3 * (2 * lambda + 1));

  it('v = 0…3 on 493 points (step 0.02 Å): E within 3e-5 cm⁻¹ (measured ≤ 1.2e-5), B_v within 3e-6 relative (1.1e-6)', () => {
    expect(exactE(0)).toBeCloseTo(9.5125, 3); // 100 − 10⁴/10.5125² = 100 − 90.4875
    const levels = solveRadialLevels(kratzer, 1, { from: 0.15, to: 10, step: 0.02 }, 4);
    expect(levels.length).toBe(4);
    levels.forEach((l, v) => {
      expect(Math.abs(l.energy - exactE(v))).toBeLessThan(3e-5);
      expect(Math.abs(l.rotational - exactB(v)) / exactB(v)).toBeLessThan(3e-6);
    });
    // B falls with v (the anharmonic well widens outward): the levels are not given one shared value.
    expect((levels[0] as RadialLevel).rotational - (levels[3] as RadialLevel).rotational).toBeGreaterThan(0.05);
  });
});

describe('wide forbidden regions: the running solution is rescaled before it overflows', () => {
  // V = (r − 10)² with C = 0.01: E_v = 2√(C·1)(v + ½) = 0.2(v + ½). Between r = 0.5 and 20 the solution grows by
  // about exp(∫√(V/C) dr) ≈ e^{450} on each side of the well, past the range of a double without rescaling.
  it('E = 0.1, 0.3, 0.5 within 1e-6 and B₀ = C⟨1/r²⟩ of the Gaussian |ψ₀|² (variance 0.05) within 1e-7 relative', () => {
    const C = 0.01;
    const levels = solveRadialLevels((r) => (r - 10) ** 2, C, { from: 0.5, to: 20, step: 0.02 }, 3);
    expect(levels.length).toBe(3);
    energies(levels).forEach((e, v) => {
      expect(Math.abs(e - 0.2 * (v + 0.5))).toBeLessThan(1e-6);
    });
    // ψ₀ ∝ exp(−(r − 10)²/(2·√C)): |ψ₀|² ∝ exp(−(r − 10)²/√C) = exp(−10 (r − 10)²), midpoint rule on [8, 12].
    let num = 0;
    let den = 0;
    for (let i = 0; i < 40_000; i++) {
      const r = 8 + (i + 0.5) * 1e-4;
      const w = Math.exp(-10 * (r - 10) ** 2);
      num += w / (r * r);
      den += w;
    }
    const b0 = (C * num) / den; // ≈ 1.0015e-4 = C/r₀² (1 + 3·0.05/r₀²)
    expect(Math.abs((levels[0] as RadialLevel).rotational - b0) / b0).toBeLessThan(1e-7);
  });
});

describe('forbidden regions too wide for a double: rescaling in the node count and in the wavefunction', () => {
  // The well moved to r₀ = 15 on a grid 0.5…30: on either side the solution grows by about
  // exp(∫√(V/C) dr) = exp(10 · 14.5²/2) ≈ e^{1051} and exp(10 · 15²/2) ≈ e^{1125}, far past 1e308, before the well
  // (outward) and before the join (inward). Without rescaling the node count and ⟨1/r²⟩ would be NaN.
  it('E = 0.1, 0.3 within 1e-6 and B₀ = C⟨1/r²⟩ of the Gaussian |ψ₀|² about 15 Å within 1e-7 relative', () => {
    const C = 0.01;
    const levels = solveRadialLevels((r) => (r - 15) ** 2, C, { from: 0.5, to: 30, step: 0.02 }, 2);
    expect(levels.length).toBe(2);
    energies(levels).forEach((e, v) => {
      expect(Math.abs(e - 0.2 * (v + 0.5))).toBeLessThan(1e-6);
    });
    let num = 0;
    let den = 0;
    for (let i = 0; i < 40_000; i++) {
      const r = 13 + (i + 0.5) * 1e-4;
      const w = Math.exp(-10 * (r - 15) ** 2);
      num += w / (r * r);
      den += w;
    }
    const b0 = (C * num) / den;
    expect(Math.abs((levels[0] as RadialLevel).rotational - b0) / b0).toBeLessThan(1e-7);
  });
});

describe('which levels the grid holds', () => {
  it('the top of the well is the lower end of the grid: a plateau of 12 on the left leaves six levels (1, 3 to 1e-4, 5 to 1e-3)', () => {
    // V = (r − 10)² on the right, min((r − 10)², 12) on the left, grid 2…18: V(2) = 12 < V(18) = 64, so levels
    // stop below 12. The oscillator's 1, 3, 5, 7, 9, 11 lie below; the plateau lowers the upper ones (tunnelling
    // into it): measured 1 − 1e-6, 3 − 1.5e-5, 5 − 2.1e-4, then 6.998, 8.988, 10.930.
    const V = (r: number) => (r < 10 ? Math.min((r - 10) ** 2, 12) : (r - 10) ** 2);
    const levels = solveRadialLevels(V, 1, { from: 2, to: 18, step: 0.04 }, 20);
    expect(levels.length).toBe(6);
    expect(Math.abs((levels[0] as RadialLevel).energy - 1)).toBeLessThan(1e-4);
    expect(Math.abs((levels[1] as RadialLevel).energy - 3)).toBeLessThan(1e-4);
    expect(Math.abs((levels[2] as RadialLevel).energy - 5)).toBeLessThan(1e-3);
    for (const l of levels) expect(l.energy).toBeLessThan(12);
    // The same well mirrored (plateau on the right) holds the same six.
    const mirrored = solveRadialLevels((r) => V(20 - r), 1, { from: 2, to: 18, step: 0.04 }, 20);
    expect(mirrored.length).toBe(6);
    mirrored.forEach((l, v) => {
      expect(Math.abs(l.energy - (levels[v] as RadialLevel).energy)).toBeLessThan(1e-6);
    });
  });

  it('grids of exactly 10 and 2 000 000 points are accepted, 9 and 2 000 001 refused; r must start above 0', () => {
    const flat = () => 0;
    const message = 'radial grid must start at r > 0 with 10…2e6 points';
    // 10 points: 1 + 9 × 0.25 = 3.25 (exact in binary).
    expect(solveRadialLevels(flat, 1, { from: 1, to: 3.25, step: 0.25 }, 0)).toEqual([]);
    expect(() => solveRadialLevels(flat, 1, { from: 1, to: 3, step: 0.25 }, 0)).toThrow(message);
    expect(solveRadialLevels(flat, 1, { from: 1, to: 1 + 1_999_999 * 0.5, step: 0.5 }, 0)).toEqual([]);
    expect(() => solveRadialLevels(flat, 1, { from: 1, to: 1 + 2_000_000 * 0.5, step: 0.5 }, 0)).toThrow(message);
    expect(() => solveRadialLevels(flat, 1, { from: 0, to: 3, step: 0.25 }, 0)).toThrow(message);
    expect(() => solveRadialLevels(flat, 1, { from: -1, to: 3, step: 0.25 }, 0)).toThrow(message);
    expect(() => solveRadialLevels(flat, 1, { from: Number.NaN, to: 3, step: 0.25 }, 0)).toThrow(message);
    expect(solveRadialLevels(flat, 1, { from: 1e-9, to: 3, step: 0.25 }, 0)).toEqual([]);
  });

  it('a box of 1 Å on 201 points: E_n = C(nπ)² for n = 1, 2 within 1e-4 relative, and B = C⟨1/r²⟩ of sin² (1e-4)', () => {
    // ψ_n = sin(nπ(r − 1)) on [1, 2]; ⟨1/r²⟩ by the midpoint rule on 20 000 points.
    const C = 2;
    const levels = solveRadialLevels(() => 0, C, { from: 1, to: 2, step: 0.005 }, 2);
    levels.forEach((l, v) => {
      const n = v + 1;
      const e = C * (n * Math.PI) ** 2;
      expect(Math.abs(l.energy - e) / e).toBeLessThan(1e-4);
      let num = 0;
      let den = 0;
      for (let i = 0; i < 20_000; i++) {
        const r = 1 + (i + 0.5) / 20_000;
        const w = Math.sin(n * Math.PI * (r - 1)) ** 2;
        num += w / (r * r);
        den += w;
      }
      expect(Math.abs(l.rotational - (C * num) / den) / ((C * num) / den)).toBeLessThan(1e-4);
    });
  });
});

import { compileDunham } from './dunham.js';
import { type Band, type Branch, upperJ } from './transitions.js';

export interface PredictedLine {
  readonly band: Band;
  readonly branch: Branch;
  readonly j: number;
  /** Position in cm⁻¹. */
  readonly position: number;
  /** Lower-state term energy E″ above E(v=0, J=0), in cm⁻¹ (for Boltzmann factors). */
  readonly lowerEnergy: number;
}

/**
 * Line positions of a ¹Σ–¹Σ band from Dunham coefficients: ν = E(v′, J′) − E(v″, J″), for the R branch from
 * J″ = 0 and the P branch from J″ = 1 up to jMax (pure rotation, v′ = v″: R lines only).
 */
export function predictBand(y: ReadonlyMap<string, number>, band: Band, jMax: number): PredictedLine[] {
  const out: PredictedLine[] = [];
  const energy = compileDunham(y);
  const e00 = energy(0, 0);
  const branches: Branch[] = band.upper === band.lower ? ['R'] : ['P', 'R'];
  for (const branch of branches) {
    for (let j = branch === 'P' ? 1 : 0; j <= jMax; j++) {
      const ju = upperJ({ branch, j });
      const el = energy(band.lower, j);
      out.push({ band, branch, j, position: energy(band.upper, ju) - el, lowerEnergy: el - e00 });
    }
  }
  return out;
}

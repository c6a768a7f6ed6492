import type { LineInput } from '../../src/fit/fit-lines.js';
import { predictBand } from '../../src/models/predict.js';
import type { Band } from '../../src/models/transitions.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { type MassValue, reducedMass } from '../../src/species/reduced-mass.js';
import { seededNormal } from './random.js';

export interface SyntheticOptions {
  readonly species: string;
  readonly bands: readonly Band[];
  readonly jMax: number;
  readonly sigma: number;
  readonly seed: number;
  /** Dunham coefficients to use instead of the library's ("k,l" → value). */
  readonly y?: ReadonlyMap<string, number>;
}

/** Assigned lines generated from Dunham coefficients, with seeded Gaussian noise of standard deviation sigma. */
export function syntheticAssignedLines(o: SyntheticOptions): {
  lines: LineInput[];
  masses: Map<string, MassValue>;
  y: ReadonlyMap<string, number>;
} {
  const iso = parseSpecies(o.species);
  const y = o.y ?? dunhamFromEntry(constantsFor(iso) ?? (undefined as never));
  const noise = seededNormal(o.seed);
  const lines: LineInput[] = [];
  for (const band of o.bands) {
    for (const p of predictBand(y, band, o.jMax)) {
      lines.push({
        position: p.position + o.sigma * noise(),
        uncertainty: o.sigma,
        assignment: { species: iso.formula, band, branch: p.branch, j: p.j, source: 'given' },
      });
    }
  }
  return { lines, masses: new Map([[iso.formula, reducedMass(iso)]]), y };
}

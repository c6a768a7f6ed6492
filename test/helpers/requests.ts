import { predictBand } from '../../src/models/predict.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { seededNormal } from './random.js';

/** A /v1/fits body of assigned lines generated from the library constants of a species, with seeded noise. */
export function assignedFitBody(species: string, bands: string[], jMax: number, sigma: number, seed: number) {
  const y = dunhamFromEntry(constantsFor(parseSpecies(species)) ?? (undefined as never));
  const noise = seededNormal(seed);
  const lines = bands.flatMap((b) => {
    const [upper, lower] = b.split('-').map(Number) as [number, number];
    return predictBand(y, { upper, lower }, jMax).map((p) => ({
      position: p.position + sigma * noise(),
      uncertainty: sigma,
      assignment: { band: b, branch: p.branch, j: p.j },
    }));
  });
  return { species, lines };
}

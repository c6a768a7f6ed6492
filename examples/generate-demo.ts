/**
 * Writes the demo scan sets of the README: an invented scenario of our own, the "Fernhollow cylinder-QA bench",
 * which records the HCl fundamental and first overtone of a test cylinder, and a CO fundamental. The positions are
 * generated from the reference library's constants (Huber & Herzberg) with seeded noise; they are not measurements.
 *
 *   npx tsx examples/generate-demo.ts
 */
import { writeFileSync } from 'node:fs';
import { predictBand } from '../src/models/predict.js';
import { constantsFor, dunhamFromEntry } from '../src/species/library.js';
import { parseSpecies } from '../src/species/parse.js';

function rng(seed: number) {
  let a = seed >>> 0;
  const u = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(Math.max(u(), 1e-300))) * Math.cos(2 * Math.PI * u());
}

function scan(species: string, bands: string[], jMax: number, sigma: number, seed: number) {
  const y = dunhamFromEntry(constantsFor(parseSpecies(species)) ?? (undefined as never));
  const noise = rng(seed);
  return bands.flatMap((b) => {
    const [upper, lower] = b.split('-').map(Number) as [number, number];
    return predictBand(y, { upper, lower }, jMax).map((p) => ({
      position: Number((p.position + sigma * noise()).toFixed(4)),
      uncertainty: sigma,
      assignment: { band: b, branch: p.branch, j: p.j },
    }));
  });
}

writeFileSync(
  'examples/fernhollow-hcl-cylinder-7741.json',
  `${JSON.stringify({ species: 'H35Cl', unit: 'cm-1', lines: scan('H35Cl', ['1-0', '2-0'], 9, 0.003, 7741) }, null, 1)}\n`,
);
writeFileSync(
  'examples/fernhollow-co-cylinder-0192.json',
  `${JSON.stringify({ species: 'CO', unit: 'cm-1', lines: scan('CO', ['1-0'], 20, 0.002, 192) }, null, 1)}\n`,
);
console.log('wrote examples/fernhollow-*.json');

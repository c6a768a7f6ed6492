import { SECOND_RADIATION_CM_K } from '../../src/constants/codata-2018.js';
import { dunhamEnergy } from '../../src/models/dunham.js';
import type { Band, Branch } from '../../src/models/transitions.js';
import { constantsFor, dunhamFromEntry } from '../../src/species/library.js';
import { parseSpecies } from '../../src/species/parse.js';
import { seededNormal, seededRandom } from './random.js';

/**
 * Synthetic "real" scans for the assignment tests. The truth is deliberately NOT the reference library: the
 * generating constants are the library's, perturbed (B_e +0.02 %, ω_e +0.05 cm⁻¹, and an H_e term the library
 * lacks), so that the assigner's predictions are off at high J the way real reference constants are. Intensities
 * follow I ∝ ν S exp(−c₂E″/T)(1 − exp(−c₂ν/T)) × abundance × band strength, written out here independently of
 * src/assign, with 10 % multiplicative noise. Then the instrument: offset δ and scale ε (ν_obs = ν(1+ε) + δ),
 * Gaussian position noise, a fraction of lines lost, and spurious peaks at random positions and intensities.
 */
export interface ScanSpec {
  /** `y` overrides the library's Dunham coefficients (for species the library lacks). */
  readonly isotopologues: readonly { species: string; abundance: number; y?: ReadonlyMap<string, number> }[];
  readonly bands: readonly (Band & { strength: number })[];
  readonly temperature: number;
  readonly offset: number;
  readonly scalePpm: number;
  readonly sigma: number;
  readonly missing: number;
  readonly spurious: number;
  /** Relative detection limit: lines weaker than this fraction of the strongest are not in the scan. */
  readonly detection: number;
  readonly seed: number;
  readonly jMax?: number;
  /** Use the library constants unperturbed (a reference-quality gas). */
  readonly exactReference?: boolean;
}

export interface TrueLine {
  readonly species: string;
  readonly band: string;
  readonly branch: Branch;
  readonly j: number;
}

export interface Scan {
  readonly peaks: { position: number; uncertainty: number; intensity: number }[];
  /** The truth per peak; undefined for spurious peaks. */
  readonly truth: (TrueLine | undefined)[];
}

export function syntheticScan(spec: ScanSpec): Scan {
  const rnd = seededRandom(spec.seed);
  const gauss = seededNormal(spec.seed + 1000);
  const lines: { position: number; intensity: number; truth: TrueLine }[] = [];
  for (const { species, abundance, y: given } of spec.isotopologues) {
    const iso = parseSpecies(species);
    const y = new Map(given ?? dunhamFromEntry(constantsFor(iso) ?? (undefined as never)));
    if (!spec.exactReference) {
      y.set('0,1', (y.get('0,1') as number) * 1.0002);
      y.set('1,0', (y.get('1,0') as number) + 0.05);
      // An H_e of the size the Kratzer-type estimate 4B_e⁵/ω_e⁴ suggests (order of magnitude only).
      y.set('0,3', (4 * (y.get('0,1') as number) ** 5) / (y.get('1,0') as number) ** 4);
    }
    const e00 = dunhamEnergy(y, 0, 0);
    const c2T = SECOND_RADIATION_CM_K / spec.temperature;
    for (const b of spec.bands) {
      const branches: Branch[] = b.upper === b.lower ? ['R'] : ['P', 'R'];
      for (const branch of branches) {
        for (let j = branch === 'P' ? 1 : 0; j <= (spec.jMax ?? 60); j++) {
          const ju = branch === 'R' ? j + 1 : j - 1;
          const el = dunhamEnergy(y, b.lower, j);
          const nu = dunhamEnergy(y, b.upper, ju) - el;
          const s = branch === 'R' ? j + 1 : j;
          const intensity = abundance * b.strength * nu * s * Math.exp(-c2T * (el - e00)) * (1 - Math.exp(-c2T * nu));
          lines.push({
            position: nu,
            intensity,
            truth: { species: iso.formula, band: `${b.upper}-${b.lower}`, branch, j },
          });
        }
      }
    }
  }
  const max = Math.max(...lines.map((l) => l.intensity));
  const real = lines.filter((l) => l.intensity >= spec.detection * max && rnd() >= spec.missing);
  const lo = Math.min(...real.map((l) => l.position)) - 5;
  const hi = Math.max(...real.map((l) => l.position)) + 5;
  const peaks: Scan['peaks'] = [];
  const truth: Scan['truth'] = [];
  for (const l of real) {
    peaks.push({
      position: l.position * (1 + spec.scalePpm * 1e-6) + spec.offset + spec.sigma * gauss(),
      uncertainty: spec.sigma,
      intensity: (l.intensity / max) * (1 + 0.1 * gauss()),
    });
    truth.push(l.truth);
  }
  const nSpurious = Math.round((spec.spurious / (1 - spec.spurious)) * real.length);
  const realIntensities = peaks.map((p) => p.intensity);
  for (let i = 0; i < nSpurious; i++) {
    peaks.push({
      position: lo + (hi - lo) * rnd(),
      uncertainty: spec.sigma,
      intensity: realIntensities[Math.floor(rnd() * realIntensities.length)] as number,
    });
    truth.push(undefined);
  }
  // Shuffle, as a peak picker would list them by position anyway.
  const order = peaks.map((p, i) => ({ p, t: truth[i], k: p.position })).sort((a, b) => a.k - b.k);
  return { peaks: order.map((o) => o.p), truth: order.map((o) => o.t) };
}

/** The bars of the assignment tests: share of true lines assigned correctly, share of spurious lines taken. */
export function scoreAssignment(
  scan: Scan,
  assigned: readonly ({ species: string; band: string; branch: string; j: number } | undefined)[],
): { correct: number; trueLines: number; spuriousTaken: number; spurious: number; wrong: string[] } {
  let correct = 0;
  let trueLines = 0;
  let spuriousTaken = 0;
  let spurious = 0;
  const wrong: string[] = [];
  scan.truth.forEach((t, i) => {
    const a = assigned[i];
    if (t) {
      trueLines++;
      if (a && a.species === t.species && a.band === t.band && a.branch === t.branch && a.j === t.j) correct++;
      else
        wrong.push(
          `${i}: true ${t.species} ${t.band} ${t.branch}(${t.j}) got ${a ? `${a.species} ${a.band} ${a.branch}(${a.j})` : 'nothing'}`,
        );
    } else {
      spurious++;
      if (a) spuriousTaken++;
    }
  });
  return { correct, trueLines, spuriousTaken, spurious, wrong };
}

/** Natural-mixture HCl, chlorine isotopes by CIAAW abundance (IUPAC via NIST). */
export const HCL_NATURAL = [
  { species: 'H35Cl', abundance: 0.7576 },
  { species: 'H37Cl', abundance: 0.2424 },
] as const;

/** A 296 K scan of the HCl fundamental with the usual defaults, overridable field by field. */
export function hclScan(over: Partial<ScanSpec> = {}): Scan {
  return syntheticScan({
    isotopologues: HCL_NATURAL,
    bands: [{ upper: 1, lower: 0, strength: 1 }],
    temperature: 296,
    offset: 0,
    scalePpm: 0,
    sigma: 0.002,
    missing: 0.05,
    spurious: 0.1,
    detection: 1e-3,
    seed: 5,
    ...over,
  });
}

import {
  type BandRequest,
  type CustomaryConstants,
  independentLines,
  type MoleculeConstants,
  uniformStream,
} from './independent-lines.js';

/**
 * Scans for the assignment scenarios of issue 12, built on the independent generator (test/helpers/
 * independent-lines.ts) and nothing from src/: isotopologues by the usual mass scaling of the customary constants
 * (ρ = √(μ/μᵢ): ω_e ρ, ω_e x_e ρ², ω_e y_e ρ³, B_e ρ², α_e ρ³, γ_e ρ⁴, D_e ρ⁴, β_e ρ⁵, H_e ρ⁶; Herzberg, Spectra of
 * Diatomic Molecules, ch. III), lines lost at random, spurious lines, a source label per band, intensities scaled
 * by abundance and a band-strength factor, and a detection limit.
 */

/** Atomic masses in u, AME2020 (Wang et al., Chin. Phys. C 45, 030003 (2021)), from memory to the digits shown. */
export const MASS: Record<string, number> = {
  '1H': 1.00782503223,
  '2H': 2.01410177812,
  '12C': 12,
  '13C': 13.00335483507,
  '16O': 15.99491461957,
  '17O': 16.9991317565,
  '18O': 17.99915961286,
  '19F': 18.99840316273,
  '35Cl': 34.968852682,
  '37Cl': 36.965902602,
  '79Br': 78.9183376,
  '81Br': 80.9162897,
};

const mu = (a: string, b: string) =>
  ((MASS[a] as number) * (MASS[b] as number)) / ((MASS[a] as number) + (MASS[b] as number));

/** The constants of another isotopologue of `parent` (atoms a–b) by mass scaling. */
export function isotopologue(
  parent: MoleculeConstants,
  from: [string, string],
  to: [string, string],
): MoleculeConstants {
  const rho = Math.sqrt(mu(from[0], from[1]) / mu(to[0], to[1]));
  const k = parent.constants;
  const s = (v: { value: number }, p: number) => ({ value: v.value * rho ** p, source: 'mass-scaled' });
  const constants: CustomaryConstants = {
    omega_e: s(k.omega_e, 1),
    omega_e_x_e: s(k.omega_e_x_e, 2),
    omega_e_y_e: s(k.omega_e_y_e, 3),
    ...(k.omega_e_z_e ? { omega_e_z_e: s(k.omega_e_z_e, 4) } : {}),
    B_e: s(k.B_e, 2),
    alpha_e: s(k.alpha_e, 3),
    gamma_e: s(k.gamma_e, 4),
    D_e: s(k.D_e, 4),
    beta_e: s(k.beta_e, 5),
    H_e: s(k.H_e, 6),
  };
  return { formula: `${to[0]}-${to[1]}`, constants };
}

export interface ScanBand extends BandRequest {
  /** Multiplies the intensities of this band (transition-moment ratio). Default 1. */
  readonly strength?: number;
  readonly source?: string;
}

export interface ScanPart {
  readonly molecule: MoleculeConstants;
  readonly abundance: number;
  readonly bands: readonly ScanBand[];
}

export interface ScanOptions {
  readonly parts: readonly ScanPart[];
  readonly temperature: number;
  readonly sigma: number;
  readonly withUncertainties: boolean;
  readonly withIntensities: boolean;
  /** Share of true lines lost at random. */
  readonly missing: number;
  /** Spurious lines as a share of the true lines kept. */
  readonly spurious: number;
  /** Lines weaker than this fraction of the strongest are not in the scan. */
  readonly detection: number;
  readonly seed: number;
}

export interface ScanLine {
  readonly position: number;
  readonly uncertainty?: number;
  readonly intensity?: number;
  readonly source?: string;
}

export interface ScanTruth {
  readonly species: string;
  readonly band: string;
  readonly branch: 'P' | 'Q' | 'R';
  readonly j: number;
}

export function scan(o: ScanOptions): { lines: ScanLine[]; truth: (ScanTruth | undefined)[] } {
  const raw: { line: ScanLine; truth: ScanTruth; strength: number }[] = [];
  let seed = o.seed;
  for (const part of o.parts) {
    for (const band of part.bands) {
      const g = independentLines({
        molecule: part.molecule,
        bands: [band],
        sigma: o.sigma,
        seed: seed++,
        temperature: o.temperature,
        intensityNoise: 0.05,
        unassigned: true,
      });
      g.lines.forEach((l, i) => {
        const t = g.truth[i];
        if (!t || t.spurious) return;
        raw.push({
          line: { position: l.position, ...(band.source ? { source: band.source } : {}) },
          truth: {
            species: part.molecule.formula,
            band: t.band as string,
            branch: t.branch as 'P' | 'R',
            j: t.j as number,
          },
          strength: (l.intensity ?? 0) * part.abundance * (band.strength ?? 1),
        });
      });
    }
  }
  const max = Math.max(...raw.map((r) => r.strength));
  const u = uniformStream(o.seed * 7919 + 13);
  const kept = raw.filter((r) => r.strength >= o.detection * max && u() >= o.missing);
  const lines: ScanLine[] = [];
  const truth: (ScanTruth | undefined)[] = [];
  for (const r of kept) {
    lines.push({
      ...r.line,
      ...(o.withUncertainties ? { uncertainty: o.sigma } : {}),
      ...(o.withIntensities ? { intensity: r.strength / max } : {}),
    });
    truth.push(r.truth);
  }
  const lo = Math.min(...lines.map((l) => l.position));
  const hi = Math.max(...lines.map((l) => l.position));
  const n = Math.round(o.spurious * kept.length);
  const sources = [...new Set(kept.map((r) => r.line.source))];
  for (let i = 0; i < n; i++) {
    const s = sources[Math.floor(u() * sources.length)];
    lines.push({
      position: lo + (hi - lo) * u(),
      ...(o.withUncertainties ? { uncertainty: o.sigma } : {}),
      ...(o.withIntensities
        ? { intensity: (kept[Math.floor(u() * kept.length)] as { strength: number }).strength / max }
        : {}),
      ...(s ? { source: s } : {}),
    });
    truth.push(undefined);
  }
  const order = lines.map((l, i) => ({ l, t: truth[i] })).sort((a, b) => a.l.position - b.l.position);
  return { lines: order.map((x) => x.l), truth: order.map((x) => x.t) };
}

export interface Shares {
  readonly trueLines: number;
  readonly correct: number;
  readonly wrong: number;
  readonly unassigned: number;
  readonly spurious: number;
  readonly spuriousTaken: number;
  readonly misses: string[];
}

/** Compare the fitted assignments with the truth (a line counts as assigned only when fitted). */
export function shares(
  truth: readonly (ScanTruth | undefined)[],
  out: readonly { status: string; assignment?: { species: string; band: string; branch: string; j: number } }[],
): Shares {
  let correct = 0;
  let wrong = 0;
  let unassigned = 0;
  let spurious = 0;
  let spuriousTaken = 0;
  const misses: string[] = [];
  truth.forEach((t, i) => {
    const l = out[i];
    const a = l?.status === 'fitted' ? l.assignment : undefined;
    if (!t) {
      spurious++;
      if (a) spuriousTaken++;
      return;
    }
    if (!a) {
      unassigned++;
      misses.push(`${t.species} ${t.band} ${t.branch}(${t.j}) unassigned`);
    } else if (a.species === t.species && a.band === t.band && a.branch === t.branch && a.j === t.j) correct++;
    else {
      wrong++;
      misses.push(`${t.species} ${t.band} ${t.branch}(${t.j}) as ${a.species} ${a.band} ${a.branch}(${a.j})`);
    }
  });
  return { trueLines: truth.filter(Boolean).length, correct, wrong, unassigned, spurious, spuriousTaken, misses };
}

export const pct = (a: number, b: number) => (b > 0 ? `${((100 * a) / b).toFixed(1)} %` : '–');
export const describeShares = (s: Shares) =>
  `correct ${pct(s.correct, s.trueLines)}, wrong ${pct(s.wrong, s.trueLines)}, unassigned ${pct(s.unassigned, s.trueLines)}, spurious taken ${pct(s.spuriousTaken, s.spurious)} (${s.trueLines} true, ${s.spurious} spurious)`;

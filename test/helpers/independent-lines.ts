/**
 * An independent generator of diatomic line lists for tests. It shares nothing with `src/`: its own term values
 * (customary constants G(v), B_v, D_v, H_v written out term by term, not a Y_kl sum), its own J bookkeeping for
 * the P, Q and R branches and pure rotation, its own seeded random numbers (xoshiro128** seeded by splitmix32,
 * Gaussian deviates by Marsaglia's polar method), its own physical constants, and its own published constant sets
 * with the higher terms real molecules have (ω_e y_e, ω_e z_e, γ_e, β_e, H_e).
 *
 * Term value (Herzberg's customary expansion, equivalent to Dunham's with Y30 = ω_e y_e, Y21 = γ_e, Y12 = −β_e,
 * Y03 = H_e):
 *   E(v, J) = G(v) + B_v x − D_v x² + H_v x³ + L_v x⁴,  x = J(J+1),  u = v + ½
 *   G(v) = ω_e u − ω_e x_e u² + ω_e y_e u³ + ω_e z_e u⁴
 *   B_v = B_e − α_e u + γ_e u²,  D_v = D_e + β_e u,  H_v = H_e,  L_v = L_e (0 unless a test sets it)
 * Lines: R(J″) ends on J′ = J″ + 1, P(J″) on J′ = J″ − 1, Q(J″) on J′ = J″ (for the validator's sake only: a
 * ¹Σ–¹Σ band has none). Intensities: Boltzmann population of the lower level, Hönl–London factor (R: J″+1,
 * P: J″, Q: 2J″+1), the wavenumber and the stimulated-emission factor 1 − exp(−c₂ν/T).
 */

/** One customary constant with where its value comes from. */
export interface SourcedValue {
  readonly value: number;
  readonly source: string;
}

export interface CustomaryConstants {
  readonly omega_e: SourcedValue;
  readonly omega_e_x_e: SourcedValue;
  readonly omega_e_y_e: SourcedValue;
  readonly omega_e_z_e?: SourcedValue;
  readonly B_e: SourcedValue;
  readonly alpha_e: SourcedValue;
  readonly gamma_e: SourcedValue;
  readonly D_e: SourcedValue;
  readonly beta_e: SourcedValue;
  readonly H_e: SourcedValue;
  /** L_e (x⁴ term, L_v = L_e); absent means 0. */
  readonly L_e?: SourcedValue;
}

export interface MoleculeConstants {
  /** Species string as the service writes it, e.g. "12C-16O". */
  readonly formula: string;
  readonly constants: CustomaryConstants;
  readonly note?: string;
}

const HH = 'Huber & Herzberg (1979) via the NIST Chemistry WebBook';

/**
 * ¹²C¹⁶O X ¹Σ⁺. ω_e, ω_e x_e, B_e, α_e, D_e: Huber & Herzberg, from memory, corroborated by a secondary copy
 * (shared/REFERENCE-DATA.md §3). The higher terms are from memory and checked here against the rotational
 * constants of v = 0–3 of Gendriesch et al., A&A 497, 927 (2009), Table 2 (shared fixture): B_0 − B_1 − (B_1 − B_2)
 * = 0.0368 MHz gives γ_e ≈ 6e-7 cm⁻¹; D_1 − D_0 = −0.015 kHz gives β_e ≈ −5e-10 cm⁻¹; H_0 = 171.68 mHz gives
 * H_e ≈ 5.7e-12 cm⁻¹.
 */
export const CO_12_16: MoleculeConstants = {
  formula: '12C-16O',
  constants: {
    omega_e: { value: 2169.81358, source: `${HH}; from memory, corroborated by a secondary copy` },
    omega_e_x_e: { value: 13.28831, source: `${HH}; from memory, corroborated by a secondary copy` },
    omega_e_y_e: { value: 0.010511, source: `${HH}; from memory` },
    B_e: { value: 1.93128087, source: `${HH}; from memory, corroborated by a secondary copy` },
    alpha_e: { value: 0.01750441, source: `${HH}; from memory, corroborated by a secondary copy` },
    gamma_e: { value: 5.4868e-7, source: `${HH}; from memory (the v = 0–2 B_v of Gendriesch et al. 2009 give ≈ 6e-7)` },
    D_e: { value: 6.12147e-6, source: `${HH}; from memory, corroborated by a secondary copy` },
    beta_e: { value: -5.0e-10, source: 'from D_1 − D_0 of Gendriesch et al., A&A 497, 927 (2009), Table 2' },
    H_e: { value: 5.73e-12, source: 'from H_0 = 171.68 mHz of Gendriesch et al., A&A 497, 927 (2009), Table 2' },
  },
};

/**
 * ¹H³⁵Cl X ¹Σ⁺. ω_e, ω_e x_e, B_e, α_e, D_e: Huber & Herzberg, from memory, corroborated by a secondary copy;
 * ω_e y_e, ω_e z_e: Huber & Herzberg, from memory (ω_e z_e low confidence; with it G(1) − G(0) = 2885.977 cm⁻¹,
 * the measured band origin, also from memory). γ_e, β_e, H_e: from memory (magnitude and sign of the published
 * HCl values; the last digits are not vouched for).
 */
export const HCL_1_35: MoleculeConstants = {
  formula: '1H-35Cl',
  constants: {
    omega_e: { value: 2990.9463, source: `${HH}; from memory, corroborated by a secondary copy` },
    omega_e_x_e: { value: 52.8186, source: `${HH}; from memory, corroborated by a secondary copy` },
    omega_e_y_e: { value: 0.2243, source: `${HH}; from memory` },
    omega_e_z_e: { value: -0.0122, source: `${HH}; from memory, low confidence` },
    B_e: { value: 10.593416, source: `${HH}; from memory, corroborated by a secondary copy` },
    alpha_e: { value: 0.307181, source: `${HH}; from memory, corroborated by a secondary copy` },
    gamma_e: { value: 1.7e-3, source: 'from memory (published HCl γ_e is about +1.7e-3 cm-1)' },
    D_e: { value: 5.3194e-4, source: `${HH}; from memory, corroborated by a secondary copy` },
    beta_e: { value: -7.5e-6, source: 'from memory (published HCl β_e is about −7.5e-6 cm-1)' },
    H_e: { value: 1.66e-8, source: 'from memory (published HCl H_0 is about 1.66e-8 cm-1)' },
  },
};

/**
 * ¹H⁷⁹Br X ¹Σ⁺. Huber & Herzberg, from memory (ω_e, ω_e x_e, B_e, α_e corroborated by a secondary copy);
 * γ_e, β_e, H_e from memory (magnitude and sign only). As recalled, B_e and r_e pair with the reduced mass of
 * ¹H⁸¹Br (shared/REFERENCE-DATA.md §3): fine for generating data, not for a bond-length reference.
 */
export const HBR_1_79: MoleculeConstants = {
  formula: '1H-79Br',
  note: 'B_e as recalled may belong to 1H-81Br (3e-4 relative); use for generated data only',
  constants: {
    omega_e: { value: 2648.975, source: `${HH}; from memory, corroborated by a secondary copy` },
    omega_e_x_e: { value: 45.2175, source: `${HH}; from memory, corroborated by a secondary copy` },
    omega_e_y_e: { value: -0.0029, source: `${HH}; from memory, low confidence` },
    B_e: { value: 8.46488, source: `${HH}; from memory, corroborated by a secondary copy` },
    alpha_e: { value: 0.23328, source: `${HH}; from memory, corroborated by a secondary copy` },
    gamma_e: { value: 9.6e-4, source: 'from memory (published HBr γ_e is about +1e-3 cm-1)' },
    D_e: { value: 3.4584e-4, source: `${HH}; from memory` },
    beta_e: { value: -4.7e-6, source: 'from memory (published HBr β_e is about −5e-6 cm-1)' },
    H_e: { value: 8.0e-9, source: 'from memory (published HBr H_0 is about 8e-9 cm-1)' },
  },
};

/** Second radiation constant c₂ = hc/k in cm K (exact in the 2019 SI; CODATA 2018 value 1.438 776 877… cm K). */
const C2_CM_K = (6.62607015e-34 * 299792458) / 1.380649e-23 / 1e-2;

/** Term value E(v, J) in cm⁻¹ above the bottom of the well (no Y00). */
export function termValue(c: CustomaryConstants, v: number, j: number): number {
  const u = v + 0.5;
  const x = j * (j + 1);
  const g =
    c.omega_e.value * u -
    c.omega_e_x_e.value * u * u +
    c.omega_e_y_e.value * u * u * u +
    (c.omega_e_z_e?.value ?? 0) * u * u * u * u;
  const bv = c.B_e.value - c.alpha_e.value * u + c.gamma_e.value * u * u;
  const dv = c.D_e.value + c.beta_e.value * u;
  const hv = c.H_e.value;
  const lv = c.L_e?.value ?? 0;
  return g + bv * x - dv * x * x + hv * x * x * x + lv * x * x * x * x;
}

/** The rotational constants of level v (for checks against published B_v, D_v, H_v). */
export function levelConstants(c: CustomaryConstants, v: number): { B: number; D: number; H: number } {
  const u = v + 0.5;
  return {
    B: c.B_e.value - c.alpha_e.value * u + c.gamma_e.value * u * u,
    D: c.D_e.value + c.beta_e.value * u,
    H: c.H_e.value,
  };
}

export type GeneratedBranch = 'P' | 'Q' | 'R';

/** Upper-state J of a line labelled by its lower-state J (own bookkeeping). */
export function upperStateJ(branch: GeneratedBranch, lowerJ: number): number {
  if (branch === 'R') return lowerJ + 1;
  if (branch === 'P') return lowerJ - 1;
  return lowerJ;
}

/** Hönl–London factor of a ¹Σ–¹Σ line (R, P) or of a Q line of a perpendicular band, by lower-state J. */
export function honlLondon(branch: GeneratedBranch, lowerJ: number): number {
  if (branch === 'R') return lowerJ + 1;
  if (branch === 'P') return lowerJ;
  return 2 * lowerJ + 1;
}

/** Seeded uniform deviates in [0, 1): xoshiro128** with its state filled by splitmix32. */
export function uniformStream(seed: number): () => number {
  let s = seed >>> 0;
  const splitmix = () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  const st: [number, number, number, number] = [splitmix(), splitmix(), splitmix(), splitmix()];
  if ((st[0] | st[1] | st[2] | st[3]) === 0) st[0] = 1;
  const rotl = (x: number, k: number) => ((x << k) | (x >>> (32 - k))) >>> 0;
  return () => {
    const [a, b, c, d] = st;
    const result = Math.imul(rotl(Math.imul(b, 5) >>> 0, 7), 9) >>> 0;
    const t = (b << 9) >>> 0;
    const c2 = (c ^ a) >>> 0;
    const d2 = (d ^ b) >>> 0;
    st[1] = (b ^ c2) >>> 0;
    st[0] = (a ^ d2) >>> 0;
    st[2] = (c2 ^ t) >>> 0;
    st[3] = rotl(d2, 11);
    return result / 4294967296;
  };
}

/** Seeded standard normal deviates by Marsaglia's polar method (pairs, the second kept for the next call). */
export function gaussianStream(seed: number): () => number {
  return polarNormal(uniformStream(seed));
}

/** Standard normal deviates from a stream of uniform deviates in [0, 1), by Marsaglia's polar method. */
export function polarNormal(uniform: () => number): () => number {
  let spare: number | undefined;
  return () => {
    if (spare !== undefined) {
      const s = spare;
      spare = undefined;
      return s;
    }
    for (;;) {
      const a = 2 * uniform() - 1;
      const b = 2 * uniform() - 1;
      const r = a * a + b * b;
      if (r > 0 && r < 1) {
        const f = Math.sqrt((-2 * Math.log(r)) / r);
        spare = b * f;
        return a * f;
      }
    }
  };
}

export interface BandRequest {
  readonly upper: number;
  readonly lower: number;
  /** Highest lower-state J. */
  readonly jMax: number;
  /** Branches to generate; default R only for pure rotation (upper = lower), else P and R. */
  readonly branches?: readonly GeneratedBranch[];
  /** Lowest lower-state J; default 0 (P starts at 1 whatever this says, since P(0) does not exist). */
  readonly jMin?: number;
  /** A systematic shift added to every line of this band (an instrument offset), cm⁻¹. Default 0. */
  readonly offset?: number;
  /** Noise standard deviation of this band, cm⁻¹ (overrides the list's). */
  readonly sigma?: number;
}

export interface IndependentListOptions {
  readonly molecule: MoleculeConstants;
  /** Replace any constants of the molecule (e.g. γ_e = 0 to build a model that lacks a term). */
  readonly override?: Partial<Record<keyof CustomaryConstants, number>>;
  readonly bands: readonly BandRequest[];
  /** Gaussian noise standard deviation, cm⁻¹. Default 0. */
  readonly sigma?: number;
  readonly seed: number;
  /** Put `uncertainty` on every line (the true σ, times `reportedSigmaFactor`). Default true. */
  readonly withUncertainties?: boolean;
  /** Multiply the reported σ by this (0.1 = understated ten times). Default 1. */
  readonly reportedSigmaFactor?: number;
  /** Rotational temperature for intensities, K; intensities are omitted when absent. */
  readonly temperature?: number;
  /** Relative Gaussian noise on intensities. Default 0. */
  readonly intensityNoise?: number;
  /** Unassigned lines at uniform random positions over the span of the list. Default 0. */
  readonly spurious?: number;
  /** Leave the assignment off every line (for automatic assignment). Default false. */
  readonly unassigned?: boolean;
}

export interface GeneratedLine {
  readonly position: number;
  readonly uncertainty?: number;
  readonly intensity?: number;
  readonly assignment?: {
    readonly species: string;
    readonly band: { readonly upper: number; readonly lower: number };
    readonly branch: GeneratedBranch;
    readonly j: number;
    readonly source: 'given';
  };
}

export interface GeneratedTruth {
  /** Noise-free position including the band offset, cm⁻¹. */
  readonly exact: number;
  /** Lower-state energy above E(0, 0), cm⁻¹ (undefined for spurious lines). */
  readonly lowerEnergy?: number;
  readonly band?: string;
  readonly branch?: GeneratedBranch;
  readonly j?: number;
  readonly spurious: boolean;
}

export interface IndependentList {
  readonly lines: GeneratedLine[];
  /** The truth behind each line, in the same order. */
  readonly truth: GeneratedTruth[];
  readonly constants: CustomaryConstants;
}

/** The constants of a molecule with overrides applied. */
export function withOverrides(
  m: MoleculeConstants,
  override?: Partial<Record<keyof CustomaryConstants, number>>,
): CustomaryConstants {
  if (!override) return m.constants;
  const out: Record<string, SourcedValue> = { ...m.constants };
  for (const [k, value] of Object.entries(override)) {
    if (value !== undefined) out[k] = { value, source: 'overridden by the test' };
  }
  return out as unknown as CustomaryConstants;
}

/** Generate a line list from published constants with this module's own term values and bookkeeping. */
export function independentLines(o: IndependentListOptions): IndependentList {
  const c = withOverrides(o.molecule, o.override);
  const gauss = gaussianStream(o.seed);
  const uniform = uniformStream(o.seed ^ 0x5bd1e995);
  const withSigma = o.withUncertainties ?? true;
  const factor = o.reportedSigmaFactor ?? 1;
  const e00 = termValue(c, 0, 0);
  const lines: GeneratedLine[] = [];
  const truth: GeneratedTruth[] = [];
  for (const band of o.bands) {
    const branches = band.branches ?? (band.upper === band.lower ? ['R'] : ['P', 'R']);
    const sigma = band.sigma ?? o.sigma ?? 0;
    const label = `${band.upper}-${band.lower}`;
    for (const branch of branches) {
      for (let j = Math.max(band.jMin ?? 0, branch === 'P' ? 1 : 0); j <= band.jMax; j++) {
        const lower = termValue(c, band.lower, j);
        const nu = termValue(c, band.upper, upperStateJ(branch, j)) - lower + (band.offset ?? 0);
        const lowerEnergy = lower - e00;
        const line: {
          position: number;
          uncertainty?: number;
          intensity?: number;
          assignment?: GeneratedLine['assignment'];
        } = { position: nu + sigma * gauss() };
        if (withSigma && sigma > 0) line.uncertainty = sigma * factor;
        if (o.temperature !== undefined) {
          const t = o.temperature;
          const strength =
            honlLondon(branch, j) * nu * -Math.expm1((-C2_CM_K * nu) / t) * Math.exp((-C2_CM_K * lowerEnergy) / t);
          line.intensity = strength * (1 + (o.intensityNoise ?? 0) * gauss());
        }
        if (!o.unassigned) {
          line.assignment = {
            species: o.molecule.formula,
            band: { upper: band.upper, lower: band.lower },
            branch,
            j,
            source: 'given',
          };
        }
        lines.push(line);
        truth.push({ exact: nu, lowerEnergy, band: label, branch, j, spurious: false });
      }
    }
  }
  const spurious = o.spurious ?? 0;
  if (spurious > 0 && lines.length > 0) {
    const lo = Math.min(...truth.map((t) => t.exact));
    const hi = Math.max(...truth.map((t) => t.exact));
    const typicalSigma = o.sigma ?? 0;
    for (let i = 0; i < spurious; i++) {
      const position = lo + (hi - lo) * uniform();
      const line: { position: number; uncertainty?: number; intensity?: number } = { position };
      if (withSigma && typicalSigma > 0) line.uncertainty = typicalSigma * factor;
      if (o.temperature !== undefined) {
        const strongest = Math.max(...lines.map((l) => l.intensity ?? 0));
        line.intensity = strongest * 0.3 * uniform();
      }
      lines.push(line);
      truth.push({ exact: position, spurious: true });
    }
  }
  return { lines, truth, constants: c };
}

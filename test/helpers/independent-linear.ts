/**
 * An independent generator of line lists of LINEAR POLYATOMIC molecules for tests. It shares nothing with `src/`:
 * its own term values, its own J and parity bookkeeping, its own selection rules, its own nuclear-spin statistics,
 * its own Hönl–London factors, its own seeded random numbers and its own physical constant. Its constants are the
 * published (or published-and-refitted) sets of the shared reference note (shared/REFERENCE-DATA-LINEAR.md), with
 * the higher terms (H_v, parity-dependent D and H) real molecules have; each set says where it comes from.
 *
 * Levels. A vibrational level carries its mode quanta `v`, its vibrational angular momentum l and its rotational
 * terms in one of two forms:
 *   - 'per-parity': E_p(J) = G_p + B_p x − D_p x² + H_p x³ with x = J(J+1), one series for e and one for f.
 *     This is the form of the reference note's refits of database level energies; G of a Π level is then the
 *     usual band centre (no B l² in it).
 *   - 'l-squared': E_p(J) = G + B y − D y² + H y³ ∓ ½ (q x + q_J x²) with y = x − l², the lower sign for e and
 *     the upper for f (f above e when q > 0, as in the database labels the note examined: B_f > B_e for 01¹0 of
 *     HCN, OCS, N2O). G is then G_v of the B[J(J+1) − l²] form.
 * J starts at l. A Σ⁺ level has only e components, a level with l ≥ 1 has e and f.
 *
 * Parity: an e level has total parity (−1)^J, an f level −(−1)^J. Electric-dipole lines change parity, so
 * P and R (ΔJ = ∓1) join e↔e and f↔f, Q (ΔJ = 0) joins e↔f. Q lines exist only when l″ ≥ 1 or l′ ≥ 1; |Δl| ≤ 1.
 *
 * Nuclear-spin statistics (centrosymmetric chains: 16O-12C-16O, 1H-12C-12C-1H). A rovibronic level is symmetric (s)
 * under exchange of the identical nuclei when its parity is + in a g vibrational state or − in a u state, otherwise
 * antisymmetric (a) (Herzberg's rule for the inversion-symmetric case). The statistical weight of s and a levels is
 * a property of the molecule: 16O has I = 0 (bosons): s levels weight 1, a levels do not exist; 1H has I = 1/2
 * (fermions; 12C I = 0 does not alter it): s levels weight 1 (para), a levels weight 3 (ortho). g/u of a vibrational
 * level is the parity of the number of quanta in the u modes (CO2: ν2 π_u, ν3 σ_u⁺; C2H2: ν3 σ_u⁺, ν5 π_u).
 *
 * Hönl–London factors (standard formulas for a linear molecule, with |l| in place of Λ; normalised so that the
 * branches of one lower J″ sum to 2J″+1):
 *   Δl = 0:  R (J″+1+l″)(J″+1−l″)/(J″+1),  Q (2J″+1) l″²/(J″(J″+1)),  P (J″+l″)(J″−l″)/J″
 *   Δl = +1: R (J″+l″+1)(J″+l″+2)/(2(J″+1)),  Q (J″+l″+1)(J″−l″)(2J″+1)/(2J″(J″+1)),  P (J″−l″−1)(J″−l″)/(2J″)
 *   Δl = −1: R (J″−l″+1)(J″−l″+2)/(2(J″+1)),  Q (J″−l″+1)(J″+l″)(2J″+1)/(2J″(J″+1)),  P (J″+l″−1)(J″+l″)/(2J″)
 * When both levels have l ≥ 1 a branch is made by two parity components (e–e and f–f, or e–f and f–e) and each
 * carries half of the factor.
 * Intensity of a line: g_ns(lower) × S × exp(−c₂E″/T) × ν × (1 − exp(−c₂ν/T)), E″ the absolute lower term value
 * (vibrational plus rotational, from the ground level's J = 0), normalised to the strongest line of the list.
 */

import { polarNormal } from './independent-lines.js';

/** Second radiation constant c₂ = hc/k in cm K (CODATA 2018, exact h, c, k), written out here on purpose. */
const C2_CM_K = 1.438776877;

export type GenParity = 'e' | 'f';
export type GenBranch = 'P' | 'Q' | 'R';

export interface PowerSeries {
  readonly G: number;
  readonly B: number;
  readonly D: number;
  readonly H?: number;
}

export type GenTerms =
  | { readonly form: 'per-parity'; readonly e: PowerSeries; readonly f?: PowerSeries }
  | {
      readonly form: 'l-squared';
      readonly G: number;
      readonly B: number;
      readonly D: number;
      readonly H?: number;
      readonly q?: number;
      readonly qJ?: number;
    };

export interface GenLevel {
  /** Label in the trade's notation, e.g. "00011" (CO2, v1 v2 l v3 r) or "0110". */
  readonly label: string;
  readonly v: readonly number[];
  readonly l: number;
  readonly terms: GenTerms;
  readonly source: string;
}

export type SpinRule =
  | { readonly kind: 'none' }
  /** Centrosymmetric chain: weights of s and a levels, and which modes are u. */
  | {
      readonly kind: 'exchange';
      readonly symmetric: number;
      readonly antisymmetric: number;
      readonly uModes: readonly number[];
    };

export interface GenMolecule {
  /** Hyphenated chain as the service writes it, e.g. "16O-12C-16O". */
  readonly formula: string;
  readonly spin: SpinRule;
  readonly levels: Readonly<Record<string, GenLevel>>;
}

// ——— term values ————————————————————————————————————————————————————————————————————————————————

/** Term value of one parity component of a level at J (cm⁻¹), or NaN when J < l or the component does not exist. */
export function genTerm(level: GenLevel, J: number, parity: GenParity): number {
  if (J < level.l) return Number.NaN;
  if (level.l === 0 && parity === 'f') return Number.NaN;
  const x = J * (J + 1);
  const t = level.terms;
  if (t.form === 'per-parity') {
    const s = parity === 'e' ? t.e : t.f;
    if (!s) return Number.NaN;
    return s.G + s.B * x - s.D * x * x + (s.H ?? 0) * x * x * x;
  }
  const y = x - level.l * level.l;
  const base = t.G + t.B * y - t.D * y * y + (t.H ?? 0) * y * y * y;
  if (level.l === 0) return base;
  const split = (t.q ?? 0) * x + (t.qJ ?? 0) * x * x;
  return parity === 'e' ? base - split / 2 : base + split / 2;
}

/** Nuclear-spin statistical weight of a level component (0 when the level does not exist). */
export function genSpinWeight(mol: GenMolecule, level: GenLevel, J: number, parity: GenParity): number {
  const rule = mol.spin;
  if (rule.kind === 'none') return 1;
  let uQuanta = 0;
  for (const m of rule.uModes) uQuanta += level.v[m - 1] ?? 0;
  const gerade = uQuanta % 2 === 0;
  const plus = parity === 'e' ? J % 2 === 0 : J % 2 === 1;
  const symmetric = plus === gerade;
  return symmetric ? rule.symmetric : rule.antisymmetric;
}

/** Hönl–London factor for lower |l″|, upper |l′| and lower J″ (0 where the line does not exist). */
export function genHonlLondon(branch: GenBranch, lLow: number, lUp: number, J: number): number {
  const d = lUp - lLow;
  const l = lLow;
  let s: number;
  if (d === 0) {
    if (branch === 'R') s = ((J + 1 + l) * (J + 1 - l)) / (J + 1);
    else if (branch === 'P') s = J === 0 ? 0 : ((J + l) * (J - l)) / J;
    else s = J === 0 ? 0 : ((2 * J + 1) * l * l) / (J * (J + 1));
  } else if (d === 1) {
    if (branch === 'R') s = ((J + l + 1) * (J + l + 2)) / (2 * (J + 1));
    else if (branch === 'P') s = J === 0 ? 0 : ((J - l - 1) * (J - l)) / (2 * J);
    else s = J === 0 ? 0 : ((J + l + 1) * (J - l) * (2 * J + 1)) / (2 * J * (J + 1));
  } else if (d === -1) {
    if (branch === 'R') s = ((J - l + 1) * (J - l + 2)) / (2 * (J + 1));
    else if (branch === 'P') s = J === 0 ? 0 : ((J + l - 1) * (J + l)) / (2 * J);
    else s = J === 0 ? 0 : ((J - l + 1) * (J + l) * (2 * J + 1)) / (2 * J * (J + 1));
  } else s = 0;
  return Math.max(0, s);
}

// ——— random numbers (own: sfc32 seeded by a hash of the seed; Marsaglia's polar method) ————————————————

export function genUniform(seed: number): () => number {
  let a = 0x9e3779b9 ^ seed;
  let b = 0x243f6a88 + seed * 7919;
  let c = 0xb7e15162 ^ (seed << 13);
  let d = 1;
  const next = (): number => {
    a >>>= 0;
    b >>>= 0;
    c >>>= 0;
    d >>>= 0;
    const t = (a + b + d) | 0;
    d = (d + 1) | 0;
    a = b ^ (b >>> 9);
    b = (c + (c << 3)) | 0;
    c = (c << 21) | (c >>> 11);
    c = (c + t) | 0;
    return (t >>> 0) / 4294967296;
  };
  for (let i = 0; i < 16; i++) next();
  return next;
}

export function genGaussian(seed: number): () => number {
  return polarNormal(genUniform(seed));
}

// ——— lines ——————————————————————————————————————————————————————————————————————————————————————

export interface GenLine {
  /** Observed position (true position + offset + noise), cm⁻¹. */
  readonly position: number;
  /** Reported 1σ uncertainty, when the list carries one. */
  readonly uncertainty?: number;
  readonly intensity: number;
  /** 'line' for a real line of the band, 'spurious' for a noise peak or a line of another gas. */
  readonly kind: 'line' | 'spurious';
  /** Assignment (absent for spurious lines). */
  readonly band?: string;
  readonly upper?: { readonly v: readonly number[]; readonly l: number };
  readonly lower?: { readonly v: readonly number[]; readonly l: number };
  readonly branch?: GenBranch;
  /** J″. */
  readonly j?: number;
  readonly jUpper?: number;
  readonly lowerParity?: GenParity;
  readonly upperParity?: GenParity;
  /** Absolute lower term value E″ (cm⁻¹). */
  readonly lowerEnergy?: number;
  readonly truePosition?: number;
  /** Hönl–London factor of this component and nuclear-spin weight of its lower level. */
  readonly honlLondon?: number;
  readonly spinWeight?: number;
}

export interface GenBandRequest {
  readonly upper: string;
  readonly lower: string;
}

export interface GenOptions {
  readonly molecule: GenMolecule;
  readonly bands: readonly GenBandRequest[];
  /** Highest J″ (default 40). */
  readonly jMax?: number;
  /** Temperature for intensities (K, default 296). */
  readonly temperature?: number;
  /** Gaussian noise on positions, 1σ (cm⁻¹, default 0). */
  readonly sigma?: number;
  /** Whether lines carry `uncertainty` = sigma (default true when sigma > 0). */
  readonly reportUncertainty?: boolean;
  /** Constant wavenumber offset added to every line (cm⁻¹, default 0): a miscalibrated instrument. */
  readonly offset?: number;
  /** Fraction of real lines removed at random (default 0). */
  readonly missingFraction?: number;
  /** Number of spurious lines spread uniformly over the list's range (default 0). */
  readonly spurious?: number;
  /** Drop lines weaker than this fraction of the strongest (default 0). */
  readonly minRelativeIntensity?: number;
  readonly seed?: number;
}

/** Every allowed line of one band (no noise), with its bookkeeping. */
export function genBandLines(mol: GenMolecule, req: GenBandRequest, jMax: number, T: number): GenLine[] {
  const up = mol.levels[req.upper];
  const lo = mol.levels[req.lower];
  if (!up || !lo) throw new Error(`unknown level ${req.upper} or ${req.lower} of ${mol.formula}`);
  if (Math.abs(up.l - lo.l) > 1) return [];
  const parities: GenParity[] = ['e', 'f'];
  const components = up.l >= 1 && lo.l >= 1 ? 2 : 1;
  const out: GenLine[] = [];
  for (let J = lo.l; J <= jMax; J++) {
    for (const pLow of parities) {
      const eLow = genTerm(lo, J, pLow);
      if (Number.isNaN(eLow)) continue;
      const gLow = genSpinWeight(mol, lo, J, pLow);
      if (gLow === 0) continue;
      for (const branch of ['P', 'Q', 'R'] as const) {
        if (branch === 'Q' && up.l === 0 && lo.l === 0) continue;
        const Jup = branch === 'P' ? J - 1 : branch === 'R' ? J + 1 : J;
        const pUp: GenParity = branch === 'Q' ? (pLow === 'e' ? 'f' : 'e') : pLow;
        const eUp = genTerm(up, Jup, pUp);
        if (Number.isNaN(eUp)) continue;
        if (genSpinWeight(mol, up, Jup, pUp) === 0) continue;
        const hl = genHonlLondon(branch, lo.l, up.l, J) / components;
        if (hl <= 0) continue;
        const nu = eUp - eLow;
        const intensity =
          gLow * hl * Math.exp((-C2_CM_K * eLow) / T) * Math.abs(nu) * -Math.expm1((-C2_CM_K * Math.abs(nu)) / T);
        out.push({
          position: nu,
          intensity,
          kind: 'line',
          band: `${up.label}-${lo.label}`,
          upper: { v: up.v, l: up.l },
          lower: { v: lo.v, l: lo.l },
          branch,
          j: J,
          jUpper: Jup,
          lowerParity: pLow,
          upperParity: pUp,
          lowerEnergy: eLow,
          truePosition: nu,
          honlLondon: hl,
          spinWeight: gLow,
        });
      }
    }
  }
  return out;
}

/** A line list from one or more bands: noise, offset, missing and spurious lines, relative intensities. */
export function genLineList(o: GenOptions): GenLine[] {
  const T = o.temperature ?? 296;
  const jMax = o.jMax ?? 40;
  const sigma = o.sigma ?? 0;
  const report = o.reportUncertainty ?? sigma > 0;
  const seed = o.seed ?? 1;
  const gauss = genGaussian(seed);
  const uni = genUniform(seed + 104729);
  let lines = o.bands.flatMap((b) => genBandLines(o.molecule, b, jMax, T));
  const strongest = Math.max(...lines.map((l) => l.intensity));
  lines = lines
    .map((l) => ({ ...l, intensity: l.intensity / strongest }))
    .filter((l) => l.intensity >= (o.minRelativeIntensity ?? 0));
  if (o.missingFraction) lines = lines.filter(() => uni() >= (o.missingFraction as number));
  const noisy: GenLine[] = lines.map((l) => ({
    ...l,
    position: (l.truePosition as number) + (o.offset ?? 0) + sigma * gauss(),
    ...(report ? { uncertainty: sigma } : {}),
  }));
  const n = o.spurious ?? 0;
  if (n > 0 && noisy.length > 0) {
    const lo = Math.min(...noisy.map((l) => l.position));
    const hi = Math.max(...noisy.map((l) => l.position));
    for (let i = 0; i < n; i++) {
      noisy.push({
        position: lo + (hi - lo) * uni(),
        intensity: 0.05 + 0.5 * uni(),
        kind: 'spurious',
        ...(report ? { uncertainty: sigma } : {}),
      });
    }
  }
  return noisy.sort((a, b) => a.position - b.position);
}

/** The list as an instrument gives it: positions (with uncertainty when carried) and intensities, no assignment. */
export function genUnassigned(
  lines: readonly GenLine[],
): { position: number; uncertainty?: number; intensity: number }[] {
  return lines.map((l) => ({
    position: l.position,
    intensity: l.intensity,
    ...(l.uncertainty !== undefined ? { uncertainty: l.uncertainty } : {}),
  }));
}

/** Level of a molecule by label, with a clear failure. */
export function genLevel(mol: GenMolecule, label: string): GenLevel {
  const l = mol.levels[label];
  if (!l) throw new Error(`no level ${label} in ${mol.formula}`);
  return l;
}

// ——— published constant sets ———————————————————————————————————————————————————————————————————————

const NOTE = 'shared/REFERENCE-DATA-LINEAR.md';
const RY = `L. S. Rothman and L. D. G. Young, JQSRT 25, 505 (1981), read in a secondary copy (${NOTE} §1.1, RY1981)`;
const HITRAN_REFIT = (what: string) =>
  `least-squares refit of HITRAN level energies (${what}) in ${NOTE}, status derived; HITRAN positions are computed from global fits`;

/**
 * 12C16O2 (626). Σ levels from Rothman & Young (1981): G_v, B_v, D_v, H_v. 01¹0: G, B, D, H from Rothman & Young
 * taken as e-component values (the note shows R&Y's Π-state B equals the HITRAN e value); q = 6.2e-4 cm⁻¹ is
 * RECALLED (low confidence, not found in a stored source), so f = e + q x.
 * Modes [v1, v2, v3]; u modes ν2, ν3. 16O: I = 0.
 */
export const CO2_626: GenMolecule = {
  formula: '16O-12C-16O',
  spin: { kind: 'exchange', symmetric: 1, antisymmetric: 0, uModes: [2, 3] },
  levels: {
    '00001': {
      label: '00001',
      v: [0, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 0, B: 0.39021894, D: 1.33373e-7, H: 1.6e-14 } },
      source: RY,
    },
    '01101': {
      label: '01101',
      v: [0, 1, 0],
      l: 1,
      terms: {
        form: 'per-parity',
        e: { G: 667.379, B: 0.3906423, D: 1.359e-7, H: 1.7e-14 },
        f: { G: 667.379, B: 0.3906423 + 6.2e-4, D: 1.359e-7, H: 1.7e-14 },
      },
      source: `${RY}; q = 6.2e-4 cm-1 recalled (low confidence)`,
    },
    '10002': {
      label: '10002',
      v: [0, 2, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 1285.4087, B: 0.3904823, D: 1.57161e-7, H: 2.33e-13 } },
      source: RY,
    },
    '10001': {
      label: '10001',
      v: [1, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 1388.1847, B: 0.39018893, D: 1.14952e-7, H: 1.91e-13 } },
      source: RY,
    },
    '00011': {
      label: '00011',
      v: [0, 0, 1],
      l: 0,
      terms: { form: 'per-parity', e: { G: 2349.1433, B: 0.3871414, D: 1.33034e-7, H: 1.7e-14 } },
      source: RY,
    },
  },
};

/**
 * 16O12C18O (628): no exchange symmetry, every J present. Ground state and 01¹0 e/f from the note's refits
 * (pure-rotation lines; HITRAN level energies); 00011 from a noisier energy set (rms 2e-3 cm⁻¹).
 */
export const CO2_628: GenMolecule = {
  formula: '16O-12C-18O',
  spin: { kind: 'none' },
  levels: {
    '00001': {
      label: '00001',
      v: [0, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 0, B: 0.368184579, D: 1.187580471e-7, H: 1.160908505e-14 } },
      source: HITRAN_REFIT('68 pure-rotation R lines'),
    },
    '01101': {
      label: '01101',
      v: [0, 1, 0],
      l: 1,
      terms: {
        form: 'per-parity',
        e: { G: 662.4430089, B: 0.3685974351, D: 1.205562378e-7, H: 2.675637489e-14 },
        f: { G: 662.4430089, B: 0.3691496143, D: 1.211477356e-7, H: 1.14908083e-14 },
      },
      source: `${HITRAN_REFIT('01101 e and f')}; common G (the e/f G differ by 1.6e-3 cm-1 in the refits, within their noise)`,
    },
    '00011': {
      label: '00011',
      v: [0, 0, 1],
      l: 0,
      terms: { form: 'per-parity', e: { G: 2332.12207, B: 0.3652888665, D: 1.238490228e-7, H: 1.407540751e-12 } },
      source: HITRAN_REFIT('00011, rms 2e-3 cm-1'),
    },
  },
};

/**
 * 14N2 16O. Ground state: the note's refit of the HITRAN pure-rotation lines as one set (B0, D0, H0 together; the
 * NIST Triatomic D0 = 5.2808 kHz with H0 ≈ 0 reproduces the same lines within 1.1e-4 cm⁻¹ up to R(40), this set
 * within 3e-7; at J = 70 the two sets differ by ≈ 0.1 cm⁻¹ — a real disagreement between sources, kept here so that
 * the library (NIST) and this generator do not share a model).
 * ν3 (N–N stretch, HITRAN label 0001, NIST (1,0,0)): G from Bohlin et al. (secondary copy), B and D from NIST
 * (12458.1706 MHz, 5.17 kHz). ν1 (1000): G Bohlin, B and D NIST (12508.9923 MHz, 5.1726 kHz).
 * 01¹0: G Bohlin (588.76787); B of the components from NIST (c 12566.6411, d 12590.3906 MHz; e = c, f = d),
 * D NIST (5.3539, 5.4002 kHz).
 */
const MHZ = 29979.2458;
export const N2O_446: GenMolecule = {
  formula: '14N-14N-16O',
  spin: { kind: 'none' },
  levels: {
    '0000': {
      label: '0000',
      v: [0, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 0, B: 0.4190112978, D: 1.794983469e-7, H: 1.169721569e-12 } },
      source: HITRAN_REFIT(
        '54 pure-rotation R lines, HITRAN code 0, unweighted; D0 and H0 differ from the NIST values (1.7615e-7, ≈0) by strongly correlated amounts',
      ),
    },
    '0110': {
      label: '0110',
      v: [0, 1, 0],
      l: 1,
      terms: {
        form: 'per-parity',
        e: { G: 588.76787, B: 12566.6411 / MHZ, D: 5.3539e-3 / MHZ },
        f: { G: 588.76787, B: 12590.3906 / MHZ, D: 5.4002e-3 / MHZ },
      },
      source: `G: Bohlin et al. (secondary copy); B, D: NIST Triatomic Spectral Database c/d components (${NOTE} §1.4)`,
    },
    '1000': {
      label: '1000',
      v: [1, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 1284.90334, B: 12508.9923 / MHZ, D: 5.1726e-3 / MHZ } },
      source: `G: Bohlin et al. (secondary copy); B, D: NIST Triatomic Spectral Database (${NOTE} §1.4)`,
    },
    '0001': {
      label: '0001',
      v: [0, 0, 1],
      l: 0,
      terms: { form: 'per-parity', e: { G: 2223.75676, B: 12458.1706 / MHZ, D: 5.17e-3 / MHZ } },
      source: `G: Bohlin et al. (secondary copy); B, D: NIST Triatomic Spectral Database (${NOTE} §1.4)`,
    },
  },
};

/** 16O12C32S: the note's refits (ground state from 99 HITRAN pure-rotation lines; 1000 and 01¹0 e/f energies). */
export const OCS_622: GenMolecule = {
  formula: '16O-12C-32S',
  spin: { kind: 'none' },
  levels: {
    '0000': {
      label: '0000',
      v: [0, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 0, B: 0.2028567424, D: 4.341088657e-8, H: -2.995842839e-15 } },
      source: HITRAN_REFIT('99 pure-rotation R lines'),
    },
    '0110': {
      label: '0110',
      v: [0, 1, 0],
      l: 1,
      terms: {
        form: 'per-parity',
        e: { G: 520.4221066, B: 0.2031038244, D: 4.404089114e-8, H: -2.997602166e-15 },
        f: { G: 520.4220957, B: 0.2033160376, D: 4.419307876e-8, H: -1.33226763e-15 },
      },
      source: HITRAN_REFIT('0110 e and f'),
    },
    '1000': {
      label: '1000',
      v: [1, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 858.9669714, B: 0.2022518269, D: 4.43417588e-8, H: 1.276756478e-15 } },
      source: HITRAN_REFIT('1000'),
    },
  },
};

/**
 * H12C14N: the note's refits. Modes in CDMS/HITRAN numbering: ν1 C–H stretch (3311 cm⁻¹), ν2 bend, ν3 C–N stretch
 * (2097 cm⁻¹). 01¹0 e and f share one G (their refitted G differ by 1e-5 cm⁻¹, far inside the 7.6e-5 fit σ).
 */
export const HCN_H12C14N: GenMolecule = {
  formula: '1H-12C-14N',
  spin: { kind: 'none' },
  levels: {
    '0000': {
      label: '0000',
      v: [0, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 0, B: 1.478221814, D: 2.909254459e-6, H: 2.898393156e-12 } },
      source: HITRAN_REFIT('59 pure-rotation R lines; agrees with CDMS J=1-0 within 1 kHz'),
    },
    '0110': {
      label: '0110',
      v: [0, 1, 0],
      l: 1,
      terms: {
        form: 'per-parity',
        e: { G: 711.9795491, B: 1.478034789, D: 2.931952336e-6, H: 2.737587934e-12 },
        f: { G: 711.9795491, B: 1.485522349, D: 3.020421432e-6, H: 4.028555267e-12 },
      },
      source: HITRAN_REFIT('0110 e and f'),
    },
    '0001': {
      label: '0001',
      v: [0, 0, 1],
      l: 0,
      terms: { form: 'per-parity', e: { G: 2096.845578, B: 1.468142818, D: 2.916554402e-6, H: 3.13904458e-12 } },
      source: HITRAN_REFIT('0001'),
    },
    '1000': {
      label: '1000',
      v: [1, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 3311.477097, B: 1.467798366, D: 2.885310761e-6, H: 3.354649891e-12 } },
      source: HITRAN_REFIT('1000'),
    },
  },
};

/** H13C14N ground state (refit of pure-rotation lines) and the 1.5 µm C–H overtone level (refit of SRM 2519a). */
export const HCN_H13C14N: GenMolecule = {
  formula: '1H-13C-14N',
  spin: { kind: 'none' },
  levels: {
    '0000': {
      label: '0000',
      v: [0, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 0, B: 1.440000474, D: 2.768253963e-6, H: 2.619186209e-12 } },
      source: HITRAN_REFIT('50 pure-rotation R lines'),
    },
    '2000': {
      label: '2000',
      v: [2, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 6483.282356, B: 1.420455139, D: 2.722106694e-6 } },
      source: `refit of the 54 NIST SRM 2519a line centres with the ground state fixed (${NOTE} §1.7, derived; rms 1.2e-3 cm-1)`,
    },
  },
};

/**
 * 12C2H2, modes [v1..v5] (ν1 σg⁺ C–H sym. stretch, ν2 σg⁺ C≡C, ν3 σu⁺ C–H antisym. stretch, ν4 πg, ν5 πu).
 * Ground state: B0 = 1.1766462, D0 = 1.627e-6 cm⁻¹ RECALLED (the note marks them so); a free fit of the 27 stored
 * NIST SRM 2517a line centres of ν1+ν3 (this project's fit, see test/fixtures/linear/SOURCE.md) gives
 * B0 = 1.176652(6), consistent with the recalled value. ν1+ν3 (10100): derived here from SRM 2517a with the ground
 * state fixed: G = 6556.46432, B = 1.1637771, D = 1.6066e-6. ν3 (00100): G = 3294.84 (recalled), B = 1.17085 and
 * D = 1.62e-6 RECALLED, low confidence (the real ν3 is perturbed by a Fermi resonance; this is an unperturbed model).
 * 1H: I = 1/2; u modes ν3, ν5.
 */
export const C2H2_1221: GenMolecule = {
  formula: '1H-12C-12C-1H',
  spin: { kind: 'exchange', symmetric: 1, antisymmetric: 3, uModes: [3, 5] },
  levels: {
    '00000': {
      label: '00000',
      v: [0, 0, 0, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 0, B: 1.1766462, D: 1.627e-6 } },
      source: 'recalled (low confidence); corroborated by a free fit of the SRM 2517a centres (B0 = 1.176652(6))',
    },
    '00100': {
      label: '00100',
      v: [0, 0, 1, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 3294.84, B: 1.17085, D: 1.62e-6 } },
      source: 'recalled, low confidence (unperturbed model of a Fermi-perturbed level)',
    },
    '10100': {
      label: '10100',
      v: [1, 0, 1, 0, 0],
      l: 0,
      terms: { form: 'per-parity', e: { G: 6556.46432, B: 1.1637771, D: 1.6066e-6 } },
      source: 'derived: fit of 27 NIST SRM 2517a line centres (secondary copy) with the ground state fixed',
    },
  },
};

/** A Π level in the 'l-squared' form made from a Σ-like level, for round trips with an exact l-doubling model. */
export function genPiLevel(
  label: string,
  v: readonly number[],
  G: number,
  B: number,
  D: number,
  H: number,
  q: number,
  source: string,
): GenLevel {
  return { label, v, l: 1, terms: { form: 'l-squared', G, B, D, H, q }, source };
}

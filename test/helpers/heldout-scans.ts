import { CO_DATABASE } from './co-database.js';
import { MASS } from './scan-scenarios.js';

/**
 * Held-out scans: unassigned peak lists of the library's diatomics as an instrument would report them, built here
 * from published constants and nothing of `src/` (no level model, no library constants, no masses or abundances
 * from the project). What a real list holds and the project's other generators do not all carry together:
 * - term values from Dunham coefficients Y_kl up to the H and L terms (E(v, J) = Σ Y_kl (v + ½)^k [J(J + 1)]^l);
 * - every isotopologue at its natural abundance (H³⁵Cl/H³⁷Cl, H⁷⁹Br/H⁸¹Br, ¹³CO, C¹⁸O, C¹⁷O), its Y_kl scaled by
 *   ρ^(k + 2l), ρ = √(μ/μᵢ) (Dunham's first-order isotope relation);
 * - for ¹²C¹⁶O the real database positions of 1-0, 2-1, 2-0 and 3-0 (test/fixtures/co-database-lines, HITRAN2020),
 *   the Y_kl for every other band;
 * - intensities from the Boltzmann population of the lower level (partition function summed over the levels) ×
 *   Hönl–London factor (R: J″ + 1, P: J″) × a Herman–Wallis factor (1 + C m)² × the band strength × the
 *   wavenumber and stimulated-emission factor; hot bands scaled from their cold band by the harmonic factor;
 * - a detection limit per spectral window, position noise growing for weak lines, lines lost at random, peaks
 *   closer than the resolution merged into one (intensity-weighted), spurious peaks, an instrument offset, and a
 *   second instrument with its own offset and noise.
 * Truth per peak: every transition under it (two for a blend, none for a spurious peak) and whether a person would
 * assign it without doubt (one transition, 5× above the detection limit, of an isotopologue at ≥ 1e-3 abundance).
 */

/** One Dunham coefficient with where its value comes from. */
interface Coefficient {
  readonly k: number;
  readonly l: number;
  readonly value: number;
  readonly source: string;
}

interface MoleculeSet {
  /** Atoms of the parent isotopologue, e.g. ['12C', '16O']. */
  readonly parent: readonly [string, string];
  readonly y: readonly Coefficient[];
  /** Band strength of Δv = 1, 2, 3 relative to the fundamental (cold bands). */
  readonly strength: readonly [number, number, number];
  /** Herman–Wallis C of Δv = 1, 2, 3: F = (1 + C m)², m = J″ + 1 (R), −J″ (P). */
  readonly hermanWallis: readonly [number, number, number];
  /** Isotopes of each atom present in nature. */
  readonly isotopes: readonly [readonly string[], readonly string[]];
}

const MEM = 'from memory';

/**
 * ¹²C¹⁶O. Y10, Y20, Y01, Y11, Y02: Huber & Herzberg (1979) as tabulated in the NIST Chemistry WebBook, from
 * memory; Y30, Y21, Y12, Y03 from memory of the Dunham fits to the infrared bands (Farrenq et al., J. Mol.
 * Spectrosc. 149, 375 (1991)), last digits not vouched for; Y40, Y04 from memory, magnitude only. The generator's
 * test holds them against the real database lines. Band strengths: ratios of the HITRAN2020 band sums, from memory
 * (2-0/1-0 ≈ 7.5e-3, 3-0/1-0 ≈ 6e-5). Herman–Wallis: magnitude from memory.
 */
const CO: MoleculeSet = {
  parent: ['12C', '16O'],
  y: [
    { k: 1, l: 0, value: 2169.81358, source: `Huber & Herzberg ω_e, ${MEM}` },
    { k: 2, l: 0, value: -13.28831, source: `Huber & Herzberg −ω_e x_e, ${MEM}` },
    { k: 3, l: 0, value: 0.010511, source: `Huber & Herzberg ω_e y_e, ${MEM}` },
    { k: 4, l: 0, value: 5.7e-5, source: `${MEM}, magnitude only` },
    { k: 0, l: 1, value: 1.93128087, source: `Huber & Herzberg B_e, ${MEM}` },
    { k: 1, l: 1, value: -0.01750441, source: `Huber & Herzberg −α_e, ${MEM}` },
    { k: 2, l: 1, value: 5.49e-7, source: `γ_e, ${MEM}` },
    { k: 0, l: 2, value: -6.12147e-6, source: `Huber & Herzberg −D_e, ${MEM}` },
    { k: 1, l: 2, value: 1.0e-9, source: `−β_e, ${MEM}, magnitude only` },
    { k: 0, l: 3, value: 5.7e-12, source: `H_e, ${MEM}` },
    { k: 0, l: 4, value: -2.0e-17, source: `L_e, ${MEM}, magnitude only` },
  ],
  strength: [1, 7.5e-3, 6e-5],
  hermanWallis: [2e-4, 5e-3, 1e-2],
  isotopes: [
    ['12C', '13C'],
    ['16O', '17O', '18O'],
  ],
};

/**
 * H³⁵Cl. Y10–Y40, Y01, Y11, Y02: Huber & Herzberg, from memory (they give the 1-0 origin 2885.977 cm⁻¹, also from
 * memory); Y21, Y12, Y03, Y04: from memory of the published Dunham fits (Coxon & Roundy, Parekunnel et al.),
 * magnitude and sign, last digits not vouched for. Band strengths: HITRAN line-strength ratios from memory
 * (2-0/1-0 ≈ 2.5e-2, 3-0/1-0 ≈ 4e-4). Herman–Wallis: order of magnitude from memory.
 */
const HCL: MoleculeSet = {
  parent: ['1H', '35Cl'],
  y: [
    { k: 1, l: 0, value: 2990.9463, source: `Huber & Herzberg ω_e, ${MEM}` },
    { k: 2, l: 0, value: -52.8186, source: `Huber & Herzberg −ω_e x_e, ${MEM}` },
    { k: 3, l: 0, value: 0.2243, source: `Huber & Herzberg ω_e y_e, ${MEM}` },
    { k: 4, l: 0, value: -0.0122, source: `Huber & Herzberg ω_e z_e, ${MEM}` },
    { k: 0, l: 1, value: 10.593416, source: `Huber & Herzberg B_e, ${MEM}` },
    { k: 1, l: 1, value: -0.307181, source: `Huber & Herzberg −α_e, ${MEM}` },
    { k: 2, l: 1, value: 1.7e-3, source: `γ_e, ${MEM}` },
    { k: 3, l: 1, value: -1.2e-5, source: `${MEM}, magnitude only` },
    { k: 0, l: 2, value: -5.3194e-4, source: `Huber & Herzberg −D_e, ${MEM}` },
    { k: 1, l: 2, value: 7.5e-6, source: `−β_e, ${MEM}` },
    { k: 0, l: 3, value: 1.66e-8, source: `H_e, ${MEM}` },
    { k: 0, l: 4, value: -8.9e-13, source: `L_e, ${MEM}, magnitude only` },
  ],
  strength: [1, 2.5e-2, 4e-4],
  hermanWallis: [-8e-3, 2e-2, 3e-2],
  isotopes: [
    ['1H', '2H'],
    ['35Cl', '37Cl'],
  ],
};

/**
 * H⁷⁹Br. Y10, Y20, Y01, Y11, Y02: Huber & Herzberg, from memory; Y30, Y21, Y12, Y03, Y04 from memory, magnitude and
 * sign only. Band strengths from memory (2-0/1-0 ≈ 3e-2, 3-0/1-0 ≈ 1e-3).
 */
const HBR: MoleculeSet = {
  parent: ['1H', '79Br'],
  y: [
    { k: 1, l: 0, value: 2648.975, source: `Huber & Herzberg ω_e, ${MEM}` },
    { k: 2, l: 0, value: -45.2175, source: `Huber & Herzberg −ω_e x_e, ${MEM}` },
    { k: 3, l: 0, value: -0.0029, source: `Huber & Herzberg ω_e y_e, ${MEM}` },
    { k: 0, l: 1, value: 8.46488, source: `Huber & Herzberg B_e, ${MEM}` },
    { k: 1, l: 1, value: -0.23328, source: `Huber & Herzberg −α_e, ${MEM}` },
    { k: 2, l: 1, value: 9.6e-4, source: `γ_e, ${MEM}` },
    { k: 0, l: 2, value: -3.4584e-4, source: `Huber & Herzberg −D_e, ${MEM}` },
    { k: 1, l: 2, value: 4.7e-6, source: `−β_e, ${MEM}` },
    { k: 0, l: 3, value: 8.0e-9, source: `H_e, ${MEM}` },
    { k: 0, l: 4, value: -3.5e-13, source: `L_e, ${MEM}, magnitude only` },
  ],
  strength: [1, 3e-2, 1e-3],
  hermanWallis: [-6e-3, 2e-2, 3e-2],
  isotopes: [
    ['1H', '2H'],
    ['79Br', '81Br'],
  ],
};

/**
 * H¹⁹F. Y10, Y20, Y01, Y11, Y02: Huber & Herzberg, from memory; Y30, Y21, Y12, Y03 from memory, magnitude and sign
 * only; Y40 fitted to the real band origins (from memory), so that 3-0 lies 2.1 cm⁻¹ below what Y10–Y30 alone
 * give, as the real band does. Band strengths from memory (2-0/1-0 ≈ 1.5e-2, 3-0/1-0 ≈ 3e-4).
 */
const HF: MoleculeSet = {
  parent: ['1H', '19F'],
  y: [
    { k: 1, l: 0, value: 4138.32, source: `Huber & Herzberg ω_e, ${MEM}` },
    { k: 2, l: 0, value: -89.88, source: `Huber & Herzberg −ω_e x_e, ${MEM}` },
    { k: 3, l: 0, value: 0.9, source: `ω_e y_e, ${MEM}, magnitude only` },
    {
      k: 4,
      l: 0,
      value: -0.0139,
      source: `least squares here to the HITRAN band origins 1-0 3961.4229, 2-0 7750.7945, 3-0 11372.7891 cm⁻¹ (${MEM}) with Y10–Y30 held: residuals 0.007, 0.025, −0.007 cm⁻¹. Without it the origins lie 0.06, 0.52, 2.09 cm⁻¹ above those, as the library's (which has no Y40) do`,
    },
    { k: 0, l: 1, value: 20.9557, source: `Huber & Herzberg B_e, ${MEM}` },
    { k: 1, l: 1, value: -0.798, source: `Huber & Herzberg −α_e, ${MEM}` },
    { k: 2, l: 1, value: 5.4e-3, source: `γ_e, ${MEM}, magnitude only` },
    { k: 0, l: 2, value: -2.151e-3, source: `Huber & Herzberg −D_e, ${MEM}` },
    { k: 1, l: 2, value: 2.4e-5, source: `−β_e, ${MEM}, magnitude only` },
    { k: 0, l: 3, value: 1.7e-7, source: `H_e, ${MEM}, magnitude only` },
  ],
  strength: [1, 1.5e-2, 3e-4],
  hermanWallis: [-1e-2, 2e-2, 3e-2],
  isotopes: [['1H', '2H'], ['19F']],
};

export const MOLECULES = { CO, HCl: HCL, HBr: HBR, HF } as const;
export type Molecule = keyof typeof MOLECULES;

/** Natural isotopic abundances, CIAAW (Meija et al., Pure Appl. Chem. 88, 293 (2016)), from memory. */
const ABUNDANCE: Readonly<Record<string, number>> = {
  '1H': 0.999885,
  '2H': 0.000115,
  '12C': 0.9893,
  '13C': 0.0107,
  '16O': 0.99757,
  '17O': 0.00038,
  '18O': 0.00205,
  '19F': 1,
  '35Cl': 0.7576,
  '37Cl': 0.2424,
  '79Br': 0.5069,
  '81Br': 0.4931,
};

/** Second radiation constant hc/k, cm K, from the exact SI values of h, c, k. */
const C2 = (6.62607015e-34 * 299792458e2) / 1.380649e-23;

const massOf = (a: string) => MASS[a] as number;
const reduced = (a: string, b: string) => (massOf(a) * massOf(b)) / (massOf(a) + massOf(b));

export interface Isotopologue {
  /** As the service writes it, e.g. "1H-37Cl". */
  readonly formula: string;
  readonly abundance: number;
  readonly y: readonly { k: number; l: number; value: number }[];
}

/** Every isotopologue of a molecule with its natural abundance and mass-scaled Y_kl. */
export function isotopologues(m: MoleculeSet): Isotopologue[] {
  const mu0 = reduced(m.parent[0], m.parent[1]);
  const out: Isotopologue[] = [];
  for (const a of m.isotopes[0])
    for (const b of m.isotopes[1]) {
      const rho = Math.sqrt(mu0 / reduced(a, b));
      const y = m.y.map((c) => ({ k: c.k, l: c.l, value: c.value * rho ** (c.k + 2 * c.l) }));
      out.push({ formula: `${a}-${b}`, abundance: (ABUNDANCE[a] as number) * (ABUNDANCE[b] as number), y });
    }
  return out;
}

/** E(v, J) = Σ Y_kl (v + ½)^k [J(J + 1)]^l, cm⁻¹ (no Y00). */
export function dunhamTerm(y: Isotopologue['y'], v: number, j: number): number {
  const u = v + 0.5;
  const x = j * (j + 1);
  let e = 0;
  for (const c of y) e += c.value * u ** c.k * x ** c.l;
  return e;
}

/** B_v = Σ_k Y_k1 (v + ½)^k: the level's rotational constant the fit's level model reports. */
export function rotationalConstant(y: Isotopologue['y'], v: number): number {
  return y.filter((c) => c.l === 1).reduce((s, c) => s + c.value * (v + 0.5) ** c.k, 0);
}

/** Seeded uniform deviates in [0, 1): sfc32 (Doty-Humphrey's small fast counting generator). */
export function uniforms(seed: number): () => number {
  let a = 0x9e3779b9;
  let b = 0x243f6a88;
  let c = 0xb7e15162;
  let d = seed >>> 0;
  const next = () => {
    const t = (((a + b) >>> 0) + d) >>> 0;
    d = (d + 1) >>> 0;
    a = b ^ (b >>> 9);
    b = (c + (c << 3)) >>> 0;
    c = ((c << 21) | (c >>> 11)) >>> 0;
    c = (c + t) >>> 0;
    return t / 4294967296;
  };
  for (let i = 0; i < 15; i++) next();
  return next;
}

/** Standard normal deviates by the Box–Muller transform of a uniform stream. */
export function normals(u: () => number): () => number {
  return () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
}

export interface Transition {
  readonly species: string;
  readonly band: string;
  readonly branch: 'P' | 'R';
  readonly j: number;
}

interface TrueLine extends Transition {
  readonly position: number;
  readonly strength: number;
  readonly dv: number;
  readonly abundance: number;
}

/** ¹²C¹⁶O database positions by "band branch j". */
const CO_REAL = new Map(CO_DATABASE.lines.map((l) => [`${l.band} ${l.branch} ${l.j}`, l.position]));

/** The Boltzmann partition function of an isotopologue (v ≤ 8, J ≤ 200, levels below the dissociation). */
function partition(y: Isotopologue['y'], t: number): number {
  const e0 = dunhamTerm(y, 0, 0);
  let q = 0;
  for (let v = 0; v <= 8; v++)
    for (let j = 0; j <= 200; j++) {
      const w = Math.exp((-C2 * (dunhamTerm(y, v, j) - e0)) / t);
      q += (2 * j + 1) * w;
      if (w < 1e-12 && j > 10) break;
    }
  return q;
}

const binomial = (n: number, k: number) => {
  let r = 1;
  for (let i = 1; i <= k; i++) r = (r * (n - k + i)) / i;
  return r;
};

/** Every line of bands v″ ≤ 4, Δv = 1–3, J″ ≤ 90, with its absolute strength (arbitrary common unit). */
export function trueLines(molecule: Molecule, t: number, deltaV: readonly number[]): TrueLine[] {
  const m = MOLECULES[molecule];
  const out: TrueLine[] = [];
  for (const iso of isotopologues(m)) {
    if (iso.abundance < 1e-5) continue;
    const q = partition(iso.y, t);
    const e0 = dunhamTerm(iso.y, 0, 0);
    const real = iso.formula === '12C-16O';
    for (const dv of deltaV)
      for (let lo = 0; lo <= 4; lo++) {
        const band = `${lo + dv}-${lo}`;
        const s = iso.abundance * (m.strength[dv - 1] as number) * binomial(lo + dv, dv);
        const hw = m.hermanWallis[dv - 1] as number;
        for (const branch of ['P', 'R'] as const)
          for (let j = branch === 'P' ? 1 : 0; j <= 90; j++) {
            const jUp = branch === 'R' ? j + 1 : j - 1;
            const lower = dunhamTerm(iso.y, lo, j);
            const position =
              (real ? CO_REAL.get(`${band} ${branch} ${j}`) : undefined) ?? dunhamTerm(iso.y, lo + dv, jUp) - lower;
            const mm = branch === 'R' ? j + 1 : -j;
            const hl = branch === 'R' ? j + 1 : j;
            const boltz = Math.exp((-C2 * (lower - e0)) / t) / q;
            const strength = s * hl * (1 + hw * mm) ** 2 * boltz * position * -Math.expm1((-C2 * position) / t);
            out.push({ species: iso.formula, band, branch, j, position, strength, dv, abundance: iso.abundance });
          }
      }
  }
  return out;
}

export interface Instrument {
  /** Wavenumber offset added to every peak, cm⁻¹. */
  readonly offset: number;
  /** Position noise of a strong line, cm⁻¹ (weak lines up to 3× more). */
  readonly sigma: number;
}

export interface HeldoutOptions {
  readonly molecule: Molecule;
  readonly temperature: number;
  /** Δv of the bands in the list: [1] fundamental region, [1, 2] with the first overtone, [2, 3] overtones. */
  readonly deltaV: readonly number[];
  readonly a: Instrument;
  /** A second instrument: 'windows' takes Δv ≥ 2 (own detection limit), 'random' half of every band's lines. */
  readonly b?: Instrument & { readonly layout: 'windows' | 'random' };
  /** Send each peak's σ (its true noise). */
  readonly sigmaGiven: boolean;
  readonly intensities: boolean;
  /** Detection limit as a fraction of the strongest line of the window. */
  readonly detection: number;
  /** Share of detected lines lost at random. */
  readonly missing: number;
  /** Spurious peaks as a share of the detected lines. */
  readonly spurious: number;
  /** Peaks closer than this merge into one, cm⁻¹. */
  readonly resolution: number;
  readonly seed: number;
}

export interface HeldoutPeak {
  readonly position: number;
  readonly uncertainty?: number;
  readonly intensity?: number;
  readonly source?: string;
}

export interface PeakTruth {
  /** The transitions under the peak: none (spurious), one, or two (a blend). */
  readonly transitions: readonly Transition[];
  /** One transition, 5× above the detection limit, abundance ≥ 1e-3: a person would assign it. */
  readonly clear: boolean;
  /** The noise-free position of a single line, offset included. */
  readonly exact?: number;
}

export interface HeldoutScan {
  readonly peaks: HeldoutPeak[];
  readonly truth: PeakTruth[];
  readonly options: HeldoutOptions;
}

interface Detected {
  line: TrueLine;
  source: 'A' | 'B';
  relative: number;
}

/** The lines each instrument sees above its detection limit, with their strength relative to its window's strongest. */
function detect(o: HeldoutOptions, lines: readonly TrueLine[], u: () => number): Detected[] {
  const sourceOf = (l: TrueLine): 'A' | 'B' => {
    if (!o.b) return 'A';
    if (o.b.layout === 'windows') return l.dv >= 2 ? 'B' : 'A';
    return u() < 0.5 ? 'A' : 'B';
  };
  const tagged = lines.map((line) => ({ line, source: sourceOf(line) }));
  const window = (t: { line: TrueLine; source: string }) => (o.b?.layout === 'windows' ? t.source : 'all');
  const max = new Map<string, number>();
  for (const t of tagged) max.set(window(t), Math.max(max.get(window(t)) ?? 0, t.line.strength));
  return tagged
    .map((t) => ({ ...t, relative: t.line.strength / (max.get(window(t)) as number) }))
    .filter((d) => d.relative >= o.detection && u() >= o.missing);
}

interface Row {
  peak: HeldoutPeak;
  truth: PeakTruth;
  weight: number;
}

/** One peak per detected line: noise growing as the line weakens (× min(3, relative^−0.15)), the offset added. */
function measure(o: HeldoutOptions, d: Detected, gauss: () => number): Row {
  const inst = d.source === 'B' && o.b ? o.b : o.a;
  const sigma = inst.sigma * Math.min(3, d.relative ** -0.15);
  const exact = d.line.position + inst.offset;
  const clear = d.relative >= 5 * o.detection && d.line.abundance >= 1e-3;
  const { species, band, branch, j } = d.line;
  return {
    peak: {
      position: exact + sigma * gauss(),
      ...(o.sigmaGiven ? { uncertainty: sigma } : {}),
      ...(o.intensities ? { intensity: d.relative * (1 + 0.05 * gauss()) } : {}),
      ...(o.b ? { source: d.source } : {}),
    },
    truth: { transitions: [{ species, band, branch, j }], clear, exact },
    weight: d.relative,
  };
}

/** Peaks of one source closer than the resolution merged: intensity-weighted position, summed intensity. */
function blend(rows: Row[], resolution: number): Row[] {
  rows.sort((x, y) => x.peak.position - y.peak.position);
  const out: Row[] = [];
  for (const r of rows) {
    const k = out.findLastIndex((p) => p.peak.source === r.peak.source);
    const prev = k >= 0 && out.length - k <= 3 ? out[k] : undefined;
    if (!prev || r.peak.position - prev.peak.position >= resolution) {
      out.push(r);
      continue;
    }
    const w = prev.weight + r.weight;
    const position = (prev.peak.position * prev.weight + r.peak.position * r.weight) / w;
    out[k] = {
      peak: {
        ...prev.peak,
        position,
        ...(prev.peak.intensity !== undefined
          ? { intensity: (prev.peak.intensity ?? 0) + (r.peak.intensity ?? 0) }
          : {}),
        ...(prev.peak.uncertainty !== undefined
          ? { uncertainty: Math.max(prev.peak.uncertainty, r.peak.uncertainty ?? 0) }
          : {}),
      },
      truth: { transitions: [...prev.truth.transitions, ...r.truth.transitions], clear: false },
      weight: w,
    };
  }
  return out;
}

/** Spurious peaks at uniform positions over the list's span, intensities log-uniform above the detection limit. */
function spuriousRows(o: HeldoutOptions, rows: readonly Row[], u: () => number): Row[] {
  const n = Math.round(o.spurious * rows.length);
  const lo = Math.min(...rows.map((r) => r.peak.position));
  const hi = Math.max(...rows.map((r) => r.peak.position));
  const out: Row[] = [];
  for (let i = 0; i < n; i++) {
    const source = o.b ? (u() < 0.5 ? 'A' : 'B') : undefined;
    const sigma = (source === 'B' && o.b ? o.b : o.a).sigma;
    const relative = o.detection * (0.3 / o.detection) ** u();
    out.push({
      peak: {
        position: lo + (hi - lo) * u(),
        ...(o.sigmaGiven ? { uncertainty: sigma } : {}),
        ...(o.intensities ? { intensity: relative } : {}),
        ...(source ? { source } : {}),
      },
      truth: { transitions: [], clear: false },
      weight: relative,
    });
  }
  return out;
}

/** A held-out scan: detected, measured, blended peaks with spurious ones among them, sorted by position. */
export function heldoutScan(o: HeldoutOptions): HeldoutScan {
  const u = uniforms(o.seed);
  const gauss = normals(uniforms(o.seed ^ 0x2545f491));
  const rows = detect(o, trueLines(o.molecule, o.temperature, o.deltaV), u).map((d) => measure(o, d, gauss));
  const peaks = blend(rows, o.resolution);
  const all = [...peaks, ...spuriousRows(o, peaks, u)].sort((x, y) => x.peak.position - y.peak.position);
  return { peaks: all.map((r) => r.peak), truth: all.map((r) => r.truth), options: o };
}

/** The scan options of seed `seed` of the sweep: species, temperature, noise, spurious, missing, offset, σ, sources. */
export function sweepOptions(seed: number): HeldoutOptions {
  const u = uniforms(seed * 7717 + 1);
  const pick = <T>(xs: readonly T[]) => xs[Math.floor(u() * xs.length)] as T;
  const molecule = pick(['CO', 'HCl', 'HBr', 'HF'] as const);
  const deltaV = pick([[1], [1], [1, 2], [2, 3]] as const);
  const sign = u() < 0.5 ? -1 : 1;
  const sigma = pick([0.0005, 0.001, 0.002, 0.005]);
  const two = u() < 0.4;
  return {
    molecule,
    temperature: Math.round(296 + (1500 - 296) * u() ** 2),
    deltaV,
    a: { offset: sign * 0.2 * u(), sigma },
    ...(two
      ? {
          b: {
            offset: (u() - 0.5) * 0.04,
            sigma: sigma * (1 + 3 * u()),
            layout: deltaV.length > 1 && u() < 0.5 ? ('windows' as const) : ('random' as const),
          },
        }
      : {}),
    sigmaGiven: u() < 0.5,
    intensities: u() < 0.8,
    detection: pick([1e-4, 3e-4, 1e-3, 3e-3]),
    missing: 0.1 * u(),
    spurious: 0.3 * u(),
    resolution: pick([0.005, 0.01, 0.02]),
    seed,
  };
}

/** What the analysis made of one scan's peaks, counted against the truth. */
export interface ScanScore {
  /** Peaks of one or two true transitions fitted with one of their labels. */
  right: number;
  /** Peaks of true transitions fitted with a label none of them has (wrong species, band, branch or J). */
  wrong: number;
  /** Peaks of true transitions not fitted. */
  left: number;
  /** Peaks a person would assign without doubt, and how many of them were fitted right. */
  clear: number;
  clearRight: number;
  spurious: number;
  spuriousTaken: number;
  misses: string[];
}

/** A label as the fit reports it (its branch may be any the service knows). */
type Label = Omit<Transition, 'branch'> & { readonly branch: string };

const same = (a: Label, t: Transition) =>
  a.species === t.species && a.band === t.band && a.branch === t.branch && a.j === t.j;
const name = (t: Label) => `${t.species} ${t.band} ${t.branch}(${t.j})`;

/** Count right / wrong / left by comparing each output line (input order) with the scan's truth. */
export function scoreScan(
  truth: readonly PeakTruth[],
  out: readonly { status: string; assignment?: Label }[],
): ScanScore {
  const s: ScanScore = {
    right: 0,
    wrong: 0,
    left: 0,
    clear: 0,
    clearRight: 0,
    spurious: 0,
    spuriousTaken: 0,
    misses: [],
  };
  truth.forEach((t, i) => {
    const o = out[i];
    const a = o?.status === 'fitted' ? o.assignment : undefined;
    if (t.clear) s.clear++;
    if (t.transitions.length === 0) {
      s.spurious++;
      if (a) s.spuriousTaken++;
    } else if (!a) {
      s.left++;
      if (t.clear) s.misses.push(`${t.transitions.map(name).join(' + ')} left`);
    } else if (t.transitions.some((x) => same(a, x))) {
      s.right++;
      if (t.clear) s.clearRight++;
    } else {
      s.wrong++;
      s.misses.push(`${t.transitions.map(name).join(' + ')} taken as ${name(a)}`);
    }
  });
  return s;
}

/** The true band origin of v′-0 and B_0 of the most abundant isotopologue (its Y_kl; CO's B_0 from the database's source). */
export function truthOf(molecule: Molecule, upper: number): { species: string; origin: number; B0: number } {
  const iso = isotopologues(MOLECULES[molecule]).sort((x, y) => y.abundance - x.abundance)[0] as Isotopologue;
  const b0Co = (CO_DATABASE.published.B_v_MHz.value[0] as number) / 29979.2458;
  return {
    species: iso.formula,
    origin: dunhamTerm(iso.y, upper, 0) - dunhamTerm(iso.y, 0, 0),
    B0: molecule === 'CO' ? b0Co : rotationalConstant(iso.y, 0),
  };
}

/**
 * A line generator for linear polyatomic bands written without any code of src/: its own level energies (power
 * series in x = J(J+1) per parity component, the form of the HITRAN-energy fits of the reference note, which is NOT
 * the B[J(J+1) − l²] form of src/linear), its own J and parity bookkeeping and its own seeded Gaussian stream.
 * Constants come from ../shared/REFERENCE-DATA-LINEAR.md with the source named at each set.
 */

export interface OwnComponent {
  readonly G: number;
  readonly B: number;
  readonly D: number;
  readonly H: number;
  /** Which J exist in this component: all, or only even / odd (nuclear-spin statistics). */
  readonly js: 'all' | 'even' | 'odd';
}

export interface OwnLevel {
  readonly v: readonly number[];
  readonly l: number;
  readonly e: OwnComponent;
  readonly f?: OwnComponent;
}

export interface OwnLine {
  readonly position: number;
  readonly uncertainty?: number;
  readonly assignment: {
    readonly upper: { v: number[]; l: number };
    readonly lower: { v: number[]; l: number };
    readonly branch: 'P' | 'Q' | 'R';
    readonly j: number;
    readonly parity?: 'e' | 'f';
  };
}

function energy(c: OwnComponent, J: number): number {
  const x = J * (J + 1);
  return c.G + c.B * x - c.D * x * x + c.H * x * x * x;
}

function exists(level: OwnLevel, J: number, p: 'e' | 'f'): boolean {
  const c = p === 'e' ? level.e : level.f;
  if (!c || J < level.l) return false;
  return c.js === 'all' || (c.js === 'even') === (J % 2 === 0);
}

/** mulberry32 + Box–Muller, independent of test/helpers. */
export function ownNormal(seed: number): () => number {
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

/**
 * Every line of the band upper ← lower with J″ ≤ jMax: R (J′ = J″ + 1) and P (J′ = J″ − 1) keep the e/f label,
 * Q (J′ = J″) changes it; a line exists when both of its rotational levels exist. Noise σ (cm⁻¹) from the stream.
 */
export function ownBand(
  upper: OwnLevel,
  lower: OwnLevel,
  jMax: number,
  sigma: number,
  normal: () => number,
  withUncertainty = true,
): OwnLine[] {
  const out: OwnLine[] = [];
  const bothL = upper.l >= 1 && lower.l >= 1;
  for (const p of ['e', 'f'] as const) {
    for (let j = 0; j <= jMax; j++) {
      if (!exists(lower, j, p)) continue;
      for (const [branch, dj] of [
        ['P', -1],
        ['Q', 0],
        ['R', 1],
      ] as const) {
        const pu = branch === 'Q' ? (p === 'e' ? 'f' : 'e') : p;
        const ju = j + dj;
        if (!exists(upper, ju, pu)) continue;
        const cu = (pu === 'e' ? upper.e : upper.f) as OwnComponent;
        const cl = (p === 'e' ? lower.e : lower.f) as OwnComponent;
        out.push({
          position: energy(cu, ju) - energy(cl, j) + sigma * normal(),
          ...(withUncertainty ? { uncertainty: sigma } : {}),
          assignment: {
            upper: { v: [...upper.v], l: upper.l },
            lower: { v: [...lower.v], l: lower.l },
            branch,
            j,
            ...(bothL ? { parity: p } : {}),
          },
        });
      }
    }
  }
  return out;
}

// 12C16O2 (626), Rothman & Young, JQSRT 25, 505 (1981), read-secondary (reference note §1.1, RY1981). Spin
// statistics (note §2): ground state e/even J only; 00011 (u) e/odd J only.
export const CO2_000: OwnLevel = {
  v: [0, 0, 0],
  l: 0,
  e: { G: 0, B: 0.39021894, D: 1.33373e-7, H: 1.6e-14, js: 'even' },
};
export const CO2_001: OwnLevel = {
  v: [0, 0, 1],
  l: 0,
  e: { G: 2349.1433, B: 0.3871414, D: 1.33034e-7, H: 1.7e-14, js: 'odd' },
};

// H12C14N, derived in the note (§1.6, THIS_NOTE) from HITRAN energies: ground state and 01¹0 per parity.
export const HCN_000: OwnLevel = {
  v: [0, 0, 0],
  l: 0,
  e: { G: 0, B: 1.478221814, D: 2.909254459e-6, H: 2.898393156e-12, js: 'all' },
};
export const HCN_010: OwnLevel = {
  v: [0, 1, 0],
  l: 1,
  e: { G: 711.9795491, B: 1.478034789, D: 2.931952336e-6, H: 2.737587934e-12, js: 'all' },
  f: { G: 711.9795591, B: 1.485522349, D: 3.020421432e-6, H: 4.028555267e-12, js: 'all' },
};

// 14N2 16O, Bohlin et al. 2012 copy (note §1.4, BOHLIN2012, read-secondary): ground state and 00⁰1 (N–N stretch,
// HITRAN label 0001 = 2223.75676 cm⁻¹). No identical nuclei: all J.
export const N2O_000: OwnLevel = {
  v: [0, 0, 0],
  l: 0,
  e: { G: 0, B: 0.419011, D: 1.76e-7, H: 1.6e-14, js: 'all' },
};
export const N2O_001: OwnLevel = {
  v: [0, 0, 1],
  l: 0,
  e: { G: 2223.75676, B: 0.415559, D: 1.75e-7, H: -1.3e-14, js: 'all' },
};

/**
 * The constants of the B[J(J+1) − l²] form ∓ ½(q x + q_J x²) that reproduce a two-component level exactly up to x³
 * (expansion of y = x − l²; the remaining H_f − H_e difference is not representable and stays a model error).
 */
export function asTermConstants(level: OwnLevel): {
  G: number;
  B: number;
  D: number;
  H: number;
  q?: number;
  qJ?: number;
} {
  const l2 = level.l * level.l;
  const e = level.e;
  const f = level.f ?? level.e;
  const H = (e.H + f.H) / 2;
  const Dm = (e.D + f.D) / 2;
  const D = Dm - 3 * H * l2;
  const B = (e.B + f.B) / 2 - 2 * D * l2 - 3 * H * l2 * l2;
  const G = (e.G + f.G) / 2 + B * l2 + D * l2 * l2 + H * l2 * l2 * l2;
  return level.l === 0 ? { G: e.G, B: e.B, D: e.D, H: e.H } : { G, B, D, H, q: f.B - e.B, qJ: e.D - f.D };
}

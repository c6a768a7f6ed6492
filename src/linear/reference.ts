import { exchangeStatistics, isGerade } from './spin-statistics.js';
import { termOriginFromPowerSeries } from './terms.js';
import { type LinearLevel, type LinearLevelConstants, levelKey } from './types.js';

/**
 * The reference library of linear polyatomic molecules: ground and main fundamental levels of 12C16O2 (and
 * 16O13C16O, 16O12C18O), 14N2 16O, 16O12C32S, H12C14N (and H13C14N with its 1.5 µm standard band) and 12C2H2
 * (with the 1.5 µm ν1+ν3 standard band). Every value carries its source and a status taken from the shared
 * reference note (shared/REFERENCE-DATA-LINEAR.md):
 *   read           read in a stored copy of the original or official source
 *   read-secondary read in a public copy of a published value (original cited)
 *   derived        computed from read values (method in `note`)
 *   recalled       from memory, not verified: low confidence
 *
 * Conventions (those of terms.ts, which every value here is converted to):
 *   F_v(J) = G_v + B_v y − D_v y² + H_v y³ ∓ (q_v/2) J(J+1),  y = J(J+1) − l²,  e upper sign, f lower;
 *   q_v is the FULL splitting coefficient, E(f) − E(e) = q_v J(J+1), q_v > 0 when f lies above e.
 * Sources quote Π levels in other forms, converted here (status 'derived', the conversion named in `note`):
 *   - per-parity power series E_p = G_p + B_p x − D_p x² + H_p x³ (x = J(J+1)), as in refits of database
 *     energies: H = H̄, D = D̄ − 3H l², B = B̄ − 2D l² − 3H l⁴, q = B_f − B_e, G_v = Ḡ + B l² + D l⁴ + H l⁶ (bars are
 *     e/f means), q_J = −(D_f − D_e) (the J-dependence of q: E_f − E_e = q x + q_J x²).
 *   - NIST Triatomic c/d components: c (lower B) = e, d = f; NIST's tabulated q(010) is HALF the splitting.
 *   - Rothman & Young (1981) give one B per Π level, which equals the HITRAN e-component value (note §2).
 * Mode numbering (Herzberg's, used by HITRAN): triatomics [v1, v2, v3] with v2 the bend; N2O ν1 ≈ 1285 cm⁻¹ (the
 * NIST Triatomic database numbers the stretches the other way), OCS ν1 ≈ 859 cm⁻¹ (C–S stretch; CCCBDB numbers them
 * the other way), HCN ν1 ≈ 3311 cm⁻¹ (C–H stretch) and ν3 ≈ 2097 cm⁻¹ (C–N; CDMS warns the two are swapped in parts
 * of the literature, and NIST SRM 2519a calls the C–H overtone "2ν3"); C2H2 [v1 … v5] with ν1, ν2 σg⁺, ν3 σu⁺,
 * ν4 πg, ν5 πu. CO2 database labels v1 v2 l v3 r name Fermi-dyad members by rank r: 10001 is written
 * { v: [1,0,0], l: 0, r: 1 } and 10002 { v: [1,0,0], l: 0, r: 2 } (types.ts).
 */

export type ReferenceStatus = 'read' | 'read-secondary' | 'derived' | 'recalled';

export interface ReferenceSource {
  readonly cite: string;
  readonly address: string;
}

/** Sources, keyed as in the shared reference note §6 (plus SRM2517A and THIS_LIBRARY). */
export const LINEAR_SOURCES: Readonly<Record<string, ReferenceSource>> = {
  NIST_TRI_N2O: {
    cite: 'NIST Triatomic Spectral Database (F. J. Lovas et al.), N2O tables, ref. codes 76028 and 75018',
    address: 'https://physics.nist.gov/PhysRefData/MolSpec/Triatomic/Html/Tables/N2O.html',
  },
  NIST_TRI_OCS: {
    cite: 'NIST Triatomic Spectral Database, OCS table; J. Reinartz and A. Dymanus, Chem. Phys. Lett. 24, 346 (1974)',
    address: 'secondary copy: GitHub CFEL-CMI/cmistark, cmistark/moleculeparameters.py, function OCS',
  },
  RY1981: {
    cite: 'L. S. Rothman and L. D. G. Young, J. Quant. Spectrosc. Radiat. Transfer 25, 505 (1981)',
    address: 'secondary copy: GitHub ryancoffee/rotational, non_obj_propagator.cpp (level labels assigned by the note)',
  },
  BOHLIN2012: {
    cite: 'A. Bohlin et al., J. Raman Spectrosc. 43, 604 (2012), as attributed in the copy',
    address: 'secondary copy: GitHub ryancoffee/rotational, non_obj_propagator.cpp, functions *_nno',
  },
  HITRAN_SAMPLES: {
    cite: 'HITRAN database line records (HITRAN team), sample files of CO2, N2O, OCS, HCN',
    address: 'GitHub hitranonline/planetary-broadeners, Broadening_Files/Input-Broadening-Files/sample_*.par',
  },
  CDMS_HCN: {
    cite: 'CDMS (Cologne Database for Molecular Spectroscopy), HCN entries 027501 and 027510 (H. S. P. Müller)',
    address: 'https://cdms.astro.uni-koeln.de/cgi-bin/cdmsinfo?file=e027510.cat (B read in secondary copies)',
  },
  SRM2519A: {
    cite: 'S. L. Gilbert, W. C. Swann, C.-M. Wang, SRM 2519a, NIST Special Publication 260-137 (2005), Table 3',
    address: 'secondary copy: GitHub Laura-Fernanda-de-Sousa/Graficos-de-Calibracao-MZI-HCN-Cavidade',
  },
  SRM2517A: {
    cite: 'NIST SRM 2517a, acetylene 12C2H2 wavelength reference 1510–1540 nm, certificate Table 1 (S. L. Gilbert, W. C. Swann)',
    address: 'secondary copy: a public MATLAB instrument class (array nist_acetlyne, printed digits kept)',
  },
  REFERENCE_NOTE: {
    cite: 'shared reference note REFERENCE-DATA-LINEAR.md: least-squares refits of the HITRAN level energies and lines above',
    address: 'shared/REFERENCE-DATA-LINEAR.md, §1 (status derived; formal 1σ from those fits)',
  },
  THIS_LIBRARY: {
    cite: 'this library: weighted least squares of the SRM 2517a centres, or the conversions named in the note of the value',
    address: 'src/linear/reference.ts',
  },
  RECALL: { cite: 'memory of the literature, not verified in any stored source', address: '-' },
};

export interface ReferenceValue {
  readonly value: number;
  /** 1σ, same unit (cm⁻¹); absent when the source gives none. */
  readonly uncertainty?: number;
  readonly status: ReferenceStatus;
  /** Key(s) of LINEAR_SOURCES, joined by '+' when a value combines several. */
  readonly source: string;
  readonly note?: string;
}

export interface ReferenceLevel extends LinearLevel {
  /** Name in words, with the mode described. */
  readonly name: string;
  /** The level as the HITRAN database labels it (v1 v2 l v3 r for CO2, v1 v2 l v3 otherwise). */
  readonly databaseLabel: string;
  /** G_v of the B[J(J+1) − l²] form, cm⁻¹ above the ground level's G. */
  readonly G: ReferenceValue;
  readonly B: ReferenceValue;
  readonly D: ReferenceValue;
  readonly H?: ReferenceValue;
  /** Full l-type doubling coefficient (l ≥ 1 only). */
  readonly q?: ReferenceValue;
  /** Its centrifugal correction: E(f) − E(e) = q J(J+1) + q_J [J(J+1)]² (l ≥ 1 only). */
  readonly qJ?: ReferenceValue;
  readonly note?: string;
}

export interface ReferenceSpecies {
  /** Hyphenated chain along the axis, mass numbers first ("16O-12C-16O"). */
  readonly formula: string;
  readonly aliases: readonly string[];
  readonly name: string;
  /** Atoms along the axis, for the spin statistics ("16O", "12C", "16O"). */
  readonly chain: readonly string[];
  /** The modes in the numbering used here. */
  readonly modes: readonly string[];
  readonly levels: readonly ReferenceLevel[];
  /** Band centres of modes without rotational constants here (Raman-active or unmeasured), cm⁻¹. */
  readonly otherModes?: readonly { readonly mode: string; readonly centre: ReferenceValue }[];
  /** Extra bands worth predicting besides those from the ground level (hot or laser bands): database labels. */
  readonly extraBands?: readonly { readonly upper: string; readonly lower: string; readonly name: string }[];
  readonly hazard: string;
}

/** Edition of the linear library; change it with any value. */
export const LINEAR_REFERENCE_EDITION = '2026.12.2-linear.1';

const MHZ_PER_CM = 29979.2458;
const rv = (
  value: number,
  status: ReferenceStatus,
  source: string,
  uncertainty?: number,
  note?: string,
): ReferenceValue => ({
  value,
  status,
  source,
  ...(uncertainty !== undefined ? { uncertainty } : {}),
  ...(note ? { note } : {}),
});
/** A value given in MHz (kHz × 1e-3, Hz × 1e-6) converted to cm⁻¹ with 1 cm⁻¹ = 29 979.2458 MHz (exact). */
const mhz = (value: number, status: ReferenceStatus, source: string, uncertainty?: number, note?: string) =>
  rv(value / MHZ_PER_CM, status, source, uncertainty === undefined ? undefined : uncertainty / MHZ_PER_CM, note);

interface ParitySeries {
  readonly G: number;
  readonly B: number;
  readonly D: number;
  readonly H?: number;
  readonly sG?: number;
  readonly sB?: number;
  readonly sD?: number;
  readonly sH?: number;
}

/**
 * A Π (or Δ) level from per-parity power series (module comment): conversion to G_v, B, D, H, q of terms.ts.
 * Uncertainties: the e and f fits are independent, so σ(mean) = ½√(σe² + σf²) and σ(q) = √(σe² + σf²).
 */
function fromParitySeries(
  l: number,
  e: ParitySeries,
  f: ParitySeries,
  source: string,
  what: string,
): Pick<ReferenceLevel, 'G' | 'B' | 'D' | 'H' | 'q' | 'qJ'> {
  const L = l * l;
  const mean = (a: number, b: number) => (a + b) / 2;
  const sMean = (a?: number, b?: number) => (a === undefined || b === undefined ? undefined : 0.5 * Math.hypot(a, b));
  const H = mean(e.H ?? 0, f.H ?? 0);
  const D = mean(e.D, f.D) - 3 * H * L;
  const B = mean(e.B, f.B) - 2 * D * L - 3 * H * L * L;
  const G = termOriginFromPowerSeries(mean(e.G, f.G), { B, D, H }, l);
  const dDnote = `D_f − D_e = ${(f.D - e.D).toExponential(3)} cm-1 carried as q_J = −(D_f − D_e)`;
  const how = `converted from ${what} per-parity power series (e and f): see the module comment; ${dDnote}`;
  return {
    G: rv(G, 'derived', source, sMean(e.sG, f.sG), how),
    B: rv(B, 'derived', source, sMean(e.sB, f.sB), how),
    D: rv(D, 'derived', source, sMean(e.sD, f.sD), how),
    ...(e.H !== undefined || f.H !== undefined ? { H: rv(H, 'derived', source, sMean(e.sH, f.sH), how) } : {}),
    q: rv(
      f.B - e.B,
      'derived',
      source,
      e.sB !== undefined && f.sB !== undefined ? Math.hypot(e.sB, f.sB) : undefined,
      `B_f − B_e of ${what}`,
    ),
    // E_f − E_e = (B_f − B_e)x − (D_f − D_e)x² + …, so the l-doubling's centrifugal term is q_J = −(D_f − D_e)
    // (HCN 01¹0: −8.85e-8 cm⁻¹, 0.02 cm⁻¹ on an f line at J = 25).
    ...(f.D !== e.D
      ? {
          qJ: rv(
            -(f.D - e.D),
            'derived',
            source,
            e.sD !== undefined && f.sD !== undefined ? Math.hypot(e.sD, f.sD) : undefined,
            `−(D_f − D_e) of ${what}`,
          ),
        }
      : {}),
  };
}

const ZERO = (source: string) => rv(0, 'derived', source, undefined, 'the ground level defines the zero of G');
const NOTE_FIT = 'REFERENCE_NOTE';
const CO2_HAZARD =
  'carbon dioxide is an asphyxiant at high concentration; this service computes constants from data and certifies nothing about the safety of a gas';

const CO2_626: ReferenceSpecies = {
  formula: '16O-12C-16O',
  aliases: ['CO2', '12CO2', 'OCO'],
  name: 'carbon dioxide (12C16O2, 626)',
  chain: ['16O', '12C', '16O'],
  modes: [
    'ν1 σg⁺ symmetric stretch (Raman; Fermi dyad with 2ν2)',
    'ν2 πu bend (667 cm⁻¹)',
    'ν3 σu⁺ antisymmetric stretch (2349 cm⁻¹)',
  ],
  levels: [
    {
      v: [0, 0, 0],
      l: 0,
      name: 'ground state 00⁰0',
      databaseLabel: '00001',
      G: ZERO('RY1981'),
      B: rv(0.39021894, 'read-secondary', 'RY1981'),
      D: rv(1.33373e-7, 'read-secondary', 'RY1981'),
      H: rv(1.6e-14, 'read-secondary', 'RY1981'),
      note: 'only even J exist (16O nuclei, I = 0)',
    },
    {
      v: [0, 1, 0],
      l: 1,
      name: 'ν2 bend 01¹0 (Πu)',
      databaseLabel: '01101',
      ...fromParitySeries(
        1,
        { G: 667.379, B: 0.3906423, D: 1.359e-7, H: 1.7e-14 },
        { G: 667.379, B: 0.3906423 + 6.2e-4, D: 1.359e-7, H: 1.7e-14 },
        'RY1981+RECALL',
        "Rothman & Young's 01101 (B taken as the e value, G as the band centre) with q = 6.2e-4 cm-1 recalled (low confidence)",
      ),
      q: rv(6.2e-4, 'recalled', 'RECALL', undefined, 'not found in a stored source; low confidence'),
      note: 'e components at odd J, f at even J; R&Y G = 667.379 read as the band centre (Q-branch origin)',
    },
    {
      v: [1, 0, 0],
      l: 0,
      r: 2,
      name: 'Fermi dyad lower member 10002 ([10⁰0, 02⁰0]_II)',
      databaseLabel: '10002',
      G: rv(1285.4087, 'read-secondary', 'RY1981'),
      B: rv(0.3904823, 'read-secondary', 'RY1981'),
      D: rv(1.57161e-7, 'read-secondary', 'RY1981'),
      H: rv(2.33e-13, 'read-secondary', 'RY1981'),
    },
    {
      v: [1, 0, 0],
      l: 0,
      r: 1,
      name: 'Fermi dyad upper member 10001 ([10⁰0, 02⁰0]_I)',
      databaseLabel: '10001',
      G: rv(1388.1847, 'read-secondary', 'RY1981'),
      B: rv(0.39018893, 'read-secondary', 'RY1981'),
      D: rv(1.14952e-7, 'read-secondary', 'RY1981'),
      H: rv(1.91e-13, 'read-secondary', 'RY1981'),
    },
    {
      v: [0, 0, 1],
      l: 0,
      name: 'ν3 antisymmetric stretch 00⁰1 (Σu⁺)',
      databaseLabel: '00011',
      G: rv(2349.1433, 'read-secondary', 'RY1981', undefined, 'the note refits 2349.142782(35) from HITRAN energies'),
      B: rv(0.3871414, 'read-secondary', 'RY1981', undefined, 'refit of HITRAN energies: 0.3871413629(94)'),
      D: rv(1.33034e-7, 'read-secondary', 'RY1981'),
      H: rv(1.7e-14, 'read-secondary', 'RY1981'),
      note: 'only odd J exist',
    },
  ],
  extraBands: [
    { upper: '00011', lower: '10001', name: '10 µm laser band I' },
    { upper: '00011', lower: '10002', name: '9 µm laser band II' },
  ],
  hazard: CO2_HAZARD,
};

const CO2_636: ReferenceSpecies = {
  formula: '16O-13C-16O',
  aliases: ['13CO2'],
  name: 'carbon dioxide (16O13C16O, 636)',
  chain: ['16O', '13C', '16O'],
  modes: CO2_626.modes,
  levels: [
    {
      v: [0, 0, 0],
      l: 0,
      name: 'ground state 00⁰0',
      databaseLabel: '00001',
      G: ZERO('RECALL'),
      B: rv(0.3902369, 'recalled', 'RECALL', undefined, 'not found in a stored source; low confidence'),
      D: rv(1.3337e-7, 'recalled', 'RECALL', undefined, "assumed equal to 626's D0 (low confidence)"),
      note: 'only even J exist (16O nuclei)',
    },
    {
      v: [1, 0, 0],
      l: 0,
      r: 1,
      name: 'Fermi dyad upper member 10001',
      databaseLabel: '10001',
      G: rv(1370.061717, 'derived', NOTE_FIT, 1e-4, 'fit of HITRAN energies J = 36–78 only: G and B extrapolated'),
      B: rv(0.3897181492, 'derived', NOTE_FIT, 9.7e-8),
      D: rv(1.204462695e-7, 'derived', NOTE_FIT, 2.8e-11),
      H: rv(2.488009798e-13, 'derived', NOTE_FIT, 2.5e-15),
    },
    {
      v: [0, 0, 1],
      l: 0,
      name: 'ν3 antisymmetric stretch 00⁰1',
      databaseLabel: '00011',
      G: rv(2283.487118, 'derived', NOTE_FIT, 4.3e-5),
      B: rv(0.387273127, 'derived', NOTE_FIT, 2.4e-7),
      D: rv(1.326174645e-7, 'derived', NOTE_FIT, 3e-10),
      H: rv(-6.444844658e-14, 'derived', NOTE_FIT, 1e-13),
    },
  ],
  hazard: CO2_HAZARD,
};

const CO2_628: ReferenceSpecies = {
  formula: '16O-12C-18O',
  aliases: [],
  name: 'carbon dioxide (16O12C18O, 628)',
  chain: ['16O', '12C', '18O'],
  modes: CO2_626.modes,
  levels: [
    {
      v: [0, 0, 0],
      l: 0,
      name: 'ground state 00⁰0 (every J exists)',
      databaseLabel: '00001',
      G: ZERO(NOTE_FIT),
      B: rv(0.368184579, 'derived', NOTE_FIT, 1.2e-8),
      D: rv(1.187580471e-7, 'derived', NOTE_FIT, 1.1e-11),
      H: rv(1.160908505e-14, 'derived', NOTE_FIT, 2.7e-15),
    },
    {
      v: [0, 1, 0],
      l: 1,
      name: 'ν2 bend 01¹0',
      databaseLabel: '01101',
      ...fromParitySeries(
        1,
        {
          G: 662.4430089,
          B: 0.3685974351,
          D: 1.205562378e-7,
          H: 2.675637489e-14,
          sG: 1.5e-5,
          sB: 5.5e-8,
          sD: 4.8e-11,
          sH: 1.1e-14,
        },
        {
          G: 662.4446354,
          B: 0.3691496143,
          D: 1.211477356e-7,
          H: 1.14908083e-14,
          sG: 1.2e-5,
          sB: 4.4e-8,
          sD: 3.8e-11,
          sH: 9e-15,
        },
        NOTE_FIT,
        'the note’s 01101 refits (G_f − G_e = 1.6e-3 cm-1 in those fits is averaged)',
      ),
    },
    {
      v: [0, 0, 1],
      l: 0,
      name: 'ν3 antisymmetric stretch 00⁰1',
      databaseLabel: '00011',
      G: rv(2332.12207, 'derived', NOTE_FIT, 6.9e-4, 'noisier energy set (rms 2e-3 cm-1)'),
      B: rv(0.3652888665, 'derived', NOTE_FIT, 3.5e-6),
      D: rv(1.238490228e-7, 'derived', NOTE_FIT, 4e-9),
      H: rv(1.407540751e-12, 'derived', NOTE_FIT, 1.2e-12),
    },
  ],
  hazard: CO2_HAZARD,
};

const N2O: ReferenceSpecies = {
  formula: '14N-14N-16O',
  aliases: ['N2O', 'NNO'],
  name: 'nitrous oxide (14N2 16O)',
  chain: ['14N', '14N', '16O'],
  modes: ['ν1 σ⁺ stretch ≈ 1285 cm⁻¹ (mostly N–O)', 'ν2 π bend ≈ 589 cm⁻¹', 'ν3 σ⁺ stretch ≈ 2224 cm⁻¹ (mostly N–N)'],
  levels: [
    {
      v: [0, 0, 0],
      l: 0,
      name: 'ground state 00⁰0',
      databaseLabel: '0000',
      G: ZERO('NIST_TRI_N2O'),
      B: mhz(12561.6348, 'read', 'NIST_TRI_N2O', 0.0021, '12561.6348(21) MHz'),
      D: mhz(5.2808e-3, 'read', 'NIST_TRI_N2O', 6.1e-6, '5.2808(61) kHz (header printed MHz; magnitude shows kHz)'),
      H: mhz(0.0008e-6, 'read', 'NIST_TRI_N2O', 0.0057e-6, '0.0008(57) Hz'),
    },
    {
      v: [0, 1, 0],
      l: 1,
      name: 'ν2 bend 01¹0',
      databaseLabel: '0110',
      ...fromParitySeries(
        1,
        {
          G: 588.76787,
          B: 12566.6411 / MHZ_PER_CM,
          D: 5.3539e-3 / MHZ_PER_CM,
          sB: 0.0021 / MHZ_PER_CM,
          sD: 6.1e-6 / MHZ_PER_CM,
        },
        {
          G: 588.76787,
          B: 12590.3906 / MHZ_PER_CM,
          D: 5.4002e-3 / MHZ_PER_CM,
          sB: 0.0021 / MHZ_PER_CM,
          sD: 6.1e-6 / MHZ_PER_CM,
        },
        'NIST_TRI_N2O+BOHLIN2012',
        'NIST c/d components (c = e, d = f) with the band centre 588.76787 of Bohlin et al.',
      ),
      note: "NIST's tabulated q(010) = 11.87212 MHz is half of B(d) − B(c) = 23.7495 MHz",
    },
    {
      v: [1, 0, 0],
      l: 0,
      name: 'ν1 stretch 10⁰0 (NIST label (0,0,1))',
      databaseLabel: '1000',
      G: rv(1284.90334, 'read-secondary', 'BOHLIN2012'),
      B: mhz(12508.9923, 'read', 'NIST_TRI_N2O', 0.0031),
      D: mhz(5.1726e-3, 'read', 'NIST_TRI_N2O', 8.6e-6),
    },
    {
      v: [0, 2, 0],
      l: 0,
      name: '2ν2 02⁰0',
      databaseLabel: '0200',
      G: rv(1168.1323, 'read-secondary', 'BOHLIN2012'),
      B: mhz(12588.8913, 'read', 'NIST_TRI_N2O', 0.0021),
      D: rv(2.49e-7, 'read-secondary', 'BOHLIN2012'),
    },
    {
      v: [0, 0, 1],
      l: 0,
      name: 'ν3 stretch 00⁰1 (NIST label (1,0,0))',
      databaseLabel: '0001',
      G: rv(2223.75676, 'read-secondary', 'BOHLIN2012'),
      B: mhz(12458.1706, 'read', 'NIST_TRI_N2O', undefined, 'no uncertainty printed'),
      D: mhz(5.17e-3, 'read', 'NIST_TRI_N2O'),
    },
  ],
  hazard:
    'nitrous oxide is an oxidiser and an anaesthetic; this service computes constants from data and certifies nothing about the safety of a gas',
};

const OCS: ReferenceSpecies = {
  formula: '16O-12C-32S',
  aliases: ['OCS', 'COS'],
  name: 'carbonyl sulfide (16O12C32S)',
  chain: ['16O', '12C', '32S'],
  modes: ['ν1 σ⁺ C–S stretch ≈ 859 cm⁻¹', 'ν2 π bend ≈ 520 cm⁻¹', 'ν3 σ⁺ C–O stretch ≈ 2062 cm⁻¹'],
  levels: [
    {
      v: [0, 0, 0],
      l: 0,
      name: 'ground state 00⁰0',
      databaseLabel: '0000',
      G: ZERO(NOTE_FIT),
      B: rv(
        0.2028567424,
        'derived',
        NOTE_FIT,
        3.8e-9,
        'NIST/Reinartz & Dymanus (read-secondary): 6081.492475 MHz = 0.2028567535',
      ),
      D: rv(4.341088657e-8, 'derived', NOTE_FIT, 7.6e-13, 'NIST/Reinartz (read-secondary): 1.301777 kHz = 4.34226e-8'),
      H: rv(-2.995842839e-15, 'derived', NOTE_FIT, 4.5e-17),
    },
    {
      v: [0, 1, 0],
      l: 1,
      name: 'ν2 bend 01¹0',
      databaseLabel: '0110',
      ...fromParitySeries(
        1,
        {
          G: 520.4221066,
          B: 0.2031038244,
          D: 4.404089114e-8,
          H: -2.997602166e-15,
          sG: 7.6e-6,
          sB: 1.4e-8,
          sD: 5.5e-12,
          sH: 5.8e-16,
        },
        {
          G: 520.4220957,
          B: 0.2033160376,
          D: 4.419307876e-8,
          H: -1.33226763e-15,
          sG: 7.2e-6,
          sB: 1.3e-8,
          sD: 5.2e-12,
          sH: 5.5e-16,
        },
        NOTE_FIT,
        'the note’s 0110 refits',
      ),
    },
    {
      v: [1, 0, 0],
      l: 0,
      name: 'ν1 C–S stretch 10⁰0',
      databaseLabel: '1000',
      G: rv(858.9669714, 'derived', NOTE_FIT, 7e-6),
      B: rv(0.2022518269, 'derived', NOTE_FIT, 1.5e-8),
      D: rv(4.43417588e-8, 'derived', NOTE_FIT, 7.3e-12),
      H: rv(1.276756478e-15, 'derived', NOTE_FIT, 9.3e-16),
    },
    {
      v: [0, 2, 0],
      l: 0,
      name: '2ν2 02⁰0',
      databaseLabel: '0200',
      G: rv(1047.042058, 'derived', NOTE_FIT, 1e-5),
      B: rv(0.2034803387, 'derived', NOTE_FIT, 3.1e-8),
      D: rv(3.643964959e-8, 'derived', NOTE_FIT, 2.2e-11),
      H: rv(1.298960939e-14, 'derived', NOTE_FIT, 4.1e-15),
    },
    {
      v: [0, 0, 1],
      l: 0,
      name: 'ν3 C–O stretch 00⁰1',
      databaseLabel: '0001',
      G: rv(2062.2, 'recalled', 'RECALL', undefined, 'approximate; CCCBDB (read) lists 2062'),
      B: rv(0.2022, 'recalled', 'RECALL', undefined, 'B0 − α3 with α3 ≈ 7e-4 recalled; low confidence'),
      D: rv(4.34e-8, 'recalled', 'RECALL', undefined, 'taken equal to D0; low confidence'),
    },
  ],
  hazard:
    'carbonyl sulfide is toxic; this service computes constants from data and certifies nothing about the safety of a gas',
};

const HCN_HAZARD =
  'HCN is acutely toxic; this service computes constants from data and certifies nothing about the safety of a gas: follow local codes, safety data sheets and licensed practice';

const HCN: ReferenceSpecies = {
  formula: '1H-12C-14N',
  aliases: ['HCN'],
  name: 'hydrogen cyanide (H12C14N)',
  chain: ['1H', '12C', '14N'],
  modes: ['ν1 σ⁺ C–H stretch ≈ 3311 cm⁻¹', 'ν2 π bend ≈ 712 cm⁻¹', 'ν3 σ⁺ C–N stretch ≈ 2097 cm⁻¹'],
  levels: [
    {
      v: [0, 0, 0],
      l: 0,
      name: 'ground state 00⁰0',
      databaseLabel: '0000',
      G: ZERO(NOTE_FIT),
      B: rv(1.478221814, 'derived', NOTE_FIT, 1.3e-8, 'CDMS (read-secondary): 44315.976 MHz = 1.4782218'),
      D: rv(2.909254459e-6, 'derived', NOTE_FIT, 1.3e-11),
      H: rv(2.898393156e-12, 'derived', NOTE_FIT, 4.5e-15),
    },
    {
      v: [0, 1, 0],
      l: 1,
      name: 'ν2 bend 01¹0',
      databaseLabel: '0110',
      ...fromParitySeries(
        1,
        {
          G: 711.9795491,
          B: 1.478034789,
          D: 2.931952336e-6,
          H: 2.737587934e-12,
          sG: 7.6e-5,
          sB: 2.5e-7,
          sD: 1.9e-10,
          sH: 3.8e-14,
        },
        {
          G: 711.9795591,
          B: 1.485522349,
          D: 3.020421432e-6,
          H: 4.028555267e-12,
          sG: 7.5e-5,
          sB: 2.5e-7,
          sD: 1.9e-10,
          sH: 3.7e-14,
        },
        NOTE_FIT,
        'the note’s 0110 refits (the HITRAN Q(1) l-type line gives q = 0.0074875)',
      ),
    },
    {
      v: [0, 0, 1],
      l: 0,
      name: 'ν3 C–N stretch 00⁰1',
      databaseLabel: '0001',
      G: rv(2096.845578, 'derived', NOTE_FIT, 1.9e-5, 'CDMS (read): 2096.8'),
      B: rv(1.468142818, 'derived', NOTE_FIT, 7.2e-8),
      D: rv(2.916554402e-6, 'derived', NOTE_FIT, 6.3e-11),
      H: rv(3.13904458e-12, 'derived', NOTE_FIT, 1.4e-14),
    },
    {
      v: [1, 0, 0],
      l: 0,
      name: 'ν1 C–H stretch 10⁰0',
      databaseLabel: '1000',
      G: rv(3311.477097, 'derived', NOTE_FIT, 1e-5, 'CDMS (read): 3311.48'),
      B: rv(1.467798366, 'derived', NOTE_FIT, 5.6e-8),
      D: rv(2.885310761e-6, 'derived', NOTE_FIT, 6.9e-11),
      H: rv(3.354649891e-12, 'derived', NOTE_FIT, 2.3e-14),
    },
  ],
  hazard: HCN_HAZARD,
};

const H13CN: ReferenceSpecies = {
  formula: '1H-13C-14N',
  aliases: ['H13CN'],
  name: 'hydrogen cyanide (H13C14N), the gas of the SRM 2519a 1.5 µm wavelength standard',
  chain: ['1H', '13C', '14N'],
  modes: HCN.modes,
  levels: [
    {
      v: [0, 0, 0],
      l: 0,
      name: 'ground state 00⁰0',
      databaseLabel: '0000',
      G: ZERO(NOTE_FIT),
      B: rv(1.440000474, 'derived', NOTE_FIT, 1.3e-8),
      D: rv(2.768253963e-6, 'derived', NOTE_FIT, 1.5e-11),
      H: rv(2.619186209e-12, 'derived', NOTE_FIT, 5.4e-15),
    },
    {
      v: [0, 1, 0],
      l: 1,
      name: 'ν2 bend 01¹0',
      databaseLabel: '0110',
      ...fromParitySeries(
        1,
        {
          G: 705.965735,
          B: 1.439579803,
          D: 2.787478859e-6,
          H: 2.897904139e-12,
          sG: 1.2e-5,
          sB: 1.6e-7,
          sD: 4.9e-10,
          sH: 3.9e-13,
        },
        {
          G: 705.9657293,
          B: 1.44674593,
          D: 2.868495448e-6,
          H: 4.129585562e-12,
          sG: 8.9e-6,
          sB: 1.2e-7,
          sD: 4e-10,
          sH: 3.4e-13,
        },
        NOTE_FIT,
        'the note’s 0110 refits',
      ),
    },
    {
      v: [2, 0, 0],
      l: 0,
      name: '2ν1 C–H stretch overtone 20⁰0 (called "2ν3" in NIST SRM 2519a documents)',
      databaseLabel: '2000',
      G: rv(
        6483.282356,
        'derived',
        NOTE_FIT,
        3.2e-4,
        'fit of the 54 SRM 2519a centres, ground state fixed; rms 1.2e-3 cm-1',
      ),
      B: rv(1.420455139, 'derived', NOTE_FIT, 2.6e-6),
      D: rv(2.722106694e-6, 'derived', NOTE_FIT, 3.8e-9),
    },
  ],
  hazard: HCN_HAZARD,
};

const C2H2: ReferenceSpecies = {
  formula: '1H-12C-12C-1H',
  aliases: ['C2H2', 'HCCH'],
  name: 'acetylene (12C2H2)',
  chain: ['1H', '12C', '12C', '1H'],
  modes: [
    'ν1 σg⁺ symmetric C–H stretch (Raman) ≈ 3373 cm⁻¹',
    'ν2 σg⁺ C≡C stretch (Raman) ≈ 1974 cm⁻¹',
    'ν3 σu⁺ antisymmetric C–H stretch ≈ 3295 cm⁻¹',
    'ν4 πg trans bend (Raman) ≈ 613 cm⁻¹',
    'ν5 πu cis bend ≈ 730 cm⁻¹',
  ],
  levels: [
    {
      v: [0, 0, 0, 0, 0],
      l: 0,
      name: 'ground state',
      databaseLabel: '0000000',
      G: ZERO('RECALL'),
      B: rv(
        1.1766462,
        'recalled',
        'RECALL',
        undefined,
        'recalled; corroborated by a free fit of the 27 stored SRM 2517a centres (this library): 1.176652(6)',
      ),
      D: rv(1.627e-6, 'recalled', 'RECALL', undefined, 'recalled; the same free fit gives 1.646(33)e-6'),
      note: 'odd J weight 3 (ortho), even J weight 1 (para)',
    },
    {
      v: [0, 0, 1, 0, 0],
      l: 0,
      name: 'ν3 antisymmetric C–H stretch (Σu⁺)',
      databaseLabel: '0010000',
      G: rv(3294.84, 'recalled', 'RECALL', undefined, 'approximate; Fermi resonance with ν2+ν4+ν5 near 3282 cm-1'),
      B: rv(1.17085, 'recalled', 'RECALL', undefined, 'low confidence (B0 − α3, α3 ≈ 5.8e-3 recalled)'),
      D: rv(1.62e-6, 'recalled', 'RECALL', undefined, 'taken ≈ D0; low confidence'),
      note: 'an unperturbed model of a Fermi-perturbed level: expect residuals of the order of 0.01 cm-1 at high J',
    },
    {
      v: [1, 0, 1, 0, 0],
      l: 0,
      name: 'ν1+ν3 (Σu⁺), the 1.5 µm wavelength-standard band (SRM 2517a)',
      databaseLabel: '1010000',
      G: rv(
        6556.46432,
        'derived',
        'THIS_LIBRARY+SRM2517A',
        5e-5,
        'fit of 27 SRM 2517a centres (P(3)–P(27), R(1), R(7); vacuum nm → cm-1) with the recalled ground state fixed; rms 1.2e-4 cm-1',
      ),
      B: rv(1.16377707, 'derived', 'THIS_LIBRARY+SRM2517A', 4.1e-7, 'same fit'),
      D: rv(1.60656e-6, 'derived', 'THIS_LIBRARY+SRM2517A', 6.2e-10, 'same fit'),
      note: 'the SRM centres are for the 6.7 kPa cell (pressure shift ≈ −0.015 pm/kPa included)',
    },
  ],
  otherModes: [
    { mode: 'ν1', centre: rv(3372.8, 'recalled', 'RECALL') },
    { mode: 'ν2', centre: rv(1974.3, 'recalled', 'RECALL') },
    { mode: 'ν4', centre: rv(612.9, 'recalled', 'RECALL') },
    { mode: 'ν5', centre: rv(730.3, 'recalled', 'RECALL') },
  ],
  hazard:
    'acetylene is extremely flammable; this service computes constants from data and certifies nothing about the safety of a gas',
};

/** The library, most abundant isotopologue of each molecule first. */
export const LINEAR_REFERENCE: readonly ReferenceSpecies[] = [CO2_626, CO2_636, CO2_628, N2O, OCS, HCN, H13CN, C2H2];

/** A species of the library by hyphenated formula or by alias ("CO2", "HCN"), or undefined. */
export function linearReference(name: string): ReferenceSpecies | undefined {
  return LINEAR_REFERENCE.find((s) => s.formula === name || s.aliases.includes(name));
}

/** A level of a species by its quanta and l, or by its database label. */
export function referenceLevel(species: ReferenceSpecies, level: LinearLevel | string): ReferenceLevel | undefined {
  if (typeof level === 'string') return species.levels.find((l) => l.databaseLabel === level);
  const key = levelKey(level);
  return species.levels.find((l) => levelKey(l) === key);
}

/** The constants of a level in the form terms.ts evaluates. */
export function referenceConstants(level: ReferenceLevel): LinearLevelConstants {
  return {
    G: level.G.value,
    B: level.B.value,
    D: level.D.value,
    ...(level.H ? { H: level.H.value } : {}),
    ...(level.q && level.l >= 1 ? { q: level.q.value } : {}),
    ...(level.qJ && level.l >= 1 ? { qJ: level.qJ.value } : {}),
  };
}

export interface ReferenceBand {
  readonly upper: ReferenceLevel;
  readonly lower: ReferenceLevel;
  /** parallel: Δl = 0; perpendicular: Δl = ±1. */
  readonly kind: 'parallel' | 'perpendicular';
  readonly name: string;
}

/**
 * The infrared bands worth predicting for a species: every level from the ground level with |Δl| ≤ 1 and, for
 * centrosymmetric chains, g → u only (the dipole changes sign under inversion), plus the species' extra bands.
 */
export function referenceBands(species: ReferenceSpecies): ReferenceBand[] {
  const stats = exchangeStatistics(species.chain);
  const uModes = stats.kind === 'exchange' ? stats.uModes : [];
  const ground = species.levels[0] as ReferenceLevel;
  const allowed = (up: ReferenceLevel, lo: ReferenceLevel) =>
    Math.abs(up.l - lo.l) <= 1 && (stats.kind === 'none' || isGerade(up, uModes) !== isGerade(lo, uModes));
  const bands: ReferenceBand[] = [];
  for (const up of species.levels.slice(1)) {
    if (allowed(up, ground)) {
      bands.push({ upper: up, lower: ground, kind: up.l === ground.l ? 'parallel' : 'perpendicular', name: up.name });
    }
  }
  for (const x of species.extraBands ?? []) {
    const up = referenceLevel(species, x.upper);
    const lo = referenceLevel(species, x.lower);
    if (up && lo && allowed(up, lo)) {
      bands.push({ upper: up, lower: lo, kind: up.l === lo.l ? 'parallel' : 'perpendicular', name: x.name });
    }
  }
  return bands;
}

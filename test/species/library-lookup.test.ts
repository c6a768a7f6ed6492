import { describe, expect, it } from 'vitest';
import { ScienceError } from '../../src/errors.js';
import { constantsFor, dunhamFromEntry, libraryEntries, libraryEntry } from '../../src/species/library.js';
import { elementsOnly, formatFormula, isotopologuesOf, parseSpecies } from '../../src/species/parse.js';

// Looking up the reference library and deriving isotopologue constants by mass scaling, checked against reduced
// masses computed here from AME2020 atomic masses (REFERENCE-DATA.md §2a: 12C 12 exactly, 13C 13.003354835336,
// 16O 15.994914619257, 18O 17.999159612136, 1H 1.007825031898, 2H 2.014101777844, 35Cl 34.968852694,
// 37Cl 36.965902573 u) and the Huber & Herzberg (1979) values the library holds for the parent. First-order
// Born–Oppenheimer scaling: ω_e ∝ ρ, ω_e x_e ∝ ρ², ω_e y_e ∝ ρ³, B_e ∝ ρ², α_e ∝ ρ³, D_e ∝ ρ⁴, r_e unchanged,
// ρ = √(μ_parent/μ) (Herzberg, Spectra of Diatomic Molecules, ch. III §2, from memory). Tolerance 1e-12 relative.
const AME: Record<string, number> = {
  '12C': 12,
  '13C': 13.003354835336,
  '16O': 15.994914619257,
  '18O': 17.999159612136,
  '1H': 1.007825031898,
  '2H': 2.014101777844,
  '35Cl': 34.968852694,
  '37Cl': 36.965902573,
};
const mu = (a: string, b: string) =>
  ((AME[a] as number) * (AME[b] as number)) / ((AME[a] as number) + (AME[b] as number));
const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('library lookup and mass scaling', () => {
  it('13C18O is not tabulated: its constants are scaled from 12C16O with ρ from AME2020 masses', () => {
    const e = constantsFor(parseSpecies('13C18O'));
    expect(e).toBeDefined();
    const entry = e as NonNullable<typeof e>;
    const rho = Math.sqrt(mu('12C', '16O') / mu('13C', '18O'));
    const co = libraryEntry('CO');
    expect(co?.formula).toBe('12C-16O');
    const parent = co?.constants ?? {};
    const powers = { omega_e: 1, omega_e_x_e: 2, omega_e_y_e: 3, B_e: 2, alpha_e: 3, D_e: 4, r_e: 0 } as const;
    expect(Object.keys(entry.constants).sort()).toEqual(Object.keys(powers).sort());
    for (const [name, power] of Object.entries(powers) as [keyof typeof powers, number][]) {
      const p = parent[name];
      const c = entry.constants[name];
      expect(rel(c?.value ?? 0, (p?.value ?? Number.NaN) * rho ** power), name).toBeLessThan(1e-12);
      expect(c?.unit).toBe(p?.unit);
      expect(c?.provenance).toBe('derived');
      expect(c?.source).toBe(
        `derived here from 12C-16O by Born–Oppenheimer mass scaling (ρ = ${rho.toFixed(9)}); parent value: ${p?.source}`,
      );
    }
    // ρ by hand (Python, 40-digit decimals, from the AME2020 masses above): 0.95298628563…
    expect(rho.toFixed(9)).toBe('0.952986286');
    expect(entry.formula).toBe('13C-18O');
    expect(entry.derivedFrom).toBe('12C-16O');
    expect(entry.name).toBe('carbon monoxide');
    expect(entry.state).toBe('X 1Σ+');
    expect(entry.hazard).toBe('carbon monoxide is toxic');
  });

  it('D37Cl is scaled from D35Cl (the entry sharing its 2H, not H35Cl: a smaller mass change, less Born–Oppenheimer breakdown ignored)', () => {
    const e = constantsFor(parseSpecies('D37Cl'));
    const dcl = libraryEntry('D35Cl');
    expect(e?.derivedFrom).toBe('2H-35Cl');
    const rho = Math.sqrt(mu('2H', '35Cl') / mu('2H', '37Cl'));
    expect(rel(e?.constants.B_e?.value ?? 0, (dcl?.constants.B_e?.value ?? 0) * rho ** 2)).toBeLessThan(1e-12);
    expect(rel(e?.constants.omega_e?.value ?? 0, (dcl?.constants.omega_e?.value ?? 0) * rho)).toBeLessThan(1e-12);
    expect(e?.hazard).toBe(dcl?.hazard);
  });

  it('T37Cl shares no isotope with an entry: scaled from H35Cl, the most abundant isotopologue, keeping its notes', () => {
    const e = constantsFor(parseSpecies('T37Cl'));
    const hcl = libraryEntry('H35Cl');
    expect(e?.derivedFrom).toBe('1H-35Cl');
    // 3H: AME2020 3.01604928132 u, from memory.
    const mT37 = (3.01604928132 * (AME['37Cl'] as number)) / (3.01604928132 + (AME['37Cl'] as number));
    const rho = Math.sqrt(mu('1H', '35Cl') / mT37);
    expect(rel(e?.constants.B_e?.value ?? 0, (hcl?.constants.B_e?.value ?? 0) * rho ** 2)).toBeLessThan(1e-9);
    expect(rel(e?.constants.omega_e_z_e?.value ?? 0, (hcl?.constants.omega_e_z_e?.value ?? 0) * rho ** 4)).toBeLessThan(
      1e-9,
    );
    expect(e?.constants.omega_e_z_e?.note).toBe(hcl?.constants.omega_e_z_e?.note);
    expect(e?.constants.omega_e_z_e?.note).toMatch(/G\(1\) − G\(0\)/);
    expect(e?.constants.B_e).not.toHaveProperty('note');
    expect(e?.hazard).toBe('hydrogen chloride is corrosive and toxic');
  });

  it('tabulated entries are returned as they are, by string or by parsed species; H37Cl is a stored derived entry', () => {
    const byString = libraryEntry('HCl');
    expect(byString).toBe(libraryEntry(parseSpecies('H35Cl')));
    expect(constantsFor(parseSpecies('HCl'))).toBe(byString);
    expect(byString?.derivedFrom).toBeUndefined();
    const h37 = libraryEntry('H37Cl');
    expect(h37?.derivedFrom).toBe('1H-35Cl');
    const rho = Math.sqrt(mu('1H', '35Cl') / mu('1H', '37Cl'));
    expect(rel(h37?.constants.B_e?.value ?? 0, (byString?.constants.B_e?.value ?? 0) * rho ** 2)).toBeLessThan(1e-12);
    expect(libraryEntries().map((e) => e.formula)).toEqual(
      expect.arrayContaining(['12C-16O', '13C-16O', '12C-18O', '1H-35Cl', '1H-37Cl', '1H-81Br', '2H-19F']),
    );
  });

  it('molecules whose elements the library does not hold, or holds in the other order, have no entry', () => {
    expect(libraryEntry('NaCl')).toBeUndefined();
    expect(constantsFor(parseSpecies('NaCl'))).toBeUndefined();
    // H first, O second: HCl shares the H and CO the O, but no entry has both in this order.
    expect(constantsFor(parseSpecies('HO'))).toBeUndefined();
    expect(constantsFor(parseSpecies('OC'))).toBeUndefined();
  });

  it('Dunham coefficients from customary constants: Y10 = ω_e, Y20 = −ω_e x_e, Y01 = B_e, Y11 = −α_e, Y02 = −D_e', () => {
    // 1H-35Cl as held (Huber & Herzberg 1979; ω_e y_e and ω_e z_e recalled).
    const y = dunhamFromEntry(libraryEntry('H35Cl') as NonNullable<ReturnType<typeof libraryEntry>>);
    expect(Object.fromEntries(y)).toEqual({
      '1,0': 2990.9463,
      '2,0': -52.8186,
      '3,0': 0.2243,
      '4,0': -0.0122,
      '0,1': 10.593416,
      '1,1': -0.307181,
      '0,2': -5.3194e-4,
    });
    const co = dunhamFromEntry(libraryEntry('CO') as NonNullable<ReturnType<typeof libraryEntry>>);
    expect([...co.keys()].sort()).toEqual(['0,1', '0,2', '1,0', '1,1', '2,0', '3,0']);
  });
});

describe('species strings: what is written and what is said when refused', () => {
  it('records which isotopes were named: H35Cl names Cl only, D names ²H, elementsOnly names none', () => {
    const s = parseSpecies('H35Cl');
    expect(s.atoms.map((a) => a.explicitIsotope)).toEqual([false, true]);
    expect(parseSpecies('DCl').atoms.map((a) => [a.isotope.massNumber, a.explicitIsotope])).toEqual([
      [2, true],
      [35, false],
    ]);
    expect(parseSpecies('TCl').atoms[0].isotope.massNumber).toBe(3);
    const bare = elementsOnly(parseSpecies('13C-18O'));
    expect(bare.formula).toBe('13C-18O');
    expect(bare.atoms.map((a) => [a.isotope.massNumber, a.explicitIsotope])).toEqual([
      [13, false],
      [18, false],
    ]);
    expect(formatFormula(parseSpecies('2H35Cl').atoms)).toBe('2H-35Cl');
    expect(isotopologuesOf(parseSpecies('CO')).map((i) => i.formula)).toEqual([
      '12C-16O',
      '12C-17O',
      '12C-18O',
      '13C-16O',
      '13C-17O',
      '13C-18O',
    ]);
    expect(isotopologuesOf(parseSpecies('CO')).every((i) => i.atoms.every((a) => a.explicitIsotope))).toBe(true);
  });

  it('spaces around the string are ignored; a mass number may be repeated on D and T; one leading hyphen at most', () => {
    expect(parseSpecies('  CO\t').formula).toBe('12C-16O');
    expect(parseSpecies('2D35Cl').formula).toBe('2H-35Cl');
    expect(parseSpecies('3T-1H').formula).toBe('3H-1H');
    expect(parseSpecies('13C-16O').formula).toBe('13C-16O');
    expect(() => parseSpecies('--CO')).toThrow('species "--CO" cannot be read at "--CO"');
  });

  it('the case hint reads the letters only: "H-CL" is one-case', () => {
    expect(() => parseSpecies('H-CL')).toThrow(
      'element "L" in "H-CL" is not in the mass table (element symbols are case-sensitive: write "NaCl", "SiO", "CS", not "NACL")',
    );
  });

  it('a 40-character string is read (and here refused as not diatomic); 41 characters are too long', () => {
    const code = (s: string) => {
      try {
        parseSpecies(s);
        return 'accepted';
      } catch (e) {
        return (e as ScienceError).code;
      }
    };
    expect(code('H'.repeat(40))).toBe('SPECIES_NOT_DIATOMIC');
    expect(code('H'.repeat(41))).toBe('SPECIES_INVALID');
    expect(() => parseSpecies('H'.repeat(41))).toThrow(`species "${'H'.repeat(40)}" is empty or too long`);
    try {
      parseSpecies('H'.repeat(45));
    } catch (e) {
      expect((e as ScienceError).details).toEqual({ species: 'H'.repeat(40) });
    }
    expect(code('   ')).toBe('SPECIES_INVALID');
  });

  it.each([
    ['', 'SPECIES_INVALID', 'species "" is empty or too long', { species: '' }],
    [
      'Co$O',
      'SPECIES_INVALID',
      'species "Co$O" cannot be read at "$O": expected an element symbol, optionally preceded by a mass number',
      { species: 'Co$O', at: '$O' },
    ],
    [
      'co',
      'SPECIES_INVALID',
      'species "co" cannot be read at "co": expected an element symbol, optionally preceded by a mass number (element symbols are case-sensitive: write "NaCl", "SiO", "CS", not "NACL")',
      { species: 'co', at: 'co' },
    ],
    ['3D35Cl', 'SPECIES_INVALID', '"3D" in "3D35Cl" contradicts itself', { species: '3D35Cl', atom: '3D' }],
    ['2T35Cl', 'SPECIES_INVALID', '"2T" in "2T35Cl" contradicts itself', { species: '2T35Cl', atom: '2T' }],
    [
      'H36Cl',
      'SPECIES_UNKNOWN_ISOTOPE',
      'isotope 36Cl in "H36Cl" is not in the mass table (known: 35Cl, 37Cl)',
      { species: 'H36Cl', isotope: '36Cl' },
    ],
    [
      'HHCl',
      'SPECIES_NOT_DIATOMIC',
      'species "HHCl" has 3 atom(s); only diatomic molecules are supported',
      { species: 'HHCl', atoms: 3 },
    ],
  ] as const)('%j is refused with %s: %s', (input, code, message, details) => {
    try {
      parseSpecies(input);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ScienceError);
      expect((e as ScienceError).code).toBe(code);
      expect((e as Error).message).toBe(message);
      expect((e as ScienceError).details).toEqual(details);
    }
  });

  it('an unknown element names itself, the known symbols, and the case hint only for one-case input', () => {
    for (const [input, hint] of [
      ['XxO', false],
      ['NACL', true],
      ['Q', false],
    ] as const) {
      try {
        parseSpecies(input);
        expect.unreachable();
      } catch (e) {
        const err = e as ScienceError;
        expect(err.code).toBe('SPECIES_UNKNOWN_ELEMENT');
        const symbol = input === 'NACL' ? 'A' : input === 'Q' ? 'Q' : 'Xx';
        expect(err.message).toBe(
          `element "${symbol}" in "${input}" is not in the mass table${hint ? ' (element symbols are case-sensitive: write "NaCl", "SiO", "CS", not "NACL")' : ''}`,
        );
        expect(err.details.species).toBe(input);
        expect(err.details.element).toBe(symbol);
        expect(err.details.known).toEqual(expect.arrayContaining(['H', 'C', 'O', 'Cl', 'Na']));
      }
    }
  });
});

#!/usr/bin/env node
/**
 * Generates src/constants/nuclides.generated.ts from two data files kept beside this script:
 *   scripts/nuclide-data/ame2020-mass-excerpt.txt  verbatim lines of the AME2020 table mass_1.mas20 (the mass column is
 *   printed as its integer part in u, a blank, then micro-u)
 *   scripts/nuclide-data/ciaaw-ice-2013.txt        CIAAW 2013 isotopic compositions (Meija et al. 2016, Table 1)
 * Every AME line is checked against itself (the atomic mass column must equal A + mass excess / (931 494.102 42 keV/u)
 * to the digits printed), every composition against the element it names, and each element's amount fractions must
 * sum to 1 within their uncertainties. Run: node scripts/generate-nuclides.mjs [--check]
 * With --check it only verifies that the generated file is current (exit 1 otherwise).
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..');
const OUT = join(root, 'src/constants/nuclides.generated.ts');

/** 1 u in keV, as used by AME2020 (Wang et al. 2021, Table I). */
const KEV_PER_U = 931494.10242;

const SYMBOLS =
  `H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se Br Kr Rb Sr Y Zr
Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy Ho Er Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl
Pb Bi Po At Rn Fr Ra Ac Th Pa U`.split(/\s+/);
const NAMES =
  `hydrogen helium lithium beryllium boron carbon nitrogen oxygen fluorine neon sodium magnesium aluminium silicon
phosphorus sulfur chlorine argon potassium calcium scandium titanium vanadium chromium manganese iron cobalt nickel copper
zinc gallium germanium arsenic selenium bromine krypton rubidium strontium yttrium zirconium niobium molybdenum technetium
ruthenium rhodium palladium silver cadmium indium tin antimony tellurium iodine xenon caesium barium lanthanum cerium
praseodymium neodymium promethium samarium europium gadolinium terbium dysprosium holmium erbium thulium ytterbium lutetium
hafnium tantalum tungsten rhenium osmium iridium platinum gold mercury thallium lead bismuth polonium astatine radon
francium radium actinium thorium protactinium uranium`.split(/\s+/);
if (SYMBOLS.length !== 92 || NAMES.length !== 92) throw new Error('element list must hold Z = 1..92');
const zOf = new Map(SYMBOLS.map((s, i) => [s, i + 1]));

/**
 * Slips of the machine-readable copy of CIAAW 2013 Table 1 corrected here, each with its reason. The value digits are
 * left alone; only labels and uncertainties whose printed digits contradict the value they go with are fixed.
 */
const ERRATA = [
  { symbol: 'Ru', field: 'z', from: 42, to: 44, why: 'ruthenium is Z = 44 (the copy repeats Z of Mo)' },
  { symbol: 'Pd', a: 106, field: 'u', from: 2e-6, to: 2e-4, why: 'value printed to 1e-4; Table 1 gives 0.2733(2)' },
  { symbol: 'Pd', a: 108, field: 'u', from: 6e-6, to: 6e-4, why: 'value printed to 1e-4; Table 1 gives 0.2646(6)' },
  { symbol: 'Pd', a: 110, field: 'u', from: 6e-6, to: 6e-4, why: 'value printed to 1e-4; Table 1 gives 0.1172(6)' },
  { symbol: 'Hf', a: 174, field: 'u', from: 9e-5, to: 9e-6, why: 'value printed to 1e-6; Table 1 gives 0.001620(9)' },
];

/** A decimal literal as the formatter prints it: trailing zeros dropped, one digit kept after the point. */
function literal(text) {
  return text.replace(/(\.\d*?)0+$/, '$1').replace(/\.$/, '.0');
}

function decimals(text) {
  const t = text.replace('#', '');
  const i = t.indexOf('.');
  return i < 0 ? 0 : t.length - i - 1;
}

/** Parse one AMDC line by its blank-separated fields, reading the last three as A, micro-u and uncertainty. */
function parseAmeLine(line, lineNo) {
  const f = line.trim().split(/\s+/);
  const elIndex = f.findIndex((x, i) => i >= 3 && /^[A-Z][a-z]?$/.test(x));
  if (elIndex < 0) throw new Error(`AME line ${lineNo}: no element symbol`);
  const ints = f.slice(0, elIndex).map(Number);
  const [n, z, a] = ints.slice(-3);
  const symbol = f[elIndex];
  let k = elIndex + 1;
  if (!/^-?\d/.test(f[k] ?? '')) k++; // origin code such as "-n", "x", "+3n"
  const meText = f[k];
  const umeText = f[k + 1];
  const [aText, microText, umicroText] = f.slice(-3);
  if ([meText, umeText, microText, umicroText].some((x) => x.includes('#'))) {
    throw new Error(`AME line ${lineNo} (${a}${symbol}): estimated (#) value where a measured one is expected`);
  }
  const me = Number(meText);
  const ume = Number(umeText);
  const micro = Number(microText);
  const umicro = Number(umicroText);
  if (![n, z, a, me, ume, micro, umicro, Number(aText)].every(Number.isFinite)) {
    throw new Error(`AME line ${lineNo}: unreadable number in "${line}"`);
  }
  if (n + z !== a || Math.abs(Number(aText) + micro * 1e-6 - a) > 0.5) {
    throw new Error(`AME line ${lineNo}: N + Z != A or the atomic mass is not near A`);
  }
  if (zOf.get(symbol) !== z) throw new Error(`AME line ${lineNo}: ${symbol} is not Z = ${z}`);
  const mass = Number(aText) + micro * 1e-6;
  const uncertainty = umicro * 1e-6;
  // Self-consistency: mass excess and atomic mass are two printings of one number.
  const fromExcess = a + me / KEV_PER_U;
  const tol = 10 ** -decimals(microText) * 1e-6 + (10 ** -decimals(meText) / KEV_PER_U) * 0.6 + 1e-13;
  if (Math.abs(fromExcess - mass) > tol) {
    throw new Error(`AME line ${lineNo} (${a}${symbol}): mass ${mass} disagrees with mass excess (${fromExcess})`);
  }
  const uFromExcess = ume / KEV_PER_U;
  if (Math.abs(uFromExcess - uncertainty) > 10 ** -decimals(umicroText) * 1e-6 + 0.02 * uncertainty) {
    throw new Error(`AME line ${lineNo} (${a}${symbol}): uncertainty ${uncertainty} disagrees with ${uFromExcess}`);
  }
  return { z, a, symbol, mass, uncertainty, massText: literal(`${aText}.${microText.replace('.', '')}`) };
}

function readAme() {
  const lines = readFileSync(join(here, 'nuclide-data/ame2020-mass-excerpt.txt'), 'utf8').split('\n');
  const out = new Map();
  lines.forEach((line, i) => {
    if (line.trim() === '' || line.startsWith('#')) return;
    const r = parseAmeLine(line, i + 1);
    const key = `${r.symbol}-${r.a}`;
    if (out.has(key)) throw new Error(`AME: ${key} twice`);
    out.set(key, r);
  });
  return out;
}

function readCompositions() {
  const lines = readFileSync(join(here, 'nuclide-data/ciaaw-ice-2013.txt'), 'utf8').split('\n');
  const out = [];
  lines.forEach((line, i) => {
    if (line.trim() === '' || line.startsWith('#')) return;
    const [zText, symbol, aText, valueText, uText] = line.trim().split(/\s+/);
    if (aText === 'nan') return; // element without a natural isotopic composition
    let z = Number(zText);
    let u = Number(uText);
    const a = Number(aText);
    const value = Number(valueText);
    for (const e of ERRATA) {
      if (e.symbol !== symbol || (e.a !== undefined && e.a !== a)) continue;
      if (e.field === 'z' && z === e.from) z = e.to;
      if (e.field === 'u' && u === e.from) u = e.to;
    }
    if (zOf.get(symbol) !== z) throw new Error(`composition line ${i + 1}: ${symbol} is not Z = ${z}`);
    if (![a, value, u].every(Number.isFinite) || value <= 0 || value > 1 || u < 0) {
      throw new Error(`composition line ${i + 1}: unreadable "${line}"`);
    }
    out.push({ z, symbol, a, value, u, valueText });
  });
  return out;
}

/** Long-lived nuclides without a natural composition that laboratories meet, and the longest-lived of Tc and Pm. */
const EXTRA = ['H-3', 'C-14', 'Tc-97', 'Tc-98', 'Tc-99', 'Pm-145', 'Pm-147', 'Po-209', 'Po-210', 'Rn-222', 'Ra-226'];

function build() {
  const ame = readAme();
  const comps = readCompositions();
  const byElement = new Map();
  for (const c of comps) {
    const m = ame.get(`${c.symbol}-${c.a}`);
    if (!m) throw new Error(`no AME2020 line for ${c.a}${c.symbol}`);
    if (!byElement.has(c.symbol)) byElement.set(c.symbol, []);
    byElement.get(c.symbol).push({ ...m, abundance: c.value, abundanceUncertainty: c.u });
  }
  for (const key of EXTRA) {
    const m = ame.get(key);
    if (!m) continue;
    if (!byElement.has(m.symbol)) byElement.set(m.symbol, []);
    byElement.get(m.symbol).push({ ...m, abundance: 0, abundanceUncertainty: 0 });
  }
  const used = new Set([...byElement.values()].flat().map((r) => `${r.symbol}-${r.a}`));
  const unused = [...ame.keys()].filter((k) => !used.has(k));
  if (unused.length > 0) throw new Error(`AME lines not used: ${unused.join(', ')}`);
  for (const [symbol, isotopes] of byElement) {
    isotopes.sort((p, q) => p.a - q.a);
    const natural = isotopes.filter((i) => i.abundance > 0);
    if (natural.length === 0) continue;
    const sum = natural.reduce((s, i) => s + i.abundance, 0);
    const allowed = natural.reduce((s, i) => s + i.abundanceUncertainty, 0) + 1e-12;
    if (Math.abs(sum - 1) > allowed) {
      throw new Error(`${symbol}: amount fractions sum to ${sum}, further from 1 than their uncertainties allow`);
    }
  }
  return [...byElement.entries()].sort((p, q) => zOf.get(p[0]) - zOf.get(q[0]));
}

function render(elements) {
  const nuclides = elements.reduce((n, [, isos]) => n + isos.length, 0);
  const lines = [
    '// GENERATED by scripts/generate-nuclides.mjs: do not edit by hand; edit the data files and run the script.',
    '//',
    '// Atomic masses: AME2020, M. Wang et al., Chinese Phys. C 45, 030003 (2021) and W.J. Huang et al., Chinese',
    '// Phys. C 45, 030002 (2021); lines of mass_1.mas20 kept in scripts/nuclide-data/ame2020-mass-excerpt.txt.',
    '// Isotopic compositions: CIAAW, "Isotopic compositions of the elements 2013", J. Meija et al., Pure Appl. Chem.',
    '// 88, 293 (2016), Table 1 (best measurement from a single terrestrial source, amount fraction, with its standard',
    '// uncertainty), kept in scripts/nuclide-data/ciaaw-ice-2013.txt. Abundance 0 marks a nuclide with no natural',
    '// composition (radioactive, listed because laboratories meet it).',
    `// ${elements.length} elements, ${nuclides} nuclides.`,
    '',
    '/** [Z, symbol, English name] of every element Z = 1..92. */',
    'export const ELEMENT_NAMES: readonly (readonly [number, string, string])[] = [',
    ...SYMBOLS.map((s, i) => `  [${i + 1}, '${s}', '${NAMES[i]}'],`),
    '];',
    '',
    '/** [Z, mass number, atomic mass (u), its standard uncertainty (u), amount fraction, its standard uncertainty]. */',
    'export type NuclideRow = readonly [number, number, number, number, number, number];',
    '',
    '/** Every nuclide of the table, in order of Z then mass number. */',
    'export const NUCLIDE_ROWS: readonly NuclideRow[] = [',
  ];
  for (const [symbol, isos] of elements) {
    const z = zOf.get(symbol);
    for (const i of isos) {
      const row = [z, i.a, i.massText, fmt(i.uncertainty), fmt(i.abundance), fmt(i.abundanceUncertainty)];
      lines.push(`  [${row.join(', ')}],`);
    }
  }
  lines.push('];', '');
  return lines.join('\n');
}

function fmt(x) {
  if (x === 0) return '0';
  return Number(x.toPrecision(12)).toString();
}

const text = render(build());
if (process.argv.includes('--check')) {
  const current = readFileSync(OUT, 'utf8');
  if (current !== text) {
    console.error('src/constants/nuclides.generated.ts is stale: run node scripts/generate-nuclides.mjs');
    process.exit(1);
  }
  console.log('nuclides.generated.ts is current');
} else {
  writeFileSync(OUT, text);
  console.log(`wrote ${OUT}`);
}

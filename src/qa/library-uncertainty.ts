import { type ConstantName, type LibraryEntry, type LibraryValue, libraryEntry } from '../species/library.js';
import { parseSpecies } from '../species/parse.js';

/**
 * Standard uncertainties of the library's constants, as Dunham keys ("k,l" → σ, cm⁻¹), for the calibration check.
 * The library quotes values, not uncertainties, so the rule is stated here:
 *
 * - a tabulated value (published or recalled): LAST_DIGIT_UNITS units in its last quoted digit, at most the value
 *   itself. Half a unit (common practice for tabulated constants) is far too little for this library: its Huber &
 *   Herzberg constants come from fits to 1970s data, and against the HITRAN2020 ¹²C¹⁶O positions (shared fixture,
 *   lines with J″ ≤ 20 of 0-0, 1-0, 2-0, 3-0, 2-1 at their database σ) the calibration offset of a list with no
 *   offset came out −3.2e-4 ± 4.8e-7 cm⁻¹ with the constants taken as exact (a pull of 660), 5.0e-5 ± 1.5e-5 with
 *   half a unit (3.4), −3.6e-4 ± 1.0e-4 with 10 units (3.4), −3.9e-4 ± 3.0e-4 with 30 units (1.3); B_v of
 *   v = 0–3 from the library's B_e and α_e differ from the published ones by 1e-7 (ten units of the last digit)
 *   beyond what γ_e explains;
 * - a value derived by Born–Oppenheimer mass scaling: the parent's σ scaled as the value was, and, in quadrature,
 *   the Born–Oppenheimer breakdown the scaling ignores, |Δ| m_e Σ_atoms |1/M − 1/M_parent| of the value, |Δ| =
 *   BOB_DELTA (Watson's Δ_kl; the library's own HCl and DCl constants imply Δ ≈ 0.17 for B_e and 0.1 for ω_e).
 */
export function libraryUncertainties(entry: LibraryEntry): Map<string, number> {
  const parent = entry.derivedFrom ? libraryEntry(entry.derivedFrom) : undefined;
  const bob = parent ? BOB_DELTA * bornOppenheimerRelative(entry.formula, parent.formula) : 0;
  const out = new Map<string, number>();
  for (const [name, key] of Object.entries(DUNHAM_KEY) as [ConstantName, string][]) {
    const c = entry.constants[name];
    if (!c) continue;
    const p = parent?.constants[name];
    const scaled = p ? ownSigma(p) * Math.abs(c.value / p.value) : ownSigma(c);
    out.set(key, Math.hypot(scaled, bob * Math.abs(c.value)));
  }
  return out;
}

/** Units in the last quoted digit taken as the σ of a tabulated value (see libraryUncertainties). */
export const LAST_DIGIT_UNITS = 30;
/** |Δ_kl| of the Born–Oppenheimer breakdown (see libraryUncertainties): three times the largest the HCl/DCl pair implies. */
export const BOB_DELTA = 0.5;
/** Electron mass in u (CODATA 2018: 5.48579909065e-4 u). */
const ELECTRON_MASS_U = 5.48579909065e-4;

const DUNHAM_KEY: Partial<Record<ConstantName, string>> = {
  omega_e: '1,0',
  omega_e_x_e: '2,0',
  omega_e_y_e: '3,0',
  omega_e_z_e: '4,0',
  B_e: '0,1',
  alpha_e: '1,1',
  D_e: '0,2',
};

/** Half a unit in the last digit of the value as written (the shortest decimal that gives it back). */
export function halfLastDigit(x: number): number {
  const [mantissa, exponent] = Math.abs(x).toExponential().split('e') as [string, string];
  const decimals = (mantissa.split('.')[1] ?? '').length;
  return 0.5 * 10 ** (Number(exponent) - decimals);
}

function ownSigma(c: LibraryValue): number {
  return Math.min(2 * LAST_DIGIT_UNITS * halfLastDigit(c.value), Math.abs(c.value));
}

/** m_e Σ |1/M − 1/M_parent| over the two atoms (u⁻¹ · u): the relative size of the breakdown terms' change. */
function bornOppenheimerRelative(formula: string, parentFormula: string): number {
  const a = parseSpecies(formula).atoms;
  const b = parseSpecies(parentFormula).atoms;
  return (
    ELECTRON_MASS_U *
    (Math.abs(1 / a[0].isotope.mass - 1 / b[0].isotope.mass) + Math.abs(1 / a[1].isotope.mass - 1 / b[1].isotope.mass))
  );
}

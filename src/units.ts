import { MHZ_PER_WAVENUMBER } from './constants/codata-2018.js';
import { ScienceError } from './errors.js';

/** Units a line position may come in. Wavelengths are vacuum wavelengths. */
export const POSITION_UNITS = ['cm-1', 'MHz', 'GHz', 'THz', 'um', 'nm'] as const;
export type PositionUnit = (typeof POSITION_UNITS)[number];

export interface Converted {
  readonly value: number;
  readonly uncertainty?: number;
}

/**
 * Convert a position (and its standard uncertainty) to wavenumber in cm⁻¹. Frequencies scale by c exactly
 * (1 cm⁻¹ = 29 979.2458 MHz); vacuum wavelengths invert, ν̃ = 10⁴/λ[µm], with σ_ν̃ = ν̃ σ_λ/λ to first order.
 */
export function toWavenumber(value: number, unit: PositionUnit, uncertainty?: number): Converted {
  if (!(value > 0) || !Number.isFinite(value)) {
    throw new ScienceError('INPUT_INVALID', `position ${value} ${unit} must be a positive finite number`, { value });
  }
  let factor: number;
  switch (unit) {
    case 'cm-1':
      return { value, ...(uncertainty !== undefined ? { uncertainty } : {}) };
    case 'MHz':
      factor = 1 / MHZ_PER_WAVENUMBER;
      break;
    case 'GHz':
      factor = 1e3 / MHZ_PER_WAVENUMBER;
      break;
    case 'THz':
      factor = 1e6 / MHZ_PER_WAVENUMBER;
      break;
    case 'um':
    case 'nm': {
      const k = unit === 'um' ? 1e4 : 1e7;
      const nu = k / value;
      return { value: nu, ...(uncertainty !== undefined ? { uncertainty: (nu * uncertainty) / value } : {}) };
    }
    default:
      throw new ScienceError('UNIT_INVALID', `unit "${String(unit)}" is not one of ${POSITION_UNITS.join(', ')}`, {
        unit,
      });
  }
  return { value: value * factor, ...(uncertainty !== undefined ? { uncertainty: uncertainty * factor } : {}) };
}

/** The inverse of toWavenumber, for predictions reported in a caller's unit. */
export function fromWavenumber(nu: number, unit: PositionUnit, uncertainty?: number): Converted {
  switch (unit) {
    case 'cm-1':
      return { value: nu, ...(uncertainty !== undefined ? { uncertainty } : {}) };
    case 'um':
    case 'nm': {
      const k = unit === 'um' ? 1e4 : 1e7;
      const lambda = k / nu;
      return { value: lambda, ...(uncertainty !== undefined ? { uncertainty: (lambda * uncertainty) / nu } : {}) };
    }
    default: {
      const f = toWavenumber(1, unit).value;
      return { value: nu / f, ...(uncertainty !== undefined ? { uncertainty: uncertainty / f } : {}) };
    }
  }
}

/**
 * Units a module may declare, and conversion of module values to and from SI.
 *
 * Data (table columns, measurements) use the symbols of the unit table in `shared/units.ts`, or
 * '1' for a dimensionless number. Results may also use a few derived units the unit table does not
 * hold because they are never typed into a calculator: impulse (N*s), mass flow (kg/s), speed (m/s)
 * and angles (rad, deg). Each is a plain factor to SI; the middle dot spellings 'N·s' and 'lbf·s'
 * are accepted as well as the ASCII ones.
 */
import { POUND_FORCE } from '../physics/constants'
import { fromSI, isUnitSymbol, toSI, unitKind } from '../units'
import type { UnitKind, UnitSymbol } from '../units'

/** The unit of a dimensionless number (Mach number, ratio, coefficient, regime code). */
export const DIMENSIONLESS = '1'

/** Units only results use, with their SI factor (value in SI = value × factor). */
export const RESULT_ONLY_UNITS: Readonly<Record<string, { name: string; factor: number }>> = {
  'N*s': { name: 'newton-second', factor: 1 },
  'N·s': { name: 'newton-second', factor: 1 },
  'lbf*s': { name: 'pound-force second', factor: POUND_FORCE },
  'lbf·s': { name: 'pound-force second', factor: POUND_FORCE },
  'kg/s': { name: 'kilogram per second', factor: 1 },
  'g/s': { name: 'gram per second', factor: 1e-3 },
  'm/s': { name: 'metre per second', factor: 1 },
  rad: { name: 'radian', factor: 1 },
  deg: { name: 'degree (angle)', factor: Math.PI / 180 },
}

/** Whether a symbol may be the unit of a table column or a measurement. */
export function isDataUnit(unit: string): boolean {
  return unit === DIMENSIONLESS || isUnitSymbol(unit)
}

/** Whether a symbol may be the unit of a reported result. */
export function isResultUnit(unit: string): boolean {
  return isDataUnit(unit) || Object.prototype.hasOwnProperty.call(RESULT_ONLY_UNITS, unit)
}

/** The kind of quantity of a data unit, or 'dimensionless'. Result-only units give null. */
export function dataUnitKind(unit: string): UnitKind | 'dimensionless' | null {
  if (unit === DIMENSIONLESS) return 'dimensionless'
  return isUnitSymbol(unit) ? unitKind(unit) : null
}

/** Whether a unit measures pressure (and so needs `pressure: gauge | absolute`). */
export function isPressureUnit(unit: string): boolean {
  return dataUnitKind(unit) === 'pressure'
}

/**
 * A module value in its declared unit → SI. Pressures come out in the same sense they went in
 * (gauge stays gauge); turning gauge into absolute needs the ambient pressure, see `scope.ts`.
 *
 * @throws RangeError for an unknown unit or a value the unit table refuses (non-finite, below 0 K)
 */
export function valueToSI(value: number, unit: string): number {
  if (unit === DIMENSIONLESS) return value
  if (isUnitSymbol(unit)) return toSI(value, unit as UnitSymbol)
  const extra = RESULT_ONLY_UNITS[unit]
  if (extra) return value * extra.factor
  throw new RangeError(`unknown unit '${unit}'`)
}

/** SI → a module value in its declared unit (inverse of {@link valueToSI}). */
export function valueFromSI(value: number, unit: string): number {
  if (unit === DIMENSIONLESS) return value
  if (isUnitSymbol(unit)) return fromSI(value, unit as UnitSymbol)
  const extra = RESULT_ONLY_UNITS[unit]
  if (extra) return value / extra.factor
  throw new RangeError(`unknown unit '${unit}'`)
}

/**
 * Units a propulsion lab uses, and conversion to and from SI.
 *
 * The formula library works in SI only (Pa absolute, N, m, m², m³, K, kg, s). This table is the one
 * place where a number a person typed ("68 psi", "2.73 kgf", "20 degC") becomes SI and back. Every
 * factor comes from an exact definition in `physics/constants.ts`; none is rounded.
 *
 * Pressure units here are absolute. A gauge reading is turned into an absolute pressure only by
 * {@link gaugeToAbsolute}, which takes the ambient pressure as an explicit argument; nothing here
 * adds or removes an atmosphere silently. Temperature units are absolute temperatures (affine
 * conversions), not temperature differences.
 */
import {
  BAR,
  GRAM_FORCE,
  INCH,
  KILOGRAM_FORCE,
  POUND_FORCE,
  POUND_MASS,
  PSI,
  SQUARE_INCH,
  STANDARD_ATMOSPHERE,
  US_GALLON,
  ZERO_CELSIUS,
} from './physics/constants'
import { describeValue, requireFinite } from './physics/validate'

/** The physical quantity a unit measures. Only units of the same kind convert into each other. */
export type UnitKind = 'pressure' | 'force' | 'length' | 'area' | 'volume' | 'temperature' | 'mass' | 'time'

/** One entry of the unit table. */
export interface UnitDefinition {
  kind: UnitKind
  /** Plain-language name, for labels. */
  name: string
  /** Value in this unit → value in the SI unit of its kind. */
  toSI: (value: number) => number
  /** Value in the SI unit of its kind → value in this unit. */
  fromSI: (value: number) => number
}

function linear(kind: UnitKind, name: string, siPerUnit: number): UnitDefinition {
  return siPerUnit === 1
    ? { kind, name, toSI: (v) => v, fromSI: (v) => v }
    : { kind, name, toSI: (v) => v * siPerUnit, fromSI: (v) => v / siPerUnit }
}

/**
 * The unit table, keyed by the symbol a person types. Factors (SI per unit):
 * Pa 1, kPa 1e3, MPa 1e6, bar 1e5, psi 4.4482216152605/0.00064516 (= 6894.757293168…),
 * atm 101325; N 1, kN 1e3, kgf 9.80665, gf 0.00980665, lbf 4.4482216152605; m 1, mm 1e-3, cm 1e-2, in 0.0254;
 * m2 1, mm2 1e-6, cm2 1e-4, in2 0.00064516; m3 1, L 1e-3, gal (US) 0.003785411784;
 * K: K, degC: K = °C + 273.15, degF: K = (°F + 459.67)·5/9; kg 1, g 1e-3, lb 0.45359237;
 * s 1, ms 1e-3.
 */
export const UNITS = {
  Pa: linear('pressure', 'pascal (absolute)', 1),
  kPa: linear('pressure', 'kilopascal (absolute)', 1e3),
  MPa: linear('pressure', 'megapascal (absolute)', 1e6),
  bar: linear('pressure', 'bar (absolute)', BAR),
  psi: linear('pressure', 'pound-force per square inch (absolute)', PSI),
  atm: linear('pressure', 'standard atmosphere', STANDARD_ATMOSPHERE),
  N: linear('force', 'newton', 1),
  kN: linear('force', 'kilonewton', 1e3),
  kgf: linear('force', 'kilogram-force', KILOGRAM_FORCE),
  gf: linear('force', 'gram-force', GRAM_FORCE),
  lbf: linear('force', 'pound-force', POUND_FORCE),
  m: linear('length', 'metre', 1),
  mm: linear('length', 'millimetre', 1e-3),
  cm: linear('length', 'centimetre', 1e-2),
  in: linear('length', 'inch', INCH),
  m2: linear('area', 'square metre', 1),
  mm2: linear('area', 'square millimetre', 1e-6),
  cm2: linear('area', 'square centimetre', 1e-4),
  in2: linear('area', 'square inch', SQUARE_INCH),
  m3: linear('volume', 'cubic metre', 1),
  L: linear('volume', 'litre', 1e-3),
  gal: linear('volume', 'US gallon', US_GALLON),
  K: linear('temperature', 'kelvin', 1),
  degC: {
    kind: 'temperature',
    name: 'degree Celsius',
    toSI: (v) => v + ZERO_CELSIUS,
    fromSI: (v) => v - ZERO_CELSIUS,
  },
  degF: {
    kind: 'temperature',
    name: 'degree Fahrenheit',
    // 459.67 °F = 273.15 K × 9/5 exactly, so 0 °F = 459.67 × 5/9 K.
    toSI: (v) => ((v + 459.67) * 5) / 9,
    fromSI: (v) => (v * 9) / 5 - 459.67,
  },
  kg: linear('mass', 'kilogram', 1),
  g: linear('mass', 'gram', 1e-3),
  lb: linear('mass', 'pound (mass)', POUND_MASS),
  s: linear('time', 'second', 1),
  ms: linear('time', 'millisecond', 1e-3),
} as const satisfies Record<string, UnitDefinition>

/** A symbol of the unit table, e.g. 'psi' or 'degC'. */
export type UnitSymbol = keyof typeof UNITS

/** The SI unit of each kind: what the formula library expects. */
export const SI_UNITS: Readonly<Record<UnitKind, UnitSymbol>> = {
  pressure: 'Pa',
  force: 'N',
  length: 'm',
  area: 'm2',
  volume: 'm3',
  temperature: 'K',
  mass: 'kg',
  time: 's',
}

const SYMBOLS = Object.keys(UNITS) as UnitSymbol[]

/**
 * Whether a string is a symbol of the unit table (case-sensitive: 'mm' and 'Mm' differ).
 *
 * @param symbol - the text to test, e.g. what a person typed after a number
 * @returns true when it is a key of {@link UNITS}
 * @example
 * isUnitSymbol('psi')  // true
 * isUnitSymbol('psig') // false: gauge readings go through gaugeToAbsolute
 */
export function isUnitSymbol(symbol: string): symbol is UnitSymbol {
  return Object.prototype.hasOwnProperty.call(UNITS, symbol)
}

function requireUnit(name: string, symbol: unknown): UnitDefinition {
  if (typeof symbol !== 'string' || !isUnitSymbol(symbol)) {
    throw new RangeError(
      `${name} must be one of ${SYMBOLS.map((s) => `'${s}'`).join(', ')} (got ${describeValue(symbol)})`,
    )
  }
  return UNITS[symbol]
}

/**
 * The kind of quantity a unit measures.
 *
 * @param symbol - a unit symbol of {@link UNITS}
 * @returns its kind, e.g. 'pressure'
 * @throws RangeError for a symbol not in the table
 * @example
 * unitKind('psi') // 'pressure'
 */
export function unitKind(symbol: UnitSymbol): UnitKind {
  return requireUnit('unit', symbol).kind
}

/**
 * The unit symbols of one kind, in table order (for unit pickers).
 *
 * @param kind - a unit kind
 * @returns the symbols of that kind
 * @example
 * unitsOfKind('force') // ['N', 'kN', 'kgf', 'gf', 'lbf']
 */
export function unitsOfKind(kind: UnitKind): UnitSymbol[] {
  return SYMBOLS.filter((s) => UNITS[s].kind === kind)
}

function requireAboveAbsoluteZero(kelvin: number, value: number, unit: string): void {
  if (kelvin < 0) {
    throw new RangeError(
      `value must be a temperature at or above absolute zero (0 K, −273.15 degC, −459.67 degF) (got ${value} ${unit})`,
    )
  }
}

/**
 * Converts a value in the given unit to the SI unit of its kind.
 *
 * @param value - the value, finite; a temperature must be at or above absolute zero
 * @param unit - a unit symbol of {@link UNITS}
 * @returns the value in SI (Pa, N, m, m², m³, K, kg or s)
 * @throws RangeError for a non-finite value, an unknown unit or a temperature below 0 K
 * @example
 * toSI(68, 'psi')  // ≈ 468843.5 Pa (absolute)
 * toSI(20, 'degC') // 293.15 K
 */
export function toSI(value: number, unit: UnitSymbol): number {
  const definition = requireUnit('unit', unit)
  requireFinite('value', value)
  const si = definition.toSI(value)
  if (definition.kind === 'temperature') requireAboveAbsoluteZero(si, value, unit)
  return si
}

/**
 * Converts a value in the SI unit of the given unit's kind to that unit.
 *
 * @param value - the value in SI, finite; a temperature (K) must be ≥ 0
 * @param unit - the unit symbol to express it in
 * @returns the value in `unit`
 * @throws RangeError for a non-finite value, an unknown unit or a negative kelvin temperature
 * @example
 * fromSI(26.77, 'kgf') // ≈ 2.730
 */
export function fromSI(value: number, unit: UnitSymbol): number {
  const definition = requireUnit('unit', unit)
  requireFinite('value', value)
  if (definition.kind === 'temperature') requireAboveAbsoluteZero(value, value, 'K')
  return definition.fromSI(value)
}

/**
 * Converts a value between two units of the same kind.
 *
 * @param value - the value in `from`, finite
 * @param from - its unit symbol
 * @param to - the unit symbol wanted
 * @returns the value in `to`
 * @throws RangeError naming both units when their kinds differ; also for an unknown unit, a
 *   non-finite value or a temperature below absolute zero
 * @example
 * convert(2.73, 'kgf', 'N') // ≈ 26.77
 * convert(1, 'psi', 'N')    // throws: cannot convert psi (pressure) to N (force)
 */
export function convert(value: number, from: UnitSymbol, to: UnitSymbol): number {
  const source = requireUnit('from', from)
  const target = requireUnit('to', to)
  if (source.kind !== target.kind) {
    throw new RangeError(
      `cannot convert ${from} (${source.kind}) to ${to} (${target.kind}): the units measure different quantities`,
    )
  }
  return fromSI(toSI(value, from), to)
}

/**
 * How a pressure was read: against the surrounding air ('gauge') or against vacuum ('absolute').
 * One list for the module spec, the hand-in, the calculators and the grader.
 */
export const PRESSURE_SENSES = ['gauge', 'absolute'] as const
export type PressureSense = (typeof PRESSURE_SENSES)[number]

/**
 * Absolute pressure from a gauge reading and the ambient (barometric) pressure, both in Pa.
 *
 * p_abs = p_gauge + p_ambient.
 *
 * @param gauge - gauge pressure, Pa, finite (negative for a vacuum gauge), at least −ambient
 * @param ambient - ambient pressure, Pa absolute, finite, ≥ 0 (use the lab's barometer, or
 *   STANDARD_ATMOSPHERE = 101325 Pa when none was recorded)
 * @returns absolute pressure, Pa, ≥ 0
 * @throws RangeError when either value is not finite, ambient is negative, or the sum is negative
 * @example
 * gaugeToAbsolute(toSI(68, 'psi'), 101325) // ≈ 570168.5 Pa
 */
export function gaugeToAbsolute(gauge: number, ambient: number): number {
  requireFinite('gauge', gauge)
  requireAmbient(ambient)
  const absolute = gauge + ambient
  if (absolute < 0) {
    throw new RangeError(`gauge must be a finite number of at least −ambient (${-ambient}) (got ${gauge})`)
  }
  return absolute
}

/**
 * Gauge pressure from an absolute pressure and the ambient (barometric) pressure, both in Pa.
 *
 * p_gauge = p_abs − p_ambient.
 *
 * @param absolute - absolute pressure, Pa, finite, ≥ 0
 * @param ambient - ambient pressure, Pa absolute, finite, ≥ 0
 * @returns gauge pressure, Pa (negative below ambient)
 * @throws RangeError when either value is not finite or negative
 * @example
 * absoluteToGauge(570168.5, 101325) // ≈ 468843.5 Pa (68 psi gauge)
 */
export function absoluteToGauge(absolute: number, ambient: number): number {
  requireFinite('absolute', absolute)
  if (absolute < 0) throw new RangeError(`absolute must be a finite number of at least 0 (got ${absolute})`)
  requireAmbient(ambient)
  return absolute - ambient
}

function requireAmbient(ambient: number): void {
  requireFinite('ambient', ambient)
  if (ambient < 0) throw new RangeError(`ambient must be a finite number of at least 0 (got ${ambient})`)
}

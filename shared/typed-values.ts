/**
 * Values a person types with a unit of their choice ("68 psi", "4.7 bar", "470 kPa"), turned into
 * the unit a module's spec declares. The same rules run in the hand-in form and on the server.
 */
import { DIMENSIONLESS, RESULT_ONLY_UNITS, dataUnitKind, valueFromSI, valueToSI } from './modules/quantities'
import { unitsOfKind, type PressureSense } from './units'

const RESULT_FAMILIES: readonly (readonly string[])[] = [
  ['N*s', 'N·s', 'lbf*s', 'lbf·s'],
  ['kg/s', 'g/s'],
  ['m/s'],
  ['rad', 'deg'],
]

/** The units a value of `specUnit` may be typed in (the spec's own unit first). */
export function compatibleUnits(specUnit: string): string[] {
  if (specUnit === DIMENSIONLESS) return [DIMENSIONLESS]
  const kind = dataUnitKind(specUnit)
  const family =
    kind && kind !== 'dimensionless'
      ? (unitsOfKind(kind) as string[])
      : RESULT_FAMILIES.find((f) => f.includes(specUnit))
  if (!family) return [specUnit]
  return [
    specUnit,
    ...family.filter((u) => u !== specUnit && !(u.includes('·') && family.includes(u.replace('·', '*')))),
  ]
}

export function isCompatibleUnit(typed: string, specUnit: string): boolean {
  if (typed === specUnit) return true
  if (specUnit in RESULT_ONLY_UNITS || typed in RESULT_ONLY_UNITS) {
    return RESULT_FAMILIES.some((f) => f.includes(typed) && f.includes(specUnit))
  }
  const a = dataUnitKind(typed)
  return a !== null && a === dataUnitKind(specUnit)
}

/**
 * `value` typed in `typedUnit` → the same quantity in `specUnit`.
 * @throws RangeError naming both units when they measure different kinds of quantity
 */
export function toSpecUnit(value: number, typedUnit: string, specUnit: string): number {
  if (!isCompatibleUnit(typedUnit, specUnit)) {
    throw new RangeError(`${typedUnit} does not measure the same kind of quantity as ${specUnit}`)
  }
  if (typedUnit === specUnit) return value
  return valueFromSI(valueToSI(value, typedUnit), specUnit)
}

/**
 * A pressure in `specUnit` read as `typedSense` → the sense the spec declares, using the ambient
 * pressure (absolute, in `specUnit`). Never converts silently without an ambient value.
 * @throws RangeError when a conversion is needed and no ambient pressure is given
 */
export function toSpecSense(
  value: number,
  typedSense: PressureSense,
  specSense: PressureSense,
  ambientInSpecUnit: number | undefined,
): number {
  if (typedSense === specSense) return value
  if (ambientInSpecUnit === undefined || !Number.isFinite(ambientInSpecUnit)) {
    throw new RangeError('converting between gauge and absolute needs the ambient pressure; enter it first')
  }
  return typedSense === 'gauge' ? value + ambientInSpecUnit : value - ambientInSpecUnit
}

/**
 * Units as the hand-in page writes them: names for a screen reader, the units a value may be typed
 * in, the gauge/absolute choice and a measurement's plausible range in words.
 */
import { formatCompact, unitText } from '@shared/format'
import { DIMENSIONLESS } from '@shared/modules/quantities'
import type { MeasurementSpec } from '@shared/modules/schema'
import { compatibleUnits } from '@shared/typed-values'
import { UNITS, isUnitSymbol } from '@shared/units'

/** Its name, for a tooltip or a screen reader. */
export function unitName(unit: string): string {
  if (unit === DIMENSIONLESS) return 'no unit (a pure number)'
  if (isUnitSymbol(unit)) return UNITS[unit].name
  const names: Record<string, string> = {
    'N*s': 'newton-second',
    'N·s': 'newton-second',
    'lbf*s': 'pound-force second',
    'lbf·s': 'pound-force second',
    'kg/s': 'kilogram per second',
    'g/s': 'gram per second',
    'm/s': 'metre per second',
    rad: 'radian',
    deg: 'degree (angle)',
  }
  return names[unit] ?? unit
}

export interface UnitOption {
  label: string
  value: string
  name: string
}

/** The units a value of `specUnit` may be typed in, for a unit picker (spec's own unit first). */
export function unitOptions(specUnit: string): UnitOption[] {
  return compatibleUnits(specUnit).map((u) => ({ label: unitText(u), value: u, name: unitName(u) }))
}

export const PRESSURE_SENSES: readonly { label: string; value: 'gauge' | 'absolute' }[] = [
  { label: 'gauge', value: 'gauge' },
  { label: 'absolute', value: 'absolute' },
]

/** A measurement's plausible range in words, e.g. "Plausible range: 60 to 110 kPa absolute". */
export function rangeText(m: Pick<MeasurementSpec, 'unit' | 'min' | 'max' | 'pressure'>): string | null {
  const sense = m.pressure ? ` ${m.pressure}` : ''
  const u = unitText(m.unit)
  const unit = u ? ` ${u}` : ''
  if (m.min !== undefined && m.max !== undefined)
    return `Plausible range: ${formatCompact(m.min)} to ${formatCompact(m.max)}${unit}${sense}`
  if (m.min !== undefined) return `Plausible range: at least ${formatCompact(m.min)}${unit}${sense}`
  if (m.max !== undefined) return `Plausible range: at most ${formatCompact(m.max)}${unit}${sense}`
  return null
}

/**
 * Numbers and units as Isentrope writes them for people: on the result page, in the calculators
 * and in the printed feedback report (one set of rules for all three).
 */
import { DIMENSIONLESS } from './modules/quantities'
import { isUnitSymbol } from './units'
import type { UnitSymbol } from './units'

const WRITTEN: Partial<Record<UnitSymbol, string>> = {
  degC: '°C',
  degF: '°F',
  m2: 'm²',
  mm2: 'mm²',
  cm2: 'cm²',
  in2: 'in²',
  m3: 'm³',
}

/** How a unit symbol is written on the page (°C rather than degC, m³ rather than m3). */
export function unitLabel(unit: UnitSymbol): string {
  return WRITTEN[unit] ?? unit
}

/** A unit as a person reads it: °C, m³, N·s; an empty string for a pure number. */
export function unitText(unit: string): string {
  if (unit === DIMENSIONLESS) return ''
  if (isUnitSymbol(unit)) return unitLabel(unit)
  return unit.replace('*', '·')
}

/** "12.3 kPa" or "0.672" (no unit for a pure number). */
export function withUnit(value: string, unit: string): string {
  const u = unitText(unit)
  return u ? `${value} ${u}` : value
}

const SUPERSCRIPT: Record<string, string> = {
  '-': '⁻',
  '0': '⁰',
  '1': '¹',
  '2': '²',
  '3': '³',
  '4': '⁴',
  '5': '⁵',
  '6': '⁶',
  '7': '⁷',
  '8': '⁸',
  '9': '⁹',
}

/**
 * A result for display with a fixed number of significant figures (trailing zeros kept, so
 * "0.12780" shows five). Very small or very large magnitudes are written as "2.3563 × 10⁻⁵".
 */
export function formatNumber(value: number, significant = 5): string {
  if (Number.isNaN(value)) return '—'
  if (value === Infinity) return '∞'
  if (value === -Infinity) return '−∞'
  if (value === 0) return '0'
  const magnitude = Math.abs(value)
  if (magnitude < 1e-3 || magnitude >= 1e9) {
    const [mantissa, exponent] = value.toExponential(significant - 1).split('e')
    const power = String(Number(exponent))
      .split('')
      .map((c) => SUPERSCRIPT[c] ?? c)
      .join('')
    return `${mantissa?.replace('-', '−')} × 10${power}`
  }
  return new Intl.NumberFormat('en-US', {
    minimumSignificantDigits: significant,
    maximumSignificantDigits: significant,
  })
    .format(value)
    .replace('-', '−')
}

/** Like {@link formatNumber} without trailing zeros, for echoing a value the person typed ("20 s", not "20.00 s"). */
export function formatCompact(value: number, significant = 5): string {
  const text = formatNumber(value, significant)
  return text.includes('×') || !text.includes('.') ? text : text.replace(/\.?0+$/, '')
}

/** A checked value in its result's unit with up to five significant figures, or a dash. */
export function valueText(x: number | null, unit: string): string {
  return x === null || !Number.isFinite(x) ? '—' : withUnit(formatCompact(x, 5), unit)
}

/** Relative error as a percentage with two significant figures ("1.2 %"), or a dash. */
export function percentText(rel: number | null): string {
  if (rel === null || !Number.isFinite(rel)) return '—'
  if (rel === 0) return '0 %'
  // Below a hundredth of a per cent the digits only show rounding.
  if (rel < 1e-4) return '< 0.01 %'
  return `${formatCompact(rel * 100, 2)} %`
}

/** A score for display: whole numbers plain, otherwise up to two decimals ("7.5"). */
export function formatScore(x: number): string {
  return String(Math.round(x * 100) / 100)
}

/**
 * Numbers and units in the printed report, written the way the result page writes them
 * (src/composables/use-submissions.ts valueText, percentText, formatScore and unitText; the
 * number rules of src/composables/use-calculator.ts formatNumber/formatCompact). The client's
 * versions live in src/, which the server may not import, so the rules are repeated here; the
 * report tests compare the printed score with the API's.
 */
import { DIMENSIONLESS } from '../../shared/modules/quantities'
import { isUnitSymbol } from '../../shared/units'

const WRITTEN_UNITS: Record<string, string> = { degC: '°C', degF: '°F', m2: 'm²', mm2: 'mm²', cm2: 'cm²', in2: 'in²', m3: 'm³' }

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

/** A unit as a person reads it: °C, m³, N·s; empty for a pure number. */
export function unitText(unit: string): string {
  if (unit === DIMENSIONLESS) return ''
  if (isUnitSymbol(unit)) return WRITTEN_UNITS[unit] ?? unit
  return unit.replace('*', '·')
}

/** `significant` figures; × 10ⁿ outside 10⁻³ … 10⁹; a true minus sign. */
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
  return new Intl.NumberFormat('en-US', { minimumSignificantDigits: significant, maximumSignificantDigits: significant }).format(value).replace('-', '−')
}

/** {@link formatNumber} without trailing zeros. */
export function formatCompact(value: number, significant = 5): string {
  const text = formatNumber(value, significant)
  return text.includes('×') || !text.includes('.') ? text : text.replace(/\.?0+$/, '')
}

/** "12.3 kPa" or "0.672" (no unit for a pure number). */
export function withUnit(value: string, unit: string): string {
  const u = unitText(unit)
  return u ? `${value} ${u}` : value
}

/** A checked value in its result's unit with up to five significant figures, or a dash. */
export function valueText(x: number | null, unit: string): string {
  return x === null || !Number.isFinite(x) ? '—' : withUnit(formatCompact(x, 5), unit)
}

/** A relative error as a percentage. */
export function percentText(rel: number | null): string {
  if (rel === null || !Number.isFinite(rel)) return '—'
  if (rel === 0) return '0 %'
  if (rel < 1e-4) return '< 0.01 %'
  return `${formatCompact(rel * 100, 2)} %`
}

/** A score: whole numbers plain, otherwise up to two decimals ("7.5"). */
export function formatScore(x: number): string {
  return String(Math.round(x * 100) / 100)
}

/**
 * A safe piece of a file name: ASCII letters, digits and hyphens, lower case, accents dropped.
 * @example fileSlug('Group A1') // 'group-a1'
 * @example fileSlug('Dvořák, Anežka') // 'dvorak-anezka'
 */
export function fileSlug(text: string, fallback = 'report'): string {
  const slug = text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60)
    .replace(/-+$/, '')
  return slug || fallback
}

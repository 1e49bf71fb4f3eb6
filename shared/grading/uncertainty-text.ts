/**
 * The uncertainty of an expected value in words and figures, one set of rules for the result page,
 * the staff review page and the printed feedback report: "109.09 ± 2.4 N·s (k = 2)" and "mostly the
 * chamber pressure column's gain (62 %) and the throat diameter (30 %)".
 */
import { formatCompact, valueText, withUnit } from '../format'
import type { UncertaintyContribution } from './uncertainty'

/** "Chamber pressure" → "chamber pressure"; an acronym at the start ("CO2 flow") keeps its capitals. */
function lowerFirst(label: string): string {
  const first = label.charAt(0)
  const second = label.charAt(1)
  return second && second === second.toUpperCase() && second !== second.toLowerCase()
    ? label
    : first.toLowerCase() + label.slice(1)
}

/** A share of the variance as a whole per cent ("62 %"). */
export function shareText(share: number): string {
  return `${Math.round(share * 100)} %`
}

/** What one contribution is: "the throat diameter", "the chamber pressure column's gain". */
export function contributionText(c: Pick<UncertaintyContribution, 'label' | 'part'>): string {
  const name = lowerFirst(c.label)
  return c.part === 'value' ? `the ${name}` : `the ${name} column's ${c.part}`
}

/**
 * Which inputs dominate an expected value's uncertainty, in words, with their shares of its
 * variance; null when there is nothing to say (no contribution kept). Shares do not reveal the
 * expected value, so this is shown even where the expected value is hidden.
 *
 * @example
 * dominantInputsText([{ key: 'p_chamber', part: 'gain', label: 'Chamber pressure', share: 0.62 },
 *   { key: 'd_throat', part: 'value', label: 'Throat diameter', share: 0.3 }])
 * // → "mostly the chamber pressure column's gain (62 %) and the throat diameter (30 %)"
 */
export function dominantInputsText(
  contributions: readonly Pick<UncertaintyContribution, 'key' | 'label' | 'part' | 'share'>[],
): string | null {
  const [first, second] = contributions
  if (!first) return null
  if (!second)
    return first.share >= 0.995
      ? `all from ${contributionText(first)}`
      : `mostly ${contributionText(first)} (${shareText(first.share)})`
  // Both parts of one column: "the thrust column's offset (76 %) and gain (24 %)".
  const secondText =
    second.key === first.key && second.part !== 'value' && first.part !== 'value'
      ? second.part
      : contributionText(second)
  return `mostly ${contributionText(first)} (${shareText(first.share)}) and ${secondText} (${shareText(second.share)})`
}

/**
 * An expected value with its expanded uncertainty U = k·u_c: "109.09 ± 2.4 N·s (k = 2)" (U to two
 * significant figures); the plain value when there is no uncertainty to show (none, or zero).
 */
export function expectedWithUncertaintyText(
  expected: number | null,
  expanded: number | null,
  coverage: number | null,
  unit: string,
): string {
  if (expected === null || !Number.isFinite(expected) || expanded === null || !(expanded > 0) || coverage === null)
    return valueText(expected, unit)
  return `${withUnit(`${formatCompact(expected, 5)} ± ${formatCompact(expanded, 2)}`, unit)} (k = ${formatCompact(coverage, 3)})`
}

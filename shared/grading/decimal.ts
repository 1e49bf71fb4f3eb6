/**
 * A log's cells as decimal numbers, by our own rules (not Number()'s): shared by the general CSV
 * reader (`csv.ts`), the plain reader (`csv-plain.ts`) and the hand-in form.
 *
 * Pure: no DOM, no Node APIs.
 */

/** Exact powers of ten up to 10²² (every one is a double without rounding). */
const POWERS_OF_TEN = Array.from({ length: 23 }, (_, i) => 10 ** i)

/**
 * A cell as a decimal number: optional sign, digits with at most one '.', optional exponent, spaces
 * around allowed. Anything else gives NaN — also what Number() would accept but a log should not
 * hold (hexadecimal "0x1A", "Infinity", an empty cell that Number() reads as 0).
 *
 * Short cells (up to 15 significant digits, decimal exponent within ±22, the usual logger output)
 * take a fast path: the digits as an integer m, then m × 10^e or m / 10^−e. Both operands are exact
 * doubles, so the one rounding of the product or quotient gives the correctly rounded value — the
 * same double Number() gives (W. D. Clinger, "How to read floating point numbers accurately",
 * PLDI 1990, the fast path of section 4). Everything else goes through Number().
 */
export function parseDecimal(cell: string): number {
  const fast = parseDecimalFast(cell, 0, cell.length)
  return fast === undefined ? parseDecimalSlow(cell) : fast
}

/**
 * The fast path of {@link parseDecimal} on the cell text[from, to) (the plain reader parses cells
 * in place, without cutting them out); undefined when the cell needs the slow path.
 */
export function parseDecimalFast(cell: string, from: number, to: number): number | undefined {
  const n = to
  let i = from
  while (i < n && (cell.charCodeAt(i) === 32 || cell.charCodeAt(i) === 9)) i++
  let negative = false
  // Bounded reads: past `to` lies the next cell, not the end of the string.
  let c = i < n ? cell.charCodeAt(i) : -1
  if (c === 45 || c === 43) {
    negative = c === 45
    i++
  }
  let mantissa = 0
  let digits = 0
  let significant = 0
  let scale = 0
  let point = false
  for (; i < n; i++) {
    c = cell.charCodeAt(i)
    if (c >= 48 && c <= 57) {
      digits++
      if (significant > 0 || c !== 48) significant++
      mantissa = mantissa * 10 + (c - 48)
      if (point) scale--
    } else if (c === 46 && !point) {
      point = true
    } else break
  }
  if (digits === 0 || significant > 15) return undefined
  if (i < n && (c === 101 || c === 69)) {
    i++
    let expNegative = false
    c = i < n ? cell.charCodeAt(i) : -1
    if (c === 45 || c === 43) {
      expNegative = c === 45
      i++
    }
    let exponent = 0
    let expDigits = 0
    for (; i < n; i++) {
      c = cell.charCodeAt(i)
      if (c < 48 || c > 57 || expDigits > 4) break
      exponent = exponent * 10 + (c - 48)
      expDigits++
    }
    if (expDigits === 0 || expDigits > 4) return undefined
    scale += expNegative ? -exponent : exponent
  }
  while (i < n && (cell.charCodeAt(i) === 32 || cell.charCodeAt(i) === 9)) i++
  if (i !== n) return undefined
  let value: number
  if (mantissa === 0) value = 0
  else if (scale >= 0 && scale <= 22) value = mantissa * (POWERS_OF_TEN[scale] as number)
  else if (scale < 0 && scale >= -22) value = mantissa / (POWERS_OF_TEN[-scale] as number)
  else return undefined
  if (!Number.isFinite(value)) return undefined
  return negative ? -value : value
}

export function parseDecimalSlow(cell: string): number {
  let digit = false
  for (let i = 0; i < cell.length; i++) {
    const c = cell.charCodeAt(i)
    if (c >= 48 && c <= 57) digit = true
    // . + - e E space tab
    else if (c !== 46 && c !== 43 && c !== 45 && c !== 101 && c !== 69 && c !== 32 && c !== 9) return Number.NaN
  }
  if (!digit) return Number.NaN
  const value = Number(cell)
  return Number.isFinite(value) ? value : Number.NaN
}

import { expect } from 'vitest'

/**
 * Asserts that `actual` agrees with a value as printed in a table, to within half a unit in the
 * table's last printed place (the most a correctly rounded entry can differ from the true value).
 * `printed` is the table entry as a string so its number of decimal places is known, e.g. '0.05853'.
 * A relative slack of 1e-12 covers floating-point rounding when the true value is an exact tie.
 */
export function expectPrinted(actual: number, printed: string, label = ''): void {
  const match = /^-?\d*(?:\.(\d+))?(?:e([+-]?\d+))?$/i.exec(printed)
  if (!match) throw new Error(`expectPrinted: cannot read the printed value '${printed}'`)
  const decimals = match[1]?.length ?? 0
  const exponent = Number(match[2] ?? 0)
  const expected = Number(printed)
  const halfUnit = 0.5 * 10 ** (exponent - decimals)
  const error = Math.abs(actual - expected)
  expect(
    error <= halfUnit + 1e-12 * Math.abs(expected),
    `${label ? label + ': ' : ''}expected ${actual} to round to the printed ${printed} (within ±${halfUnit}); off by ${error.toExponential(3)}`,
  ).toBe(true)
}

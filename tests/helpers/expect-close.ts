import { expect } from 'vitest'

/**
 * Asserts |actual − expected| ≤ relTol·|expected| (or ≤ relTol when expected is 0).
 * The message shows both values and the relative error, so a failure says by how much.
 */
export function expectClose(actual: number, expected: number, relTol: number, label = ''): void {
  const scale = Math.abs(expected) > 0 ? Math.abs(expected) : 1
  const rel = Math.abs(actual - expected) / scale
  expect(
    rel <= relTol,
    `${label ? label + ': ' : ''}expected ${actual} to be within ${relTol} (relative) of ${expected}; relative error ${rel.toExponential(3)}`,
  ).toBe(true)
}

import { expect } from 'vitest'

/**
 * Asserts that `run` throws a RangeError whose message contains every given fragment (typically
 * the argument's name and a word of the allowed range).
 */
export function expectRangeError(run: () => unknown, ...fragments: string[]): void {
  let thrown: unknown = undefined
  try {
    run()
  } catch (error) {
    thrown = error
  }
  expect(thrown, 'expected a RangeError to be thrown').toBeInstanceOf(RangeError)
  const message = (thrown as RangeError).message
  for (const fragment of fragments) expect(message).toContain(fragment)
}

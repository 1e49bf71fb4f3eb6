/**
 * Columns of an expression scope known to hold only finite numbers, checked once.
 *
 * The scope checks every sample of every column when it is built (scope.ts), and the columns the
 * engine makes from them (gauge readings made absolute, tared pressures, the uncertainty
 * propagation's moved columns) are made from checked numbers. A module's expressions then pass the
 * same arrays to the library many times per grading (windowIntegral over a 50 000-sample log, once
 * per result and per moved input), and each call would read them again to check what is known. So
 * the arrays are remembered here, by identity, as run-cache.ts remembers their runs: the scope's
 * columns are never modified once built. Whether a time column increases strictly is worked out
 * once per array, on the first call that needs it.
 *
 * Arrays not made by the scope (a caller's own scope, a column an expression computes) are not
 * known here and get every check, as before.
 */

const finite = new WeakSet<object>()
const increasing = new WeakMap<object, boolean>()

/**
 * Remembers that every entry of `samples` is a finite number. Only for arrays that are checked (or
 * made from checked numbers and checked finite) and never modified afterwards.
 */
export function markFinite(samples: readonly number[]): void {
  finite.add(samples)
}

/** Whether `value` is an array marked with {@link markFinite}. */
export function knownFinite(value: unknown): value is readonly number[] {
  return typeof value === 'object' && value !== null && finite.has(value)
}

/**
 * Whether `time` is a marked array whose entries increase strictly; false for an array not
 * marked (its entries are not known to be numbers) and for one that does not increase.
 */
export function knownIncreasing(time: unknown): time is readonly number[] {
  if (!knownFinite(time)) return false
  let known = increasing.get(time)
  if (known === undefined) {
    known = true
    for (let i = 1; i < time.length; i++) {
      if (!((time[i] as number) > (time[i - 1] as number))) {
        known = false
        break
      }
    }
    increasing.set(time, known)
  }
  return known
}

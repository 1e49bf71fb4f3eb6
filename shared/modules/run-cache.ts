/**
 * One reduction of a logged run per grading, however many expressions ask for it.
 *
 * A module reads several fields of the same run (`reduceThrustRun(t, thrust).totalImpulse`,
 * `.peakThrust`, `.start`, …) and the scope tares its pressure columns with the same run, each over
 * a 50 000-sample log at worst. The analysis is kept per thrust array, time array and threshold
 * (by identity: the scope's columns are never modified once built, and mathjs hands the very
 * arrays of the scope to the functions it calls), and dropped with the arrays.
 */
import { analyseThrustRun } from '../physics/thrust-run'
import type { ThrustRunAnalysis, ThrustRunOptions } from '../physics/thrust-run'

type Outcome = { run: ThrustRunAnalysis } | { error: unknown }

const cache = new WeakMap<object, Map<object, Map<string, Outcome>>>()

/**
 * {@link analyseThrustRun}, remembered per (time, thrust, threshold). A RangeError is remembered
 * too and thrown again. Arguments that are not arrays go straight to the library, which refuses
 * them with its own message.
 */
export function cachedThrustRun(
  time: readonly number[],
  thrust: readonly number[],
  options?: ThrustRunOptions,
): ThrustRunAnalysis {
  if (!Array.isArray(time) || !Array.isArray(thrust)) return analyseThrustRun(time, thrust, options)
  const key = options === undefined ? '' : JSON.stringify(options)
  let byTime = cache.get(thrust)
  if (!byTime) cache.set(thrust, (byTime = new Map()))
  let byOptions = byTime.get(time)
  if (!byOptions) byTime.set(time, (byOptions = new Map()))
  let outcome = byOptions.get(key)
  if (!outcome) {
    try {
      outcome = { run: analyseThrustRun(time, thrust, options) }
    } catch (error) {
      outcome = { error }
    }
    byOptions.set(key, outcome)
  }
  if ('error' in outcome) throw outcome.error
  return outcome.run
}

/**
 * One reduction of a logged run per grading, however many expressions ask for it.
 *
 * A module reads several fields of the same run (`reduceThrustRun(t, thrust).totalImpulse`,
 * `.peakThrust`, `.start`, …) and the scope tares its pressure columns with the same run, each over
 * a 50 000-sample log at worst. The analysis is kept per thrust array, time array and threshold
 * (by identity: the scope's columns are never modified once built, and mathjs hands the very
 * arrays of the scope to the functions it calls), and dropped with the arrays.
 *
 * The uncertainty propagation reads the same log with its zero and calibration moved (offset +
 * gain × every sample), four times per thrust column. Such a column is made with
 * {@link rescaledColumn}, which remembers what it was made from, and its run is then worked out
 * from the run of the column as logged (`runOfRescaledThrust`: the reduction commutes with the
 * change) instead of being reduced again.
 */
import { analyseThrustRun, runOfRescaledThrust } from '../physics/thrust-run'
import type { ThrustRunAnalysis, ThrustRunOptions } from '../physics/thrust-run'
import { knownFinite, markFinite } from './checked-columns'

type Outcome = { run: ThrustRunAnalysis } | { error: unknown }

const cache = new WeakMap<object, Map<object, Map<string, Outcome>>>()

/** A column made by {@link rescaledColumn}: offset + gain × every sample of `from`. */
interface Rescaled {
  from: readonly number[]
  offset: number
  gain: number
}
const rescaled = new WeakMap<object, Rescaled>()

/**
 * offset + gain × every sample, as a new plain array (a plain loop: a map with a closure took
 * several times as long on a 50 000-sample log), remembered as made from `samples` so that
 * {@link cachedThrustRun} can reuse the run of `samples`. Like every scope column, it must never
 * be modified afterwards.
 *
 * @param samples - a column in SI
 * @param offset - added to every sample, in the column's SI unit
 * @param gain - multiplying every sample
 * @returns the new column
 * @example
 * rescaledColumn([1, 2, 3], 0.5, 2) // → [2.5, 4.5, 6.5]
 */
export function rescaledColumn(samples: readonly number[], offset: number, gain: number): number[] {
  const out = new Array<number>(samples.length)
  // A column made from checked samples is known finite too when every new sample is (checked-columns.ts).
  let allFinite = knownFinite(samples)
  if (gain === 1) {
    for (let i = 0; i < samples.length; i++) {
      const v = (samples[i] as number) + offset
      if (!Number.isFinite(v)) allFinite = false
      out[i] = v
    }
  } else {
    for (let i = 0; i < samples.length; i++) {
      const v = offset + gain * (samples[i] as number)
      if (!Number.isFinite(v)) allFinite = false
      out[i] = v
    }
  }
  if (allFinite) markFinite(out)
  // Chained changes are remembered against the column they started from.
  const parent = rescaled.get(samples)
  rescaled.set(
    out,
    parent
      ? { from: parent.from, offset: offset + gain * parent.offset, gain: gain * parent.gain }
      : { from: samples, offset, gain },
  )
  return out
}

function outcomeOf(time: readonly number[], thrust: readonly number[], options: ThrustRunOptions | undefined): Outcome {
  const made = rescaled.get(thrust)
  if (made && made.gain > 0 && Number.isFinite(made.gain) && Number.isFinite(made.offset)) {
    let from: ThrustRunAnalysis | undefined
    try {
      from = cachedThrustRun(time, made.from, options)
    } catch {
      // The column as logged has no run: the rescaled one is reduced on its own below (and gives
      // its own reason, with its own numbers).
    }
    if (from) return { run: runOfRescaledThrust(from, made.offset, made.gain) }
  }
  try {
    return { run: analyseThrustRun(time, thrust, options) }
  } catch (error) {
    return { error }
  }
}

/**
 * {@link analyseThrustRun}, remembered per (time, thrust, threshold). A RangeError is remembered
 * too and thrown again. Arguments that are not arrays go straight to the library, which refuses
 * them with its own message. A thrust column made by {@link rescaledColumn} from another (with a
 * positive gain) gets the other's run, rescaled.
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
    outcome = outcomeOf(time, thrust, options)
    byOptions.set(key, outcome)
  }
  if ('error' in outcome) throw outcome.error
  return outcome.run
}

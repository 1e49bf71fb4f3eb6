/**
 * Integrals and means of a sampled signal over a time window (the run window of a test, for
 * example), by the trapezoid rule with the signal interpolated linearly at the window's ends.
 *
 * Source: trapezoid rule, e.g. Press et al., Numerical Recipes, 3rd ed., eq. 4.1.11 (from memory).
 */
import { requireInterval, requireSameLength, requireSampleCount, requireSamples } from './validate'

/** Index of the first sample with t[i] > at (binary search; t strictly increasing). */
function firstAfter(t: ArrayLike<number>, at: number): number {
  let lo = 0
  let hi = t.length
  while (lo < hi) {
    const mid = (lo + hi) >> 1
    if ((t[mid] as number) > at) hi = mid
    else lo = mid + 1
  }
  return lo
}

/** x at time `at` by linear interpolation; t strictly increasing, t[0] ≤ at ≤ t[n−1]. */
function valueAt(t: ArrayLike<number>, x: ArrayLike<number>, at: number): number {
  const i = firstAfter(t, at)
  if (i === 0) return x[0] as number
  if (i >= t.length) return x[t.length - 1] as number
  const t0 = t[i - 1] as number
  const t1 = t[i] as number
  const x0 = x[i - 1] as number
  return x0 + (((x[i] as number) - x0) * (at - t0)) / (t1 - t0)
}

/**
 * {@link windowIntegral} without argument checks, for library code that has checked them (the run
 * reduction integrates its own tared thrust). start ≤ end gives 0 when they are equal or reversed.
 *
 * @param t - sample times, s, strictly increasing (not checked)
 * @param x - samples, finite, as many as t (not checked)
 * @param start - window start, s, within [t₁, tₙ] (not checked)
 * @param end - window end, s, within [start, tₙ] (not checked)
 * @returns the integral, in the unit of x × s
 * @example
 * windowIntegralUnchecked([0, 1, 2, 3], [0, 10, 10, 0], 0.5, 2.5) // = 17.5
 */
export function windowIntegralUnchecked(
  t: ArrayLike<number>,
  x: ArrayLike<number>,
  start: number,
  end: number,
): number {
  if (end <= start) return 0
  const i = firstAfter(t, start) // first sample strictly inside (start, …]
  const j = firstAfter(t, end) // first sample after end
  let prevT = start
  let prevX = valueAt(t, x, start)
  let sum = 0
  for (let k = i; k < j; k++) {
    const tk = t[k] as number
    if (tk >= end) break
    const xk = x[k] as number
    sum += 0.5 * (tk - prevT) * (xk + prevX)
    prevT = tk
    prevX = xk
  }
  sum += 0.5 * (end - prevT) * (valueAt(t, x, end) + prevX)
  return sum
}

/**
 * Requires sample times that increase strictly (a repeated time stamp leaves interpolation and a
 * window's ends undefined). The entries must already be finite numbers.
 *
 * @param name - the argument's name
 * @param t - the times
 * @example
 * requireStrictlyIncreasing('time', [0, 1, 1]) // throws RangeError: time must increase strictly … (got time[1] = 1 and time[2] = 1)
 */
export function requireStrictlyIncreasing(name: string, t: readonly number[]): void {
  for (let i = 1; i < t.length; i++) {
    if (!((t[i] as number) > (t[i - 1] as number))) {
      throw new RangeError(
        `${name} must increase strictly from one sample to the next (got ${name}[${i - 1}] = ${t[i - 1]} and ${name}[${i}] = ${t[i]})`,
      )
    }
  }
}

/**
 * The window's checks, in one order whatever the caller knows. With `samplesChecked` the passes
 * over the samples (finite entries, strictly increasing time) are left out: the caller has made
 * them already on these very arrays.
 */
function requireWindow(
  time: readonly number[],
  values: readonly number[],
  start: number,
  end: number,
  strict: boolean,
  samplesChecked = false,
): void {
  if (samplesChecked) {
    requireSampleCount('time', time, 2)
    requireSampleCount('values', values, 2)
  } else {
    requireSamples('time', time, 2)
    requireSamples('values', values, 2)
  }
  requireSameLength('time', time, 'values', values)
  if (!samplesChecked) requireStrictlyIncreasing('time', time)
  const first = time[0] as number
  const last = time[time.length - 1] as number
  requireInterval(
    'start',
    start,
    { value: first, open: false, text: `the first time (${first})` },
    { value: last, open: false, text: `the last time (${last})` },
  )
  requireInterval(
    'end',
    end,
    { value: start, open: strict, text: `start (${start})` },
    { value: last, open: false, text: `the last time (${last})` },
  )
}

/**
 * Integral of a sampled signal over a time window, by the trapezoid rule, with the signal
 * interpolated linearly at the window's ends (so a window that starts or ends between samples
 * counts exactly the part inside it).
 *
 * ∫_start^end x dt ≈ Σ ½·(t_k − t_{k−1})·(x_k + x_{k−1}) over start, the samples inside, end.
 *
 * Source: trapezoid rule, e.g. Press et al., Numerical Recipes, 3rd ed., eq. 4.1.11 (from memory).
 *
 * @param time - sample times, s, finite, strictly increasing, at least 2 samples
 * @param values - samples, any unit, finite, as many as time
 * @param start - window start, s, within [time₁, timeₙ]
 * @param end - window end, s, from start to timeₙ (end = start gives 0)
 * @returns the integral, in the unit of values × s
 * @throws RangeError on unequal lengths, non-finite samples, time not strictly increasing, or a window outside the log
 * @example
 * windowIntegral([0, 1, 2, 3], [0, 10, 10, 0], 0.5, 2.5) // = 3.75 + 10 + 3.75 = 17.5
 */
export function windowIntegral(time: readonly number[], values: readonly number[], start: number, end: number): number {
  requireWindow(time, values, start, end, false)
  return windowIntegralUnchecked(time, values, start, end)
}

/**
 * Time-weighted mean of a sampled signal over a time window: {@link windowIntegral} divided by
 * the window's length (e.g. the mean chamber pressure over the run window).
 *
 * mean = ∫_start^end x dt / (end − start).
 *
 * Source: definition of the mean; trapezoid rule (see {@link windowIntegral}).
 *
 * @param time - sample times, s, finite, strictly increasing, at least 2 samples
 * @param values - samples, any unit, finite, as many as time
 * @param start - window start, s, within [time₁, timeₙ]
 * @param end - window end, s, greater than start, at most timeₙ
 * @returns the mean, in the unit of values
 * @throws RangeError as {@link windowIntegral}, or when end is not greater than start
 * @example
 * windowMean([0, 1, 2, 3], [0, 10, 10, 0], 0.5, 2.5) // = 17.5 / 2 = 8.75
 */
export function windowMean(time: readonly number[], values: readonly number[], start: number, end: number): number {
  requireWindow(time, values, start, end, true)
  return windowIntegralUnchecked(time, values, start, end) / (end - start)
}

/**
 * {@link windowIntegral} and {@link windowMean} for a caller that has checked the samples already
 * (every entry of both arrays a finite number, time strictly increasing): the counts, lengths and
 * window bounds are still checked, with the same messages. The expression engine uses them for
 * the columns of a scope, each checked once (shared/modules/checked-columns.ts), where a
 * 50 000-sample log would otherwise be read three times per call.
 *
 * @param time - sample times, s; finite and strictly increasing (not checked again)
 * @param values - samples, finite (not checked again), as many as time
 * @param start - window start, s, within [time₁, timeₙ]
 * @param end - window end, s, from start to timeₙ (greater than start for the mean)
 * @throws RangeError on too few samples, unequal lengths, or a window outside the log
 * @example
 * windowOfCheckedSamples.integral([0, 1, 2, 3], [0, 10, 10, 0], 0.5, 2.5) // = 17.5
 */
export const windowOfCheckedSamples = {
  integral(time: readonly number[], values: readonly number[], start: number, end: number): number {
    requireWindow(time, values, start, end, false, true)
    return windowIntegralUnchecked(time, values, start, end)
  },
  mean(time: readonly number[], values: readonly number[], start: number, end: number): number {
    requireWindow(time, values, start, end, true, true)
    return windowIntegralUnchecked(time, values, start, end) / (end - start)
  },
}

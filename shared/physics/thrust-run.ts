/**
 * Reduction of one test-stand run the way a careful instructor does it: the load-cell zero taken
 * before and after the run and removed, the run window found from the tared thrust, the peak read
 * through a short moving median, the means and integrals taken over the window.
 *
 * Sources: trapezoid rule, e.g. Press et al., Numerical Recipes, 3rd ed., eq. 4.1.11 (from memory);
 * running medians as smoothers, Tukey, "Exploratory Data Analysis" (1977), ch. 7 (from memory);
 * I = ∫F dt, Sutton & Biblarz, Rocket Propulsion Elements, eq. 2-1 (from memory). The tare, the
 * window threshold and the quiet-stretch rules below are common practice on teaching stands, no
 * published source; each constant says so.
 */
import { medianInPlace } from './statistics'
import { requireInterval, requireObject, requireSameLength, requireSamples } from './validate'
import { requireStrictlyIncreasing, windowIntegralUnchecked } from './window'

// ---------------------------------------------------------------------------------------------
// Constants of the reduction (common practice, no published source).

/** Default run threshold: the window is where the tared thrust is at least 5 % of its peak. */
export const RUN_THRESHOLD = 0.05

/** Fewest samples a log needs for a reduction: a quiet stretch, a run and a tail need some each. */
export const MIN_RUN_SAMPLES = 10

/**
 * The quiet samples before the run end where the 5-sample moving median of the thrust, followed
 * back from its peak, last sits within this fraction of the peak height above its lowest value
 * before the peak: 2 %, well below the 5 % run threshold, so the samples of the rising edge stay
 * out of the zero.
 */
export const QUIET_FRACTION = 0.02

/**
 * The quiet tail at the end of the log is the trailing stretch whose moving median stays within a
 * band around the median of the last 5 samples: the larger of this fraction of the peak (0.5 %)
 * and {@link TAIL_NOISE_BAND} noise standard deviations. Narrow, because a blow-down tail decays
 * slowly and its last decaying samples would otherwise lift the zero.
 */
export const TAIL_FRACTION = 0.005

/** Half-width of the quiet-tail band in noise standard deviations. */
export const TAIL_NOISE_BAND = 4

/**
 * A run must stand more than this many noise standard deviations above the zero (and above the
 * log's lowest moving median). The noise is estimated from the second differences
 * r = F_i − (F_{i−1} + F_{i+1})/2 of the samples below half the log's range, whose standard deviation is √1.5 σ for white noise (derived here: 1 + ¼ + ¼),
 * robustly as 1.4826 × median |r| / √1.5 (the median absolute deviation's consistency factor for
 * normal data; Rousseeuw & Croux, J. Am. Stat. Assoc. 88 (1993), from memory). A smooth run adds
 * almost nothing to the second differences. In simulations of pure white noise for this library,
 * the highest 5-sample moving median stood at most about 3 σ above the zero for 50 to 20 000
 * samples, so 10 σ refuses noise with a wide margin.
 */
export const NOISE_FACTOR = 10

// ---------------------------------------------------------------------------------------------
// Types.

/** The reduced run: the contract of {@link reduceThrustRun}. */
export interface ThrustRun {
  /** Load-cell zero before the run: median of the quiet samples before it, N. */
  zeroBefore: number
  /** Load-cell zero after the run: median of the quiet tail at the end of the log, N; null when the log ends inside the run. */
  zeroAfter: number | null
  /** First crossing of threshold × peak by the tared thrust, s (linear interpolation between samples). */
  start: number
  /** Last crossing of threshold × peak by the tared thrust, s (the last sample's time when the log ends inside the run). */
  end: number
  /** end − start, s. */
  burnTime: number
  /** Trapezoid integral of the tared thrust over the whole log, N·s. */
  totalImpulse: number
  /** Largest tared thrust after a centred 5-sample moving median, N. */
  peakThrust: number
  /** Tared impulse inside [start, end] divided by burnTime, N. */
  meanThrust: number
}

/** Options of {@link reduceThrustRun}. */
export interface ThrustRunOptions {
  /** Fraction of the peak tared thrust that bounds the run window, in (0, 1); default {@link RUN_THRESHOLD}. */
  threshold?: number
}

/**
 * Everything the reduction found, including the sample ranges the zeros were taken over (for
 * {@link tareWithRun}). Not part of the public surface: index.ts exports {@link reduceThrustRun}.
 */
export interface ThrustRunAnalysis extends ThrustRun {
  /** The quiet samples before the run are indices [0, quietBeforeEnd). */
  quietBeforeEnd: number
  /** The quiet tail is indices [quietAfterStart, n); null when the log ends inside the run. */
  quietAfterStart: number | null
}

// ---------------------------------------------------------------------------------------------
// Small numerical helpers.

const med3 = (a: number, b: number, c: number): number => {
  const low = a < b ? a : b
  const high = a < b ? b : a
  const mid = high < c ? high : c
  return low > mid ? low : mid
}

/**
 * Centred 5-sample moving median. The window shrinks symmetrically at the ends (3 samples next to
 * them, the sample itself at them), so the filter stays centred and leaves a monotone stretch
 * exactly as it is.
 *
 * The median of five is med3(e, max(min(a, b), min(c, d)), min(max(a, b), max(c, d))) for the
 * centre e and its neighbours a, b, c, d (checked against sorting for every ordering with ties),
 * written out with plain comparisons: Math.min and Math.max also sort out NaN and −0 and cost
 * several times more, and the samples are finite here.
 */
function movingMedian5(x: ArrayLike<number>, out: Float64Array): Float64Array {
  const n = x.length
  for (let i = 2; i < n - 2; i++) {
    const a = x[i - 2] as number
    const b = x[i - 1] as number
    const c = x[i + 1] as number
    const d = x[i + 2] as number
    const e = x[i] as number
    const abLow = a < b ? a : b
    const abHigh = a < b ? b : a
    const cdLow = c < d ? c : d
    const cdHigh = c < d ? d : c
    const p = abLow > cdLow ? abLow : cdLow
    const q = abHigh < cdHigh ? abHigh : cdHigh
    const low = e < p ? e : p
    const high = e < p ? p : e
    const mid = high < q ? high : q
    out[i] = low > mid ? low : mid
  }
  out[0] = x[0] as number
  out[n - 1] = x[n - 1] as number
  out[1] = med3(x[0] as number, x[1] as number, x[2] as number)
  out[n - 2] = med3(x[n - 3] as number, x[n - 2] as number, x[n - 1] as number)
  return out
}

/** {@link movingMedian5} into `out`, returning the largest filtered value (one pass over the data). */
function movingMedian5Peak(x: Float64Array, out: Float64Array): number {
  movingMedian5(x, out)
  let peak = -Infinity
  for (let i = 0; i < out.length; i++) if ((out[i] as number) > peak) peak = out[i] as number
  return peak
}

/** Median of x[from..to) by selection (Hoare's quickselect) on a copy; from < to. */
function medianOf(x: ArrayLike<number>, from: number, to: number): number {
  const a = new Float64Array(to - from)
  for (let i = from; i < to; i++) a[i - from] = x[i] as number
  return medianInPlace(a)
}

function requireRunSamples(time: readonly number[], thrust: readonly number[]): void {
  requireSamples('time', time, MIN_RUN_SAMPLES)
  requireSamples('thrust', thrust, MIN_RUN_SAMPLES)
  requireSameLength('time', time, 'thrust', thrust)
  requireStrictlyIncreasing('time', time)
}

function thresholdOf(options: ThrustRunOptions | undefined): number {
  if (options === undefined) return RUN_THRESHOLD
  requireObject('options', options)
  if (options.threshold === undefined) return RUN_THRESHOLD
  return requireInterval('options.threshold', options.threshold, { value: 0, open: true }, { value: 1, open: true })
}

/** The zero line: zb up to start, linear to za at end, za after; the tared signal is x − zero. */
function tare(
  t: ArrayLike<number>,
  x: ArrayLike<number>,
  zb: number,
  za: number,
  start: number,
  end: number,
  out: Float64Array,
): Float64Array {
  const slope = end > start ? (za - zb) / (end - start) : 0
  for (let i = 0; i < t.length; i++) {
    const ti = t[i] as number
    const zero = ti <= start ? zb : ti >= end ? za : zb + slope * (ti - start)
    out[i] = (x[i] as number) - zero
  }
  return out
}

/** First and last crossing of `level` by g, interpolated linearly; g reaches level somewhere. */
function crossings(t: ArrayLike<number>, g: Float64Array, level: number): { start: number; end: number } {
  const n = g.length
  let i = 0
  while ((g[i] as number) < level) i++
  let j = n - 1
  while ((g[j] as number) < level) j--
  const cross = (k0: number, k1: number): number => {
    const g0 = g[k0] as number
    const g1 = g[k1] as number
    const t0 = t[k0] as number
    return t0 + (((t[k1] as number) - t0) * (level - g0)) / (g1 - g0)
  }
  const start = i === 0 ? (t[0] as number) : cross(i - 1, i)
  const end = j === n - 1 ? (t[n - 1] as number) : cross(j, j + 1)
  return { start, end }
}

// ---------------------------------------------------------------------------------------------
// The reduction.

/** Most second differences the noise estimate takes from one log (spread evenly over it). */
const NOISE_SAMPLES = 8192

/** Most passes of the window–tare fixed point; the second pass already moves the window by far less than a sample. */
const MAX_PASSES = 4

/** The window has settled when a pass moves its ends by less than this fraction of the log's span in all. */
const WINDOW_SETTLED = 1e-9

function analyse(time: readonly number[], thrust: readonly number[], threshold: number): ThrustRunAnalysis {
  const n = thrust.length
  const smooth = movingMedian5(thrust, new Float64Array(n))

  // The peak of the smoothed thrust, and the quiet samples before it.
  let ip = 0
  for (let i = 1; i < n; i++) if ((smooth[i] as number) > (smooth[ip] as number)) ip = i
  let lowBefore = Infinity
  for (let i = 0; i <= ip; i++) if ((smooth[i] as number) < lowBefore) lowBefore = smooth[i] as number
  let lowest = lowBefore
  for (let i = ip + 1; i < n; i++) if ((smooth[i] as number) < lowest) lowest = smooth[i] as number
  const top = smooth[ip] as number
  if (!(top > lowest)) {
    throw new RangeError(`thrust shows no run above the noise: its 5-sample moving median is flat at ${top}`)
  }
  // Noise: second differences of the samples below half the log's range (all interior samples
  // when fewer than 5 are), as a standard deviation. A long log is sampled every `stride` samples
  // (at most about NOISE_SAMPLES of them): plenty for a median, and it keeps the selection cheap.
  const stride = Math.max(1, Math.floor(n / NOISE_SAMPLES))
  const residual = new Float64Array(Math.ceil(n / stride))
  let count = 0
  for (let pass = 0; pass < 2 && count < 5; pass++) {
    count = 0
    for (let i = 1; i < n - 1; i += stride) {
      if (pass === 1 || (smooth[i] as number) - lowest < 0.5 * (top - lowest)) {
        residual[count++] = Math.abs(
          (thrust[i] as number) - 0.5 * ((thrust[i - 1] as number) + (thrust[i + 1] as number)),
        )
      }
    }
  }
  const noise = (1.4826 / Math.sqrt(1.5)) * medianInPlace(residual.subarray(0, count))
  const noRun = (rise: number, from: string) =>
    new RangeError(
      `thrust shows no run above the noise: its 5-sample moving median rises ${rise} above ${from}, and a run must rise more than ${NOISE_FACTOR} × the noise (standard deviation about ${noise})`,
    )
  if (!(top - lowest > NOISE_FACTOR * noise)) throw noRun(top - lowest, `its lowest value, ${lowest}`)
  if (lowBefore - lowest > threshold * (top - lowest)) {
    throw new RangeError(
      'thrust shows no quiet samples before the run to take the load-cell zero from (the log starts inside the run, or the zero drifts down by more than the run threshold): start logging before the valve opens',
    )
  }

  const quietLevel = lowBefore + QUIET_FRACTION * (top - lowBefore)
  let k = ip
  while (k >= 0 && (smooth[k] as number) > quietLevel) k--
  const quietBeforeEnd = k + 1
  const zeroBefore = medianOf(thrust, 0, quietBeforeEnd)
  const height = top - zeroBefore
  if (!(height > NOISE_FACTOR * noise)) throw noRun(height, `the zero of ${zeroBefore}`)

  // The quiet tail: the trailing stretch that stays within a narrow band of the last samples'
  // median, unless the log still sits above the run threshold at its end.
  const endLevel = medianOf(thrust, n - 5, n)
  let quietAfterStart: number | null = null
  if (endLevel - zeroBefore < threshold * height) {
    const band = Math.max(TAIL_FRACTION * height, TAIL_NOISE_BAND * noise)
    let j = n - 1
    while (j > ip && Math.abs((smooth[j] as number) - endLevel) <= band) j--
    quietAfterStart = Math.min(j + 1, n - 1)
  }
  const zeroAfter = quietAfterStart === null ? null : medianOf(thrust, quietAfterStart, n)
  const za = zeroAfter ?? zeroBefore

  // The window and the tare line depend on each other. A first guess needs no new filtering: the
  // crossings of the moving median less zeroBefore on the way up and less zeroAfter on the way down
  // (where the tare line equals those zeros). Then the line is drawn between the crossings, the
  // tared thrust filtered and the crossings found again, until the window stays put (moves by less
  // than WINDOW_SETTLED of the log's span: the tare line then moves by less than that fraction of
  // the drift, far below any load cell's resolution). Usually the first pass already settles it.
  let start: number
  let end: number
  {
    const levelUp = zeroBefore + threshold * height
    const levelDown = za + threshold * (top - za)
    let i = 0
    while (i < ip && (smooth[i] as number) < levelUp) i++
    let j = n - 1
    while (j > ip && (smooth[j] as number) < levelDown) j--
    const cross = (k0: number, k1: number, level: number): number => {
      const g0 = smooth[k0] as number
      const t0 = time[k0] as number
      return t0 + (((time[k1] as number) - t0) * (level - g0)) / ((smooth[k1] as number) - g0)
    }
    start = i === 0 ? (time[0] as number) : cross(i - 1, i, levelUp)
    end = j === n - 1 ? (time[n - 1] as number) : cross(j, j + 1, levelDown)
  }
  const settledWithin = WINDOW_SETTLED * ((time[n - 1] as number) - (time[0] as number))
  const tared = new Float64Array(n)
  const filtered = new Float64Array(n)
  let peak = -Infinity
  for (let pass = 0; pass < MAX_PASSES; pass++) {
    tare(time, thrust, zeroBefore, za, start, end, tared)
    peak = movingMedian5Peak(tared, filtered)
    const window = crossings(time, filtered, threshold * peak)
    const moved = Math.abs(window.start - start) + Math.abs(window.end - end)
    start = window.start
    end = window.end
    if (moved <= settledWithin) break
  }

  const burnTime = end - start
  return {
    zeroBefore,
    zeroAfter,
    start,
    end,
    burnTime,
    totalImpulse: windowIntegralUnchecked(time, tared, time[0] as number, time[n - 1] as number),
    peakThrust: peak,
    meanThrust: windowIntegralUnchecked(time, tared, start, end) / burnTime,
    quietBeforeEnd,
    quietAfterStart,
  }
}

/**
 * Reduces one logged run: takes the load-cell zero before and after the run, removes it, finds the
 * run window, and gives the impulse, peak and mean thrust.
 *
 * - **zeroBefore**: median of the quiet samples before the run. Following the 5-sample moving
 *   median of the thrust back from its peak, the quiet samples are those up to the last one that
 *   sits within {@link QUIET_FRACTION} (2 %) of the peak height above the lowest moving median
 *   before the peak: the rising edge stays out of the zero.
 * - **zeroAfter**: median of the quiet tail at the end of the log — the trailing stretch whose
 *   moving median stays within max(0.5 % of the peak height, 4 noise standard deviations) of the median of the
 *   last 5 samples. A blow-down tail decays slowly, so the zero comes from the end of the log, not
 *   from just after the threshold crossing. null when the log ends inside the run (the median of
 *   its last 5 samples still at or above threshold × the peak height).
 * - **tared thrust** F − z(t): z = zeroBefore up to start, linear from zeroBefore to zeroAfter
 *   between start and end, zeroAfter after end (zeroBefore throughout when zeroAfter is null).
 * - **start, end**: first and last crossing of threshold × peakThrust by the tared thrust (read
 *   through the same 5-sample moving median, which leaves a monotone edge exactly as logged and
 *   keeps a single ringing sample from opening the window), interpolated linearly between samples.
 *   The window and the tare line depend on each other; the window is found with the line drawn
 *   between the quiet stretches, then again with the line between the crossings, until it stays put.
 * - **totalImpulse** = ∫ (F − z) dt over the whole log (trapezoid rule);
 *   **peakThrust** = max of the 5-sample moving median of F − z (one ringing sample at valve
 *   opening does not become the peak); **meanThrust** = ∫ (F − z) dt over [start, end] / burnTime,
 *   with the integrand interpolated at start and end.
 * - **No run above the noise**: the moving median's peak must rise more than {@link NOISE_FACTOR}
 *   (10) noise standard deviations above zeroBefore, the noise being estimated robustly from the
 *   second differences of the samples below half the log's range (see {@link NOISE_FACTOR}).
 * - A log that starts inside the run (its moving median never comes down near the zero before the
 *   peak) has no zero to take and is refused too.
 *
 * Source: see the file header (trapezoid rule; running medians, Tukey 1977; the rules above are
 * common practice, no published source).
 *
 * @param time - sample times, s, finite, strictly increasing, at least 10 samples
 * @param thrust - load-cell force at those times, N, finite (the logged zero may be any value)
 * @param options - threshold: fraction of the peak tared thrust bounding the window, in (0, 1), default 0.05
 * @returns zeroBefore (N), zeroAfter (N or null), start (s), end (s), burnTime (s), totalImpulse (N·s),
 *   peakThrust (N), meanThrust (N)
 * @throws RangeError for fewer than 10 samples, unequal lengths, time not strictly increasing,
 *   non-finite values, a threshold outside (0, 1), a log that starts inside the run, or no run above the noise
 * @example
 * // 0.3 N zero, 20 N for 1 s (t = 1 … 2 s), 100 Hz, logged from 0 to 3 s:
 * const t = Array.from({ length: 301 }, (_, i) => i / 100)
 * const F = t.map((x) => 0.3 + (x >= 1 && x <= 2 ? 20 : 0))
 * reduceThrustRun(t, F)
 * // → { zeroBefore: 0.3, zeroAfter: 0.3, start ≈ 0.9905, end ≈ 2.0095, burnTime ≈ 1.019,
 * //     totalImpulse = 20.2, peakThrust = 20, meanThrust ≈ 19.82 }
 */
export function reduceThrustRun(
  time: readonly number[],
  thrust: readonly number[],
  options?: ThrustRunOptions,
): ThrustRun {
  return runResult(analyseThrustRun(time, thrust, options))
}

/**
 * {@link reduceThrustRun} with the sample ranges the zeros were taken over, for taring other
 * signals with {@link tareWithRun} without reducing the run again. Same checks and errors.
 *
 * @param time - sample times, s, finite, strictly increasing, at least 10 samples
 * @param thrust - load-cell force at those times, N, finite
 * @param options - threshold, as for {@link reduceThrustRun}
 * @returns the reduced run and quietBeforeEnd (the quiet samples before the run are indices
 *   [0, quietBeforeEnd)) and quietAfterStart (the quiet tail is [quietAfterStart, n), or null)
 * @example
 * analyseThrustRun(t, F).quietBeforeEnd // = 100 for the run of the reduceThrustRun example
 */
export function analyseThrustRun(
  time: readonly number[],
  thrust: readonly number[],
  options?: ThrustRunOptions,
): ThrustRunAnalysis {
  requireRunSamples(time, thrust)
  return analyse(time, thrust, thresholdOf(options))
}

/**
 * The analysis of the same log read with another zero and calibration, offset + gain × thrust
 * (gain > 0), from the analysis of the thrust as logged, without reducing the run again.
 *
 * The reduction commutes with such a change: the moving median, the medians the zeros are taken
 * from, and the maximum commute with it (order is kept for gain > 0); the noise estimate and every
 * height it is compared with scale by the gain alone, and every decision compares one height with
 * a fraction of another, so the quiet stretches, the window's sample indices and its interpolated
 * crossings (ratios of differences) stay where they are. The tared thrust is gain × the tared
 * thrust as logged, so the zeros move as offset + gain × zero and the impulse, peak and mean scale
 * by the gain. Derived here from the steps of the reduction; a test holds it against reducing the
 * moved log. The figures agree with a fresh reduction to rounding (a few parts in 10¹⁵).
 *
 * @param run - the analysis of the thrust as logged ({@link analyseThrustRun})
 * @param offset - added to every sample, N
 * @param gain - multiplying every sample, > 0 and finite
 * @returns the analysis of offset + gain × thrust
 * @throws RangeError when gain is not a positive finite number or offset is not finite
 * @example
 * runOfRescaledThrust(analyseThrustRun(t, F), 0.05, 1.01)
 * // deep-equals analyseThrustRun(t, F.map((f) => 0.05 + 1.01 * f)) to rounding
 */
export function runOfRescaledThrust(run: ThrustRunAnalysis, offset: number, gain: number): ThrustRunAnalysis {
  if (!(Number.isFinite(gain) && gain > 0)) {
    throw new RangeError(`gain must be a positive finite number (got ${String(gain)})`)
  }
  if (!Number.isFinite(offset)) throw new RangeError(`offset must be a finite number (got ${String(offset)})`)
  return {
    zeroBefore: offset + gain * run.zeroBefore,
    zeroAfter: run.zeroAfter === null ? null : offset + gain * run.zeroAfter,
    start: run.start,
    end: run.end,
    burnTime: run.burnTime,
    totalImpulse: gain * run.totalImpulse,
    peakThrust: gain * run.peakThrust,
    meanThrust: gain * run.meanThrust,
    quietBeforeEnd: run.quietBeforeEnd,
    quietAfterStart: run.quietAfterStart,
  }
}

/**
 * The fields of the {@link reduceThrustRun} contract, and no others, from an analysed run.
 *
 * @param run - an analysed run
 * @returns zeroBefore, zeroAfter, start, end, burnTime, totalImpulse, peakThrust, meanThrust
 * @example
 * runResult(analyseThrustRun(t, F)) // deep-equals reduceThrustRun(t, F)
 */
export function runResult(run: ThrustRunAnalysis): ThrustRun {
  return {
    zeroBefore: run.zeroBefore,
    zeroAfter: run.zeroAfter,
    start: run.start,
    end: run.end,
    burnTime: run.burnTime,
    totalImpulse: run.totalImpulse,
    peakThrust: run.peakThrust,
    meanThrust: run.meanThrust,
  }
}

/**
 * Tares another logged signal — a gauge pressure with a transducer zero to take — with the zero and
 * window of the thrust run: its own median over the thrust's quiet samples before the run, its own
 * median over the thrust's quiet tail (the first one throughout when the log ends inside the run),
 * and the same line between the run's start and end as {@link reduceThrustRun} draws for the
 * thrust. Use it only for a signal that reads its zero before and after the run (a chamber behind
 * a closed valve), never for a receiver that is charged before the run.
 *
 * values − z(t), z = z_before up to start, linear to z_after between start and end, z_after after.
 *
 * Source: as {@link reduceThrustRun} (common practice, no published source).
 *
 * @param time - sample times, s, finite, strictly increasing, at least 10 samples
 * @param values - the signal to tare, any unit, finite, as many samples as time
 * @param thrust - the thrust logged at the same times, N, finite
 * @param options - threshold as for {@link reduceThrustRun}
 * @returns the tared signal, in the unit of `values` (its zero read as 0)
 * @throws RangeError as {@link reduceThrustRun}, or when values has another length or a non-finite entry
 * @example
 * // A chamber transducer reading 1.5 kPa at rest and 1.5 + 400 kPa during the run above:
 * tareAlongRun(t, t.map((x) => 1500 + (x >= 1 && x <= 2 ? 400e3 : 0)), F)
 * // → 0 Pa before and after the run, 400 000 Pa during it
 */
export function tareAlongRun(
  time: readonly number[],
  values: readonly number[],
  thrust: readonly number[],
  options?: ThrustRunOptions,
): number[] {
  requireSamples('values', values, MIN_RUN_SAMPLES)
  requireSameLength('time', time, 'values', values)
  return tareWithRun(time, values, analyseThrustRun(time, thrust, options))
}

/**
 * {@link tareAlongRun} with the run already analysed ({@link analyseThrustRun} on the same time column).
 *
 * @param time - the sample times the run was analysed on, s
 * @param values - the signal to tare, finite, as many samples as time
 * @param run - the analysed thrust run
 * @returns the tared signal, in the unit of `values`
 * @throws RangeError when values has another length than time or a non-finite entry
 * @example
 * tareWithRun(t, pc, analyseThrustRun(t, F)) // = tareAlongRun(t, pc, F)
 */
export function tareWithRun(time: readonly number[], values: readonly number[], run: ThrustRunAnalysis): number[] {
  const { before, after } = signalZeros(time, values, run)
  const tared = tare(time, values, before, after, run.start, run.end, new Float64Array(values.length))
  // A plain array like every other column (Array.from of a typed array is several times slower).
  const out = new Array<number>(tared.length)
  for (let i = 0; i < tared.length; i++) out[i] = tared[i] as number
  return out
}

/**
 * The zero of another logged signal before and after the thrust run: its medians over the
 * thrust's quiet samples before the run and over its quiet tail (`after` equals `before` when the
 * log ends inside the run). {@link tareWithRun} removes these along the run's tare line.
 *
 * @param time - the sample times the run was analysed on, s
 * @param values - the signal, finite, as many samples as time
 * @param run - the analysed thrust run
 * @returns before and after, in the unit of values
 * @throws RangeError when values has another length than time or a non-finite entry
 * @example
 * signalZeros(t, pc, analyseThrustRun(t, F)) // → { before: 1500, after: 1500 } for the example above
 */
export function signalZeros(
  time: readonly number[],
  values: readonly number[],
  run: ThrustRunAnalysis,
): { before: number; after: number } {
  requireSamples('values', values, 1)
  requireSameLength('time', time, 'values', values)
  const before = medianOf(values, 0, run.quietBeforeEnd)
  const after = run.quietAfterStart === null ? before : medianOf(values, run.quietAfterStart, values.length)
  return { before, after }
}

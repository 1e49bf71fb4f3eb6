/**
 * The built-in data checks: flags that put a hand-in in the staff review queue when its data look
 * wrong (thrust above the ideal for the logged chamber pressure, a pressure logged in the other
 * sense, the chamber above the receiver that feeds it, gaps in the clock, too few samples).
 */
import type { Assignment, ColumnSpec } from '../modules/schema'
import type { ExpressionValue, SubmissionData } from '../modules/scope'
import { STANDARD_ATMOSPHERE, areaFromDiameter, idealThrust, nozzleFlow, nozzlePressureRatios } from '../physics'
import { UNITS, isUnitSymbol } from '../units'
import { medianInPlace } from '../physics/statistics'
import type { GradeFlag } from './grade'
import { roleKeys } from './roles'
import type { RoleKeys } from './roles'

// ---------------------------------------------------------------------------------------------
// Thresholds of the built-in data checks. None has a published source: each is a plain margin
// chosen above the scatter a teaching stand's instruments show (load cells and pressure
// transducers of about ±1 % of full scale, loggers that sample steadily), so that a flag means a
// mistake rather than noise. They are exported so screens and tests can quote them.

/**
 * Ratio of specific heats for the ideal thrust and the supersonic spans: air. For a hot gas
 * (γ ≈ 1.2–1.3) the ideal thrust at the same pressures is only 1–3 % higher, well inside
 * {@link THRUST_ABOVE_IDEAL_MARGIN}, so the same check serves hot-fire runs.
 */
export const CHECK_GAMMA = 1.4

/**
 * How far the peak logged thrust may exceed the ideal (isentropic, quasi-1D) thrust for the chamber
 * pressure logged at that sample before it is flagged: 10 %. A real nozzle delivers less than the
 * ideal (typically 90–98 % of it), so anything above it is a calibration or data mistake; the margin
 * leaves room for load-cell and transducer error. Common practice, no published source.
 * The ideal here is the larger of the full-flowing thrust and the estimate for a nozzle whose flow
 * separates from the wall (nozzleFlow's separatedThrust): a strongly over-expanded nozzle separates
 * and gives more thrust than it would running full.
 */
export const THRUST_ABOVE_IDEAL_MARGIN = 0.1

/**
 * Width of the centred moving median the thrust-above-ideal check reads the peak through, samples:
 * one ringing sample at valve opening must not become the peak.
 */
export const THRUST_PEAK_MEDIAN_WINDOW = 5

/** How many samples at each end of the log are taken as "at rest" (valve closed): up to 5, at most a quarter of the log. */
export const REST_SAMPLES = 5

/**
 * A pressure declared absolute whose resting value is below this fraction of the ambient pressure
 * looks gauge: an absolute transducer at rest reads the barometric pressure (60–105 kPa on any
 * campus), a gauge one about 0.
 */
export const LOOKS_GAUGE_BELOW = 0.25

/**
 * A pressure declared gauge whose resting value is within this fraction of the ambient pressure
 * (or of one standard atmosphere) looks absolute: a gauge transducer at rest reads about 0. The
 * resting value is the lower of the medians of the first and last {@link REST_SAMPLES} samples, so a
 * receiver log that ends with the receiver closed off at about one atmosphere gauge looks the same
 * and is flagged too; the message asks staff to look, it does not change the grade.
 */
export const LOOKS_ABSOLUTE_BAND = 0.2

/**
 * Error of a pressure transducer as a fraction of its full scale when the module gives none
 * (`fullScaleError` on the column): ±1 %, a teaching stand's usual grade.
 *
 * The chamber may read above the receiver that feeds it by at most the two transducers' errors
 * added together — each `fullScaleError` × its `fullScale` as the module declares them — and at
 * least {@link CHAMBER_ABOVE_RECEIVER_FLOOR}, before it is flagged. A column without a declared
 * full scale counts its largest absolute reading as one (a transducer's span is at least what it
 * logged), which gives less room than the real span would.
 */
export const TRANSDUCER_FULL_SCALE_ERROR = 0.01
/** Smallest margin of the chamber-above-receiver check, Pa: noise at rest must not trip it. */
export const CHAMBER_ABOVE_RECEIVER_FLOOR = 5000

/** A step between samples longer than this multiple of the median step is a gap in the log. */
export const TIME_GAP_FACTOR = 5

/**
 * Fewest samples with thrust above {@link THRUST_ACTIVE_FRACTION} of its peak: with fewer, the
 * trapezoid rule misses much of the thrust curve's shape and the total impulse is unreliable. 20
 * samples over a run keep the trapezoid error of a smooth, single-humped curve to a few per cent.
 */
export const MIN_THRUST_SAMPLES = 20
/** Thrust above this fraction of the peak counts as "during the run" for {@link MIN_THRUST_SAMPLES}. */
export const THRUST_ACTIVE_FRACTION = 0.05

/**
 * A run whose thrust, while the nozzle is choked, is below this fraction of the ideal thrust for
 * the logged chamber pressure is flagged: 40 %. A real nozzle gives most of the ideal (85–98 %;
 * even a poor, separated one well over half of it), while a load cell logged in kgf and read as
 * newtons gives 1/9.80665 ≈ 10 % of the true thrust and one logged in lbf 1/4.448 ≈ 22 % (the
 * factors are unit definitions, NIST SP 811). 40 % sits between the two with room on both sides.
 * Common practice, no published source.
 */
export const THRUST_BELOW_IDEAL_FRACTION = 0.4
/**
 * Samples of the centred moving median that thrust and chamber pressure are read through for the
 * thrust-below-ideal check, so that one ringing or dropped sample cannot decide it.
 */
export const THRUST_BELOW_IDEAL_MEDIAN = 5
/** Fewest choked samples the thrust-below-ideal check judges a run on; with fewer it says nothing. */
export const THRUST_BELOW_IDEAL_MIN_SAMPLES = 10
/**
 * At most this many choked samples, evenly spread over the choked part of the run, are compared
 * with the ideal thrust: the ideal needs the area–Mach relation solved for each, and the median of
 * 200 ratios is as good a verdict as that of 50 000.
 */
export const THRUST_BELOW_IDEAL_SAMPLES = 200

// ---------------------------------------------------------------------------------------------
// Built-in data checks.

/** The role-bearing data of a submission, in SI with absolute pressures. */
interface RoleData {
  keys: RoleKeys
  time?: readonly number[]
  thrust?: readonly number[]
  chamber?: readonly number[]
  receiver?: readonly number[]
  ambient?: number
  throatArea?: number
  exitArea?: number
}

function numbers(scope: Record<string, ExpressionValue>, key: string | undefined): readonly number[] | undefined {
  if (key === undefined) return undefined
  const v = scope[key]
  return Array.isArray(v) ? (v as readonly number[]) : undefined
}

function scalar(scope: Record<string, ExpressionValue>, key: string | undefined): number | undefined {
  if (key === undefined) return undefined
  const v = scope[key]
  return typeof v === 'number' ? v : undefined
}

export function roleData(assignment: Assignment, scope: Record<string, ExpressionValue>): RoleData {
  const keys = roleKeys(assignment)
  const out: RoleData = { keys }
  const time = numbers(scope, keys.time)
  const thrust = numbers(scope, keys.thrust)
  const chamber = numbers(scope, keys.chamberPressure)
  const receiver = numbers(scope, keys.receiverPressure)
  const ambient = scalar(scope, keys.ambientPressure)
  const throat = scalar(scope, keys.throatDiameter)
  const exit = scalar(scope, keys.exitDiameter)
  if (time) out.time = time
  if (thrust) out.thrust = thrust
  if (chamber) out.chamber = chamber
  if (receiver) out.receiver = receiver
  if (ambient !== undefined) out.ambient = ambient
  if (throat !== undefined && throat > 0) out.throatArea = areaFromDiameter(throat)
  if (exit !== undefined && exit > 0) out.exitArea = areaFromDiameter(exit)
  return out
}

/** 3 significant figures, without exponent for everyday magnitudes. */
function fmt(x: number): string {
  if (x === 0 || !Number.isFinite(x)) return String(x)
  const a = Math.abs(x)
  if (a >= 1e-3 && a < 1e7) return String(Number(x.toPrecision(3)))
  return x.toPrecision(3)
}

const kPa = (pa: number) => `${fmt(pa / 1000)} kPa`

function argmax(xs: readonly number[]): number {
  let best = 0
  for (let i = 1; i < xs.length; i++) if ((xs[i] as number) > (xs[best] as number)) best = i
  return best
}

/** Median of a copy (the log's own array is left as it is). */
function median(xs: ArrayLike<number>): number {
  return medianInPlace(Float64Array.from(xs))
}

/** The ideal thrust, 0 when the chamber is not above ambient (no flow), undefined when the library refuses the inputs. */
export function idealAt(p0: number, d: RoleData): number | undefined {
  if (d.ambient === undefined || d.throatArea === undefined || d.exitArea === undefined) return undefined
  if (!(p0 > d.ambient)) return 0
  try {
    return idealThrust(p0, d.ambient, d.throatArea, d.exitArea, CHECK_GAMMA)
  } catch (error) {
    if (error instanceof RangeError) return undefined
    throw error
  }
}

export function dataFlags(
  assignment: Assignment,
  data: SubmissionData,
  scope: Record<string, ExpressionValue>,
): GradeFlag[] {
  const d = roleData(assignment, scope)
  const flags: GradeFlag[] = []
  const thrustFlag = thrustAboveIdeal(d)
  if (thrustFlag) flags.push(thrustFlag)
  for (const which of ['chamber', 'receiver'] as const) {
    const f = pressureSense(data, d, which)
    if (f) flags.push(f)
  }
  const above = chamberAboveReceiver(d)
  if (above) flags.push(above)
  const gap = timeGap(d)
  if (gap) flags.push(gap)
  const few = tooFewSamples(d)
  if (few) flags.push(few)
  const below = thrustBelowIdeal(d)
  if (below) flags.push(below)
  return flags
}

/**
 * Median of the samples in a centred window of {@link THRUST_PEAK_MEDIAN_WINDOW} around index i,
 * the window shortened at the ends of the log (an even count gives the mean of the middle two).
 * `sorted` is scratch space of at least the window's length.
 */
function windowMedian(xs: readonly number[], i: number, sorted: Float64Array): number {
  const half = THRUST_PEAK_MEDIAN_WINDOW >> 1
  const to = Math.min(xs.length - 1, i + half)
  let n = 0
  for (let k = Math.max(0, i - half); k <= to; k++) {
    // Insertion into the sorted window: five values at most.
    const v = xs[k] as number
    let j = n++
    while (j > 0 && (sorted[j - 1] as number) > v) {
      sorted[j] = sorted[j - 1] as number
      j--
    }
    sorted[j] = v
  }
  return n % 2 === 1 ? (sorted[n >> 1] as number) : ((sorted[(n >> 1) - 1] as number) + (sorted[n >> 1] as number)) / 2
}

/**
 * The thrust a nozzle can at most give at chamber pressure p0: the full-flowing ideal thrust and,
 * when the flow separates (Summerfield criterion), the separated-nozzle estimate; 0 and no
 * separated estimate when the chamber is not above ambient; undefined when the library refuses the
 * inputs.
 */
export function thrustCeilingAt(
  p0: number,
  d: RoleData,
): { fullFlowing: number; separated: number | null } | undefined {
  if (d.ambient === undefined || d.throatArea === undefined || d.exitArea === undefined) return undefined
  if (!(p0 > d.ambient)) return { fullFlowing: 0, separated: null }
  try {
    // Thrust does not depend on T0 or R for given pressures and areas (see idealThrust).
    const flow = nozzleFlow({
      chamberPressure: p0,
      chamberTemperature: 1,
      ambientPressure: d.ambient,
      throatArea: d.throatArea,
      exitArea: d.exitArea,
      gamma: CHECK_GAMMA,
      gasConstant: 1,
    })
    return { fullFlowing: flow.thrust, separated: flow.separatedThrust }
  } catch (error) {
    if (error instanceof RangeError) return undefined
    throw error
  }
}

function thrustAboveIdeal(d: RoleData): GradeFlag | undefined {
  if (!d.thrust || !d.chamber || d.thrust.length === 0) return undefined
  // The peak read through the moving median, and the chamber pressure read the same way there, so
  // neither a ringing thrust sample nor a dropout in the chamber reading decides the check.
  const scratch = new Float64Array(THRUST_PEAK_MEDIAN_WINDOW)
  const thrust = d.thrust
  const n = thrust.length
  const half = THRUST_PEAK_MEDIAN_WINDOW >> 1
  let i = 0
  let peak = -Infinity
  for (let k = 0; k < n; k++) {
    // A full window's median is above the peak so far only when more than half its samples are:
    // most windows after the peak are passed over with a count instead of a sort.
    if (k >= half && k < n - half) {
      let above = 0
      for (let m = k - half; m <= k + half; m++) if ((thrust[m] as number) > peak) above++
      if (above <= half) continue
    }
    const smoothed = windowMedian(thrust, k, scratch)
    if (smoothed > peak) {
      peak = smoothed
      i = k
    }
  }
  const p0 = windowMedian(d.chamber, i, scratch)
  const ceiling = thrustCeilingAt(p0, d)
  if (ceiling === undefined) return undefined
  const ideal = Math.max(ceiling.fullFlowing, ceiling.separated ?? 0)
  if (!(peak > (1 + THRUST_ABOVE_IDEAL_MARGIN) * ideal) || !(peak > 0)) return undefined
  const at = d.time ? ` at t = ${fmt(d.time[i] as number)} s` : ''
  const separatedWords =
    ceiling.separated !== null
      ? ` That ideal already allows for the flow separating from the nozzle wall, which at this pressure gives more than the ${fmt(ceiling.fullFlowing)} N of a nozzle running full.`
      : ''
  const what =
    ideal > 0
      ? `The peak thrust, ${fmt(peak)} N${at}, is ${fmt((peak / ideal - 1) * 100)} % above the ideal thrust of ${fmt(ideal)} N for the chamber pressure logged at that moment (${kPa(p0)} absolute).${separatedWords}`
      : `The peak thrust, ${fmt(peak)} N${at}, was logged while the chamber pressure (${kPa(p0)} absolute) was not above the ambient pressure (${kPa(d.ambient as number)}), when an ideal nozzle gives no thrust at all.`
  return {
    code: 'thrust-above-ideal',
    message: `${what} A real nozzle gives less than the ideal; check the load-cell calibration and whether the chamber pressure is gauge or absolute.`,
    detail: {
      sample: i + 1,
      ...(d.time ? { time: d.time[i] as number } : {}),
      peakThrust: peak,
      idealThrust: ideal,
      fullFlowingThrust: ceiling.fullFlowing,
      ...(ceiling.separated !== null ? { separatedThrust: ceiling.separated } : {}),
      chamberPressure: p0,
      margin: THRUST_ABOVE_IDEAL_MARGIN,
      medianWindow: THRUST_PEAK_MEDIAN_WINDOW,
    },
  }
}

/** Median of the first and of the last few samples; the lower is the resting value. */
function restingValue(xs: readonly number[]): number | undefined {
  const k = Math.min(REST_SAMPLES, Math.floor(xs.length / 4))
  if (k < 1) return undefined
  return Math.min(median(xs.slice(0, k)), median(xs.slice(xs.length - k)))
}

function pressureSense(data: SubmissionData, d: RoleData, which: 'chamber' | 'receiver'): GradeFlag | undefined {
  const key = which === 'chamber' ? d.keys.chamberPressure : d.keys.receiverPressure
  const values = which === 'chamber' ? d.chamber : d.receiver
  if (key === undefined || !values || d.ambient === undefined) return undefined
  const spec = d.keys.table?.columns.find((c) => c.key === key)
  const sense = data.pressures?.[key] ?? spec?.pressure
  const rest = restingValue(values)
  if (rest === undefined || sense === undefined) return undefined
  const pa = d.ambient
  const name = which === 'chamber' ? 'chamber pressure' : 'receiver pressure'
  const Name = which === 'chamber' ? 'The chamber pressure' : 'The receiver pressure'
  // The value as logged: the scope added the ambient to a gauge column.
  const logged = sense === 'gauge' ? rest - pa : rest
  const detail = { column: key, declared: sense, restingValue: logged, ambientPressure: pa }
  if (sense === 'absolute' && logged < LOOKS_GAUGE_BELOW * pa) {
    return {
      code: 'pressure-looks-gauge',
      message: `${Name} is declared absolute, but at rest (the start or end of the log) it reads about ${kPa(logged)}, where an absolute reading would be near the barometric pressure (${kPa(pa)}). It looks like a gauge reading: check the gauge/absolute choice for this column.`,
      detail,
    }
  }
  if (
    sense === 'gauge' &&
    (Math.abs(logged - pa) <= LOOKS_ABSOLUTE_BAND * pa ||
      Math.abs(logged - STANDARD_ATMOSPHERE) <= LOOKS_ABSOLUTE_BAND * STANDARD_ATMOSPHERE)
  ) {
    return {
      code: 'pressure-looks-absolute',
      message: `${Name} is declared gauge, but at rest (the start or end of the log) it reads about ${kPa(logged)}, close to the barometric pressure (${kPa(pa)}), where a gauge reading would be near 0. It looks like an absolute reading: check the gauge/absolute choice for the ${name}.`,
      detail,
    }
  }
  return undefined
}

/**
 * A pressure transducer's error band, Pa: its error fraction × its full scale in Pa (the span, so
 * gauge or absolute does not matter), or × the largest reading when the module declares no full scale.
 */
function transducerError(spec: ColumnSpec | undefined, peakReading: number): number {
  const fraction = spec?.fullScaleError ?? TRANSDUCER_FULL_SCALE_ERROR
  if (spec?.fullScale !== undefined && isUnitSymbol(spec.unit)) {
    const unit = UNITS[spec.unit]
    return fraction * Math.abs(unit.toSI(spec.fullScale) - unit.toSI(0))
  }
  return fraction * Math.max(0, peakReading)
}

function chamberAboveReceiver(d: RoleData): GradeFlag | undefined {
  const { chamber, receiver } = d
  if (!chamber || !receiver || chamber.length === 0) return undefined
  let worst = 0
  let peakReceiver = -Infinity
  for (let i = 0; i < chamber.length; i++) {
    if ((chamber[i] as number) - (receiver[i] as number) > (chamber[worst] as number) - (receiver[worst] as number))
      worst = i
    if ((receiver[i] as number) > peakReceiver) peakReceiver = receiver[i] as number
  }
  const excess = (chamber[worst] as number) - (receiver[worst] as number)
  let peakChamber = -Infinity
  for (const p of chamber) if (p > peakChamber) peakChamber = p
  const margin = Math.max(
    transducerError(
      d.keys.table?.columns.find((c) => c.key === d.keys.chamberPressure),
      peakChamber,
    ) +
      transducerError(
        d.keys.table?.columns.find((c) => c.key === d.keys.receiverPressure),
        peakReceiver,
      ),
    CHAMBER_ABOVE_RECEIVER_FLOOR,
  )
  if (!(excess > margin)) return undefined
  const at = d.time ? ` at t = ${fmt(d.time[worst] as number)} s` : ''
  return {
    code: 'chamber-above-receiver',
    message: `The chamber pressure reads ${kPa(excess)} above the receiver pressure that feeds it${at} (${kPa(chamber[worst] as number)} against ${kPa(receiver[worst] as number)}, absolute), more than the ${kPa(margin)} the two transducers' error allows. Air flows from the receiver to the chamber, so the chamber cannot be higher: check whether the two pressure columns are swapped or one is gauge and the other absolute.`,
    detail: {
      sample: worst + 1,
      ...(d.time ? { time: d.time[worst] as number } : {}),
      chamberPressure: chamber[worst] as number,
      receiverPressure: receiver[worst] as number,
      margin,
    },
  }
}

function timeGap(d: RoleData): GradeFlag | undefined {
  const t = d.time
  if (!t || t.length < 3) return undefined
  // The steps are selected in place for their median, and worked out again from the times below
  // (the same subtraction, so the same numbers): one array of the log's length instead of two.
  const steps = new Float64Array(t.length - 1)
  for (let i = 1; i < t.length; i++) steps[i - 1] = (t[i] as number) - (t[i - 1] as number)
  const typical = medianInPlace(steps)
  if (!(typical > 0)) return undefined
  const step = (i: number) => (t[i + 1] as number) - (t[i] as number)
  let count = 0
  let largest = -1
  for (let i = 0; i < t.length - 1; i++) {
    const s = step(i)
    if (s > TIME_GAP_FACTOR * typical) {
      count++
      if (largest < 0 || s > step(largest)) largest = i
    }
  }
  if (largest < 0) return undefined
  const gap = step(largest)
  return {
    code: 'time-gap',
    message: `The log has ${count === 1 ? 'a gap' : `${count} gaps`} between samples: the largest, ${fmt(gap)} s after t = ${fmt(t[largest] as number)} s, is ${fmt(gap / typical)} times the usual step of ${fmt(typical)} s. Samples may be missing; the impulse is integrated straight across a gap.`,
    detail: {
      gaps: count,
      largestGap: gap,
      after: t[largest] as number,
      sample: largest + 2,
      medianStep: typical,
      factor: TIME_GAP_FACTOR,
    },
  }
}

function tooFewSamples(d: RoleData): GradeFlag | undefined {
  const thrust = d.thrust
  if (!thrust || thrust.length === 0) return undefined
  const peak = thrust[argmax(thrust)] as number
  if (!(peak > 0)) return undefined
  let active = 0
  for (const f of thrust) if (f > THRUST_ACTIVE_FRACTION * peak) active++
  if (active >= MIN_THRUST_SAMPLES) return undefined
  return {
    code: 'too-few-samples',
    message: `Only ${active} sample${active === 1 ? '' : 's'} of the log have thrust above ${fmt(THRUST_ACTIVE_FRACTION * 100)} % of the peak; at least ${MIN_THRUST_SAMPLES} are needed to integrate the impulse well. Log faster or longer.`,
    detail: { samples: active, needed: MIN_THRUST_SAMPLES },
  }
}

/** Median of the samples within `half` of index i (fewer at the ends of the log). */
function medianWithin(xs: readonly number[], i: number, half: number): number {
  const window = xs.slice(Math.max(0, i - half), Math.min(xs.length, i + half + 1))
  window.sort((a, b) => a - b)
  const mid = window.length >> 1
  return window.length % 2 === 1 ? (window[mid] as number) : ((window[mid - 1] as number) + (window[mid] as number)) / 2
}

/**
 * Thrust far below the ideal while the nozzle is choked: the signature of a force unit read wrong
 * (kgf or lbf taken as newtons). Judged on the median of F / F_ideal over the choked part of the
 * run (pa/p0 below the nozzle's choke limit), thrust and chamber pressure each read through a short
 * moving median; the start and end of the run, where the valve moves, do not sway a median.
 */
function thrustBelowIdeal(d: RoleData): GradeFlag | undefined {
  const { thrust, chamber, ambient, throatArea, exitArea } = d
  if (!thrust || !chamber || ambient === undefined || throatArea === undefined || exitArea === undefined)
    return undefined
  if (!(ambient > 0) || !(exitArea >= throatArea)) return undefined
  let chokeLimit: number
  try {
    chokeLimit = nozzlePressureRatios(exitArea / throatArea, CHECK_GAMMA).chokeLimit
  } catch (error) {
    if (error instanceof RangeError) return undefined
    throw error
  }
  // Choked while pa/p0 < chokeLimit, that is p0 above this.
  const chokedAbove = ambient / chokeLimit
  // The choked samples are counted, then walked again for every stride-th of them (no list of
  // indices as long as the log).
  let candidates = 0
  for (let i = 0; i < chamber.length; i++) if ((chamber[i] as number) > chokedAbove) candidates++
  if (candidates < THRUST_BELOW_IDEAL_MIN_SAMPLES) return undefined
  const half = THRUST_BELOW_IDEAL_MEDIAN >> 1
  const stride = Math.max(1, candidates / THRUST_BELOW_IDEAL_SAMPLES)
  const ratios: number[] = []
  const used: number[] = []
  let k = 0
  let c = 0
  for (let i = 0; i < chamber.length && k < candidates; i++) {
    if (!((chamber[i] as number) > chokedAbove)) continue
    // i is choked sample number c; it is compared when it is the one the stride lands on.
    if (c++ !== Math.floor(k)) continue
    k += stride
    const p0 = medianWithin(chamber, i, half)
    if (!(p0 > chokedAbove)) continue
    const ideal = idealAt(p0, d)
    if (ideal === undefined || !(ideal > 0)) continue
    ratios.push(medianWithin(thrust, i, half) / ideal)
    used.push(i)
  }
  if (ratios.length < THRUST_BELOW_IDEAL_MIN_SAMPLES) return undefined
  const ratio = median(ratios)
  if (!(ratio < THRUST_BELOW_IDEAL_FRACTION)) return undefined
  const first = used[0] as number
  const last = used[used.length - 1] as number
  const when = d.time ? ` (t = ${fmt(d.time[first] as number)} to ${fmt(d.time[last] as number)} s)` : ''
  return {
    code: 'thrust-below-ideal',
    message:
      `While the nozzle was choked${when}, the logged thrust was only about ${fmt(ratio * 100)} % of the ideal thrust for the logged chamber pressure, where a real nozzle gives most of it (85–98 %). ` +
      'So low a thrust usually means a unit mistake: a load cell logged in kgf but read as newtons gives 1/9.81 (about 10 %) of the true thrust, one logged in lbf 1/4.45 (about 22 %). ' +
      "Check the unit chosen for the thrust column, then the load cell's calibration.",
    detail: {
      ratio,
      chokedSamples: candidates,
      comparedSamples: ratios.length,
      ...(d.time ? { from: d.time[first] as number, to: d.time[last] as number } : {}),
      threshold: THRUST_BELOW_IDEAL_FRACTION,
    },
  }
}

/**
 * The grading engine: a submission's own data → the expected value of every reported result, each
 * check within tolerance with its points, the score with any late penalty, and flags that put the
 * submission in the staff review queue (built-in data checks and the module's review rules).
 *
 * Pure and synchronous, shared by the server (grading on submit, regrades) and the browser (the
 * chart). Expected values always come from the module's expressions over this submission's data
 * (shared/modules/expressions.ts), never from a stored answer key.
 *
 * Data are in SI as `parseLog` gives them (see {@link GradeInput}); pressures are made absolute
 * with the submission's ambient pressure before any expression or check sees them.
 */
import { ExpressionError, evaluateExpression } from '../modules/expressions'
import { valueFromSI, valueToSI } from '../modules/quantities'
import type { Assignment, ResultSpec } from '../modules/schema'
import { buildExpressionScope } from '../modules/scope'
import type { ExpressionValue, SubmissionData } from '../modules/scope'
import { STANDARD_ATMOSPHERE, areaFromDiameter, idealThrust, nozzlePressureRatios } from '../physics'
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
 */
export const THRUST_ABOVE_IDEAL_MARGIN = 0.1

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
 * The chamber may read above the receiver that feeds it by at most this fraction of the peak
 * receiver pressure (absolute), and at least {@link CHAMBER_ABOVE_RECEIVER_FLOOR}, before it is
 * flagged: twice the error of two ±1 % transducers.
 */
export const CHAMBER_ABOVE_RECEIVER_MARGIN = 0.02
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
 * Slack added to every tolerance so that a value exactly on the boundary passes even after a unit
 * conversion's rounding (1 part in 10⁹ of the tolerance, 1 part in 10¹² of the expected value).
 */
const BOUNDARY_SLACK = 1e-9

// ---------------------------------------------------------------------------------------------
// Types.

/** Codes of the built-in flags; the module's review rules add `rule:<key>`. */
export const FLAG_CODES = [
  'thrust-above-ideal',
  'pressure-looks-gauge',
  'pressure-looks-absolute',
  'chamber-above-receiver',
  'time-gap',
  'too-few-samples',
  'identical-file',
  'expression-failed',
] as const
export type BuiltInFlagCode = (typeof FLAG_CODES)[number]
export type FlagCode = BuiltInFlagCode | `rule:${string}`

/** A reason for staff to look at a submission. */
export interface GradeFlag {
  code: FlagCode
  /** Plain words, for the student and the teaching assistant. */
  message: string
  /** Numbers and names behind the message (SI units unless the key says otherwise). */
  detail?: Record<string, number | string>
}

export type CheckOutcome = 'pass' | 'partial' | 'fail' | 'error'

/** One reported result checked against its expected value. Values are in the result's unit. */
export interface CheckResult {
  key: string
  label: string
  unit: string
  /** What the student reported (null when nothing usable was reported). */
  reported: number | null
  /** The spec's expression over this submission's data (null when it could not be computed). */
  expected: number | null
  /** |reported − expected|. */
  absError: number | null
  /** |reported − expected| / |expected|; null when expected is 0 or either value is missing. */
  relError: number | null
  /** Effective absolute tolerance max(absolute, relative × |expected|); null without an expected value. */
  tolerance: number | null
  pointsPossible: number
  pointsAwarded: number
  /** Within tolerance (full points). */
  pass: boolean
  outcome: CheckOutcome
  /** Why the expected value could not be computed (outcome 'error'). */
  error?: string
}

export interface GradeResult {
  checks: CheckResult[]
  /** Sum of the points awarded, before any late penalty. */
  rawScore: number
  /** rawScore × (1 − latePenalty). */
  score: number
  /** Sum of the points possible. */
  maxScore: number
  /** Fraction taken off for lateness, 0–1. */
  latePenalty: number
  flags: GradeFlag[]
}

/** What the grading engine needs. */
export interface GradeInput {
  assignment: Assignment
  /**
   * The submission's data in SI: table columns as `parseLog` gives them, measurements converted
   * from what the student typed with `valueToSI`. Pressures in Pa in the sense they were read;
   * `data.pressures` says gauge or absolute per key where it differs from the spec (parseLog's
   * `pressures`, the form's gauge/absolute choice). `data.results` is ignored: see `reported`.
   */
  data: SubmissionData
  /** Result key → the reported value in the result's own unit (already converted to it from what was typed). */
  reported: Readonly<Record<string, number>>
  /** Fraction of the score taken off for lateness, 0–1 (0.2 = 20 %). */
  latePenalty?: number
}

/** Message of the flag the server raises when a file is byte-identical to another group's (sha256). */
export const IDENTICAL_FILE_MESSAGE =
  "The uploaded log is byte-for-byte identical to a file another lab group submitted in this course. Every group's run gives its own log; a teaching assistant will ask about it."

/**
 * The flag for a log identical to another group's. The server decides it (sha256 of the raw bytes
 * against the course's other submissions); this gives the code and the words.
 *
 * @param detail - e.g. { otherSubmission: 812, otherGroup: 'A1' }
 */
export function identicalFileFlag(detail?: Record<string, number | string>): GradeFlag {
  return detail === undefined
    ? { code: 'identical-file', message: IDENTICAL_FILE_MESSAGE }
    : { code: 'identical-file', message: IDENTICAL_FILE_MESSAGE, detail }
}

// ---------------------------------------------------------------------------------------------
// Grading.

function round6(x: number): number {
  return Math.round(x * 1e6) / 1e6
}

function errorText(error: unknown): string {
  return error instanceof Error ? error.message : String(error)
}

function checkResult(spec: ResultSpec, scope: Record<string, ExpressionValue>, reportedValue: number | undefined): CheckResult {
  const reported = typeof reportedValue === 'number' && Number.isFinite(reportedValue) ? reportedValue : null
  const base = { key: spec.key, label: spec.label, unit: spec.unit, reported, pointsPossible: spec.points }
  let expected: number
  try {
    const si = evaluateExpression(spec.expected, scope)
    if (typeof si !== 'number') throw new ExpressionError('the expression gives true/false, not a number')
    expected = valueFromSI(si, spec.unit)
    if (!Number.isFinite(expected)) throw new ExpressionError(`the expected value is ${expected} in ${spec.unit}`)
  } catch (error) {
    return {
      ...base,
      expected: null,
      absError: null,
      relError: null,
      tolerance: null,
      pointsAwarded: 0,
      pass: false,
      outcome: 'error',
      error: errorText(error),
    }
  }
  const tolerance = Math.max(spec.tolerance.absolute ?? 0, (spec.tolerance.relative ?? 0) * Math.abs(expected))
  if (reported === null) {
    return { ...base, expected, absError: null, relError: null, tolerance, pointsAwarded: 0, pass: false, outcome: 'fail' }
  }
  const absError = Math.abs(reported - expected)
  const relError = expected === 0 ? null : absError / Math.abs(expected)
  const slack = BOUNDARY_SLACK * tolerance + 1e-12 * Math.abs(expected)
  let outcome: CheckOutcome = 'fail'
  let pointsAwarded = 0
  if (absError <= tolerance + slack) {
    outcome = 'pass'
    pointsAwarded = spec.points
  } else if (spec.partial && absError <= spec.partial.within * tolerance + slack) {
    outcome = 'partial'
    pointsAwarded = round6(spec.points * spec.partial.fraction)
  }
  return { ...base, expected, absError, relError, tolerance, pointsAwarded, pass: outcome === 'pass', outcome }
}

/**
 * Grades one submission: every result against the spec's expression over this submission's data,
 * the score with the late penalty, and the flags.
 *
 * - pass when |reported − expected| ≤ max(absolute tolerance, relative tolerance × |expected|);
 *   with a partial-credit band, within `within` × that tolerance gives `fraction` of the points;
 * - a result whose expression throws on these data is outcome 'error' with 0 points, and an
 *   'expression-failed' flag tells staff;
 * - a result not reported (or not a finite number) fails with 0 points.
 *
 * @param input - the assignment, the data in SI, the reported results in their units, the late penalty
 * @returns checks, raw and penalised score, maximum, flags
 * @throws ScopeError when the data do not fit the assignment (a missing column or measurement, a
 *   non-finite value); parseLog and the form's validation are meant to catch those first
 * @throws RangeError when latePenalty is not a number from 0 to 1
 * @example
 * gradeSubmission({ assignment, data, reported: { impulse: 98.5, … } })
 * // → { checks: [{ key: 'impulse', expected: 98, outcome: 'pass', pointsAwarded: 2, … }, …], score: …, flags: [] }
 */
export function gradeSubmission(input: GradeInput): GradeResult {
  const latePenalty = input.latePenalty ?? 0
  if (typeof latePenalty !== 'number' || !(latePenalty >= 0 && latePenalty <= 1)) {
    throw new RangeError(`latePenalty must be a fraction from 0 to 1 (got ${String(latePenalty)})`)
  }
  const { assignment, reported } = input
  const data: SubmissionData = { tables: input.data.tables, measurements: input.data.measurements, ...(input.data.pressures ? { pressures: input.data.pressures } : {}) }
  const scope = buildExpressionScope(assignment, data, { units: 'si' })

  const flags: GradeFlag[] = []
  const checks = assignment.results.map((spec) => {
    const check = checkResult(spec, scope, reported[spec.key])
    if (check.outcome === 'error') {
      flags.push({
        code: 'expression-failed',
        message: `The expected value of "${spec.label}" could not be computed from this submission's data (${check.error}). A teaching assistant will grade it by hand.`,
        detail: { result: spec.key, error: check.error ?? '' },
      })
    }
    return check
  })

  flags.push(...dataFlags(assignment, data, scope))
  flags.push(...ruleFlags(assignment, scope, reported))

  const rawScore = round6(checks.reduce((sum, c) => sum + c.pointsAwarded, 0))
  const maxScore = round6(checks.reduce((sum, c) => sum + c.pointsPossible, 0))
  return { checks, rawScore, score: round6(rawScore * (1 - latePenalty)), maxScore, latePenalty, flags }
}

/** The module's review rules, over the data and the reported results in SI. */
function ruleFlags(assignment: Assignment, dataScope: Record<string, ExpressionValue>, reported: Readonly<Record<string, number>>): GradeFlag[] {
  if (assignment.reviewRules.length === 0) return []
  const scope: Record<string, ExpressionValue> = Object.assign(Object.create(null) as Record<string, ExpressionValue>, dataScope)
  const missing: string[] = []
  for (const r of assignment.results) {
    const value = reported[r.key]
    if (typeof value === 'number' && Number.isFinite(value)) scope[r.key] = valueToSI(value, r.unit)
    else missing.push(r.key)
  }
  const flags: GradeFlag[] = []
  for (const rule of assignment.reviewRules) {
    let value: number | boolean
    try {
      value = evaluateExpression(rule.when, scope)
    } catch (error) {
      // A rule about a result the student left blank cannot be judged; the failed check says enough.
      if (missing.some((key) => new RegExp(`\\b${key}\\b`).test(rule.when))) continue
      flags.push({
        code: 'expression-failed',
        message: `The review rule "${rule.key}" could not be evaluated on this submission (${errorText(error)}). A teaching assistant will look at the data.`,
        detail: { rule: rule.key, error: errorText(error) },
      })
      continue
    }
    if (typeof value !== 'boolean') {
      flags.push({
        code: 'expression-failed',
        message: `The review rule "${rule.key}" gives the number ${value} instead of true or false. A teaching assistant will look at the data.`,
        detail: { rule: rule.key, error: 'not true or false' },
      })
    } else if (value) {
      flags.push({ code: `rule:${rule.key}`, message: rule.reason, detail: { rule: rule.key } })
    }
  }
  return flags
}

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

function roleData(assignment: Assignment, scope: Record<string, ExpressionValue>): RoleData {
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

/**
 * Median by selection (Hoare's quickselect, expected O(n)) on a copy: the time-gap check takes the
 * median of 50 000 steps, where a full sort would cost several times more.
 */
function median(xs: ArrayLike<number>): number {
  const a = Float64Array.from(xs)
  const n = a.length
  const mid = n >> 1
  let lo = 0
  let hi = n - 1
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1] as number
    let i = lo
    let j = hi
    while (i <= j) {
      while ((a[i] as number) < pivot) i++
      while ((a[j] as number) > pivot) j--
      if (i <= j) {
        const t = a[i] as number
        a[i] = a[j] as number
        a[j] = t
        i++
        j--
      }
    }
    if (mid <= j) hi = j
    else if (mid >= i) lo = i
    else break
  }
  const upper = a[mid] as number
  if (n % 2 === 1) return upper
  // Everything left of mid is ≤ a[mid]; the other middle value is the largest of them.
  let lower = -Infinity
  for (let k = 0; k < mid; k++) if ((a[k] as number) > lower) lower = a[k] as number
  return (lower + upper) / 2
}

/** The ideal thrust, 0 when the chamber is not above ambient (no flow), undefined when the library refuses the inputs. */
function idealAt(p0: number, d: RoleData): number | undefined {
  if (d.ambient === undefined || d.throatArea === undefined || d.exitArea === undefined) return undefined
  if (!(p0 > d.ambient)) return 0
  try {
    return idealThrust(p0, d.ambient, d.throatArea, d.exitArea, CHECK_GAMMA)
  } catch (error) {
    if (error instanceof RangeError) return undefined
    throw error
  }
}

function dataFlags(assignment: Assignment, data: SubmissionData, scope: Record<string, ExpressionValue>): GradeFlag[] {
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
  return flags
}

function thrustAboveIdeal(d: RoleData): GradeFlag | undefined {
  if (!d.thrust || !d.chamber || d.thrust.length === 0) return undefined
  const i = argmax(d.thrust)
  const peak = d.thrust[i] as number
  const p0 = d.chamber[i] as number
  const ideal = idealAt(p0, d)
  if (ideal === undefined || !(peak > (1 + THRUST_ABOVE_IDEAL_MARGIN) * ideal) || !(peak > 0)) return undefined
  const at = d.time ? ` at t = ${fmt(d.time[i] as number)} s` : ''
  const what =
    ideal > 0
      ? `The peak thrust, ${fmt(peak)} N${at}, is ${fmt((peak / ideal - 1) * 100)} % above the ideal thrust of ${fmt(ideal)} N for the chamber pressure logged at that moment (${kPa(p0)} absolute).`
      : `The peak thrust, ${fmt(peak)} N${at}, was logged while the chamber pressure (${kPa(p0)} absolute) was not above the ambient pressure (${kPa(d.ambient as number)}), when an ideal nozzle gives no thrust at all.`
  return {
    code: 'thrust-above-ideal',
    message: `${what} A real nozzle gives less than the ideal; check the load-cell calibration and whether the chamber pressure is gauge or absolute.`,
    detail: {
      sample: i + 1,
      ...(d.time ? { time: d.time[i] as number } : {}),
      peakThrust: peak,
      idealThrust: ideal,
      chamberPressure: p0,
      margin: THRUST_ABOVE_IDEAL_MARGIN,
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
  if (sense === 'gauge' && (Math.abs(logged - pa) <= LOOKS_ABSOLUTE_BAND * pa || Math.abs(logged - STANDARD_ATMOSPHERE) <= LOOKS_ABSOLUTE_BAND * STANDARD_ATMOSPHERE)) {
    return {
      code: 'pressure-looks-absolute',
      message: `${Name} is declared gauge, but at rest (the start or end of the log) it reads about ${kPa(logged)}, close to the barometric pressure (${kPa(pa)}), where a gauge reading would be near 0. It looks like an absolute reading: check the gauge/absolute choice for the ${name}.`,
      detail,
    }
  }
  return undefined
}

function chamberAboveReceiver(d: RoleData): GradeFlag | undefined {
  const { chamber, receiver } = d
  if (!chamber || !receiver || chamber.length === 0) return undefined
  let worst = 0
  let peakReceiver = -Infinity
  for (let i = 0; i < chamber.length; i++) {
    if ((chamber[i] as number) - (receiver[i] as number) > (chamber[worst] as number) - (receiver[worst] as number)) worst = i
    if ((receiver[i] as number) > peakReceiver) peakReceiver = receiver[i] as number
  }
  const excess = (chamber[worst] as number) - (receiver[worst] as number)
  const margin = Math.max(CHAMBER_ABOVE_RECEIVER_MARGIN * peakReceiver, CHAMBER_ABOVE_RECEIVER_FLOOR)
  if (!(excess > margin)) return undefined
  const at = d.time ? ` at t = ${fmt(d.time[worst] as number)} s` : ''
  return {
    code: 'chamber-above-receiver',
    message: `The chamber pressure reads ${kPa(excess)} above the receiver pressure that feeds it${at} (${kPa(chamber[worst] as number)} against ${kPa(receiver[worst] as number)}, absolute). Air flows from the receiver to the chamber, so the chamber cannot be higher: check whether the two pressure columns are swapped or one is gauge and the other absolute.`,
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
  const steps = new Float64Array(t.length - 1)
  for (let i = 1; i < t.length; i++) steps[i - 1] = (t[i] as number) - (t[i - 1] as number)
  const typical = median(steps)
  if (!(typical > 0)) return undefined
  let count = 0
  let largest = -1
  for (let i = 0; i < steps.length; i++) {
    const s = steps[i] as number
    if (s > TIME_GAP_FACTOR * typical) {
      count++
      if (largest < 0 || s > (steps[largest] as number)) largest = i
    }
  }
  if (largest < 0) return undefined
  const gap = steps[largest] as number
  return {
    code: 'time-gap',
    message: `The log has ${count === 1 ? 'a gap' : `${count} gaps`} between samples: the largest, ${fmt(gap)} s after t = ${fmt(t[largest] as number)} s, is ${fmt(gap / typical)} times the usual step of ${fmt(typical)} s. Samples may be missing; the impulse is integrated straight across a gap.`,
    detail: { gaps: count, largestGap: gap, after: t[largest] as number, sample: largest + 2, medianStep: typical, factor: TIME_GAP_FACTOR },
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

// ---------------------------------------------------------------------------------------------
// Chart.

/** Most points a chart series has (the decimation keeps each bucket's minimum and maximum). */
export const CHART_MAX_POINTS = 2000

/** What the result page plots, in SI: s, N, Pa absolute. */
export interface ChartSeries {
  time: number[]
  thrust?: number[]
  chamberPressure?: number[]
  receiverPressure?: number[]
  /** Ideal thrust for the logged chamber pressure at each plotted sample (γ = 1.4), N; 0 with no flow. */
  idealThrust?: number[]
  /** [start, end] times, s, of each stretch of samples during which the nozzle exit is supersonic. */
  supersonicSpans: [number, number][]
}

/** Per bucket of consecutive samples, the samples holding each series' minimum and maximum, in time order. */
function bucketExtremes(n: number, series: readonly (readonly number[])[], buckets: number): number[] {
  const size = n / buckets
  const out: number[] = []
  const chosen = new Set<number>()
  for (let b = 0; b < buckets; b++) {
    const from = Math.floor(b * size)
    const to = b === buckets - 1 ? n : Math.floor((b + 1) * size)
    if (to <= from) continue
    chosen.clear()
    if (series.length === 0) {
      chosen.add(from)
      chosen.add(to - 1)
    }
    for (const s of series) {
      let lo = from
      let hi = from
      for (let i = from + 1; i < to; i++) {
        const v = s[i] as number
        if (v < (s[lo] as number)) lo = i
        if (v > (s[hi] as number)) hi = i
      }
      chosen.add(lo)
      chosen.add(hi)
    }
    out.push(...[...chosen].sort((x, y) => x - y))
  }
  return out
}

/**
 * Indices to plot: all when there are few; otherwise each bucket's minimum and maximum of every
 * series, so peaks survive. Series often share their extremes (smooth pressures), so the number of
 * buckets is raised from the one that is sure to fit (maxPoints / (2 × series)) towards filling
 * maxPoints, in a few passes.
 */
function decimate(n: number, series: readonly (readonly number[])[], maxPoints: number): number[] {
  if (n <= maxPoints) return Array.from({ length: n }, (_, i) => i)
  const safe = Math.max(1, Math.floor(maxPoints / (2 * Math.max(1, series.length))))
  let best = bucketExtremes(n, series, safe)
  let buckets = safe
  for (let pass = 0; pass < 4 && best.length < 0.9 * maxPoints; pass++) {
    buckets = Math.floor((buckets * maxPoints) / Math.max(best.length, 1))
    const tried = bucketExtremes(n, series, buckets)
    if (tried.length > maxPoints) break
    best = tried
  }
  return best
}

/**
 * The series for the result page's chart: logged thrust and pressures against time, the ideal
 * thrust for the logged chamber pressure, and the spans where the exit was supersonic.
 *
 * Supersonic at a sample means nozzleFlow's regime is over-expanded, ideal or under-expanded,
 * which happens exactly when pa/p0 ≤ the shock-at-exit ratio of the nozzle (nozzlePressureRatios,
 * the bound nozzleFlow itself uses), so the ratio is computed once and compared per sample.
 * Spans are found on every sample; the series are then thinned to at most
 * {@link CHART_MAX_POINTS} points keeping each bucket's minimum and maximum.
 *
 * @param assignment - the assignment (its roles say which columns are which)
 * @param data - the submission's data in SI, as for {@link gradeSubmission}
 * @returns the series (the optional ones only when the module declares their roles)
 * @throws ScopeError when the data do not fit the assignment
 */
export function chartSeries(assignment: Assignment, data: SubmissionData): ChartSeries {
  const scope = buildExpressionScope(assignment, { tables: data.tables, measurements: data.measurements, ...(data.pressures ? { pressures: data.pressures } : {}) }, { units: 'si' })
  const d = roleData(assignment, scope)
  const time = d.time ?? []
  const n = time.length
  const spans: [number, number][] = []
  if (d.chamber && d.ambient !== undefined && d.throatArea !== undefined && d.exitArea !== undefined && d.exitArea >= d.throatArea) {
    const limit = nozzlePressureRatios(d.exitArea / d.throatArea, CHECK_GAMMA).shockAtExit
    let start = -1
    for (let i = 0; i < n; i++) {
      const p0 = d.chamber[i] as number
      const supersonic = p0 > 0 && d.ambient / p0 <= limit
      if (supersonic && start < 0) start = i
      if (!supersonic && start >= 0) {
        spans.push([time[start] as number, time[i - 1] as number])
        start = -1
      }
    }
    if (start >= 0) spans.push([time[start] as number, time[n - 1] as number])
  }
  const plotted = [d.thrust, d.chamber, d.receiver].filter((s): s is readonly number[] => s !== undefined && s.length === n)
  const idx = decimate(n, plotted, CHART_MAX_POINTS)
  const pick = (xs: readonly number[]) => idx.map((i) => xs[i] as number)
  const out: ChartSeries = { time: pick(time), supersonicSpans: spans }
  if (d.thrust && d.thrust.length === n) out.thrust = pick(d.thrust)
  if (d.chamber && d.chamber.length === n) {
    out.chamberPressure = pick(d.chamber)
    const chamber = d.chamber
    const ideal = idx.map((i) => idealAt(chamber[i] as number, d))
    if (ideal.every((v): v is number => v !== undefined)) out.idealThrust = ideal
  }
  if (d.receiver && d.receiver.length === n) out.receiverPressure = pick(d.receiver)
  return out
}

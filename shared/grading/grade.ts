/**
 * The grading engine: a submission's own data → the expected value of every reported result, each
 * check within tolerance with its points, the score with any late penalty, and flags that put the
 * submission in the staff review queue (built-in data checks and the module's review rules).
 *
 * Pure and synchronous, shared by the server (grading on submit, re-checks) and the browser (the
 * chart). Expected values always come from the module's expressions over this submission's data
 * (shared/modules/expressions.ts), never from a stored answer key.
 *
 * Data are in SI as `parseLog` gives them (see {@link GradeInput}); pressures are made absolute
 * with the submission's ambient pressure before any expression or check sees them.
 */
import { ExpressionError, evaluateExpression } from '../modules/expressions'
import { valueFromSI, valueToSI } from '../modules/quantities'
import type { Assignment, ResultSpec } from '../modules/schema'
import { buildExpressionScope, taredScope } from '../modules/scope'
import type { ExpressionValue, SubmissionData } from '../modules/scope'
import { dataFlags } from './data-flags'
import { regimeNeighbourAccepted } from './regime'
import { effectiveTolerance, propagateUncertainties } from './uncertainty'
import type { CheckUncertainty } from './uncertainty'

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
  'thrust-below-ideal',
  'identical-file',
  'near-copy',
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
  /**
   * Present when the module declares uncertainties: the expected value's combined standard
   * uncertainty and its largest contributions (./uncertainty.ts), or null when none reaches it.
   */
  uncertainty?: CheckUncertainty | null
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

// ---------------------------------------------------------------------------------------------
// Grading.

function round6(x: number): number {
  return Math.round(x * 1e6) / 1e6
}

function errorText(error: unknown): string {
  return error instanceof Error ? error.message : String(error)
}

function checkResult(
  spec: ResultSpec,
  scope: Record<string, ExpressionValue>,
  reportedValue: number | undefined,
  uncertainty?: CheckUncertainty | null,
): CheckResult {
  const reported = typeof reportedValue === 'number' && Number.isFinite(reportedValue) ? reportedValue : null
  const base = {
    key: spec.key,
    label: spec.label,
    unit: spec.unit,
    reported,
    pointsPossible: spec.points,
    ...(uncertainty === undefined ? {} : { uncertainty }),
  }
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
  const tolerance = effectiveTolerance(spec.tolerance, expected, uncertainty)
  if (reported === null) {
    return {
      ...base,
      expected,
      absError: null,
      relError: null,
      tolerance,
      pointsAwarded: 0,
      pass: false,
      outcome: 'fail',
    }
  }
  const absError = Math.abs(reported - expected)
  const relError = expected === 0 ? null : absError / Math.abs(expected)
  const slack = BOUNDARY_SLACK * tolerance + 1e-12 * Math.abs(expected)
  let outcome: CheckOutcome = 'fail'
  let pointsAwarded = 0
  if (
    absError <= tolerance + slack ||
    (spec.regime && regimeNeighbourAccepted(spec.regime, (e) => evaluateExpression(e, scope), reported, expected))
  ) {
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
  const data: SubmissionData = {
    tables: input.data.tables,
    measurements: input.data.measurements,
    ...(input.data.pressures ? { pressures: input.data.pressures } : {}),
    ...(input.data.images ? { images: input.data.images } : {}),
  }
  // Expressions see pressures with their transducer zero taken (tare: true); the data checks see them as logged.
  const logged = buildExpressionScope(assignment, data, { units: 'si', tare: false })
  const scope = taredScope(assignment, data, logged)
  // Instrument uncertainties propagate through the same (tared) scope the expected values use; the
  // logged one says which columns were tared (their readings are moved before the tare).
  const uncertainties = propagateUncertainties(assignment, data, scope, logged)

  const flags: GradeFlag[] = []
  const checks = assignment.results.map((spec) => {
    const check = checkResult(spec, scope, reported[spec.key], uncertainties?.get(spec.key))
    if (check.outcome === 'error') {
      flags.push({
        code: 'expression-failed',
        message: `The expected value of "${spec.label}" could not be computed from this submission's data (${check.error}). A teaching assistant will grade it by hand.`,
        detail: { result: spec.key, error: check.error ?? '' },
      })
    }
    return check
  })

  flags.push(...oneFlagPerCause(dataFlags(assignment, data, logged), ruleFlags(assignment, scope, reported)))

  const rawScore = round6(checks.reduce((sum, c) => sum + c.pointsAwarded, 0))
  const maxScore = round6(checks.reduce((sum, c) => sum + c.pointsPossible, 0))
  return { checks, rawScore, score: round6(rawScore * (1 - latePenalty)), maxScore, latePenalty, flags }
}

/**
 * One finding per cause. A module's review rule may restate a built-in check, naming it by its key
 * (`thrust_above_ideal` for 'thrust-above-ideal'); when both fire they are one cause, so staff get
 * one flag to resolve. It keeps the built-in code and message, names the rule in its detail, and adds
 * the rule's reason when that says something else. A rule that fires alone stays as it is.
 */
export function oneFlagPerCause(builtIn: readonly GradeFlag[], rules: readonly GradeFlag[]): GradeFlag[] {
  const merged = builtIn.map((f) => ({ ...f, ...(f.detail ? { detail: { ...f.detail } } : {}) }))
  const rest: GradeFlag[] = []
  for (const rule of rules) {
    const key = rule.code.startsWith('rule:') ? rule.code.slice('rule:'.length) : null
    const same = key === null ? undefined : merged.find((f) => f.code === key.replace(/_/g, '-'))
    if (!same || key === null) {
      rest.push(rule)
      continue
    }
    same.detail = { ...same.detail, rule: key }
    const reason = rule.message.trim()
    if (reason !== same.message.trim()) same.message = `${same.message} The module's rule "${key}" says: ${reason}`
  }
  return [...merged, ...rest]
}

/** The module's review rules, over the data and the reported results in SI. */
function ruleFlags(
  assignment: Assignment,
  dataScope: Record<string, ExpressionValue>,
  reported: Readonly<Record<string, number>>,
): GradeFlag[] {
  if (assignment.reviewRules.length === 0) return []
  const scope: Record<string, ExpressionValue> = Object.assign(
    Object.create(null) as Record<string, ExpressionValue>,
    dataScope,
  )
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

export * from './data-flags'
export * from './chart'
export type { CheckUncertainty, UncertaintyContribution } from './uncertainty'

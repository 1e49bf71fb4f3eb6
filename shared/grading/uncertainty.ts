/**
 * Measurement uncertainty of the expected values.
 *
 * A module may declare the standard uncertainty of each measurement and column
 * (`uncertainty: { absolute: 0.05 }` in the field's unit, `{ relative: 0.01 }` of the reading, or
 * both; shared/modules/schema.ts). This propagates them to each result's expected value to first
 * order, the law of propagation of uncertainty for uncorrelated inputs (JCGM 100:2008, the GUM,
 * §5.1.2): u_c²(y) = Σ (c_i u(x_i))², with each sensitivity c_i = ∂f/∂x_i taken numerically.
 *
 * The inputs (components):
 * - each measurement, its absolute and relative parts taken in quadrature;
 * - each column as two components, each fully correlated over the column's samples (one instrument,
 *   one calibration): an offset (the absolute uncertainty, added to every sample) and a gain (the
 *   relative uncertainty, multiplying every sample as read: a gauge transducer's gain multiplies the
 *   gauge reading, not the absolute pressure). A column whose zero is taken (`tare: true`) is moved
 *   as read, before the tare, and then tared: the tare removes an offset, so its offset contributes
 *   nothing, and its gain multiplies the tared reading. A per-sample noise is not a component: it
 *   averages out of integrals and means, and the peak is read through a median;
 * - the barometer moves every gauge reading with it (they are made absolute with it), so its
 *   component moves the gauge columns and measurements too.
 * The components of different instruments are taken as independent.
 *
 * Sensitivities: central differences over a step of one standard uncertainty,
 * c_i u(x_i) ≈ ½·[f(x_i + u_i) − f(x_i − u_i)], the numerical form the GUM gives beside the law
 * (§5.1.3, note 2; from memory). Why that step:
 * - it measures the slope over the range the input is actually uncertain in; the reductions have
 *   kinks at the sample scale (the run window's interpolated crossings, the median and maximum of
 *   samples, the choked/unchoked switch), where a tiny step would give the slope of one sample's
 *   neighbourhood, or zero, rather than the effect of the uncertainty;
 * - central differences are exact for a quadratic dependence (the throat area on its diameter) and
 *   cancel the leading error term otherwise;
 * - it is bounded below by 10⁻⁶ of the input's own scale (its value, the column's largest sample,
 *   or 1 for a gain), so a tiny declared uncertainty is not lost in the rounding of sums over tens
 *   of thousands of samples (about 10⁻¹³ relative) or the library's root solvers (converged to
 *   machine precision): the difference stays some 10⁷ times above that noise; the contribution is
 *   then scaled back by u/step;
 * - it is bounded above by half the measurement's value (a relative uncertainty near 100 % would
 *   step a diameter through zero), where a first-order figure means little anyway.
 * When one side fails (the step leaves the expression's domain) the other side is used with the
 * unmoved value (a one-sided difference); when both fail the result has no uncertainty (null).
 *
 * Cost: only modules that declare uncertainties are propagated, only the results that read an
 * input are evaluated for it, a perturbed scope is the unperturbed one with the moved entries
 * replaced (not rebuilt from the data), and the evaluations reuse every part of an expression the
 * moved input does not reach, and every part it does reach across results (./expression-parts.ts).
 * A moved column is an offset and gain of the column as held (one pass, no tare or reduction run
 * again): the run of a moved thrust comes from the run as logged (run-cache.ts), and an offset the
 * tare removes moves nothing at all.
 */
import { valueFromSI, valueToSI } from '../modules/quantities'
import type { Assignment, ResultSpec, Tolerance } from '../modules/schema'
import type { ExpressionValue, SubmissionData } from '../modules/scope'
import { rescaledColumn } from '../modules/run-cache'
import { PartEvaluator, expressionReads } from './expression-parts'
import type { PressureSense } from '../units'

/** The coverage factor shown with expected values when the result's tolerance names none. */
export const DEFAULT_COVERAGE = 2
/** How many of the largest contributions are kept with each check. */
export const CONTRIBUTIONS_KEPT = 2
/** Smallest share of the variance a kept contribution has. */
const MIN_SHARE = 0.005
/** Smallest step, as a fraction of the input's scale (see the file comment). */
const MIN_STEP = 1e-6
/** Largest step of a measurement, as a fraction of its value. */
const MAX_STEP = 0.5

/** `value` for a measurement; a column's `offset` (its absolute uncertainty) or `gain` (its relative one). */
export type UncertaintyPart = 'value' | 'offset' | 'gain'

export interface UncertaintyContribution {
  /** Key of the measurement or column. */
  key: string
  part: UncertaintyPart
  /** The measurement's or column's label, for the words on the page. */
  label: string
  /** Share of the combined variance, 0–1: (c_i u_i)² / u_c². */
  share: number
}

export interface CheckUncertainty {
  /** Combined standard uncertainty u_c of the expected value, in the result's unit. */
  standard: number
  /** Coverage factor k: the tolerance's, or {@link DEFAULT_COVERAGE} for display. */
  coverage: number
  /**
   * The largest contributions, largest first: at most {@link CONTRIBUTIONS_KEPT}, none under half a
   * per cent of the variance, none when u_c is 0.
   */
  contributions: UncertaintyContribution[]
}

/** Whether any measurement or column of the assignment declares an uncertainty. */
export function declaresUncertainty(assignment: Assignment): boolean {
  return (
    assignment.measurements.some((m) => m.uncertainty) ||
    assignment.tables.some((t) => t.columns.some((c) => c.uncertainty))
  )
}

/**
 * The effective absolute tolerance of a result: max(absolute, relative × |expected|), and with a
 * coverage factor also k × u_c (the relative and absolute tolerances stay as the floor).
 *
 * @param uncertainty - the expected value's, in the result's unit; without one, only the floor counts
 */
export function effectiveTolerance(
  tolerance: Tolerance,
  expected: number,
  uncertainty?: CheckUncertainty | null,
): number {
  const floor = Math.max(tolerance.absolute ?? 0, (tolerance.relative ?? 0) * Math.abs(expected))
  if (tolerance.coverage === undefined || !uncertainty) return floor
  return Math.max(floor, tolerance.coverage * uncertainty.standard)
}

/** One uncertain input, moved as a whole. */
interface Component {
  key: string
  part: UncertaintyPart
  label: string
  /** The scope names whose values it moves. */
  moved: ReadonlySet<string>
  /** Standard uncertainty over step: turns a difference over the step into a contribution. */
  ratio: number
  /**
   * The scope with the input moved by `sign` steps. Only the entries in `read` need moving (the
   * others are read by none of the results evaluated): the barometer moves every gauge column, but
   * a result may read only one of them. null when the move leaves the scope as it is (an offset
   * that the tare takes away again): the input contributes nothing.
   */
  scope: (sign: 1 | -1, read: ReadonlySet<string>) => Record<string, ExpressionValue> | null
}

/** The SI size of one unit (a temperature difference for °C and °F, not a temperature). */
function unitScale(unit: string): number {
  return valueToSI(1, unit) - valueToSI(0, unit)
}

function isGauge(data: SubmissionData, key: string, declared: PressureSense | undefined): boolean {
  return (data.pressures?.[key] ?? declared) === 'gauge'
}

function maxAbs(xs: readonly number[]): number {
  let m = 0
  for (const x of xs) if (Math.abs(x) > m) m = Math.abs(x)
  return m
}

/** A copy of the scope (the same arrays) with some entries replaced. */
function withEntries(
  scope: Readonly<Record<string, ExpressionValue>>,
  entries: [string, ExpressionValue][],
): Record<string, ExpressionValue> {
  const out = Object.assign(Object.create(null) as Record<string, ExpressionValue>, scope)
  for (const [k, v] of entries) out[k] = v
  return out
}

/** Every entry named moved by `delta` (numbers and every sample of a column). */
function shifted(
  scope: Readonly<Record<string, ExpressionValue>>,
  names: Iterable<string>,
  delta: number,
): Record<string, ExpressionValue> {
  const entries: [string, ExpressionValue][] = []
  for (const k of names) {
    const v = scope[k]
    if (typeof v === 'number') entries.push([k, v + delta])
    else if (Array.isArray(v)) entries.push([k, rescaledColumn(v as readonly number[], delta, 1)])
  }
  return withEntries(scope, entries)
}

/**
 * The uncertain inputs of one submission. The moved scopes are worked out the way
 * buildExpressionScope turns the data into a scope (SI, gauge readings plus the barometer, the
 * zero of the `tare: true` columns taken), entry by entry; a test holds the two against each other.
 *
 * A moved column is the column as the scope holds it, rescaled (offset + gain × every sample,
 * `rescaledColumn`), so the run cache can reuse the run of the thrust as logged. Each move is the
 * column's own reading moved before the tare, then tared as the scope tares it:
 * - an offset on a column whose zero is taken is removed by the tare itself (its medians over the
 *   quiet samples move by the same offset): the tared column does not move, and the component
 *   contributes nothing;
 * - a gain multiplies the gauge reading (the column less the barometer), its zero included, and
 *   the zero taken from it, so it multiplies the tared gauge reading: the scope's column p becomes
 *   pa + (1 ± g)·(p − pa);
 * - the barometer moves every gauge reading, tared or not, by its own change (the tare removes the
 *   transducer's zero, not the barometer added to it).
 * The thrust run the tare follows does not move with a moved thrust: an offset or gain leaves the
 * run window and quiet stretches where they are (`runOfRescaledThrust`).
 */
function components(
  assignment: Assignment,
  data: SubmissionData,
  scope: Readonly<Record<string, ExpressionValue>>,
  logged: Readonly<Record<string, ExpressionValue>>,
): Component[] {
  const out: Component[] = []
  const ambient = assignment.measurements.find((m) => m.role === 'ambient-pressure')
  const ambientValue = ambient === undefined ? undefined : scope[ambient.key]
  const gauge = [
    ...assignment.tables.flatMap((t) => t.columns.filter((c) => isGauge(data, c.key, c.pressure)).map((c) => c.key)),
    ...assignment.measurements.filter((m) => m !== ambient && isGauge(data, m.key, m.pressure)).map((m) => m.key),
  ]
  for (const m of assignment.measurements) {
    const raw = data.measurements[m.key]
    const x = scope[m.key]
    if (!m.uncertainty || typeof raw !== 'number' || typeof x !== 'number') continue
    const u = Math.hypot(
      (m.uncertainty.absolute ?? 0) * unitScale(m.unit),
      (m.uncertainty.relative ?? 0) * Math.abs(raw),
    )
    if (!(u > 0)) continue
    const step = x === 0 ? u : Math.min(Math.max(u, MIN_STEP * Math.abs(x)), MAX_STEP * Math.abs(x))
    const moved = m === ambient ? [m.key, ...gauge] : [m.key]
    out.push({
      key: m.key,
      part: 'value',
      label: m.label,
      moved: new Set(moved),
      ratio: u / step,
      scope: (sign, read) =>
        shifted(
          scope,
          moved.filter((k) => read.has(k)),
          sign * step,
        ),
    })
  }
  for (const t of assignment.tables) {
    for (const c of t.columns) {
      const x = scope[c.key]
      if (!c.uncertainty || !Array.isArray(x)) continue
      const samples = x as readonly number[]
      const tared = samples !== logged[c.key]
      const moved = new Set([c.key])
      const offset = (c.uncertainty.absolute ?? 0) * unitScale(c.unit)
      if (offset > 0) {
        // The step needs a pass over the column: taken only when a result reads the column and
        // the move is not taken away by the tare (the ratio is read only then).
        let step: number | undefined
        const stepOf = () => (step ??= Math.max(offset, MIN_STEP * maxAbs(samples)))
        out.push({
          key: c.key,
          part: 'offset',
          label: c.label,
          moved,
          get ratio() {
            return offset / stepOf()
          },
          // The tare takes the moved zero away again: the tared column is the same.
          scope: (sign) => (tared ? null : withEntries(scope, [[c.key, rescaledColumn(samples, sign * stepOf(), 1)]])),
        })
      }
      const gain = c.uncertainty.relative ?? 0
      if (gain > 0) {
        const step = Math.min(Math.max(gain, MIN_STEP), MAX_STEP)
        // The gain multiplies the reading less the barometer added to a gauge one: p → pa + (1 ± g)·(p − pa).
        const base = isGauge(data, c.key, c.pressure) && typeof ambientValue === 'number' ? ambientValue : 0
        out.push({
          key: c.key,
          part: 'gain',
          label: c.label,
          moved,
          ratio: gain / step,
          scope: (sign) => withEntries(scope, [[c.key, rescaledColumn(samples, -sign * step * base, 1 + sign * step)]]),
        })
      }
    }
  }
  return out
}

/** The expression's value in the result's unit, or null when it fails or is not a finite number. */
function valueOf(evaluator: PartEvaluator, spec: ResultSpec): number | null {
  try {
    const si = evaluator.evaluate(spec.expected)
    if (typeof si !== 'number' || !Number.isFinite(si)) return null
    const value = valueFromSI(si, spec.unit)
    return Number.isFinite(value) ? value : null
  } catch {
    return null
  }
}

function readsOf(spec: ResultSpec): ReadonlySet<string> {
  try {
    return expressionReads(spec.expected)
  } catch {
    // A refused expression fails its check already; nothing to propagate.
    return new Set()
  }
}

/**
 * The combined standard uncertainty of every result's expected value, with its largest
 * contributions; see the file comment for the method.
 *
 * @param scope - the submission's expression scope (buildExpressionScope with units 'si')
 * @param logged - the same scope with the columns as logged, before the tare (buildExpressionScope
 *   with tare: false); a column whose array differs between the two was tared. Defaults to scope
 *   (no column tared).
 * @returns null when the module declares no uncertainty; otherwise, by result key, the result's
 *   uncertainty, or null when no declared uncertainty reaches it or it could not be propagated
 * @example
 * propagateUncertainties(assignment, data, scope)?.get('cf')
 * // → { standard: 0.0061, coverage: 2, contributions: [{ key: 'p_chamber', part: 'gain', label: 'Chamber pressure', share: 0.62 }, …] }
 */
export function propagateUncertainties(
  assignment: Assignment,
  data: SubmissionData,
  scope: Readonly<Record<string, ExpressionValue>>,
  logged: Readonly<Record<string, ExpressionValue>> = scope,
): Map<string, CheckUncertainty | null> | null {
  if (!declaresUncertainty(assignment)) return null
  const evaluator = new PartEvaluator(scope)
  const results = assignment.results.map((spec) => ({
    spec,
    reads: readsOf(spec),
    base: valueOf(evaluator, spec),
    terms: [] as { c: Component; z: number }[],
    failed: false,
  }))

  for (const c of components(assignment, data, scope, logged)) {
    const users = results.filter((r) => r.base !== null && [...c.moved].some((n) => r.reads.has(n)))
    if (users.length === 0) continue
    const read = new Set([...c.moved].filter((n) => users.some((r) => r.reads.has(n))))
    const upScope = c.scope(1, read)
    const downScope = c.scope(-1, read)
    if (upScope === null || downScope === null) {
      for (const r of users) r.terms.push({ c, z: 0 })
      continue
    }
    evaluator.perturb({ scope: upScope, moved: read })
    const up = users.map((r) => valueOf(evaluator, r.spec))
    evaluator.perturb({ scope: downScope, moved: read })
    const down = users.map((r) => valueOf(evaluator, r.spec))
    users.forEach((r, i) => {
      const plus = up[i] ?? null
      const minus = down[i] ?? null
      const base = r.base as number
      const difference =
        plus !== null && minus !== null
          ? (plus - minus) / 2
          : plus !== null
            ? plus - base
            : minus !== null
              ? base - minus
              : null
      if (difference === null) r.failed = true
      else r.terms.push({ c, z: difference * c.ratio })
    })
  }
  evaluator.perturb(null)

  const out = new Map<string, CheckUncertainty | null>()
  for (const r of results) {
    if (r.base === null || r.failed || r.terms.length === 0) {
      out.set(r.spec.key, null)
      continue
    }
    const variance = r.terms.reduce((s, t) => s + t.z * t.z, 0)
    const contributions =
      variance > 0
        ? [...r.terms]
            .sort((a, b) => b.z * b.z - a.z * a.z)
            .slice(0, CONTRIBUTIONS_KEPT)
            .map((t) => ({ key: t.c.key, part: t.c.part, label: t.c.label, share: (t.z * t.z) / variance }))
            // Under half a per cent a contribution is not worth naming ("0 %").
            .filter((c) => c.share >= MIN_SHARE)
        : []
    out.set(r.spec.key, {
      standard: Math.sqrt(variance),
      coverage: r.spec.tolerance.coverage ?? DEFAULT_COVERAGE,
      contributions,
    })
  }
  return out
}

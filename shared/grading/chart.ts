/**
 * The result page's chart: the log thinned to at most {@link CHART_MAX_POINTS} points per series
 * (each bucket's extremes kept), with the ideal thrust (full-flowing, and the separated-nozzle
 * estimate where the flow separates) and the spans of supersonic flow.
 */
import type { Assignment } from '../modules/schema'
import { buildExpressionScope } from '../modules/scope'
import type { SubmissionData } from '../modules/scope'
import { nozzlePressureRatios } from '../physics'
import { CHECK_GAMMA, roleData, thrustCeilingAt } from './data-flags'
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
  /**
   * Where the flow separates from the nozzle wall (Summerfield criterion, nozzleFlow), the thrust
   * estimate of the separated nozzle at each plotted sample, N; null where it runs full. Present
   * only when the flow separates somewhere in the log.
   */
  separatedThrust?: (number | null)[]
  /** [start, end] times, s, of each stretch of samples during which the nozzle exit is supersonic. */
  supersonicSpans: [number, number][]
}

/**
 * Per bucket of consecutive samples, the samples holding each series' minimum and maximum, in time
 * order; the log's first and last samples always, so the plot spans the whole log.
 */
function bucketExtremes(n: number, series: readonly (readonly number[])[], buckets: number): number[] {
  const size = n / buckets
  const out: number[] = []
  const chosen = new Set<number>()
  for (let b = 0; b < buckets; b++) {
    const from = Math.floor(b * size)
    const to = b === buckets - 1 ? n : Math.floor((b + 1) * size)
    if (to <= from) continue
    chosen.clear()
    if (b === 0) chosen.add(0)
    if (b === buckets - 1) chosen.add(n - 1)
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
 * Indices to plot: all when there are few; otherwise the first and last samples and each bucket's
 * minimum and maximum of every series, so the time axis spans the whole log and peaks survive. Series often share their extremes (smooth pressures), so the number of
 * buckets is raised from the one that is sure to fit (maxPoints / (2 × series)) towards filling
 * maxPoints, in a few passes.
 */
function decimate(n: number, series: readonly (readonly number[])[], maxPoints: number): number[] {
  if (n <= maxPoints) return Array.from({ length: n }, (_, i) => i)
  // Two points are kept for the log's first and last samples.
  const safe = Math.max(1, Math.floor((maxPoints - 2) / (2 * Math.max(1, series.length))))
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
 * thrust for the logged chamber pressure (and, where the over-expanded flow separates from the wall,
 * the separated nozzle's estimate, which the thrust-above-ideal check also allows), and the spans
 * where the exit was supersonic.
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
  // The chart shows the columns as logged (no transducer zero taken), as the data checks see them.
  const scope = buildExpressionScope(
    assignment,
    { tables: data.tables, measurements: data.measurements, ...(data.pressures ? { pressures: data.pressures } : {}) },
    { units: 'si', tare: false },
  )
  const d = roleData(assignment, scope)
  const time = d.time ?? []
  const n = time.length
  const spans: [number, number][] = []
  if (
    d.chamber &&
    d.ambient !== undefined &&
    d.throatArea !== undefined &&
    d.exitArea !== undefined &&
    d.exitArea >= d.throatArea
  ) {
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
  const plotted = [d.thrust, d.chamber, d.receiver].filter(
    (s): s is readonly number[] => s !== undefined && s.length === n,
  )
  const idx = decimate(n, plotted, CHART_MAX_POINTS)
  const pick = (xs: readonly number[]) => idx.map((i) => xs[i] as number)
  const out: ChartSeries = { time: pick(time), supersonicSpans: spans }
  if (d.thrust && d.thrust.length === n) out.thrust = pick(d.thrust)
  if (d.chamber && d.chamber.length === n) {
    out.chamberPressure = pick(d.chamber)
    // One nozzleFlow per plotted reading gives both the full-flowing and the separated estimate.
    const ideal: number[] = []
    const separated: (number | null)[] = []
    let separates = false
    // A logger's pressure steps repeat readings (a third of the plotted samples of a blow-down):
    // each reading's nozzleFlow is solved once.
    const ceilings = new Map<number, ReturnType<typeof thrustCeilingAt>>()
    for (const i of idx) {
      const p0 = d.chamber[i] as number
      let ceiling = ceilings.get(p0)
      if (ceiling === undefined && !ceilings.has(p0)) ceilings.set(p0, (ceiling = thrustCeilingAt(p0, d)))
      if (ceiling === undefined) break
      ideal.push(ceiling.fullFlowing)
      separated.push(ceiling.separated)
      if (ceiling.separated !== null) separates = true
    }
    if (ideal.length === idx.length) {
      out.idealThrust = ideal
      if (separates) out.separatedThrust = separated
    }
  }
  if (d.receiver && d.receiver.length === n) out.receiverPressure = pick(d.receiver)
  return out
}

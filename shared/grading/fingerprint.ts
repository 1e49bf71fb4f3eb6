/**
 * Near-copies of a log: another group's file with a digit edited, the time shifted, or a column
 * rescaled to other units. A byte-for-byte copy is caught by its sha256; these are not, so each
 * log gets a small fingerprint when it is handed in, and the server compares it with the
 * fingerprints of the other groups' logs of the same module.
 *
 * The fingerprint is a window of {@link FINGERPRINT_SAMPLES} consecutive samples of every column,
 * taken just after the run starts: the first time the reference column (the thrust, else the first
 * column) rises through the middle of its range, read through a 5-sample median and interpolated
 * between samples. That moment moves with the log when its time is shifted, and it
 * does not depend on the column's unit or zero, so a shifted or rescaled copy gives the same window
 * of the same samples.
 *
 * Two windows are compared sample by sample, column by column, in two ways:
 * - **after rounding**: both values rounded to the coarser of the two columns' resolutions (the
 *   largest power of ten every value is a multiple of) agree for at least
 *   {@link NEAR_COPY_ROUNDED_SHARE} of the samples — a copy with a few digits edited, or rounded
 *   to fewer decimals;
 * - **by correlation**: the correlation of the two columns' sample-to-sample detail
 *   (x[i] − (x[i−1] + x[i+1])/2, the logger's noise) is above {@link NEAR_COPY_CORRELATION}, after
 *   leaving out the {@link NEAR_COPY_TRIM} of samples that disagree most (an edited digit) — a copy in
 *   other units (kgf → N, kPa → psi: a correlation is blind to scale and zero).
 *
 * Why the detail and not the values themselves: two honest runs of the same nozzle from about the
 * same charge have smooth curves of almost the same shape, whose values correlate above 0.9999
 * (the pressures especially, where the noise is a thousandth of the range). Their noise, though, is
 * their own: it correlates near 0 between two runs and at 1 between a log and its copy. The detail
 * is trusted only where it is noise (consecutive detail values anti-correlated, as white noise
 * makes them: −2/3); a smooth, noise-free column is judged after rounding alone.
 *
 * Thresholds have no published source: they are chosen so that a copy passes them by a wide margin
 * and two independent runs cannot, and the tests check both sides.
 */
import type { TableSpec } from '../modules/schema'

/** Samples per column in a fingerprint (about 2.5 s of a 100 Hz log). */
export const FINGERPRINT_SAMPLES = 256
/**
 * The window starts this many samples after the run starts: past the valve's opening, whose
 * smooth rise is alike in every run and would otherwise dominate the sample-to-sample detail.
 */
export const FINGERPRINT_DELAY = 32
/** Fewest samples two windows must share to be compared at all. */
export const NEAR_COPY_MIN_OVERLAP = 64
/** Share of samples that must agree after rounding for a column to count as copied: 99 %. */
export const NEAR_COPY_ROUNDED_SHARE = 0.99
/** Correlation of the sample-to-sample detail above which a column counts as copied. */
export const NEAR_COPY_CORRELATION = 0.9999
/** Share of sample pairs left out of the correlation, those that disagree most: 2 %, twice over. */
export const NEAR_COPY_TRIM = 0.02
/**
 * Lag-1 autocorrelation of the detail at or below which it is taken as noise: −2/3 for white
 * noise, near +1 for a smooth curve. −0.3 leaves room for noise that is not quite white.
 */
export const NOISE_LIKE_AUTOCORRELATION = -0.3
/** Fewest distinct rounded values a column needs in the window for the rounding test to mean anything. */
export const MIN_DISTINCT_VALUES = 10

/** What is stored with each uploaded log (JSON). Values are SI, as parseLog gives them. */
export interface LogFingerprint {
  version: 1
  /** When the run starts in the log's own clock, s (see the file comment). */
  reference: number
  /** Times of the window's samples relative to `reference`, s. */
  times: number[]
  /** Column key → the window's values, SI. */
  columns: Record<string, number[]>
  /** Column key → its resolution in SI (a power of ten), 0 when no power of ten fits. */
  resolution: Record<string, number>
}

/** How one column of a log matched the other's. */
export interface ColumnMatch {
  key: string
  /** Share of samples that agree after rounding, 0–1. */
  roundedShare: number
  /** Trimmed correlation of the detail, −1–1, or null when the detail is not noise in both logs. */
  correlation: number | null
  /** Which test found the copy. */
  how: 'rounded' | 'correlated'
}

/** A near-copy: the columns that match, and how many samples were compared. */
export interface NearCopy {
  columns: ColumnMatch[]
  samples: number
}

// ---------------------------------------------------------------------------------------------
// Making a fingerprint.

function median5At(xs: readonly number[], i: number): number {
  const w = xs.slice(Math.max(0, i - 2), Math.min(xs.length, i + 3)).sort((a, b) => a - b)
  const mid = w.length >> 1
  return w.length % 2 === 1 ? (w[mid] as number) : ((w[mid - 1] as number) + (w[mid] as number)) / 2
}

/** The value below which a share q of the samples lies (nearest rank). */
function quantile(sorted: Float64Array, q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.round(q * (sorted.length - 1))))] as number
}

/**
 * Where the run starts: the first sample whose 5-sample median reaches the middle of the column's
 * range (5th to 95th percentile, so an edited sample cannot stretch it), and the time of that
 * crossing interpolated between samples. A flat column gives its first sample.
 */
function runStart(time: readonly number[], values: readonly number[]): { index: number; time: number } {
  // A typed array sorts numerically, several times faster than an array with a comparator.
  const sorted = Float64Array.from(values).sort()
  const low = quantile(sorted, 0.05)
  const high = quantile(sorted, 0.95)
  if (!(high > low)) return { index: 0, time: time[0] as number }
  const mid = (low + high) / 2
  let before = median5At(values, 0)
  if (before >= mid) return { index: 0, time: time[0] as number }
  for (let i = 1; i < values.length; i++) {
    const m = median5At(values, i)
    if (m >= mid) {
      const t0 = time[i - 1] as number
      const t1 = time[i] as number
      return { index: i, time: t0 + ((mid - before) / (m - before)) * (t1 - t0) }
    }
    before = m
  }
  return { index: 0, time: time[0] as number }
}

/** The largest power of ten from 10⁶ down to 10⁻⁹ that every value is a multiple of; 0 when none. */
function resolutionOf(values: readonly number[]): number {
  for (let e = 6; e >= -9; e--) {
    const q = 10 ** e
    let fits = true
    for (const v of values) {
      const n = v / q
      if (Math.abs(n - Math.round(n)) > 1e-6) {
        fits = false
        break
      }
    }
    if (fits) return q
  }
  return 0
}

/**
 * The fingerprint of a parsed log (see the file comment).
 *
 * @param table - the table the log fills (its `time` and `thrust` roles choose the clock and the
 *   reference column)
 * @param columns - column key → values in SI, as parseLog gives them (all the same length)
 * @returns the fingerprint, or null when the log has no time column or too few samples to compare
 * @example
 * logFingerprint(runTable, { t: [0, 0.01, …], thrust: [0.2, 0.3, …], p_chamber: […] })
 * // → { version: 1, reference: 2.104, times: [0.316, …], columns: { thrust: […], p_chamber: […] }, resolution: { thrust: 0.001, p_chamber: 100 } }
 */
export function logFingerprint(
  table: TableSpec,
  columns: Readonly<Record<string, readonly number[]>>,
): LogFingerprint | null {
  const timeKey = table.columns.find((c) => c.role === 'time')?.key
  const time = timeKey === undefined ? undefined : columns[timeKey]
  if (!time || time.length < NEAR_COPY_MIN_OVERLAP) return null
  const keys = table.columns
    .filter((c) => c.key !== timeKey && columns[c.key]?.length === time.length)
    .map((c) => c.key)
  const referenceKey = table.columns.find((c) => c.role === 'thrust' && keys.includes(c.key))?.key ?? keys[0]
  if (referenceKey === undefined) return null
  const start = runStart(time, columns[referenceKey] as readonly number[])
  const from = Math.max(0, Math.min(start.index + FINGERPRINT_DELAY, time.length - FINGERPRINT_SAMPLES))
  const to = Math.min(time.length, from + FINGERPRINT_SAMPLES)
  const out: LogFingerprint = {
    version: 1,
    reference: start.time,
    // Rounded to a nanosecond: the JSON stays short, and no logger resolves finer.
    times: time.slice(from, to).map((t) => Math.round((t - start.time) * 1e9) / 1e9),
    columns: {},
    resolution: {},
  }
  for (const key of keys) {
    const window = (columns[key] as readonly number[]).slice(from, to)
    out.columns[key] = window
    out.resolution[key] = resolutionOf(window)
  }
  return out
}

// ---------------------------------------------------------------------------------------------
// Comparing two fingerprints.

function medianOf(xs: ArrayLike<number>): number {
  const s = Float64Array.from(xs).sort()
  const mid = s.length >> 1
  return s.length % 2 === 1 ? (s[mid] as number) : ((s[mid - 1] as number) + (s[mid] as number)) / 2
}

/** One column of a fingerprint, readied for comparison: its detail and how that detail is spread. */
interface PreparedColumn {
  values: readonly number[]
  resolution: number
  /** detail[k] belongs to sample k + 1: x[k+1] − (x[k] + x[k+2])/2. */
  detail: Float64Array
  /** Median and robust standard deviation (MAD × 1.4826) of the detail. */
  centre: number
  spread: number
  /** Whether the detail is noise (see {@link NOISE_LIKE_AUTOCORRELATION}). */
  noise: boolean
}

/** Far-out detail values (an edited digit, the valve opening) lie beyond this many robust standard deviations. */
const FAR_OUT = 6

function prepare(values: readonly number[], resolution: number): PreparedColumn {
  const n = Math.max(0, values.length - 2)
  const detail = new Float64Array(n)
  for (let k = 0; k < n; k++)
    detail[k] = (values[k + 1] as number) - ((values[k] as number) + (values[k + 2] as number)) / 2
  const centre = n ? medianOf(detail) : 0
  const spread = n ? 1.4826 * medianOf(detail.map((v) => Math.abs(v - centre))) : 0
  // Lag-1 autocorrelation over the values that are not far out: −2/3 for white noise, near +1 for a smooth curve.
  const inside = (v: number) => Math.abs(v - centre) <= FAR_OUT * spread
  const first: number[] = []
  const second: number[] = []
  for (let k = 0; k + 1 < n; k++) {
    if (!inside(detail[k] as number) || !inside(detail[k + 1] as number)) continue
    first.push(detail[k] as number)
    second.push(detail[k + 1] as number)
  }
  const lag1 =
    spread > 0
      ? pearson(Float64Array.from(first), Float64Array.from(second), new Uint8Array(first.length).fill(1))
      : Number.NaN
  const noise = lag1 <= NOISE_LIKE_AUTOCORRELATION
  return { values, resolution, detail, centre, spread, noise }
}

/**
 * A fingerprint's columns readied for comparison, kept while the fingerprint object lives: the
 * server compares one new log with every other log of the module, and readies the new one once.
 */
const PREPARED = new WeakMap<LogFingerprint, Map<string, PreparedColumn>>()

function prepared(fp: LogFingerprint): Map<string, PreparedColumn> {
  let columns = PREPARED.get(fp)
  if (!columns) {
    columns = new Map(Object.entries(fp.columns).map(([k, v]) => [k, prepare(v, fp.resolution[k] ?? 0)]))
    PREPARED.set(fp, columns)
  }
  return columns
}

/** Pearson correlation of the pairs (x[i], y[i]) that `keep` allows. */
function pearson(x: Float64Array, y: Float64Array, keep: Uint8Array): number {
  let n = 0
  let sx = 0
  let sy = 0
  for (let i = 0; i < x.length; i++) {
    if (!keep[i]) continue
    n++
    sx += x[i] as number
    sy += y[i] as number
  }
  if (n < 3) return Number.NaN
  const mx = sx / n
  const my = sy / n
  let sxx = 0
  let syy = 0
  let sxy = 0
  for (let i = 0; i < x.length; i++) {
    if (!keep[i]) continue
    const dx = (x[i] as number) - mx
    const dy = (y[i] as number) - my
    sxx += dx * dx
    syy += dy * dy
    sxy += dx * dy
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : Number.NaN
}

/**
 * Correlation of two details with the pairs that disagree most left out, in two steps: pairs with
 * either value far out (beyond {@link FAR_OUT} robust standard deviations: a large edit, the valve
 * opening), then pairs far from the straight-line relation between the two standardised series
 * (a smaller edit). At most {@link NEAR_COPY_TRIM} of the pairs go at each step, so two unrelated
 * series cannot be trimmed into agreement.
 */
function trimmedCorrelation(a: PreparedColumn, b: PreparedColumn, from: number, to: number, lag: number): number {
  const n = to - from
  const x = a.detail.subarray(from, to)
  const y = b.detail.subarray(from + lag, to + lag)
  const keep = new Uint8Array(n).fill(1)
  const allowed = Math.ceil(NEAR_COPY_TRIM * n)
  let dropped = 0
  for (let i = 0; i < n && dropped < allowed; i++) {
    if (
      Math.abs((x[i] as number) - a.centre) > FAR_OUT * a.spread ||
      Math.abs((y[i] as number) - b.centre) > FAR_OUT * b.spread
    ) {
      keep[i] = 0
      dropped++
    }
  }
  const r = pearson(x, y, keep)
  // Two honest runs stay near 0 here, a copy whose large edits are gone far above 0.5 (a handful
  // of smaller edits cannot pull it lower): the second step is only for those, and cheap runs skip it.
  if (!(Math.abs(r) >= 0.5)) return r
  // Standardise both on the kept pairs; a pair's distance from the line v = ±u is its residual.
  let k = 0
  let mx = 0
  let my = 0
  for (let i = 0; i < n; i++) {
    if (!keep[i]) continue
    k++
    mx += x[i] as number
    my += y[i] as number
  }
  mx /= k
  my /= k
  let vx = 0
  let vy = 0
  for (let i = 0; i < n; i++) {
    if (!keep[i]) continue
    vx += ((x[i] as number) - mx) ** 2
    vy += ((y[i] as number) - my) ** 2
  }
  const dx = Math.sqrt(vx / k)
  const dy = Math.sqrt(vy / k)
  const sign = r < 0 ? -1 : 1
  const residual = new Float64Array(n)
  for (let i = 0; i < n; i++)
    residual[i] = Math.abs(((y[i] as number) - my) / dy - (sign * ((x[i] as number) - mx)) / dx)
  const kept = residual.filter((_, i) => keep[i] === 1)
  const limit = FAR_OUT * 1.4826 * medianOf(kept)
  const second = Math.ceil(NEAR_COPY_TRIM * n)
  let gone = 0
  for (let i = 0; i < n && gone < second; i++) {
    if (keep[i] && (residual[i] as number) > limit) {
      keep[i] = 0
      gone++
    }
  }
  return pearson(x, y, keep)
}

function roundedShare(a: readonly number[], b: readonly number[], q: number): { share: number; distinct: number } {
  let same = 0
  const distinct = new Set<number>()
  for (let i = 0; i < a.length; i++) {
    const x = a[i] as number
    const y = b[i] as number
    if (q > 0) {
      const rx = Math.round(x / q)
      if (rx === Math.round(y / q)) same++
      if (distinct.size < MIN_DISTINCT_VALUES) distinct.add(rx)
    } else {
      if (Math.abs(x - y) <= 1e-12 * Math.max(Math.abs(x), Math.abs(y))) same++
      if (distinct.size < MIN_DISTINCT_VALUES) distinct.add(x)
    }
  }
  return { share: a.length ? same / a.length : 0, distinct: distinct.size }
}

/** How one column pair compares, with b's samples shifted by `lag` against a's. */
function compareColumn(key: string, a: PreparedColumn, b: PreparedColumn, lag: number): ColumnMatch | null {
  const from = Math.max(0, -lag)
  const to = Math.min(a.values.length, b.values.length - lag)
  if (to - from < NEAR_COPY_MIN_OVERLAP) return null
  const rounded = roundedShare(
    a.values.slice(from, to),
    b.values.slice(from + lag, to + lag),
    Math.max(a.resolution, b.resolution),
  )
  if (rounded.distinct >= MIN_DISTINCT_VALUES && rounded.share >= NEAR_COPY_ROUNDED_SHARE) {
    return { key, roundedShare: rounded.share, correlation: null, how: 'rounded' }
  }
  if (!a.noise || !b.noise) return null
  // Details exist for samples 1 … n−2 of each window.
  const c = trimmedCorrelation(a, b, Math.max(0, -lag), Math.min(a.detail.length, b.detail.length - lag), lag)
  if (Number.isNaN(c) || !(Math.abs(c) > NEAR_COPY_CORRELATION)) return null
  return { key, roundedShare: rounded.share, correlation: c, how: 'correlated' }
}

/** The lag (in samples) that puts b's window on a's common time base: the same relative times. */
function baseLag(a: LogFingerprint, b: LogFingerprint): number | null {
  if (a.times.length === 0 || b.times.length === 0) return null
  const mid = a.times.length >> 1
  const t = a.times[mid] as number
  let lo = 0
  let hi = b.times.length - 1
  while (hi - lo > 1) {
    const m = (lo + hi) >> 1
    if ((b.times[m] as number) <= t) lo = m
    else hi = m
  }
  const nearest = Math.abs((b.times[lo] as number) - t) <= Math.abs((b.times[hi] as number) - t) ? lo : hi
  return nearest - mid
}

/**
 * Whether log b is a near-copy of log a (the test is symmetric): the columns that match after
 * rounding or by the correlation of their detail, on the common time base of the two windows. The
 * run starts of two copies fall on the same sample; a sample or two either side is tried as well,
 * in case an edit moved one of them.
 *
 * @param a - one log's fingerprint
 * @param b - the other's
 * @returns the matching columns, or null when none matches (or the windows overlap too little)
 * @example
 * nearCopy(logFingerprint(table, original)!, logFingerprint(table, shiftedAndRescaled)!)
 * // → { columns: [{ key: 'thrust', how: 'correlated', correlation: 0.999998, roundedShare: 0 }, …], samples: 256 }
 */
export function nearCopy(a: LogFingerprint, b: LogFingerprint): NearCopy | null {
  if (a.version !== 1 || b.version !== 1) return null
  const base = baseLag(a, b)
  if (base === null) return null
  const keys = Object.keys(a.columns).filter((k) => b.columns[k])
  const pa = prepared(a)
  const pb = prepared(b)
  // The median step of a's window: a lag is on the common time base when the paired samples'
  // relative times differ by less than a couple of steps (by nothing at all for a copy).
  const steps = a.times.slice(1).map((t, i) => t - (a.times[i] as number))
  const step = steps.length ? medianOf(steps) : 0
  const mid = a.times.length >> 1
  let best: NearCopy | null = null
  for (const lag of [base, base - 1, base + 1, base - 2, base + 2]) {
    const paired = b.times[mid + lag]
    if (paired === undefined || !(Math.abs(paired - (a.times[mid] as number)) <= 2.5 * step)) continue
    const matches: ColumnMatch[] = []
    for (const key of keys) {
      const m = compareColumn(key, pa.get(key) as PreparedColumn, pb.get(key) as PreparedColumn, lag)
      if (m) matches.push(m)
    }
    if (matches.length > (best?.columns.length ?? 0)) {
      best = { columns: matches, samples: Math.min(a.times.length, b.times.length - lag) - Math.max(0, -lag) }
      if (matches.length === keys.length) break
    }
  }
  return best
}

/**
 * The words of the near-copy flag.
 *
 * @param filename - the uploaded file's name
 * @param who - the other lab group or person, as staff know them
 * @param match - what {@link nearCopy} found
 */
export function nearCopyMessage(filename: string, who: string, match: NearCopy): string {
  const rounded = match.columns.filter((c) => c.how === 'rounded').map((c) => c.key)
  const correlated = match.columns.filter((c) => c.how === 'correlated').map((c) => c.key)
  const parts: string[] = []
  if (rounded.length)
    parts.push(`${rounded.join(', ')} agree${rounded.length === 1 ? 's' : ''} sample for sample once rounded`)
  if (correlated.length) {
    parts.push(
      `${correlated.join(', ')} carr${correlated.length === 1 ? 'ies' : 'y'} the same sample-to-sample noise (in other units or with another zero)`,
    )
  }
  return `The uploaded log ${filename} is a near-copy of a log handed in by ${who}: from the start of the run, ${parts.join('; ')}. Two runs never log the same noise; a teaching assistant will ask about it.`
}

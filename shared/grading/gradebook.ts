/**
 * The arithmetic of the gradebook, kept pure so the server, the CSV export and the tests share it.
 * Percentages are 0–100.
 */

/** One module's part in a student's total. */
export interface TotalPart {
  weight: number
  /** The counted hand-in's percentage, or null when there is none (or it is not shown). */
  percent: number | null
  /** The module is past its due date: no hand-in then counts as 0 %. */
  pastDue: boolean
}

/**
 * Weighted total: Σ wᵢ·pᵢ / Σ wᵢ over the modules that count, i.e. those with a percentage and
 * those past due without one (as 0 %). Modules of weight 0 drop out.
 * @returns percent, or null when no module counts (or every weight is 0)
 * @example weightedTotal([{ weight: 1, percent: 80, pastDue: true }, { weight: 3, percent: null, pastDue: true }]) // 20
 */
export function weightedTotal(parts: readonly TotalPart[]): number | null {
  let num = 0
  let den = 0
  for (const p of parts) {
    if (!(p.weight > 0)) continue
    if (p.percent !== null) {
      num += p.weight * p.percent
      den += p.weight
    } else if (p.pastDue) {
      den += p.weight
    }
  }
  return den > 0 ? num / den : null
}

/** points / max × 100, or null when the module has no points to give. */
export function percentOf(points: number, max: number): number | null {
  return max > 0 ? (points / max) * 100 : null
}

export function mean(xs: readonly number[]): number | null {
  if (xs.length === 0) return null
  let s = 0
  for (const x of xs) s += x
  return s / xs.length
}

/** The middle value; the mean of the two middle values for an even count. */
export function median(xs: readonly number[]): number | null {
  if (xs.length === 0) return null
  const s = [...xs].sort((a, b) => a - b)
  const mid = Math.floor(s.length / 2)
  return s.length % 2 === 1 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2
}

export const HISTOGRAM_BINS = 10

/**
 * Counts of percentages in ten bins of 10 %: [0, 10), [10, 20), …, [80, 90), [90, 100].
 * Values outside 0–100 (an override cannot make one, but guard anyway) go to the end bins.
 */
export function histogram(percents: readonly number[]): number[] {
  const bins = new Array<number>(HISTOGRAM_BINS).fill(0)
  for (const p of percents) {
    if (!Number.isFinite(p)) continue
    const i = Math.min(HISTOGRAM_BINS - 1, Math.max(0, Math.floor(p / (100 / HISTOGRAM_BINS))))
    bins[i]! += 1
  }
  return bins
}

/** The label of histogram bin `i`, e.g. "30–40 %" (the last one is "90–100 %"). */
export function binLabel(i: number): string {
  const w = 100 / HISTOGRAM_BINS
  return `${i * w}–${(i + 1) * w} %`
}

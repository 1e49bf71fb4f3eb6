import { describe, expect, it } from 'vitest'
import {
  FINGERPRINT_SAMPLES,
  NEAR_COPY_MIN_OVERLAP,
  logFingerprint,
  nearCopy,
} from '../../../shared/grading/fingerprint'
import { standAssignment } from './stand-logs'

const table = standAssignment().tables[0]!

/** A log of n samples at 100 Hz: a step in thrust at sample 100, the given chamber column. */
function log(n: number, noise: (i: number) => number, chamber: (i: number) => number) {
  const t = Array.from({ length: n }, (_, i) => Number((i * 0.01).toFixed(2)))
  const thrust = t.map((_, i) => (i >= 100 ? 20 : 0) + noise(i))
  const p_chamber = t.map((_, i) => chamber(i))
  return { t, thrust, p_chamber }
}

/** A deterministic, noise-like sequence (a linear congruential generator), distinct per seed. */
function lcg(seed: number): (i: number) => number {
  const values: number[] = []
  let x = seed
  for (let i = 0; i < 2000; i++) {
    x = (x * 1103515245 + 12345) % 2147483648
    values.push(Math.round((x / 2147483648 - 0.5) * 200) / 1000)
  }
  return (i) => values[i] as number
}

describe('logFingerprint', () => {
  it('takes a window of consecutive samples just after the run starts, with times relative to the start', () => {
    const fp = logFingerprint(
      table,
      log(
        1000,
        () => 0,
        () => 0,
      ),
    )!
    // The step from 0 to 20 at sample 100 (t = 1.00 s): the median crosses 10 between samples 99 and 100.
    expect(fp.reference).toBeCloseTo(0.995, 9)
    expect(fp.times).toHaveLength(FINGERPRINT_SAMPLES)
    expect(fp.times[0]).toBeCloseTo(1.32 - 0.995, 9)
    expect(Object.keys(fp.columns).sort()).toEqual(['p_chamber', 'thrust'])
    expect(fp.resolution.thrust).toBe(10)
  })

  it('is null for a log without a time column or shorter than the smallest overlap', () => {
    expect(logFingerprint(table, { thrust: [1, 2, 3] })).toBeNull()
    const short = log(
      NEAR_COPY_MIN_OVERLAP - 1,
      () => 0,
      () => 0,
    )
    expect(logFingerprint(table, short)).toBeNull()
  })
})

describe('nearCopy', () => {
  it('two runs whose chamber column is flat (all 0) do not match on it, and do not match at all', () => {
    const a = logFingerprint(
      table,
      log(1000, lcg(1), () => 0),
    )!
    const b = logFingerprint(
      table,
      log(1000, lcg(2), () => 0),
    )!
    expect(nearCopy(a, b)).toBeNull()
  })

  it('a smooth, noise-free column logged with many decimals is judged by rounding only: a different smooth curve is not a copy', () => {
    const a = logFingerprint(
      table,
      log(1000, lcg(3), (i) => Math.exp(-i / 500) * 1e5),
    )!
    const b = logFingerprint(
      table,
      log(1000, lcg(4), (i) => Math.exp(-i / 510) * 1.02e5),
    )!
    expect(nearCopy(a, b)).toBeNull()
    // The same noise in the thrust is a copy, whatever the chamber does.
    const c = logFingerprint(
      table,
      log(1000, lcg(3), (i) => Math.exp(-i / 510) * 1.02e5),
    )!
    expect(nearCopy(a, c)?.columns.map((m) => m.key)).toEqual(['thrust'])
  })

  it('pairs samples on the common time base only: the same values at relative times 100 s apart are not a copy', () => {
    const a = logFingerprint(
      table,
      log(1000, lcg(5), () => 0),
    )!
    // b's samples are a's from the middle of the window on, placed 100 s later: paired by position
    // alone they would be identical.
    const half = a.times.length >> 1
    const rotate = (xs: number[]) => [...xs.slice(half), ...xs.slice(0, half)]
    const b = {
      ...a,
      times: a.times.map((t) => t + 100),
      columns: Object.fromEntries(Object.entries(a.columns).map(([k, v]) => [k, rotate(v)])),
    }
    expect(nearCopy(a, b)).toBeNull()
    expect(nearCopy(a, { ...b, times: a.times })).toBeNull()
    expect(nearCopy(a, a)?.columns.map((m) => m.key)).toEqual(['thrust'])
  })
})

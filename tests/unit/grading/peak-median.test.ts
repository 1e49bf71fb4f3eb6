/**
 * The thrust-above-ideal check reads the peak through a centred 5-sample moving median and skips,
 * by a count, the windows that cannot beat the peak so far. Held here against the median worked
 * out by sorting every window (the window shortened at the ends of the log), on noisy runs with
 * ringing spikes, plateaus and ties.
 */
import { describe, expect, it } from 'vitest'
import { THRUST_PEAK_MEDIAN_WINDOW, gradeSubmission } from '../../../shared/grading/grade'
import { cleanLog, rolesAssignment, withColumn } from './fixtures'

const assignment = rolesAssignment()

/** Median of the centred window around i, by sorting (an even count gives the mean of the middle two). */
function sortedMedian(xs: readonly number[], i: number): number {
  const half = THRUST_PEAK_MEDIAN_WINDOW >> 1
  const w = xs.slice(Math.max(0, i - half), Math.min(xs.length, i + half + 1)).sort((a, b) => a - b)
  const mid = w.length >> 1
  return w.length % 2 === 1 ? (w[mid] as number) : ((w[mid - 1] as number) + (w[mid] as number)) / 2
}

function seeded(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

describe('the peak of the moving median in the thrust-above-ideal check', () => {
  it('is the largest median of any window, at the first sample that has it', () => {
    const random = seeded(11)
    for (let trial = 0; trial < 60; trial++) {
      const base = cleanLog({ thrustRatio: 3 })
      const logged = (base.tables.run as Record<string, readonly number[]>).thrust as readonly number[]
      const thrust = logged.map((f, i) => {
        // Noise, coarse steps (ties), ringing spikes, and a rising or falling run.
        const trend = trial % 3 === 0 ? 1 + i / 200 : trial % 3 === 1 ? 1.5 - i / 200 : 1
        let v = Math.round((f * trend + random() * 4) * 4) / 4
        if (random() < 0.05) v += 40 * random()
        return v
      })
      const flag = gradeSubmission({ assignment, data: withColumn(base, 'thrust', thrust), reported: {} }).flags.find(
        (f) => f.code === 'thrust-above-ideal',
      )
      expect(flag, `trial ${trial}`).toBeDefined()
      let best = 0
      for (let i = 1; i < thrust.length; i++) if (sortedMedian(thrust, i) > sortedMedian(thrust, best)) best = i
      expect(flag?.detail?.peakThrust, `trial ${trial}`).toBe(sortedMedian(thrust, best))
      expect(flag?.detail?.sample, `trial ${trial}`).toBe(best + 1)
    }
  })
})

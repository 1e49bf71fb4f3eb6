import { describe, expect, it } from 'vitest'
import { RUN_THRESHOLD, reduceThrustRun, tareAlongRun, windowIntegral, windowMean } from '../../../shared/physics/index'
import { analyseThrustRun, runOfRescaledThrust } from '../../../shared/physics/thrust-run'
import { expectClose } from '../../helpers/expect-close'
import { expectRangeError } from '../../helpers/expect-range-error'

/**
 * The run reduction against generated stand logs whose truth is worked out here in closed form,
 * not through the library. The reduction's rules (zero from the quiet samples, window at 5 % of
 * the tared peak, peak through a 5-sample moving median) are common practice, no published source;
 * what is checked is that the library applies them exactly as its contract says.
 *
 * The thrust profile of most logs is a sin² burn, F(t) = P sin²(π (t − t0)/D) on [t0, t0 + D]:
 * - it crosses θ·P at t0 + D·asin(√θ)/π and at t0 + D − D·asin(√θ)/π;
 * - ∫ F dt over the burn = P·D/2;
 * - ∫ F dt from a to b inside the burn = P·[(b − a)/2 − D/(4π)·(sin(2π(b − t0)/D) − sin(2π(a − t0)/D))].
 */

/** mulberry32 and Box–Muller: seeded standard normal deviates, so the noisy logs are the same every run. */
function normal(seed: number): () => number {
  let a = seed >>> 0
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform())
}

interface Burn {
  /** Peak thrust, N. */
  P: number
  /** Start and duration of the burn, s. */
  t0: number
  D: number
}

const burnAt = (b: Burn, t: number) =>
  t >= b.t0 && t <= b.t0 + b.D ? b.P * Math.sin((Math.PI * (t - b.t0)) / b.D) ** 2 : 0
const crossingsOf = (b: Burn, theta: number) => {
  const lead = (b.D * Math.asin(Math.sqrt(theta))) / Math.PI
  return { start: b.t0 + lead, end: b.t0 + b.D - lead }
}
const integralBetween = (b: Burn, a: number, c: number) =>
  b.P *
  ((c - a) / 2 -
    (b.D / (4 * Math.PI)) * (Math.sin((2 * Math.PI * (c - b.t0)) / b.D) - Math.sin((2 * Math.PI * (a - b.t0)) / b.D)))

/** Sample times from 0 to `span` s at `rate` Hz (computed as i/rate, so they do not drift). */
const timesOf = (rate: number, span: number) => Array.from({ length: Math.round(span * rate) + 1 }, (_, i) => i / rate)

/** The truth of a sin² burn for the reduction's fields, at threshold θ. */
function truthOf(b: Burn, theta = RUN_THRESHOLD) {
  const { start, end } = crossingsOf(b, theta)
  return {
    start,
    end,
    burnTime: end - start,
    totalImpulse: (b.P * b.D) / 2,
    peakThrust: b.P,
    meanThrust: integralBetween(b, start, end) / (end - start),
  }
}

describe('reduceThrustRun: the contract', () => {
  const t = timesOf(100, 3)
  const F = t.map((x) => 0.3 + (x >= 1 && x <= 2 ? 20 : 0))

  it('returns exactly zeroBefore, zeroAfter, start, end, burnTime, totalImpulse, peakThrust, meanThrust', () => {
    expect(Object.keys(reduceThrustRun(t, F)).sort()).toEqual(
      ['burnTime', 'end', 'meanThrust', 'peakThrust', 'start', 'totalImpulse', 'zeroAfter', 'zeroBefore'].sort(),
    )
  })

  it('reduces a step worked out by hand: 0.3 N zero, 20 N from t = 1 to 2 s at 100 Hz', () => {
    const r = reduceThrustRun(t, F)
    expect(r.zeroBefore).toBe(0.3)
    expect(r.zeroAfter).toBe(0.3)
    // 5 % of 20 N = 1 N: crossed 1/20 of the way from 0.99 s to 1.00 s, and 19/20 from 2.00 to 2.01 s.
    expectClose(r.start, 0.9905, 1e-12)
    expectClose(r.end, 2.0095, 1e-12)
    expectClose(r.burnTime, 1.019, 1e-12)
    // 100 intervals at 20 N plus two edge intervals of 0.01·20/2: 20.2 N·s.
    expectClose(r.totalImpulse, 20.2, 1e-12)
    expectClose(r.peakThrust, 20, 1e-12)
    // Inside the window: 2 × 0.0095·(1 + 20)/2 + 20 = 20.1995 N·s over 1.019 s.
    expectClose(r.meanThrust, 20.1995 / 1.019, 1e-12)
  })

  it('the threshold option moves the window: 50 % of the peak', () => {
    const r = reduceThrustRun(t, F, { threshold: 0.5 })
    expectClose(r.start, 0.995, 1e-12)
    expectClose(r.end, 2.005, 1e-12)
  })

  it('refuses fewer than 10 samples, time not strictly increasing, non-finite values and bad options', () => {
    expectRangeError(() => reduceThrustRun(t.slice(0, 9), F.slice(0, 9)), 'time', 'at least 10 samples')
    const repeated = [...t]
    repeated[150] = repeated[149] as number
    expectRangeError(() => reduceThrustRun(repeated, F), 'time must increase strictly', 'time[150]')
    const backwards = [...t]
    backwards[10] = 0.05
    expectRangeError(() => reduceThrustRun(backwards, F), 'time must increase strictly', 'time[10] = 0.05')
    expectRangeError(
      () =>
        reduceThrustRun(
          t,
          F.map((v, i) => (i === 42 ? Number.NaN : v)),
        ),
      'thrust[42]',
      'NaN',
    )
    expectRangeError(
      () =>
        reduceThrustRun(
          t.map((v, i) => (i === 7 ? Infinity : v)),
          F,
        ),
      'time[7]',
      'Infinity',
    )
    expectRangeError(() => reduceThrustRun(t, F.slice(1)), 'time and thrust must have the same length')
    expectRangeError(
      () => reduceThrustRun(t, F, { threshold: 0 }),
      'options.threshold',
      'greater than 0 and less than 1',
    )
    expectRangeError(() => reduceThrustRun(t, F, { threshold: 1 }), 'options.threshold')
  })

  it('refuses a log with no run above the noise: a flat log, pure noise, a single spike', () => {
    expectRangeError(
      () =>
        reduceThrustRun(
          t,
          t.map(() => 0.25),
        ),
      'no run above the noise',
    )
    const noise = normal(11)
    for (const rate of [100, 1000]) {
      const tt = timesOf(rate, 20)
      expectRangeError(
        () =>
          reduceThrustRun(
            tt,
            tt.map(() => 0.25 + 0.05 * noise()),
          ),
        'no run above the noise',
      )
    }
    // One sample of 30 N on a 0.2 N zero is a glitch, not a run: the moving median removes it.
    expectRangeError(
      () =>
        reduceThrustRun(
          t,
          t.map((_, i) => (i === 120 ? 30 : 0.2)),
        ),
      'no run above the noise',
    )
  })

  it('refuses a log that starts inside the run (no zero to take)', () => {
    // Logging started after the valve opened: the thrust falls from 20 N from the first sample on.
    const falling = t.map((x) => 0.3 + (x < 2 ? 20 * (1 - x / 2) : 0))
    expectRangeError(() => reduceThrustRun(t, falling), 'no quiet samples before the run')
  })
})

describe('reduceThrustRun on generated stand logs (truth in closed form)', () => {
  it('a zero offset: a 0.35 N zero under a 40 N, 2 s sin² burn at 100 Hz is taken out of every field', () => {
    const burn: Burn = { P: 40, t0: 1.5, D: 2 }
    const t = timesOf(100, 6)
    const F = t.map((x) => 0.35 + burnAt(burn, x))
    const r = reduceThrustRun(t, F)
    const truth = truthOf(burn)
    expect(r.zeroBefore).toBe(0.35)
    expect(r.zeroAfter).toBe(0.35)
    // Linear interpolation between samples puts each crossing within h²·F''/(8F') ≈ 1e-4 s of the
    // curve's own (h = 0.01 s): a chord of a convex rise reaches the level a little early.
    expectClose(r.start, truth.start, 1e-4)
    expectClose(r.end, truth.end, 1e-4)
    expectClose(r.burnTime, truth.burnTime, 3e-4)
    expectClose(r.totalImpulse, truth.totalImpulse, 1e-6)
    expectClose(r.peakThrust, truth.peakThrust, 1e-3)
    expectClose(r.meanThrust, truth.meanThrust, 3e-4)
    // Integrated untared, the zero would add 0.35 N × 6 s = 2.1 N·s: 5 % of the 40 N·s.
    expect(Math.abs(r.totalImpulse - (truth.totalImpulse + 0.35 * 6))).toBeGreaterThan(2)
  })

  it('a drifting zero: 0.30 N before the run, 0.12 N after, moving in a straight line across it', () => {
    const burn: Burn = { P: 25, t0: 2, D: 4 }
    const { start, end } = crossingsOf(burn, RUN_THRESHOLD)
    // The load cell's zero slides from 0.30 N to 0.12 N between the run's crossings (a thermal creep).
    const zero = (x: number) =>
      x <= start ? 0.3 : x >= end ? 0.12 : 0.3 + ((0.12 - 0.3) * (x - start)) / (end - start)
    const t = timesOf(100, 9)
    const r = reduceThrustRun(
      t,
      t.map((x) => zero(x) + burnAt(burn, x)),
    )
    const truth = truthOf(burn)
    expectClose(r.zeroBefore, 0.3, 1e-12)
    expectClose(r.zeroAfter as number, 0.12, 1e-12)
    expectClose(r.start, truth.start, 1e-4)
    expectClose(r.end, truth.end, 1e-4)
    expectClose(r.totalImpulse, truth.totalImpulse, 1e-5)
    expectClose(r.peakThrust, truth.peakThrust, 1e-3)
    expectClose(r.meanThrust, truth.meanThrust, 1e-4)
  })

  it('a ringing spike at valve opening neither becomes the peak nor opens the window early', () => {
    // A blow-down-like run at 100 Hz: the valve opens at 1 s, the thrust ramps to 30 N by 1.05 s and
    // decays as 30·exp(−(t − 1.05)/3) until the valve closes at 10 s, when it drops to 0 (no samples
    // fall between 10 s and the next one, so the drop is a clean step in the log).
    const P = 30
    const tau = 3
    const thrust = (x: number) =>
      x < 1 ? 0 : x < 1.05 ? (P * (x - 1)) / 0.05 : x <= 10 ? P * Math.exp(-(x - 1.05) / tau) : 0
    const t = timesOf(100, 13)
    // The stand rings when the valve hits its stop: +9 N at the sample at 1.05 s, −4 N at the next.
    // And a knock as the valve is unlatched, at 0.96 s: +8 N while the thrust is still 0.
    const ring = (i: number) => (i === 105 ? 9 : i === 106 ? -4 : i === 96 ? 8 : 0)
    const F = t.map((x, i) => 0.2 + thrust(x) + ring(i))
    const r = reduceThrustRun(t, F)
    // The largest sample is 39.2 N. Tared, the samples from 1.03 s are 18, 24, 39, 30·e^(−0.01/3) − 4,
    // 30·e^(−0.02/3), 30·e^(−0.03/3), 30·e^(−0.04/3) …: the medians of five are 26.1 N at 1.05 s,
    // 30·e^(−0.03/3) at 1.06 and 1.07 s (the spike is one of the five, the 1.08 s sample the middle
    // one), and lower after; so the peak is 30·e^(−0.03/3) N.
    expect(Math.max(...F)).toBeCloseTo(39.2, 9)
    expectClose(r.peakThrust, P * Math.exp(-0.03 / tau), 1e-9)
    // 5 % of that peak is crossed on the ramp between 1.00 s (0) and 1.01 s (6 N).
    const level = 0.05 * r.peakThrust
    expectClose(r.start, 1 + (0.01 * level) / 6, 1e-9)
    // …and last on the step down between 10.00 s and 10.01 s.
    const atClose = P * Math.exp(-(10 - 1.05) / tau)
    expectClose(r.end, 10 + (0.01 * (atClose - level)) / atClose, 1e-9)
    // The impulse: the ramp, the decay (trapezoid sums of an exponential, in closed form: a geometric
    // series), the step's half interval, and the ring samples' own trapezoids (each adds its height × 0.01 s).
    const h = 0.01
    const q = Math.exp(-h / tau)
    const decay = ((h / 2) * P * (1 + q) * (1 - q ** 895)) / (1 - q) // samples 1.05 … 10.00 s: 895 intervals
    const ramp =
      (h / 2) * (0 + 6) + (h / 2) * (6 + 12) + (h / 2) * (12 + 18) + (h / 2) * (18 + 24) + (h / 2) * (24 + 30)
    const step = (h / 2) * atClose
    expectClose(r.totalImpulse, ramp + decay + step + (9 - 4 + 8) * h, 1e-9)
  })

  it('a 1 kHz short burn: 0.15 s of 120 N with noise, 0.1 s logged before and 0.3 s after', () => {
    const burn: Burn = { P: 120, t0: 0.1, D: 0.15 }
    const noise = normal(1066)
    const sigma = 0.15
    const t = timesOf(1000, 0.55)
    const F = t.map((x) => 0.8 + burnAt(burn, x) + sigma * noise())
    const r = reduceThrustRun(t, F)
    const truth = truthOf(burn)
    // The zeros: medians of ~100 and ~300 noisy samples, within a few σ/√n of 0.8 N.
    expect(Math.abs(r.zeroBefore - 0.8)).toBeLessThan(0.06)
    expect(Math.abs((r.zeroAfter as number) - 0.8)).toBeLessThan(0.04)
    // Noise of 0.15 N on a slope of up to 2.5 N/ms moves each crossing by well under a sample.
    expect(Math.abs(r.start - truth.start)).toBeLessThan(0.001)
    expect(Math.abs(r.end - truth.end)).toBeLessThan(0.001)
    expectClose(r.totalImpulse, truth.totalImpulse, 0.005)
    expectClose(r.peakThrust, truth.peakThrust, 0.005)
    expectClose(r.meanThrust, truth.meanThrust, 0.01)
  })

  it('noise on a 100 Hz log: every field stays within a fraction of a per cent of the truth', () => {
    const burn: Burn = { P: 28, t0: 2, D: 10 }
    const noise = normal(42)
    const t = timesOf(100, 16)
    const F = t.map((x) => 0.25 + burnAt(burn, x) + 0.08 * noise())
    const r = reduceThrustRun(t, F)
    const truth = truthOf(burn)
    expect(Math.abs(r.zeroBefore - 0.25)).toBeLessThan(0.03)
    expect(Math.abs((r.zeroAfter as number) - 0.25)).toBeLessThan(0.03)
    expectClose(r.totalImpulse, truth.totalImpulse, 0.003)
    expectClose(r.peakThrust, truth.peakThrust, 0.005)
    expectClose(r.burnTime, truth.burnTime, 0.01)
    expectClose(r.meanThrust, truth.meanThrust, 0.01)
  })

  it('a log that ends inside the run has no zero after it: zeroAfter is null and the window ends at the last sample', () => {
    const burn: Burn = { P: 40, t0: 1, D: 4 }
    const t = timesOf(100, 3.5) // stops while the burn still gives 40·sin²(π·2.5/4) = 20 N
    const r = reduceThrustRun(
      t,
      t.map((x) => 0.4 + burnAt(burn, x)),
    )
    expect(r.zeroAfter).toBeNull()
    expect(r.zeroBefore).toBe(0.4)
    expect(r.end).toBe(3.5)
    expectClose(r.start, crossingsOf(burn, 0.05).start, 1e-4)
    // Tared with zeroBefore throughout: the impulse is ∫ over [1, 3.5] s of the sin² burn.
    expectClose(r.totalImpulse, integralBetween(burn, 1, 3.5), 1e-5)
  })

  it('a threshold of 10 % crosses at t0 + D·asin(√0.1)/π', () => {
    const burn: Burn = { P: 50, t0: 1, D: 3 }
    const t = timesOf(200, 5)
    const r = reduceThrustRun(
      t,
      t.map((x) => 0.1 + burnAt(burn, x)),
      { threshold: 0.1 },
    )
    const truth = truthOf(burn, 0.1)
    expectClose(r.start, truth.start, 1e-4)
    expectClose(r.end, truth.end, 1e-4)
    expectClose(r.meanThrust, truth.meanThrust, 1e-4)
  })
})

describe('runOfRescaledThrust: the same log read with another zero and calibration', () => {
  // Logs with everything the reduction decides on: noise, a drifting zero, a ringing spike, and one
  // that ends inside the run. The rescaled analysis must agree with reducing the rescaled log.
  const logs: [string, number[], number[]][] = []
  {
    const burn: Burn = { P: 28, t0: 2, D: 10 }
    const noise = normal(7)
    const t = timesOf(100, 16)
    const drift = (x: number) => 0.25 - 0.01 * x
    logs.push([
      'noisy, drifting, ringing',
      t,
      t.map((x, i) => drift(x) + burnAt(burn, x) + 0.08 * noise() + (i === 201 ? 9 : 0)),
    ])
  }
  {
    const burn: Burn = { P: 40, t0: 1, D: 4 }
    const t = timesOf(100, 3.5)
    const noise = normal(11)
    logs.push(['ends inside the run', t, t.map((x) => 0.4 + burnAt(burn, x) + 0.02 * noise())])
  }
  const moves: [number, number][] = [
    [0.05, 1],
    [-0.05, 1],
    [0, 1.005],
    [0, 0.995],
    [-3.2, 9.80665],
    [120, 0.25],
  ]

  for (const [name, t, F] of logs) {
    for (const [offset, gain] of moves) {
      it(`${name}: offset ${offset} N, gain ${gain}`, () => {
        const direct = analyseThrustRun(
          t,
          F.map((f) => offset + gain * f),
        )
        const derived = runOfRescaledThrust(analyseThrustRun(t, F), offset, gain)
        expect(derived.quietBeforeEnd).toBe(direct.quietBeforeEnd)
        expect(derived.quietAfterStart).toBe(direct.quietAfterStart)
        expect(derived.zeroAfter === null).toBe(direct.zeroAfter === null)
        // Rounding only: the moved samples are rounded once, the interpolated crossings differ in the last bits.
        expectClose(derived.zeroBefore, direct.zeroBefore, 1e-12)
        if (direct.zeroAfter !== null) expectClose(derived.zeroAfter as number, direct.zeroAfter, 1e-12)
        for (const key of ['start', 'end', 'burnTime', 'totalImpulse', 'peakThrust', 'meanThrust'] as const) {
          expectClose(derived[key], direct[key], 1e-10)
        }
      })
    }
  }

  it('refuses a gain that is not positive (a reversed load cell changes which samples are the peak)', () => {
    const t = timesOf(100, 4)
    const run = analyseThrustRun(
      t,
      t.map((x) => burnAt({ P: 10, t0: 1, D: 2 }, x)),
    )
    expectRangeError(() => runOfRescaledThrust(run, 0, 0), 'gain must be a positive finite number')
    expectRangeError(() => runOfRescaledThrust(run, 0, -1), 'gain must be a positive finite number')
    expectRangeError(() => runOfRescaledThrust(run, Number.NaN, 1), 'offset must be a finite number')
  })
})

describe('tareAlongRun', () => {
  it('takes a chamber transducer zero with the thrust run: 1.5 kPa before, 2.5 kPa after, a line across the run', () => {
    const burn: Burn = { P: 30, t0: 1, D: 2 }
    const { start, end } = crossingsOf(burn, RUN_THRESHOLD)
    const zero = (x: number) => (x <= start ? 1500 : x >= end ? 2500 : 1500 + (1000 * (x - start)) / (end - start))
    const t = timesOf(100, 4.5)
    const thrust = t.map((x) => 0.2 + burnAt(burn, x))
    // The chamber follows the burn: 400 kPa gauge at its peak.
    const chamber = t.map((x) => zero(x) + (400e3 / 30) * burnAt(burn, x))
    const tared = tareAlongRun(t, chamber, thrust)
    tared.forEach((p, i) =>
      expect(Math.abs(p - (400e3 / 30) * burnAt(burn, t[i] as number)), `sample ${i}`).toBeLessThan(0.5),
    )
  })

  it('refuses a signal of another length', () => {
    const t = timesOf(100, 3)
    expectRangeError(
      () =>
        tareAlongRun(
          t,
          t.slice(1),
          t.map((x) => (x > 1 && x < 2 ? 10 : 0)),
        ),
      'time and values must have the same length',
    )
  })
})

describe('windowIntegral and windowMean', () => {
  const t = [0, 1, 2, 3]
  const x = [0, 10, 10, 0]

  it('integrate by the trapezoid rule with the ends interpolated (by hand: 3.75 + 10 + 3.75 N·s)', () => {
    expect(windowIntegral(t, x, 0.5, 2.5)).toBe(17.5)
    expect(windowMean(t, x, 0.5, 2.5)).toBe(8.75)
    expect(windowIntegral(t, x, 0, 3)).toBe(20)
    expect(windowIntegral(t, x, 1.2, 1.7)).toBeCloseTo(5, 12)
    expect(windowIntegral(t, x, 2, 2)).toBe(0)
  })

  it('are exact for a straight line over uneven samples and any window', () => {
    const times = [0, 0.013, 0.05, 0.051, 0.4, 1.7, 1.75]
    const line = times.map((v) => 20 + 30 * v)
    // ∫ (20 + 30 t) dt from a to b = 20 (b − a) + 15 (b² − a²).
    const exact = (a: number, b: number) => 20 * (b - a) + 15 * (b * b - a * a)
    expectClose(windowIntegral(times, line, 0.02, 1.72), exact(0.02, 1.72), 1e-13)
    expectClose(windowMean(times, line, 0.0505, 0.3), exact(0.0505, 0.3) / 0.2495, 1e-13)
  })

  it('converge to ∫ sin over a window between samples', () => {
    const times = timesOf(1000, 2)
    const s = times.map((v) => Math.sin(v))
    // ∫ sin t dt from 0.3337 to 1.6021 = cos(0.3337) − cos(1.6021).
    expectClose(windowIntegral(times, s, 0.3337, 1.6021), Math.cos(0.3337) - Math.cos(1.6021), 1e-6)
  })

  it('refuse a window outside the log, a reversed window, an empty window for the mean, and bad samples', () => {
    expectRangeError(() => windowIntegral(t, x, -0.1, 2), 'start', 'of at least the first time (0)')
    expectRangeError(() => windowIntegral(t, x, 1, 3.1), 'end', 'at most the last time (3)')
    expectRangeError(() => windowIntegral(t, x, 2, 1), 'end', 'of at least start (2)')
    expectRangeError(() => windowMean(t, x, 2, 2), 'end', 'greater than start (2)')
    expectRangeError(() => windowIntegral([0, 1, 1, 2], x, 0, 2), 'time must increase strictly')
    expectRangeError(() => windowIntegral(t, [0, 1, Number.NaN, 0], 0, 2), 'values[2]', 'NaN')
    expectRangeError(() => windowMean(t, [1, 2, 3], 0, 2), 'time and values must have the same length')
  })
})

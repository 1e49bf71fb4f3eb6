import { describe, expect, it } from 'vitest'
import { CHAMBER_ABOVE_RECEIVER_FLOOR, gradeSubmission } from '../../../shared/grading/grade'
import type { GradeFlag } from '../../../shared/grading/grade'
import type { SubmissionData } from '../../../shared/modules/scope'
import { expectClose } from '../../helpers/expect-close'
import {
  STANDARD_ATMOSPHERE,
  THROAT_AREA,
  cleanLog,
  idealThrustCoefficientMach2,
  rolesAssignment,
  withColumn,
} from './fixtures'

const assignment = rolesAssignment()

function flagsOf(data: SubmissionData): GradeFlag[] {
  return gradeSubmission({ assignment, data, reported: {} }).flags
}

function codesOf(data: SubmissionData): string[] {
  return flagsOf(data).map((f) => f.code)
}

function column(data: SubmissionData, key: string): number[] {
  return [...((data.tables.run as Record<string, readonly number[]>)[key] as number[])]
}

// Ideal thrust of the Mach-2 nozzle (4 mm throat) at 1 MPa against 101.325 kPa, by eq. 3-30:
// C_F = 1.20775 + (0.127805 − 0.101325) × 1.6875 = 1.25243, F = C_F · p0 · At = 15.739 N.
const IDEAL_AT_1MPA = idealThrustCoefficientMach2(1e6, STANDARD_ATMOSPHERE) * 1e6 * THROAT_AREA

describe('built-in data checks on a clean run', () => {
  it('raise no flag: thrust 0.9 × ideal, gauge pressures at 0 at rest, chamber 5 % below the receiver, steady 10 ms samples, 80 samples with thrust', () => {
    expect(flagsOf(cleanLog())).toEqual([])
  })
})

describe('thrust-above-ideal', () => {
  it('the hand value of the ideal thrust is C_F = 1.2524 at 1 MPa (Sutton & Biblarz eq. 3-30)', () => {
    expectClose(IDEAL_AT_1MPA / (1e6 * THROAT_AREA), 1.25243, 1e-5)
  })

  it('fires when the peak thrust is 1.2 × the ideal thrust for the chamber pressure at that sample, with the figures in its detail', () => {
    const flag = flagsOf(cleanLog({ thrustRatio: 1.2 })).find((f) => f.code === 'thrust-above-ideal')
    expect(flag).toBeDefined()
    expectClose(flag?.detail?.idealThrust as number, IDEAL_AT_1MPA, 1e-9)
    expectClose(flag?.detail?.peakThrust as number, 1.2 * IDEAL_AT_1MPA, 1e-12)
    expect(flag?.detail?.chamberPressure).toBe(1e6)
    expect(flag?.message).toMatch(/20 % above the ideal thrust of 15\.7 N/)
  })

  it('uses the chamber pressure logged at the peak-thrust samples, not the peak chamber pressure', () => {
    // At samples 49–53 the chamber reads only 500 kPa absolute while the thrust equals the ideal at 1 MPa:
    // the ideal at 500 kPa is C_F(0.5 MPa) · 0.5 MPa · At = 6.71 N (C_F = 1.20775 + (0.127805 − 0.20265) · 1.6875 = 1.08145).
    // Read through the 5-sample median, the first sample whose window is mostly high is sample 49 (t = 0.48 s).
    const clean = cleanLog({ thrustRatio: 0.9 })
    const thrust = column(clean, 'thrust')
    const chamber = column(clean, 'p_chamber')
    for (let i = 48; i <= 52; i++) {
      thrust[i] = IDEAL_AT_1MPA
      chamber[i] = 5e5 - STANDARD_ATMOSPHERE
    }
    const flag = flagsOf(withColumn(withColumn(clean, 'thrust', thrust), 'p_chamber', chamber)).find(
      (f) => f.code === 'thrust-above-ideal',
    )
    expect(flag?.detail?.sample).toBe(49)
    expect(flag?.detail?.time).toBe(0.48)
    expect(flag?.detail?.chamberPressure).toBe(5e5)
    expectClose(flag?.detail?.idealThrust as number, 1.08145 * 5e5 * THROAT_AREA, 1e-5)
  })

  it('fires on thrust logged while the chamber is not above ambient, where the ideal thrust is 0', () => {
    const clean = cleanLog()
    const flag = flagsOf(
      withColumn(
        clean,
        'p_chamber',
        column(clean, 'p_chamber').map(() => 0),
      ),
    ).find((f) => f.code === 'thrust-above-ideal')
    expect(flag?.detail?.idealThrust).toBe(0)
    expect(flag?.message).toMatch(
      /was logged while the chamber pressure \(101 kPa absolute\) was not above the ambient pressure/,
    )
  })

  it('does not fire within the 10 % margin (1.09 × ideal) and fires just beyond it (1.11 × ideal)', () => {
    expect(codesOf(cleanLog({ thrustRatio: 1.09 }))).not.toContain('thrust-above-ideal')
    expect(codesOf(cleanLog({ thrustRatio: 1.11 }))).toContain('thrust-above-ideal')
  })
})

describe('pressure-looks-gauge and pressure-looks-absolute', () => {
  it('a chamber pressure declared absolute that reads 0 at rest looks gauge', () => {
    const flags = flagsOf({ ...cleanLog(), pressures: { p_chamber: 'absolute' } })
    const flag = flags.find((f) => f.code === 'pressure-looks-gauge')
    expect(flag?.detail).toMatchObject({ column: 'p_chamber', declared: 'absolute', restingValue: 0 })
    expect(flag?.message).toMatch(/chamber pressure is declared absolute/)
  })

  it('a receiver declared absolute that reads 0 once emptied looks gauge', () => {
    const flag = flagsOf({ ...cleanLog(), pressures: { p_receiver: 'absolute' } }).find(
      (f) => f.code === 'pressure-looks-gauge',
    )
    expect(flag?.detail?.column).toBe('p_receiver')
  })

  it('a chamber pressure declared gauge that reads the barometric pressure at rest looks absolute', () => {
    const clean = cleanLog()
    const logged = column(clean, 'p_chamber').map((p) => p + STANDARD_ATMOSPHERE)
    const flag = flagsOf(withColumn(clean, 'p_chamber', logged)).find((f) => f.code === 'pressure-looks-absolute')
    expect(flag?.detail).toMatchObject({ column: 'p_chamber', declared: 'gauge', restingValue: STANDARD_ATMOSPHERE })
  })

  it('also near one standard atmosphere when the barometer reads lower: 101.3 kPa at rest at an 84 kPa campus', () => {
    // |101.325 − 84| = 17.3 kPa is outside 20 % of 84 kPa (16.8 kPa) but within 20 % of 101.325 kPa (20.3 kPa).
    const clean = cleanLog({ ambient: 84_000, chamberPressure: 8e5 })
    const logged = column(clean, 'p_chamber').map((p) => p + STANDARD_ATMOSPHERE)
    expect(codesOf(withColumn(clean, 'p_chamber', logged))).toContain('pressure-looks-absolute')
  })

  it('a gauge reading with a small zero offset at rest (3 kPa) is not flagged', () => {
    const clean = cleanLog()
    const offset = column(clean, 'p_chamber').map((p) => p + 3000)
    expect(flagsOf(withColumn(clean, 'p_chamber', offset))).toEqual([])
  })
})

describe('chamber-above-receiver', () => {
  it('fires when the chamber and receiver columns are swapped', () => {
    const clean = cleanLog()
    const swapped = withColumn(
      withColumn(clean, 'p_chamber', column(clean, 'p_receiver')),
      'p_receiver',
      column(clean, 'p_chamber'),
    )
    const flag = flagsOf(swapped).find((f) => f.code === 'chamber-above-receiver')
    // The largest excess is before the run: chamber column now holds the full receiver, 1.1 MPa.
    expect(flag?.detail?.sample).toBe(1)
    expect(flag?.detail?.chamberPressure).toBe(1.1e6)
    expect(flag?.detail?.receiverPressure).toBe(STANDARD_ATMOSPHERE)
  })

  it('without a declared full scale, allows 1 % of each transducer’s peak reading: 1.1 MPa and about 1.07 MPa give about 21.7 kPa, so 21 kPa above passes and 23 kPa is flagged', () => {
    const clean = cleanLog()
    const receiver = column(clean, 'p_receiver')
    const above = (excess: number) =>
      column(clean, 'p_chamber').map((p, i) => (i >= 10 && i < 90 ? (receiver[i] as number) + excess : p))
    expect(codesOf(withColumn(clean, 'p_chamber', above(21_000)))).not.toContain('chamber-above-receiver')
    expect(codesOf(withColumn(clean, 'p_chamber', above(23_000)))).toContain('chamber-above-receiver')
  })

  it(`at rest, noise below the ${CHAMBER_ABOVE_RECEIVER_FLOOR / 1000} kPa floor is not flagged`, () => {
    const clean = cleanLog()
    const chamber = column(clean, 'p_chamber').map((p, i) => (i >= 90 ? p + 4000 : p))
    expect(codesOf(withColumn(clean, 'p_chamber', chamber))).not.toContain('chamber-above-receiver')
  })
})

describe('time-gap', () => {
  function withoutSamples(data: SubmissionData, from: number, count: number): SubmissionData {
    const run = data.tables.run as Record<string, readonly number[]>
    const cut = Object.fromEntries(
      Object.entries(run).map(([k, v]) => [k, v.filter((_, i) => i < from || i >= from + count)]),
    )
    return { ...data, tables: { run: cut } }
  }

  it('fires on a step of 0.11 s among 10 ms steps (11 × the median step), naming where', () => {
    const flag = flagsOf(withoutSamples(cleanLog(), 40, 10)).find((f) => f.code === 'time-gap')
    expect(flag?.detail?.gaps).toBe(1)
    expectClose(flag?.detail?.largestGap as number, 0.11, 1e-9)
    expectClose(flag?.detail?.after as number, 0.39, 1e-12)
    expectClose(flag?.detail?.medianStep as number, 0.01, 1e-9)
  })

  it('takes the median step of uneven sampling exactly, for odd and even counts and repeated steps', () => {
    // Steps drawn from a few values (so many repeat), then one step of 1000 s that is surely a gap;
    // the reference median comes from sorting the steps here.
    let seed = 99
    const random = () => {
      seed = (seed * 16807) % 2147483647
      return seed / 2147483647
    }
    for (const count of [7, 8, 101, 1000, 1001]) {
      const steps = Array.from({ length: count }, () => [0.01, 0.02, 0.05, 0.013][Math.floor(random() * 4)] as number)
      steps.push(1000)
      const t = [0]
      for (const s of steps) t.push((t[t.length - 1] as number) + s)
      const sorted = [...steps].sort((x, y) => x - y)
      const n = sorted.length
      const expected =
        n % 2 === 1 ? (sorted[n >> 1] as number) : ((sorted[(n >> 1) - 1] as number) + (sorted[n >> 1] as number)) / 2
      const data: SubmissionData = {
        tables: { run: { t, thrust: t.map(() => 0), p_receiver: t.map(() => 0), p_chamber: t.map(() => 0) } },
        measurements: cleanLog().measurements,
      }
      const flag = flagsOf(data).find((f) => f.code === 'time-gap')
      // Differences of accumulated times carry rounding, hence a relative tolerance.
      expectClose(flag?.detail?.medianStep as number, expected, 1e-9, `${count} steps`)
    }
  })

  it('does not fire on a step of 4 × the median (three samples missing)', () => {
    expect(codesOf(withoutSamples(cleanLog(), 40, 3))).not.toContain('time-gap')
  })
})

describe('too-few-samples', () => {
  it('fires with 19 samples of thrust above 5 % of the peak', () => {
    const flag = flagsOf(cleanLog({ samples: 39, rest: 10 })).find((f) => f.code === 'too-few-samples')
    expect(flag?.detail).toEqual({ samples: 19, needed: 20 })
  })

  it('does not fire with 20', () => {
    expect(codesOf(cleanLog({ samples: 40, rest: 10 }))).not.toContain('too-few-samples')
  })

  it('counts only thrust above 5 % of the peak: a load-cell offset of 3 % at rest is not "during the run"', () => {
    const clean = cleanLog({ samples: 39, rest: 10 })
    const thrust = column(clean, 'thrust')
    const peak = Math.max(...thrust)
    const offset = thrust.map((f) => f + 0.03 * peak)
    expect(codesOf(withColumn(clean, 'thrust', offset))).toContain('too-few-samples')
  })
})

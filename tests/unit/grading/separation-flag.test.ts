/**
 * The thrust-above-ideal check against a strongly over-expanded nozzle whose flow separates, and
 * the 5-sample moving median it reads the peak through. The logs are generated here; every
 * thrust in them comes from closed forms written out in this file, not from the formula library.
 */
import { describe, expect, it } from 'vitest'
import { THRUST_ABOVE_IDEAL_MARGIN, THRUST_PEAK_MEDIAN_WINDOW, gradeSubmission } from '../../../shared/grading/grade'
import type { GradeFlag } from '../../../shared/grading/grade'
import type { SubmissionData } from '../../../shared/modules/scope'
import { expectClose } from '../../helpers/expect-close'
import { expectPrinted } from '../../helpers/printed'
import {
  GAMMA,
  STANDARD_ATMOSPHERE,
  THROAT_AREA,
  THROAT_DIAMETER,
  cleanLog,
  rolesAssignment,
  withColumn,
} from './fixtures'

const assignment = rolesAssignment()
const flagOf = (data: SubmissionData): GradeFlag | undefined =>
  gradeSubmission({ assignment, data, reported: {} }).flags.find((f) => f.code === 'thrust-above-ideal')

// ---- Closed forms (NACA Report 1135 eqs. 44 and 80; Sutton & Biblarz eq. 3-30; all from memory) ----
const g = GAMMA
const pOverP0 = (m: number) => Math.pow(1 + ((g - 1) / 2) * m * m, -g / (g - 1))
const machOfPressureRatio = (p: number) => Math.sqrt((2 / (g - 1)) * (Math.pow(p, -(g - 1) / g) - 1))
const areaRatioOf = (m: number) => Math.pow((2 / (g + 1)) * (1 + ((g - 1) / 2) * m * m), (g + 1) / (2 * (g - 1))) / m
function thrustCoefficient(p2OverP1: number, p3OverP1: number, areaRatio: number): number {
  const momentum = Math.sqrt(
    ((2 * g * g) / (g - 1)) * Math.pow(2 / (g + 1), (g + 1) / (g - 1)) * (1 - Math.pow(p2OverP1, (g - 1) / g)),
  )
  return momentum + (p2OverP1 - p3OverP1) * areaRatio
}
function designMach(areaRatio: number): number {
  let lo = 1
  let hi = 50
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi)
    if (areaRatioOf(mid) > areaRatio) hi = mid
    else lo = mid
  }
  return 0.5 * (lo + hi)
}

// A strongly over-expanded nozzle: 4 mm throat, 8 mm exit (ε = 4), chamber at 5 × ambient (pa/p0 = 0.2).
const EPSILON = 4
const PA = STANDARD_ATMOSPHERE
const P0 = 5 * PA
// Running full: exit at the design pressure of ε = 4 (pe/p0 = 0.0298), far below ambient.
const FULL_CF = thrustCoefficient(pOverP0(designMach(EPSILON)), 0.2, EPSILON)
// Separated by the Summerfield criterion (wall pressure 0.4 × ambient; Summerfield, Foster & Swan
// 1954, ratio from memory): the nozzle acts as one cut off where p/p0 = 0.4 × 0.2 = 0.08.
const SEPARATION_AREA_RATIO = areaRatioOf(machOfPressureRatio(0.08))
const SEPARATED_CF = thrustCoefficient(0.08, 0.2, SEPARATION_AREA_RATIO)
const FULL_THRUST = FULL_CF * P0 * THROAT_AREA
const SEPARATED_THRUST = SEPARATED_CF * P0 * THROAT_AREA

/**
 * A run log at a steady chamber pressure of 5 × ambient, 0.01 s samples: 20 at rest, 200 flowing,
 * 20 at rest. While flowing the thrust is `thrust` with ±0.5 % deterministic noise, and the first
 * flowing sample rings at 1.6 × (the load cell's overshoot when the valve opens).
 */
function overexpandedLog(thrust: number): SubmissionData {
  let seed = 7
  const noise = () => {
    seed = (seed * 16807) % 2147483647
    return 0.01 * (seed / 2147483647 - 0.5)
  }
  const t: number[] = []
  const force: number[] = []
  const chamber: number[] = []
  const receiver: number[] = []
  for (let i = 0; i < 240; i++) {
    const flowing = i >= 20 && i < 220
    t.push(i * 0.01)
    force.push(flowing ? (i === 20 ? 1.6 : 1 + noise()) * thrust : 0)
    chamber.push(flowing ? P0 - PA : 0)
    receiver.push(flowing ? 1.05 * P0 - PA : i < 20 ? 1.1 * P0 - PA : 0)
  }
  return {
    tables: { run: { t, thrust: force, p_receiver: receiver, p_chamber: chamber } },
    measurements: { p_ambient: PA, d_throat: THROAT_DIAMETER, d_exit: 2 * THROAT_DIAMETER, v_receiver: 0.05 },
  }
}

describe('thrust-above-ideal with a separated, strongly over-expanded nozzle (ε = 4, pa/p0 = 0.2)', () => {
  it('the closed forms: CF 0.761 running full, 1.036 separated at A/At = 2.19; the separated thrust is 36 % more', () => {
    expectPrinted(FULL_CF, '0.761')
    expectPrinted(SEPARATION_AREA_RATIO, '2.19')
    expectPrinted(SEPARATED_CF, '1.036')
    // Beyond the 10 % margin over the full-flowing ideal: a check against it alone fires on honest data.
    expect(SEPARATED_THRUST).toBeGreaterThan((1 + THRUST_ABOVE_IDEAL_MARGIN) * FULL_THRUST)
  })

  it('does not flag honest data at the separated thrust (with noise and a ringing first sample)', () => {
    expect(flagOf(overexpandedLog(SEPARATED_THRUST))).toBeUndefined()
  })

  it('flags thrust truly above both estimates (1.2 × the separated thrust), naming both in its detail', () => {
    const flag = flagOf(overexpandedLog(1.2 * SEPARATED_THRUST))
    expect(flag).toBeDefined()
    expectClose(flag?.detail?.idealThrust as number, SEPARATED_THRUST, 1e-9, 'the ceiling is the separated estimate')
    expectClose(flag?.detail?.separatedThrust as number, SEPARATED_THRUST, 1e-9)
    expectClose(flag?.detail?.fullFlowingThrust as number, FULL_THRUST, 1e-9)
    expectClose(flag?.detail?.peakThrust as number, 1.2 * SEPARATED_THRUST, 0.006, 'the median peak, within the noise')
    expect(flag?.detail?.chamberPressure).toBe(P0)
    expect(flag?.message).toMatch(/flow separating from the nozzle wall/)
    expect(flag?.message).toMatch(/above the ideal thrust of 6\.59 N .*more than the 4\.85 N of a nozzle running full/)
  })

  it('flags thrust 12 % above the separated estimate and passes 8 % above it (the 10 % margin)', () => {
    // Noise of ±0.5 % cannot move a plateau across the margin from 2 % away.
    expect(flagOf(overexpandedLog(1.12 * SEPARATED_THRUST))).toBeDefined()
    expect(flagOf(overexpandedLog(1.08 * SEPARATED_THRUST))).toBeUndefined()
  })
})

describe('thrust-above-ideal reads the peak through a centred 5-sample moving median', () => {
  // The Mach-2 nozzle of the fixtures at 1 MPa, running full at 0.9 × its ideal thrust.
  const clean = cleanLog({ thrustRatio: 0.9 })
  const spiked = (count: number, factor: number): SubmissionData => {
    const thrust = [...((clean.tables.run as Record<string, readonly number[]>).thrust as number[])]
    for (let i = 10; i < 10 + count; i++) thrust[i] = factor * (thrust[i] as number)
    return withColumn(clean, 'thrust', thrust)
  }

  it('has a window of 5 samples', () => {
    expect(THRUST_PEAK_MEDIAN_WINDOW).toBe(5)
  })

  it('ignores one ringing sample at valve opening, and two, at twice the thrust', () => {
    expect(flagOf(spiked(1, 2))).toBeUndefined()
    expect(flagOf(spiked(2, 2))).toBeUndefined()
  })

  it('flags three samples in a row at twice the thrust: they are the median of their window', () => {
    const flag = flagOf(spiked(3, 2))
    expect(flag).toBeDefined()
    // Doubled at 0-based samples 10–12, after 10 at rest. The window centred on sample 10 (8–12)
    // holds 0, 0 and the three doubled values, so its median is already 2 × 0.9 = 1.8 × the ideal:
    // the first peak of the median is sample 10, the 11th.
    expect(flag?.detail?.sample).toBe(11)
    expectClose(flag?.detail?.peakThrust as number, 1.8 * (flag?.detail?.idealThrust as number), 1e-12)
  })
})

import { describe, expect, it } from 'vitest'
import { THRUST_BELOW_IDEAL_FRACTION, gradeSubmission } from '../../../shared/grading/grade'
import type { GradeFlag } from '../../../shared/grading/grade'
import type { SubmissionData } from '../../../shared/modules/scope'
import { expectClose } from '../../helpers/expect-close'
import { cleanLog, rolesAssignment, withColumn } from './fixtures'

const assignment = rolesAssignment()

function belowFlag(data: SubmissionData): GradeFlag | undefined {
  return gradeSubmission({ assignment, data, reported: {} }).flags.find((f) => f.code === 'thrust-below-ideal')
}

// cleanLog: 80 flowing samples at 1 MPa absolute against 101.325 kPa through the Mach-2 nozzle,
// pa/p0 = 0.101 (choked: the choke limit of ε = 1.6875 is 0.9088, NACA 1135 Table I), thrust a
// chosen multiple of the ideal of eq. 3-30 (fixtures.ts).
describe('thrust-below-ideal on hand-made plateaus', () => {
  it(`fires at 0.3 × the ideal and names the ratio, not at 0.5 × (threshold ${THRUST_BELOW_IDEAL_FRACTION})`, () => {
    const flag = belowFlag(cleanLog({ thrustRatio: 0.3 }))
    expect(flag).toBeDefined()
    expectClose(flag!.detail!.ratio as number, 0.3, 1e-9)
    expect(flag!.detail!.chokedSamples).toBe(80)
    expect(flag!.detail!.from).toBe(0.1)
    expect(flag!.detail!.to).toBe(0.89)
    expect(flag!.message).toMatch(/about 30 % of the ideal thrust/)
    expect(belowFlag(cleanLog({ thrustRatio: 0.5 }))).toBeUndefined()
  })

  it('a run whose exit diameter is not known (0) is not judged', () => {
    const data = cleanLog({ thrustRatio: 0.1 })
    expect(belowFlag(data)).toBeDefined()
    expect(belowFlag({ ...data, measurements: { ...data.measurements, d_exit: 0 } })).toBeUndefined()
  })

  it('too short a choked stretch (9 samples) is not judged', () => {
    const clean = cleanLog({ thrustRatio: 0.1 })
    const chamber = ((clean.tables.run as Record<string, number[]>).p_chamber as number[]).map((p, i) =>
      i >= 10 && i < 19 ? p : 0,
    )
    expect(belowFlag(withColumn(clean, 'p_chamber', chamber))).toBeUndefined()
  })
})

describe('thrust-below-ideal on a long run', () => {
  it('compares every stride-th choked sample, at most 200, from the first choked sample on', () => {
    // 1 980 choked samples (t = 0.10 … 19.89 s): the stride is 1 980 / 200 = 9.9 samples, so the
    // compared samples are choked samples number ⌊0⌋, ⌊9.9⌋, ⌊19.8⌋, … (the sum taken step by step).
    const data = cleanLog({ samples: 2000, rest: 10, thrustRatio: 0.2 })
    const t = (data.tables.run as Record<string, number[]>).t as number[]
    const flag = belowFlag(data)
    expect(flag).toBeDefined()
    expect(flag!.detail!.chokedSamples).toBe(1980)
    const stride = 1980 / 200
    let last = 0
    let compared = 0
    for (let k = 0; k < 1980; k += stride) {
      last = Math.floor(k)
      compared++
    }
    expect(compared).toBe(200)
    expect(flag!.detail!.comparedSamples).toBe(compared)
    expect(flag!.detail!.from).toBe(t[10])
    expect(flag!.detail!.to).toBe(t[10 + last])
    expectClose(flag!.detail!.ratio as number, 0.2, 1e-9)
  })
})

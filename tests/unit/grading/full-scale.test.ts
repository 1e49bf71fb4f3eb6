import { describe, expect, it } from 'vitest'
import { CHAMBER_ABOVE_RECEIVER_FLOOR, gradeSubmission } from '../../../shared/grading/grade'
import { AssignmentSchema, ColumnSchema } from '../../../shared/modules/schema'
import type { Assignment } from '../../../shared/modules/schema'
import type { SubmissionData } from '../../../shared/modules/scope'
import { cleanLog, rolesAssignment, withColumn } from './fixtures'

/** The roles assignment with full scales (and errors) declared on the two pressure columns. */
function withFullScale(
  chamber: Record<string, number | string>,
  receiver: Record<string, number | string>,
): Assignment {
  const base = rolesAssignment()
  const table = base.tables[0]!
  return AssignmentSchema.parse({
    ...base,
    tables: [
      {
        ...table,
        columns: table.columns.map((c) =>
          c.key === 'p_chamber' ? { ...c, ...chamber } : c.key === 'p_receiver' ? { ...c, ...receiver } : c,
        ),
      },
    ],
  })
}

function column(data: SubmissionData, key: string): number[] {
  return [...((data.tables.run as Record<string, readonly number[]>)[key] as number[])]
}

/** cleanLog with the chamber `excess` Pa above the receiver while flowing (samples 10–89). */
function chamberAbove(excess: number): SubmissionData {
  const clean = cleanLog()
  const receiver = column(clean, 'p_receiver')
  return withColumn(
    clean,
    'p_chamber',
    column(clean, 'p_chamber').map((p, i) => (i >= 10 && i < 90 ? (receiver[i] as number) + excess : p)),
  )
}

function flag(assignment: Assignment, data: SubmissionData) {
  return gradeSubmission({ assignment, data, reported: {} }).flags.find((f) => f.code === 'chamber-above-receiver')
}

describe('chamber-above-receiver: the margin from the transducers’ declared full scale', () => {
  it('two 0–1600 kPa transducers at the default ±1 % of full scale allow 16 + 16 = 32 kPa: 31 kPa above passes, 33 kPa is flagged', () => {
    const a = withFullScale({ fullScale: 1600 }, { fullScale: 1600 })
    expect(flag(a, chamberAbove(31_000))).toBeUndefined()
    const f = flag(a, chamberAbove(33_000))
    expect(f?.detail?.margin).toBeCloseTo(32_000, 6)
    expect(f?.message).toMatch(/more than the 32 kPa the two transducers' error allows/)
  })

  it('the peak reading does not set it: the same 31 kPa excess is flagged when no full scale is declared (1 % of each peak, about 21 kPa here)', () => {
    expect(flag(rolesAssignment(), chamberAbove(31_000))).toBeDefined()
  })

  it('each transducer’s own error and unit: 0–10 bar at ±0.5 % (5 kPa) and 0–150 psi at ±1 % (10.34 kPa, 1 psi = 6894.757 Pa)', () => {
    // The full scale is in the column's own unit; the logged data reach the check in SI whatever it is.
    const a = withFullScale({ fullScale: 10, fullScaleError: 0.005, unit: 'bar' }, { fullScale: 150, unit: 'psi' })
    const margin = 0.005 * 10 * 1e5 + 0.01 * 150 * (4.4482216152605 / 0.00064516)
    expect(flag(a, chamberAbove(margin - 100))).toBeUndefined()
    expect(flag(a, chamberAbove(margin + 100))?.detail?.margin).toBeCloseTo(margin, 6)
  })

  it(`never allows less than the ${CHAMBER_ABOVE_RECEIVER_FLOOR / 1000} kPa floor`, () => {
    const a = withFullScale({ fullScale: 100 }, { fullScale: 100 })
    expect(flag(a, chamberAbove(4_900))).toBeUndefined()
    expect(flag(a, chamberAbove(5_100))).toBeDefined()
  })

  it('the module schema takes a positive full scale and an error fraction up to 0.2, and no error without a full scale', () => {
    const col = { key: 'p_c', label: 'Chamber', unit: 'kPa', pressure: 'gauge' }
    expect(ColumnSchema.safeParse({ ...col, fullScale: 1000, fullScaleError: 0.005 }).success).toBe(true)
    expect(ColumnSchema.safeParse({ ...col, fullScale: 0 }).error?.issues[0]?.message).toMatch(/span of the instrument/)
    expect(ColumnSchema.safeParse({ ...col, fullScale: 1000, fullScaleError: 0.5 }).error?.issues[0]?.message).toMatch(
      /fraction from 0 to 0.2/,
    )
    expect(ColumnSchema.safeParse({ ...col, fullScaleError: 0.01 }).error?.issues[0]?.message).toMatch(
      /needs the full scale too/,
    )
  })
})

import { describe, expect, it } from 'vitest'
import { FrontMatterSchema } from '../../shared/modules/schema'
import { StudentModuleSpecSchema } from '../../shared/schemas/student-module-spec'

/** Every key anywhere in a value. */
const keysOf = (v: unknown): string[] =>
  Array.isArray(v)
    ? v.flatMap(keysOf)
    : v !== null && typeof v === 'object'
      ? Object.entries(v).flatMap(([k, x]) => [k, ...keysOf(x)])
      : []

// A front matter that uses every staff-only field the spec has.
const full = FrontMatterSchema.parse({
  title: 'Blow-down',
  due: { at: '2027-02-09T17:00', timeZone: 'Europe/Berlin' },
  late: { penaltyPerDay: 0.1 },
  attempts: 2,
  assignment: {
    tables: [
      {
        key: 'run',
        label: 'Run log',
        columns: [
          { key: 't', label: 'Time', unit: 's', role: 'time' },
          { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust', uncertainty: { absolute: 0.05 } },
          {
            key: 'p_chamber',
            label: 'Chamber pressure',
            unit: 'kPa',
            pressure: 'gauge',
            role: 'chamber-pressure',
            tare: true,
            fullScale: 1000,
            fullScaleError: 0.01,
          },
        ],
      },
    ],
    measurements: [
      {
        key: 'p_ambient',
        label: 'Barometer',
        unit: 'kPa',
        pressure: 'absolute',
        role: 'ambient-pressure',
        min: 60,
        max: 110,
        uncertainty: { absolute: 0.1 },
      },
    ],
    results: [
      {
        key: 'impulse',
        label: 'Total impulse',
        unit: 'N*s',
        expected: 'trapz(t, thrust)',
        tolerance: { relative: 0.03, coverage: 2 },
        partial: { within: 2, fraction: 0.5 },
        points: 4,
      },
      {
        key: 'regime',
        label: 'Regime',
        unit: '1',
        expected: '3',
        tolerance: { absolute: 0 },
        points: 1,
        regime: { pressureRatio: 'p_ambient / max(p_chamber)', areaRatio: '2', gamma: 1.3 },
      },
    ],
    reviewRules: [{ key: 'slow', when: 'max(thrust) < 1', reason: 'No thrust logged.' }],
  },
})

describe("the student's view of a module's spec", () => {
  const student = StudentModuleSpecSchema.parse(full)
  const STAFF_ONLY = [
    'expected',
    'tolerance',
    'coverage',
    'partial',
    'uncertainty',
    'tare',
    'fullScale',
    'fullScaleError',
    'pressureRatio',
    'areaRatio',
    'gamma',
    'reviewRules',
  ]

  it('drops every staff-only field (the full spec has each of them)', () => {
    const before = keysOf(full)
    const after = keysOf(student)
    for (const k of STAFF_ONLY) {
      expect(before, k).toContain(k)
      expect(after, k).not.toContain(k)
    }
  })

  it('keeps what the module page and the hand-in form read', () => {
    expect(student.title).toBe('Blow-down')
    expect(student.attempts).toBe(2)
    expect(student.late).toEqual({ penaltyPerDay: 0.1 })
    expect(student.assignment?.tables[0]?.columns.map((c) => c.key)).toEqual(['t', 'thrust', 'p_chamber'])
    expect(student.assignment?.tables[0]?.columns[2]).toEqual({
      key: 'p_chamber',
      label: 'Chamber pressure',
      unit: 'kPa',
      pressure: 'gauge',
      role: 'chamber-pressure',
    })
    expect(student.assignment?.measurements[0]).toMatchObject({ min: 60, max: 110, role: 'ambient-pressure' })
    expect(student.assignment?.results).toEqual([
      { key: 'impulse', label: 'Total impulse', unit: 'N*s', points: 4 },
      { key: 'regime', label: 'Regime', unit: '1', points: 1, regime: { margin: 0.02 } },
    ])
  })
})

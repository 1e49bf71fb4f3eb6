import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { roleKeys } from '../../../shared/grading/roles'
import { parseModuleSource } from '../../../shared/modules/front-matter'
import { AssignmentSchema, COLUMN_ROLES, MEASUREMENT_ROLES } from '../../../shared/modules/schema'

const time = { key: 't', label: 'Time', unit: 's', role: 'time' }
const barometer = { key: 'p_ambient', label: 'Barometer', unit: 'kPa', pressure: 'absolute', role: 'ambient-pressure' }

function issues(input: unknown): { path: string; message: string }[] {
  const parsed = AssignmentSchema.safeParse(input)
  if (parsed.success) return []
  return parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }))
}

describe('column and measurement roles in the assignment schema', () => {
  it('lists the roles the grading engine reads', () => {
    expect(COLUMN_ROLES).toEqual(['time', 'thrust', 'chamber-pressure', 'receiver-pressure'])
    expect(MEASUREMENT_ROLES).toEqual(['ambient-pressure', 'throat-diameter', 'exit-diameter', 'receiver-volume'])
  })

  it('accepts one of each', () => {
    expect(
      issues({
        tables: [
          {
            key: 'run',
            label: 'Run',
            columns: [
              time,
              { key: 'thrust', label: 'Thrust', unit: 'lbf', role: 'thrust' },
              { key: 'pc', label: 'Chamber', unit: 'psi', pressure: 'gauge', role: 'chamber-pressure' },
              { key: 'pr', label: 'Receiver', unit: 'bar', pressure: 'absolute', role: 'receiver-pressure' },
            ],
          },
        ],
        measurements: [
          barometer,
          { key: 'dt', label: 'Throat', unit: 'in', role: 'throat-diameter' },
          { key: 'de', label: 'Exit', unit: 'mm', role: 'exit-diameter' },
          { key: 'v', label: 'Volume', unit: 'gal', role: 'receiver-volume' },
        ],
      }),
    ).toEqual([])
  })

  it('refuses a second column with the same role, naming the one that has it already', () => {
    const found = issues({
      tables: [
        {
          key: 'run',
          label: 'Run',
          columns: [
            time,
            { key: 'f1', label: 'Thrust 1', unit: 'N', role: 'thrust' },
            { key: 'f2', label: 'Thrust 2', unit: 'N', role: 'thrust' },
          ],
        },
      ],
    })
    expect(found).toEqual([
      {
        path: 'tables.0.columns.2.role',
        message: 'only one column can have role: thrust; assignment.tables[0].columns[1] (f1) already has it',
      },
    ])
  })

  it('refuses a second measurement with the same role, across the list', () => {
    const found = issues({
      measurements: [
        { key: 'd1', label: 'Throat', unit: 'mm', role: 'throat-diameter' },
        { key: 'v', label: 'Volume', unit: 'L' },
        { key: 'd2', label: 'Throat again', unit: 'mm', role: 'throat-diameter' },
      ],
    })
    expect(found).toEqual([
      {
        path: 'measurements.2.role',
        message: 'only one measurement can have role: throat-diameter; assignment.measurements[0] (d1) already has it',
      },
    ])
  })

  it('refuses a second ambient pressure as before', () => {
    const found = issues({ measurements: [barometer, { ...barometer, key: 'p_ambient2' }] })
    expect(found.map((f) => f.path)).toEqual(['measurements.1.role'])
    expect(found[0]?.message).toMatch(
      /only one measurement can have role: ambient-pressure; assignment.measurements\[0\] \(p_ambient\)/,
    )
  })

  it('needs a unit of the right kind for each role', () => {
    const found = issues({
      tables: [
        {
          key: 'run',
          label: 'Run',
          columns: [
            time,
            { key: 'thrust', label: 'Thrust', unit: 'kPa', pressure: 'absolute', role: 'thrust' },
            { key: 'pc', label: 'Chamber', unit: 'N', role: 'chamber-pressure' },
          ],
        },
      ],
      measurements: [
        { key: 'dt', label: 'Throat', unit: 'mm2', role: 'throat-diameter' },
        { key: 'v', label: 'Volume', unit: 'kg', role: 'receiver-volume' },
      ],
    })
    expect(found).toEqual([
      {
        path: 'tables.0.columns.1.unit',
        message: 'the thrust column must be in a force unit (N, kN, kgf, lbf), not kPa',
      },
      { path: 'tables.0.columns.2.unit', message: 'the chamber pressure must be in a pressure unit, not N' },
      { path: 'measurements.0.unit', message: 'the throat diameter must be in a length unit (m, mm, cm, in), not mm2' },
      { path: 'measurements.1.unit', message: 'the receiver volume must be in a volume unit (m3, L, gal), not kg' },
    ])
  })

  it('keeps the time column to s or ms, at most one per table', () => {
    const found = issues({
      tables: [
        {
          key: 'run',
          label: 'Run',
          columns: [
            { ...time, unit: 'N' },
            { ...time, key: 't2', unit: 's' },
          ],
        },
      ],
    })
    expect(found).toEqual([
      { path: 'tables.0.columns.0.unit', message: 'the time column must be in s or ms, not N' },
      { path: 'tables.0.columns.1.role', message: 'a table has at most one column with role: time' },
    ])
  })

  it('keeps thrust and the pressures in one table, which has a time column', () => {
    const split = issues({
      tables: [
        { key: 'a', label: 'A', columns: [time, { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' }] },
        {
          key: 'b',
          label: 'B',
          columns: [{ key: 'pc', label: 'Chamber', unit: 'kPa', pressure: 'absolute', role: 'chamber-pressure' }],
        },
      ],
    })
    expect(split).toEqual([
      {
        path: 'tables.1.columns.0.role',
        message:
          'the columns with roles thrust, chamber-pressure and receiver-pressure must be in one table; role: thrust is in assignment.tables[0]',
      },
    ])
    const untimed = issues({
      tables: [{ key: 'a', label: 'A', columns: [{ key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' }] }],
    })
    expect(untimed).toEqual([
      {
        path: 'tables.0.columns.0.role',
        message:
          'a column with role: thrust needs a column with role: time in the same table, so its samples have times',
      },
    ])
  })

  it('refuses a role it does not know', () => {
    const found = issues({ measurements: [{ key: 'x', label: 'X', unit: 'mm', role: 'nozzle-length' }] })
    expect(found[0]?.message).toBe(
      'a measurement role is one of ambient-pressure, throat-diameter, exit-diameter, receiver-volume',
    )
  })
})

describe('the demo modules declare their roles', () => {
  const CONTENT = join(import.meta.dirname, '../../../content')
  it.each(['02-cold-flow-characterisation.md', '03-hot-fire.md'])('%s', (file) => {
    const parsed = parseModuleSource(readFileSync(join(CONTENT, file), 'utf8'), file)
    if (!parsed.ok || !parsed.frontMatter.assignment) throw new Error(`${file} does not parse`)
    const keys = roleKeys(parsed.frontMatter.assignment)
    expect({ ...keys, table: keys.table?.key }).toEqual({
      table: 'run',
      time: 't',
      thrust: 'thrust',
      chamberPressure: 'p_chamber',
      receiverPressure: 'p_receiver',
      ambientPressure: 'p_ambient',
      throatDiameter: 'd_throat',
      exitDiameter: 'd_exit',
      receiverVolume: 'v_receiver',
    })
  })
})

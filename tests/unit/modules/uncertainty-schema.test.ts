import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { parseModuleSource } from '../../../shared/modules/front-matter'
import { AssignmentSchema } from '../../../shared/modules/schema'

const measurement = (extra: Record<string, unknown>) => ({ key: 'd', label: 'Throat diameter', unit: 'mm', ...extra })
const result = (tolerance: Record<string, unknown>) => ({
  key: 'area',
  label: 'Area',
  unit: 'mm2',
  expected: 'areaFromDiameter(d)',
  tolerance,
  points: 1,
})

/** The issues of an assignment, as "path: message". */
function issues(input: unknown): string[] {
  const parsed = AssignmentSchema.safeParse(input)
  return parsed.success ? [] : parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`)
}

describe('declaring uncertainties and coverage tolerances', () => {
  it('accepts an absolute or relative uncertainty (or both) on measurements and columns, and a coverage tolerance with a floor', () => {
    expect(
      issues({
        tables: [
          {
            key: 'run',
            label: 'Run',
            columns: [
              { key: 't', label: 'Time', unit: 's', role: 'time' },
              { key: 'thrust', label: 'Thrust', unit: 'N', uncertainty: { absolute: 0.05, relative: 0.005 } },
            ],
          },
        ],
        measurements: [
          measurement({ uncertainty: { absolute: 0.01 } }),
          { key: 'v', label: 'Volume', unit: 'L', uncertainty: { relative: 0.01 } },
        ],
        results: [result({ relative: 0.01, coverage: 2 })],
      }),
    ).toEqual([])
  })

  it('refuses a coverage tolerance in a module that declares no uncertainty, naming the result', () => {
    expect(issues({ measurements: [measurement({})], results: [result({ relative: 0.01, coverage: 2 })] })).toEqual([
      'results.0.tolerance.coverage: result "area" has a coverage tolerance, but no measurement or column declares an uncertainty; add "uncertainty:" to the ones it uses',
    ])
  })

  it('refuses a coverage tolerance without a relative or absolute floor, and a coverage factor outside 1–5', () => {
    expect(
      issues({ measurements: [measurement({ uncertainty: { absolute: 0.01 } })], results: [result({ coverage: 2 })] }),
    ).toEqual([
      'results.0.tolerance: a coverage tolerance needs a relative or absolute tolerance as its floor, for example { relative: 0.01, coverage: 2 }',
    ])
    expect(
      issues({
        measurements: [measurement({ uncertainty: { absolute: 0.01 } })],
        results: [result({ relative: 0.01, coverage: 0.5 })],
      }),
    ).toEqual(['results.0.tolerance.coverage: a coverage factor is from 1 to 5 (2 covers about 95 %)'])
  })

  it('refuses an empty or negative uncertainty, a relative one above 1, and a relative one on a Celsius reading', () => {
    expect(issues({ measurements: [measurement({ uncertainty: {} })] })).toEqual([
      'measurements.0.uncertainty: give a relative uncertainty, an absolute one, or both (for example uncertainty: { absolute: 0.05 })',
    ])
    expect(issues({ measurements: [measurement({ uncertainty: { absolute: -0.01 } })] })).toEqual([
      'measurements.0.uncertainty.absolute: an absolute uncertainty cannot be negative',
    ])
    expect(issues({ measurements: [measurement({ uncertainty: { relative: 2 } })] })).toEqual([
      'measurements.0.uncertainty.relative: a relative uncertainty is a fraction from 0 to 1 (0.01 = 1 %); write 0.01 for 1 %',
    ])
    expect(
      issues({
        measurements: [{ key: 't_air', label: 'Air temperature', unit: 'degC', uncertainty: { relative: 0.01 } }],
      }),
    ).toEqual([
      'measurements.0.uncertainty.relative: a relative uncertainty of a temperature in degC depends on the zero of the scale; give an absolute one in degC',
    ])
    expect(
      issues({
        measurements: [{ key: 't_air', label: 'Air temperature', unit: 'K', uncertainty: { relative: 0.01 } }],
      }),
    ).toEqual([])
  })

  it('the demo cold-flow module declares its instruments’ uncertainties and grades one result with a coverage tolerance', () => {
    const source = readFileSync(new URL('../../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8')
    const parsed = parseModuleSource(source, '02-cold-flow-characterisation.md')
    if (!parsed.ok) throw new Error(parsed.errors.map((e) => e.message).join('; '))
    const a = parsed.frontMatter.assignment!
    const declared = [
      ...a.tables.flatMap((t) => t.columns.filter((c) => c.uncertainty).map((c) => c.key)),
      ...a.measurements.filter((m) => m.uncertainty).map((m) => m.key),
    ]
    expect(declared.sort()).toEqual(['d_throat', 'p_ambient', 'p_chamber', 'p_receiver', 'thrust'])
    expect(a.results.filter((r) => r.tolerance.coverage !== undefined).length).toBeGreaterThanOrEqual(1)
  })
})

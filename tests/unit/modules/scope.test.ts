import { describe, expect, it } from 'vitest'
import { AssignmentSchema } from '../../../shared/modules/schema'
import { ScopeError, buildExpressionScope, syntheticSubmission } from '../../../shared/modules/scope'
import { valueFromSI, valueToSI } from '../../../shared/modules/quantities'
import { expectClose } from '../../helpers/expect-close'

// Exact definitions: 1 psi = 4.4482216152605 N / 0.00064516 m²; 1 lbf = 4.4482216152605 N.
const PSI = 4.4482216152605 / 0.00064516

const assignment = AssignmentSchema.parse({
  tables: [
    {
      key: 'run',
      label: 'Run',
      columns: [
        { key: 't', label: 'Time', unit: 'ms', role: 'time' },
        { key: 'thrust', label: 'Thrust', unit: 'lbf' },
        { key: 'pc', label: 'Chamber', unit: 'psi', pressure: 'gauge' },
        { key: 'pr', label: 'Receiver', unit: 'bar', pressure: 'absolute' },
      ],
    },
  ],
  measurements: [
    { key: 'p_ambient', label: 'Barometer', unit: 'kPa', pressure: 'absolute', role: 'ambient-pressure' },
    { key: 'd_throat', label: 'Throat', unit: 'mm' },
    { key: 'volume', label: 'Receiver volume', unit: 'L' },
    { key: 'p_initial', label: 'Initial', unit: 'kPa', pressure: 'gauge' },
    { key: 't_air', label: 'Air', unit: 'degC' },
  ],
  results: [
    {
      key: 'impulse',
      label: 'I',
      unit: 'lbf*s',
      expected: 'totalImpulse(t, thrust)',
      tolerance: { relative: 0.03 },
      points: 1,
    },
    { key: 'angle', label: 'Angle', unit: 'deg', expected: '1', tolerance: { absolute: 1 }, points: 1 },
  ],
})

const data = {
  tables: { run: { t: [0, 500, 1000], thrust: [0, 2, 1], pc: [0, 50, 10], pr: [8, 7, 6] } },
  measurements: { p_ambient: 84, d_throat: 4, volume: 50, p_initial: 700, t_air: 20 },
  results: { impulse: 1.25, angle: 180 },
}

describe('buildExpressionScope', () => {
  const scope = buildExpressionScope(assignment, data, { withResults: true })

  it('converts every column to SI and adds the ambient pressure to gauge readings only', () => {
    expect(scope.t).toEqual([0, 0.5, 1])
    expect(scope.thrust).toEqual([0, 2 * 4.4482216152605, 4.4482216152605])
    const pc = scope.pc as number[]
    expectClose(pc[1] as number, 50 * PSI + 84_000, 1e-12)
    expect(pc[0]).toBe(84_000)
    // An absolute column is not shifted.
    expect(scope.pr).toEqual([800_000, 700_000, 600_000])
  })

  it('converts measurements to SI, with gauge ones made absolute', () => {
    expect(scope.p_ambient).toBe(84_000)
    expect(scope.d_throat).toBe(0.004)
    expectClose(scope.volume as number, 0.05, 1e-15)
    expect(scope.p_initial).toBe(784_000)
    expectClose(scope.t_air as number, 293.15, 1e-15)
  })

  it('gives review rules the reported results in SI, and expected values no results at all', () => {
    expectClose(scope.impulse as number, 1.25 * 4.4482216152605, 1e-15)
    expectClose(scope.angle as number, Math.PI, 1e-15)
    const dataOnly = buildExpressionScope(assignment, data)
    expect('impulse' in dataOnly).toBe(false)
    expect(Object.keys(dataOnly).sort()).toEqual([
      'd_throat',
      'p_ambient',
      'p_initial',
      'pc',
      'pr',
      't',
      't_air',
      'thrust',
      'volume',
    ])
  })

  it('names what is missing or unusable', () => {
    const without = (key: string) => ({
      ...data,
      measurements: Object.fromEntries(Object.entries(data.measurements).filter(([k]) => k !== key)),
    })
    expect(() => buildExpressionScope(assignment, without('d_throat'))).toThrow(/measurement "d_throat" is missing/)
    expect(() => buildExpressionScope(assignment, without('p_ambient'))).toThrow(
      /ambient pressure "p_ambient" is missing/,
    )
    expect(() => buildExpressionScope(assignment, { ...data, tables: {} })).toThrow(/table "run" is missing/)
    expect(() =>
      buildExpressionScope(assignment, { ...data, tables: { run: { ...data.tables.run, pc: [0, 1] } } }),
    ).toThrow(/different lengths/)
    expect(() =>
      buildExpressionScope(assignment, {
        ...data,
        tables: { run: { ...data.tables.run, thrust: [0, Number.NaN, 1] } },
      }),
    ).toThrow(/thrust\[row 2\] is not a finite number/)
    // −20 psi gauge is below vacuum at 84 kPa ambient.
    expect(() =>
      buildExpressionScope(assignment, { ...data, tables: { run: { ...data.tables.run, pc: [0, -20, 0] } } }),
    ).toThrow(ScopeError)
    expect(() => buildExpressionScope(assignment, { ...data, results: { impulse: 1 } }, { withResults: true })).toThrow(
      /result "angle" is missing/,
    )
  })
})

describe('result units', () => {
  it('converts the derived units results may use', () => {
    expect(valueToSI(2, 'N*s')).toBe(2)
    expect(valueToSI(2, 'N·s')).toBe(2)
    expect(valueToSI(1, 'lbf*s')).toBe(4.4482216152605)
    expect(valueToSI(500, 'g/s')).toBe(0.5)
    expectClose(valueToSI(90, 'deg'), Math.PI / 2, 1e-15)
    expect(valueFromSI(0.5, 'g/s')).toBe(500)
    expect(valueToSI(7, '1')).toBe(7)
  })
})

describe('syntheticSubmission', () => {
  const synthetic = syntheticSubmission(assignment)
  const scope = buildExpressionScope(assignment, synthetic)

  it('makes a time column that increases and pressures between 2 and 6 bar absolute', () => {
    const t = scope.t as number[]
    expect(t.length).toBeGreaterThanOrEqual(10)
    expect(t.every((v, i) => i === 0 || v > (t[i - 1] as number))).toBe(true)
    for (const key of ['pc', 'pr']) {
      const p = scope[key] as number[]
      expect(Math.min(...p)).toBeGreaterThan(1.9e5)
      expect(Math.max(...p)).toBeLessThan(6.1e5)
    }
  })

  it('puts measurements with a range in its middle', () => {
    const ranged = AssignmentSchema.parse({
      measurements: [{ key: 'd_exit', label: 'Exit', unit: 'mm', min: 2, max: 10 }],
    })
    expect(syntheticSubmission(ranged).measurements.d_exit).toBe(6)
  })
})

import { describe, expect, it } from 'vitest'
import { AssignmentSchema } from '../../../shared/modules/schema'
import { ScopeError, buildExpressionScope } from '../../../shared/modules/scope'

// The grading engine hands the scope data already in SI (parseLog's columns, measurements through
// valueToSI), with each pressure in the sense the student declared.
const assignment = AssignmentSchema.parse({
  tables: [
    {
      key: 'run',
      label: 'Run',
      columns: [
        { key: 't', label: 'Time', unit: 'ms', role: 'time' },
        { key: 'pc', label: 'Chamber', unit: 'psi', pressure: 'gauge' },
        { key: 'pr', label: 'Receiver', unit: 'kPa', pressure: 'gauge' },
      ],
    },
  ],
  measurements: [
    { key: 'p_ambient', label: 'Barometer', unit: 'kPa', pressure: 'absolute', role: 'ambient-pressure' },
    { key: 'p_initial', label: 'Initial', unit: 'bar', pressure: 'gauge' },
    { key: 't_air', label: 'Air', unit: 'degC' },
  ],
  results: [{ key: 'impulse', label: 'I', unit: 'lbf*s', expected: '1', tolerance: { relative: 0.03 }, points: 1 }],
})

const t = [0, 0.5, 1]
const pc = [0, 300_000, 100_000]
const pr = [500_000, 400_000, 0]
const si = {
  tables: { run: { t, pc, pr } },
  measurements: { p_ambient: 84_000, p_initial: 600_000, t_air: 293.15 },
  results: { impulse: 150 },
}

describe("buildExpressionScope with units: 'si'", () => {
  const scope = buildExpressionScope(assignment, si, { units: 'si', withResults: true })

  it('takes SI values as they are, whatever unit the spec declares (no ms → s or degC → K again)', () => {
    expect(scope.t).toBe(t)
    expect(scope.t_air).toBe(293.15)
    // Results too: 150 N·s stays 150, not 150 lbf·s.
    expect(scope.impulse).toBe(150)
  })

  it('adds the ambient pressure to gauge columns and measurements, leaving the input untouched', () => {
    expect(scope.pc).toEqual([84_000, 384_000, 184_000])
    expect(scope.p_initial).toBe(684_000)
    expect(pc).toEqual([0, 300_000, 100_000])
  })

  it('follows the sense the submission declares where it differs from the spec', () => {
    const declared = buildExpressionScope(
      assignment,
      { ...si, pressures: { pc: 'absolute', p_initial: 'absolute' } },
      { units: 'si' },
    )
    expect(declared.pc).toBe(pc)
    expect(declared.p_initial).toBe(600_000)
    expect(declared.pr).toEqual([584_000, 484_000, 84_000])
  })

  it('the declared sense applies in declared units too', () => {
    const declaredUnits = {
      tables: { run: { t: [0, 500, 1000], pc: [0, 1, 2], pr: [5, 4, 0] } },
      measurements: { p_ambient: 84, p_initial: 6, t_air: 20 },
      pressures: { pr: 'absolute' as const },
    }
    const scope2 = buildExpressionScope(assignment, declaredUnits)
    expect(scope2.pr).toEqual([5000, 4000, 0])
    expect(scope2.p_initial).toBe(684_000)
  })

  it('refuses an ambient pressure declared gauge, a non-finite sample and a gauge pressure below vacuum', () => {
    expect(() =>
      buildExpressionScope(assignment, { ...si, pressures: { p_ambient: 'gauge' } }, { units: 'si' }),
    ).toThrow(/ambient pressure "p_ambient" must be an absolute \(barometric\) reading/)
    expect(() =>
      buildExpressionScope(assignment, { ...si, tables: { run: { t, pc: [0, Number.NaN, 1], pr } } }, { units: 'si' }),
    ).toThrow(ScopeError)
    expect(() =>
      buildExpressionScope(assignment, { ...si, tables: { run: { t, pc: [0, -90_000, 1], pr } } }, { units: 'si' }),
    ).toThrow(/pc\[row 2\]: a gauge pressure of -90000 Pa is below vacuum/)
  })
})

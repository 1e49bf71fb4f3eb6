/**
 * What the grading step remembers about a scope's columns between calls (checked-columns.ts and
 * the absolute pressure columns in scope.ts) never outlives a change: a changed sample, ambient or
 * array gives new values and the library's own checks and messages.
 */
import { describe, expect, it } from 'vitest'
import { evaluateExpression } from '../../../shared/modules/expressions'
import { knownFinite, knownIncreasing, markFinite } from '../../../shared/modules/checked-columns'
import { rescaledColumn } from '../../../shared/modules/run-cache'
import { buildExpressionScope } from '../../../shared/modules/scope'
import { windowIntegral, windowMean } from '../../../shared/physics'
import { windowOfCheckedSamples } from '../../../shared/physics/window'
import { rolesAssignment } from '../grading/fixtures'

const assignment = rolesAssignment()

function submission(ambient: number) {
  const t = Array.from({ length: 20 }, (_, i) => i * 0.1)
  return {
    tables: {
      run: {
        t,
        thrust: t.map((x) => 10 * Math.sin(x)),
        p_receiver: t.map((x) => 800 - 30 * x),
        p_chamber: t.map((x) => 300 - 10 * x),
      },
    },
    measurements: { p_ambient: ambient, d_throat: 4, d_exit: 6, v_receiver: 50 },
  }
}

describe('the absolute pressure columns made once per hand-in', () => {
  it('are made again when a gauge sample or the ambient changes', () => {
    const data = submission(84_000)
    const first = buildExpressionScope(assignment, data, { units: 'si', tare: false })
    const again = buildExpressionScope(assignment, data, { units: 'si', tare: false })
    // The same samples and ambient: the column made the first time is used again.
    expect(again.p_chamber).toBe(first.p_chamber)

    const chamber = data.tables.run.p_chamber
    chamber[7] = (chamber[7] as number) + 1234
    const changed = buildExpressionScope(assignment, data, { units: 'si', tare: false })
    expect((changed.p_chamber as number[])[7]).toBe((chamber[7] as number) + 84_000)
    expect(changed.p_chamber).toEqual(chamber.map((p) => p + 84_000))

    const otherAmbient = buildExpressionScope(
      assignment,
      { ...data, measurements: { ...data.measurements, p_ambient: 90_000 } },
      { units: 'si', tare: false },
    )
    expect(otherAmbient.p_chamber).toEqual(chamber.map((p) => p + 90_000))
    expect(otherAmbient.p_receiver).toEqual(data.tables.run.p_receiver.map((p) => p + 90_000))
  })
})

describe('columns known to be checked', () => {
  it('are the scope’s own, and a column an expression gets from elsewhere is checked in full', () => {
    const data = submission(84_000)
    const scope = buildExpressionScope(assignment, data, { units: 'si' })
    expect(knownFinite(scope.t)).toBe(true)
    expect(knownFinite(scope.p_chamber)).toBe(true)
    expect(knownIncreasing(scope.t)).toBe(true)
    expect(knownFinite([1, 2, 3])).toBe(false)
    expect(knownIncreasing([1, 2, 3])).toBe(false)
  })

  it('give the same window integrals and means as the library’s checked functions', () => {
    const scope = buildExpressionScope(assignment, submission(84_000), { units: 'si' })
    const t = scope.t as number[]
    const p = scope.p_chamber as number[]
    expect(evaluateExpression('windowIntegral(t, p_chamber, 0.25, 1.35)', scope)).toBe(windowIntegral(t, p, 0.25, 1.35))
    expect(evaluateExpression('windowMean(t, p_chamber, 0.25, 1.35)', scope)).toBe(windowMean(t, p, 0.25, 1.35))
  })

  it('keep the window checks and their messages', () => {
    const t = [0, 1, 2, 3]
    const x = [0, 10, 10, 0]
    markFinite(t)
    markFinite(x)
    for (const [start, end] of [
      [-1, 2],
      [0.5, 4],
      [2, 1],
    ] as const) {
      expect(() => windowOfCheckedSamples.integral(t, x, start, end)).toThrow(
        (() => {
          try {
            windowIntegral(t, x, start, end)
          } catch (error) {
            return (error as Error).message
          }
          throw new Error('expected the library to refuse the window')
        })(),
      )
    }
    expect(() => windowOfCheckedSamples.mean(t, x, 1, 1)).toThrow(/end must be a finite number greater than start/)
    expect(() => windowOfCheckedSamples.integral([0], [1], 0, 0)).toThrow('time must have at least 2 samples (got 1)')
    expect(() => windowOfCheckedSamples.integral(t, [1, 2], 0, 1)).toThrow(
      'time and values must have the same length (got 4 and 2)',
    )
  })

  it('a time column that does not increase is refused with the library’s message, however often it is asked', () => {
    const data = submission(84_000)
    const t = data.tables.run.t
    ;[t[4], t[5]] = [t[5] as number, t[4] as number]
    const scope = buildExpressionScope(assignment, data, { units: 'si' })
    expect(knownFinite(scope.t)).toBe(true)
    expect(knownIncreasing(scope.t)).toBe(false)
    for (let i = 0; i < 2; i++) {
      expect(() => evaluateExpression('windowIntegral(t, p_chamber, 0.1, 1.5)', scope)).toThrow(
        /time must increase strictly from one sample to the next \(got time\[4\] = 0\.5 and time\[5\] = 0\.4\)/,
      )
    }
    // A new, increasing time array is a new input: worked out on its own.
    const fixed = { ...scope, t: data.tables.run.t.map((_, i) => i * 0.1) }
    markFinite(fixed.t)
    expect(knownIncreasing(fixed.t)).toBe(true)
    expect(evaluateExpression('windowIntegral(t, p_chamber, 0.1, 1.5)', fixed)).toBe(
      windowIntegral(fixed.t, scope.p_chamber as number[], 0.1, 1.5),
    )
  })

  it('a moved column that leaves the finite numbers is not known finite, and is refused', () => {
    const scope = buildExpressionScope(assignment, submission(84_000), { units: 'si' })
    const moved = rescaledColumn(scope.p_chamber as number[], 0, 1e308)
    expect(knownFinite(moved)).toBe(false)
    expect(() => evaluateExpression('windowIntegral(t, p_chamber, 0.1, 1.5)', { ...scope, p_chamber: moved })).toThrow(
      /values\[0\] must be a finite number \(got Infinity\)/,
    )
    const fine = rescaledColumn(scope.p_chamber as number[], 10, 1.01)
    expect(knownFinite(fine)).toBe(true)
    expect(evaluateExpression('windowIntegral(t, p_chamber, 0.1, 1.5)', { ...scope, p_chamber: fine })).toBe(
      windowIntegral(scope.t as number[], fine, 0.1, 1.5),
    )
  })
})

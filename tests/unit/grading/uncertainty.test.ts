/**
 * Propagation of declared instrument uncertainties to expected values, against closed forms worked
 * out here on paper. The law of propagation (JCGM 100:2008, the GUM, §5.1.2, eq. 10) gives, for
 * Y = c·X1^p1·X2^p2 with independent inputs, (u_c(y)/y)² = Σ (p_i·u(x_i)/x_i)² (GUM §5.1.6, eq. 12;
 * equation numbers from memory, the relation checked here from eq. 10 by differentiation).
 */
import { describe, expect, it } from 'vitest'
import { gradeSubmission } from '../../../shared/grading/grade'
import type { CheckResult, GradeResult } from '../../../shared/grading/grade'
import { PartEvaluator } from '../../../shared/grading/expression-parts'
import { propagateUncertainties } from '../../../shared/grading/uncertainty'
import { evaluateExpression } from '../../../shared/modules/expressions'
import { AssignmentSchema } from '../../../shared/modules/schema'
import type { Assignment } from '../../../shared/modules/schema'
import { buildExpressionScope } from '../../../shared/modules/scope'
import type { SubmissionData } from '../../../shared/modules/scope'
import { expectClose } from '../../helpers/expect-close'

function check(result: GradeResult, key: string): CheckResult {
  const found = result.checks.find((c) => c.key === key)
  if (!found) throw new Error(`no check ${key}`)
  return found
}

/** Two measurements, a and b, in N and m, and results over them. */
function scalarAssignment(
  results: unknown[],
  a: unknown = { relative: 0.01 },
  b: unknown = { relative: 0.02 },
): Assignment {
  return AssignmentSchema.parse({
    measurements: [
      { key: 'a', label: 'Force', unit: 'N', uncertainty: a },
      { key: 'b', label: 'Lever arm', unit: 'm', uncertainty: b },
      { key: 'd', label: 'Throat diameter', unit: 'mm', uncertainty: { absolute: 0.01 } },
      { key: 'c', label: 'Plain number', unit: '1' },
    ],
    results,
  })
}
const scalarData: SubmissionData = { tables: {}, measurements: { a: 40, b: 0.25, d: 0.006, c: 3 } }

describe('first-order propagation against closed forms', () => {
  it('a product of two measurements: relative uncertainties add in quadrature', () => {
    const assignment = scalarAssignment([
      { key: 'moment', label: 'Moment', unit: '1', expected: 'a * b', tolerance: { relative: 0.05 }, points: 1 },
    ])
    const c = check(gradeSubmission({ assignment, data: scalarData, reported: {} }), 'moment')
    // y = 40 × 0.25 = 10; u/y = √(0.01² + 0.02²).
    expectClose(c.expected as number, 10, 1e-12)
    expectClose(c.uncertainty!.standard, 10 * Math.sqrt(0.01 ** 2 + 0.02 ** 2), 1e-9)
    // Shares of the variance: 1 : 4.
    expect(c.uncertainty!.contributions.map((x) => [x.key, x.part])).toEqual([
      ['b', 'value'],
      ['a', 'value'],
    ])
    expectClose(c.uncertainty!.contributions[0]!.share, 0.8, 1e-9)
    expectClose(c.uncertainty!.contributions[1]!.share, 0.2, 1e-9)
    expect(c.uncertainty!.coverage).toBe(2)
  })

  it('a quotient of two measurements: relative uncertainties add in quadrature (to first order)', () => {
    const assignment = scalarAssignment([
      { key: 'q', label: 'Quotient', unit: '1', expected: 'a / b', tolerance: { relative: 0.05 }, points: 1 },
    ])
    const c = check(gradeSubmission({ assignment, data: scalarData, reported: {} }), 'q')
    // y = 160; u/y = √(0.01² + 0.02²) to first order. The central difference over ±u(b) gives
    // y·(u/b)/(1 − (u/b)²) for b's term: 4 parts in 10⁴ above first order, hence the tolerance.
    expectClose(c.expected as number, 160, 1e-12)
    expectClose(c.uncertainty!.standard, 160 * Math.sqrt(0.01 ** 2 + 0.02 ** 2), 1e-3)
  })

  it('the area of a measured diameter: u(A)/A = 2·u(d)/d', () => {
    const assignment = scalarAssignment([
      {
        key: 'area',
        label: 'Throat area',
        unit: 'mm2',
        expected: 'areaFromDiameter(d)',
        tolerance: { relative: 0.01 },
        points: 1,
      },
    ])
    const c = check(gradeSubmission({ assignment, data: scalarData, reported: {} }), 'area')
    // A = π·(6 mm)²/4 = 28.274… mm²; u(d) = 0.01 mm, so u(A) = A·2·0.01/6 (the central difference
    // is exact for a square).
    const area = (Math.PI * 36) / 4
    expectClose(c.expected as number, area, 1e-12)
    expectClose(c.uncertainty!.standard, area * 2 * (0.01 / 6), 1e-9)
    expect(c.uncertainty!.contributions).toEqual([{ key: 'd', part: 'value', label: 'Throat diameter', share: 1 }])
  })

  it('a result that reads no uncertain input has no uncertainty; a module that declares none has no field at all', () => {
    const assignment = scalarAssignment([
      { key: 'plain', label: 'Plain', unit: '1', expected: 'c * 2', tolerance: { relative: 0.05 }, points: 1 },
    ])
    const c = check(gradeSubmission({ assignment, data: scalarData, reported: {} }), 'plain')
    expect(c.uncertainty).toBeNull()

    const none = AssignmentSchema.parse({
      measurements: [{ key: 'a', label: 'Force', unit: 'N' }],
      results: [{ key: 'f', label: 'Force', unit: 'N', expected: 'a', tolerance: { relative: 0.05 }, points: 1 }],
    })
    const plain = check(
      gradeSubmission({ assignment: none, data: { tables: {}, measurements: { a: 3 } }, reported: { f: 3 } }),
      'f',
    )
    expect('uncertainty' in plain).toBe(false)
    expect(propagateUncertainties(none, { tables: {}, measurements: { a: 3 } }, { a: 3 })).toBeNull()
  })
})

/** A 3 s run log: time, thrust (N), chamber pressure (kPa gauge); a barometer in kPa. */
function logAssignment(thrust: unknown, chamber: unknown, barometer: unknown, results: unknown[]): Assignment {
  return AssignmentSchema.parse({
    tables: [
      {
        key: 'run',
        label: 'Run',
        minRows: 2,
        columns: [
          { key: 't', label: 'Time', unit: 's', role: 'time' },
          { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust', ...(thrust ? { uncertainty: thrust } : {}) },
          {
            key: 'pc',
            label: 'Chamber pressure',
            unit: 'kPa',
            pressure: 'gauge',
            ...(chamber ? { uncertainty: chamber } : {}),
          },
        ],
      },
    ],
    measurements: [
      {
        key: 'pa',
        label: 'Barometric pressure',
        unit: 'kPa',
        pressure: 'absolute',
        role: 'ambient-pressure',
        ...(barometer ? { uncertainty: barometer } : {}),
      },
      { key: 'p_before', label: 'Receiver before', unit: 'kPa', pressure: 'gauge' },
      { key: 'p_after', label: 'Receiver after', unit: 'kPa', pressure: 'gauge' },
    ],
    results,
  })
}
// SI, as parseLog gives it: t 0…3 s every 0.5 s; thrust a triangle; chamber gauge in Pa.
const logData: SubmissionData = {
  tables: {
    run: {
      t: [0, 0.5, 1, 1.5, 2, 2.5, 3],
      thrust: [0, 20, 40, 60, 40, 20, 0],
      pc: [0, 200e3, 400e3, 600e3, 400e3, 200e3, 0],
    },
  },
  measurements: { pa: 84e3, p_before: 700e3, p_after: 100e3 },
}
// ∫F dt by the trapezoid rule = 0.5·(20+40+60+40+20) = 90 N·s (a triangle, so also ½·3·60).
const IMPULSE = 90
const DURATION = 3

describe('columns: an offset and a gain shared by every sample', () => {
  const impulse = {
    key: 'impulse',
    label: 'Total impulse',
    unit: 'N*s',
    expected: 'totalImpulse(t, thrust)',
    tolerance: { relative: 0.03 },
    points: 1,
  }

  it('a column gain on an integral: the relative uncertainty carries through', () => {
    const assignment = logAssignment({ relative: 0.01 }, null, null, [impulse])
    const c = check(gradeSubmission({ assignment, data: logData, reported: {} }), 'impulse')
    expectClose(c.expected as number, IMPULSE, 1e-12)
    expectClose(c.uncertainty!.standard, 0.01 * IMPULSE, 1e-9)
    expect(c.uncertainty!.contributions).toEqual([{ key: 'thrust', part: 'gain', label: 'Thrust', share: 1 }])
  })

  it('a column offset on an integral: u = u(offset) × the duration of the log', () => {
    const assignment = logAssignment({ absolute: 0.05 }, null, null, [impulse])
    const c = check(gradeSubmission({ assignment, data: logData, reported: {} }), 'impulse')
    expectClose(c.uncertainty!.standard, 0.05 * DURATION, 1e-9)
    expect(c.uncertainty!.contributions).toEqual([{ key: 'thrust', part: 'offset', label: 'Thrust', share: 1 }])
  })

  it('offset and gain of one column are two components, added in quadrature', () => {
    const assignment = logAssignment({ absolute: 0.05, relative: 0.01 }, null, null, [impulse])
    const c = check(gradeSubmission({ assignment, data: logData, reported: {} }), 'impulse')
    const uGain = 0.01 * IMPULSE // 0.9 N·s
    const uOffset = 0.05 * DURATION // 0.15 N·s
    expectClose(c.uncertainty!.standard, Math.hypot(uGain, uOffset), 1e-9)
    expect(c.uncertainty!.contributions.map((x) => x.part)).toEqual(['gain', 'offset'])
    expectClose(c.uncertainty!.contributions[0]!.share, uGain ** 2 / (uGain ** 2 + uOffset ** 2), 1e-9)
  })

  it('a gauge transducer’s gain multiplies the gauge reading, and the barometer moves every gauge reading', () => {
    const peak = {
      key: 'pc_peak',
      label: 'Peak chamber pressure',
      unit: 'kPa',
      expected: 'max(pc)',
      tolerance: { relative: 0.02 },
      points: 1,
    }
    const used = {
      key: 'used',
      label: 'Pressure drop',
      unit: 'kPa',
      expected: 'p_before - p_after',
      tolerance: { relative: 0.02 },
      points: 1,
    }
    const assignment = logAssignment(null, { relative: 0.01, absolute: 2 }, { absolute: 0.1 }, [peak, used])
    const result = gradeSubmission({ assignment, data: logData, reported: {} })
    const c = check(result, 'pc_peak')
    // Peak 600 kPa gauge + 84 kPa = 684 kPa absolute. Gain: 1 % of the gauge 600 kPa = 6 kPa (not of
    // 684); offset 2 kPa; barometer 0.1 kPa (it is added to every gauge sample).
    expectClose(c.expected as number, 684, 1e-12)
    expectClose(c.uncertainty!.standard, Math.hypot(6, 2, 0.1), 1e-9)
    expect(c.uncertainty!.contributions.map((x) => `${x.key}:${x.part}`)).toEqual(['pc:gain', 'pc:offset'])
    // The barometer moves both gauge readings alike, so a difference of two has none of it.
    const u = check(result, 'used').uncertainty!
    expect(u.standard).toBe(0)
    expect(u.contributions).toEqual([])
  })

  it('each contribution equals the central difference over a scope rebuilt from the moved data (the shortcut holds)', () => {
    // A nonlinear result over a gauge column, the barometer and the thrust: the engine moves scope
    // entries in place; here the data themselves are moved and the scope built again from them.
    const expr = 'totalImpulse(t, thrust) / (mean(pc) * 0.0001) + pa / max(pc)'
    const assignment = logAssignment(
      { absolute: 0.05, relative: 0.01 },
      { absolute: 2, relative: 0.01 },
      { absolute: 0.1 },
      [{ key: 'x', label: 'Mixed', unit: '1', expected: expr, tolerance: { relative: 0.02 }, points: 1 }],
    )
    const run = logData.tables.run!
    const f = (data: SubmissionData) =>
      evaluateExpression(expr, buildExpressionScope(assignment, data, { units: 'si' })) as number
    const moveColumn = (key: string, g: (v: number) => number): SubmissionData => ({
      ...logData,
      tables: { run: { ...run, [key]: run[key]!.map(g) } },
    })
    const z = (up: SubmissionData, down: SubmissionData) => (f(up) - f(down)) / 2
    const expected = [
      z(
        moveColumn('thrust', (v) => v + 0.05),
        moveColumn('thrust', (v) => v - 0.05),
      ),
      z(
        moveColumn('thrust', (v) => v * 1.01),
        moveColumn('thrust', (v) => v * 0.99),
      ),
      z(
        moveColumn('pc', (v) => v + 2000),
        moveColumn('pc', (v) => v - 2000),
      ),
      z(
        moveColumn('pc', (v) => v * 1.01),
        moveColumn('pc', (v) => v * 0.99),
      ),
      z(
        { ...logData, measurements: { ...logData.measurements, pa: 84e3 + 100 } },
        { ...logData, measurements: { ...logData.measurements, pa: 84e3 - 100 } },
      ),
    ]
    const c = check(gradeSubmission({ assignment, data: logData, reported: {} }), 'x')
    expectClose(c.uncertainty!.standard, Math.sqrt(expected.reduce((s, v) => s + v * v, 0)), 1e-9)
  })
})

describe('coverage tolerances: k × u_c with the relative and absolute tolerance as a floor', () => {
  // Area of a 6 mm throat measured to 0.01 mm: u(A) = A·2·0.01/6 (closed form, as above).
  const area = (Math.PI * 36) / 4
  const u = area * 2 * (0.01 / 6)
  const assignment = scalarAssignment([
    {
      key: 'area',
      label: 'Throat area',
      unit: 'mm2',
      expected: 'areaFromDiameter(d)',
      tolerance: { relative: 0.001, coverage: 2 },
      points: 2,
    },
    {
      key: 'wide',
      label: 'Throat area, wide floor',
      unit: 'mm2',
      expected: 'areaFromDiameter(d)',
      tolerance: { relative: 0.05, coverage: 2 },
      points: 1,
    },
  ])
  const grade = (reported: number) =>
    gradeSubmission({ assignment, data: scalarData, reported: { area: reported, wide: reported } })

  it('passes at 1.9 U and fails at 2.1 U (k = 2; U = u_c here)', () => {
    const pass = check(grade(area + 1.9 * u), 'area')
    expectClose(pass.tolerance as number, 2 * u, 1e-9)
    expect(pass.outcome).toBe('pass')
    expect(pass.pointsAwarded).toBe(2)
    const fail = check(grade(area - 2.1 * u), 'area')
    expect(fail.outcome).toBe('fail')
    expect(fail.pointsAwarded).toBe(0)
    expect(fail.uncertainty!.coverage).toBe(2)
  })

  it('the relative floor applies when it is wider than k·u_c', () => {
    // 5 % of 28.27 mm² = 1.41 mm², far above 2·u = 0.19 mm².
    const c = check(grade(area * 1.04), 'wide')
    expectClose(c.tolerance as number, 0.05 * area, 1e-12)
    expect(c.outcome).toBe('pass')
  })
})

describe('expression parts: reuse never changes a value', () => {
  it('gives the same values as evaluating the whole expression, on the base scope and after a perturbation', () => {
    const assignment = logAssignment(null, null, null, [])
    const scope = buildExpressionScope(assignment, logData, { units: 'si' })
    const exprs = [
      'totalImpulse(t, thrust) / max(pc)',
      'meanValue(select(thrust ./ pc, pc > 300000))',
      'max(pc) > 500000 ? at(thrust, 4) : at(thrust, 99)',
      '(max(pc) > 500000 and pa > 0) or at(thrust, 99) > 0 ? 1 : 2',
      'nozzleFlow({chamberPressure: max(pc), chamberTemperature: 293.15, ambientPressure: pa, throatArea: 1e-5, exitArea: 2e-5, gamma: 1.4, gasConstant: 287.05}).exitMach',
    ]
    const evaluator = new PartEvaluator(scope)
    for (const e of exprs) expect(evaluator.evaluate(e), e).toBe(evaluateExpression(e, scope))
    const moved = { ...scope, pc: (scope.pc as number[]).map((v) => v * 1.1) }
    evaluator.perturb({ scope: moved, moved: new Set(['pc']) })
    for (const e of exprs) expect(evaluator.evaluate(e), e).toBe(evaluateExpression(e, moved))
    evaluator.perturb(null)
    for (const e of exprs) expect(evaluator.evaluate(e), e).toBe(evaluateExpression(e, scope))
  })

  it('a perturbation that leaves the expression’s domain on one side uses the other side', () => {
    // sqrt(b − 0.25) is 0 at b = 0.25 and NaN (not finite) below: the upward side alone gives the
    // slope, (√u − 0)·(u/u) with u = 0.02 × 0.25 = 0.005 (a one-sided difference).
    const assignment = scalarAssignment([
      { key: 's', label: 'Root', unit: '1', expected: 'sqrt(b - 0.25)', tolerance: { absolute: 1 }, points: 1 },
    ])
    const c = check(gradeSubmission({ assignment, data: scalarData, reported: { s: 0 } }), 's')
    expect(c.outcome).toBe('pass')
    expectClose(c.uncertainty!.standard, Math.sqrt(0.005), 1e-9)
  })
})

describe('a column whose zero is taken (tare: true) is moved as read, before the tare', () => {
  // 3 s at 100 Hz: the load cell reads a 0.2 N zero and 20 N more from t = 1 s to 2 s; the chamber
  // transducer reads a 1.5 kPa zero (gauge) and 300 kPa more over the same second. Tared, the
  // chamber reads 0 gauge at rest and 300 kPa during the run. By the trapezoid rule over samples
  // 0.01 s apart, a step held from sample 100 to sample 200 integrates to height × 1.01 s.
  const t = Array.from({ length: 301 }, (_, i) => i / 100)
  const running = (i: number) => i >= 100 && i <= 200
  const data: SubmissionData = {
    tables: {
      run: {
        t,
        thrust: t.map((_, i) => 0.2 + (running(i) ? 20 : 0)),
        pc: t.map((_, i) => 1500 + (running(i) ? 300e3 : 0)),
      },
    },
    measurements: { pa: 84e3 },
  }
  const PRESSURE_IMPULSE = 300e3 * 1.01 // Pa·s, gauge
  const THRUST_IMPULSE = 20 * 1.01 // N·s, tared

  function taredAssignment(thrust: unknown, chamber: unknown, barometer: unknown): Assignment {
    return AssignmentSchema.parse({
      tables: [
        {
          key: 'run',
          label: 'Run',
          minRows: 2,
          columns: [
            { key: 't', label: 'Time', unit: 's', role: 'time' },
            { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust', ...(thrust ? { uncertainty: thrust } : {}) },
            {
              key: 'pc',
              label: 'Chamber pressure',
              unit: 'kPa',
              pressure: 'gauge',
              role: 'chamber-pressure',
              tare: true,
              ...(chamber ? { uncertainty: chamber } : {}),
            },
          ],
        },
      ],
      measurements: [
        {
          key: 'pa',
          label: 'Barometric pressure',
          unit: 'kPa',
          pressure: 'absolute',
          role: 'ambient-pressure',
          ...(barometer ? { uncertainty: barometer } : {}),
        },
      ],
      results: [
        {
          key: 'pressure_impulse',
          label: 'Chamber pressure integral (gauge)',
          unit: '1',
          expected: 'totalImpulse(t, pc) - pa * 3',
          tolerance: { relative: 0.03 },
          points: 1,
        },
        {
          key: 'impulse',
          label: 'Total impulse',
          unit: 'N*s',
          expected: 'reduceThrustRun(t, thrust).totalImpulse',
          tolerance: { relative: 0.03 },
          points: 1,
        },
      ],
    })
  }

  it('the tared values are the closed forms above', () => {
    const result = gradeSubmission({ assignment: taredAssignment(null, { absolute: 1 }, null), data, reported: {} })
    expectClose(check(result, 'pressure_impulse').expected as number, PRESSURE_IMPULSE, 1e-9)
    expectClose(check(result, 'impulse').expected as number, THRUST_IMPULSE, 1e-9)
  })

  it('an offset on a tared column contributes nothing: the tare takes it out again', () => {
    const result = gradeSubmission({
      assignment: taredAssignment({ absolute: 0.05 }, { absolute: 2 }, null),
      data,
      reported: {},
    })
    // Moving the tared column itself would give 2 kPa × 3 s = 6000 Pa·s here.
    for (const key of ['pressure_impulse', 'impulse']) {
      const u = check(result, key).uncertainty!
      expect(u.standard, key).toBeLessThan(1e-9 * (key === 'impulse' ? THRUST_IMPULSE : PRESSURE_IMPULSE))
      expect(u.contributions, key).toEqual([])
    }
  })

  it('a gain on a tared column contributes u_rel × the tared integral (its zero is not multiplied)', () => {
    const result = gradeSubmission({
      assignment: taredAssignment({ relative: 0.005 }, { relative: 0.01 }, null),
      data,
      reported: {},
    })
    // Moving the tared column by 1 % of the reading as logged would give 1 % of (303 000 + 1500 × 3) Pa·s.
    expectClose(check(result, 'pressure_impulse').uncertainty!.standard, 0.01 * PRESSURE_IMPULSE, 1e-9)
    expectClose(check(result, 'impulse').uncertainty!.standard, 0.005 * THRUST_IMPULSE, 1e-9)
    expect(check(result, 'pressure_impulse').uncertainty!.contributions).toEqual([
      { key: 'pc', part: 'gain', label: 'Chamber pressure', share: 1 },
    ])
  })

  it('the barometer moves the tared column with it (a gauge integral less pa × the span has none of it)', () => {
    const result = gradeSubmission({ assignment: taredAssignment(null, null, { absolute: 0.1 }), data, reported: {} })
    expect(check(result, 'pressure_impulse').uncertainty!.standard).toBeLessThan(1e-6)
  })

  it('each contribution equals the central difference over a scope rebuilt (and tared) from the moved data', () => {
    // A noisy log with a drifting chamber zero, and a result mixing the chamber reading, the barometer
    // and the reduced run; the data themselves are moved and the scope built and tared again.
    const noise = (i: number) => Math.sin(i * 12.9898) * 0.5
    const moving: SubmissionData = {
      tables: {
        run: {
          t,
          thrust: t.map((x, i) => 0.2 + 0.02 * noise(i) + (running(i) ? 20 * (1 - 0.3 * (x - 1)) : 0)),
          pc: t.map((x, i) => 1500 + 300 * x + 50 * noise(i + 7) + (running(i) ? 300e3 * (1 - 0.3 * (x - 1)) : 0)),
        },
      },
      measurements: { pa: 84e3 },
    }
    const expr = 'reduceThrustRun(t, thrust).totalImpulse / (1e-5 * totalImpulse(t, pc)) + max(pc) / pa'
    const assignment = AssignmentSchema.parse({
      ...taredAssignment({ absolute: 0.05, relative: 0.005 }, { absolute: 2, relative: 0.01 }, { absolute: 0.1 }),
      results: [{ key: 'x', label: 'Mixed', unit: '1', expected: expr, tolerance: { relative: 0.02 }, points: 1 }],
    })
    const run = moving.tables.run!
    const f = (d: SubmissionData) =>
      evaluateExpression(expr, buildExpressionScope(assignment, d, { units: 'si' })) as number
    const moveColumn = (key: string, g: (v: number) => number): SubmissionData => ({
      ...moving,
      tables: { run: { ...run, [key]: run[key]!.map(g) } },
    })
    const z = (up: SubmissionData, down: SubmissionData) => (f(up) - f(down)) / 2
    const expected = [
      z(
        moveColumn('thrust', (v) => v + 0.05),
        moveColumn('thrust', (v) => v - 0.05),
      ),
      z(
        moveColumn('thrust', (v) => v * 1.005),
        moveColumn('thrust', (v) => v * 0.995),
      ),
      z(
        moveColumn('pc', (v) => v + 2000),
        moveColumn('pc', (v) => v - 2000),
      ),
      z(
        moveColumn('pc', (v) => v * 1.01),
        moveColumn('pc', (v) => v * 0.99),
      ),
      z({ ...moving, measurements: { pa: 84e3 + 100 } }, { ...moving, measurements: { pa: 84e3 - 100 } }),
    ]
    const c = check(gradeSubmission({ assignment, data: moving, reported: {} }), 'x')
    expectClose(c.uncertainty!.standard, Math.sqrt(expected.reduce((s, v) => s + v * v, 0)), 1e-7)
  })
})

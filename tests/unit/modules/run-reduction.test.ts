import { describe, expect, it } from 'vitest'
import { gradeSubmission } from '../../../shared/grading/grade'
import {
  ExpressionError,
  evaluateExpression,
  validateAssignmentExpressions,
  validateExpression,
} from '../../../shared/modules/expressions'
import type { ExpressionContext } from '../../../shared/modules/expressions'
import { AssignmentSchema } from '../../../shared/modules/schema'
import { MAX_TARE_ZERO, buildExpressionScope, syntheticSubmission, taredScope } from '../../../shared/modules/scope'
import type { SubmissionData } from '../../../shared/modules/scope'
import { reduceThrustRun } from '../../../shared/physics/index'
import { expectClose } from '../../helpers/expect-close'

/**
 * The run reduction as module expressions and the assignment schema see it: reduceThrustRun and
 * its fields, windowMean and windowIntegral, and `tare: true` on a gauge pressure column.
 *
 * The log used throughout, worked out by hand: t = 0, 0.1 … 3 s (31 samples); the load cell reads
 * 0.4 N at rest and 0.4 + 20 N from 1.0 to 2.0 s; the chamber transducer reads 2 kPa gauge at rest
 * and 2 + 300 kPa from 1.0 to 2.0 s. Tared, the thrust is 0 / 20 N and the chamber 0 / 300 kPa
 * gauge. The window (5 % of 20 N = 1 N) opens at 0.9 + 0.1·0.05 = 0.905 s and closes at
 * 2.0 + 0.1·0.95 = 2.095 s.
 */
const T = Array.from({ length: 31 }, (_, i) => i / 10)
const inRun = (i: number) => i >= 10 && i <= 20
const THRUST = T.map((_, i) => 0.4 + (inRun(i) ? 20 : 0))
const CHAMBER_KPA = T.map((_, i) => 2 + (inRun(i) ? 300 : 0))

// The chamber as an expression sees it once its zero is taken: absolute, 84 kPa at rest.
const scope = { t: T, thrust: THRUST, pc: T.map((_, i) => 84_000 + (inRun(i) ? 300_000 : 0)) }
const context: ExpressionContext = {
  produces: 'number',
  names: [
    { name: 't', shape: 'array', sample: scope.t },
    { name: 'thrust', shape: 'array', sample: scope.thrust },
    { name: 'pc', shape: 'array', sample: scope.pc },
  ],
}
const messages = (expr: string) =>
  validateExpression(expr, context)
    .map((i) => i.message)
    .join(' | ')

describe('reduceThrustRun, windowMean and windowIntegral in module expressions', () => {
  it('every field of the reduced run can be read, and equals the library function', () => {
    const library = reduceThrustRun(T, THRUST)
    for (const field of [
      'zeroBefore',
      'zeroAfter',
      'start',
      'end',
      'burnTime',
      'totalImpulse',
      'peakThrust',
      'meanThrust',
    ] as const) {
      expect(evaluateExpression(`reduceThrustRun(t, thrust).${field}`, scope), field).toBe(library[field])
    }
    // By hand: 10 intervals of 0.1 s at 20 N and two edge intervals of 0.1·20/2: 22 N·s.
    expectClose(evaluateExpression('reduceThrustRun(t, thrust).totalImpulse', scope) as number, 22, 1e-12)
    expectClose(evaluateExpression('reduceThrustRun(t, thrust).start', scope) as number, 0.905, 1e-12)
    expectClose(evaluateExpression('reduceThrustRun(t, thrust).end', scope) as number, 2.095, 1e-12)
  })

  it('takes the threshold as an object of options', () => {
    // 50 % of 20 N: halfway between the samples either side of each step.
    expectClose(evaluateExpression('reduceThrustRun(t, thrust, {threshold: 0.5}).start', scope) as number, 0.95, 1e-12)
    expect(messages('reduceThrustRun(t, thrust, {threshold: 0.5}).burnTime')).toBe('')
  })

  it('windowMean and windowIntegral over the run window: the mean chamber pressure while the thrust is on', () => {
    // Inside [0.905, 2.095] s the chamber (absolute) is 84 kPa + 300 kPa·(tared thrust / 20 N):
    // ∫ = 84 kPa·1.19 s + 300 kPa·(2 × 0.095·(0.05 + 1)/2 + 1) s = 99.96 + 329.925 kPa·s.
    const expr = 'windowIntegral(t, pc, reduceThrustRun(t, thrust).start, reduceThrustRun(t, thrust).end)'
    expectClose(evaluateExpression(expr, scope) as number, 99_960 + 329_925, 1e-12)
    const mean = 'windowMean(t, pc, reduceThrustRun(t, thrust).start, reduceThrustRun(t, thrust).end)'
    expectClose(evaluateExpression(mean, scope) as number, (99_960 + 329_925) / 1.19, 1e-12)
  })

  it('refuses unknown fields and options, a missing field, and explains a failed reduction', () => {
    expect(messages('reduceThrustRun(t, thrust).impulse')).toContain(
      'there is no field "impulse"; its fields are zeroBefore, zeroAfter, start, end',
    )
    expect(messages('reduceThrustRun(t, thrust, {level: 0.1}).start')).toContain(
      'has no option named level; its options are threshold',
    )
    expect(messages('reduceThrustRun(t, thrust)')).toContain('a group of values')
    expect(messages('reduceThrustRun(t)')).toContain('reduceThrustRun takes 2 to 3 arguments, but 1 is given')
    expect(messages('windowMean(t, pc, 1)')).toContain('windowMean takes 4 arguments')
    expect(messages('max({threshold: 1})')).toContain('options of reduceThrustRun')
    let error: unknown
    try {
      evaluateExpression('reduceThrustRun(t, thrust).peakThrust', { t: T, thrust: T.map(() => 0.4) })
    } catch (e) {
      error = e
    }
    expect(error).toBeInstanceOf(ExpressionError)
    expect((error as Error).message).toContain('no run above the noise')
  })

  it('gives the same answer however often a module reads the run, and a new answer for new data', () => {
    const first = evaluateExpression(
      'reduceThrustRun(t, thrust).peakThrust + reduceThrustRun(t, thrust).meanThrust',
      scope,
    ) as number
    expect(
      evaluateExpression('reduceThrustRun(t, thrust).peakThrust + reduceThrustRun(t, thrust).meanThrust', scope),
    ).toBe(first)
    const doubled = { ...scope, thrust: THRUST.map((f) => 2 * f) }
    expectClose(evaluateExpression('reduceThrustRun(t, thrust).peakThrust', doubled) as number, 40, 1e-12)
  })
})

const tareSpec = (column: Record<string, unknown>, extra: Record<string, unknown>[] = []) => ({
  tables: [
    {
      key: 'run',
      label: 'Run',
      columns: [
        { key: 't', label: 'Time', unit: 's', role: 'time' },
        { key: 'thrust', label: 'Thrust', unit: 'N', role: 'thrust' },
        { key: 'pc', label: 'Chamber', unit: 'kPa', pressure: 'gauge', role: 'chamber-pressure', ...column },
        ...extra,
      ],
    },
  ],
  measurements: [{ key: 'pa', label: 'Barometer', unit: 'kPa', pressure: 'absolute', role: 'ambient-pressure' }],
  results: [{ key: 'cf', label: 'C_F', unit: '1', expected: 'max(pc)', tolerance: { relative: 0.05 }, points: 1 }],
})

describe('tare: true in the assignment schema', () => {
  it('is accepted on a gauge pressure column of a table with a thrust run', () => {
    expect(AssignmentSchema.safeParse(tareSpec({ tare: true })).success).toBe(true)
  })

  it('is refused on an absolute pressure or a non-pressure column, naming the field', () => {
    const absolute = AssignmentSchema.safeParse(tareSpec({ tare: true, pressure: 'absolute' }))
    expect(absolute.success).toBe(false)
    expect(absolute.error?.issues[0]?.path).toEqual(['tables', 0, 'columns', 2, 'tare'])
    expect(absolute.error?.issues[0]?.message).toContain('needs a pressure column with "pressure: gauge"')
    const force = AssignmentSchema.safeParse(
      tareSpec({}, [{ key: 'side', label: 'Side force', unit: 'N', tare: true }]),
    )
    expect(force.error?.issues[0]?.message).toContain('needs a pressure column')
  })

  it('is refused in a table without a thrust column', () => {
    const spec = tareSpec({ tare: true })
    const columns = spec.tables[0]!.columns.map((c) =>
      c.key === 'thrust' ? { key: 'thrust', label: 'Thrust', unit: 'N' } : c,
    )
    const result = AssignmentSchema.safeParse({ ...spec, tables: [{ ...spec.tables[0], columns }] })
    expect(result.success).toBe(false)
    expect(result.error?.issues.map((i) => i.message).join(' ')).toContain(
      'needs a column with role: thrust and one with role: time',
    )
  })
})

describe('tare: true when the scope is built', () => {
  const assignment = AssignmentSchema.parse(tareSpec({ tare: true }))
  const data: SubmissionData = { tables: { run: { t: T, thrust: THRUST, pc: CHAMBER_KPA } }, measurements: { pa: 84 } }

  it('takes the chamber transducer zero (2 kPa) with the thrust run: ambient at rest, 300 kPa gauge above it in the run', () => {
    const pc = buildExpressionScope(assignment, data).pc as number[]
    pc.forEach((p, i) => expectClose(p, 84_000 + (inRun(i) ? 300_000 : 0), 1e-12, `sample ${i}`))
    // Left out, the column is as logged: 2 kPa gauge above ambient at rest.
    const logged = buildExpressionScope(assignment, data, { tare: false }).pc as number[]
    expectClose(logged[0] as number, 86_000, 1e-12)
  })

  it('the same from SI data, and taredScope gives what tare: true gives', () => {
    const si: SubmissionData = {
      tables: { run: { t: T, thrust: THRUST, pc: CHAMBER_KPA.map((p) => 1000 * p) } },
      measurements: { pa: 84_000 },
    }
    const direct = buildExpressionScope(assignment, si, { units: 'si' })
    const later = taredScope(assignment, si, buildExpressionScope(assignment, si, { units: 'si', tare: false }))
    expect(later.pc).toEqual(direct.pc)
    expectClose((direct.pc as number[])[0] as number, 84_000, 1e-12)
  })

  it('leaves a column read absolute in this hand-in, a zero above 10 % of ambient, and a log without a run as logged', () => {
    const absolute = buildExpressionScope(assignment, { ...data, pressures: { pc: 'absolute' } }).pc as number[]
    expect(absolute[0]).toBe(2000)
    expect(MAX_TARE_ZERO).toBe(0.1)
    // A receiver swapped in: 500 kPa at rest is no transducer zero.
    const swapped = buildExpressionScope(assignment, {
      ...data,
      tables: { run: { t: T, thrust: THRUST, pc: T.map(() => 500) } },
    }).pc as number[]
    expectClose(swapped[0] as number, 584_000, 1e-12)
    const noRun = buildExpressionScope(assignment, {
      ...data,
      tables: { run: { t: T, thrust: T.map(() => 0.4), pc: CHAMBER_KPA } },
    }).pc as number[]
    expectClose(noRun[0] as number, 86_000, 1e-12)
  })

  it('the grading engine grades with the tared column and runs its data checks on the column as logged', () => {
    const absoluteLogged: SubmissionData = {
      tables: { run: { t: T, thrust: THRUST, pc: CHAMBER_KPA.map((p) => 1000 * (p + 84)) } },
      measurements: { pa: 84_000 },
    }
    // Logged absolute but declared gauge: 86 kPa at rest looks absolute, and the check still sees it.
    const graded = gradeSubmission({ assignment, data: absoluteLogged, reported: { cf: 1 } })
    expect(graded.flags.map((f) => f.code)).toContain('pressure-looks-absolute')
    // With the right reading, the expected value is the tared peak: 84 + 300 kPa.
    const right = gradeSubmission({
      assignment,
      data: {
        tables: { run: { t: T, thrust: THRUST, pc: CHAMBER_KPA.map((p) => 1000 * p) } },
        measurements: { pa: 84_000 },
      },
      reported: { cf: 1 },
    })
    expectClose(right.checks[0]?.expected as number, 384_000, 1e-12)
  })

  it('made-up data for the save-time trial have a run with quiet ends, so the reduction and the tare work on them', () => {
    const synthetic = syntheticSubmission(assignment)
    const s = buildExpressionScope(assignment, synthetic)
    const run = reduceThrustRun(s.t as number[], s.thrust as number[])
    expectClose(run.zeroBefore, 0.3, 1e-12)
    // 60 N falling to 15 N over rows 7–35 of 41 (0.15 to 0.85 of the log); read through the
    // 5-sample median, the first run sample (60 N, after two at rest) gives way to the third,
    // 60 − 45·(0.05/0.7) N.
    expectClose(run.peakThrust, 60 - 45 * (0.05 / 0.7), 1e-12)
    expect((s.pc as number[])[0]).toBe(101_325)
    const withReduction = AssignmentSchema.parse({
      ...tareSpec({ tare: true }),
      results: [
        {
          key: 'cf',
          label: 'C_F',
          unit: '1',
          expected:
            'reduceThrustRun(t, thrust).meanThrust / windowMean(t, pc, reduceThrustRun(t, thrust).start, reduceThrustRun(t, thrust).end)',
          tolerance: { relative: 0.05 },
          points: 1,
        },
      ],
    })
    expect(validateAssignmentExpressions(withReduction)).toEqual([])
  })
})

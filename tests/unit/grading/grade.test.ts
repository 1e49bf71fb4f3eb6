import { describe, expect, it } from 'vitest'
import { gradeSubmission } from '../../../shared/grading/grade'
import type { CheckResult, GradeResult } from '../../../shared/grading/grade'
import { AssignmentSchema } from '../../../shared/modules/schema'
import type { SubmissionData } from '../../../shared/modules/scope'
import { ScopeError } from '../../../shared/modules/scope'
import { expectClose } from '../../helpers/expect-close'

// 1 lbf = 4.4482216152605 N exactly.
const LBF = 4.4482216152605

const assignment = AssignmentSchema.parse({
  tables: [
    {
      key: 'run',
      label: 'Run',
      minRows: 2,
      columns: [
        { key: 't', label: 'Time', unit: 's', role: 'time' },
        { key: 'force', label: 'Force', unit: 'N' },
        { key: 'pc', label: 'Chamber', unit: 'kPa', pressure: 'gauge' },
      ],
    },
  ],
  measurements: [{ key: 'pa', label: 'Barometer', unit: 'kPa', pressure: 'absolute', role: 'ambient-pressure' }],
  results: [
    {
      key: 'peak',
      label: 'Peak force',
      unit: 'N',
      expected: 'max(force)',
      tolerance: { relative: 0.05 },
      points: 2,
      partial: { within: 2, fraction: 0.5 },
    },
    {
      key: 'first',
      label: 'Force at the first sample',
      unit: 'N',
      expected: 'at(force, 1)',
      tolerance: { absolute: 0.1 },
      points: 1,
    },
    {
      key: 'impulse',
      label: 'Impulse',
      unit: 'lbf*s',
      expected: 'totalImpulse(t, force)',
      tolerance: { relative: 0.01 },
      points: 1,
    },
    {
      key: 'pc_peak',
      label: 'Peak chamber pressure',
      unit: 'kPa',
      expected: 'max(pc)',
      tolerance: { relative: 0.02, absolute: 5 },
      points: 1,
    },
    {
      key: 'sample99',
      label: 'Force at sample 99',
      unit: 'N',
      expected: 'at(force, 99)',
      tolerance: { relative: 0.05 },
      points: 1,
    },
  ],
})

// The data in SI, as parseLog gives them: the chamber pressure gauge, in Pa.
const data: SubmissionData = {
  tables: { run: { t: [0, 1, 2, 3], force: [0, 100, 50, 0], pc: [0, 400_000, 300_000, 0] } },
  measurements: { pa: 84_000 },
}

// Hand-worked expected values:
// peak = max(force) = 100 N; tolerance 5 % of 100 = 5 N; partial band 2 × 5 = 10 N.
// first = 0 N; only an absolute tolerance of 0.1 N.
// impulse = trapezoid (0+100)/2·1 + (100+50)/2·1 + (50+0)/2·1 = 50 + 75 + 25 = 150 N·s = 150 / 4.4482216152605 lbf·s.
// pc_peak = 400 kPa gauge + 84 kPa = 484 kPa absolute; tolerance max(5, 0.02 × 484 = 9.68) = 9.68 kPa.
// sample99: at(force, 99) with 4 samples throws.
const IMPULSE_LBFS = 150 / LBF

const correct = { peak: 100, first: 0, impulse: IMPULSE_LBFS, pc_peak: 484, sample99: 1 }

function check(result: GradeResult, key: string): CheckResult {
  const found = result.checks.find((c) => c.key === key)
  if (!found) throw new Error(`no check ${key}`)
  return found
}

function grade(reported: Record<string, number>, latePenalty?: number): GradeResult {
  return gradeSubmission({ assignment, data, reported, ...(latePenalty === undefined ? {} : { latePenalty }) })
}

describe('gradeSubmission: within tolerance, partial credit and failure', () => {
  it('reported 105 against an expected 100 with a 5 % tolerance passes: |105 − 100| = 5 = 0.05 × 100, on the boundary', () => {
    const c = check(grade({ ...correct, peak: 105 }), 'peak')
    expect(c.expected).toBe(100)
    expect(c.reported).toBe(105)
    expect(c.absError).toBe(5)
    expect(c.relError).toBe(0.05)
    expect(c.tolerance).toBe(5)
    expect(c.outcome).toBe('pass')
    expect(c.pass).toBe(true)
    expect(c.pointsAwarded).toBe(2)
    expect(c.pointsPossible).toBe(2)
  })

  it('reported 106 is outside the 5 N tolerance but inside twice it (10 N): partial credit, 0.5 × 2 points = 1', () => {
    const c = check(grade({ ...correct, peak: 106 }), 'peak')
    expect(c.outcome).toBe('partial')
    expect(c.pass).toBe(false)
    expect(c.pointsAwarded).toBe(1)
  })

  it('the partial band is symmetric and closed: 94.9 (error 5.1) and 110 (error 10 = 2 × 5) are partial, 110.01 fails', () => {
    expect(check(grade({ ...correct, peak: 94.9 }), 'peak').outcome).toBe('partial')
    expect(check(grade({ ...correct, peak: 110 }), 'peak').outcome).toBe('partial')
    const c = check(grade({ ...correct, peak: 110.01 }), 'peak')
    expect(c.outcome).toBe('fail')
    expect(c.pointsAwarded).toBe(0)
  })

  it('a result without a partial band fails just outside its tolerance: impulse 1.1 % off with a 1 % tolerance', () => {
    const c = check(grade({ ...correct, impulse: IMPULSE_LBFS * 1.011 }), 'impulse')
    expect(c.outcome).toBe('fail')
    expect(c.pointsAwarded).toBe(0)
  })

  it('an expected value of 0 is graded by the absolute tolerance alone: 0.1 passes, 0.11 fails, and there is no relative error', () => {
    const on = check(grade({ ...correct, first: 0.1 }), 'first')
    expect(on.expected).toBe(0)
    expect(on.tolerance).toBe(0.1)
    expect(on.outcome).toBe('pass')
    expect(on.relError).toBeNull()
    const off = check(grade({ ...correct, first: -0.11 }), 'first')
    expect(off.outcome).toBe('fail')
    expectClose(off.absError as number, 0.11, 1e-12)
    expect(off.relError).toBeNull()
  })

  it('compares in the result unit: 150 N·s is expected as 150 / 4.4482216152605 = 33.72135 lbf·s', () => {
    const c = check(grade(correct), 'impulse')
    expectClose(c.expected as number, 33.72135, 1e-6)
    expectClose(c.expected as number, IMPULSE_LBFS, 1e-12)
    expectClose(c.tolerance as number, 0.01 * IMPULSE_LBFS, 1e-12)
    expect(c.outcome).toBe('pass')
  })

  it('makes a gauge column absolute with the barometer before the expression runs, and takes the larger of the two tolerances', () => {
    const c = check(grade(correct), 'pc_peak')
    expect(c.expected).toBe(484)
    // max(5 kPa, 0.02 × 484 kPa) = 9.68 kPa.
    expectClose(c.tolerance as number, 9.68, 1e-12)
    // Exactly on the boundary, after floating-point subtraction: 493.68 − 484.
    expect(check(grade({ ...correct, pc_peak: 484 + 9.68 }), 'pc_peak').outcome).toBe('pass')
    expect(check(grade({ ...correct, pc_peak: 484 - 9.7 }), 'pc_peak').outcome).toBe('fail')
  })

  it('when the absolute tolerance is the larger, it is the one used: expected 2, tolerance max(0.5, 0.1 × 2) = 0.5', () => {
    const small = AssignmentSchema.parse({
      tables: [],
      measurements: [{ key: 'x', label: 'X', unit: '1' }],
      results: [
        {
          key: 'twice',
          label: 'Twice x',
          unit: '1',
          expected: '2 * x',
          tolerance: { relative: 0.1, absolute: 0.5 },
          points: 1,
        },
      ],
    })
    const result = gradeSubmission({
      assignment: small,
      data: { tables: {}, measurements: { x: 1 } },
      reported: { twice: 2.5 },
    })
    expect(check(result, 'twice').tolerance).toBe(0.5)
    expect(check(result, 'twice').outcome).toBe('pass')
  })

  it('a result that was not reported, or is not a finite number, fails with no reported value', () => {
    const { peak: _omitted, ...rest } = correct
    const missing = check(grade(rest), 'peak')
    expect(missing.reported).toBeNull()
    expect(missing.outcome).toBe('fail')
    expect(missing.expected).toBe(100)
    expect(check(grade({ ...correct, peak: Number.NaN }), 'peak').reported).toBeNull()
  })
})

describe('gradeSubmission: an expected value that cannot be computed', () => {
  const result = grade(correct)
  const c = check(result, 'sample99')

  it('is outcome "error" with 0 points, no expected value, and the reason', () => {
    expect(c.outcome).toBe('error')
    expect(c.pass).toBe(false)
    expect(c.pointsAwarded).toBe(0)
    expect(c.pointsPossible).toBe(1)
    expect(c.expected).toBeNull()
    expect(c.tolerance).toBeNull()
    expect(c.error).toMatch(/at: the index must be a whole number from 1 to 4/)
  })

  it('raises an expression-failed flag that names the result, for staff', () => {
    const flag = result.flags.find((f) => f.code === 'expression-failed')
    expect(flag?.detail?.result).toBe('sample99')
    expect(flag?.message).toContain('Force at sample 99')
  })
})

describe('gradeSubmission: score and late penalty', () => {
  it('adds the points awarded and the points possible: 2 + 1 + 1 + 1 + 0 of 2 + 1 + 1 + 1 + 1', () => {
    const result = grade(correct)
    expect(result.rawScore).toBe(5)
    expect(result.maxScore).toBe(6)
    expect(result.score).toBe(5)
    expect(result.latePenalty).toBe(0)
  })

  it('takes the late penalty off the total and keeps the raw score: 5 × (1 − 0.2) = 4', () => {
    const result = grade(correct, 0.2)
    expect(result.rawScore).toBe(5)
    expect(result.score).toBe(4)
    expect(result.latePenalty).toBe(0.2)
  })

  it('with partial credit: (1 + 1 + 1 + 1 + 0) × (1 − 0.5) = 2', () => {
    expect(grade({ ...correct, peak: 106 }, 0.5).score).toBe(2)
  })

  it('refuses a late penalty outside 0–1', () => {
    expect(() => grade(correct, 1.5)).toThrow(RangeError)
    expect(() => grade(correct, -0.1)).toThrow(/from 0 to 1/)
    expect(() => grade(correct, Number.NaN)).toThrow(RangeError)
  })

  it('throws a ScopeError naming what is missing when the data do not fit the assignment', () => {
    expect(() => gradeSubmission({ assignment, data: { ...data, measurements: {} }, reported: correct })).toThrow(
      ScopeError,
    )
    expect(() => gradeSubmission({ assignment, data: { ...data, measurements: {} }, reported: correct })).toThrow(
      /"pa" is missing/,
    )
  })
})

describe('gradeSubmission: review rules', () => {
  const ruled = AssignmentSchema.parse({
    ...assignment,
    reviewRules: [
      // Reported results are in SI for rules: 33.72 lbf·s is 150 N·s, so the rule is about N·s.
      { key: 'impulse_big', when: 'impulse > 140', reason: 'The impulse is above 140 N·s.' },
      { key: 'impulse_tiny', when: 'impulse < 40', reason: 'The impulse is below 40 N·s.' },
      { key: 'broken', when: 'at(force, 10) > 1', reason: 'Never evaluates.' },
      { key: 'not_boolean', when: 'max(force)', reason: 'Gives a number.' },
      { key: 'about_first', when: 'first > 1', reason: 'The first sample is above 1 N.' },
    ],
  })

  it('flag with the rule key and its reason, seeing the reported results converted to SI', () => {
    const result = gradeSubmission({ assignment: ruled, data, reported: correct })
    const codes = result.flags.map((f) => f.code)
    expect(codes).toContain('rule:impulse_big')
    expect(codes).not.toContain('rule:impulse_tiny')
    expect(result.flags.find((f) => f.code === 'rule:impulse_big')?.message).toBe('The impulse is above 140 N·s.')
  })

  it('a rule that throws, or gives a number, is an expression-failed flag naming the rule', () => {
    const result = gradeSubmission({ assignment: ruled, data, reported: correct })
    const failed = result.flags
      .filter((f) => f.code === 'expression-failed')
      .map((f) => f.detail?.rule ?? f.detail?.result)
    expect(failed).toEqual(['sample99', 'broken', 'not_boolean'])
  })

  it('a rule about a result the student did not report is left out, not failed', () => {
    const { first: _omitted, ...rest } = correct
    const result = gradeSubmission({ assignment: ruled, data, reported: rest })
    expect(result.flags.some((f) => f.detail?.rule === 'about_first')).toBe(false)
    expect(result.flags.some((f) => f.code === 'rule:impulse_big')).toBe(true)
  })
})

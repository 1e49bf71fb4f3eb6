import { describe, expect, it } from 'vitest'
import { DEMO_GROUPS, DEMO_REPORTING_MISTAKES, DEMO_WRONG_RUNS, coldFlowAssignment, demoRuns } from '../../scripts/demo/demo-runs'
import type { DemoRun } from '../../scripts/demo/demo-runs'
import { parseLog } from '../../shared/grading/csv'
import { gradeSubmission } from '../../shared/grading/grade'
import type { GradeResult } from '../../shared/grading/grade'
import { valueToSI } from '../../shared/modules/quantities'

const assignment = coldFlowAssignment()
const table = assignment.tables[0]!
const runs = demoRuns(assignment)

function graded(run: DemoRun): GradeResult {
  const parsed = parseLog(run.csv, table, run.mapping)
  if (!parsed.ok) throw new Error(`${run.group}: ${JSON.stringify(parsed.errors)}`)
  const measurements = Object.fromEntries(assignment.measurements.map((m) => [m.key, valueToSI(run.measurements[m.key] as number, m.unit)]))
  return gradeSubmission({
    assignment,
    data: { tables: { [table.key]: parsed.columns }, measurements, pressures: parsed.pressures },
    reported: run.reported,
  })
}

const results = new Map(runs.map((r) => [r.group, graded(r)]))
const wrongGroups = new Set(DEMO_WRONG_RUNS.map((w) => w.group))

describe('the demo runs', () => {
  it('are one per demo lab group, A1–A4 and B1–B4', () => {
    expect(DEMO_GROUPS).toEqual(['A1', 'A2', 'A3', 'A4', 'B1', 'B2', 'B3', 'B4'])
    expect(runs.map((r) => r.group)).toEqual(DEMO_GROUPS)
  })

  it('are the same every time (seeded)', () => {
    expect(demoRuns(assignment)).toEqual(runs)
  })

  it("every log parses against the cold-flow module's table, with its headers and at least its minimum rows", () => {
    for (const run of runs) {
      const parsed = parseLog(run.csv, table, run.mapping)
      expect(parsed.ok, run.group).toBe(true)
      if (!parsed.ok) continue
      expect(parsed.headers).toEqual(table.columns.map((c) => c.key))
      expect(parsed.rowCount).toBeGreaterThanOrEqual(table.minRows)
    }
  })

  it('log in the units the module declares: seconds at 100 Hz, newtons, kPa gauge (0 at rest)', () => {
    for (const run of runs) {
      const lines = run.csv.trim().split('\n')
      expect(lines[1]?.split(',')[0]).toBe('0.00')
      expect(lines[2]?.split(',')[0]).toBe('0.01')
      // Before the valve opens the chamber reads about 0 kPa gauge, the receiver its charge.
      const [, , receiver, chamber] = (lines[1] as string).split(',').map(Number)
      expect(Math.abs(chamber as number), run.group).toBeLessThan(2)
      expect(receiver as number).toBeCloseTo(run.measurements.p_initial as number, -1)
    }
  })

  it('give measurements inside the ranges the module allows', () => {
    for (const run of runs) {
      for (const m of assignment.measurements) {
        const v = run.measurements[m.key] as number
        if (m.min !== undefined) expect(v, `${run.group} ${m.key}`).toBeGreaterThanOrEqual(m.min)
        if (m.max !== undefined) expect(v, `${run.group} ${m.key}`).toBeLessThanOrEqual(m.max)
      }
    }
  })

  it('have distinct logs except the copied one, which is byte for byte its original', () => {
    const copy = DEMO_WRONG_RUNS.find((w) => w.copiesGroup)
    expect(copy).toMatchObject({ group: 'A3', copiesGroup: 'A1' })
    const csvOf = (g: string) => runs.find((r) => r.group === g)?.csv
    expect(csvOf('A3')).toBe(csvOf('A1'))
    const others = runs.filter((r) => r.group !== 'A3').map((r) => r.csv)
    expect(new Set(others).size).toBe(others.length)
  })
})

describe('grading the demo runs', () => {
  it('the runs with sound data raise no flags', () => {
    for (const group of DEMO_GROUPS.filter((g) => !wrongGroups.has(g))) {
      expect(results.get(group)?.flags, group).toEqual([])
    }
  })

  it.each(DEMO_WRONG_RUNS.map((w) => [w.group, w.problem, w.flags] as const))('%s (%s) raises exactly %j', (group, _problem, flags) => {
    const codes = (results.get(group)?.flags ?? []).map((f) => f.code)
    expect([...codes].sort()).toEqual([...flags].sort())
  })

  it('the groups that report carefully get full marks; their small errors stay within tolerance', () => {
    const mistaken = new Set(DEMO_REPORTING_MISTAKES.map((m) => m.group))
    for (const group of ['A1', 'A3', 'A4', 'B3', 'B4']) {
      expect(mistaken.has(group)).toBe(false)
      const r = results.get(group)
      expect(r?.checks.map((c) => [c.key, c.outcome]), group).toEqual(assignment.results.map((s) => [s.key, 'pass']))
      expect(r?.score).toBe(r?.maxScore)
    }
  })

  it('the reporting mistakes fall outside the tolerance, and only those', () => {
    for (const { group, results: keys } of DEMO_REPORTING_MISTAKES) {
      const checks = results.get(group)?.checks ?? []
      for (const c of checks) {
        if (keys.includes(c.key)) expect(c.outcome, `${group} ${c.key}`).not.toBe('pass')
        else expect(c.outcome, `${group} ${c.key}`).toBe('pass')
      }
    }
  })

  it('B1 reported the peak thrust in kgf: about 1/9.80665 of the newtons expected', () => {
    const c = results.get('B1')?.checks.find((x) => x.key === 'peak_thrust')
    expect(c?.outcome).toBe('fail')
    expect((c?.reported as number) * 9.80665).toBeCloseTo(c?.expected as number, -0.5)
  })

  it('B2, whose chamber pressure is taken as absolute, cannot have its thrust coefficient computed (a zero chamber pressure at rest)', () => {
    const c = results.get('B2')?.checks.find((x) => x.key === 'cf_mean')
    expect(c?.outcome).toBe('error')
    expect(c?.error).toMatch(/select: values\[\d+\] must be a finite number/)
  })

  it('B4, with its thrust 1.6 times too large, is about 1.47 times the ideal at its peak', () => {
    const flag = results.get('B4')?.flags.find((f) => f.code === 'thrust-above-ideal')
    const ratio = (flag?.detail?.peakThrust as number) / (flag?.detail?.idealThrust as number)
    // 1.6 × the stand's thrust efficiency of 0.92 = 1.472, give or take the load-cell offset and noise.
    expect(ratio).toBeGreaterThan(1.45)
    expect(ratio).toBeLessThan(1.5)
  })
})
